package propagation

import "math"

// The delta-Bullington loss of one profile (ITU-R P.526-16 eq. 57),
// L_b = L_uc + (1 − exp(−L_uc/6))(10 + 0.02 d), depends on the path only
// through ν (L_uc = J(ν), eq. 31) and d. Two tables hold J(ν) and
// E(ν) = 1 − exp(−J(ν)/6) with their derivatives, every 1/256 from
// ν = −0.78 (where J starts, eq. 31) to 8 and every 1/32 from 8 to 128, and
// interpolate both by cubic Hermite polynomials: a logarithm, a square
// root and an exponential become one lookup and a few multiply-adds.
//
// Error: for cubic Hermite interpolation |f − p| ≤ h⁴/384 · max|f⁽⁴⁾|
// (common practice); J = 6.9 + (20/ln 10)·asinh(ν − 0.1), whose fourth
// derivative falls as ν⁻⁴, so the bound is below 1e−10 dB for J and E alike
// on both tables, which TestKnifeTable checks against the formulas on a
// dense grid. Beyond ν = 128 (J above 54 dB) the formulas are evaluated
// directly.
var (
	knifeNear = newHermite2(knifeMin, 8, 256, knifeFormulas)
	knifeFar  = newHermite2(8, 128, 32, knifeFormulas)
)

const knifeMin = -0.78

// knifeFormulas returns J(ν) (ITU-R P.526-16 eq. 31), E = 1 − exp(−J/6)
// and their derivatives in ν.
func knifeFormulas(nu float64) (j, dj, e, de float64) {
	v := nu - 0.1
	j = 6.9 + 20*math.Log10(math.Sqrt(v*v+1)+v)
	dj = 20 / math.Ln10 / math.Sqrt(v*v+1)
	x := math.Exp(-j / 6)
	return j, dj, 1 - x, x * dj / 6
}

// knifeLoss returns J(ν) (ITU-R P.526-16 eq. 31; 0 for ν ≤ −0.78) and
// E = 1 − exp(−J/6), the factor of eq. 57, within 1e−10 dB of the formulas.
func knifeLoss(nu float64) (j, e float64) {
	switch {
	case !(nu > knifeMin):
		return 0, 0
	case nu < knifeNear.x1:
		return knifeNear.at(nu)
	case nu < knifeFar.x1:
		return knifeFar.at(nu)
	}
	j, _, e, _ = knifeFormulas(nu)
	return j, e
}

// bullingtonLossTab is bullingtonLoss (ITU-R P.526-16 eqs. 50–57) with
// J(ν) and the exponential of eq. 57 from knifeLoss; it returns L_b in dB.
func bullingtonLossTab(stim, srim, nuMax, hts, hrs, d, wavelengthM float64) float64 {
	nu := nuMax
	if !(stim < (hrs-hts)/d) { // eq. 50: beyond line of sight
		db := (hrs - hts + srim*d) / (stim + srim)                                                // eq. 54
		nu = (hts + stim*db - (hts*(d-db)+hrs*db)/d) * math.Sqrt(0.002*d/(wavelengthM*db*(d-db))) // eq. 55
	}
	luc, e := knifeLoss(nu)    // eqs. 52, 56
	return luc + e*(10+0.02*d) // eq. 57
}

// hermite2 tabulates two functions of x and their derivatives at nodes
// every 1/perUnit from x0 to x1 and interpolates them by cubic Hermite
// polynomials (exact at the nodes, with continuous first derivatives).
type hermite2 struct {
	x0, x1, perUnit, h float64 // h = 1/perUnit
	nodes              []hermiteNode
}

type hermiteNode struct{ f, df, g, dg float64 }

func newHermite2(x0, x1, perUnit float64, fn func(x float64) (f, df, g, dg float64)) *hermite2 {
	n := int(math.Round((x1-x0)*perUnit)) + 1
	t := &hermite2{x0: x0, x1: x1, perUnit: perUnit, h: 1 / perUnit, nodes: make([]hermiteNode, n)}
	for i := range t.nodes {
		f, df, g, dg := fn(x0 + float64(i)/perUnit)
		t.nodes[i] = hermiteNode{f, df, g, dg}
	}
	return t
}

// at interpolates both functions at x in [x0, x1].
func (t *hermite2) at(x float64) (f, g float64) {
	u := (x - t.x0) * t.perUnit
	i := min(int(u), len(t.nodes)-2)
	s := u - float64(i)
	a, b := &t.nodes[i], &t.nodes[i+1]
	h := t.h
	s2 := s * s
	s3 := s2 * s
	h00, h10, h01, h11 := 2*s3-3*s2+1, (s3-2*s2+s)*h, -2*s3+3*s2, (s3-s2)*h
	return h00*a.f + h10*a.df + h01*b.f + h11*b.df, h00*a.g + h10*a.dg + h01*b.g + h11*b.dg
}
