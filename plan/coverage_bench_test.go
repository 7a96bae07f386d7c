package plan

import (
	"context"
	"encoding/binary"
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
// (gdalwarp, bilinear, outside the timing), 40 km maximum distance. Each
// reports ns per cell within the radius, so the three compare directly;
// the loss and line-of-sight runs also report the bytes they allocate per
// map (the tile, 52 MB as float32, is loaded before the timing).
//
// The machine is shared, so besides wall time each reports CPU time per
// cell (getrusage: this process for ours, the children for gdal_viewshed,
// which runs on one core while CoverageMap uses every core).
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
	for _, mode := range []struct {
		name string
		m    CoverageMode
	}{{"los", CoverageLOS}, {"loss", CoverageLoss}} {
		b.Run(mode.name, func(b *testing.B) {
			req := CoverageRequest{Site: site, SiteHeightM: 10, TargetHeightM: 2, RadiusM: 40000, FreqMHz: 146, Mode: mode.m}
			b.ReportAllocs()
			var res *CoverageResult
			cpu0 := cpuTime(syscall.RUSAGE_SELF)
			for b.Loop() {
				if res, err = CoverageMap(context.Background(), ts, req, nil); err != nil {
					b.Fatal(err)
				}
			}
			b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N)/float64(res.Cells), "ns/cell")
			b.ReportMetric(float64((cpuTime(syscall.RUSAGE_SELF)-cpu0).Nanoseconds())/float64(b.N)/float64(res.Cells), "cpu-ns/cell")
			b.ReportMetric(float64(res.Cells), "cells")
			var ms runtime.MemStats
			runtime.ReadMemStats(&ms)
			b.ReportMetric(float64(ms.HeapSys)/1e6, "MB-heap-sys")
		})
	}
	b.Run("gdal_viewshed", func(b *testing.B) {
		for _, tool := range []string{"gdalwarp", "gdal_viewshed", "gdaltransform"} {
			if _, err := exec.LookPath(tool); err != nil {
				b.Skipf("%s not found (Debian gdal-bin); no side-by-side figure", tool)
			}
		}
		utm := filepath.Join(dir, "utm.tif")
		out, err := exec.Command("sh", "-c", "echo 7.5 45.5 | gdaltransform -s_srs EPSG:4326 -t_srs EPSG:32632").Output()
		if err != nil {
			b.Fatal(err)
		}
		xy := strings.Fields(string(out))
		if len(xy) < 2 {
			b.Fatalf("gdaltransform printed %q", out)
		}
		run := func(args ...string) {
			if out, err := exec.Command(args[0], args[1:]...).CombinedOutput(); err != nil {
				b.Fatalf("%s: %v: %s", strings.Join(args, " "), err, out)
			}
		}
		ox, _ := parseF(xy[0])
		oy, _ := parseF(xy[1])
		const m = 40000.0
		run("gdalwarp", "-q", "-overwrite", "-t_srs", "EPSG:32632", "-tr", "25", "25", "-r", "bilinear", "-ot", "Float32",
			"-te", f(ox-m), f(oy-m), f(ox+m), f(oy+m), hgt, utm)
		cells := math.Pi * m * m / (25 * 25)
		vs := filepath.Join(dir, "vs.tif")
		cpu0 := cpuTime(syscall.RUSAGE_CHILDREN)
		for b.Loop() {
			run("gdal_viewshed", "-q", "-ox", f(ox), "-oy", f(oy), "-oz", "10", "-tz", "2", "-md", f(m), "-cc", f(6378.137/(6371*4.0/3)), utm, vs)
		}
		b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N)/cells, "ns/cell")
		b.ReportMetric(float64((cpuTime(syscall.RUSAGE_CHILDREN)-cpu0).Nanoseconds())/float64(b.N)/cells, "cpu-ns/cell")
		b.ReportMetric(cells, "cells")
	})
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
