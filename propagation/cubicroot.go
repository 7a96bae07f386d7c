package propagation

import "math"

// eq22cRoot returns cos(π/3 + arccos(a)/3) for a in [−1, 1], the factor of
// ITU-R P.526-16 eq. 22c: the root in [−½, ½] of 4t³ − 3t + a = 0 (the
// triple-angle identity cos 3θ = 4cos³θ − 3cos θ with 3θ = π + arccos a).
// For |a| ≤ eq22cMax it starts from a cubic Hermite table of the root
// (step 1/eq22cSteps in a) and takes two Newton steps on the cubic, within
// 2e−15 of the trigonometric form (TestEq22cRoot); nearer ±1, where the
// root turns double, it uses the trigonometric form itself.
func eq22cRoot(a float64) float64 {
	if !(a >= -eq22cMax && a <= eq22cMax) {
		return math.Cos(math.Pi/3 + math.Acos(max(-1, min(1, a)))/3)
	}
	t, _ := eq22cTable.at(a)
	for range 2 {
		t2 := t * t
		t -= (4*t2*t - 3*t + a) / (12*t2 - 3)
	}
	return t
}

const (
	eq22cMax   = 1 - 1.0/128 // nodes fall on both ends
	eq22cSteps = 128
)

// eq22cTable holds the root and its derivative dt/da = −1/(12t² − 3).
var eq22cTable = newHermite2(-eq22cMax, eq22cMax, eq22cSteps, func(a float64) (t, dt, _, _ float64) {
	t = math.Cos(math.Pi/3 + math.Acos(a)/3)
	return t, -1 / (12*t*t - 3), 0, 0
})
