package main

import (
	"bytes"
	"encoding/json"
	"image/png"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"github.com/mastlink/mastlink/plan"
	"github.com/mastlink/mastlink/plan/gpx"
)

// TestLinkYagiAimedAtAndAway: in `link`, a Yagi aimed at the far end and
// one aimed away differ in margin by its front-to-back ratio within 0.5 dB
// (the catalog's typical 15 dB for a 3-element Yagi; common practice, from
// memory). Both ends' cases: the Yagi transmitting (--bearing) and
// receiving (--to-bearing).
func TestLinkYagiAimedAtAndAway(t *testing.T) {
	base := []string{"link", "--dem", demoTerrain, "--waypoints", demoPoints, "--from", "Ostral Bend", "--to", "Corvane Peak",
		"--freq", "146.55", "--format", "json"}
	margin := func(extra ...string) (float64, map[string]any) {
		out, stderr, code := runCmd(t, append(append([]string(nil), base...), extra...)...)
		if code != 0 {
			t.Fatalf("%v: exit %d: %s", extra, code, stderr)
		}
		m := decodeJSON(t, out)
		return m["margin_db"].(float64), m
	}
	_, m := margin()
	az := m["azimuth_deg"].(float64)
	back := math.Mod(az+180, 360)
	f := func(v float64) string { return strconv.FormatFloat(v, 'f', 3, 64) }
	for _, prefix := range []string{"", "to-"} {
		bAt, bAway := az, back
		if prefix == "to-" { // the receiving end looks back along the path
			bAt, bAway = back, az
		}
		at, mAt := margin("--"+prefix+"antenna", "yagi-3el-2m", "--"+prefix+"bearing", f(bAt))
		away, _ := margin("--"+prefix+"antenna", "yagi-3el-2m", "--"+prefix+"bearing", f(bAway))
		if d := at - away; math.Abs(d-15) > 0.5 {
			t.Errorf("--%santenna: aimed at %.2f dB, away %.2f dB, difference %.2f dB; want the front-to-back 15 dB ± 0.5", prefix, at, away, d)
		}
		key := "tx_antenna"
		if prefix == "to-" {
			key = "rx_antenna"
		}
		if mAt[key] != "yagi-3el-2m" {
			t.Errorf("%s = %v", key, mAt[key])
		}
	}
	// --gain overrides the catalog's gain and keeps the pattern.
	g, mg := margin("--antenna", "yagi-3el-2m", "--gain", "10dBi", "--bearing", f(az))
	y, _ := margin("--antenna", "yagi-3el-2m", "--bearing", f(az))
	if math.Abs((g-y)-2.5) > 1e-6 || mg["tx_gain_dbi"].(float64) != 10 {
		t.Errorf("--gain 10dBi over the 7.5 dBi Yagi: margin +%.3f dB, want +2.5", g-y)
	}
}

// TestLinkKitText: the text shows the antenna toward the path, the body
// loss marked typical, the clutter, and the notes.
func TestLinkKitText(t *testing.T) {
	out, stderr, code := runCmd(t, "link", "--dem", demoTerrain, "--waypoints", demoPoints, "--from", "Ostral Bend", "--to", "Corvane Peak",
		"--freq", "146.55", "--antenna", "handheld-whip", "--to-antenna", "yagi-3el-70cm", "--to-clutter", "forest", "--to-height", "4m")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	for _, want := range []string{"transmit antenna gain (handheld-whip)", "body loss at the transmitter", "face, typical",
		"clutter at the receiver", "forest, ITU-R P.2108", "receive antenna gain (yagi-3el-70cm, aimed", "Note: Corvane Peak: the yagi-3el-70cm",
		"is not made for 146.550 MHz", "no bearing; taken as aimed at the far end"} {
		if !strings.Contains(out, want) {
			t.Errorf("text lacks %q:\n%s", want, out)
		}
	}
}

func TestKitFlagErrors(t *testing.T) {
	base := []string{"link", "--dem", demoTerrain, "--from", "-48.5,-123.9", "--to", "-48.45,-123.95", "--freq", "146.55"}
	cases := []struct {
		args []string
		want string
	}{
		{[]string{"--antenna", "discone"}, `--antenna: unknown antenna "discone"`},
		{[]string{"--to-antenna", "yagi-3el-2m", "--to-bearing", "north"}, `--to-bearing: "north" is not a bearing`},
		{[]string{"--body-loss", "pocket"}, `--body-loss: "pocket": give face, belt, none`},
		{[]string{"--to-clutter", "jungle"}, `--to-clutter: propagation: unknown clutter class "jungle"`},
		{[]string{"--clutter", "forest", "--height", "0m"}, "clutter forest"},
	}
	for _, c := range cases {
		_, stderr, code := runCmd(t, append(append([]string(nil), base...), c.args...)...)
		if code == 0 || !strings.Contains(stderr, c.want) || strings.Count(strings.TrimSpace(stderr), "\n") > 0 {
			t.Errorf("%v: exit %d, stderr %q; want one line with %q", c.args, code, stderr, c.want)
		}
	}
	// With --plan, route takes the antenna flags as a what-if over the
	// plan's handheld, and says so.
	out, stderr, code := runCmd(t, "route", demoHike, "--plan", demoPlanFile, "--antenna", "dipole", "--format", "json")
	if code != 0 || !strings.Contains(out, "--antenna dipole") {
		t.Errorf("route --plan --antenna: exit %d, %q; want the what-if listed", code, stderr)
	}
	if _, stderr, code := runCmd(t, "route", demoHike, "--plan", demoPlanFile, "--to-antenna", "dipole"); code != 2 || !strings.Contains(stderr, "--to-antenna") {
		t.Errorf("route --plan --to-antenna: exit %d, %q", code, stderr)
	}
}

func TestAntennaList(t *testing.T) {
	for _, c := range []struct{ format, golden string }{{"text", "antenna-list.txt"}, {"csv", "antenna-list.csv"}} {
		out, stderr, code := runCmd(t, "antenna", "--list", "--format", c.format)
		if code != 0 {
			t.Fatalf("exit %d: %s", code, stderr)
		}
		golden(t, c.golden, out)
	}
	out, _, _ := runCmd(t, "antenna", "--list", "--format", "json")
	var res struct {
		Antennas []struct {
			Name    string  `json:"name"`
			GainDBi float64 `json:"gain_dbi"`
			FB      float64 `json:"front_to_back_db"`
			Typical bool    `json:"typical"`
			Source  string  `json:"source"`
		} `json:"antennas"`
	}
	if err := json.Unmarshal([]byte(out), &res); err != nil {
		t.Fatal(err)
	}
	if len(res.Antennas) < 12 {
		t.Fatalf("%d antennas", len(res.Antennas))
	}
	for _, a := range res.Antennas {
		if a.Source == "" || (a.Typical != strings.HasPrefix(a.Source, "typical")) {
			t.Errorf("%s: source %q, typical %v", a.Name, a.Source, a.Typical)
		}
		if a.Name == "dipole" && a.GainDBi != 2.15 { // FCC OET Bulletin 65 (97-01): 2.15 dBi
			t.Errorf("dipole %.2f dBi", a.GainDBi)
		}
	}
	if _, stderr, code := runCmd(t, "antenna"); code != 2 || !strings.Contains(stderr, "give --list") {
		t.Errorf("bare antenna: %d %q", code, stderr)
	}
}

// TestAntennaTrim: the check values of the trimming rule (common practice,
// no published source): resonant at 139.35 MHz, wanted at 146 MHz, ratio
// 0.954; elements of 468 mm and 458 mm become about 446.7 mm and 437.1 mm.
func TestAntennaTrim(t *testing.T) {
	out, stderr, code := runCmd(t, "antenna", "trim", "--resonance", "139.35MHz", "--want", "146MHz", "--length", "468mm", "--length", "458mm", "--format", "json")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	var r struct {
		Ratio   float64 `json:"ratio"`
		Lengths []struct {
			NowM float64 `json:"now_m"`
			NewM float64 `json:"new_m"`
			CutM float64 `json:"cut_m"`
		} `json:"lengths"`
		Caution string `json:"caution"`
	}
	if err := json.Unmarshal([]byte(out), &r); err != nil {
		t.Fatal(err)
	}
	if math.Abs(r.Ratio-0.954) > 0.0005 || len(r.Lengths) != 2 || r.Caution == "" {
		t.Fatalf("%+v", r)
	}
	for i, want := range []float64{0.4467, 0.4371} { // common practice
		l := r.Lengths[i]
		if math.Abs(l.NewM-want) > 0.00005 || math.Abs(l.CutM-(l.NowM-l.NewM)) > 1e-12 {
			t.Errorf("element %d: %+v, want about %.4f m", i+1, l, want)
		}
	}
	text, _, _ := runCmd(t, "antenna", "trim", "--resonance", "139.35", "--want", "146", "--length", "468mm", "--length", "458mm")
	golden(t, "antenna-trim.txt", text)
	if _, stderr, code := runCmd(t, "antenna", "trim", "--resonance", "139.35", "--want", "146"); code != 2 || !strings.Contains(stderr, "--length") {
		t.Errorf("no length: %d %q", code, stderr)
	}
}

// TestAntennaStart: a quarter wave of wire at 146 MHz is about 234/f feet
// (the handbook rule, common practice: 0.4885 m) and the caution about the
// mounting always comes with it.
func TestAntennaStart(t *testing.T) {
	out, stderr, code := runCmd(t, "antenna", "start", "--freq", "146", "--velocity-factor", "wire", "--format", "json")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	m := decodeJSON(t, out)
	q, h := m["quarter_wave_m"].(float64), m["half_wave_m"].(float64)
	rule := 234 / 146.0 * 0.3048
	if math.Abs(q-rule)/rule > 0.005 || math.Abs(h-2*q) > 1e-12 {
		t.Errorf("quarter %.4f m, half %.4f m; the 234/f ft rule gives %.4f m", q, h, rule)
	}
	if c, _ := m["caution"].(string); !strings.Contains(c, "mounting") {
		t.Errorf("caution %q", c)
	}
	text, _, _ := runCmd(t, "antenna", "start", "--freq", "446", "--velocity-factor", "coax-solid")
	golden(t, "antenna-start.txt", text)
	if _, stderr, code := runCmd(t, "antenna", "start", "--freq", "146", "--velocity-factor", "1.5"); code != 2 || !strings.Contains(stderr, "--velocity-factor") {
		t.Errorf("bad velocity factor: %d %q", code, stderr)
	}
}

// TestMastSweepsAntennas: mast --antennas adds a dimension, and the plan's
// own mast section stands otherwise.
func TestMastSweepsAntennas(t *testing.T) {
	out, stderr, code := runCmd(t, "mast", "--plan", demoPlanFile, "--heights", "2m..4m step 1m", "--cables", "RG-8X", "--antennas", "ground-plane,collinear-2", "--format", "json")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	var r plan.MastResult
	if err := json.Unmarshal([]byte(out), &r); err != nil {
		t.Fatal(err)
	}
	if len(r.Rows) != 6 || r.Rows[0].Antenna != "ground-plane" || r.Rows[1].Antenna != "collinear-2" {
		t.Fatalf("rows %+v", r.Rows)
	}
	text, _, _ := runCmd(t, "mast", "--plan", demoPlanFile, "--heights", "2m..4m step 1m", "--cables", "RG-8X", "--antennas", "ground-plane,collinear-2")
	if !strings.Contains(text, "ground-plane RG-8X") || !strings.Contains(text, "collinear-2 RG-8X") {
		t.Errorf("text:\n%s", text)
	}
	if _, stderr, code := runCmd(t, "mast", "--plan", demoPlanFile, "--antennas", "discone"); code != 2 || !strings.Contains(stderr, "--antennas") {
		t.Errorf("unknown antenna: %d %q", code, stderr)
	}
}

// TestRelayCommand: the demo's relays: entry (Team Birch and Team Cedar,
// who cannot hear each other) as text, JSON, GPX and PNG; the JSON's best
// spot checked with `link` itself, both ways on both links.
func TestRelayCommand(t *testing.T) {
	args := []string{"relay", "--plan", demoPlanFile, "--height", "2m", "--radius", "14km", "--spots", "3"}
	out, stderr, code := runCmd(t, append(args, "--format", "json")...)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	var r plan.RelayResult
	if err := json.Unmarshal([]byte(out), &r); err != nil {
		t.Fatal(err)
	}
	if r.A != "Team Birch" || r.B != "Team Cedar" || len(r.Spots) != 3 || !r.MeetsRequirement || r.DirectMarginDB >= 0 {
		t.Fatalf("%+v", r)
	}
	best := r.Spots[0]
	at := strconv.FormatFloat(best.Lat, 'f', 7, 64) + "," + strconv.FormatFloat(best.Lon, 'f', 7, 64)
	for _, party := range []struct {
		name string
		want float64
	}{{"Team Birch, upper Ostral", best.MarginToADB}, {"Team Cedar, lower Ostral", best.MarginToBDB}} {
		worst := math.Inf(1)
		for _, dir := range [][2]string{{at, party.name}, {party.name, at}} {
			lo, _, code := runCmd(t, "link", "--dem", demoTerrain, "--waypoints", demoPoints, "--from", dir[0], "--to", dir[1],
				"--freq", "146.55", "--power", "5W", "--height", "2m", "--to-height", "1.5m", "--rx-sens", "0.25uV", "--format", "json")
			if code != 0 {
				t.Fatalf("link exit %d", code)
			}
			worst = math.Min(worst, decodeJSON(t, lo)["margin_db"].(float64))
		}
		// Heights: the relay at 2 m, the party at 1.5 m either way round.
		if worst < r.NeededMarginDB {
			t.Errorf("%s: link gives %+.2f dB, need %.1f", party.name, worst, r.NeededMarginDB)
		}
		if math.Abs(worst-party.want) > 0.6 {
			t.Errorf("%s: link %+.2f dB, relay reported %+.2f dB", party.name, worst, party.want)
		}
	}

	text, _, _ := runCmd(t, args...)
	for _, want := range []string{"Relay between Team Birch and Team Cedar", "they cannot hear each other", "The best spot meets the requirement", "rank"} {
		if !strings.Contains(text, want) {
			t.Errorf("text lacks %q:\n%s", want, text)
		}
	}
	dir := t.TempDir()
	gpxFile := filepath.Join(dir, "relay.gpx")
	if _, stderr, code := runCmd(t, append(args, "-o", gpxFile)...); code != 0 {
		t.Fatalf("gpx: %d %s", code, stderr)
	}
	g, err := gpx.Read(gpxFile)
	if err != nil {
		t.Fatal(err)
	}
	if len(g.Waypoints) != 5 || g.Waypoints[0].Name != "Relay 1" || math.Abs(g.Waypoints[0].Pos.Lat()-best.Lat) > 1e-9 {
		t.Errorf("gpx waypoints %+v", g.Waypoints)
	}
	pngFile := filepath.Join(dir, "relay.png")
	if _, stderr, code := runCmd(t, append(args, "-o", pngFile)...); code != 0 {
		t.Fatalf("png: %d %s", code, stderr)
	}
	b, err := os.ReadFile(pngFile)
	if err != nil {
		t.Fatal(err)
	}
	if _, err := png.DecodeConfig(bytes.NewReader(b)); err != nil {
		t.Errorf("not a PNG: %v", err)
	}
}

// TestRelayNothingMeets: a requirement no spot can meet gives the best
// there is, and says so.
func TestRelayNothingMeets(t *testing.T) {
	doc, err := os.ReadFile(demoPlanFile)
	if err != nil {
		t.Fatal(err)
	}
	dir := t.TempDir()
	s := strings.Replace(string(doc), "require: {margin: 10dB,", "require: {margin: 150dB,", 1)
	s = strings.ReplaceAll(s, "terrain: ../terrain", "terrain: "+mustAbs(t, demoTerrain))
	s = strings.ReplaceAll(s, "waypoints: points.gpx", "waypoints: "+mustAbs(t, demoPoints))
	s = strings.ReplaceAll(s, "routes: [hike.gpx]", "")
	s = strings.ReplaceAll(s, "sites: [candidates.gpx]", "")
	p := filepath.Join(dir, "plan.yaml")
	if err := os.WriteFile(p, []byte(s), 0o644); err != nil {
		t.Fatal(err)
	}
	out, stderr, code := runCmd(t, "relay", "--plan", p, "--height", "2m", "--radius", "14km", "--spots", "2")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	if !strings.Contains(out, "No spot meets the requirement of 150.0 dB; the best there is") || !strings.Contains(out, "  1 ") {
		t.Errorf("text:\n%s", out)
	}
}

func TestRelayErrors(t *testing.T) {
	cases := []struct {
		args []string
		want string
	}{
		{[]string{"relay", "--plan", demoPlanFile, "--between", "Team Birch"}, "--between and --and go together"},
		{[]string{"relay", "--plan", demoPlanFile, "--between", "Team Birch", "--and", "Nowhere Tarn"}, `--and: "Nowhere Tarn" is not a station or target`},
		{[]string{"relay", "--plan", demoPlanFile, "--height", "tall"}, "--height:"},
		{[]string{"relay", "--plan", demoPlanFile, "--radius", "3km"}, "does not meet in the middle"},
		{[]string{"relay", "--plan", demoPlanFile, "-o", "relay.kml"}, "-o:"},
		{[]string{"relay", "--plan", demoPlanFile, "-o", demoPoints}, "--out"},
		{[]string{"relay", "--plan", demoPlanFile, "--antenna", "discone"}, "--antenna: unknown antenna"},
	}
	for _, c := range cases {
		_, stderr, code := runCmd(t, c.args...)
		if code == 0 || !strings.Contains(stderr, c.want) || strings.Count(strings.TrimSpace(stderr), "\n") > 0 {
			t.Errorf("%v: exit %d, %q; want one line with %q", c.args, code, stderr, c.want)
		}
	}
}

func mustAbs(t *testing.T, p string) string {
	t.Helper()
	a, err := filepath.Abs(p)
	if err != nil {
		t.Fatal(err)
	}
	return a
}

func FuzzParseElementLength(f *testing.F) {
	for _, s := range []string{"468mm", "46.8cm", "18.4in", "0.468m", "1.5ft", "mm", "-3mm", "NaNmm", "1e400mm"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		v, err := parseElementLengthM(s)
		if err == nil && !(v > 0 || v == 0) {
			t.Errorf("%q: %g", s, v)
		}
		if err == nil && (math.IsNaN(v) || math.IsInf(v, 0)) {
			t.Errorf("%q: %g", s, v)
		}
	})
}
