package terrain

// Fixtures for the HGT, tile set and profile tests: invented terrain written
// to SRTM tiles by GDAL's SRTMHGT driver, and reads through gdallocationinfo.

import (
	"bufio"
	"bytes"
	"fmt"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"strconv"
	"strings"
	"testing"
)

// htCrosscheckMissing skips the test, or fails it when CI demands the
// cross-checks (MASTLINK_REQUIRE_CROSSCHECKS=1).
func htCrosscheckMissing(t testing.TB, format string, args ...any) {
	t.Helper()
	msg := fmt.Sprintf(format, args...)
	if os.Getenv("MASTLINK_REQUIRE_CROSSCHECKS") == "1" {
		t.Fatalf("%s (MASTLINK_REQUIRE_CROSSCHECKS=1)", msg)
	}
	t.Skipf("%s; skipping cross-check", msg)
}

// htNeedGDAL skips (or fails) unless the GDAL command-line tools are present.
func htNeedGDAL(t testing.TB) {
	t.Helper()
	for _, tool := range []string{"gdal_translate", "gdallocationinfo"} {
		if _, err := exec.LookPath(tool); err != nil {
			htCrosscheckMissing(t, "%s not found (install Debian gdal-bin)", tool)
		}
	}
}

// htRefData returns the path of a real data file fetched by
// .ci/fetch-refdata: $MASTLINK_REFDATA/name, else <repo>/.refdata/name.
func htRefData(t testing.TB, name string) string {
	t.Helper()
	var dirs []string
	if d := os.Getenv("MASTLINK_REFDATA"); d != "" {
		dirs = append(dirs, d)
	}
	if wd, err := os.Getwd(); err == nil {
		for d := wd; ; d = filepath.Dir(d) {
			if _, err := os.Stat(filepath.Join(d, "go.mod")); err == nil {
				dirs = append(dirs, filepath.Join(d, ".refdata"))
				break
			}
			if filepath.Dir(d) == d {
				break
			}
		}
	}
	for _, d := range dirs {
		p := filepath.Join(d, name)
		if fi, err := os.Stat(p); err == nil && fi.Size() > 0 {
			return p
		}
	}
	htCrosscheckMissing(t, "%s not found in $MASTLINK_REFDATA or <repo>/.refdata (run .ci/fetch-refdata)", name)
	return ""
}

// htMix is the SplitMix64 finaliser (Steele, Lea, Flood 2014), used as a
// deterministic hash for the invented terrain.
func htMix(x uint64) uint64 {
	x += 0x9e3779b97f4a7c15
	x = (x ^ (x >> 30)) * 0xbf58476d1ce4e5b9
	x = (x ^ (x >> 27)) * 0x94d049bb133111eb
	return x ^ (x >> 31)
}

// htTerrain is invented terrain: smooth hills plus deterministic noise
// keyed by the global sample index (gr north, gc east, perDeg samples per
// degree), so adjacent tiles agree on their shared edges.
func htTerrain(gr, gc int64, perDeg int) int16 {
	lat := float64(gr) / float64(perDeg)
	lon := float64(gc) / float64(perDeg)
	h := 900 + 600*math.Sin(lat*7.3)*math.Cos(lon*5.1) + 150*math.Sin(lat*31+lon*17)
	noise := int64(htMix(uint64(gr)<<32^uint64(gc)&0xffffffff)%41) - 20
	return int16(math.Round(h) + float64(noise))
}

// htGrid is an n×n SRTM grid for the tile with south-west corner (lat,
// lon) whole degrees, row-major from the north. With voids set it marks
// scattered single voids and one round blob of radius 5 samples, none on
// the edge rows and columns.
func htGrid(n, lat, lon int, voids bool) []int16 {
	per := n - 1
	g := make([]int16, n*n)
	for r := 0; r < n; r++ {
		gr := int64(lat+1)*int64(per) - int64(r)
		for c := 0; c < n; c++ {
			gc := int64(lon)*int64(per) + int64(c)
			g[r*n+c] = htTerrain(gr, gc, per)
		}
	}
	if voids {
		br, bc := n/3, n/2
		for r := 1; r < n-1; r++ {
			for c := 1; c < n-1; c++ {
				dr, dc := r-br, c-bc
				if dr*dr+dc*dc <= 25 || htMix(uint64(r*n+c)^0xabcdef)%1499 == 0 {
					g[r*n+c] = HGTVoid
				}
			}
		}
	}
	return g
}

// htWriteHGT writes grid (n×n, south-west corner lat, lon) to an ASCII
// grid and converts it with gdal_translate -of SRTMHGT into dir; it returns
// the tile's path. Cell centres land on whole-degree lines: xllcorner is
// lon − half a cell (GDAL AAIGrid driver documentation).
func htWriteHGT(t testing.TB, dir string, n, lat, lon int, grid []int16) string {
	t.Helper()
	cell := 1 / float64(n-1)
	var b bytes.Buffer
	fmt.Fprintf(&b, "ncols %d\nnrows %d\nxllcorner %.15g\nyllcorner %.15g\ncellsize %.15g\nNODATA_value %d\n",
		n, n, float64(lon)-cell/2, float64(lat)-cell/2, cell, HGTVoid)
	for r := 0; r < n; r++ {
		for c := 0; c < n; c++ {
			if c > 0 {
				b.WriteByte(' ')
			}
			b.WriteString(strconv.Itoa(int(grid[r*n+c])))
		}
		b.WriteByte('\n')
	}
	name := HGTName(lat, lon)
	asc := filepath.Join(dir, strings.TrimSuffix(name, ".hgt")+".asc")
	if err := os.WriteFile(asc, b.Bytes(), 0o644); err != nil {
		t.Fatal(err)
	}
	out := filepath.Join(dir, name)
	cmd := exec.Command("gdal_translate", "-q", "-of", "SRTMHGT", "-ot", "Int16", "-a_srs", "EPSG:4326", asc, out)
	if msg, err := cmd.CombinedOutput(); err != nil {
		t.Fatalf("gdal_translate: %v: %s", err, msg)
	}
	os.Remove(asc)
	os.Remove(out + ".aux.xml")
	return out
}

// htGDALValues returns gdallocationinfo -valonly -wgs84 for each (lat,
// lon): the value of the nearest sample (GDAL 3.6 has no interpolation),
// NaN where GDAL prints nothing (outside the file).
func htGDALValues(t testing.TB, file string, lats, lons []float64) []float64 {
	t.Helper()
	var in bytes.Buffer
	for i := range lats {
		fmt.Fprintf(&in, "%.12f %.12f\n", lons[i], lats[i])
	}
	cmd := exec.Command("gdallocationinfo", "-valonly", "-wgs84", file)
	cmd.Stdin = &in
	var out, errb bytes.Buffer
	cmd.Stdout, cmd.Stderr = &out, &errb
	if err := cmd.Run(); err != nil {
		t.Fatalf("gdallocationinfo: %v: %s", err, errb.String())
	}
	vals := make([]float64, 0, len(lats))
	sc := bufio.NewScanner(&out)
	for sc.Scan() {
		s := strings.TrimSpace(sc.Text())
		if s == "" {
			vals = append(vals, math.NaN())
			continue
		}
		v, err := strconv.ParseFloat(s, 64)
		if err != nil {
			t.Fatalf("gdallocationinfo output %q: %v", s, err)
		}
		vals = append(vals, v)
	}
	if len(vals) != len(lats) {
		t.Fatalf("gdallocationinfo gave %d values for %d points", len(vals), len(lats))
	}
	return vals
}

// htMosaicRaw writes the 2×2 mosaic of 3″ tiles with voids of htMosaic
// (N45E007 to N46E008, htGrid) straight as HGT bytes, without GDAL, and
// returns its folder.
func htMosaicRaw(t testing.TB) string {
	t.Helper()
	dir := t.TempDir()
	for _, ll := range [][2]int{{45, 7}, {45, 8}, {46, 7}, {46, 8}} {
		g := htGrid(HGTSamples3, ll[0], ll[1], true)
		raw := htRaw(HGTSamples3, func(r, c int) int16 { return g[r*HGTSamples3+c] })
		if err := os.WriteFile(filepath.Join(dir, HGTName(ll[0], ll[1])), raw, 0o644); err != nil {
			t.Fatal(err)
		}
	}
	return dir
}
