package plan

import (
	"context"
	"errors"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/mastlink/mastlink/plan/exposure"
	"github.com/mastlink/mastlink/plan/feedline"
	"github.com/mastlink/mastlink/plan/gpx"
	"github.com/mastlink/mastlink/plan/units"
	"github.com/mastlink/mastlink/propagation"
)

const examplePlan = "../examples/valley/plan.yaml"

func TestReadExamplePlan(t *testing.T) {
	p, err := ReadPlan(examplePlan)
	if err != nil {
		t.Fatal(err)
	}
	if len(p.Stations) != 1 || len(p.Targets) != 5 {
		t.Fatalf("stations %d, targets %d", len(p.Stations), len(p.Targets))
	}
	st := p.Stations[0]
	if st.Name != "Valley Base" || st.Antenna.HeightM != 9 || st.Feedline.Cable.Name != "RG-8X" || st.Feedline.Connectors != 2 {
		t.Errorf("station = %+v", st)
	}
	// 0.25 µV across 50 Ω = −119.0 dBm (P = V²/R, computed).
	if math.Abs(st.Radio.SensitivityDBm-(-119.04)) > 0.01 {
		t.Errorf("sensitivity %v dBm", st.Radio.SensitivityDBm)
	}
	rep := p.Targets[0]
	if rep.Kind != Repeater || rep.ListenMHz != 147.78 || rep.TransmitMHz != 147.18 {
		t.Errorf("repeater = %+v", rep)
	}
	if alder := p.Targets[1]; alder.Kind != Simplex || alder.FreqMHz != 146.55 || alder.Radio.PowerW != 5 || alder.Antenna.HeightM != 1.5 {
		t.Errorf("defaults not applied: %+v", alder)
	}
	if !p.Targets[4].Optional {
		t.Errorf("hut should be optional")
	}
	// σ 5.5 dB and 90 % need 7.05 dB (ITU-R P.1812-8 eq. 69, computed); the 10 dB margin is larger.
	if got := p.Require.NeededMarginDB(); got != 10 {
		t.Errorf("needed margin %v", got)
	}
	if p.Mast == nil || len(p.Mast.Cables) != 4 || p.Mast.Heights.Len() != 11 || p.Mast.RunM != 10 {
		t.Errorf("mast = %+v", p.Mast)
	}
}

// TestPlanRadioClimate: the model, polarization, ground and k of a plan
// file arrive in the link environment as propagation's own values.
func TestPlanRadioClimate(t *testing.T) {
	doc := "model: Free-Space\npolarization: horizontal\nground: sea\nk: 1\nstations: [{name: a, at: '1,2', radio: {power: 5W, sensitivity: -120dBm}}]\n" +
		"targets: [{name: b, at: '1.1,2', frequency: 146, radio: {power: 5W, sensitivity: -120dBm}}]\n"
	p, err := ParsePlan([]byte(doc), "plan.yaml")
	if err != nil {
		t.Fatal(err)
	}
	env := p.NewEnv(nil)
	if _, ok := env.Model.(propagation.FreeSpace); !ok || env.Polarization != propagation.Horizontal || env.Ground != propagation.Sea || env.K != 1 {
		t.Errorf("env = %+v", env)
	}
	res, err := EvaluatePlan(context.Background(), p, env, nil)
	if err != nil {
		t.Fatal(err)
	}
	for _, l := range res.Links {
		if l.Model != "free-space" || l.ExcessLossDB != 0 {
			t.Errorf("%s → %s ran %q with %v dB excess, want free space", l.From, l.To, l.Model, l.ExcessLossDB)
		}
	}
	// Without those fields: the terrain model, vertical, land, k = 4/3
	// (ITU-R P.530-19 §2.2).
	q, err := ParsePlan([]byte(doc[strings.Index(doc, "stations:"):]), "plan.yaml")
	if err != nil {
		t.Fatal(err)
	}
	if _, ok := q.Model.(propagation.Terrain); !ok || q.Polarization != propagation.Vertical || q.Ground != propagation.Land || q.K != 4.0/3 {
		t.Errorf("defaults: %+v", q)
	}
}

func TestRequirementReliability(t *testing.T) {
	// ITU-R P.1812-8 eq. 69 with σ = 8 dB: 90 % needs 10.25 dB, 95 % 13.16 dB
	// (computed from the published formula).
	r := Requirement{MarginDB: 3, Reliability: 0.95, SigmaDB: 8}
	if got := r.NeededMarginDB(); math.Abs(got-13.16) > 0.01 {
		t.Errorf("needed margin %v, want 13.16", got)
	}
}

// TestBrokenPlans: each broken plan gives one clear error naming the file,
// the line and the field.
func TestBrokenPlans(t *testing.T) {
	base := func(s string) string {
		return "waypoints: " + absExample("points.gpx") + "\nfrequency: 146.55MHz\n" + s
	}
	station := `stations:
  - name: base
    at: Wethermoss Saddle
    radio: {power: 25W, sensitivity: 0.25uV}
    antenna: {gain: 2.15dBi, height: 9m}
`
	target := "targets:\n  - name: Team Alder\n    at: Team Alder, Quillet Glen\n    radio: {power: 5W, sensitivity: 0.25uV}\n"
	cases := []struct {
		name, doc, want string
		sentinel        error
	}{
		{"bad yaml", "stations: [\n  - name: x\n", "plan.yaml:", nil},
		{"empty", "", "plan.yaml: the plan is empty", nil},
		{"unknown field", base(station + "  - name: x\n    colour: red\n"), "plan.yaml:9: stations[1].colour: unknown field", nil},
		{"unknown cable", base(strings.Replace(station, "    antenna:", "    feedline: {cable: RG-59X, length: 10m}\n    antenna:", 1) + target), `plan.yaml:7: stations[0].feedline.cable: unknown cable "RG-59X" (known: RG-174`, feedline.ErrUnknownCable},
		{"unknown waypoint", base(strings.Replace(station, "Wethermoss Saddle", "Wethermos Sadle", 1) + target), `plan.yaml:5: stations[0].at: unknown waypoint "Wethermos Sadle"`, gpx.ErrUnknownWaypoint},
		{"negative height", base(strings.Replace(station, "height: 9m", "height: -9m", 1) + target), "plan.yaml:7: stations[0].antenna.height:", units.ErrRange},
		{"power unit", base(strings.Replace(station, "power: 25W", "power: 25 watts", 1) + target), `plan.yaml:6: stations[0].radio.power: "25 watts": unknown unit`, units.ErrUnit},
		{"frequency range", "frequency: 146.55THz\n" + station, "plan.yaml:1: frequency:", nil},
		{"target without radio", base(station + "targets:\n  - name: Team Alder\n    at: Team Alder, Quillet Glen\n"), "plan.yaml:9: targets[0].radio: missing: give radio:", nil},
		{"target radio from defaults", base("defaults: {radio: {power: 5W, sensitivity: 0.25uV}}\n" + station + "targets:\n  - name: Team Alder\n    at: Team Alder, Quillet Glen\n"), "", nil},
		{"missing gpx", "waypoints: nosuch.gpx\n" + station, "plan.yaml:1: waypoints:", nil},
		{"no stations", base(target), "plan.yaml:1: stations: the plan needs at least one station", nil},
		{"no targets", base(station), "the plan has no targets", nil},
		{"repeater half", base(station + "targets:\n  - name: r\n    at: Corvane Peak\n    radio: {power: 50W, sensitivity: -122dBm}\n    listen: 147.78MHz\n"), "plan.yaml:9: targets[0]: a repeater needs both listen and transmit", nil},
		{"bad mast", base(station + target + "mast: {heights: 12m..2m step 1m, cables: [RG-58]}\n"), "plan.yaml:12: mast.heights:", units.ErrRange},
		{"keep-out limit", base(station + target + "mast: {heights: 2m..12m step 1m, cables: [RG-58], keepout_limit: 3m}\n"), "", nil},
		{"keep-out limit zero", base(station + target + "mast: {heights: 2m..12m step 1m, cables: [RG-58], keepout_limit: 0m}\n"), "plan.yaml:12: mast.keepout_limit: give the clear space", nil},
		// The model comes from the propagation registry, whose names the error lists.
		{"unknown model", base("model: okumura\n" + station + target), `plan.yaml:3: model: propagation: unknown model "okumura" (known: terrain, free-space`, propagation.ErrUnknownModel},
		{"bad polarization", base("polarization: circular\n" + station + target), `plan.yaml:3: polarization: "circular" is not vertical or horizontal`, nil},
		{"bad ground", base("ground: swamp\n" + station + target), `plan.yaml:3: ground: "swamp" is not land or sea`, nil},
		{"bad k", base("k: 20\n" + station + target), `plan.yaml:3: k: "20": k-factor 20 is outside 0.5 to 10`, units.ErrRange},
		{"reliability 100 %", base("require: {margin: 10dB, reliability: 100%}\n" + station + target), "plan.yaml:3: require.reliability: must be above 0% and below 100%", nil},
		{"sigma 0 with a reliability", base("require: {reliability: 90%, sigma: 0dB}\n" + station + target), "plan.yaml:3: require.sigma: must be more than 0 dB with a reliability", nil},
		{"exposure mode", base(strings.Replace(station, "    antenna:", "    exposure: {mode: am}\n    antenna:", 1) + target), `plan.yaml:7: stations[0].exposure.mode: invalid exposure input: unknown mode "am"`, exposure.ErrInput},
		{"coverage without radius", base(strings.Replace(station, "    antenna:", "    coverage: {mode: los}\n    antenna:", 1) + target), "plan.yaml:7: stations[0].coverage.radius: missing: give the radius", nil},
		{"coverage radius 0", base(strings.Replace(station, "    antenna:", "    coverage: {radius: 0m}\n    antenna:", 1) + target), "plan.yaml:7: stations[0].coverage.radius: give a radius above 0 m", nil},
		{"coverage mode", base(strings.Replace(station, "    antenna:", "    coverage: {radius: 5km, mode: sight}\n    antenna:", 1) + target), `plan.yaml:7: stations[0].coverage.mode: "sight" is not a mode`, nil},
		{"coverage value", base(strings.Replace(station, "    antenna:", "    coverage: {radius: 5km, value: snr}\n    antenna:", 1) + target), `plan.yaml:7: stations[0].coverage.value: "snr" is not a value`, nil},
		{"coverage los value", base(strings.Replace(station, "    antenna:", "    coverage: {radius: 5km, mode: los, value: margin}\n    antenna:", 1) + target), "plan.yaml:7: stations[0].coverage.value: a line-of-sight map", nil},
		{"coverage levels order", base(strings.Replace(station, "    antenna:", "    coverage:\n      radius: 5km\n      levels: [10dB, 0dB]\n    antenna:", 1) + target), "plan.yaml:9: stations[0].coverage.levels: levels 10 and 0 are not ascending", nil},
		{"coverage level word", base(strings.Replace(station, "    antenna:", "    coverage: {radius: 5km, levels: [0, lots]}\n    antenna:", 1) + target), `plan.yaml:7: stations[0].coverage.levels: "lots" is not a level`, nil},
		{"coverage resolution", base(strings.Replace(station, "    antenna:", "    coverage: {radius: 5km, resolution: -30m}\n    antenna:", 1) + target), "plan.yaml:7: stations[0].coverage.resolution:", nil},
		{"coverage unknown", base(strings.Replace(station, "    antenna:", "    coverage: {radius: 5km, colour: red}\n    antenna:", 1) + target), "plan.yaml:7: stations[0].coverage.colour: unknown field", nil},
		{"coverage ok", base(strings.Replace(station, "    antenna:", "    coverage: {radius: 5km, mode: loss, value: received, levels: [-110dBm, -100dBm], resolution: 90m}\n    antenna:", 1) + target), "", nil},
		{"exposure cycle half", base(strings.Replace(station, "    antenna:", "    exposure: {on: 2min}\n    antenna:", 1) + target), `plan.yaml:7: stations[0].exposure.off: invalid exposure input: on and off go together`, exposure.ErrInput},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			_, err := ParsePlan([]byte(c.doc), "plan.yaml")
			if c.want == "" { // the case must parse (a target may inherit a radio)
				if err != nil {
					t.Fatalf("unexpected error: %v", err)
				}
				return
			}
			if err == nil {
				t.Fatalf("no error, want %q", c.want)
			}
			if !errors.Is(err, ErrPlanFile) {
				t.Errorf("error does not wrap ErrPlanFile: %v", err)
			}
			if c.sentinel != nil && !errors.Is(err, c.sentinel) {
				t.Errorf("error does not wrap %v: %v", c.sentinel, err)
			}
			if !strings.HasPrefix(err.Error(), "plan.yaml") || !strings.Contains(err.Error(), c.want) {
				t.Errorf("error %q does not contain %q", err, c.want)
			}
			if strings.Contains(err.Error(), "\n") {
				t.Errorf("error is not one line: %q", err)
			}
		})
	}
}

func absExample(name string) string {
	p, _ := filepath.Abs(filepath.Join("../examples/valley", name))
	return p
}

func FuzzParsePlan(f *testing.F) {
	if b, err := os.ReadFile(examplePlan); err == nil {
		f.Add(string(b))
	}
	f.Add("stations: [{name: a, at: '1,2'}]\ntargets: [{name: b, at: '1.1,2', frequency: 146}]\n")
	f.Add("name: [\n")
	f.Add("date: 2025-06-14 07:30\ntimezone: Europe/Oslo\narea: x\nbriefing: a.html\nstations: [{name: a, at: '1,2'}]\ntargets: [{name: b, at: '1.1,2', frequency: 146}]\n")
	f.Add("stations:\n  - &a {name: x}\n  - *a\n")
	f.Fuzz(func(t *testing.T, doc string) {
		_, err := ParsePlan([]byte(doc), filepath.Join("..", "examples", "valley", "fuzz.yaml"))
		if err != nil && !errors.Is(err, ErrPlanFile) {
			t.Fatalf("error does not wrap ErrPlanFile: %v", err)
		}
	})
}

// TestPlanCoverageSpec reads a station's coverage: section back field by
// field (invented values).
func TestPlanCoverageSpec(t *testing.T) {
	doc := "waypoints: " + absExample("points.gpx") + `
frequency: 146.55MHz
stations:
  - name: base
    at: Wethermoss Saddle
    radio: {power: 25W, sensitivity: 0.25uV}
    coverage:
      radius: 1.5km
      value: received
      levels: [-110dBm, -100, -90dBm]
      resolution: 50m
  - name: post
    at: Corvane Peak
    radio: {power: 5W, sensitivity: 0.25uV}
    coverage: {radius: 2mi, mode: los}
targets:
  - name: Team Alder
    at: Team Alder, Quillet Glen
    radio: {power: 5W, sensitivity: 0.25uV}
`
	p, err := ParsePlan([]byte(doc), "plan.yaml")
	if err != nil {
		t.Fatal(err)
	}
	a, b := p.Stations[0].Coverage, p.Stations[1].Coverage
	if a == nil || b == nil {
		t.Fatalf("coverage not read: %+v %+v", a, b)
	}
	if a.RadiusM != 1500 || a.Mode != CoverageLoss || !a.HasValue || a.Value != ValueReceived || a.ResolutionM != 50 || a.Line != 8 {
		t.Errorf("base coverage %+v", a)
	}
	if len(a.Levels) != 3 || a.Levels[0] != -110 || a.Levels[1] != -100 || a.Levels[2] != -90 {
		t.Errorf("base levels %v", a.Levels)
	}
	// 2 mi = 3218.688 m (international mile, 1609.344 m; NIST SP 811 B.8).
	if math.Abs(b.RadiusM-3218.688) > 1e-9 || b.Mode != CoverageLOS || b.HasValue {
		t.Errorf("post coverage %+v", b)
	}
}
