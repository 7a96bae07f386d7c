package propagation

import (
	"errors"
	"fmt"
	"math"
	"strings"
	"testing"
)

// p2108HeightGain computes the height-gain terminal correction of ITU-R
// P.2108-1 (09/2021) Annex 1 §3.1 independently of the package: f in GHz,
// h, R, w_s in metres, diffraction true for eq. (2a), false for eq. (2b).
func p2108HeightGain(fGHz, h, r, ws float64, diffraction bool) float64 {
	if h >= r {
		return 0 // §3.1: no correction at or above the clutter
	}
	if !diffraction {
		kh2 := 21.8 + 6.2*math.Log10(fGHz) // eq. (2f)
		return -kh2 * math.Log10(h/r)      // eq. (2b)
	}
	hdif := r - h                                         // eq. (2d)
	theta := math.Atan(hdif/ws) * 180 / math.Pi           // eq. (2e), degrees
	nu := 0.342 * math.Sqrt(fGHz) * math.Sqrt(hdif*theta) // eqs. (2g), (2c)
	// J(ν), the knife-edge approximation of ITU-R P.526-16 eq. (31).
	j := 0.0
	if nu > -0.78 {
		j = 6.9 + 20*math.Log10(math.Sqrt((nu-0.1)*(nu-0.1)+1)+nu-0.1)
	}
	return j - 6.03 // eq. (2a)
}

// The clutter classes with their representative heights and equations, as
// ITU-R P.2108-1 §3.1.1 Table 3 gives them.
var p2108Table3 = []struct {
	class       ClutterClass
	heightM     float64
	diffraction bool // eq. (2a); else eq. (2b)
}{
	{WaterSea, 10, false},
	{OpenRural, 10, false},
	{Suburban, 10, true},
	{Urban, 15, true},
	{TreesForest, 15, true},
	{DenseUrban, 20, true},
}

func TestClutterClassHeightsTable3(t *testing.T) {
	for _, row := range p2108Table3 {
		if got := row.class.HeightM(); got != row.heightM {
			t.Errorf("%v: representative height %g m, want %g m (ITU-R P.2108-1 Table 3)", row.class, got, row.heightM)
		}
	}
	if NoClutter.HeightM() != 0 {
		t.Errorf("none: height %g m, want 0", NoClutter.HeightM())
	}
}

// A handheld at 1.5 m in each class, and other heights, at the edges of the
// frequency range and on the 2 m and 70 cm bands: the package against the
// recommendation's equations computed above (ITU-R P.2108-1 §3.1, eqs.
// 2a–2g, Table 3, w_s = 27 m of §3.1.1).
func TestTerminalClutterLossAgainstP2108Equations(t *testing.T) {
	freqs := []float64{30, 146, 446, 1000, 3000}
	heights := []float64{0.5, 1.5, 3, 6, 9.99, 12, 19}
	for _, row := range p2108Table3 {
		for _, f := range freqs {
			for _, h := range heights {
				name := fmt.Sprintf("%v/%gMHz/%gm", row.class, f, h)
				t.Run(name, func(t *testing.T) {
					got, err := TerminalClutterLoss(row.class, f, h)
					if err != nil {
						t.Fatal(err)
					}
					want := p2108HeightGain(f/1000, h, row.heightM, 27, row.diffraction)
					if math.Abs(got-want) > 1e-9 {
						t.Errorf("A_h = %.6f dB, want %.6f dB", got, want)
					}
				})
			}
		}
	}
}

// Hand-checked figures at 1.5 m and 146 MHz, one per equation, so that the
// test above cannot pass with both sides wrong the same way. Worked here
// from ITU-R P.2108-1 eqs. (2a)–(2g):
//   - open/rural (2b): K_h2 = 21.8 + 6.2 log10(0.146) = 16.6189;
//     A_h = −16.6189 × log10(1.5/10) = 16.6189 × 0.82391 = 13.692 dB.
//   - dense urban (2a): h_dif = 18.5 m; θ = arctan(18.5/27) = 34.419°;
//     K_ν = 0.342 √0.146 = 0.13068; ν = 0.13068 √(18.5 × 34.419) = 3.2976;
//     J = 6.9 + 20 log10(√(3.1976² + 1) + 3.1976) = 6.9 + 16.322 = 23.222;
//     A_h = 17.192 dB.
func TestTerminalClutterLossWorked(t *testing.T) {
	tests := []struct {
		class ClutterClass
		want  float64
	}{
		{OpenRural, 13.692},
		{DenseUrban, 17.192},
	}
	for _, tt := range tests {
		got, err := TerminalClutterLoss(tt.class, 146, 1.5)
		if err != nil {
			t.Fatal(err)
		}
		if math.Abs(got-tt.want) > 0.005 {
			t.Errorf("%v at 1.5 m, 146 MHz: %.4f dB, want %.3f dB", tt.class, got, tt.want)
		}
	}
}

// The test data of the U.S. reference implementation of ITU-R P.2108
// (NTIA/ITS, github.com/NTIA/p2108, tests/HeightGainTerminalCorrectionModelTestData.csv;
// A_h rounded there to 0.1 dB): frequency GHz, antenna height m, street
// width m, clutter height m, class, A_h dB.
func TestTerminalClutterLossNTIAReference(t *testing.T) {
	tests := []struct {
		fGHz, h, ws, r float64
		class          ClutterClass
		want           float64
	}{
		{1.5, 2, 27, 10, WaterSea, 16.0},
		{1.5, 2, 27, 6, WaterSea, 10.9},
		{1.5, 2, 27, 10, OpenRural, 16.0},
		{1.5, 2, 27, 6, OpenRural, 10.9},
		{1.5, 2, 27, 10, Suburban, 20.5},
		{1.5, 2, 27, 6, Suburban, 14.6},
		{1.5, 2, 27, 15, Urban, 24.5},
		{1.5, 2, 27, 6, Urban, 14.6},
		{1.5, 2, 27, 15, TreesForest, 24.5},
		{1.5, 2, 27, 6, TreesForest, 14.6},
		{1.5, 2, 27, 20, DenseUrban, 27.1},
		{1.5, 2, 27, 6, DenseUrban, 14.6},
		{3, 3, 15, 15, DenseUrban, 29.0},
		{0.9, 2.3, 30, 10, OpenRural, 13.7},
		{1.5, 2.5, 25, 10, Suburban, 20.2},
		{0.03, 2.1, 24.5, 9.8, Suburban, 5.7},
		{1.7, 30, 24.5, 9.8, Suburban, 0},
		{1.7, 30, 24.5, 30, Suburban, 0},
	}
	for _, tt := range tests {
		name := fmt.Sprintf("%v/%gGHz/%gm/R%g/ws%g", tt.class, tt.fGHz, tt.h, tt.r, tt.ws)
		t.Run(name, func(t *testing.T) {
			got, err := TerminalClutterLossAt(tt.class, tt.fGHz*1000, tt.h, tt.r, tt.ws)
			if err != nil {
				t.Fatal(err)
			}
			if math.Abs(got-tt.want) > 0.05 {
				t.Errorf("A_h = %.3f dB, want %.1f dB", got, tt.want)
			}
		})
	}
}

// Zero at and above the clutter (ITU-R P.2108-1 §3.1), and continuous as
// the antenna rises to it: eq. (2b) is exactly 0 at h = R; eq. (2a) gives
// J(0) − 6.03 = 0.003 dB there.
func TestTerminalClutterLossAboveClutter(t *testing.T) {
	for _, row := range p2108Table3 {
		for _, f := range []float64{30, 146, 446, 3000} {
			for _, h := range []float64{row.heightM, row.heightM + 0.01, 25, 100} {
				got, err := TerminalClutterLoss(row.class, f, h)
				if err != nil || got != 0 {
					t.Errorf("%v, %g MHz, %g m: %g dB, %v; want 0", row.class, f, h, got, err)
				}
			}
			below, err := TerminalClutterLoss(row.class, f, row.heightM-1e-6)
			if err != nil || below < 0 || below > 0.005 {
				t.Errorf("%v, %g MHz, just below R: %g dB, %v; want 0 to 0.005 dB", row.class, f, below, err)
			}
		}
	}
}

// Lower antennas and higher frequencies lose more (the shape of eqs. 2a–2b).
func TestTerminalClutterLossMonotonic(t *testing.T) {
	for _, row := range p2108Table3 {
		prev := math.Inf(1)
		for h := 0.25; h < row.heightM; h += 0.25 {
			l, _ := TerminalClutterLoss(row.class, 146, h)
			if l > prev {
				t.Fatalf("%v: loss rises from %.3f to %.3f dB as the antenna rises to %g m", row.class, prev, l, h)
			}
			prev = l
		}
		lo, _ := TerminalClutterLoss(row.class, 146, 1.5)
		hi, _ := TerminalClutterLoss(row.class, 446, 1.5)
		if !(hi > lo) {
			t.Errorf("%v: 446 MHz %.2f dB not above 146 MHz %.2f dB", row.class, hi, lo)
		}
	}
}

func TestTerminalClutterLossRefusesBadInput(t *testing.T) {
	tests := []struct {
		name        string
		class       ClutterClass
		f, h, r, ws float64
	}{
		{"below 30 MHz", Urban, 29.9, 1.5, 15, 27},
		{"20 MHz", OpenRural, 20, 1.5, 10, 27},
		{"above 3 GHz", Urban, 3000.1, 1.5, 15, 27},
		{"4 GHz", Suburban, 4000, 2, 10, 27},
		{"NaN frequency", Urban, math.NaN(), 1.5, 15, 27},
		{"zero height", OpenRural, 146, 0, 10, 27},
		{"negative height", Urban, 146, -1, 15, 27},
		{"NaN height", Urban, 146, math.NaN(), 15, 27},
		{"zero street width", DenseUrban, 146, 1, 20, 0},
		{"zero clutter height", DenseUrban, 146, 1, 0, 27},
		{"infinite clutter height", DenseUrban, 146, 1, math.Inf(1), 27},
		{"unknown class", ClutterClass(42), 146, 1.5, 10, 27},
		{"negative class", ClutterClass(-1), 146, 1.5, 10, 27},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			if _, err := TerminalClutterLossAt(tt.class, tt.f, tt.h, tt.r, tt.ws); !errors.Is(err, ErrBadParams) {
				t.Fatalf("err %v, want ErrBadParams", err)
			}
		})
	}
	// The frequency check applies through TerminalClutterLoss too.
	if _, err := TerminalClutterLoss(Urban, 10, 1.5); !errors.Is(err, ErrBadParams) || !strings.Contains(err.Error(), "30–3000 MHz") {
		t.Errorf("10 MHz: err %v, want ErrBadParams naming the 30–3000 MHz range", err)
	}
}

func TestNoClutterIsZero(t *testing.T) {
	for _, f := range []float64{1, 146, 10000, math.NaN()} {
		if l, err := TerminalClutterLoss(NoClutter, f, 1.5); l != 0 || err != nil {
			t.Errorf("none at %g MHz: %g dB, %v; want 0", f, l, err)
		}
	}
}

func TestParseClutterClass(t *testing.T) {
	tests := []struct {
		in   string
		want ClutterClass
		ok   bool
	}{
		{"none", NoClutter, true},
		{"water", WaterSea, true},
		{"Sea", WaterSea, true},
		{"water/sea", WaterSea, true},
		{"open", OpenRural, true},
		{"rural", OpenRural, true},
		{"open/rural", OpenRural, true},
		{"suburban", Suburban, true},
		{" URBAN ", Urban, true},
		{"forest", TreesForest, true},
		{"trees", TreesForest, true},
		{"dense-urban", DenseUrban, true},
		{"dense urban", DenseUrban, true},
		{"dense_urban", DenseUrban, true},
		{"jungle", 0, false},
		{"", 0, false},
	}
	for _, tt := range tests {
		t.Run(tt.in, func(t *testing.T) {
			c, err := ParseClutterClass(tt.in)
			if !tt.ok {
				if !errors.Is(err, ErrUnknownClutterClass) || !strings.Contains(err.Error(), "dense-urban") {
					t.Fatalf("err %v: want ErrUnknownClutterClass listing the names", err)
				}
				return
			}
			if err != nil || c != tt.want {
				t.Fatalf("got %v, %v; want %v", c, err, tt.want)
			}
		})
	}
	for _, n := range ClutterClassNames() {
		c, err := ParseClutterClass(n)
		if err != nil || c.String() != n {
			t.Errorf("name %q: parses to %v, %v", n, c, err)
		}
	}
}

func FuzzParseClutterClass(f *testing.F) {
	for _, s := range append(ClutterClassNames(), "sea", "Dense Urban", "open/rural", "", "\x00", "urban\n") {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		c, err := ParseClutterClass(s)
		if err != nil {
			if !errors.Is(err, ErrUnknownClutterClass) || c != NoClutter {
				t.Fatalf("ParseClutterClass(%q) = %v, %v", s, c, err)
			}
			return
		}
		if !c.valid() {
			t.Fatalf("ParseClutterClass(%q) gave invalid class %d", s, int(c))
		}
		l, err := TerminalClutterLoss(c, 146, 1.5)
		if err != nil || l < 0 {
			t.Fatalf("%v at 146 MHz, 1.5 m: %g dB, %v", c, l, err)
		}
	})
}
