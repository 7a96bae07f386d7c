package plan

import (
	"context"
	"errors"
	"math"
	"strings"
	"testing"
	"unicode/utf8"
)

// TestPlanDefaultRequirement: a plan that asks for nothing gets the one
// default, DefaultMarginDB, marked as the default; asking for a margin or
// a reliability replaces it.
func TestPlanDefaultRequirement(t *testing.T) {
	base := "stations: [{name: a, at: '1,2', radio: {power: 5W, sensitivity: -120dBm}}]\n" +
		"targets: [{name: b, at: '1.1,2', frequency: 146, radio: {power: 5W, sensitivity: -120dBm}}]\n"
	cases := []struct {
		name    string
		require string
		needDB  float64
		def     bool
		tolDB   float64
	}{
		{"absent", "", DefaultMarginDB, true, 0},
		{"empty", "require: {}\n", DefaultMarginDB, true, 0},
		{"sigma only", "require: {sigma: 8dB}\n", DefaultMarginDB, true, 0},
		{"margin", "require: {margin: 3dB}\n", 3, false, 0},
		{"margin 0", "require: {margin: 0dB}\n", 0, false, 0},
		// σ 5.5 dB at 90 %: M = 5.5 × 1.2816 = 7.05 dB (ITU-R P.1812-8
		// eq. 69 with the normal quantile I(0.1) = −1.2816, from tables).
		{"reliability only", "require: {reliability: 90%}\n", 7.05, false, 0.01},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			p, err := ParsePlan([]byte(c.require+base), "plan.yaml")
			if err != nil {
				t.Fatal(err)
			}
			if got := p.Require.NeededMarginDB(); math.Abs(got-c.needDB) > c.tolDB || p.Require.Default != c.def {
				t.Errorf("needed %.3f dB default %v, want %.3f dB default %v", got, p.Require.Default, c.needDB, c.def)
			}
			res, err := EvaluatePlan(context.Background(), p, p.NewEnv(nil), nil)
			if err != nil {
				t.Fatal(err)
			}
			if math.Abs(res.NeededMarginDB-c.needDB) > c.tolDB || res.DefaultMargin != c.def {
				t.Errorf("result needs %.3f dB default %v", res.NeededMarginDB, res.DefaultMargin)
			}
		})
	}
}

// TestRequirementOptionsDefault: the commands' flags over the default.
func TestRequirementOptionsDefault(t *testing.T) {
	r := DefaultRequirement()
	if err := (RequirementOptions{Sigma: "6dB"}).Apply(&r); err != nil || !r.Default || r.MarginDB != DefaultMarginDB || r.SigmaDB != 6 {
		t.Errorf("sigma only: %+v %v", r, err)
	}
	r = DefaultRequirement()
	if err := (RequirementOptions{Reliability: "50%"}).Apply(&r); err != nil || r.Default || r.MarginDB != 0 {
		t.Errorf("reliability only: %+v %v", r, err)
	}
	// 50 % of locations needs no margin (the median, ITU-R P.1812-8 eq. 69).
	if m := r.NeededMarginDB(); math.Abs(m) > 1e-9 {
		t.Errorf("50 %% needs %v dB", m)
	}
}

// TestPlanTwoStations: the stations of a plan are checked against each
// other both ways, once per pair, each station counts the other among the
// places it must reach, and every station's mast is swept.
func TestPlanTwoStations(t *testing.T) {
	doc := `frequency: 146.55MHz
model: free-space
defaults: {radio: {power: 5W, sensitivity: -120dBm}}
stations:
  - {name: base, at: '45.00,7.00', radio: {power: 25W, sensitivity: -120dBm}, antenna: {height: 6m}}
  - {name: relay, at: '45.05,7.00'}
  - {name: camp, at: '45.00,7.05'}
targets:
  - {name: team, at: '45.02,7.02'}
mast: {heights: 2m..4m step 1m, cables: [RG-58], run: 5m}
`
	p, err := ParsePlan([]byte(doc), "plan.yaml")
	if err != nil {
		t.Fatal(err)
	}
	res, err := EvaluatePlan(context.Background(), p, p.NewEnv(nil), nil)
	if err != nil {
		t.Fatal(err)
	}
	pairs := map[string]int{}
	for _, l := range res.Links {
		pairs[l.From+"→"+l.To+" "+l.Direction]++
	}
	// 3 stations × 1 target × 2 ways + 3 pairs × 2 ways.
	if len(res.Links) != 12 {
		t.Errorf("%d links, want 12: %v", len(res.Links), pairs)
	}
	for _, want := range []string{"base→relay out", "relay→base back", "base→camp out", "camp→base back", "relay→camp out", "camp→relay back"} {
		if pairs[want] != 1 {
			t.Errorf("link %s appears %d times", want, pairs[want])
		}
	}
	for _, s := range res.Stations {
		if s.Of != 3 {
			t.Errorf("%s must reach %d, want 3 (the team and two stations)", s.Name, s.Of)
		}
	}
	if len(res.Masts) != 3 || res.Mast != res.Masts[0] {
		t.Fatalf("masts %d, mast %p", len(res.Masts), res.Mast)
	}
	for i, m := range res.Masts {
		if m.Station != p.Stations[i].Name {
			t.Errorf("sweep %d is of %s", i, m.Station)
		}
		if len(m.Rows) != 3 {
			t.Errorf("%s: %d rows", m.Station, len(m.Rows))
		}
	}
	// Without a frequency, two stations cannot be checked: a clear error
	// naming the field.
	_, err = ParsePlan([]byte(strings.Replace(doc, "frequency: 146.55MHz\n", "", 1)+""), "plan.yaml")
	if err == nil || !strings.Contains(err.Error(), "frequency: missing: with 3 stations") {
		t.Errorf("no frequency: %v", err)
	}
}

// TestPlanNotYAML: binary data or plain text as a plan gives one short
// line that says the file is not a YAML plan and repeats at most 60
// characters of it.
func TestPlanNotYAML(t *testing.T) {
	long := strings.Repeat("x", 590)
	garbage := make([]byte, 600)
	for i := range garbage {
		garbage[i] = byte(i*7 + 3)
	}
	cases := []struct {
		name string
		data []byte
	}{
		{"binary", garbage},
		{"long text", []byte(long)},
		{"long flow", []byte("[" + long)},
		{"latin-1", []byte("name: caf\xe9 \xe9t\xe9\nstations: []\n")},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			_, err := ParsePlan(c.data, "plan.yaml")
			if err == nil {
				t.Fatal("accepted")
			}
			msg := err.Error()
			if !errors.Is(err, ErrPlanFile) || !strings.Contains(msg, "not a YAML plan") {
				t.Errorf("error %q", msg)
			}
			if n := utf8.RuneCountInString(msg); n > 200 || strings.Contains(msg, "\n") {
				t.Errorf("error of %d characters: %q", n, msg)
			}
		})
	}
}
