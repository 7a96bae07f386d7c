package propagation

import (
	"math"
	"math/rand/v2"
	"testing"
)

// TestEq22cRoot: the tabulated root with Newton steps equals ITU-R
// P.526-16 eq. 22c's cos(π/3 + arccos(a)/3) within 2e−15 over [−1, 1]
// (random, nodes, the ends and around ±(1 − 1/128) where the method changes).
func TestEq22cRoot(t *testing.T) {
	rng := rand.New(rand.NewPCG(8, 9))
	as := []float64{-1, 1, 0, -eq22cMax, eq22cMax, math.Nextafter(eq22cMax, 2), math.Nextafter(-eq22cMax, -2), math.Nextafter(eq22cMax, 0), math.Nextafter(-eq22cMax, 0), 0.999}
	for i := range int(2 * eq22cMax * eq22cSteps) {
		as = append(as, -eq22cMax+float64(i)/eq22cSteps)
	}
	for range 300000 {
		as = append(as, 2*rng.Float64()-1)
	}
	worst := 0.0
	for _, a := range as {
		got := eq22cRoot(a)
		want := math.Cos(math.Pi/3 + math.Acos(a)/3)
		worst = math.Max(worst, math.Abs(got-want))
		if math.Abs(got-want) > 2e-15 {
			t.Fatalf("a %v: %v, want %v", a, got, want)
		}
	}
	t.Logf("worst difference %.3g", worst)
}

// BenchmarkEq22cRoot compares eq22cRoot with the trigonometric form of
// ITU-R P.526-16 eq. 22c it replaces.
func BenchmarkEq22cRoot(b *testing.B) {
	benchAgainst(b, -0.95, 1.9,
		"table+newton", eq22cRoot,
		"trigonometric", func(a float64) float64 { return math.Cos(math.Pi/3 + math.Acos(a)/3) })
}
