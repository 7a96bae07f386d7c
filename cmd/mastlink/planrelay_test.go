package main

import (
	"encoding/json"
	"os"
	"path/filepath"
	"reflect"
	"strings"
	"testing"
)

// TestPlanRunsRelays: `plan` searches the plan's relays: entries; its JSON
// relays[] holds the spots exactly as `relay --plan` gives them, its text
// the relay section, and plan -o's plan.gpx the spots as waypoints.
func TestPlanRunsRelays(t *testing.T) {
	planOut, stderr, code := runCmd(t, "plan", demoPlanFile, "--format", "json")
	if code != 0 {
		t.Fatalf("plan: exit %d: %s", code, stderr)
	}
	relayOut, stderr, code := runCmd(t, "relay", "--plan", demoPlanFile, "--format", "json")
	if code != 0 {
		t.Fatalf("relay: exit %d: %s", code, stderr)
	}
	var p struct {
		Relays []json.RawMessage `json:"relays"`
	}
	if err := json.Unmarshal([]byte(planOut), &p); err != nil {
		t.Fatal(err)
	}
	if len(p.Relays) != 1 {
		t.Fatalf("%d relays in the plan's JSON, want the demo's one", len(p.Relays))
	}
	var fromPlan, fromRelay any
	_ = json.Unmarshal(p.Relays[0], &fromPlan)
	_ = json.Unmarshal([]byte(relayOut), &fromRelay)
	if !reflect.DeepEqual(fromPlan, fromRelay) {
		t.Errorf("plan's relays[0] differs from relay --plan:\n%s\n%s", p.Relays[0], relayOut)
	}
	spots := fromRelay.(map[string]any)["spots"].([]any)
	if len(spots) == 0 {
		t.Fatal("no spots")
	}

	dir := t.TempDir()
	text, stderr, code := runCmd(t, "plan", demoPlanFile, "-o", dir)
	if code != 0 {
		t.Fatalf("plan -o: exit %d: %s", code, stderr)
	}
	if !strings.Contains(text, "Relay between Team Birch and Team Cedar") {
		t.Error("plan text lacks the relay section")
	}
	b, err := os.ReadFile(filepath.Join(dir, "plan.gpx"))
	if err != nil {
		t.Fatal(err)
	}
	for i := range spots {
		if !strings.Contains(string(b), "<name>Relay "+string(rune('1'+i))+"</name>") {
			t.Errorf("plan.gpx lacks the waypoint Relay %d", i+1)
		}
	}
}

// TestRelayWithITMPlan: with a plan whose model is the Longley–Rice ITM
// the search keeps the radial engine's maps and rechecks the spots with
// the ITM; the JSON and the notes say so.
func TestRelayWithITMPlan(t *testing.T) {
	out, stderr, code := runCmd(t, "relay", "--plan", itmPlanFile, "--between", "Valley Base", "--and", "Corvane Peak repeater",
		"--radius", "6km", "--spots", "2", "--format", "json")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	m := decodeJSON(t, out)
	if m["model"] != "itm" || m["search_model"] != "terrain" {
		t.Errorf("model %v, search_model %v: want itm and terrain", m["model"], m["search_model"])
	}
	notes, _ := json.Marshal(m["notes"])
	if !strings.Contains(string(notes), "rechecked and ranked again with the plan's model (Longley–Rice ITM") {
		t.Errorf("notes %s: want the recheck with the ITM stated", notes)
	}
}
