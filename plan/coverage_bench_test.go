package plan

import (
	"context"
	"encoding/binary"
	"fmt"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"runtime"
	"strconv"
	"strings"
	"syscall"
	"testing"
	"time"

	"github.com/mastlink/mastlink/terrain"
	"github.com/paulmach/orb"
)

// benchTile1s writes a generated 1″ SRTM tile N45E007.hgt (3601 × 3601,
// rough invented hills and valleys, 0–1200 m) into dir.
func benchTile1s(b *testing.B, dir string) string {
	b.Helper()
	const n = 3601
	buf := make([]byte, 2*n*n)
	for r := range n {
		for c := range n {
			y, x := float64(r)/n, float64(c)/n
			h := 600 + 300*math.Sin(7*x+2*math.Sin(5*y)) + 200*math.Sin(13*y+1) +
				90*math.Sin(41*x+29*y) + 40*math.Sin(97*x-71*y) + 12*math.Sin(311*x+173*y)
			binary.BigEndian.PutUint16(buf[2*(r*n+c):], uint16(int16(math.Round(h))))
		}
	}
	path := filepath.Join(dir, "N45E007.hgt")
	if err := os.WriteFile(path, buf, 0o644); err != nil {
		b.Fatal(err)
	}
	return path
}

// BenchmarkCoverage40km1s maps a 40 km radius around the centre of a 1″
// tile (about 7.5 million cells within the radius) in line-of-sight and
// loss mode, and runs GDAL's gdal_viewshed (GDAL 3.6, Debian gdal-bin) on
// the same area side by side: the tile reprojected to UTM zone 32N at 25 m
// (gdalwarp, bilinear, outside the timing), 40 km maximum distance, as
// many runs as ours, interleaved with them. Each reports ns per cell
// within the radius (wall and CPU) and the ratios to gdal_viewshed's
// (vs-gdal-wall, vs-gdal-cpu; below 1 is faster), plus the bytes it
// allocates per map (the tile, 52 MB as float32, is loaded before the
// timing).
//
// Wall time is what a user waits for: CoverageMap uses every core while
// gdal_viewshed 3.6 runs on one, so the wall ratio is about the CPU ratio
// divided by the cores. CPU time comes from getrusage (this process for
// ours, the children for gdal_viewshed); on a machine shared with other
// work both are inflated, so compare the ratios of one run.
func BenchmarkCoverage40km1s(b *testing.B) {
	dir := b.TempDir()
	hgt := benchTile1s(b, dir)
	ts, err := terrain.Open(hgt)
	if err != nil {
		b.Fatal(err)
	}
	site := orb.Point{7.5, 45.5}
	if _, _, err := ts.Elevation(45.5, 7.5); err != nil { // load the tile
		b.Fatal(err)
	}
	gdal := newViewshedRun(b, dir, hgt, site)
	for _, mode := range []struct {
		name string
		m    CoverageMode
	}{{"los", CoverageLOS}, {"loss", CoverageLoss}} {
		b.Run(mode.name, func(b *testing.B) {
			req := CoverageRequest{Site: site, SiteHeightM: 10, TargetHeightM: 2, RadiusM: 40000, FreqMHz: 146, Mode: mode.m}
			b.ReportAllocs()
			var res *CoverageResult
			var wall, cpu, gWall, gCPU time.Duration
			runs := 0
			for b.Loop() {
				t0, c0 := time.Now(), cpuTime(syscall.RUSAGE_SELF)
				if res, err = CoverageMap(context.Background(), ts, req, nil); err != nil {
					b.Fatal(err)
				}
				wall += time.Since(t0)
				cpu += cpuTime(syscall.RUSAGE_SELF) - c0
				runs++
				if gdal != nil {
					b.StopTimer()
					w, c := gdal.run(b)
					gWall += w
					gCPU += c
					b.StartTimer()
				}
			}
			perCell := func(d time.Duration, cells float64) float64 {
				return float64(d.Nanoseconds()) / float64(runs) / cells
			}
			cells := float64(res.Cells)
			b.ReportMetric(perCell(wall, cells), "ns/cell")
			b.ReportMetric(perCell(cpu, cells), "cpu-ns/cell")
			b.ReportMetric(cells, "cells")
			if gdal != nil {
				b.ReportMetric(perCell(gWall, gdal.cells), "gdal-ns/cell")
				b.ReportMetric(perCell(gCPU, gdal.cells), "gdal-cpu-ns/cell")
				b.ReportMetric(perCell(wall, cells)/perCell(gWall, gdal.cells), "vs-gdal-wall")
				b.ReportMetric(perCell(cpu, cells)/perCell(gCPU, gdal.cells), "vs-gdal-cpu")
			}
			var ms runtime.MemStats
			runtime.ReadMemStats(&ms)
			b.ReportMetric(float64(ms.HeapSys)/1e6, "MB-heap-sys")
		})
	}
}

// viewshedRun is gdal_viewshed set up on the benchmark's area.
type viewshedRun struct {
	args  []string
	cells float64 // within the maximum distance, at 25 m
}

// newViewshedRun reprojects the tile around site to UTM zone 32N at 25 m
// and returns the gdal_viewshed run over 40 km from 10 m to 2 m with the
// curvature coefficient of k = 4/3 (its -cc is 1/k); nil when GDAL is not
// installed.
func newViewshedRun(b *testing.B, dir, hgt string, site orb.Point) *viewshedRun {
	for _, tool := range []string{"gdalwarp", "gdal_viewshed", "gdaltransform"} {
		if _, err := exec.LookPath(tool); err != nil {
			b.Logf("%s not found (Debian gdal-bin): no side-by-side figure", tool)
			return nil
		}
	}
	utm := filepath.Join(dir, "utm.tif")
	out, err := exec.Command("sh", "-c", fmt.Sprintf("echo %v %v | gdaltransform -s_srs EPSG:4326 -t_srs EPSG:32632", site.Lon(), site.Lat())).Output()
	if err != nil {
		b.Fatal(err)
	}
	xy := strings.Fields(string(out))
	if len(xy) < 2 {
		b.Fatalf("gdaltransform printed %q", out)
	}
	ox, _ := parseF(xy[0])
	oy, _ := parseF(xy[1])
	const m = 40000.0
	benchRun(b, "gdalwarp", "-q", "-overwrite", "-t_srs", "EPSG:32632", "-tr", "25", "25", "-r", "bilinear", "-ot", "Float32",
		"-te", f(ox-m), f(oy-m), f(ox+m), f(oy+m), hgt, utm)
	return &viewshedRun{
		args:  []string{"gdal_viewshed", "-q", "-ox", f(ox), "-oy", f(oy), "-oz", "10", "-tz", "2", "-md", f(m), "-cc", f(6378.137 / (6371 * 4.0 / 3)), utm, filepath.Join(dir, "vs.tif")},
		cells: math.Pi * m * m / (25 * 25),
	}
}

// run runs gdal_viewshed once and returns its wall and CPU time.
func (v *viewshedRun) run(b *testing.B) (wall, cpu time.Duration) {
	t0, c0 := time.Now(), cpuTime(syscall.RUSAGE_CHILDREN)
	benchRun(b, v.args...)
	return time.Since(t0), cpuTime(syscall.RUSAGE_CHILDREN) - c0
}

func benchRun(b *testing.B, args ...string) {
	if out, err := exec.Command(args[0], args[1:]...).CombinedOutput(); err != nil {
		b.Fatalf("%s: %v: %s", strings.Join(args, " "), err, out)
	}
}

func parseF(s string) (float64, error) { return strconv.ParseFloat(s, 64) }

// cpuTime returns the user and system CPU time used so far by who
// (syscall.RUSAGE_SELF or RUSAGE_CHILDREN).
func cpuTime(who int) time.Duration {
	var ru syscall.Rusage
	if err := syscall.Getrusage(who, &ru); err != nil {
		return 0
	}
	return time.Duration(ru.Utime.Nano() + ru.Stime.Nano())
}
