package main

import (
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/mastlink/mastlink/plan/gpx"
)

// TestExposureCommand checks the command end to end against the compliance
// distances computed from FCC OET Bulletin 65 (ed. 97-01) eq. 6 (far field,
// ground-reflection factor 2.56) with the 47 CFR § 1.1310 Table 1 limits.
func TestExposureCommand(t *testing.T) {
	cases := []struct {
		power, freq string
		public, occ float64 // m
	}{
		{"50W", "146", 2.89, 1.29}, // computed from OET Bulletin 65 eq. 6 and 47 CFR § 1.1310 Table 1, continuous FM, 2.15 dBi
		{"5W", "146", 0.91, 0.41},
		{"50W", "446", 2.37, 1.06},
	}
	for _, c := range cases {
		out, stderr, code := runCmd(t, "exposure", "--power", c.power, "--gain", "2.15dBi", "--freq", c.freq, "--mode", "fm", "--format", "json")
		if code != 0 {
			t.Fatalf("code %d: %s", code, stderr)
		}
		m := decodeJSON(t, out)
		if got := m["distance_public_m"].(float64); math.Abs(got-c.public) > 0.006 {
			t.Errorf("%s %s MHz public %.3f m, want %.2f", c.power, c.freq, got, c.public)
		}
		if got := m["distance_occupational_m"].(float64); math.Abs(got-c.occ) > 0.006 {
			t.Errorf("%s %s MHz occupational %.3f m, want %.2f", c.power, c.freq, got, c.occ)
		}
		for _, k := range []string{"standard", "freq_mhz", "eirp_w", "duty_factor", "avg_power_public_w", "avg_power_occupational_w", "limit_public_w_m2", "limit_occupational_w_m2", "distance_public_m", "distance_occupational_m", "keepout_public_m", "keepout_occupational_m", "cautions"} {
			if _, ok := m[k]; !ok {
				t.Errorf("JSON lacks %q", k)
			}
		}
	}
}

// TestExposureCycle: 250 W FM, 5 min on / 5 min off averages to 208.3 W over
// 6 min and 125 W over 30 min (OET Bulletin 65 Supplement B worked example,
// recomputed with the worst-case window).
func TestExposureCycle(t *testing.T) {
	out, _, code := runCmd(t, "exposure", "--power", "250W", "--freq", "146", "--on", "5min", "--off", "5min", "--format", "json")
	if code != 0 {
		t.Fatal(code)
	}
	m := decodeJSON(t, out)
	if got := m["avg_power_occupational_w"].(float64); math.Abs(got-208.33) > 0.01 {
		t.Errorf("occupational average %v W, want 208.3", got)
	}
	if got := m["avg_power_public_w"].(float64); math.Abs(got-125) > 0.01 {
		t.Errorf("public average %v W, want 125", got)
	}
}

// TestExposureExemptAt: 146 MHz is exempt at 5 m up to 95.8 W ERP and at
// 2 m up to 15.3 W (47 CFR § 1.1307(b)(3)(i)(C) table, 3.83 R² at 30–300 MHz).
// 20 W into a dipole (2.15 dBi: ERP 20 W) continuously is therefore exempt
// for people 5 m away and not for people 2 m away.
func TestExposureExemptAt(t *testing.T) {
	for _, c := range []struct {
		dist string
		want bool
	}{{"5m", true}, {"2m", false}} {
		out, stderr, code := runCmd(t, "exposure", "--power", "20W", "--gain", "2.15dBi", "--freq", "146", "--distance", c.dist, "--format", "json")
		if code != 0 {
			t.Fatal(stderr)
		}
		if got := decodeJSON(t, out)["exempt_at_distance"]; got != c.want {
			t.Errorf("at %s: exempt %v, want %v", c.dist, got, c.want)
		}
	}
}

func TestExposureText(t *testing.T) {
	out, _, code := runCmd(t, "exposure", "--power", "50W", "--gain", "2.15dBi", "--freq", "146.52", "--mode", "fm", "--height", "3m")
	if code != 0 {
		t.Fatal(code)
	}
	golden(t, "exposure.txt", out)
	for _, want := range []string{"Keep the public at least 2.8 m from the mast foot", "power lines", "not a measurement"} {
		if !strings.Contains(out, want) {
			t.Errorf("text lacks %q", want)
		}
	}
	// An antenna higher than the compliance distance needs no keep-out
	// (keep-out geometry: √(R² − (h_a − h_p)²), plain geometry).
	out, _, _ = runCmd(t, "exposure", "--power", "5W", "--gain", "2.15dBi", "--freq", "146.52", "--height", "6m")
	if !strings.Contains(out, "no keep-out zone is needed") {
		t.Errorf("high antenna: %s", out)
	}
}

func TestExposureErrors(t *testing.T) {
	cases := []struct {
		args []string
		msg  string
	}{
		{[]string{"--power", "-5W", "--freq", "146"}, "--power"},
		{[]string{"--power", "5W", "--freq", "0.1"}, "outside the 0.3 MHz"},
		{[]string{"--power", "5W", "--freq", "146", "--mode", "am"}, "--mode"},
		{[]string{"--power", "5W", "--freq", "146", "--standard", "osha"}, "--standard"},
		{[]string{"--power", "5W", "--freq", "146", "--reflection", "3"}, "--reflection"},
		{[]string{"--power", "5W", "--freq", "146", "--on", "2min"}, "--off: invalid exposure input: on and off go together"},
		{[]string{"--power", "5W", "--freq", "146", "--tx-time", "0%"}, "--tx-time"},
		{[]string{"--power", "5W", "--freq", "146", "-o", "x.geojson"}, "--at"},
	}
	for _, c := range cases {
		_, stderr, code := runCmd(t, append([]string{"exposure"}, c.args...)...)
		if code != 2 || !strings.Contains(stderr, c.msg) {
			t.Errorf("%v: code %d, stderr %q, want %q", c.args, code, stderr, c.msg)
		}
	}
}

func TestExposureKeepoutFiles(t *testing.T) {
	dir := t.TempDir()
	gj := filepath.Join(dir, "keepout.geojson")
	_, stderr, code := runCmd(t, "exposure", "--power", "50W", "--gain", "2.15dBi", "--freq", "146.52", "--height", "3m", "--at", "-48.535,-123.9633", "-o", gj)
	if code != 0 {
		t.Fatal(stderr)
	}
	var fc struct {
		Features []struct {
			Geometry struct {
				Type        string
				Coordinates json.RawMessage
			}
			Properties map[string]any
		}
	}
	b, _ := os.ReadFile(gj)
	if err := json.Unmarshal(b, &fc); err != nil {
		t.Fatal(err)
	}
	if len(fc.Features) != 2 || fc.Features[0].Geometry.Type != "Polygon" || fc.Features[0].Properties["tier"] != "public" {
		t.Fatalf("keep-out GeoJSON: %s", b)
	}
	gp := filepath.Join(dir, "keepout.gpx")
	if _, stderr, code := runCmd(t, "exposure", "--power", "50W", "--gain", "2.15dBi", "--freq", "146.52", "--height", "3m", "--at", "-48.535,-123.9633", "-o", gp); code != 0 {
		t.Fatal(stderr)
	}
	g, err := gpx.Read(gp)
	if err != nil {
		t.Fatal(err)
	}
	if len(g.Tracks) != 2 {
		t.Fatalf("want a closed route per tier, got %d", len(g.Tracks))
	}
	r := g.Tracks[0].Points
	if r[0].Pos != r[len(r)-1].Pos {
		t.Errorf("keep-out route is not closed")
	}
}
