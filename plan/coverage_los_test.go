package plan

import (
	"math"
	"math/rand/v2"
	"testing"
)

// TestAzimuthRad: the polynomial arctangent that assigns cells to radials
// stays within its documented 2e−8 rad of math.Atan2 over every octant and
// on the axes and diagonals.
func TestAzimuthRad(t *testing.T) {
	rng := rand.New(rand.NewPCG(2, 7))
	cases := [][2]float64{{0, 1}, {1, 0}, {0, -1}, {-1, 0}, {1, 1}, {-1, 1}, {1, -1}, {-1, -1}, {1e-9, 1}, {3, 1e-12}}
	for range 100000 {
		cases = append(cases, [2]float64{rng.NormFloat64() * 1e4, rng.NormFloat64() * 1e4})
	}
	worst := 0.0
	for _, c := range cases {
		got, want := azimuthRad(c[0], c[1]), math.Atan2(c[0], c[1])
		d := math.Abs(got - want)
		if d > math.Pi { // ±π are the same direction
			d = 2*math.Pi - d
		}
		if !(d <= 2e-8) {
			t.Fatalf("azimuthRad(%g, %g) = %.12f, atan2 %.12f", c[0], c[1], got, want)
		}
		worst = math.Max(worst, d)
	}
	t.Logf("worst difference from math.Atan2: %.2g rad", worst)
}
