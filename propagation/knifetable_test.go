package propagation

import (
	"math"
	"testing"
)

// TestKnifeTable: the tabulated J(ν) and 1 − exp(−J/6) agree with ITU-R
// P.526-16 eq. 31 and eq. 57's factor within 1e−10 dB on a grid 37 times
// finer than the table's (nodes, midpoints and everything between), on both
// sides of knifeMax, and J is 0 from ν = −0.78 down (eq. 31).
func TestKnifeTable(t *testing.T) {
	worstJ, worstE := 0.0, 0.0
	for k := 0; ; k++ {
		nu := knifeMin + float64(k)/(256*37)
		if nu > 160 {
			break
		}
		j, e := knifeLoss(nu)
		wj := KnifeEdgeLossDB(nu)
		we := 1 - math.Exp(-wj/6)
		worstJ = math.Max(worstJ, math.Abs(j-wj))
		worstE = math.Max(worstE, math.Abs(e-we))
	}
	t.Logf("worst |ΔJ| %.3g dB, |ΔE| %.3g", worstJ, worstE)
	if worstJ > 1e-10 || worstE > 1e-11 {
		t.Errorf("table error J %.3g dB, E %.3g; want ≤ 1e-10 dB, 1e-11", worstJ, worstE)
	}
	for _, nu := range []float64{-0.78, -1, -5, math.Inf(-1), math.NaN()} {
		if j, e := knifeLoss(nu); j != 0 || e != 0 {
			t.Errorf("ν %v: J %v, E %v; want 0, 0", nu, j, e)
		}
	}
	// ITU-R P.526-16 eq. 31 at grazing: J(0) = 6.9 + 20 log10(√1.01 − 0.1) = 6.0329 dB (worked by hand).
	if j, _ := knifeLoss(0); math.Abs(j-6.0329) > 1e-4 {
		t.Errorf("J(0) = %.5f dB, want 6.0329", j)
	}
}

// BenchmarkKnifeLoss compares the table with the formulas it replaces.
func BenchmarkKnifeLoss(b *testing.B) {
	benchAgainst(b, -0.7, 6,
		"table", func(nu float64) float64 { j, e := knifeLoss(nu); return j + e },
		"formulas", func(nu float64) float64 { j := KnifeEdgeLossDB(nu); return j + (1 - math.Exp(-j/6)) })
}

// benchAgainst times a fast function and the one it replaces (each
// called through a function value, alike) on the same 1024 arguments,
// spread over [lo, lo + width) in a scrambled order.
func benchAgainst(b *testing.B, lo, width float64, fastName string, fast func(float64) float64, refName string, ref func(float64) float64) {
	xs := make([]float64, 1024)
	for i := range xs {
		xs[i] = lo + width*float64(i*7919%1024)/1024
	}
	for _, c := range []struct {
		name string
		f    func(float64) float64
	}{{fastName, fast}, {refName, ref}} {
		b.Run(c.name, func(b *testing.B) {
			s := 0.0
			for i := 0; b.Loop(); i++ {
				s += c.f(xs[i&1023])
			}
			_ = s
		})
	}
}
