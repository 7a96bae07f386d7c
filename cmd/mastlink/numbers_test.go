package main

import (
	"bytes"
	"encoding/json"
	"fmt"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"

	"github.com/mastlink/mastlink/plan"
	"github.com/mastlink/mastlink/plan/gpx"
)

// offDEMTargets writes a GPX file with one waypoint outside the demo's two
// tiles (S49W124, S49W125): the path to it crosses S49W123, which is absent.
func offDEMTargets(t *testing.T) string {
	t.Helper()
	p := filepath.Join(t.TempDir(), "far.gpx")
	gpxText := `<?xml version="1.0" encoding="UTF-8"?>
<gpx version="1.1" creator="test" xmlns="http://www.topografix.com/GPX/1/1">
  <wpt lat="-48.5" lon="-122.6"><name>Far East</name></wpt>
</gpx>
`
	if err := os.WriteFile(p, []byte(gpxText), 0o644); err != nil {
		t.Fatal(err)
	}
	return p
}

// TestWarningsReachJSON: a path off the elevation data is warned about on
// stderr and in warnings[] of link, route and sites JSON; with no warning
// the list is empty, not missing.
func TestWarningsReachJSON(t *testing.T) {
	far := offDEMTargets(t)
	cases := []struct {
		name string
		args []string
	}{
		{"link", []string{"link", "--dem", demoTerrain, "--from", "-48.5,-123.9", "--to", "-48.5,-122.6", "--freq", "146.55"}},
		{"route", []string{"route", demoHike, "--dem", demoTerrain, "--targets", far, "--freq", "146.55", "--spacing", "1km"}},
		{"sites", []string{"sites", demoCandidates, "--dem", demoTerrain, "--targets", far, "--freq", "146.55"}},
	}
	for _, c := range cases {
		out, stderr, code := runCmd(t, append(c.args, "--format", "json")...)
		if code != 0 {
			t.Fatalf("%s: code %d: %s", c.name, code, stderr)
		}
		if !strings.Contains(stderr, "warning: no elevation data for S49W123.hgt") {
			t.Errorf("%s: stderr lacks the warning: %q", c.name, stderr)
		}
		ws, ok := decodeJSON(t, out)["warnings"].([]any)
		if !ok || len(ws) == 0 || !strings.Contains(ws[0].(string), "no elevation data for S49W123.hgt") {
			t.Errorf("%s: JSON warnings %v", c.name, ws)
		}
	}
	out, _, code := runCmd(t, "link", "--dem", demoTerrain, "--from", "-48.5,-123.9", "--to", "-48.55,-123.95", "--freq", "146.55", "--format", "json")
	if ws, ok := decodeJSON(t, out)["warnings"].([]any); code != 0 || !ok || len(ws) != 0 {
		t.Errorf("link on the DEM: warnings %v (code %d)", ws, code)
	}
}

// TestLinkSMeterHF: IARU Region 1 Technical Recommendation R.1 (as given in
// the IARU Region 1 HF Managers' Handbook v9 §4.1.3): S9 is −73 dBm below
// 30 MHz, −93 dBm above, 6 dB per unit. The same received level reads 20 dB
// (3⅓ units) lower on HF. Below 30 MHz the terrain model (ITU-R P.526
// delta-Bullington, used by ITU-R P.1812-8 for 30 MHz–6 GHz, from memory)
// is out of its band, which is warned about.
func TestLinkSMeterHF(t *testing.T) {
	args := []string{"link", "--from", "-48.5,-123.9", "--to", "-48.5,-123.8", "--power", "5W", "--format", "json"}
	vhf, _, code := runCmd(t, append(args, "--freq", "50.1")...)
	if code != 0 {
		t.Fatal(code)
	}
	hf, stderr, code := runCmd(t, append(args, "--freq", "28.5")...)
	if code != 0 {
		t.Fatal(code)
	}
	mv, mh := decodeJSON(t, vhf), decodeJSON(t, hf)
	// Free space over 7.4 km at 5 W gives a strong level at both.
	rxV, rxH := mv["rx_power_dbm"].(float64), mh["rx_power_dbm"].(float64)
	if want := units_SMeterOver(rxV, -93); mv["s_meter"] != want {
		t.Errorf("50.1 MHz: %v at %.1f dBm, want %v", mv["s_meter"], rxV, want)
	}
	if want := units_SMeterOver(rxH, -73); mh["s_meter"] != want {
		t.Errorf("28.5 MHz: %v at %.1f dBm, want %v", mh["s_meter"], rxH, want)
	}
	if !strings.Contains(stderr, "28.5 MHz is outside 30–6000 MHz") {
		t.Errorf("no band warning at 28.5 MHz: %q", stderr)
	}
	ws := mh["warnings"].([]any)
	if len(ws) == 0 || !strings.Contains(ws[len(ws)-1].(string), "28.5 MHz is outside") {
		t.Errorf("JSON warnings %v", ws)
	}
}

// units_SMeterOver renders a level as an S-meter reading by the IARU R.1
// rule with the given S9 level: S1 is S9 − 48 dB, one unit per 6 dB below
// S9, "S9+NdB" with N whole dB above.
func units_SMeterOver(dBm, s9 float64) string {
	if dBm < s9 {
		return fmt.Sprintf("S%d", 1+int(math.Floor((dBm-(s9-48))/6)))
	}
	if over := math.Round(dBm - s9); over != 0 {
		return fmt.Sprintf("S9+%gdB", over)
	}
	return "S9"
}

// geodSolveAzimuths runs GeographicLib's GeodSolve (Debian
// geographiclib-tools) on the inverse problem and returns azi1 and azi2,
// degrees in [0, 360).
func geodSolveAzimuths(t *testing.T, lat1, lon1, lat2, lon2 float64) (azi1, azi2 float64) {
	t.Helper()
	path, err := exec.LookPath("GeodSolve")
	if err != nil {
		if os.Getenv("MASTLINK_REQUIRE_CROSSCHECKS") == "1" {
			t.Fatal("GeodSolve (Debian geographiclib-tools) not found and MASTLINK_REQUIRE_CROSSCHECKS=1")
		}
		t.Skip("GeodSolve (Debian geographiclib-tools) not found; install it to run this cross-check")
	}
	cmd := exec.Command(path, "-i", "-p", "9")
	cmd.Stdin = strings.NewReader(fmt.Sprintf("%.12f %.12f %.12f %.12f\n", lat1, lon1, lat2, lon2))
	out, err := cmd.Output()
	if err != nil {
		t.Fatal(err)
	}
	var s12 float64
	if _, err := fmt.Sscan(string(out), &azi1, &azi2, &s12); err != nil {
		t.Fatalf("GeodSolve output %q: %v", out, err)
	}
	return math.Mod(azi1+360, 360), math.Mod(azi2+360, 360)
}

// TestPlanBearings: each link row's azimuth_deg is the forward azimuth at
// its transmitting end and rx_azimuth_deg the one at its receiving end,
// both checked against GeodSolve on the demo's station and repeater (the
// azimuth at the far end back towards the station is GeodSolve's azi2 +
// 180°, not the station's azi1 + 180°); the briefing table shows the
// station's own bearing to the target in both rows.
func TestPlanBearings(t *testing.T) {
	p, err := plan.ReadPlan(demoPlan)
	if err != nil {
		t.Fatal(err)
	}
	st, rep := p.Stations[0], p.Targets[0]
	fwd, azi2 := geodSolveAzimuths(t, st.Pos.Lat(), st.Pos.Lon(), rep.Pos.Lat(), rep.Pos.Lon())
	back, _ := geodSolveAzimuths(t, rep.Pos.Lat(), rep.Pos.Lon(), st.Pos.Lat(), st.Pos.Lon())
	if d := math.Abs(math.Mod(azi2+180, 360) - back); d > 1e-6 {
		t.Fatalf("GeodSolve: back azimuth %.9f is not azi2 + 180° (%.9f)", back, azi2)
	}
	js, _, code := runCmd(t, "plan", demoPlan, "--format", "json")
	if code != 0 {
		t.Fatal(code)
	}
	var res plan.PlanResult
	if err := json.Unmarshal([]byte(js), &res); err != nil {
		t.Fatal(err)
	}
	angle := func(a, b float64) float64 { return math.Abs(math.Remainder(a-b, 360)) }
	for _, l := range res.Links {
		var tx, rx float64
		switch {
		case l.Direction == plan.DirTalkIn && l.To == rep.Name:
			tx, rx = fwd, back
		case l.Direction == plan.DirTalkOut && l.From == rep.Name:
			tx, rx = back, fwd
		default:
			continue
		}
		if angle(l.AzimuthDeg, tx) > 1e-6 || angle(l.RxAzimuthDeg, rx) > 1e-6 {
			t.Errorf("%s: azimuth %.9f / rx %.9f, GeodSolve %.9f / %.9f", l.Direction, l.AzimuthDeg, l.RxAzimuthDeg, tx, rx)
		}
	}
	out, _, _ := runCmd(t, "plan", demoPlan)
	want := fmt.Sprintf("%03.0f°", fwd)
	n := 0
	for _, line := range strings.Split(out, "\n") {
		if strings.HasPrefix(line, "  "+rep.Name+" ") && (strings.Contains(line, " talk-in ") || strings.Contains(line, " talk-out ")) {
			n++
			if !strings.Contains(line, want) {
				t.Errorf("row %q lacks the station's bearing %s", line, want)
			}
		}
	}
	if n != 2 {
		t.Errorf("found %d repeater rows", n)
	}
}

// samePlacePlan writes a plan whose second target stands where the station
// does (invented positions on the demo's terrain).
func samePlacePlan(t *testing.T) string {
	t.Helper()
	dir := t.TempDir()
	abs, err := filepath.Abs(demoTerrain)
	if err != nil {
		t.Fatal(err)
	}
	text := `name: same place
frequency: 146.55MHz
terrain: ` + abs + `
require: {margin: 10dB}
defaults:
  radio: {power: 5W, sensitivity: 0.25uV}
  antenna: {gain: 0dBi, height: 1.5m}
stations:
  - name: Base
    at: "-48.49666,-123.87788"
    radio: {power: 25W, sensitivity: 0.25uV}
    antenna: {gain: 2.15dBi, height: 9m}
targets:
  - name: Far Team
    at: "-48.52,-123.95"
  - name: Tent
    at: "-48.49666,-123.87788"
mast:
  heights: 2m..4m step 1m
  cables: [RG-58]
  run: 10m
`
	p := filepath.Join(dir, "plan.yaml")
	if err := os.WriteFile(p, []byte(text), 0o644); err != nil {
		t.Fatal(err)
	}
	return p
}

// TestPlanSamePlace: a target at the station's own place does not fail the
// plan; its rows say "same place", are marked in JSON, are not counted, and
// a warning names both.
func TestPlanSamePlace(t *testing.T) {
	p := samePlacePlan(t)
	out, stderr, code := runCmd(t, "plan", p)
	if code != 0 {
		t.Fatalf("code %d: %s", code, stderr)
	}
	if !strings.Contains(out, "same place") || !strings.Contains(out, "reaches 1 of 1 required targets") && !strings.Contains(out, "reaches 0 of 1 required targets") {
		t.Errorf("briefing:\n%s", out)
	}
	if !strings.Contains(stderr, "Base and Tent are at the same place") {
		t.Errorf("stderr: %q", stderr)
	}
	js, _, code := runCmd(t, "plan", p, "--format", "json")
	if code != 0 {
		t.Fatal(code)
	}
	var res plan.PlanResult
	if err := json.Unmarshal([]byte(js), &res); err != nil {
		t.Fatal(err)
	}
	marked := 0
	for _, l := range res.Links {
		if l.SamePlace {
			marked++
			if l.MeetsRequirement != nil {
				t.Errorf("same-place link judged: %+v", l)
			}
		}
	}
	if marked != 2 || res.Stations[0].Of != 1 || res.Mast == nil {
		t.Errorf("marked %d, of %d, mast %v", marked, res.Stations[0].Of, res.Mast)
	}
	// -o writes the outputs without a line of zero length or an infinite margin.
	dir := filepath.Join(t.TempDir(), "out")
	if _, stderr, code := runCmd(t, "plan", p, "-o", dir); code != 0 {
		t.Fatalf("-o: code %d: %s", code, stderr)
	}
	b, _ := os.ReadFile(filepath.Join(dir, "plan.gpx"))
	if strings.Contains(string(b), "Inf") || !strings.Contains(string(b), "not evaluated") {
		t.Errorf("plan.gpx:\n%s", b)
	}
}

// TestSitesSamePlace: a candidate at a target's place leaves that target
// out of its figures and says so (stderr and JSON warnings).
func TestSitesSamePlace(t *testing.T) {
	// The demo's candidate "Quillet Col" is a waypoint of candidates.gpx; a
	// target file with a waypoint at the same place and one elsewhere.
	dir := t.TempDir()
	cands := filepath.Join(dir, "c.gpx")
	tg := filepath.Join(dir, "t.gpx")
	os.WriteFile(cands, []byte(`<?xml version="1.0"?><gpx version="1.1" creator="t" xmlns="http://www.topografix.com/GPX/1/1">
<wpt lat="-48.50" lon="-123.90"><name>Knoll</name></wpt><wpt lat="-48.51" lon="-123.92"><name>Ridge</name></wpt></gpx>`), 0o644)
	os.WriteFile(tg, []byte(`<?xml version="1.0"?><gpx version="1.1" creator="t" xmlns="http://www.topografix.com/GPX/1/1">
<wpt lat="-48.50" lon="-123.90"><name>Hut</name></wpt><wpt lat="-48.53" lon="-123.96"><name>Camp</name></wpt></gpx>`), 0o644)
	out, stderr, code := runCmd(t, "sites", cands, "--dem", demoTerrain, "--targets", tg, "--freq", "146.55", "--format", "json")
	if code != 0 {
		t.Fatalf("code %d: %s", code, stderr)
	}
	if !strings.Contains(stderr, "candidate Knoll is at the same place as Hut") {
		t.Errorf("stderr: %q", stderr)
	}
	m := decodeJSON(t, out)
	for _, s := range m["sites"].([]any) {
		site := s.(map[string]any)
		if site["name"] == "Knoll" && site["of"].(float64) != 1 {
			t.Errorf("Knoll counts %v targets, want 1 (Hut left out)", site["of"])
		}
		if site["name"] == "Ridge" && site["of"].(float64) != 2 {
			t.Errorf("Ridge counts %v targets, want 2", site["of"])
		}
	}
}

// TestStepRefusals: a step longer than the path, or so short that the
// profile would need more samples than allowed, is refused in plain words
// naming --step (exit 2, no 19-digit sample count); at the pole the
// elevation data's spacing no longer collapses to nothing.
func TestStepRefusals(t *testing.T) {
	cases := []struct {
		args []string
		want string
	}{
		{[]string{"profile", "--from", "-48.5,-123.9", "--to", "-48.6,-123.95", "--step", "1e9m"}, "--step 1000000.00 km is longer than the path (11.72 km)"},
		{[]string{"link", "--from", "-48.5,-123.9", "--to", "-48.6,-123.95", "--freq", "146", "--step", "1e9m"}, "--step 1000000.00 km is longer than the path"},
		{[]string{"profile", "--from", "-48.5,-123.9", "--to", "-48.6,-123.95", "--step", "1e-9m"}, "--step: a profile of 11717 m at a 1e-09 m step would need more than 10000000 samples; use a step of at least 0.002 m"},
		{[]string{"link", "--from", "-48.5,-123.9", "--to", "-48.6,-123.95", "--freq", "146", "--step", "1e-9m"}, "--step: a profile of 11717 m"},
	}
	for _, c := range cases {
		_, stderr, code := runCmd(t, append(c.args, "--dem", demoTerrain)...)
		if code != 2 || !strings.Contains(stderr, c.want) {
			t.Errorf("%v: code %d, stderr %q; want %q", c.args, code, stderr, c.want)
		}
	}
	// A pole with elevation data given: the automatic step is at least 1 m.
	_, stderr, code := runCmd(t, "profile", "--from", "90,0", "--to", "89.9,0", "--dem", demoTerrain)
	if code != 0 || strings.Contains(stderr, "samples") {
		t.Errorf("pole: code %d, %q", code, stderr)
	}
}

// TestPlanOutputsSameBytes: the same plan written twice with -o gives the
// same bytes in every file (no time of writing); plan.gpx carries ground
// heights to 0.1 m (267.5 m at Valley Base: the demo tile, bilinear) and
// each place once; the route GPX of the demo has no duplicate waypoints.
func TestPlanOutputsSameBytes(t *testing.T) {
	a, b := filepath.Join(t.TempDir(), "a"), filepath.Join(t.TempDir(), "b")
	for _, dir := range []string{a, b} {
		if _, stderr, code := runCmd(t, "plan", demoPlan, "-o", dir); code != 0 {
			t.Fatalf("code %d: %s", code, stderr)
		}
	}
	names, _ := filepath.Glob(filepath.Join(a, "*"))
	if len(names) < 4 {
		t.Fatalf("wrote %v", names)
	}
	for _, n := range names {
		x, _ := os.ReadFile(n)
		y, err := os.ReadFile(filepath.Join(b, filepath.Base(n)))
		if err != nil || !bytes.Equal(x, y) {
			t.Errorf("%s differs between two runs (%v)", filepath.Base(n), err)
		}
	}
	g, _ := os.ReadFile(filepath.Join(a, "plan.gpx"))
	s := string(g)
	if strings.Contains(s, "<time>") || !strings.Contains(s, "<ele>267.5</ele>") {
		t.Errorf("plan.gpx:\n%s", s)
	}
	noDuplicateWaypoints(t, "plan.gpx", g)
	r := filepath.Join(t.TempDir(), "hike.gpx")
	if _, stderr, code := runCmd(t, "route", demoHike, "--plan", demoPlan, "-o", r); code != 0 {
		t.Fatalf("route: %s", stderr)
	}
	rb, _ := os.ReadFile(r)
	noDuplicateWaypoints(t, "route GPX", rb)
}

func noDuplicateWaypoints(t *testing.T, what string, doc []byte) {
	t.Helper()
	f, err := gpx.Decode(doc, what)
	if err != nil {
		t.Fatal(err)
	}
	seen := map[string]bool{}
	for _, w := range f.Waypoints {
		k := fmt.Sprintf("%s@%v", w.Name, w.Pos)
		if seen[k] {
			t.Errorf("%s: waypoint %q twice at %v", what, w.Name, w.Pos)
		}
		seen[k] = true
	}
}
