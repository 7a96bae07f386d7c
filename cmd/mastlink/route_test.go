package main

import (
	"encoding/csv"
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"

	"github.com/mastlink/mastlink/plan/gpx"
	"github.com/paulmach/orb"
	"github.com/paulmach/orb/geojson"
)

var (
	demoPlanFile   = filepath.Join("..", "..", "examples", "valley", "plan.yaml")
	demoHike       = filepath.Join("..", "..", "examples", "valley", "hike.gpx")
	demoCandidates = filepath.Join("..", "..", "examples", "valley", "candidates.gpx")
	demoPoints     = filepath.Join("..", "..", "examples", "valley", "points.gpx")
	demoTerrain    = filepath.Join("..", "..", "examples", "terrain")
)

func TestRouteGolden(t *testing.T) {
	cases := []struct {
		name, golden string
		args         []string
	}{
		{"text", "route-hike.txt", []string{"route", demoHike, "--plan", demoPlanFile}},
		{"json", "route-hike.json", []string{"route", demoHike, "--plan", demoPlanFile, "--format", "json"}},
		{"imperial", "route-hike-imperial.txt", []string{"route", demoHike, "--plan", demoPlanFile, "--units", "imperial"}},
		{"one target", "route-hike-repeater.txt", []string{"route", demoHike, "--plan", demoPlanFile, "--target", "corvane peak repeater", "--target", "Valley Base"}},
		{"flags", "route-hike-flags.txt", []string{"route", demoHike, "--dem", demoTerrain, "--targets", demoPoints, "--freq", "146.55", "--spacing", "100m"}},
		{"sites text", "sites.txt", []string{"sites", demoCandidates, "--plan", demoPlanFile}},
		{"sites json", "sites.json", []string{"sites", demoCandidates, "--plan", demoPlanFile, "--format", "json"}},
		{"sites flags", "sites-flags.txt", []string{"sites", demoCandidates, "--dem", demoTerrain, "--targets", demoPoints, "--freq", "146.55", "--height", "6m"}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			out, stderr, code := runCmd(t, c.args...)
			if code != 0 {
				t.Fatalf("exit %d: %s", code, stderr)
			}
			if strings.HasSuffix(c.golden, ".json") {
				goldenJSON(t, c.golden, out)
			} else {
				golden(t, c.golden, out)
			}
		})
	}
}

func TestRouteJSONFields(t *testing.T) {
	out, _, code := runCmd(t, "route", demoHike, "--plan", demoPlanFile, "--format", "json")
	if code != 0 {
		t.Fatal(code)
	}
	m := decodeJSON(t, out)
	for _, k := range []string{"length_m", "overall_fraction", "targets", "gaps", "best_spots", "points"} {
		if _, ok := m[k]; !ok {
			t.Errorf("JSON lacks %q", k)
		}
	}
	pt := m["points"].([]any)[0].(map[string]any)
	for _, k := range []string{"distance_m", "lat", "lon", "elevation_m", "worst_margin_db"} {
		if _, ok := pt[k]; !ok {
			t.Errorf("points[] lack %q", k)
		}
	}
	gp := m["gaps"].([]any)[0].(map[string]any)
	for _, k := range []string{"start_m", "end_m", "length_m", "start", "end"} {
		if _, ok := gp[k]; !ok {
			t.Errorf("gaps[] lack %q", k)
		}
	}
	sp := m["best_spots"].([]any)[0].(map[string]any)
	for _, k := range []string{"lat", "lon", "distance_m", "margin_db", "target"} {
		if _, ok := sp[k]; !ok {
			t.Errorf("best_spots[] lack %q", k)
		}
	}
	out, _, _ = runCmd(t, "sites", demoCandidates, "--plan", demoPlanFile, "--format", "json")
	s := decodeJSON(t, out)["sites"].([]any)
	for _, k := range []string{"name", "lat", "lon", "rank", "worst_margin_db", "reachable", "of", "mast_m"} {
		if _, ok := s[len(s)-1].(map[string]any)[k]; !ok {
			t.Errorf("sites[] lack %q", k)
		}
	}
}

// TestRouteCSV checks the per-point CSV: one header, one row per point,
// the same number of fields in every row, numbers where numbers belong.
func TestRouteCSV(t *testing.T) {
	out, _, code := runCmd(t, "route", demoHike, "--plan", demoPlanFile, "--format", "csv")
	if code != 0 {
		t.Fatal(code)
	}
	rows, err := csv.NewReader(strings.NewReader(out)).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	if len(rows) != 283 || rows[0][0] != "distance_m" || len(rows[0]) != 6+6 {
		t.Fatalf("%d rows, header %v", len(rows), rows[0])
	}
	if rows[len(rows)-1][0] != "14032.3" {
		t.Errorf("last distance %q, want the track's 14032.3 m", rows[len(rows)-1][0])
	}
	dir := t.TempDir()
	f := filepath.Join(dir, "sites.csv")
	if _, stderr, code := runCmd(t, "sites", demoCandidates, "--plan", demoPlanFile, "-o", f); code != 0 {
		t.Fatal(stderr)
	}
	b, _ := os.ReadFile(f)
	rows, err = csv.NewReader(strings.NewReader(string(b))).ReadAll()
	if err != nil || len(rows) != 6 || rows[1][0] != "1" {
		t.Fatalf("sites csv: %v %v", err, rows)
	}
}

// TestRouteGeoJSON checks that the pieces cover the track end to end,
// alternate between covered and not, and start and end on the track.
func TestRouteGeoJSON(t *testing.T) {
	dir := t.TempDir()
	f := filepath.Join(dir, "hike.geojson")
	if _, stderr, code := runCmd(t, "route", demoHike, "--plan", demoPlanFile, "-o", f); code != 0 {
		t.Fatal(stderr)
	}
	b, err := os.ReadFile(f)
	if err != nil {
		t.Fatal(err)
	}
	fc, err := geojson.UnmarshalFeatureCollection(b)
	if err != nil {
		t.Fatal(err)
	}
	gf, _ := gpx.Read(demoHike)
	trk := gf.Tracks[0].Points
	at, sum, pieces, spots := 0.0, 0.0, 0, 0
	var prev *bool
	for _, ft := range fc.Features {
		switch g := ft.Geometry.(type) {
		case orb.LineString:
			pieces++
			start, end := ft.Properties.MustFloat64("start_m"), ft.Properties.MustFloat64("end_m")
			if math.Abs(start-at) > 0.01 || len(g) < 2 {
				t.Errorf("piece %d starts at %.2f m, the last ended at %.2f m", pieces, start, at)
			}
			cov := ft.Properties.MustBool("covered")
			if prev != nil && *prev == cov {
				t.Errorf("two %v pieces in a row", cov)
			}
			prev = &cov
			at, sum = end, sum+ft.Properties.MustFloat64("length_m")
		case orb.Point:
			spots++
		}
	}
	first := fc.Features[0].Geometry.(orb.LineString)[0]
	if first != trk[0].Pos || math.Abs(at-14032.26) > 0.01 || math.Abs(sum-14032.26) > 0.05 || pieces < 2 || spots == 0 {
		t.Errorf("pieces %d from %v to %.2f m (sum %.2f m), %d spots", pieces, first, at, sum, spots)
	}
	f = filepath.Join(dir, "sites.geojson")
	if _, stderr, code := runCmd(t, "sites", demoCandidates, "--plan", demoPlanFile, "-o", f); code != 0 {
		t.Fatal(stderr)
	}
	b, _ = os.ReadFile(f)
	if fc, err = geojson.UnmarshalFeatureCollection(b); err != nil || len(fc.Features) != 5 {
		t.Fatalf("sites geojson: %v", err)
	}
}

// TestRouteGPXRoundTrip writes the GPX output and reads it back: the track
// with its UTC times, and waypoints whose times lie within the walk.
func TestRouteGPXRoundTrip(t *testing.T) {
	dir := t.TempDir()
	f := filepath.Join(dir, "hike-coverage.gpx")
	if _, stderr, code := runCmd(t, "route", demoHike, "--plan", demoPlanFile, "-o", f); code != 0 {
		t.Fatal(stderr)
	}
	got, err := gpx.Read(f)
	if err != nil {
		t.Fatal(err)
	}
	in, _ := gpx.Read(demoHike)
	if len(got.Tracks) != 1 || len(got.Tracks[0].Points) != len(in.Tracks[0].Points) {
		t.Fatalf("tracks %d", len(got.Tracks))
	}
	for i, p := range got.Tracks[0].Points {
		q := in.Tracks[0].Points[i]
		if !p.Time.Equal(q.Time) || p.Time.Location() != time.UTC || p.Pos != q.Pos {
			t.Fatalf("track point %d: %v %v, want %v %v", i, p.Pos, p.Time, q.Pos, q.Time)
		}
	}
	start, end := in.Tracks[0].Points[0].Time, in.Tracks[0].Points[len(in.Tracks[0].Points)-1].Time
	gaps, calls := 0, 0
	for _, w := range got.Waypoints {
		if w.Time.IsZero() || w.Time.Location() != time.UTC || w.Time.Before(start) || w.Time.After(end) {
			t.Errorf("waypoint %q time %v outside the walk %v–%v", w.Name, w.Time, start, end)
		}
		switch {
		case strings.HasPrefix(w.Name, "Gap "):
			gaps++
		case strings.HasPrefix(w.Name, "Call "):
			calls++
			if !strings.Contains(w.Description, "margin +") {
				t.Errorf("best spot %q description %q lacks the margin", w.Name, w.Description)
			}
		}
	}
	if gaps == 0 || gaps%2 != 0 || calls == 0 {
		t.Errorf("%d gap ends and %d best spots", gaps, calls)
	}
	raw, _ := os.ReadFile(f)
	if !strings.Contains(string(raw), "Z</time>") {
		t.Error("times are not written in UTC")
	}
}

func TestRouteUsageErrors(t *testing.T) {
	dir := t.TempDir()
	cases := []struct {
		name string
		args []string
		code int
		msg  string
	}{
		{"no targets", []string{"route", demoHike}, 2, "--targets"},
		{"no freq", []string{"route", demoHike, "--targets", demoPoints}, 2, "--freq"},
		{"target kit with plan targets", []string{"route", demoHike, "--plan", demoPlanFile, "--to-power", "5W"}, 2, "--to-power"},
		{"cable without length over plan", []string{"sites", demoCandidates, "--plan", demoPlanFile, "--cable", "RG-58"}, 2, "--cable needs --cable-length"},
		{"bad station", []string{"route", demoHike, "--plan", demoPlanFile, "--station", "Nobody"}, 2, `no station "Nobody"`},
		{"bad output", []string{"route", demoHike, "--plan", demoPlanFile, "-o", filepath.Join(dir, "x.kml")}, 2, ".geojson"},
		{"output over input", []string{"route", demoHike, "--plan", demoPlanFile, "-o", demoHike}, 2, "input"},
		{"bad spacing", []string{"route", demoHike, "--plan", demoPlanFile, "--spacing", "0m"}, 2, "--spacing"},
		{"freq without targets", []string{"route", demoHike, "--plan", demoPlanFile, "--freq", "146.55"}, 2, "--freq"},
		{"bad target", []string{"route", demoHike, "--plan", demoPlanFile, "--target", "Nowhere"}, 2, `no target "Nowhere"`},
		{"bad track", []string{"route", demoHike, "--plan", demoPlanFile, "--track", "other"}, 2, "--track"},
		{"no track", []string{"route", demoCandidates, "--plan", demoPlanFile}, 1, "no track"},
		{"sites no waypoints", []string{"sites", demoHike, "--plan", demoPlanFile}, 1, "no waypoints"},
		{"sites bad output", []string{"sites", demoCandidates, "--plan", demoPlanFile, "-o", filepath.Join(dir, "x.gpx")}, 2, ".geojson"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			_, stderr, code := runCmd(t, c.args...)
			if code != c.code || !strings.Contains(stderr, c.msg) {
				t.Errorf("exit %d, stderr %q; want %d and %q", code, stderr, c.code, c.msg)
			}
		})
	}
}

// TestPlanIncludesRoutesAndSites checks that `plan` reports the plan's
// routes and sites in JSON and in the briefing.
func TestPlanIncludesRoutesAndSites(t *testing.T) {
	out, stderr, code := runCmd(t, "plan", demoPlanFile, "--format", "json")
	if code != 0 {
		t.Fatal(stderr)
	}
	m := decodeJSON(t, out)
	routes, ok := m["routes"].([]any)
	if !ok || len(routes) != 1 {
		t.Fatalf("routes: %v", m["routes"])
	}
	if s, ok := m["sites"].(map[string]any); !ok || len(s["sites"].([]any)) != 5 {
		t.Fatalf("sites: %v", m["sites"])
	}
	out, _, _ = runCmd(t, "plan", demoPlanFile)
	for _, want := range []string{"Route: Gorsefold trailhead", "Candidate sites for Valley Base"} {
		if !strings.Contains(out, want) {
			t.Errorf("briefing lacks %q", want)
		}
	}
}

// TestReachWhatIf: kit, requirement and model flags given with --plan
// replace the plan's figures for the run, and the output says so.
func TestReachWhatIf(t *testing.T) {
	type result struct {
		NeededMarginDB float64  `json:"needed_margin_db"`
		DefaultMargin  bool     `json:"default_margin"`
		WhatIf         []string `json:"what_if"`
		Targets        []struct {
			Name         string  `json:"name"`
			BestMarginDB float64 `json:"best_margin_db"`
		} `json:"targets"`
	}
	run := func(args ...string) result {
		t.Helper()
		out, stderr, code := runCmd(t, append([]string{"route", demoHike, "--plan", demoPlanFile, "--spacing", "500m", "--format", "json"}, args...)...)
		if code != 0 {
			t.Fatalf("%v: code %d: %s", args, code, stderr)
		}
		var r result
		if err := json.Unmarshal([]byte(out), &r); err != nil {
			t.Fatal(err)
		}
		return r
	}
	base := run()
	low := run("--power", "0.5W", "--margin", "3dB", "--model", "free-space")
	if want := []string{"--power 0.5W", "--margin 3dB", "--model free-space"}; strings.Join(low.WhatIf, "|") != strings.Join(want, "|") {
		t.Errorf("what_if %q, want %q", low.WhatIf, want)
	}
	// The plan's 90 % of locations with σ 5.5 dB still asks for
	// 5.5 × 1.2816 = 7.05 dB (ITU-R P.1812-8 eq. 69, normal quantile from
	// tables) once --margin lowers its 10 dB to 3 dB.
	if base.WhatIf != nil || base.NeededMarginDB != 10 || math.Abs(low.NeededMarginDB-7.05) > 0.01 {
		t.Errorf("base what_if %q; needed margin %v then %v, want 10 then 7.05", base.WhatIf, base.NeededMarginDB, low.NeededMarginDB)
	}
	// The walker's power only counts on its way out; --power alone (5 W →
	// 0.5 W) takes exactly 10 dB off an outbound margin (10·log10(10),
	// the definition of the decibel) and changes no inbound one.
	pw := run("--power", "0.5W")
	for i, tg := range base.Targets {
		d := base.Targets[i].BestMarginDB - pw.Targets[i].BestMarginDB
		if d < -1e-9 || d > 10+1e-6 {
			t.Errorf("%s: best margin fell by %.3f dB with 10 dB less power", tg.Name, d)
		}
	}
	text, _, _ := runCmd(t, "route", demoHike, "--plan", demoPlanFile, "--spacing", "500m", "--power", "0.5W")
	if !strings.Contains(text, "What if: --power 0.5W (instead of the plan's figures)") {
		t.Errorf("text does not state the what-if:\n%s", text)
	}
}

// TestReachTargetKit: without a plan the targets of --targets carry the
// kit of the --to- flags, not a copy of the walker's or the station's.
func TestReachTargetKit(t *testing.T) {
	worst := func(args ...string) float64 {
		t.Helper()
		out, stderr, code := runCmd(t, append([]string{"sites", demoCandidates, "--dem", demoTerrain, "--targets", demoPoints, "--freq", "146.55", "--format", "json"}, args...)...)
		if code != 0 {
			t.Fatalf("%v: code %d: %s", args, code, stderr)
		}
		var r struct {
			Sites []struct {
				WorstMarginDB float64 `json:"worst_margin_db"`
			} `json:"sites"`
		}
		if err := json.Unmarshal([]byte(out), &r); err != nil {
			t.Fatal(err)
		}
		return r.Sites[0].WorstMarginDB
	}
	handheld := worst("--height", "6m", "--power", "25W")
	same := worst("--height", "6m", "--power", "25W", "--to-power", "5W", "--to-height", "1.5m", "--to-gain", "0dBi", "--to-sens", "0.25uV")
	if handheld != same {
		t.Errorf("the default target kit is not a 5 W handheld at 1.5 m: %v vs %v", handheld, same)
	}
	// A target's receiver 10 dB less sensitive and its transmitter 10 dB
	// weaker lower every margin by exactly 10 dB (the budget is a sum in
	// dB).
	if deaf := worst("--height", "6m", "--power", "25W", "--to-sens", "-109.04dBm", "--to-power", "0.5W"); math.Abs(handheld-deaf-10) > 0.02 {
		t.Errorf("worst margin %v with a handheld, %v with a deafer, weaker target; want 10 dB less", handheld, deaf)
	}
}
