package propagation

import "math"

// Variability of the Longley–Rice ITM: G. A. Hufford, "The ITS Irregular
// Terrain Model, version 1.2.2: the Algorithm" (NTIA/ITS, 1995),
// subroutines avar, curve and qerfi; the climate curves are those of
// NTIA Report 82-100 (G. A. Hufford, A. G. Longley, W. A. Kissick, 1982)
// and ERL 79-ITS 67 (A. G. Longley and P. L. Rice, 1968).

// itmInverseQ returns the standard normal deviate z with Q(z) = q, the
// upper-tail probability, for 0 < q < 1: positive for q < 0.5. It is the
// rational approximation of Abramowitz and Stegun, Handbook of
// Mathematical Functions (1964), 26.2.23 (|error| < 4.5e−4), as the model
// uses it (Hufford 1995, function qerfi); at q = 0.5 it gives 2.4e−7.
func itmInverseQ(q float64) float64 {
	const (
		c0 = 2.515516
		c1 = 0.802853
		c2 = 0.010328
		d1 = 1.432788
		d2 = 0.189269
		d3 = 0.001308
	)
	x := q // the smaller tail probability
	if q > 0.5 {
		x = 1 - q
	}
	t := math.Sqrt(-2 * math.Log(x))
	v := t - ((c2*t+c1)*t+c0)/(((d3*t+d2)*t+d1)*t+1)
	if q > 0.5 {
		v = -v
	}
	return v
}

// itmCurveCoef are the five coefficients of the model's climate curve
// C(c_1, c_2, x_1, x_2, x_3; d_e), the x in km.
type itmCurveCoef struct{ c1, c2, x1, x2, x3 float64 }

// at returns [c_1 + c_2/(1 + ((d_e − x_2)/x_3)²)] (d_e/x_1)²/(1 + (d_e/x_1)²)
// for d_e in km (Hufford 1995, function curve).
func (c *itmCurveCoef) at(deKM float64) float64 {
	a := (deKM - c.x2) / c.x3
	b := deKM / c.x1
	b *= b
	return (c.c1 + c.c2/(1+a*a)) * b / (1 + b)
}

// itmClimateCurves are the climate-dependent coefficients of the
// variability (Hufford 1995, subroutine avar, data statements; NTIA Report
// 82-100), indexed by climate − 1: the median adjustment V_med, the time
// spreads below (σ_T−) and above (σ_T+) the median, the C_D and z_D of the
// extreme upper tail, and the frequency factors g− and g+ (b_1, b_2, b_3).
var itmClimateCurves = [7]struct {
	vmed, sigTm, sigTp itmCurveCoef
	cd, zd             float64
	gm, gp             [3]float64
}{
	{ // 1 equatorial
		itmCurveCoef{-9.67, 12.7, 144.9, 190.3, 133.8},
		itmCurveCoef{2.13, 159.5, 762.2, 123.6, 94.5},
		itmCurveCoef{2.11, 102.3, 636.9, 134.8, 95.6},
		1.224, 1.282, [3]float64{1, 0, 0}, [3]float64{1, 0, 0},
	},
	{ // 2 continental subtropical
		itmCurveCoef{-0.62, 9.19, 228.9, 205.2, 143.6},
		itmCurveCoef{2.66, 7.67, 100.4, 172.5, 136.4},
		itmCurveCoef{6.87, 15.53, 138.7, 143.7, 98.6},
		0.801, 2.161, [3]float64{1, 0, 0}, [3]float64{0.93, 0.31, 2.00},
	},
	{ // 3 maritime subtropical
		itmCurveCoef{1.26, 15.5, 262.6, 185.2, 99.8},
		itmCurveCoef{6.11, 6.65, 138.2, 242.2, 178.6},
		itmCurveCoef{10.08, 9.60, 165.3, 225.7, 129.7},
		1.380, 1.282, [3]float64{1, 0, 0}, [3]float64{1, 0, 0},
	},
	{ // 4 desert
		itmCurveCoef{-9.21, 9.05, 84.1, 101.1, 98.6},
		itmCurveCoef{1.98, 13.11, 139.1, 132.7, 193.5},
		itmCurveCoef{3.68, 159.3, 464.4, 93.1, 94.2},
		1.000, 20.0, [3]float64{1, 0, 0}, [3]float64{0.93, 0.19, 1.79},
	},
	{ // 5 continental temperate
		itmCurveCoef{-0.62, 9.19, 228.9, 205.2, 143.6},
		itmCurveCoef{2.68, 7.16, 93.7, 186.8, 133.5},
		itmCurveCoef{4.75, 8.12, 93.2, 135.9, 113.4},
		1.224, 1.282, [3]float64{0.92, 0.25, 1.77}, [3]float64{0.93, 0.31, 2.00},
	},
	{ // 6 maritime temperate over land
		itmCurveCoef{-0.39, 2.86, 141.7, 315.9, 167.4},
		itmCurveCoef{6.86, 10.38, 187.8, 169.6, 108.9},
		itmCurveCoef{8.58, 13.97, 216.0, 152.0, 122.7},
		1.518, 1.282, [3]float64{1, 0, 0}, [3]float64{1, 0, 0},
	},
	{ // 7 maritime temperate over sea
		itmCurveCoef{3.15, 857.9, 2222.0, 164.8, 116.3},
		itmCurveCoef{8.51, 169.8, 609.8, 119.9, 106.6},
		itmCurveCoef{8.43, 8.19, 136.2, 188.5, 122.9},
		1.518, 1.282, [3]float64{1, 0, 0}, [3]float64{1, 0, 0},
	},
}

// itmVar is the outcome of the variability step.
type itmVar struct {
	av   float64 // attenuation relative to free space, dB
	vmed float64 // climate adjustment of the median, dB
	warn ITMWarnings
	// The spreads (dB) and deviates after the mode's substitution.
	sigT, sigL, sigS float64
	zT, zL, zS       float64
	de               float64 // effective distance, m
}

// itmEffectiveDistanceM returns the effective distance d_e (m) of a path
// of length d (m) for effective heights he (m) and wave number k (m⁻¹):
// 130 km at the distance d_ex where the smooth-earth horizons plus a
// frequency term reach, scaled linearly below it and shifted above
// (Hufford 1995, subroutine avar).
func itmEffectiveDistanceM(d, he1, he2, k float64) float64 {
	dex := math.Sqrt(18e6*he1) + math.Sqrt(18e6*he2) + math.Cbrt(575.7e12/k)
	if d < dex {
		return 130e3 * d / dex
	}
	return 130e3 + d - dex
}

// variability returns the attenuation A_v (dB, relative to free space) not
// exceeded for the configured percentages, from A_ref (dB): the climate's
// median adjustment and the time, location and situation spreads combined
// by the mode of variability, with the compression of negative values
// (Hufford 1995, subroutine avar).
func (ip *itmPath) variability(cfg *itmConfig, aref float64) itmVar {
	var v itmVar
	cc := &itmClimateCurves[cfg.climate-1]
	v.de = itmEffectiveDistanceM(ip.d, ip.he[0], ip.he[1], ip.k)
	deKM := v.de / 1000
	v.vmed = cc.vmed.at(deKM)
	lf := math.Log(0.133 * ip.k)
	g := func(b [3]float64) float64 { return b[0] + b[1]/((b[2]*lf)*(b[2]*lf)+1) }
	sgtm := cc.sigTm.at(deKM) * g(cc.gm)
	sgtp := cc.sigTp.at(deKM) * g(cc.gp)
	sgtd := sgtp * cc.cd
	tgtd := (sgtp - sgtd) * cc.zd

	if !cfg.elimLoc {
		q := ip.k * itmDeltaH(ip.dh, ip.d)
		v.sigL = 10 * q / (q + 13)
	}
	if !cfg.elimSi {
		v.sigS = 5 + 3*math.Exp(-v.de/100e3)
	}

	zT := itmInverseQ(cfg.time / 100)
	zL := itmInverseQ(cfg.loc / 100)
	zS := itmInverseQ(cfg.sit / 100)
	switch cfg.mode {
	case ITMSingleMessage:
		zT, zL = zS, zS
	case ITMAccidental:
		zL = zS
	case ITMMobile:
		zL = zT
	}
	if math.Abs(zT) > 3.1 || math.Abs(zL) > 3.1 || math.Abs(zS) > 3.1 {
		v.warn |= ITMWarnExtremeQuantile
	}
	v.zT, v.zL, v.zS = zT, zL, zS

	switch {
	case zT < 0:
		v.sigT = sgtm
	case zT <= cc.zd:
		v.sigT = sgtp
	default:
		v.sigT = sgtd + tgtd/zT
	}
	yT := v.sigT * zT
	yL := v.sigL * zL
	s2 := v.sigS*v.sigS + yT*yT/(7.8+zS*zS) + yL*yL/(24+zS*zS)
	var yR, yS float64
	switch cfg.mode {
	case ITMSingleMessage:
		yS = math.Sqrt(v.sigT*v.sigT+v.sigL*v.sigL+s2) * zS
	case ITMAccidental:
		yR = yT
		yS = math.Sqrt(v.sigL*v.sigL+s2) * zS
	case ITMMobile:
		yR = math.Sqrt(v.sigT*v.sigT+v.sigL*v.sigL) * zT
		yS = math.Sqrt(s2) * zS
	case ITMBroadcast:
		yR = yT + yL
		yS = math.Sqrt(s2) * zS
	}
	av := aref - v.vmed - yR - yS
	if av < 0 {
		av = av * (29 - av) / (29 - 10*av)
	}
	v.av = av
	return v
}
