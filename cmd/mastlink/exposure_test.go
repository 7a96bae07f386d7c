package main

import (
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"regexp"
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

// TestExposureLowAntenna: with the antenna on the ground a standing
// person's legs are level with it, so the public keep-out is the whole
// compliance distance, 2.89 m for 50 W FM into 2.15 dBi at 146 MHz (FCC OET
// Bulletin 65 eq. 6 with the 47 CFR § 1.1310 Table 1 limit), printed
// rounded up as 2.9 m in the table and the sentence alike.
func TestExposureLowAntenna(t *testing.T) {
	out, stderr, code := runCmd(t, "exposure", "--power", "50W", "--gain", "2.15dBi", "--freq", "146", "--height", "0m", "--format", "json")
	if code != 0 {
		t.Fatal(stderr)
	}
	m := decodeJSON(t, out)
	if k, d := m["keepout_public_m"].(float64), m["distance_public_m"].(float64); k != d || math.Abs(k-2.8906) > 1e-3 {
		t.Errorf("keep-out %g m, distance %g m; want both 2.89 m", k, d)
	}
	out, _, _ = runCmd(t, "exposure", "--power", "50W", "--gain", "2.15dBi", "--freq", "146", "--height", "0m")
	for _, want := range []string{"keep-out from the mast foot (head at 2.0 m)  2.9 m", "Keep the public at least 2.9 m from the mast foot"} {
		if !strings.Contains(out, want) {
			t.Errorf("text lacks %q:\n%s", want, out)
		}
	}
}

// TestExposureRoundsUp: every printed safety distance is rounded up. 0.6 W
// continuous into 0 dBi at 146 MHz: the § 1.1307(b)(3)(i)(C) exemption
// distance is max(ERP, power)/3.83 = √(0.6/3.83) = 0.3958 m → "0.4 m";
// 12.5 W: √(12.5/3.83) = 1.8066 m → "1.9 m", never "1.8 m" [calc].
func TestExposureRoundsUp(t *testing.T) {
	for _, c := range []struct{ power, want, not string }{
		{"12.5W", "farther than 1.9 m", "1.8 m from the antenna"},
		{"0.6W", "farther than 0.4 m", "farther than 0.3 m"},
	} {
		out, stderr, code := runCmd(t, "exposure", "--power", c.power, "--freq", "146")
		if code != 0 {
			t.Fatal(stderr)
		}
		if !strings.Contains(out, c.want) || strings.Contains(out, c.not) {
			t.Errorf("%s: want %q, not %q:\n%s", c.power, c.want, c.not, out)
		}
	}
	// Imperial units round up in feet: 2.8906 m = 9.4836 ft → "9.5 ft".
	out, _, _ := runCmd(t, "exposure", "--power", "50W", "--gain", "2.15dBi", "--freq", "146", "--units", "imperial")
	if !strings.Contains(out, "9.5 ft") {
		t.Errorf("imperial distance not rounded up to 9.5 ft:\n%s", out)
	}
}

// TestExposureNoResidues sweeps inputs through text and JSON and refuses
// "-0", "-0.0" and exponent residues such as "2.2e-16" anywhere.
func TestExposureNoResidues(t *testing.T) {
	bad := regexp.MustCompile(`(^|[^0-9.])-0(\.0+)?([^0-9.]|$)|[0-9]e-[0-9]`)
	n := 0
	for _, std := range []string{"fcc", "icnirp2020", "icnirp1998"} {
		for _, power := range []string{"0.001W", "1W", "50W", "1500W"} {
			for _, height := range []string{"0m", "2m", "3.0000001m", "4.89m", "60m"} {
				for _, freq := range []string{"1.8", "146", "446", "5800"} {
					for _, format := range []string{"text", "json", "csv"} {
						out, stderr, code := runCmd(t, "exposure", "--power", power, "--freq", freq, "--height", height, "--standard", std, "--format", format, "--mode", "ssb", "--on", "1min", "--off", "2min")
						if code != 0 {
							t.Fatalf("%s %s %s %s: %s", std, power, height, freq, stderr)
						}
						n++
						if m := bad.FindString(out); m != "" {
							t.Errorf("%s %s %s %s MHz %s: %q in\n%s", std, power, height, freq, format, m, out)
						}
					}
				}
			}
		}
	}
	if n == 0 {
		t.Fatal("no case ran")
	}
}

// TestExposureICNIRP: the ICNIRP sets never print the US § 1.1307
// exemption (text or JSON), name their table, and say the values are from
// memory until checked; --distance (the US exemption test) is refused.
func TestExposureICNIRP(t *testing.T) {
	for _, std := range []string{"icnirp2020", "icnirp1998"} {
		out, stderr, code := runCmd(t, "exposure", "--power", "50W", "--freq", "146", "--standard", std, "--height", "3m")
		if code != 0 {
			t.Fatal(stderr)
		}
		if strings.Contains(out, "1.1307") || strings.Contains(out, "exempt") {
			t.Errorf("%s prints the US exemption:\n%s", std, out)
		}
		wants := map[string][]string{
			"icnirp2020": {"Both tiers of ICNIRP 2020 Table 5, public and operators, are from memory"},
			"icnirp1998": {"ICNIRP 1998 Table 6 (occupational), are from memory", "the public limits, Table 7, are checked"},
		}
		for _, want := range append([]string{"ICNIRP", "Table"}, wants[std]...) {
			if !strings.Contains(out, want) {
				t.Errorf("%s text lacks %q:\n%s", std, want, out)
			}
		}
		out, _, _ = runCmd(t, "exposure", "--power", "50W", "--freq", "146", "--standard", std, "--format", "json")
		m := decodeJSON(t, out)
		if _, ok := m["exempt_beyond_m"]; ok {
			t.Errorf("%s JSON has exempt_beyond_m", std)
		}
		if m["limits_from_memory"] != true {
			t.Errorf("%s JSON limits_from_memory %v", std, m["limits_from_memory"])
		}
		// Per tier: ICNIRP 2020 Table 5 is from memory for both; of ICNIRP
		// 1998 only Table 6 (occupational), Table 7 (public) being checked.
		if m["limits_from_memory_public"] != (std == "icnirp2020") || m["limits_from_memory_occupational"] != true || m["limits_note"] == nil {
			t.Errorf("%s JSON per-tier marks: public %v, occupational %v, note %v", std, m["limits_from_memory_public"], m["limits_from_memory_occupational"], m["limits_note"])
		}
		if _, stderr, code := runCmd(t, "exposure", "--power", "50W", "--freq", "146", "--standard", std, "--distance", "5m"); code != 2 || !strings.Contains(stderr, "--distance") {
			t.Errorf("%s --distance: code %d, %s", std, code, stderr)
		}
	}
	// With the US limits the exemption is printed, and explained where it
	// reaches beyond the keep-out (3.7 m against 2.9 m here).
	out, _, _ := runCmd(t, "exposure", "--power", "50W", "--gain", "2.15dBi", "--freq", "146")
	if !strings.Contains(out, "farther than 3.7 m") || !strings.Contains(out, "The exemption distance is longer than the 2.9 m compliance distance above") {
		t.Errorf("US exemption or its explanation missing:\n%s", out)
	}
}

// TestExposureDutyAndUnits: the text shows the duty factor and where it
// comes from (FCC OET Bulletin 65 Supplement B Table 2; ssb-processed marked
// typical), and imperial units add mW/cm² (1 mW/cm² = 10 W/m²; 0.2 mW/cm²
// at 146 MHz, 47 CFR § 1.1310 Table 1).
func TestExposureDutyAndUnits(t *testing.T) {
	out, _, _ := runCmd(t, "exposure", "--power", "100W", "--freq", "14.2", "--mode", "ssb-processed")
	if !strings.Contains(out, "Duty factor 50 % for ssb-processed (typical") {
		t.Errorf("ssb-processed duty not shown as typical:\n%s", out)
	}
	out, _, _ = runCmd(t, "exposure", "--power", "100W", "--freq", "14.2", "--mode", "ssb")
	if !strings.Contains(out, "Duty factor 20 % for ssb (FCC OET Bulletin 65 Supplement B (ed. 97-01), Table 2)") {
		t.Errorf("ssb duty source missing:\n%s", out)
	}
	out, _, _ = runCmd(t, "exposure", "--power", "5W", "--freq", "146", "--units", "imperial")
	if !strings.Contains(out, "2.00 W/m² (0.200 mW/cm²)") || !strings.Contains(out, "10.00 W/m² (1.000 mW/cm²)") {
		t.Errorf("imperial limits lack mW/cm²:\n%s", out)
	}
}

// TestExposureCSVCautions: CSV has no room for the cautions, so they go to
// stderr; the keep-out GPX carries the same note as the GeoJSON.
func TestExposureCSVCautions(t *testing.T) {
	_, stderr, code := runCmd(t, "exposure", "--power", "5W", "--freq", "146", "--format", "csv")
	if code != 0 || !strings.Contains(stderr, "not a measurement") || !strings.Contains(stderr, "power line") {
		t.Errorf("CSV cautions not on stderr: %q", stderr)
	}
	gp := filepath.Join(t.TempDir(), "keepout.gpx")
	if _, stderr, code := runCmd(t, "exposure", "--power", "50W", "--gain", "2.15dBi", "--freq", "146.52", "--height", "3m", "--at", "-48.535,-123.9633", "-o", gp); code != 0 {
		t.Fatal(stderr)
	}
	b, _ := os.ReadFile(gp)
	if !strings.Contains(string(b), "an estimate, not a measurement") {
		t.Errorf("keep-out GPX lacks the note:\n%s", b)
	}
}
