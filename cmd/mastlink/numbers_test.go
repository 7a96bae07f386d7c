package main

import (
	"fmt"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"
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
