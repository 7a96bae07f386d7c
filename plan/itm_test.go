package plan

import (
	"context"
	"errors"
	"math"
	"strings"
	"testing"

	"github.com/mastlink/mastlink/plan/units"
	"github.com/mastlink/mastlink/propagation"
)

// TestITMOptions: the text settings arrive in propagation.ITM in its own
// units (per cent, N-units, S/m), and every bad value is refused naming
// its option. Ranges: Hufford 1995 (ITM 1.2.2 input checks: N0 250–400,
// Ns 150–400, ε ≥ 1, σ > 0, percentages strictly between 0 and 100).
func TestITMOptions(t *testing.T) {
	cases := []struct {
		name string
		o    ITMOptions
		want propagation.ITM
		key  string // option named by the error; "" for success
	}{
		{"empty", ITMOptions{}, propagation.ITM{}, ""},
		{"climate by number", ITMOptions{Climate: "4"}, propagation.ITM{Climate: propagation.ITMDesert}, ""},
		{"climate by name", ITMOptions{Climate: "Maritime temperate land"}, propagation.ITM{Climate: propagation.ITMMaritimeTemperateOnLand}, ""},
		{"N0", ITMOptions{Refractivity: "320"}, propagation.ITM{N0: 320}, ""},
		{"Ns", ITMOptions{SurfaceRefractivity: "250"}, propagation.ITM{Ns: 250}, ""},
		// Sea water ε 80, σ 5 S/m (ITU-R P.527-6 Figure 1 at VHF, from memory);
		// the other field keeps average ground (NTIA Report 82-100).
		{"sea water", ITMOptions{Permittivity: "80", Conductivity: "5S/m"}, propagation.ITM{Ground: propagation.Ground{Permittivity: 80, ConductivitySM: 5}}, ""},
		{"conductivity alone", ITMOptions{Conductivity: "10mS/m"}, propagation.ITM{Ground: propagation.Ground{Permittivity: 15, ConductivitySM: 0.01}}, ""},
		{"variability", ITMOptions{Variability: "broadcast", Time: "90%", Location: "0.8", Situation: "95%"},
			propagation.ITM{Variability: propagation.ITMBroadcast, TimePct: 90, LocationPct: 80, SituationPct: 95}, ""},
		{"confidence", ITMOptions{Confidence: "90%"}, propagation.ITM{ConfidencePct: 90}, ""},
		{"switches", ITMOptions{NoLocationVariability: true, NoSituationVariability: true}, propagation.ITM{LocationEliminated: true, SituationEliminated: true}, ""},
		{"climate 8", ITMOptions{Climate: "8"}, propagation.ITM{}, ITMOptClimate},
		{"climate name", ITMOptions{Climate: "tropical"}, propagation.ITM{}, ITMOptClimate},
		{"N0 and Ns", ITMOptions{Refractivity: "301", SurfaceRefractivity: "280"}, propagation.ITM{}, ITMOptSurfaceRefractivity},
		{"N0 low", ITMOptions{Refractivity: "200"}, propagation.ITM{}, ITMOptRefractivity},
		{"N0 text", ITMOptions{Refractivity: "lots"}, propagation.ITM{}, ITMOptRefractivity},
		{"Ns high", ITMOptions{SurfaceRefractivity: "450"}, propagation.ITM{}, ITMOptSurfaceRefractivity},
		{"permittivity", ITMOptions{Permittivity: "0.5"}, propagation.ITM{}, ITMOptPermittivity},
		{"conductivity 0", ITMOptions{Conductivity: "0"}, propagation.ITM{}, ITMOptConductivity},
		{"conductivity unit", ITMOptions{Conductivity: "5 mho"}, propagation.ITM{}, ITMOptConductivity},
		{"variability", ITMOptions{Variability: "sometimes"}, propagation.ITM{}, ITMOptVariability},
		{"time 100 %", ITMOptions{Time: "100%"}, propagation.ITM{}, ITMOptTime},
		{"location bare 90", ITMOptions{Location: "90"}, propagation.ITM{}, ITMOptLocation},
		{"situation 0", ITMOptions{Situation: "0%"}, propagation.ITM{}, ITMOptSituation},
		{"confidence with time", ITMOptions{Time: "90%", Confidence: "90%"}, propagation.ITM{}, ITMOptConfidence},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			var m propagation.ITM
			err := c.o.Apply(&m)
			if c.key == "" {
				if err != nil {
					t.Fatalf("unexpected error %v", err)
				}
				if m != c.want {
					t.Errorf("got %+v, want %+v", m, c.want)
				}
				return
			}
			var oe *units.OptionError
			if !errors.As(err, &oe) || oe.Option != c.key {
				t.Fatalf("error %v, want an OptionError for %q", err, c.key)
			}
			if m != (propagation.ITM{}) {
				t.Errorf("model changed on error: %+v", m)
			}
			if strings.Contains(err.Error(), "\n") || strings.Contains(err.Error(), "bad parameters") {
				t.Errorf("error not one plain line: %q", err)
			}
		})
	}
}

// TestITMRequirement: with the ITM a requirement's reliability becomes the
// model's and no σ margin is added (the loss is already the loss at that
// reliability); other models keep ITU-R P.1812-8 eq. 69.
func TestITMRequirement(t *testing.T) {
	r := Requirement{MarginDB: 3, Reliability: 0.9, SigmaDB: 8}
	// Terrain: σ 8 dB at 90 % needs 10.25 dB (ITU-R P.1812-8 eq. 69, computed).
	m, err := ITMRequirement(propagation.Terrain{}, &r)
	if err != nil || r.ByModel || math.Abs(r.NeededMarginDB()-10.25) > 0.01 {
		t.Fatalf("terrain: %v, %+v, needs %v", err, r, r.NeededMarginDB())
	}
	if _, ok := m.(propagation.Terrain); !ok {
		t.Errorf("model changed: %v", m)
	}
	m, err = ITMRequirement(propagation.ITM{ConfidencePct: 80}, &r)
	if err != nil {
		t.Fatal(err)
	}
	itm := m.(propagation.ITM)
	if itm.ReliabilityPct != 90 || itm.ConfidencePct != 80 || !r.ByModel || r.NeededMarginDB() != 3 {
		t.Errorf("itm %+v, requirement %+v needs %v", itm, r, r.NeededMarginDB())
	}
	r = Requirement{Reliability: 0.9, SigmaDB: 5.5}
	_, err = ITMRequirement(propagation.ITM{TimePct: 95}, &r)
	var oe *units.OptionError
	if !errors.As(err, &oe) || oe.Option != "reliability" {
		t.Errorf("time with a reliability: error %v", err)
	}
}

// TestParseConductivity: S/m and mS/m; average ground 0.005 S/m (NTIA
// Report 82-100); refused outside (0, 100] S/m.
func TestParseConductivity(t *testing.T) {
	for _, c := range []struct {
		in   string
		want float64
		ok   bool
	}{{"0.005", 0.005, true}, {"5mS/m", 0.005, true}, {" 5 S/m ", 5, true}, {"0.03s/m", 0.03, true},
		{"0", 0, false}, {"-1", 0, false}, {"NaN", 0, false}, {"1e3", 0, false}, {"S/m", 0, false}, {"", 0, false}} {
		got, err := ParseConductivitySM(c.in)
		if (err == nil) != c.ok || (c.ok && math.Abs(got-c.want) > 1e-15) {
			t.Errorf("ParseConductivitySM(%q) = %v, %v", c.in, got, err)
		}
	}
}

// TestPlanITM: model: itm with its itm: section reaches the link
// environment; the links carry the model's intermediate values and the
// settings, and their loss is propagation.ITM's at the requirement's
// reliability on the same profile.
func TestPlanITM(t *testing.T) {
	doc := "model: itm\nrequire: {margin: 10dB, reliability: 90%}\npolarization: horizontal\n" +
		"itm: {climate: maritime-temperate-land, refractivity: 320, permittivity: 25, conductivity: 0.02, variability: accidental, confidence: 80%, situation_variability: no}\n" +
		"stations: [{name: a, at: '1,2', radio: {power: 5W, sensitivity: -120dBm}, antenna: {height: 10m}}]\n" +
		"targets: [{name: b, at: '1.1,2.05', frequency: 146, radio: {power: 5W, sensitivity: -120dBm}}]\n"
	p, err := ParsePlan([]byte(doc), "plan.yaml")
	if err != nil {
		t.Fatal(err)
	}
	want := propagation.ITM{Climate: propagation.ITMMaritimeTemperateOnLand, N0: 320, Ground: propagation.Ground{Permittivity: 25, ConductivitySM: 0.02},
		Polarization: propagation.Horizontal, Variability: propagation.ITMAccidental, SituationEliminated: true, ReliabilityPct: 90, ConfidencePct: 80}
	if p.Model != want {
		t.Fatalf("model %+v, want %+v", p.Model, want)
	}
	if !p.Require.ByModel || p.Require.NeededMarginDB() != 10 {
		t.Errorf("requirement %+v", p.Require)
	}
	env := p.NewEnv(nil)
	if env.SigmaDB != 0 {
		t.Errorf("σ %v with the ITM, want none", env.SigmaDB)
	}
	res, err := EvaluatePlan(context.Background(), p, env, nil)
	if err != nil {
		t.Fatal(err)
	}
	g := &Geometry{}
	if err := env.Measure(p.Stations[0].Pos, p.Targets[0].Pos, g); err != nil {
		t.Fatal(err)
	}
	direct, err := want.Loss(g.path, propagation.Params{FreqMHz: 146, TxHeightM: 10, RxHeightM: 1.5})
	if err != nil {
		t.Fatal(err)
	}
	for _, l := range res.Links {
		if l.Model != "itm" || l.ITM == nil || l.Probability != nil {
			t.Fatalf("%s: model %q, itm %v, probability %v", l.Direction, l.Model, l.ITM, l.Probability)
		}
		if math.Abs(l.PathLossDB-direct.PathLossDB) > 1e-9 {
			t.Errorf("%s: path loss %v, propagation.ITM %v", l.Direction, l.PathLossDB, direct.PathLossDB)
		}
		r := l.ITM
		if r.Climate != "maritime-temperate-land" || *r.RefractivityN0 != 320 || r.Permittivity != 25 || r.ConductivitySPerM != 0.02 ||
			r.Polarization != "horizontal" || r.Variability != "accidental" || r.SituationVariability || !r.LocationVariability ||
			*r.ReliabilityPct != 90 || *r.ConfidencePct != 80 || r.TimePct != nil {
			t.Errorf("%s: settings %+v", l.Direction, r)
		}
		// Over a smooth earth at sea level Δh is 0 (Hufford 1995, dlthx).
		if r.DeltaHM != 0 || r.Mode == "" || r.SurfaceRefractivityN != direct.ITM.SurfaceRefractivityN {
			t.Errorf("%s: terms %+v", l.Direction, r)
		}
	}
	// The back direction reports the terminals the other way round.
	out, back := res.Links[0].ITM, res.Links[1].ITM
	if out.EffectiveHeightTxM != back.EffectiveHeightRxM || out.HorizonDistanceTxM != back.HorizonDistanceRxM {
		t.Errorf("out %+v, back %+v", out, back)
	}
	if s := out.Settings(); !strings.Contains(s, "maritime-temperate-land climate, N0 320 N-units, ground ε 25 σ 0.02 S/m, horizontal, accidental variability, 90 % reliability, 80 % confidence, no situation variability") {
		t.Errorf("settings text %q", s)
	}
}

// TestPlanITMErrors: the ITM's settings in a plan file are refused with
// the file, line and field.
func TestPlanITMErrors(t *testing.T) {
	tail := "stations: [{name: a, at: '1,2', radio: {power: 5W, sensitivity: -120dBm}}]\n" +
		"targets: [{name: b, at: '1.1,2', frequency: 146, radio: {power: 5W, sensitivity: -120dBm}}]\n"
	for _, c := range []struct{ doc, want string }{
		{"itm: {climate: 5}\n", "plan.yaml:1: itm: the Longley–Rice ITM settings need model: itm"},
		{"model: itm\nitm: {climate: 9}\n", "plan.yaml:2: itm.climate: unknown radio climate \"9\""},
		{"model: itm\nitm:\n  refractivity: 301\n  conductivity: -1\n", "plan.yaml:4: itm.conductivity: conductivity -1 S/m"},
		{"model: itm\nitm: {time: 90%, confidence: 90%}\n", "plan.yaml:2: itm.confidence: give time, location and situation"},
		{"model: itm\nitm: {colour: red}\n", "plan.yaml:2: itm.colour: unknown field"},
		{"model: itm\nitm: {location_variability: maybe}\n", "plan.yaml:2: itm.location_variability: \"maybe\" is not one of"},
		{"model: itm\nk: 4/3\n", "plan.yaml:2: k: not used with model: itm"},
		{"model: itm\nground: sea\n", "plan.yaml:2: ground: not used with model: itm"},
		{"model: itm\nrequire:\n  reliability: 90%\n  sigma: 5.5dB\n", "plan.yaml:4: require.sigma: not used with model: itm"},
		{"model: itm\nrequire:\n  reliability: 90%\nitm: {time: 90%}\n", "plan.yaml:3: require.reliability: the ITM's time, location and situation percentages are given"},
	} {
		_, err := ParsePlan([]byte(c.doc+tail), "plan.yaml")
		if err == nil || !errors.Is(err, ErrPlanFile) || !strings.HasPrefix(err.Error(), c.want) {
			t.Errorf("%q: error %v, want %q", c.doc, err, c.want)
		}
	}
}

// TestITMWarningLines counts each warning over the paths it arose on.
func TestITMWarningLines(t *testing.T) {
	ws := []propagation.ITMWarnings{0, propagation.ITMWarnShortPath, propagation.ITMWarnShortPath | propagation.ITMWarnRoughTerrain, 0}
	got := itmWarningLines(ws)
	if len(got) != 2 || !strings.HasSuffix(got[0], "(2 of 4 paths)") || !strings.HasPrefix(got[0], "ITM: path shorter than 1 km") ||
		!strings.HasSuffix(got[1], "(1 of 4 paths)") {
		t.Errorf("lines %q", got)
	}
	if itmWarningLines(make([]propagation.ITMWarnings, 3)) != nil {
		t.Error("lines for no warnings")
	}
}

// FuzzITMOptions: any text is parsed or refused with an OptionError,
// never a panic; what is accepted is a model that computes.
func FuzzITMOptions(f *testing.F) {
	f.Add("5", "301", "", "15", "0.005", "mobile", "90%", "", "", "")
	f.Add("desert", "", "280", "80", "5S/m", "single", "", "", "", "95%")
	f.Add("x", "NaN", "Inf", "-1", "0", "?", "200%", "0.5", "1", "0")
	f.Fuzz(func(t *testing.T, climate, n0, ns, eps, sigma, variab, tm, loc, sit, conf string) {
		o := ITMOptions{Climate: climate, Refractivity: n0, SurfaceRefractivity: ns, Permittivity: eps, Conductivity: sigma,
			Variability: variab, Time: tm, Location: loc, Situation: sit, Confidence: conf}
		var m propagation.ITM
		if err := o.Apply(&m); err != nil {
			var oe *units.OptionError
			if !errors.As(err, &oe) {
				t.Fatalf("error is not an OptionError: %v", err)
			}
			return
		}
		if _, err := m.Resolved(); err != nil {
			t.Fatalf("accepted %+v but the model refuses it: %v", o, err)
		}
	})
}
