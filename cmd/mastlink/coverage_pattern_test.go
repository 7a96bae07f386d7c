package main

import (
	"math"
	"path/filepath"
	"testing"

	"github.com/mastlink/mastlink/plan/antenna"
	"github.com/mastlink/mastlink/terrain"
)

// TestCoverageDirectionalSite: a map from a site with a 3-element Yagi
// aimed north (--bearing 0) equals the map with the Yagi taken at its
// peak toward every cell (no bearing) in cells due north, and is lower by
// the catalog's front-to-back ratio in cells due south; in between it falls
// off with the pattern. Both maps share the terrain, so the difference is
// the antenna's pattern alone (the catalog's cosⁿ model, checked against
// its figures in plan/antenna).
func TestCoverageDirectionalSite(t *testing.T) {
	yagi, err := antenna.Lookup("yagi-3el-2m")
	if err != nil {
		t.Fatal(err)
	}
	dir := t.TempDir()
	args := []string{"--dem", demoTerrain, "--from", "-48.4466667,-123.9491667", "--height", "10m",
		"--antenna", yagi.Name, "--power", "5W", "--freq", "146.52", "--radius", "3km", "--resolution", "250m", "--value", "received"}
	aimed, turned := filepath.Join(dir, "aimed.tif"), filepath.Join(dir, "turned.tif")
	coverageRun(t, aimed, append(args, "--bearing", "0")...)
	coverageRun(t, turned, args...)
	a, err := terrain.ReadGeoTIFF(aimed)
	if err != nil {
		t.Fatal(err)
	}
	b, err := terrain.ReadGeoTIFF(turned)
	if err != nil {
		t.Fatal(err)
	}
	if a.Rows != b.Rows || a.Cols != b.Cols || a.Rows < 5 {
		t.Fatalf("grids %d×%d and %d×%d", a.Rows, a.Cols, b.Rows, b.Cols)
	}
	mid, row := a.Cols/2, a.Rows/2 // the site's cell
	// The cells farthest from the site due north, south and east that are
	// within the radius (nodata, NaN, outside it).
	north, south, eastCol := 0, a.Rows-1, a.Cols-1
	for math.IsNaN(float64(a.H[north*a.Cols+mid])) {
		north++
	}
	for math.IsNaN(float64(a.H[south*a.Cols+mid])) {
		south--
	}
	for math.IsNaN(float64(a.H[row*a.Cols+eastCol])) {
		eastCol--
	}
	diff := func(r int) float64 { return float64(a.H[r*a.Cols+mid] - b.H[r*b.Cols+mid]) }
	if d := diff(north); math.IsNaN(d) || math.Abs(d) > 0.5 {
		t.Errorf("due north: aimed − turned = %.2f dB; want 0 (boresight)", d)
	}
	if d := diff(south); math.IsNaN(d) || math.Abs(d+yagi.FrontToBackDB) > 0.5 {
		t.Errorf("due south: aimed − turned = %.2f dB; want −%.1f dB, the front-to-back ratio", d, yagi.FrontToBackDB)
	}
	east := float64(a.H[row*a.Cols+eastCol] - b.H[row*b.Cols+eastCol])
	if !(east < -3 && east > -yagi.FrontToBackDB-0.5) {
		t.Errorf("due east: aimed − turned = %.2f dB; want between −3 dB (half power, beamwidth %.0f° < 180°) and the front-to-back floor", east, yagi.HBeamwidthDeg)
	}
}
