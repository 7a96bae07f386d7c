package plan

import (
	"errors"
	"strings"
	"testing"

	"github.com/mastlink/mastlink/plan/antenna"
	"github.com/mastlink/mastlink/propagation"
)

// TestPlanKitFields: antenna types, bearings, body loss, clutter, a mast
// sweep of antennas, roads and relays, as a plan file gives them.
func TestPlanKitFields(t *testing.T) {
	doc := "waypoints: " + absExample("points.gpx") + `
frequency: 146.55MHz
defaults:
  radio: {power: 5W, sensitivity: 0.25uV}
  antenna: handheld-whip
  clutter: forest
stations:
  - name: base
    at: Wethermoss Saddle
    radio: {power: 25W, sensitivity: 0.25uV}
    antenna: {type: yagi-5el-2m, bearing: 300, gain: 9dBi, height: 6m}
targets:
  - name: Team Alder
    at: Team Alder, Quillet Glen
    body_loss: belt
  - name: Team Birch
    at: Team Birch, upper Ostral
    antenna: {type: collinear-2, height: 4m}
    clutter: open
mast: {heights: 2m..4m step 1m, cables: [RG-58], antennas: [ground-plane, collinear-2]}
roads: ` + absExample("hike.gpx") + `
relays:
  - {between: Team Alder, and: base, height: 2m..6m step 2m, radius: 12km, frequency_b: 446.1MHz}
`
	p, err := ParsePlan([]byte(doc), "plan.yaml")
	if err != nil {
		t.Fatal(err)
	}
	st := p.Stations[0].Antenna
	if st.Name() != "yagi-5el-2m" || st.GainDBi != 9 || !st.Aimed || st.BearingDeg != 300 || st.HeightM != 6 || st.BodyLossDB != 0 {
		t.Errorf("station antenna %+v", st)
	}
	alder := p.Targets[0].Antenna
	if alder.Name() != "handheld-whip" || alder.BodyLossDB != antenna.BodyLossBeltDB || alder.Clutter != propagation.TreesForest || alder.HeightM != 1.5 {
		t.Errorf("Team Alder (defaults, belt): %+v", alder)
	}
	birch := p.Targets[1].Antenna
	if birch.Name() != "collinear-2" || birch.BodyLossDB != 0 || birch.Clutter != propagation.OpenRural || birch.HeightM != 4 {
		t.Errorf("Team Birch: %+v", birch)
	}
	if d := p.Defaults.Antenna; d.BodyLossDB != antenna.BodyLossFaceDB || !strings.Contains(d.BodyLoss, "typical") {
		t.Errorf("defaults: a handheld type takes the typical face loss: %+v", d)
	}
	if len(p.Mast.Antennas) != 2 || p.Mast.Antennas[1].Name != "collinear-2" {
		t.Errorf("mast antennas %+v", p.Mast.Antennas)
	}
	if len(p.Roads) != 1 || len(p.Relays) != 1 {
		t.Fatalf("roads %v, relays %+v", p.Roads, p.Relays)
	}
	r := p.Relays[0]
	if r.Between != "Team Alder" || r.And != "base" || len(r.HeightsM) != 3 || r.RadiusM != 12000 || r.FreqBMHz != 446.1 || r.FreqAMHz != 0 {
		t.Errorf("relay %+v", r)
	}
}

func TestBrokenPlanKit(t *testing.T) {
	base := "waypoints: " + absExample("points.gpx") + "\nfrequency: 146.55MHz\nstations:\n  - name: base\n    at: Wethermoss Saddle\n    radio: {power: 25W, sensitivity: 0.25uV}\n"
	target := "targets:\n  - name: Team Alder\n    at: Team Alder, Quillet Glen\n    radio: {power: 5W, sensitivity: 0.25uV}\n"
	cases := []struct {
		name, doc, want string
		sentinel        error
	}{
		{"unknown antenna", base + "    antenna: {type: yagi-11el}\n" + target, `plan.yaml:7: stations[0].antenna.type: unknown antenna "yagi-11el"`, antenna.ErrUnknownAntenna},
		{"bad bearing", base + "    antenna: {type: yagi-3el-2m, bearing: 400}\n" + target, `plan.yaml:7: stations[0].antenna.bearing: "400" is not a bearing`, nil},
		{"bad body loss", base + "    body_loss: pocket\n" + target, `plan.yaml:7: stations[0].body_loss: "pocket": give face, belt, none`, nil},
		{"bad clutter", base + target + "    clutter: jungle\n", `plan.yaml:11: targets[0].clutter: propagation: unknown clutter class "jungle"`, propagation.ErrUnknownClutterClass},
		{"mast antenna", base + target + "mast: {heights: 2m..4m step 1m, cables: [RG-58], antennas: [discone]}\n", `plan.yaml:11: mast.antennas[0]: unknown antenna "discone"`, antenna.ErrUnknownAntenna},
		{"relay half", base + target + "relays: [{between: base}]\n", "plan.yaml:11: relays[0].and: missing", nil},
		{"relay height", base + target + "relays: [{between: base, and: Team Alder, height: tall}]\n", "plan.yaml:11: relays[0].height:", nil},
		{"road file", base + target + "roads: nosuch.gpx\n", "plan.yaml:11: roads:", nil},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			_, err := ParsePlan([]byte(c.doc), "plan.yaml")
			if err == nil {
				t.Fatalf("no error, want %q", c.want)
			}
			if !errors.Is(err, ErrPlanFile) || (c.sentinel != nil && !errors.Is(err, c.sentinel)) {
				t.Errorf("error %v does not wrap ErrPlanFile and %v", err, c.sentinel)
			}
			if !strings.Contains(err.Error(), c.want) || strings.Contains(err.Error(), "\n") {
				t.Errorf("error %q, want one line containing %q", err, c.want)
			}
		})
	}
}
