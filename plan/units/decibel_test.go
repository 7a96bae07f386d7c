package units

import (
	"math"
	"testing"
)

func TestMicrovoltsDBm(t *testing.T) {
	// Computed [calc]: dBm = 20 log10(µV) − 106.99, P = V²/R across 50 Ω.
	// The figures are given to 0.1 dB, hence the tolerance.
	cases := []struct {
		name     string
		uV, dBm  float64
		tol      float64
		inverted bool
	}{
		{name: "0.16 uV", uV: 0.16, dBm: -122.9, tol: 0.05},
		{name: "0.25 uV", uV: 0.25, dBm: -119.0, tol: 0.05},
		{name: "0.35 uV", uV: 0.35, dBm: -116.1, tol: 0.05},
		{name: "1 uV", uV: 1, dBm: -107.0, tol: 0.05},
		// S9 above 30 MHz is 5 µV across 50 Ω = −93 dBm (IARU Region 1 R.1,
		// from memory) — consistent with P = V²/R to 0.05 dB.
		{name: "5 uV is S9", uV: 5, dBm: -93.0, tol: 0.05},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			if got := DBmFromMicrovolts(c.uV); math.Abs(got-c.dBm) > c.tol {
				t.Errorf("DBmFromMicrovolts(%g) = %.3f, want %.1f", c.uV, got, c.dBm)
			}
			// The inverse brings the stated dBm back to within the same
			// 0.05 dB, i.e. a relative voltage error of 10^(0.05/20) − 1.
			if got := MicrovoltsFromDBm(c.dBm); math.Abs(got/c.uV-1) > 0.0058 {
				t.Errorf("MicrovoltsFromDBm(%.1f) = %.4f µV, want %g", c.dBm, got, c.uV)
			}
		})
	}
	// The constant itself: 1 µV across 50 Ω is 2e-14 W = −106.9897 dBm [calc].
	if got := DBmFromMicrovolts(1); math.Abs(got-(-106.9897)) > 5e-5 {
		t.Errorf("1 µV = %.5f dBm, want -106.9897", got)
	}
}

func TestPowerDBm(t *testing.T) {
	cases := []struct {
		name   string
		w, dBm float64
		tol    float64
	}{
		{"1 mW", 1e-3, 0, 1e-12},        // definition of dBm
		{"1 W", 1, 30, 1e-12},           // definition
		{"5 W", 5, 36.9897, 5e-5},       // 10 log10(5000) [calc]
		{"50 W", 50, 46.9897, 5e-5},     // 10 log10(50000) [calc]
		{"100 mW", 0.1, 20, 1e-12},      // definition
		{"1.5 kW", 1500, 61.7609, 5e-5}, // 10 log10(1.5e6) [calc]
	}
	for _, c := range cases {
		if got := DBmFromW(c.w); math.Abs(got-c.dBm) > c.tol {
			t.Errorf("%s: DBmFromW = %.5f, want %.4f", c.name, got, c.dBm)
		}
		if got := WFromDBm(c.dBm); math.Abs(got/c.w-1) > c.tol*0.24 { // d(ln W)/d(dBm) = 0.2303
			t.Errorf("%s: WFromDBm = %.6g, want %g", c.name, got, c.w)
		}
	}
}

func TestDipoleGain(t *testing.T) {
	// dBd = dBi − 2.15, half-wave dipole 1.64 (FCC OET Bulletin 65, ed. 97-01).
	if got := DBiFromDBd(3.85); math.Abs(got-6.0) > 1e-12 {
		t.Errorf("3.85 dBd = %v dBi, want 6.0", got)
	}
	if got := math.Pow(10, DipoleGainDBi/10); math.Abs(got-1.64) > 0.005 {
		t.Errorf("numeric dipole gain %.4f, want 1.64", got)
	}
}

func TestSMeter(t *testing.T) {
	// IARU Region 1 Technical Recommendation R.1 (Brighton 1981, amended
	// Torremolinos 1990), as quoted from the IARU Region 1 HF Managers'
	// Handbook v9 (2018) §4.1.3: S9 is an available power of −73 dBm
	// (50 µV across 50 Ω) on the bands below 30 MHz and −93 dBm (5 µV)
	// above; one S-unit is 6 dB. So S1 = −121 dBm on HF, −141 dBm above.
	cases := []struct {
		name    string
		dBm     float64
		freqMHz float64
		want    string
	}{
		{"S9 exactly", -93, 146, "S9"},
		{"just under S9", -93.5, 146, "S8"},
		{"S8", -99, 146, "S8"},
		{"S5", -117, 446, "S5"},
		{"S1", -141, 146, "S1"},
		{"below S1", -141.5, 146, "below S1"},
		{"S9+10", -83, 146, "S9+10dB"},
		{"S9+20 rounded", -72.6, 146, "S9+20dB"},
		{"S9 rounded", -92.6, 146, "S9"},
		{"strong", -33, 146, "S9+60dB"},
		{"6 m is above 30 MHz", -93, 50.1, "S9"},
		{"HF S9", -73, 14.2, "S9"},
		{"HF: -93 dBm is S5 (20 dB under S9)", -93, 7.1, "S5"},
		{"HF S1", -121, 3.6, "S1"},
		{"HF below S1", -121.5, 3.6, "below S1"},
		{"HF S9+20", -53, 28.5, "S9+20dB"},
		{"just below 30 MHz is HF", -73, 29.99, "S9"},
	}
	for _, c := range cases {
		if got := SMeter(c.dBm, c.freqMHz); got != c.want {
			t.Errorf("%s: SMeter(%v, %v MHz) = %q, want %q", c.name, c.dBm, c.freqMHz, got, c.want)
		}
	}
	if got := S9DBm(14); got != -73 {
		t.Errorf("S9 at 14 MHz %v dBm, want -73", got)
	}
	// 50 µV and 5 µV across 50 Ω: 20 log10(50) − 106.99 = −73.0 dBm,
	// 20 log10(5) − 106.99 = −93.0 dBm (P = V²/R).
	if math.Abs(DBmFromMicrovolts(50)-S9DBm(14)) > 0.02 || math.Abs(DBmFromMicrovolts(5)-S9DBm(146)) > 0.02 {
		t.Error("S9 levels disagree with 50 µV / 5 µV across 50 Ω")
	}
}
