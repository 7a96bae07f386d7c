package report

import (
	"math"
	"testing"
)

func TestNiceTicks(t *testing.T) {
	cases := []struct {
		lo, hi   float64
		target   int
		step     float64 // 1, 2, 2.5 or 5 × 10^n (common practice)
		min, max float64
	}{
		{0, 11, 8, 2, 0, 12},
		{0, 1.3, 8, 0.2, 0, 1.4},
		{283, 1720, 6, 250, 250, 1750},
		{-12, 37, 6, 10, -20, 40},
		{0, 100, 4, 25, 0, 100},
	}
	for _, c := range cases {
		tk := niceTicks(c.lo, c.hi, c.target)
		if math.Abs(tk.step-c.step) > 1e-12 || math.Abs(tk.min-c.min) > 1e-9 || math.Abs(tk.max-c.max) > 1e-9 {
			t.Errorf("niceTicks(%g, %g, %d) = step %g over %g..%g, want step %g over %g..%g", c.lo, c.hi, c.target, tk.step, tk.min, tk.max, c.step, c.min, c.max)
		}
	}
	if got := (ticks{step: 0.25}).label(0.5); got != "0.50" {
		t.Errorf("label 0.5 at step 0.25 = %q, want 0.50", got)
	}
}
