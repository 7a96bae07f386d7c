package propagation

import (
	"math"
	"math/rand/v2"
	"testing"
)

// TestLnFast: lnFast agrees with math.Log within 1e−15 absolute below |ln x|
// of 1 and 1e−15 relative above, on random arguments over many decades, at
// powers of two and interval edges, and hands the special cases to
// math.Log.
func TestLnFast(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 2))
	xs := []float64{1, 2, 0.5, 1 + 1.0/256, 1 - 1e-12, 1 + 1e-12, 10, 1e-300, 1e300, math.MaxFloat64, math.SmallestNonzeroFloat64, 0, -1, math.Inf(1), math.NaN(), 2.2250738585072014e-308}
	for range 200000 {
		xs = append(xs, math.Exp(rng.Float64()*80-40), 0.5+rng.Float64())
	}
	worst := 0.0
	for _, x := range xs {
		got, want := lnFast(x), math.Log(x)
		if math.IsNaN(want) || math.IsInf(want, 0) {
			if !(got == want || math.IsNaN(got) && math.IsNaN(want)) {
				t.Errorf("ln(%v) = %v, want %v", x, got, want)
			}
			continue
		}
		err := math.Abs(got - want)
		if math.Abs(want) > 1 {
			err /= math.Abs(want)
		}
		worst = math.Max(worst, err)
		if err > 1e-15 {
			t.Errorf("ln(%v) = %v, want %v (error %.3g)", x, got, want, err)
		}
	}
	t.Logf("worst error %.3g", worst)
}

// BenchmarkLn compares lnFast with math.Log.
func BenchmarkLn(b *testing.B) {
	benchAgainst(b, 0.01, 100, "fast", lnFast, "math", math.Log)
}
