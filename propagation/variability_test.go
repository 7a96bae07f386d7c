package propagation

import (
	"math"
	"testing"
)

func TestMarginForReliabilityDB(t *testing.T) {
	cases := []struct {
		name               string
		reliability, sigma float64
		want, tol          float64
	}{
		// Computed [calc]: σ Φ⁻¹(r), ITU-R P.1812-8 eq. 69.
		{"σ 5.5 dB 90 %", 0.90, 5.5, 7.05, 0.005},
		{"σ 5.5 dB 95 %", 0.95, 5.5, 9.05, 0.005},
		{"σ 8 dB 90 %", 0.90, 8, 10.25, 0.005},
		{"σ 8 dB 95 %", 0.95, 8, 13.16, 0.005},
		// The median needs no margin.
		{"50 %", 0.5, 8, 0, 1e-12},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			m := MarginForReliabilityDB(c.reliability, c.sigma)
			if math.Abs(m-c.want) > c.tol {
				t.Errorf("margin %.4f dB, want %.2f", m, c.want)
			}
			if p := LinkProbability(m, c.sigma); math.Abs(p-c.reliability) > 1e-12 {
				t.Errorf("LinkProbability(%.4f, %g) = %v, want %v back", m, c.sigma, p, c.reliability)
			}
		})
	}
}

func TestLinkProbability(t *testing.T) {
	cases := []struct {
		name          string
		margin, sigma float64
		want, tol     float64
	}{
		// Standard normal table [common statistical tables]: Φ(1) =
		// 0.841345, Φ(−2) = 0.022750.
		{"one sigma", 5.5, 5.5, 0.841345, 1e-6},
		{"minus two sigma", -16, 8, 0.022750, 1e-6},
		{"σ 0, positive margin", 3, 0, 1, 0},
		{"σ 0, negative margin", -3, 0, 0, 0},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			if got := LinkProbability(c.margin, c.sigma); math.Abs(got-c.want) > c.tol {
				t.Errorf("LinkProbability(%g, %g) = %.6f, want %.6f", c.margin, c.sigma, got, c.want)
			}
		})
	}
	if !math.IsNaN(LinkProbability(1, -1)) {
		t.Error("negative sigma should give NaN")
	}
}

func TestInverseNormalP1812(t *testing.T) {
	// ITU-R P.1812-8 Attachment 2: maximum error 0.00054 over
	// 1e-6 … 0.999999, against the exact inverse from math.Erfinv.
	worst := 0.0
	for _, x := range []float64{1e-6, 1e-4, 0.01, 0.05, 0.1, 0.2, 0.3, 0.5, 0.7, 0.9, 0.95, 0.99, 0.999999} {
		exact := math.Sqrt2 * math.Erfinv(2*x-1)
		got := InverseNormalP1812(x)
		worst = math.Max(worst, math.Abs(got-exact))
		if math.Abs(got-exact) > 0.00054 {
			t.Errorf("I(%g) = %.6f, exact %.6f", x, got, exact)
		}
	}
	// Φ⁻¹(0.975) = 1.959964 [common statistical tables], and odd symmetry.
	if got := InverseNormalP1812(0.975); math.Abs(got-1.959964) > 0.00054 {
		t.Errorf("I(0.975) = %.6f, want 1.959964", got)
	}
	if a, b := InverseNormalP1812(0.1), InverseNormalP1812(0.9); a != -b {
		t.Errorf("I(0.1) = %v, I(0.9) = %v, want opposite", a, b)
	}
	t.Logf("largest error of the P.1812 approximation on the grid: %.6f", worst)
}
