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

func BenchmarkEq22cRoot(b *testing.B) {
	as := make([]float64, 1024)
	for i := range as {
		as[i] = -0.95 + 1.9*float64(i*7919%1024)/1024
	}
	b.Run("table+newton", func(b *testing.B) {
		s := 0.0
		for i := 0; b.Loop(); i++ {
			s += eq22cRoot(as[i&1023])
		}
		_ = s
	})
	b.Run("trigonometric", func(b *testing.B) {
		s := 0.0
		for i := 0; b.Loop(); i++ {
			s += math.Cos(math.Pi/3 + math.Acos(as[i&1023])/3)
		}
		_ = s
	})
}
