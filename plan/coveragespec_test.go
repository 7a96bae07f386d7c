package plan

import (
	"errors"
	"fmt"
	"math"
	"testing"

	"github.com/mastlink/mastlink/plan/feedline"
)

// TestCoverageBudgets checks the budgets of the two ways against the sum
// of the link budget by hand (EIRP = P − L_feed + G; dBm = 10 log10(W) +
// 30, common practice) and against Env.Evaluate's figures for the same
// ends.
func TestCoverageBudgets(t *testing.T) {
	site := End{Name: "base", Radio: Radio{PowerW: 25, SensitivityDBm: -119}, Antenna: Antenna{GainDBi: 2.15, HeightM: 9},
		Feedline: feedline.Line{SWR: 1, Connectors: 0}}
	cell := End{Name: "handheld", Radio: Radio{PowerW: 5, SensitivityDBm: -121}, Antenna: Antenna{GainDBi: -3, HeightM: 1.5}, Feedline: feedline.Line{SWR: 1}}
	// 25 W = 43.98 dBm; 5 W = 36.99 dBm.
	p25, p5 := 10*math.Log10(25)+30, 10*math.Log10(5)+30
	cases := []struct {
		name string
		dir  CoverageDirection
		want []CoverageBudget
	}{
		{"out", CoverageOut, []CoverageBudget{{p25 + 2.15, -3, -121}}},
		{"back", CoverageBack, []CoverageBudget{{p5 - 3, 2.15, -119}}},
		{"worse", CoverageWorse, []CoverageBudget{{p25 + 2.15, -3, -121}, {p5 - 3, 2.15, -119}}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			got, err := CoverageBudgets(site, cell, 146.55, c.dir)
			if err != nil {
				t.Fatal(err)
			}
			if len(got) != len(c.want) {
				t.Fatalf("%d budgets, want %d", len(got), len(c.want))
			}
			for i := range got {
				g, w := got[i], c.want[i]
				if math.Abs(g.EIRPDBm-w.EIRPDBm) > 1e-9 || math.Abs(g.RxNetGainDB-w.RxNetGainDB) > 1e-9 || g.RxSensitivityDBm != w.RxSensitivityDBm {
					t.Errorf("budget %d = %+v, want %+v", i, g, w)
				}
			}
		})
	}
	// Without a receiver sensitivity at the site only the way out is left;
	// without any, the error says so.
	deaf := site
	deaf.Radio.SensitivityDBm = 0
	if got, err := CoverageBudgets(deaf, cell, 146.55, CoverageWorse); err != nil || len(got) != 1 {
		t.Errorf("deaf site: %v %v", got, err)
	}
	if _, err := CoverageBudgets(deaf, cell, 146.55, CoverageBack); !errors.Is(err, ErrCoverage) {
		t.Errorf("no way left: %v", err)
	}
	if _, err := CoverageBudgets(site, cell, 0, CoverageOut); !errors.Is(err, ErrCoverage) {
		t.Errorf("no frequency: %v", err)
	}
}

func TestParseCoverageWords(t *testing.T) {
	for _, c := range []struct {
		in   string
		want []float64
		ok   bool
	}{
		{"0,10,20", []float64{0, 10, 20}, true},
		{"-110dBm, -100dBm", []float64{-110, -100}, true},
		{"1", []float64{1}, true},
		{"10,0", nil, false},
		{"0,,10", nil, false},
		{"0,inf", nil, false},
		{"1,2,3,4,5,6,7,8,9,10,11,12,13", nil, false},
	} {
		got, err := ParseCoverageLevels(c.in)
		if (err == nil) != c.ok || len(got) != len(c.want) {
			t.Errorf("ParseCoverageLevels(%q) = %v, %v", c.in, got, err)
		}
	}
	if d, err := ParseCoverageDirection("Back"); err != nil || d != CoverageBack {
		t.Errorf("direction: %v %v", d, err)
	}
	if _, err := ParseCoverageMode("viewshed"); err == nil {
		t.Error("mode viewshed accepted")
	}
	if v, err := ParseCoverageValue("MARGIN"); err != nil || v != ValueMargin {
		t.Errorf("value: %v %v", v, err)
	}
}

func FuzzParseCoverageLevels(f *testing.F) {
	for _, s := range []string{"0,10,20", "-110dBm,-100dBm", "1", "10,0", "", ",", "1e400", "NaN"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		l, err := ParseCoverageLevels(s)
		if err != nil {
			return
		}
		if len(l) == 0 || len(l) > 12 {
			t.Fatalf("%q gave %d levels", s, len(l))
		}
		for i := 1; i < len(l); i++ {
			if !(l[i] > l[i-1]) {
				t.Fatalf("%q gave levels not ascending: %v", s, l)
			}
		}
	})
}

// ExampleCoverageBudgets prints the two ways of a coverage map around a
// 25 W base with a 2.15 dBi antenna, reached by 5 W handhelds (invented
// kit; no feedlines).
func ExampleCoverageBudgets() {
	base := End{Name: "base", Radio: Radio{PowerW: 25, SensitivityDBm: -119}, Antenna: Antenna{GainDBi: 2.15, HeightM: 9}}
	hand := End{Name: "handheld", Radio: Radio{PowerW: 5, SensitivityDBm: -119}, Antenna: Antenna{HeightM: 1.5}}
	b, err := CoverageBudgets(base, hand, 146.55, CoverageWorse)
	if err != nil {
		fmt.Println(err)
		return
	}
	for i, x := range b {
		fmt.Printf("way %d: EIRP %.1f dBm, receiving gain %.2f dB, sensitivity %.0f dBm\n", i+1, x.EIRPDBm, x.RxNetGainDB, x.RxSensitivityDBm)
	}
	// Output:
	// way 1: EIRP 46.1 dBm, receiving gain 0.00 dB, sensitivity -119 dBm
	// way 2: EIRP 37.0 dBm, receiving gain 2.15 dB, sensitivity -119 dBm
}
