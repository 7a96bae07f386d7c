package main

import (
	"math"
	"math/rand/v2"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"github.com/mastlink/mastlink/terrain"
)

// itmPlanFile is the demo plan with the Longley–Rice ITM as its model.
var itmPlanFile = filepath.Join("testdata", "plan-itm.yaml")

// TestCoverageITMGolden: a small ITM map from a plan whose model is itm,
// and from the flags; the text names the model and the per-cell engine, the
// JSON the model, the engine and the ITM's warnings counted over the cells.
func TestCoverageITMGolden(t *testing.T) {
	out, stderr, code := runCmd(t, "coverage", "--plan", itmPlanFile, "--radius", "1500m")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	golden(t, "coverage-itm.txt", out)
	if !strings.Contains(stderr, "mastlink: warning: ITM: path shorter than 1 km") || !strings.Contains(stderr, " paths)") {
		t.Errorf("stderr %q: want the ITM's short-path warning counted over the cells", stderr)
	}
	js, _, code := runCmd(t, "coverage", "--dem", demoTerrain, "--from", "-48.4966558,-123.8778833", "--freq", "146.55",
		"--height", "9m", "--radius", "1200m", "--model", "itm", "--time", "90%", "--format", "json")
	if code != 0 {
		t.Fatal(code)
	}
	goldenJSON(t, "coverage-itm.json", js)
	m := decodeJSON(t, js)
	if m["model"] != "itm" || m["engine"] != "cells" || m["warnings"] == nil {
		t.Errorf("model %v, engine %v, warnings %v: want itm, cells and the ITM's warnings", m["model"], m["engine"], m["warnings"])
	}
}

// TestCoverageITMCellsEqualLink: every cell of an ITM map is the link
// computation to that cell's centre: a few random cells of the GeoTIFF are
// checked against `link --model itm` (its path_loss_db), with the same
// heights, frequency and ITM settings. The cell centres reach link as
// decimal text, so the two agree to the float32 of the map (1e−3 dB).
func TestCoverageITMCellsEqualLink(t *testing.T) {
	site := "-48.4966558,-123.8778833"
	tif := filepath.Join(t.TempDir(), "itm.tif")
	itm := []string{"--model", "itm", "--climate", "maritime-temperate-land", "--time", "90%", "--location", "70%"}
	args := append([]string{"--dem", demoTerrain, "--from", site, "--freq", "446.1", "--height", "6m", "--target-height", "2m",
		"--radius", "1500m", "--value", "loss"}, itm...)
	m := coverageRun(t, tif, args...)
	if m["engine"] != "cells" {
		t.Fatalf("engine %v, want cells", m["engine"])
	}
	tile, err := terrain.ReadGeoTIFF(tif)
	if err != nil {
		t.Fatal(err)
	}
	rng := rand.New(rand.NewPCG(12, 2))
	for n := 0; n < 5; {
		r, c := rng.IntN(tile.Rows), rng.IntN(tile.Cols)
		lat, lon := tile.Lat0-float64(r)*tile.DLat, tile.Lon0+float64(c)*tile.DLon
		if d, _, _ := terrain.Inverse(-48.4966558, -123.8778833, lat, lon); d > 1450 || d < 50 {
			continue // outside the radius (nodata) or at the site
		}
		v := float64(tile.H[r*tile.Cols+c])
		to := strconv.FormatFloat(lat, 'f', -1, 64) + "," + strconv.FormatFloat(lon, 'f', -1, 64)
		out, stderr, code := runCmd(t, append([]string{"link", "--dem", demoTerrain, "--from", site, "--to", to, "--freq", "446.1",
			"--height", "6m", "--to-height", "2m", "--format", "json"}, itm...)...)
		if code != 0 {
			t.Fatalf("link: exit %d: %s", code, stderr)
		}
		want, _ := decodeJSON(t, out)["path_loss_db"].(float64)
		if math.Abs(v-want) > 1e-3 {
			t.Errorf("cell %s: map %.4f dB, link %.4f dB", to, v, want)
		}
		n++
	}
}

// TestCoverageITMRefusals: too-large grids as for the radial engine; the
// model and the ITM flags only where they apply.
func TestCoverageITMRefusals(t *testing.T) {
	flat := []string{"coverage", "--dem", demoTerrain, "--from", "-48.45,-123.95", "--freq", "146"}
	for _, c := range []struct {
		name string
		args []string
		want string
	}{
		{"too large", append(flat, "--model", "itm", "--radius", "300km", "--resolution", "30m"), "the limit is 25000000 cells"},
		{"model with los", append(flat, "--mode", "los", "--model", "itm", "--radius", "1km"), "--model: a line-of-sight map does not depend"},
		{"itm flag without itm", append(flat, "--climate", "desert", "--radius", "1km"), "--climate is a Longley–Rice ITM setting"},
		{"k with itm", append(flat, "--model", "itm", "--k", "1.33", "--radius", "1km"), "--k: not used with --model itm"},
		{"sigma with itm", append(flat, "--model", "itm", "--rx-sens", "-119dBm", "--sigma", "6dB", "--radius", "1km"), "--sigma: not used with --model itm"},
		{"model with plan", []string{"coverage", "--plan", demoPlanFile, "--model", "itm", "--radius", "1km"}, "--model: with --plan"},
		{"unknown model", append(flat, "--model", "hata", "--radius", "1km"), `--model: "hata" is not a model`},
	} {
		t.Run(c.name, func(t *testing.T) {
			_, stderr, code := runCmd(t, c.args...)
			if code != 2 || !strings.Contains(stderr, c.want) || strings.Count(strings.TrimSpace(stderr), "\n") > 0 {
				t.Errorf("exit %d, stderr %q: want exit 2 and one line with %q", code, stderr, c.want)
			}
		})
	}
}
