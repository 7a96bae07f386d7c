package antenna

import (
	"errors"
	"math"
	"testing"
)

// The trimming rule (common practice, no single source): an antenna that
// resonates at 139.35 MHz, wanted at 146 MHz, has its elements multiplied by
// 0.954; elements of 468 mm and 458 mm become about 446.7 mm and 437.1 mm.
func TestTrimCheckValues(t *testing.T) {
	r, err := Trim(139.35, 146, []float64{0.468, 0.458})
	if err != nil {
		t.Fatal(err)
	}
	if math.Abs(r.Ratio-0.954) > 0.0005 {
		t.Errorf("ratio %.5f, want 0.954", r.Ratio)
	}
	want := []struct{ nowMM, newMM float64 }{{468, 446.7}, {458, 437.1}}
	if len(r.Lengths) != len(want) {
		t.Fatalf("%d lengths, want %d", len(r.Lengths), len(want))
	}
	for i, w := range want {
		l := r.Lengths[i]
		if l.NowM != w.nowMM/1000 {
			t.Errorf("element %d: now %g m, want %g m", i+1, l.NowM, w.nowMM/1000)
		}
		if math.Abs(l.NewM*1000-w.newMM) > 0.1 {
			t.Errorf("element %d: new %.2f mm, want %.1f ± 0.1 mm", i+1, l.NewM*1000, w.newMM)
		}
		if math.Abs(l.CutM*1000-(w.nowMM-w.newMM)) > 0.1 {
			t.Errorf("element %d: cut %.2f mm, want %.1f ± 0.1 mm", i+1, l.CutM*1000, w.nowMM-w.newMM)
		}
	}
}

// Resonating above the wanted frequency means the elements are short: the
// rule lengthens them and the "cut" is negative. Same rule (common
// practice): 500 mm resonating at 150 MHz, wanted at 145 MHz → 500 × 150/145
// = 517.24 mm, 17.24 mm to add.
func TestTrimLengthens(t *testing.T) {
	r, err := Trim(150, 145, []float64{0.5})
	if err != nil {
		t.Fatal(err)
	}
	l := r.Lengths[0]
	if math.Abs(l.NewM*1000-517.24) > 0.01 || math.Abs(l.CutM*1000+17.24) > 0.01 {
		t.Errorf("new %.3f mm, cut %.3f mm; want 517.24 mm, −17.24 mm", l.NewM*1000, l.CutM*1000)
	}
}

func TestTrimRefusesBadInput(t *testing.T) {
	tests := []struct {
		name             string
		measured, wanted float64
		lengths          []float64
	}{
		{"zero measured", 0, 146, []float64{0.5}},
		{"negative wanted", 139, -146, []float64{0.5}},
		{"NaN measured", math.NaN(), 146, []float64{0.5}},
		{"infinite wanted", 139, math.Inf(1), []float64{0.5}},
		{"no lengths", 139, 146, nil},
		{"zero length", 139, 146, []float64{0.5, 0}},
		{"NaN length", 139, 146, []float64{math.NaN()}},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			if _, err := Trim(tt.measured, tt.wanted, tt.lengths); !errors.Is(err, ErrElementInput) {
				t.Fatalf("err %v, want ErrElementInput", err)
			}
		})
	}
}

// Starting lengths. The free-space wavelength is c/f with c = 299 792 458 m/s
// (SI, exact); the wire factor 0.95 reproduces the half-wave rule 468/f ft
// of the amateur handbooks (common practice; 468/f ft is 0.952 of a
// free-space half wave) within 0.2 %.
func TestStartingLengths(t *testing.T) {
	const ftM = 0.3048 // international foot, exact
	tests := []struct {
		name    string
		f, vf   float64
		quarter bool
		wantM   float64
		tolRel  float64
	}{
		// 468/f ft rule (common practice), half wave of wire at 146 MHz.
		{"half-wave wire 146", 146, VelocityFactorWire, false, 468 / 146.0 * ftM, 0.002},
		// 468/f ft rule at 446 MHz.
		{"half-wave wire 446", 446, VelocityFactorWire, false, 468 / 446.0 * ftM, 0.002},
		// quarter wave of wire: half of the 468/f rule, i.e. 234/f ft.
		{"quarter-wave wire 146", 146, VelocityFactorWire, true, 234 / 146.0 * ftM, 0.002},
		// c/f/4 × 0.66 computed here: 299.792458/146/4 × 0.66.
		{"quarter-wave solid coax 146", 146, VelocityFactorSolidCoax, true, 299.792458 / 146 / 4 * 0.66, 1e-12},
		// c/f/2 × 1, free space.
		{"half-wave free space 100", 100, 1, false, 1.49896229, 1e-9},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			var got float64
			var err error
			if tt.quarter {
				got, err = QuarterWaveM(tt.f, tt.vf)
			} else {
				got, err = HalfWaveM(tt.f, tt.vf)
			}
			if err != nil {
				t.Fatal(err)
			}
			if math.Abs(got-tt.wantM)/tt.wantM > tt.tolRel {
				t.Errorf("%.5f m, want %.5f m (relative tolerance %g)", got, tt.wantM, tt.tolRel)
			}
		})
	}
}

func TestElementLengthRefusesBadInput(t *testing.T) {
	tests := []struct{ f, wl, vf float64 }{
		{0, 0.5, 0.95}, {-146, 0.5, 0.95}, {math.NaN(), 0.5, 0.95}, {math.Inf(1), 0.5, 0.95},
		{146, 0, 0.95}, {146, math.NaN(), 0.95},
		{146, 0.5, 0}, {146, 0.5, 1.2}, {146, 0.5, math.NaN()},
	}
	for _, tt := range tests {
		if _, err := ElementLengthM(tt.f, tt.wl, tt.vf); !errors.Is(err, ErrElementInput) {
			t.Errorf("ElementLengthM(%g, %g, %g): err %v, want ErrElementInput", tt.f, tt.wl, tt.vf, err)
		}
	}
}

func TestParseVelocityFactor(t *testing.T) {
	tests := []struct {
		in   string
		want float64
		ok   bool
	}{
		{"wire", 0.95, true},
		{" Coax ", 0.66, true},
		{"coax-solid", 0.66, true},
		{"coax-foam", 0.80, true},
		{"0.82", 0.82, true},
		{"1", 1, true},
		{"0", 0, false},
		{"1.5", 0, false},
		{"-0.5", 0, false},
		{"NaN", 0, false},
		{"82%", 0, false},
		{"", 0, false},
	}
	for _, tt := range tests {
		t.Run(tt.in, func(t *testing.T) {
			got, err := ParseVelocityFactor(tt.in)
			if !tt.ok {
				if !errors.Is(err, ErrElementInput) {
					t.Fatalf("err %v, want ErrElementInput", err)
				}
				return
			}
			if err != nil || got != tt.want {
				t.Fatalf("got %g, %v; want %g", got, err, tt.want)
			}
		})
	}
}

func FuzzParseVelocityFactor(f *testing.F) {
	for _, s := range []string{"wire", "coax", "coax-foam", "0.66", "1", "0", "1e-300", "+Inf", "0x1p-1", ""} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		v, err := ParseVelocityFactor(s)
		if err != nil {
			if !errors.Is(err, ErrElementInput) {
				t.Fatalf("error %v does not wrap ErrElementInput", err)
			}
			return
		}
		if !(v > 0 && v <= 1) {
			t.Fatalf("ParseVelocityFactor(%q) = %g, outside (0, 1]", s, v)
		}
		if _, err := HalfWaveM(146, v); err != nil {
			t.Fatalf("accepted velocity factor %g refused by HalfWaveM: %v", v, err)
		}
	})
}
