package main

import (
	"bytes"
	"compress/gzip"
	"encoding/csv"
	"fmt"
	"io"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"github.com/mastlink/mastlink/plan/gpx"
)

// The invented example island (examples/README.md): two 3″ tiles sharing
// the meridian 124°W, and the named places on it.
var (
	exampleTerrain = filepath.Join("..", "..", "examples", "terrain")
	examplePoints  = filepath.Join("..", "..", "examples", "valley", "points.gpx")
)

// needTool returns the path of an external reference tool, or skips the
// test when it is absent (fails it when MASTLINK_REQUIRE_CROSSCHECKS=1, as
// in CI).
func needTool(t *testing.T, name, debianPackage string) string {
	t.Helper()
	path, err := exec.LookPath(name)
	if err == nil {
		return path
	}
	if os.Getenv("MASTLINK_REQUIRE_CROSSCHECKS") == "1" {
		t.Fatalf("%s (Debian %s) not found and MASTLINK_REQUIRE_CROSSCHECKS=1", name, debianPackage)
	}
	t.Skipf("%s (Debian %s) not found; install it to run this cross-check", name, debianPackage)
	return ""
}

// elevationJSON runs `mastlink elevation` with JSON output and returns its
// points.
func elevationJSON(t *testing.T, args ...string) []map[string]any {
	t.Helper()
	out, stderr, code := runCmd(t, append([]string{"--format", "json", "elevation"}, args...)...)
	if code != 0 {
		t.Fatalf("elevation %v: exit %d: %s", args, code, stderr)
	}
	m := decodeJSON(t, out)
	raw, ok := m["points"].([]any)
	if !ok {
		t.Fatalf("no points array in %s", out)
	}
	pts := make([]map[string]any, len(raw))
	for i, p := range raw {
		pts[i] = p.(map[string]any)
	}
	return pts
}

// TestElevationWaypoints: the height at each waypoint of the example equals
// its <ele>, which the generator wrote as the bilinear height of the tiles
// rounded to 0.1 m (examples/README.md).
func TestElevationWaypoints(t *testing.T) {
	cases := []struct {
		name   string
		eleM   float64 // <ele> in examples/valley/points.gpx
		source string
		tolM   float64 // <ele> is rounded to 0.1 m
	}{
		{"Corvane Peak", 1729.0, "S49W124.hgt.gz", 0.05},
		{"Wethermoss Saddle", 1011.0, "S49W124.hgt.gz", 0.05},
		{"Ostral Flats staging area", 314.6, "S49W124.hgt.gz", 0.05},
		{"Team Birch, upper Ostral", 463.5, "S49W125.hgt.gz", 0.05},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			pts := elevationJSON(t, "--dem", exampleTerrain, "--waypoints", examplePoints, c.name)
			p := pts[0]
			if got := p["elevation_m"].(float64); math.Abs(got-c.eleM) > c.tolM {
				t.Errorf("elevation %.3f m, want %.1f m", got, c.eleM)
			}
			if p["source"] != c.source || p["name"] != c.name {
				t.Errorf("source %v, name %v; want %s, %s", p["source"], p["name"], c.source, c.name)
			}
		})
	}
	t.Run("every waypoint", func(t *testing.T) {
		gpx, err := gpx.Read(examplePoints)
		if err != nil {
			t.Fatal(err)
		}
		args := []string{"--dem", exampleTerrain, "--waypoints", examplePoints, "--"}
		for _, w := range gpx.Waypoints {
			args = append(args, w.Name)
		}
		pts := elevationJSON(t, args...)
		if len(pts) != len(gpx.Waypoints) {
			t.Fatalf("%d points for %d waypoints", len(pts), len(gpx.Waypoints))
		}
		for i, w := range gpx.Waypoints {
			if got := pts[i]["elevation_m"].(float64); math.Abs(got-w.ElevM) > 0.05 {
				t.Errorf("%s: %.3f m, <ele> %.1f m", w.Name, got, w.ElevM)
			}
			if pts[i]["lat"].(float64) != w.Pos.Lat() || pts[i]["lon"].(float64) != w.Pos.Lon() {
				t.Errorf("%s: position %v,%v, want %v,%v", w.Name, pts[i]["lat"], pts[i]["lon"], w.Pos.Lat(), w.Pos.Lon())
			}
		}
	})
}

// gunzipTiles writes the example tiles uncompressed into a temporary
// directory, for GDAL.
func gunzipTiles(t *testing.T) string {
	t.Helper()
	dir := t.TempDir()
	for _, name := range []string{"S49W125", "S49W124"} {
		f, err := os.Open(filepath.Join(exampleTerrain, name+".hgt.gz"))
		if err != nil {
			t.Fatal(err)
		}
		zr, err := gzip.NewReader(f)
		if err != nil {
			t.Fatal(err)
		}
		data, err := io.ReadAll(zr)
		f.Close()
		if err != nil {
			t.Fatal(err)
		}
		if err := os.WriteFile(filepath.Join(dir, name+".hgt"), data, 0o644); err != nil {
			t.Fatal(err)
		}
	}
	return dir
}

// gdalValues asks gdallocationinfo for the sample of file nearest each
// (lat, lon): the pixel containing the point, whose centre is an SRTM grid
// node.
func gdalValues(t *testing.T, tool, file string, lats, lons []float64) []float64 {
	t.Helper()
	var in bytes.Buffer
	for i := range lats {
		fmt.Fprintf(&in, "%.10f %.10f\n", lons[i], lats[i])
	}
	cmd := exec.Command(tool, "-valonly", "-wgs84", file)
	cmd.Stdin = &in
	out, err := cmd.Output()
	if err != nil {
		t.Fatalf("gdallocationinfo %s: %v", file, err)
	}
	fields := strings.Fields(string(out))
	if len(fields) != len(lats) {
		t.Fatalf("gdallocationinfo gave %d values for %d points: %q", len(fields), len(lats), out)
	}
	v := make([]float64, len(fields))
	for i, f := range fields {
		if v[i], err = strconv.ParseFloat(f, 64); err != nil {
			t.Fatalf("gdallocationinfo value %q", f)
		}
	}
	return v
}

// TestElevationGDAL cross-checks heights with GDAL 3.6 (gdallocationinfo
// -valonly -wgs84 on the uncompressed tiles): at grid nodes mastlink must
// give the node's sample, on the shared 124°W column the same sample from
// either tile, and inside a cell the bilinear interpolation of the four
// samples GDAL reads around it.
func TestElevationGDAL(t *testing.T) {
	tool := needTool(t, "gdallocationinfo", "gdal-bin")
	dir := gunzipTiles(t)
	const d = 1.0 / 1200 // 3″ grid
	type pt struct {
		name     string
		lat, lon float64
		files    []string // tiles holding the point's cell
		tolM     float64  // int16 samples: exact at nodes up to float rounding
	}
	var cases []pt
	for _, n := range []struct {
		name     string
		row, col int // from -48° (north edge) and from the tile's west edge
		tile     string
	}{
		{"node in S49W124 near Corvane Peak", 536, 61, "S49W124"},
		{"node in S49W124 mid-island", 600, 57, "S49W124"},
		{"node in S49W125 upper valley", 614, 996, "S49W125"},
		{"node in S49W125 near the west coast", 650, 820, "S49W125"},
	} {
		west := -124.0
		if n.tile == "S49W125" {
			west = -125
		}
		cases = append(cases, pt{n.name, -48 - float64(n.row)*d, west + float64(n.col)*d, []string{n.tile}, 1e-3})
	}
	for _, row := range []int{560, 585, 610, 640} {
		cases = append(cases, pt{fmt.Sprintf("seam node row %d", row), -48 - float64(row)*d, -124, []string{"S49W125", "S49W124"}, 1e-3})
	}
	var args []string
	for _, c := range cases {
		args = append(args, fmt.Sprintf("%.10f,%.10f", c.lat, c.lon))
	}
	got := elevationJSON(t, append([]string{"--dem", exampleTerrain, "--"}, args...)...)
	for i, c := range cases {
		for _, f := range c.files {
			want := gdalValues(t, tool, filepath.Join(dir, f+".hgt"), []float64{c.lat}, []float64{c.lon})[0]
			if h := got[i]["elevation_m"].(float64); math.Abs(h-want) > c.tolM {
				t.Errorf("%s (%.7f,%.7f): %.4f m, GDAL reads %.1f m from %s", c.name, c.lat, c.lon, h, want, f)
			}
		}
		if want := got[i]["elevation_m"].(float64); want < 1 {
			t.Errorf("%s: %.1f m; the test points should be on land", c.name, want)
		}
	}

	t.Run("inside cells", func(t *testing.T) {
		cells := []struct {
			name     string
			row, col int
			fr, fc   float64 // fraction of the cell south and east of its north-west node
			tile     string
			west     float64
			tolM     float64 // bilinear of whole-metre samples: float rounding only
		}{
			{"Corvane Ridge", 536, 60, 0.37, 0.81, "S49W124", -124, 1e-3},
			{"valley floor", 590, 40, 0.5, 0.5, "S49W124", -124, 1e-3},
			{"upper Ostral", 613, 995, 0.13, 0.62, "S49W125", -125, 1e-3},
		}
		for _, c := range cells {
			lat := -48 - (float64(c.row)+c.fr)*d
			lon := c.west + (float64(c.col)+c.fc)*d
			nlat, wlon := -48-float64(c.row)*d, c.west+float64(c.col)*d
			v := gdalValues(t, tool, filepath.Join(dir, c.tile+".hgt"),
				[]float64{nlat, nlat, nlat - d, nlat - d}, []float64{wlon, wlon + d, wlon, wlon + d})
			want := (v[0]*(1-c.fc)+v[1]*c.fc)*(1-c.fr) + (v[2]*(1-c.fc)+v[3]*c.fc)*c.fr
			h := elevationJSON(t, "--dem", exampleTerrain, "--", fmt.Sprintf("%.12f,%.12f", lat, lon))[0]["elevation_m"].(float64)
			if math.Abs(h-want) > c.tolM {
				t.Errorf("%s: %.4f m, bilinear of GDAL's samples %v = %.4f m", c.name, h, v, want)
			}
		}
	})
}

func TestElevationText(t *testing.T) {
	args := []string{"--dem", exampleTerrain, "--waypoints", examplePoints, "elevation", "--", "Corvane Peak", "Wethermoss Saddle", "-48.5,-123.95", "Team Birch, upper Ostral"}
	out, stderr, code := runCmd(t, args...)
	if code != 0 || stderr != "" {
		t.Fatalf("exit %d, stderr %q", code, stderr)
	}
	golden(t, "elevation.txt", out)
	out, _, _ = runCmd(t, append([]string{"--units", "imperial"}, args...)...)
	golden(t, "elevation-imperial.txt", out)
	out, _, _ = runCmd(t, "--dem", exampleTerrain, "elevation", "--", "-48.5,-123.95")
	if strings.Contains(strings.SplitN(out, "\n", 2)[0], "point") {
		t.Errorf("a table of coordinates alone has a point column:\n%s", out)
	}
}

func TestElevationCSV(t *testing.T) {
	out, _, code := runCmd(t, "--dem", exampleTerrain, "--waypoints", examplePoints, "--format", "csv", "elevation", "--", "Corvane Peak", "-48.5,-123.95")
	if code != 0 {
		t.Fatal(code)
	}
	recs, err := csv.NewReader(strings.NewReader(out)).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	want := [][]string{
		{"name", "lat", "lon", "elevation_m", "source"},
		{"Corvane Peak", "-48.4466667", "-123.9491667", "1729.00", "S49W124.hgt.gz"},
		{"", "-48.5000000", "-123.9500000"},
	}
	if len(recs) != len(want) {
		t.Fatalf("%d records, want %d:\n%s", len(recs), len(want), out)
	}
	for i, w := range want {
		for j, cell := range w {
			// 1729.00: Corvane Peak's <ele> (bilinear height of the tiles).
			if recs[i][j] != cell {
				t.Errorf("record %d field %d = %q, want %q", i, j, recs[i][j], cell)
			}
		}
	}
}

// TestElevationMissing: points no tile covers are 0 m from "none", with one
// warning naming the missing tiles, and the run still succeeds.
func TestElevationMissing(t *testing.T) {
	out, stderr, code := runCmd(t, "--dem", exampleTerrain, "--format", "json", "elevation", "--", "-47.5,-124.5", "-48.5,-123.95", "-47.6,-124.4", "-50.1,-124.5")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	m := decodeJSON(t, out)
	pts := m["points"].([]any)
	for i, want := range []string{"none", "S49W124.hgt.gz", "none", "none"} {
		p := pts[i].(map[string]any)
		if p["source"] != want {
			t.Errorf("point %d: source %v, want %s", i, p["source"], want)
		}
		if want == "none" && p["elevation_m"].(float64) != 0 {
			t.Errorf("point %d: %v m without data, want 0 m", i, p["elevation_m"])
		}
	}
	if n := strings.Count(stderr, "warning"); n != 1 {
		t.Errorf("%d warnings, want 1: %q", n, stderr)
	}
	for _, tile := range []string{"S48W125.hgt", "S51W125.hgt"} {
		if !strings.Contains(stderr, tile) {
			t.Errorf("warning %q does not name %s", stderr, tile)
		}
	}
}

// TestElevationNoDEM: without elevation data every height is 0 m from
// "none", and stderr says so once.
func TestElevationNoDEM(t *testing.T) {
	t.Setenv("MASTLINK_DEM", "")
	out, stderr, code := runCmd(t, "--format", "json", "elevation", "46.5,7.9", "10,20")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	for _, p := range decodeJSON(t, out)["points"].([]any) {
		p := p.(map[string]any)
		if p["source"] != "none" || p["elevation_m"].(float64) != 0 {
			t.Errorf("point %v: want 0 m from none", p)
		}
	}
	if strings.Count(stderr, "\n") != 1 || !strings.Contains(stderr, "no elevation data given") || !strings.Contains(stderr, "0 m") {
		t.Errorf("stderr %q: want one line saying no elevation data was given and heights are 0 m", stderr)
	}
}

// TestElevationProfileErrors: bad usage of both commands is exit 2 with one
// line naming what to fix.
func TestElevationProfileErrors(t *testing.T) {
	dir := t.TempDir()
	// A waypoint file whose name has the extension of an output.
	gpxAsCSV := filepath.Join(dir, "points.csv")
	data, err := os.ReadFile(examplePoints)
	if err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(gpxAsCSV, data, 0o644); err != nil {
		t.Fatal(err)
	}
	gpxAsPNG := filepath.Join(dir, "points.png")
	if err := os.WriteFile(gpxAsPNG, data, 0o644); err != nil {
		t.Fatal(err)
	}
	dem, wpt := []string{"--dem", exampleTerrain}, []string{"--waypoints", examplePoints}
	cat := func(parts ...[]string) []string {
		var out []string
		for _, p := range parts {
			out = append(out, p...)
		}
		return out
	}
	cases := []struct {
		name string
		args []string
		msg  string
	}{
		{"elevation: no points", cat(dem, []string{"elevation"}), "requires at least 1 arg"},
		{"elevation: latitude out of range", cat(dem, []string{"elevation", "91,10"}), "latitude 91 is outside -90 to 90"},
		{"elevation: not a point", cat(dem, []string{"elevation", "48.5;123"}), "is not LAT,LON"},
		{"elevation: unknown waypoint", cat(dem, wpt, []string{"elevation", "Corvane Peek"}), `closest: "Corvane Peak"`},
		{"elevation: -o", cat(dem, []string{"-o", filepath.Join(dir, "e.csv"), "elevation", "10,10"}), "-o: mastlink elevation writes no file"},
		{"profile: no --to", cat(dem, []string{"profile", "--from", "10,10"}), `"to" not set`},
		{"profile: bad --from", cat(dem, []string{"profile", "--from", "1,2,3", "--to", "10,10"}), "--from:"},
		{"profile: unknown waypoint", cat(dem, wpt, []string{"profile", "--from", "Corvane Peak", "--to", "Wethermos Sadle"}), `--to: unknown waypoint "Wethermos Sadle"`},
		{"profile: waypoint without --waypoints", cat(dem, []string{"profile", "--from", "Corvane Peak", "--to", "10,10"}), "give its GPX file with --waypoints"},
		{"profile: bad -o extension", cat(dem, []string{"-o", filepath.Join(dir, "p.jpg"), "profile", "--from", "10,10", "--to", "10,11"}), "--out: " + filepath.Join(dir, "p.jpg") + ": cannot tell the format"},
		{"profile: -o is the --waypoints file", cat(dem, []string{"-o", examplePoints}, wpt, []string{"profile", "--from", "Corvane Peak", "--to", "Wethermoss Saddle"}), "is an input of this run"},
		{"profile: -o is the --waypoints file, csv name", cat(dem, []string{"-o", gpxAsCSV, "--waypoints", gpxAsCSV, "profile", "--from", "Corvane Peak", "--to", "Wethermoss Saddle"}), "is an input of this run"},
		{"profile: -o is the --waypoints file, png name", cat(dem, []string{"-o", gpxAsPNG, "--waypoints", gpxAsPNG, "profile", "--from", "Corvane Peak", "--to", "Wethermoss Saddle"}), "is an input of this run"},
		{"profile: zero step", cat(dem, []string{"profile", "--from", "10,10", "--to", "10,11", "--step", "0"}), "--step: give a spacing above 0 m"},
		{"profile: step without unit sense", cat(dem, []string{"profile", "--from", "10,10", "--to", "10,11", "--step", "5 parsecs"}), "--step:"},
		{"profile: same point", cat(dem, []string{"profile", "--from", "10,10", "--to", "10,10"}), "same point"},
		{"profile: negative mast", cat(dem, []string{"profile", "--from", "10,10", "--to", "10,11", "--height", "-3m"}), "--height"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			out, stderr, code := runCmd(t, c.args...)
			if code != 2 {
				t.Errorf("exit %d, want 2 (stderr %q)", code, stderr)
			}
			if out != "" {
				t.Errorf("stdout %q on a usage error", out)
			}
			if !strings.Contains(stderr, c.msg) {
				t.Errorf("stderr %q lacks %q", stderr, c.msg)
			}
			if n := strings.Count(strings.TrimSpace(stderr), "\n"); n != 0 {
				t.Errorf("error is not one line: %q", stderr)
			}
		})
	}
	for _, f := range []string{gpxAsCSV, gpxAsPNG} {
		after, err := os.ReadFile(f)
		if err != nil || !bytes.Equal(after, data) {
			t.Errorf("the --waypoints file %s was changed (err %v)", f, err)
		}
	}
	if after, err := os.ReadFile(examplePoints); err != nil || !bytes.Equal(after, data) {
		t.Errorf("examples/valley/points.gpx was changed (err %v)", err)
	}
}
