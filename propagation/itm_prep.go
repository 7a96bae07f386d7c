package propagation

import (
	"fmt"
	"math"
	"math/cmplx"
	"slices"
)

// Preparation of a point-to-point path for the Longley–Rice ITM: G. A.
// Hufford, "The ITS Irregular Terrain Model, version 1.2.2: the Algorithm"
// (NTIA/ITS, 1995), subroutines qlrpfl, qlrps, hzns, dlthx and zlsq1; the
// effective-height and horizon formulas are those of A. G. Longley and
// P. L. Rice, ESSA Tech. Rep. ERL 79-ITS 67 (1968).

// itmGammaA is the curvature of the actual earth, 157e−9 m⁻¹ (≈ 1/6370 km)
// (Hufford 1995, subroutine qlrps).
const itmGammaA = 157e-9

// itmPath is one path as the model sees it: the equally spaced profile, the
// terminals and every prepared quantity. Distances and heights in metres,
// angles in radians, f in MHz.
type itmPath struct {
	z     []float64 // ground elevations amsl, n+1 points, TX first
	n     int       // number of intervals
	dx, d float64   // spacing and path length
	h     [2]float64

	f, k   float64 // frequency MHz, wave number f/47.7 m⁻¹
	ns, ae float64 // surface refractivity, effective earth radius
	zg     complex128

	dh        float64    // terrain irregularity Δh
	he        [2]float64 // effective heights
	dl, the   [2]float64 // horizon distances and angles (final)
	dlsrch    [2]float64 // horizon distances from the profile search
	dls       [2]float64 // smooth-earth horizon distances √(2 h_e a_e)
	dlsa, dla float64    // d_sML, d_ML
	tha       float64    // max(θ_1 + θ_2, −d_ML/a_e) = −θ_los
	xae       float64    // X = (a_e²/f)^(1/3)

	warn ITMWarnings
}

// maxR and minR return a when it is larger (smaller) than b, else b: with
// a NaN operand they return b, as the model's reference arithmetic does.
func maxR(a, b float64) float64 {
	if a > b {
		return a
	}
	return b
}

func minR(a, b float64) float64 {
	if a < b {
		return a
	}
	return b
}

// dim is max(a − b, 0), the FORTRAN DIM the model's equations use.
func dim(a, b float64) float64 {
	if a > b {
		return a - b
	}
	return 0
}

// load checks that p is an equally spaced profile with finite heights and
// takes it with the structural antenna heights h1, h2 (m).
func (ip *itmPath) load(p Path, h1, h2 float64) error {
	if err := checkPath(p); err != nil {
		return err
	}
	n := len(p.DistKM) - 1
	dist := p.DistKM[:n+1]
	dKM := dist[n] - dist[0]
	if !finite(dist[0]) || !finite(dKM) || !(dKM > 0) {
		return fmt.Errorf("%w: path length %g km from distances %g to %g km must be positive", ErrBadPath, dKM, dist[0], dist[n])
	}
	dxKM := dKM / float64(n)
	tol := 1e-3 * dxKM
	for i, x := range dist {
		if want := dist[0] + float64(i)*dxKM; !(math.Abs(x-want) <= tol) {
			return fmt.Errorf("%w: the ITM needs equally spaced profile points: point %d is at %g km, expected %g km", ErrBadPath, i, x, want)
		}
	}
	for i, z := range p.HeightM[:n+1] {
		if !finite(z) {
			return fmt.Errorf("%w: terrain height %g m at point %d is not a number; fill voids before computing loss", ErrBadPath, z, i)
		}
	}
	ip.z = p.HeightM[:n+1]
	ip.n = n
	ip.dx = dKM * 1000 / float64(n)
	ip.d = float64(n) * ip.dx
	ip.h = [2]float64{h1, h2}
	return nil
}

// itmSystemElevationM returns h_sys, the mean ground elevation (m) of the
// points ⌊0.1 n⌋ … n − ⌊0.1 n⌋ of a profile of n intervals, which sets the
// surface refractivity (Hufford 1995, subroutine qlrpfl).
func itmSystemElevationM(z []float64) float64 {
	n := len(z) - 1
	p := int(0.1 * float64(n))
	sum := 0.0
	for _, v := range z[p : n-p+1] {
		sum += v
	}
	return sum / float64(n-2*p+1)
}

// itmSurfaceRefractivity returns N_s = N_0 exp(−h_sys/9460 m) in N-units
// (Hufford 1995, subroutine qlrps).
func itmSurfaceRefractivity(n0, hSysM float64) float64 {
	return n0 * math.Exp(-hSysM/9460)
}

// itmEarthRadiusM returns the effective earth radius a_e in m for surface
// refractivity ns: 1/γ_e with γ_e = γ_a (1 − 0.04665 exp(N_s/179.3))
// (Hufford 1995, subroutine qlrps).
func itmEarthRadiusM(ns float64) float64 {
	return 1 / (itmGammaA * (1 - 0.04665*math.Exp(ns/179.3)))
}

// itmGroundImpedance returns the surface transfer impedance Z_g of the
// ground for relative permittivity eps, conductivity sigma (S/m) and f
// (MHz): √(ε′ − 1) for horizontal, √(ε′ − 1)/ε′ for vertical polarization,
// with ε′ = ε + i 18 000 σ/f (Hufford 1995, subroutine qlrps).
func itmGroundImpedance(eps, sigma, fMHz float64, pol Polarization) complex128 {
	ep := complex(eps, 18000*sigma/fMHz)
	zg := cmplx.Sqrt(ep - 1)
	if pol == Vertical {
		zg /= ep
	}
	return zg
}

// horizons finds the horizon of each terminal on the profile: the interior
// point of largest elevation angle, angles including the curvature drop
// −x/(2 a_e); on a clear path each terminal sees the other (Hufford 1995,
// subroutine hzns). Distances accumulate by repeated ±Δx, as there.
func (ip *itmPath) horizons() {
	z, n, d := ip.z, ip.n, ip.d
	za, zb := z[0]+ip.h[0], z[n]+ip.h[1]
	qc := 0.5 / ip.ae
	ip.the[0] = (zb-za)/d - qc*d
	ip.the[1] = (za-zb)/d - qc*d
	ip.dl = [2]float64{d, d}
	x, y := 0.0, d
	for i := 1; i < n; i++ {
		x += ip.dx
		y -= ip.dx
		if q := (z[i]-za)/x - qc*x; q > ip.the[0] {
			ip.the[0], ip.dl[0] = q, x
		}
		if q := (z[i]-zb)/y - qc*y; q > ip.the[1] {
			ip.the[1], ip.dl[1] = q, y
		}
	}
}

// fitWeighted fits a straight line by least squares to z[ia..ib] with
// trapezoidal weights (½ at both ends) and returns the mean ȳ and slope b
// (per index) about the centre c = (ia+ib)/2 (Hufford 1995, subroutine
// zlsq1). It needs ib > ia.
func fitWeighted(z []float64, ia, ib int) (ybar, b, c float64) {
	c = 0.5 * float64(ia+ib)
	l := float64(ib - ia)
	s0 := 0.5 * (z[ia] + z[ib])
	s1 := 0.5*(float64(ia)-c)*z[ia] + 0.5*(float64(ib)-c)*z[ib]
	for i := ia + 1; i < ib; i++ {
		s0 += z[i]
		s1 += (float64(i) - c) * z[i]
	}
	return s0 / l, 12 * s1 / (l * (l*l + 2)), c
}

// fitEnds fits a line to the profile over the window [xa, xb] (m) and
// returns its heights at the two ends of the whole profile (Hufford 1995,
// subroutine zlsq1): the window starts at the point at or before xa and
// ends at the point at or after xb, and is widened by a point each way
// when that leaves fewer than two points.
func (ip *itmPath) fitEnds(xa, xb float64) (z1, z2 float64) {
	n := ip.n
	ia := int(maxR(xa/ip.dx, 0))
	ib := n - int(maxR(float64(n)-xb/ip.dx, 0))
	if ib <= ia {
		ia = max(ia-1, 0)
		ib = min(ib+1, n)
	}
	ybar, b, c := fitWeighted(ip.z, ia, ib)
	return ybar - b*c, ybar + b*(float64(n)-c)
}

// itmMaxDeltaHSamples is the largest sample count of the Δh calculation,
// 10 × 25 − 5.
const itmMaxDeltaHSamples = 245

// terrainIrregularity returns Δh (m) over the window [xa, xb] (m): the
// interdecile range of the terrain's departures from a straight line
// fitted to it, sampled at 10 p − 5 points, corrected to an infinite path
// by 1/(1 − 0.8 exp(−(xb − xa)/50 km)) (Hufford 1995, subroutine dlthx).
func (ip *itmPath) terrainIrregularity(xa, xb float64) float64 {
	ua, ub := xa/ip.dx, xb/ip.dx
	if !(ub-ua >= 2) {
		return 0
	}
	p10 := min(max(int(0.1*(ub-ua+8)), 4), 25)
	ns := 10*p10 - 5
	var buf [itmMaxDeltaHSamples]float64
	s := buf[:ns]
	step := (ub - ua) / float64(ns-1)
	z, n := ip.z, ip.n
	for j := range s {
		u := ua + float64(j)*step
		i := min(max(int(u), 0), n-1)
		s[j] = z[i] + (z[i+1]-z[i])*(u-float64(i))
	}
	ybar, b, c := fitWeighted(s, 0, ns-1)
	for j := range s {
		s[j] -= ybar + b*(float64(j)-c)
	}
	slices.Sort(s)
	q10, q90 := s[ns-p10], s[p10-1]
	return (q10 - q90) / (1 - 0.8*math.Exp(-(xb-xa)/50e3))
}

// prepare completes the path for frequency f (MHz) and the model's
// atmosphere and ground: N_s, a_e, Z_g, horizons, Δh, effective heights,
// the derived distances, and the warnings (Hufford 1995, subroutines
// qlrpfl, qlrps and the checks of lrprop).
func (ip *itmPath) prepare(cfg *itmConfig, fMHz float64) error {
	ip.f = fMHz
	ip.k = fMHz / 47.7
	if cfg.ns != 0 {
		ip.ns = cfg.ns
	} else {
		ip.ns = itmSurfaceRefractivity(cfg.n0, itmSystemElevationM(ip.z))
	}
	switch {
	case ip.ns < 150:
		return fmt.Errorf("%w: surface refractivity N_s %.1f N-units is below 150", ErrBadParams, ip.ns)
	case ip.ns > 400:
		return fmt.Errorf("%w: surface refractivity N_s %.1f N-units is above 400: N0 %g with the path's mean elevation below sea level", ErrBadParams, ip.ns, cfg.n0)
	case !(ip.ns >= 150):
		return fmt.Errorf("%w: surface refractivity N_s is not a number", ErrBadParams)
	case ip.ns < 250:
		ip.warn |= ITMWarnRefractivity
	}
	ip.ae = itmEarthRadiusM(ip.ns)
	if !(ip.ae >= 4e6 && ip.ae <= 13333333) {
		return fmt.Errorf("%w: effective earth radius %.0f km from N_s %.1f is outside 4000–13 333 km", ErrBadParams, ip.ae/1000, ip.ns)
	}
	ip.zg = itmGroundImpedance(cfg.eps, cfg.sigma, fMHz, cfg.pol)
	if !(real(ip.zg) > math.Abs(imag(ip.zg))) {
		return fmt.Errorf("%w: ground ε %g, σ %g S/m give a surface impedance the ITM cannot use at %g MHz; raise ε", ErrBadParams, cfg.eps, cfg.sigma, fMHz)
	}

	ip.horizons()
	ip.dlsrch = ip.dl
	d, h := ip.d, ip.h
	xa := minR(15*h[0], 0.1*ip.dl[0])
	xb := d - minR(15*h[1], 0.1*ip.dl[1])
	ip.dh = ip.terrainIrregularity(xa, xb)
	if ip.dl[0]+ip.dl[1] > 1.5*d {
		// Well within line of sight: empirical horizons (Hufford 1995,
		// subroutine qlrpfl).
		z1, z2 := ip.fitEnds(xa, xb)
		ip.he[0] = h[0] + dim(ip.z[0], z1)
		ip.he[1] = h[1] + dim(ip.z[ip.n], z2)
		ip.empiricalHorizons()
		if q := ip.dl[0] + ip.dl[1]; q <= d {
			g := (d / q) * (d / q)
			ip.he[0] *= g
			ip.he[1] *= g
			ip.empiricalHorizons()
		}
		for j := range 2 {
			ip.the[j] = (0.65*ip.dh*(ip.dls[j]/ip.dl[j]-1) - 2*ip.he[j]) / ip.dls[j]
		}
	} else {
		z1, _ := ip.fitEnds(xa, 0.9*ip.dl[0])
		ip.he[0] = h[0] + dim(ip.z[0], z1)
		_, z2 := ip.fitEnds(d-0.9*ip.dl[1], xb)
		ip.he[1] = h[1] + dim(ip.z[ip.n], z2)
	}

	// Derived quantities (Hufford 1995, subroutine lrprop, first call).
	for j := range 2 {
		ip.dls[j] = math.Sqrt(2 * ip.he[j] * ip.ae)
	}
	ip.dlsa = ip.dls[0] + ip.dls[1]
	ip.dla = ip.dl[0] + ip.dl[1]
	ip.tha = maxR(ip.the[0]+ip.the[1], -ip.dla/ip.ae)
	ip.xae = math.Cbrt(ip.ae * ip.ae / fMHz)

	for j, w := range [2][3]ITMWarnings{
		{ITMWarnTxHorizonAngle, ITMWarnTxHorizonNear, ITMWarnTxHorizonFar},
		{ITMWarnRxHorizonAngle, ITMWarnRxHorizonNear, ITMWarnRxHorizonFar},
	} {
		if math.Abs(ip.the[j]) > 0.2 {
			ip.warn |= w[0]
		}
		if ip.dl[j] < 0.1*ip.dls[j] {
			ip.warn |= w[1]
		}
		if ip.dl[j] > 3*ip.dls[j] {
			ip.warn |= w[2]
		}
	}
	if d < math.Abs(ip.he[0]-ip.he[1])/0.2 {
		ip.warn |= ITMWarnSteepPath
	}
	if d < 1e3 {
		ip.warn |= ITMWarnShortPath
	}
	if d > 1000e3 {
		ip.warn |= ITMWarnLongPath
	}
	if d > 2000e3 {
		ip.warn |= ITMWarnVeryLongPath
	}
	// NTIA Report 82-100 (Hufford, Longley, Kissick 1982), table of Δh by
	// terrain type: above 700 m is "extremely rugged mountains" (from
	// memory). This package's advisory, not one of the model's checks.
	if ip.dh > 700 {
		ip.warn |= ITMWarnRoughTerrain
	}
	return nil
}

// empiricalHorizons sets the smooth-earth horizons d_Ls = √(2 h_e a_e) and
// the horizons d_L = d_Ls exp(−0.07 √(Δh/max(h_e, 5))) from the effective
// heights (Hufford 1995, subroutine qlrpfl).
func (ip *itmPath) empiricalHorizons() {
	for j := range 2 {
		ip.dls[j] = math.Sqrt(2 * ip.he[j] * ip.ae)
		ip.dl[j] = ip.dls[j] * math.Exp(-0.07*math.Sqrt(ip.dh/maxR(ip.he[j], 5)))
	}
}
