package main

import (
	"encoding/csv"
	"encoding/json"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/mastlink/mastlink/plan"
	"github.com/mastlink/mastlink/plan/gpx"
	"github.com/mastlink/mastlink/plan/units"
)

const demoPlan = "../../examples/valley/plan.yaml"

// TestPlanDemo runs the README's demo plan and compares the briefing and
// the JSON with the golden files.
func TestPlanDemo(t *testing.T) {
	out, stderr, code := runCmd(t, "plan", demoPlan)
	if code != 0 {
		t.Fatalf("code %d: %s", code, stderr)
	}
	golden(t, "plan-demo.txt", out)
	for _, want := range []string{"talk-in", "talk-out", "Recommended:", "power line", "Cautions:"} {
		if !strings.Contains(out, want) {
			t.Errorf("briefing lacks %q", want)
		}
	}
	js, _, code := runCmd(t, "plan", demoPlan, "--format", "json")
	if code != 0 {
		t.Fatal(code)
	}
	goldenJSON(t, "plan-demo.json", js)
	m := decodeJSON(t, js)
	for _, k := range []string{"stations", "links", "exposure", "mast", "warnings"} {
		if _, ok := m[k]; !ok {
			t.Errorf("JSON lacks %q", k)
		}
	}
	links := m["links"].([]any)
	for _, k := range []string{"from", "to", "direction", "meets_requirement", "distance_m", "azimuth_deg", "model", "free_space_loss_db", "excess_loss_db",
		"path_loss_db", "tx_feedline_loss_db", "rx_feedline_loss_db", "eirp_dbm", "rx_power_dbm", "rx_sensitivity_dbm", "margin_db", "line_of_sight",
		"worst_clearance_f1", "obstacle", "probability"} {
		if _, ok := links[0].(map[string]any)[k]; !ok {
			t.Errorf("link JSON lacks %q", k)
		}
	}
	mast := m["mast"].(map[string]any)
	for _, k := range []string{"rows", "recommended"} {
		if _, ok := mast[k]; !ok {
			t.Errorf("mast JSON lacks %q", k)
		}
	}
}

// TestPlanDirections checks that talk-in runs on the repeater's listen
// frequency with the station's transmitter and the repeater's receiver, and
// talk-out on its transmit frequency the other way round.
func TestPlanDirections(t *testing.T) {
	js, _, code := runCmd(t, "plan", demoPlan, "--format", "json")
	if code != 0 {
		t.Fatal(code)
	}
	var res plan.PlanResult
	if err := json.Unmarshal([]byte(js), &res); err != nil {
		t.Fatal(err)
	}
	p, err := plan.ReadPlan(demoPlan)
	if err != nil {
		t.Fatal(err)
	}
	st, rep := p.Stations[0], p.Targets[0]
	found := 0
	for _, l := range res.Links {
		switch {
		case l.Direction == plan.DirTalkIn && l.To == rep.Name:
			found++
			if l.FreqMHz != rep.ListenMHz || l.From != st.Name || l.RxSensitivityDBm != rep.Radio.SensitivityDBm || l.TxPowerDBm != units.DBmFromW(st.Radio.PowerW) {
				t.Errorf("talk-in: %+v", l)
			}
		case l.Direction == plan.DirTalkOut && l.From == rep.Name:
			found++
			if l.FreqMHz != rep.TransmitMHz || l.To != st.Name || l.RxSensitivityDBm != st.Radio.SensitivityDBm || l.TxPowerDBm != units.DBmFromW(rep.Radio.PowerW) {
				t.Errorf("talk-out: %+v", l)
			}
		}
	}
	if found != 2 {
		t.Errorf("found %d repeater legs, want 2", found)
	}
}

func TestPlanOutputs(t *testing.T) {
	dir := filepath.Join(t.TempDir(), "briefing")
	_, stderr, code := runCmd(t, "plan", demoPlan, "-o", dir)
	if code != 0 {
		t.Fatalf("code %d: %s", code, stderr)
	}
	for _, name := range []string{"links.geojson", "keepout.geojson", "route-1.geojson", "sites.geojson"} {
		b, err := os.ReadFile(filepath.Join(dir, name))
		if err != nil {
			t.Fatal(err)
		}
		var fc struct {
			Type     string
			Features []json.RawMessage
		}
		if err := json.Unmarshal(b, &fc); err != nil || fc.Type != "FeatureCollection" || len(fc.Features) == 0 {
			t.Errorf("%s: %v %+v", name, err, fc.Type)
		}
	}
	g, err := gpx.Read(filepath.Join(dir, "plan.gpx"))
	if err != nil {
		t.Fatal(err)
	}
	// six places of the plan, then the five spots of its relay
	if len(g.Waypoints) != 11 || !strings.Contains(g.Waypoints[1].Description, "worst margin") || g.Waypoints[6].Name != "Relay 1" || g.Waypoints[0].Time.Location().String() != "UTC" {
		t.Errorf("plan.gpx waypoints: %+v", g.Waypoints)
	}
	f, err := os.Open(filepath.Join(dir, "links.csv"))
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	rows, err := csv.NewReader(f).ReadAll()
	if err != nil || len(rows) != 11 || rows[0][0] != "from" {
		t.Errorf("links.csv: %v, %d rows", err, len(rows))
	}
	// An output must never go over an input: -o naming a file is refused.
	_, stderr, code = runCmd(t, "plan", demoPlan, "-o", demoPlan)
	if code != 2 || !strings.Contains(stderr, "give a directory") {
		t.Errorf("-o over the plan: code %d, %q", code, stderr)
	}
}

// TestPlanErrors: broken plan files give exit code 1 and one line naming
// the file and line.
func TestPlanErrors(t *testing.T) {
	dir := t.TempDir()
	write := func(name, body string) string {
		p := filepath.Join(dir, name)
		if err := os.WriteFile(p, []byte(body), 0o644); err != nil {
			t.Fatal(err)
		}
		return p
	}
	wp, _ := filepath.Abs("../../examples/valley/points.gpx")
	good := "waypoints: " + wp + "\nfrequency: 146.55MHz\nstations:\n  - name: base\n    at: Ostral Bend\n    radio: {power: 25W, sensitivity: 0.25uV}\n" +
		"targets:\n  - name: Team Alder\n    at: Team Alder, Quillet Glen\n    radio: {power: 5W, sensitivity: 0.25uV}\n"
	cases := []struct{ name, body, want string }{
		{"bad yaml", "stations: [\n", "bad.yaml:"},
		{"unknown cable", strings.Replace(good, "    radio: {power: 25W", "    feedline: {cable: RG-59X, length: 5m}\n    radio: {power: 25W", 1), `unknown cable "RG-59X"`},
		{"unknown waypoint", strings.Replace(good, "Ostral Bend", "Marowind Bend", 1), `closest: "Ostral Bend"`},
		{"power unit", strings.Replace(good, "25W", "25 watts", 1), `unknown unit "watts"`},
		{"empty", "", "the plan is empty"},
		{"missing gpx", strings.Replace(good, wp, "nosuch.gpx", 1), "waypoints:"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			path := write("bad.yaml", c.body)
			_, stderr, code := runCmd(t, "plan", path)
			if code != 1 {
				t.Errorf("exit code %d, want 1", code)
			}
			if !strings.Contains(stderr, path) || !strings.Contains(stderr, c.want) || strings.Count(strings.TrimSpace(stderr), "\n") != 0 {
				t.Errorf("stderr %q, want one line naming %s with %q", stderr, path, c.want)
			}
		})
	}
	_, stderr, code := runCmd(t, "plan", filepath.Join(dir, "nosuch.yaml"))
	if code != 1 || !strings.Contains(stderr, "nosuch.yaml") {
		t.Errorf("missing plan: %d %q", code, stderr)
	}
}

func TestMastCommand(t *testing.T) {
	out, stderr, code := runCmd(t, "mast", "--plan", demoPlan, "--format", "json")
	if code != 0 {
		t.Fatal(stderr)
	}
	m := decodeJSON(t, out)
	rows := m["rows"].([]any)
	if len(rows) != 11*4 {
		t.Errorf("%d rows, want 44", len(rows))
	}
	for _, k := range []string{"height_m", "cable", "cable_length_m", "worst_margin_db", "meets_requirement"} {
		if _, ok := rows[0].(map[string]any)[k]; !ok {
			t.Errorf("row lacks %q", k)
		}
	}
	rec := m["recommended"].(map[string]any)
	if rec["height_m"].(float64) <= 0 {
		t.Errorf("recommended %v", rec)
	}
	// Nothing meets an impossible margin: recommended is null, closest given.
	out, _, code = runCmd(t, "mast", "--plan", demoPlan, "--margin", "90dB", "--format", "json")
	if code != 0 {
		t.Fatal(code)
	}
	m = decodeJSON(t, out)
	if m["recommended"] != nil || m["closest"] == nil {
		t.Errorf("impossible margin: recommended %v closest %v", m["recommended"], m["closest"])
	}
	txt, _, _ := runCmd(t, "mast", "--plan", demoPlan, "--margin", "90dB")
	if !strings.Contains(txt, "Nothing in the sweep meets the requirement") {
		t.Errorf("text: %s", txt)
	}
}
