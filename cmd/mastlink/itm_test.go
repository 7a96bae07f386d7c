package main

import (
	"fmt"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

var demoITMPlan = filepath.Join("testdata", "plan-itm.yaml")

// TestLinkITMCommandLineExample runs the NTIA/ITS ITM reference
// distribution's command-line example end to end through `mastlink link
// --profile --model itm`: profile cmd_examples/pfl.txt (testdata/itm, with
// its SOURCE), 3500 MHz, antennas 15 m and 3 m, accidental variability,
// 50 % everywhere, and the defaults of the flags for the rest (climate 5,
// N0 301, ε 15, σ 0.005 S/m, vertical: the example's inputs
// i_p2ptls.txt). Expected: the printed output o_p2ptls.txt: A 114.5 dB,
// N_s 251.5, Δh 3.2 m, θ −1.949 and −0.856 mrad, d_L 14868 and 6494 m,
// h_e 15.0 and 3.0 m, A_ref 0.0 dB, line of sight, no warnings.
func TestLinkITMCommandLineExample(t *testing.T) {
	b, err := os.ReadFile(filepath.Join("testdata", "itm", "pfl-3500mhz.txt"))
	if err != nil {
		t.Fatal(err)
	}
	f := strings.Split(strings.TrimSpace(string(b)), ",")
	var n int
	var dx float64
	fmt.Sscan(f[0], &n)
	fmt.Sscan(f[1], &dx)
	var csv strings.Builder
	csv.WriteString("distance_m,elevation_m\n")
	for i := 0; i <= n; i++ {
		fmt.Fprintf(&csv, "%g,%s\n", float64(i)*dx, strings.TrimSpace(f[i+2]))
	}
	path := filepath.Join(t.TempDir(), "pfl.csv")
	if err := os.WriteFile(path, []byte(csv.String()), 0o644); err != nil {
		t.Fatal(err)
	}
	out, stderr, code := runCmd(t, "link", "--profile", path, "--freq", "3500", "--height", "15m", "--to-height", "3m",
		"--model", "itm", "--variability", "accidental", "--format", "json")
	if code != 0 {
		t.Fatalf("code %d: %s", code, stderr)
	}
	m := decodeJSON(t, out)
	itm := m["itm"].(map[string]any)
	mrad := 180 / math.Pi / 1000
	for _, c := range []struct {
		name      string
		got       any
		want, tol float64
	}{
		{"path_loss_db", m["path_loss_db"], 114.5, 0.05},
		{"surface_refractivity_n", itm["surface_refractivity_n"], 251.5, 0.05},
		{"delta_h_m", itm["delta_h_m"], 3.2, 0.05},
		{"horizon_angle_tx_deg", itm["horizon_angle_tx_deg"], -1.949 * mrad, 0.0005 * mrad},
		{"horizon_angle_rx_deg", itm["horizon_angle_rx_deg"], -0.856 * mrad, 0.0005 * mrad},
		{"horizon_distance_tx_m", itm["horizon_distance_tx_m"], 14868, 0.5},
		{"horizon_distance_rx_m", itm["horizon_distance_rx_m"], 6494, 0.5},
		{"effective_height_tx_m", itm["effective_height_tx_m"], 15.0, 0.05},
		{"effective_height_rx_m", itm["effective_height_rx_m"], 3.0, 0.05},
		{"reference_attenuation_db", itm["reference_attenuation_db"], 0, 0.05},
	} {
		if v, ok := c.got.(float64); !ok || math.Abs(v-c.want) > c.tol {
			t.Errorf("%s = %v, want %v ± %v (NTIA/ITS command-line example)", c.name, c.got, c.want, c.tol)
		}
	}
	if itm["mode"] != "line of sight" || len(m["warnings"].([]any)) != 0 || stderr != "" {
		t.Errorf("mode %v, warnings %v, stderr %q; want line of sight and none", itm["mode"], m["warnings"], stderr)
	}
	if m["model"] != "itm" || m["probability"] != nil {
		t.Errorf("model %v, probability %v", m["model"], m["probability"])
	}
}

// TestLinkITMDemo: `link --model itm` on the demo, text and JSON against
// the golden files; the model's warnings on stderr and in the JSON; the
// margin is at the ITM's reliability, with no σ added.
func TestLinkITMDemo(t *testing.T) {
	args := []string{"--dem", demoTerrain, "link", "--waypoints", demoPoints, "--from", "Ostral Bend", "--to", "Corvane Peak",
		"--freq", "147.78", "--power", "25W", "--gain", "2.15dBi", "--height", "9m", "--cable", "RG-8X", "--cable-length", "20m",
		"--to-gain", "6dBi", "--to-height", "20m", "--rx-sens", "-122dBm", "--model", "itm", "--reliability", "90%", "--margin", "10dB"}
	txt, stderr, code := runCmd(t, args...)
	if code != 0 {
		t.Fatalf("code %d: %s", code, stderr)
	}
	golden(t, "link-itm.txt", txt)
	for _, want := range []string{"Longley–Rice ITM 1.2.2", "continental-temperate climate, N0 301 N-units, ground ε 15 σ 0.005 S/m, vertical, mobile variability, 90 % reliability, 50 % confidence",
		"ITM: line of sight", "needed"} {
		if !strings.Contains(txt, want) {
			t.Errorf("text lacks %q:\n%s", want, txt)
		}
	}
	js, stderr2, code := runCmd(t, append(args, "--format", "json")...)
	if code != 0 {
		t.Fatalf("code %d: %s", code, stderr2)
	}
	goldenJSON(t, "link-itm.json", js)
	m := decodeJSON(t, js)
	ws := m["warnings"].([]any)
	if len(ws) == 0 || strings.Count(stderr2, "mastlink: warning: ITM:") != len(ws) || stderr != stderr2 {
		t.Errorf("warnings %v, stderr %q / %q", ws, stderr, stderr2)
	}
	if m["needed_margin_db"].(float64) != 10 || m["probability"] != nil || m["sigma_db"].(float64) != 0 {
		t.Errorf("needed %v, probability %v, σ %v: the ITM's reliability must stand alone", m["needed_margin_db"], m["probability"], m["sigma_db"])
	}
	// The ITM at 90 % loses more than at its median (Hufford 1995: the
	// variability deviates grow with the percentage).
	med, _, _ := runCmd(t, append(args[:len(args)-4], "--format", "json")...)
	if d := m["path_loss_db"].(float64) - decodeJSON(t, med)["path_loss_db"].(float64); !(d > 1) {
		t.Errorf("loss at 90 %% exceeds the median by %.2f dB", d)
	}
}

// TestITMFlagErrors: every misuse of the ITM flags is one line naming
// the flag, exit code 2; errors of the model over a path are one line,
// exit code 1; inputs outside the model's tested ranges are warnings.
func TestITMFlagErrors(t *testing.T) {
	link := []string{"link", "--from", "-48.5,-124", "--to", "-48.52,-123.9", "--freq", "146"}
	itm := append(append([]string{}, link...), "--model", "itm")
	with := func(base []string, more ...string) []string { return append(append([]string{}, base...), more...) }
	for _, c := range []struct {
		args []string
		code int
		msg  string
	}{
		{with(link, "--climate", "5"), 2, "--climate is a Longley–Rice ITM setting: add --model itm"},
		{with(link, "--no-location-variability"), 2, "--no-location-variability is a Longley–Rice ITM setting"},
		{with(link, "--model", "free-space", "--time", "90%"), 2, "--time is a Longley–Rice ITM setting"},
		{with(itm, "--climate", "9"), 2, `--climate: unknown radio climate "9"; use one of: 1 equatorial`},
		{with(itm, "--refractivity", "200"), 2, "--refractivity: N0 200 N-units is outside 250–400"},
		{with(itm, "--refractivity", "301", "--surface-refractivity", "280"), 2, "--surface-refractivity: give the refractivity as N0"},
		{with(itm, "--permittivity", "0.5"), 2, "--permittivity: relative permittivity 0.5 must be 1 or more"},
		{with(itm, "--conductivity", "0"), 2, "--conductivity: conductivity 0 S/m must be above 0"},
		{with(itm, "--variability", "often"), 2, `--variability: unknown mode of variability "often"`},
		{with(itm, "--time", "100%"), 2, "--time: must be above 0% and below 100%"},
		{with(itm, "--location", "90"), 2, "--location:"},
		{with(itm, "--time", "90%", "--confidence", "90%"), 2, "--confidence: give time, location and situation"},
		{with(itm, "--time", "90%", "--reliability", "90%"), 2, "--reliability: the ITM's time, location and situation percentages are given"},
		{with(itm, "--sigma", "6dB"), 2, "--sigma: not used with --model itm"},
		{with(itm, "--k", "4/3"), 2, "--k: not used with --model itm"},
		{with(itm, "--ground", "sea"), 2, "--ground: not used with --model itm"},
		{[]string{"route", demoHike, "--plan", demoPlanFile, "--climate", "5"}, 2, "--climate is a Longley–Rice ITM setting: add --model itm"},
		{[]string{"mast", "--plan", demoPlanFile, "--model", "itm"}, 2, "--model: with --plan the model comes from the plan file"},
		{[]string{"mast", "--from", "-48.5,-124", "--to", "-48.52,-123.9", "--freq", "146", "--heights", "2m..4m step 1m", "--cables", "RG-58", "--climate", "3"}, 2, "--climate is a Longley–Rice ITM setting"},
		// The model's own limits (Hufford 1995): 20–20 000 MHz, 0.5–3000 m.
		{with(itm[:len(itm)-4], "--freq", "15", "--model", "itm"), 1, "frequency 15 MHz is outside the ITM range 20–20 000 MHz"},
		{with(itm, "--height", "0.2m"), 1, "transmitter antenna height 0.2 m is outside the ITM range 0.5–3000 m"},
	} {
		t.Run(strings.Join(c.args[len(c.args)-2:], " "), func(t *testing.T) {
			t.Setenv("MASTLINK_DEM", "")
			_, stderr, code := runCmd(t, c.args...)
			if code != c.code || !strings.Contains(stderr, c.msg) {
				t.Errorf("code %d, stderr %q; want %d and %q", code, stderr, c.code, c.msg)
			}
			if lines := strings.Count(strings.TrimSpace(stderr), "\n") + 1; lines != 1 && !strings.Contains(stderr, "smooth earth") {
				t.Errorf("%d lines on stderr: %q", lines, stderr)
			}
		})
	}
	// 30 MHz and a 0.7 m antenna are inside the model's limits but outside
	// the ranges it was tested on (40–10 000 MHz, 1–1000 m): warnings.
	t.Setenv("MASTLINK_DEM", "")
	out, stderr, code := runCmd(t, with(itm[:len(itm)-4], "--freq", "30", "--height", "0.7m", "--model", "itm", "--format", "json")...)
	if code != 0 {
		t.Fatalf("code %d: %s", code, stderr)
	}
	ws := decodeJSON(t, out)["warnings"].([]any)
	for _, want := range []string{"ITM: transmitter antenna height outside 1–1000 m", "ITM: frequency outside 40–10 000 MHz"} {
		if !strings.Contains(stderr, "mastlink: warning: "+want) || !strings.Contains(fmt.Sprint(ws), want) {
			t.Errorf("warning %q missing: stderr %q, JSON %v", want, stderr, ws)
		}
	}
}

// TestPlanITMDemo: the demo plan with model: itm (testdata/plan-itm.yaml):
// the briefing names the model, its settings and each link's mode, the
// mast sweep and the route run on the ITM, and the model's warnings reach
// stderr, the text and the JSON.
func TestPlanITMDemo(t *testing.T) {
	out, stderr, code := runCmd(t, "plan", demoITMPlan)
	if code != 0 {
		t.Fatalf("code %d: %s", code, stderr)
	}
	golden(t, "plan-itm.txt", out)
	for _, want := range []string{"Requirement: 10.0 dB of margin at the ITM's 90% reliability", "Longley–Rice ITM 1.2.2", "ITM mode", "Mast and cable", "Warnings:\n"} {
		if !strings.Contains(out, want) {
			t.Errorf("briefing lacks %q", want)
		}
	}
	if !strings.Contains(stderr, "mastlink: warning: ITM: terrain irregularity") {
		t.Errorf("stderr %q", stderr)
	}
	js, _, code := runCmd(t, "plan", demoITMPlan, "--format", "json")
	if code != 0 {
		t.Fatal(code)
	}
	m := decodeJSON(t, js)
	for _, l := range m["links"].([]any) {
		l := l.(map[string]any)
		itm, ok := l["itm"].(map[string]any)
		if l["model"] != "itm" || !ok || itm["reliability_pct"] != 90.0 || l["probability"] != nil {
			t.Fatalf("link %v → %v: model %v, itm %v, probability %v", l["from"], l["to"], l["model"], l["itm"], l["probability"])
		}
		for _, k := range []string{"delta_h_m", "effective_height_tx_m", "effective_height_rx_m", "horizon_distance_tx_m", "horizon_distance_rx_m",
			"horizon_angle_tx_deg", "horizon_angle_rx_deg", "surface_refractivity_n", "reference_attenuation_db", "mode"} {
			if _, ok := itm[k]; !ok {
				t.Errorf("itm lacks %s", k)
			}
		}
	}
	if !strings.Contains(fmt.Sprint(m["warnings"]), "ITM: terrain irregularity") {
		t.Errorf("JSON warnings %v", m["warnings"])
	}
}

// TestRouteITM: the route runs with --model itm from flags; its result
// differs from the terrain model's and the model's warnings are counted
// over the paths.
func TestRouteITM(t *testing.T) {
	args := []string{"route", demoHike, "--dem", demoTerrain, "--targets", demoPoints, "--freq", "146.55", "--spacing", "200m", "--format", "json"}
	itmOut, stderr, code := runCmd(t, append(args, "--model", "itm", "--climate", "maritime-temperate-land", "--reliability", "90%")...)
	if code != 0 {
		t.Fatalf("code %d: %s", code, stderr)
	}
	terrOut, _, code := runCmd(t, args...)
	if code != 0 {
		t.Fatal(code)
	}
	a, b := decodeJSON(t, itmOut), decodeJSON(t, terrOut)
	if a["paths"] != b["paths"] || a["overall_fraction"] == b["overall_fraction"] && fmt.Sprint(a["points"]) == fmt.Sprint(b["points"]) {
		t.Errorf("the ITM route equals the terrain route")
	}
	ws, _ := a["warnings"].([]any)
	if len(ws) == 0 || !strings.Contains(fmt.Sprint(ws), fmt.Sprintf("of %v paths)", a["paths"])) || !strings.Contains(stderr, "mastlink: warning: ITM:") {
		t.Errorf("warnings %v, stderr %q", ws, stderr)
	}
	if ws, ok := b["warnings"].([]any); !ok || len(ws) != 0 { // always present, empty here
		t.Errorf("terrain route has warnings %v", b["warnings"])
	}
	if _, stderr, code := runCmd(t, "route", demoHike, "--plan", demoITMPlan, "--format", "json"); code != 0 {
		t.Errorf("route with the ITM plan: %d %s", code, stderr)
	}
}
