package propagation

import "math"

// SmoothEarthLossDB returns the diffraction loss in dB, relative to free
// space, over a smooth spherical earth for a path distKM kilometres long
// between antennas h1M and h2M metres above the surface, by ITU-R P.526-16
// §3.2 (eqs. 21–25): beyond the radio horizon the first term of the residue
// series (§3.1.1, eqs. 11–18); within it the loss interpolated between zero
// at the clearance h_req and the first-term loss for the modified radius
// a_em. It uses FreqMHz, EarthRadiusKM, Polarization, Ground and
// SpeedOfLight from prm (antenna heights come from the arguments). The
// formulas hold above about 10 MHz. The result is never negative (where the
// first term would predict a field above free space, it is 0).
// Non-positive distances give 0; negative heights count as 0.
func SmoothEarthLossDB(distKM, h1M, h2M float64, prm Params) (float64, error) {
	rp, err := prm.resolve()
	if err != nil {
		return 0, err
	}
	return smoothEarthLoss(distKM, h1M, h2M, rp), nil
}

// smoothEarthLoss implements ITU-R P.526-16 §3.2.
func smoothEarthLoss(dKM, h1, h2 float64, rp params) float64 {
	c := newFirstTerm(rp.aeKM, rp)
	return smoothEarthLossC(dKM, h1, h2, rp, &c)
}

// smoothEarthLossC is smoothEarthLoss with the first-term constants of the
// effective radius rp.aeKM worked out once (ft = newFirstTerm(rp.aeKM, rp)).
func smoothEarthLossC(dKM, h1, h2 float64, rp params, ft *firstTerm) float64 {
	if !(dKM > 0) {
		return 0
	}
	h1 = max(h1, 0)
	h2 = max(h2, 0)
	if dKM >= RadioHorizonKM(h1, h2, rp.aeKM) {
		// Very short paths between antennas on the surface give X so small
		// that the first term predicts a field above free space; like
		// eq. 25's negative A_h, that counts as no loss. In eq. 66 it makes
		// no difference (max(L_sph − L_bs, 0) with L_bs ≥ 0).
		return max(ft.loss(dKM, h1, h2), 0)
	}
	// Within the horizon: work in metres.
	d := dKM * 1000
	ae := rp.aeKM * 1000
	c := (h1 - h2) / (h1 + h2)                       // eq. 22d
	m := d * d / (4 * ae * (h1 + h2))                // eq. 22e
	arg := 1.5 * c * math.Sqrt(3*m/math.Pow(m+1, 3)) // argument of arccos in eq. 22c
	arg = max(-1, min(1, arg))
	b := 2 * math.Sqrt((m+1)/(3*m)) * math.Cos(math.Pi/3+math.Acos(arg)/3) // eq. 22c
	b = max(-1, min(1, b))                                                 // |b| ≤ 1; rounding can step past it when an antenna is on the surface
	d1 := d / 2 * (1 + b)                                                  // eq. 22a
	d2 := d - d1                                                           // eq. 22b
	h := ((h1-d1*d1/(2*ae))*d2 + (h2-d2*d2/(2*ae))*d1) / d                 // eq. 22
	h = max(h, 0)                                                          // within the horizon the ray clears the surface
	hreq := 0.552 * math.Sqrt(d1*d2*rp.wavelengthM/d)                      // eq. 23
	if h > hreq {
		return 0
	}
	s := math.Sqrt(h1) + math.Sqrt(h2)
	aem := 0.5 * (d / s) * (d / s) // eq. 24, metres
	ah := firstTermLoss(dKM, h1, h2, aem/1000, rp)
	if ah < 0 {
		return 0
	}
	if hreq == 0 {
		// An antenna on the surface: the ray grazes it at that end (h = 0,
		// d1 or d2 = 0), the limit of eq. 25 is A_h.
		return ah
	}
	return (1 - h/hreq) * ah // eq. 25
}

// firstTermLoss is the loss −(F(X) + G(Y1) + G(Y2)) of the first term of the
// residue series (ITU-R P.526-16 §3.1.1, eqs. 11a–18), distance in km, heights
// in m, for an effective radius aeKM.
func firstTermLoss(dKM, h1, h2, aeKM float64, rp params) float64 {
	c := newFirstTerm(aeKM, rp)
	return c.loss(dKM, h1, h2)
}

// firstTerm holds what eqs. 11a–18 need that depends on the effective
// radius, frequency, ground and polarization only.
type firstTerm struct {
	xPerKM float64 // X per km of path, eq. 14a
	yb     float64 // β·Y per metre of height, eqs. 15a, 18
	floor  float64 // 2 + 20 log K, the floor of G (eq. 18)
}

// newFirstTerm works out the constants of eqs. 11a, 12a, 14a, 15a and 16
// for an effective radius aeKM.
func newFirstTerm(aeKM float64, rp params) firstTerm {
	f := rp.freqMHz
	eps := rp.ground.Permittivity
	q := 18000 * rp.ground.ConductivitySM / f
	k := 0.36 * math.Pow(aeKM*f, -1.0/3) * math.Pow((eps-1)*(eps-1)+q*q, -0.25) // eq. 11a
	if rp.pol == Vertical {
		k *= math.Sqrt(eps*eps + q*q) // eq. 12a
	}
	k2 := k * k
	beta := (1 + 1.6*k2 + 0.67*k2*k2) / (1 + 4.5*k2 + 1.53*k2*k2) // eq. 16
	xk := 2.188 * beta * math.Cbrt(f) * math.Pow(aeKM, -2.0/3)    // eq. 14a per km
	yk := 9.575e-3 * beta * math.Pow(f, 2.0/3) / math.Cbrt(aeKM)  // eq. 15a per metre
	return firstTerm{xPerKM: xk, yb: beta * yk, floor: 2 + 20*math.Log10(k)}
}

// loss is −(F(X) + G(Y1) + G(Y2)) (eqs. 14a–18) for a path dKM long
// between heights h1, h2 metres.
func (c *firstTerm) loss(dKM, h1, h2 float64) float64 {
	x := c.xPerKM * dKM
	var fx float64 // eq. 17
	lx := lnFast(x)
	if x >= 1.6 {
		fx = 11 + 10/math.Ln10*lx - 17.6*x
	} else {
		fx = -20/math.Ln10*lx - 5.6488*math.Exp(1.425*lx) // x^1.425
	}
	return -(fx + heightGain(c.yb*h1, c.floor) + heightGain(c.yb*h2, c.floor))
}

// heightGain is G(Y) of ITU-R P.526-16 eq. 18 for B = βY, never below floor
// (2 + 20 log K).
func heightGain(b, floor float64) float64 {
	var g float64
	if b > 2 {
		g = 17.6*math.Sqrt(b-1.1) - 5*log10Fast(b-1.1) - 8
	} else {
		g = 20 * log10Fast(b+0.1*b*b*b)
	}
	if !(g >= floor) {
		return floor
	}
	return g
}
