package terrain

// Geodesics on the WGS84 ellipsoid after C. F. F. Karney, "Algorithms for
// geodesics", J. Geodesy 87 (2013) 43–55, written for this package.
//
// The problem is mapped onto the auxiliary sphere (reduced latitude β,
// spherical arc σ, spherical longitude ω). Distance and longitude follow from
// the integrals I1 (distance), I2 (reduced length) and I3 (longitude), each
// written as a secular term plus a Fourier series whose coefficients are
// series in ε (and n for I3), truncated at order 6 as in the paper (§3–§4).
// The inverse problem is solved by Newton's method on the azimuth α1 at the
// first point (§5), started from the spherical or, for near-antipodal
// points, the astroid estimate (§5, eqs. 55–57), with a bisection fallback
// that keeps the root bracketed.
//
// Equation numbers refer to the paper as quoted from memory; every series is
// checked against the integral it expands in geodesic_test.go, and the
// results against GeographicLib's GeodSolve.

import "math"

// WGS84A is the equatorial radius (semi-major axis) of the WGS84 ellipsoid,
// in metres (WGS84 defining parameter; NIMA TR8350.2, 3rd ed., Table 3.1).
const WGS84A = 6378137.0

// WGS84F is the flattening of the WGS84 ellipsoid, dimensionless,
// 1/298.257223563 (WGS84 defining parameter; NIMA TR8350.2, 3rd ed., Table 3.1).
const WGS84F = 1 / 298.257223563

const (
	gdDeg = math.Pi / 180 // radians per degree
	// gdTiny is the square root of the smallest normal float64: small enough
	// to vanish against any real value, large enough that its square does
	// not underflow.
	gdTiny = 0x1p-511
	gdTol0 = 0x1p-52 // float64 machine epsilon
	gdTol1 = 200 * gdTol0
	gdTol2 = 0x1p-26 // sqrt(gdTol0)
	gdTolB = gdTol0  // bisection: stop when the bracket is this narrow
	// gdXThresh bounds the strip near the cut of the astroid estimate.
	gdXThresh = 1000 * gdTol2
	// Newton's method gets gdMaxit1 steps; after that only bisection, up to
	// gdMaxit2 evaluations in all (53 bits of float64 plus margin).
	gdMaxit1 = 20
	gdMaxit2 = gdMaxit1 + 53 + 10
)

// geodEllipsoid holds an ellipsoid of revolution and the quantities derived
// from it that the geodesic algorithms need. The package uses only wgs84Geod;
// tests build others to check the series against their defining integrals.
type geodEllipsoid struct {
	a   float64 // equatorial radius, m
	f   float64 // flattening
	f1  float64 // 1 − f
	e2  float64 // first eccentricity squared, f(2 − f)
	ep2 float64 // second eccentricity squared, e2/(1 − e2)
	n   float64 // third flattening, f/(2 − f)
	b   float64 // polar semi-axis, m
	// etol2 is the σ12 below which the inverse problem uses the short-line
	// formulas directly.
	etol2 float64
	// a3x[j] is the coefficient of ε^j in A3 (Karney 2013, eq. 24) for this n.
	a3x [6]float64
	// c3x[l][j] is the coefficient of ε^j in C3l (eq. 25), l = 1..5, j = l..5.
	c3x [6][6]float64
}

// wgs84Geod is the WGS84 ellipsoid; read-only after package initialisation.
var wgs84Geod = newGeodEllipsoid(WGS84A, WGS84F)

func newGeodEllipsoid(a, f float64) *geodEllipsoid {
	g := &geodEllipsoid{a: a, f: f}
	g.f1 = 1 - f
	g.e2 = f * (2 - f)
	g.ep2 = g.e2 / (g.f1 * g.f1)
	g.n = f / (2 - f)
	g.b = a * g.f1
	g.etol2 = 0.1 * gdTol2 / math.Sqrt(math.Max(0.001, math.Abs(f))*math.Min(1, 1-f/2)/2)
	n := g.n
	// A3 = 1 − (1/2 − n/2)ε − (1/4 + n/8 − 3n²/8)ε² − (1/16 + 3n/16 + n²/16)ε³
	//      − (3/64 + n/32)ε⁴ − 3/128 ε⁵   (eq. 24)
	g.a3x = [6]float64{
		1,
		(n - 1) / 2,
		(3*n*n - n - 2) / 8,
		(-n*n - 3*n - 1) / 16,
		(-2*n - 3) / 64,
		-3.0 / 128,
	}
	// C3 (eq. 25).
	g.c3x[1] = [6]float64{0, (1 - n) / 4, (1 - n*n) / 8, (3 + 3*n - n*n) / 64, (5 + 2*n) / 128, 3.0 / 128}
	g.c3x[2] = [6]float64{0, 0, (2 - 3*n + n*n) / 32, (3 - 2*n - 3*n*n) / 64, (3 + n) / 128, 5.0 / 256}
	g.c3x[3] = [6]float64{0, 0, 0, (5 - 9*n + 5*n*n) / 192, (9 - 10*n) / 384, 7.0 / 512}
	g.c3x[4] = [6]float64{0, 0, 0, 0, (7 - 14*n) / 512, 7.0 / 512}
	g.c3x[5] = [6]float64{0, 0, 0, 0, 0, 21.0 / 2560}
	return g
}

// a3 returns A3(ε) (eq. 24).
func (g *geodEllipsoid) a3(eps float64) float64 {
	x := g.a3x
	return x[0] + eps*(x[1]+eps*(x[2]+eps*(x[3]+eps*(x[4]+eps*x[5]))))
}

// c3 sets c[l] = C3l(ε), l = 1..5 (eq. 25).
func (g *geodEllipsoid) c3(eps float64, c *[6]float64) {
	for l := 1; l <= 5; l++ {
		x := &g.c3x[l]
		v := 0.0
		for j := 5; j >= l; j-- {
			v = v*eps + x[j]
		}
		for j := 0; j < l; j++ {
			v *= eps
		}
		c[l] = v
	}
}

// gdEpsFromK2 returns ε = (√(1+k²) − 1)/(√(1+k²) + 1) (eq. 16) without
// cancellation.
func gdEpsFromK2(k2 float64) float64 {
	return k2 / (2*(1+math.Sqrt(1+k2)) + k2)
}

// gdA1m1 returns A1 − 1 with A1 = (1 + ε²/4 + ε⁴/64 + ε⁶/256)/(1 − ε)
// (eq. 17).
func gdA1m1(eps float64) float64 {
	e2 := eps * eps
	t := e2 * (64 + e2*(4+e2)) / 256
	return (t + eps) / (1 - eps)
}

// gdC1 sets c[l] = C1l(ε), l = 1..6 (eq. 18).
func gdC1(eps float64, c *[7]float64) {
	e2 := eps * eps
	d := eps
	c[1] = d * (-1.0/2 + e2*(3.0/16-e2/32))
	d *= eps
	c[2] = d * (-1.0/16 + e2*(1.0/32-9*e2/2048))
	d *= eps
	c[3] = d * (-1.0/48 + 3*e2/256)
	d *= eps
	c[4] = d * (-5.0/512 + 3*e2/512)
	d *= eps
	c[5] = d * (-7.0 / 1280)
	d *= eps
	c[6] = d * (-7.0 / 2048)
}

// gdC1p sets c[l] = C′1l(ε), l = 1..6, the coefficients of the reverted
// series σ = τ + Σ C′1l sin 2lτ (eq. 21).
func gdC1p(eps float64, c *[7]float64) {
	e2 := eps * eps
	d := eps
	c[1] = d * (1.0/2 + e2*(-9.0/32+205*e2/1536))
	d *= eps
	c[2] = d * (5.0/16 + e2*(-37.0/96+1335*e2/4096))
	d *= eps
	c[3] = d * (29.0/96 - 75*e2/128)
	d *= eps
	c[4] = d * (539.0/1536 - 2391*e2/2560)
	d *= eps
	c[5] = d * (3467.0 / 7680)
	d *= eps
	c[6] = d * (38081.0 / 61440)
}

// gdA2m1 returns A2 − 1 with A2 = (1 − 3ε²/4 − 7ε⁴/64 − 11ε⁶/256)/(1 + ε),
// equal to order 6 to the paper's (1 − ε)(1 + ε²/4 + 9ε⁴/64 + 25ε⁶/256)
// (eq. 42).
func gdA2m1(eps float64) float64 {
	e2 := eps * eps
	t := e2 * (-192 + e2*(-28-11*e2)) / 256
	return (t - eps) / (1 + eps)
}

// gdC2 sets c[l] = C2l(ε), l = 1..6 (eq. 43).
func gdC2(eps float64, c *[7]float64) {
	e2 := eps * eps
	d := eps
	c[1] = d * (1.0/2 + e2*(1.0/16+e2/32))
	d *= eps
	c[2] = d * (3.0/16 + e2*(1.0/32+35*e2/2048))
	d *= eps
	c[3] = d * (5.0/48 + 5*e2/256)
	d *= eps
	c[4] = d * (35.0/512 + 7*e2/512)
	d *= eps
	c[5] = d * (63.0 / 1280)
	d *= eps
	c[6] = d * (77.0 / 2048)
}

// gdSinSeries returns Σ_{l=1..len(c)-1} c[l] sin 2lx for sinx = sin x,
// cosx = cos x, by Clenshaw summation. c[0] is unused.
func gdSinSeries(sinx, cosx float64, c []float64) float64 {
	ar := 2 * (cosx - sinx) * (cosx + sinx) // 2 cos 2x
	var b1, b2 float64
	for l := len(c) - 1; l >= 1; l-- {
		b1, b2 = ar*b1-b2+c[l], b1
	}
	return 2 * sinx * cosx * b1 // sin 2x · b1
}

// gdSinSeries6 is gdSinSeries unrolled for the six-term C′1 series.
func gdSinSeries6(sinx, cosx float64, c *[7]float64) float64 {
	ar := 2 * (cosx - sinx) * (cosx + sinx)
	b1 := c[6]
	b2 := ar*b1 + c[5]
	b1 = ar*b2 - b1 + c[4]
	b2 = ar*b1 - b2 + c[3]
	b1 = ar*b2 - b1 + c[2]
	b2 = ar*b1 - b2 + c[1]
	return 2 * sinx * cosx * b2
}

// gdSinSeries5 is gdSinSeries unrolled for the five-term C3 series.
func gdSinSeries5(sinx, cosx float64, c *[6]float64) float64 {
	ar := 2 * (cosx - sinx) * (cosx + sinx)
	b1 := c[5]
	b2 := ar*b1 + c[4]
	b1 = ar*b2 - b1 + c[3]
	b2 = ar*b1 - b2 + c[2]
	b1 = ar*b2 - b1 + c[1]
	return 2 * sinx * cosx * b1
}

// gdNorm scales (x, y) to unit length.
func gdNorm(x, y float64) (float64, float64) {
	r := math.Hypot(x, y)
	return x / r, y / r
}

// gdTwoSum returns s = u + v rounded and the rounding error t, so that
// s + t = u + v exactly (Knuth's two-sum).
func gdTwoSum(u, v float64) (s, t float64) {
	s = u + v
	up := s - v
	vpp := s - up
	up -= u
	vpp -= v
	if s != 0 {
		t = 0 - (up + vpp)
	} else {
		t = s
	}
	return s, t
}

// gdAngNormalize reduces x degrees to [−180, 180], keeping the sign of x at
// ±180.
func gdAngNormalize(x float64) float64 {
	y := math.Remainder(x, 360)
	if math.Abs(y) == 180 {
		return math.Copysign(180, x)
	}
	return y
}

// gdAngDiff returns y − x in degrees reduced to [−180, 180], as d + e with e
// the rounding error of d.
func gdAngDiff(x, y float64) (d, e float64) {
	d, e = gdTwoSum(math.Remainder(-x, 360), math.Remainder(y, 360))
	d, e = gdTwoSum(math.Remainder(d, 360), e)
	if d == 0 || math.Abs(d) == 180 {
		// Take the sign from y − x when exact, else opposite to the error.
		s := -e
		if e == 0 {
			s = y - x
		}
		d = math.Copysign(d, s)
	}
	return d, e
}

// gdAngRound rounds tiny angles (degrees) so that values below 1/16 have no
// bits below 2^−57: this makes angles within about 1e−19° of the equator or
// the start meridian exact, the way GeographicLib does.
func gdAngRound(x float64) float64 {
	const z = 1.0 / 16
	y := math.Abs(x)
	if y < z {
		y = z - (z - y)
	}
	return math.Copysign(y, x)
}

// gdLatFix returns NaN for latitudes outside [−90°, 90°].
func gdLatFix(x float64) float64 {
	if math.Abs(x) > 90 {
		return math.NaN()
	}
	return x
}

// gdSincosd returns sin and cos of x degrees, exact at multiples of 90°:
// the argument is reduced exactly to [−45°, 45°] before conversion to
// radians.
func gdSincosd(x float64) (sinx, cosx float64) {
	r := math.Remainder(x, 360) // exact
	q := math.Round(r / 90)
	r -= 90 * q // exact (Sterbenz)
	return gdSincosQuadrant(x, r, int(q))
}

// gdSincosde returns sin and cos of (x + t) degrees, t a small correction
// to x.
func gdSincosde(x, t float64) (sinx, cosx float64) {
	r := math.Remainder(x, 90)
	q := math.Round((x - r) / 90)
	r = gdAngRound(r + t)
	return gdSincosQuadrant(x, r, int(q))
}

func gdSincosQuadrant(x, r float64, q int) (sinx, cosx float64) {
	s, c := math.Sincos(r * gdDeg)
	switch q & 3 {
	case 0:
		sinx, cosx = s, c
	case 1:
		sinx, cosx = c, -s
	case 2:
		sinx, cosx = -s, -c
	default:
		sinx, cosx = -c, s
	}
	cosx += 0 // −0 → +0
	if sinx == 0 {
		sinx = math.Copysign(sinx, x)
	}
	return sinx, cosx
}

// gdAtan2d returns atan2(y, x) in degrees, in [−180°, 180°], exact at
// multiples of 90°.
func gdAtan2d(y, x float64) float64 {
	q := 0
	if math.Abs(y) > math.Abs(x) {
		x, y = y, x
		q = 2
	}
	if math.Signbit(x) {
		x = -x
		q++
	}
	ang := math.Atan2(y, x) / gdDeg
	switch q {
	case 1:
		ang = math.Copysign(180, y) - ang
	case 2:
		ang = 90 - ang
	case 3:
		ang = -90 + ang
	}
	return ang
}

// gdAstroid returns the positive root k of
// k⁴ + 2k³ − (x² + y² − 1)k² − 2y²k − y² = 0 (Karney 2013, eq. 55), used to
// start Newton's method for nearly antipodal points.
func gdAstroid(x, y float64) float64 {
	p := x * x
	q := y * y
	r := (p + q - 1) / 6
	if q == 0 && r <= 0 {
		// y = 0 with |x| ≤ 1: the root is k = 0.
		return 0
	}
	s := p * q / 4 // r³·s in the paper's notation
	r2 := r * r
	r3 := r * r2
	disc := s * (s + 2*r3) // zero on the evolute p^(1/3) + q^(1/3) = 1
	u := r
	if disc >= 0 {
		t3 := s + r3
		// The sign of the root is chosen to maximise |t3| (no cancellation).
		if t3 < 0 {
			t3 -= math.Sqrt(disc)
		} else {
			t3 += math.Sqrt(disc)
		}
		t := math.Cbrt(t3)
		u += t
		if t != 0 {
			u += r2 / t
		}
	} else {
		// Three real roots; take the one that avoids cancellation.
		ang := math.Atan2(math.Sqrt(-disc), -(s + r3))
		u += 2 * r * math.Cos(ang/3)
	}
	v := math.Sqrt(u*u + q)
	var uv float64 // u + v, positive
	if u < 0 {
		uv = q / (v - u)
	} else {
		uv = u + v
	}
	w := (uv - q) / (2 * v)
	return uv / (math.Sqrt(uv+w*w) + w)
}

// lengths returns s12/b and m12/b (distance and reduced length, eqs. 15 and
// 40–41, both divided by b) for an arc from σ1 to σ2 on the auxiliary sphere,
// and m0 = A1 − A2.
func (g *geodEllipsoid) lengths(eps, sig12, ssig1, csig1, dn1, ssig2, csig2, dn2 float64) (s12b, m12b, m0 float64) {
	var c1, c2 [7]float64
	a1 := gdA1m1(eps)
	gdC1(eps, &c1)
	a2 := gdA2m1(eps)
	gdC2(eps, &c2)
	m0 = a1 - a2
	a1++
	a2++
	b1 := gdSinSeries(ssig2, csig2, c1[:]) - gdSinSeries(ssig1, csig1, c1[:])
	b2 := gdSinSeries(ssig2, csig2, c2[:]) - gdSinSeries(ssig1, csig1, c2[:])
	s12b = a1 * (sig12 + b1)
	j12 := m0*sig12 + (a1*b1 - a2*b2)
	// Parentheses keep the cancellation exact for coincident points.
	m12b = dn2*(csig1*ssig2) - dn1*(ssig1*csig2) - csig1*csig2*j12
	return s12b, m12b, m0
}

// gdLambda is the state of one evaluation of λ12(α1) in the inverse problem.
type gdLambda struct {
	lam12        float64 // λ12 − the target λ12, radians
	salp2, calp2 float64
	sig12        float64
	ssig1, csig1 float64
	ssig2, csig2 float64
	eps          float64
	dlam12       float64 // ∂λ12/∂α1 (eq. 46)
}

// lambda12 solves the hybrid problem: given β1, β2 and α1 (as sines and
// cosines), find λ12 − λ12target and, if diffp, its derivative with respect
// to α1 (Karney 2013 §5, eqs. 45–46).
func (g *geodEllipsoid) lambda12(sbet1, cbet1, dn1, sbet2, cbet2, dn2, salp1, calp1, slam120, clam120 float64, diffp bool) gdLambda {
	var r gdLambda
	if sbet1 == 0 && calp1 == 0 {
		// Break the degeneracy of the equatorial line (handled elsewhere).
		calp1 = -gdTiny
	}
	salp0 := salp1 * cbet1                  // sin α0 = sin α1 cos β1
	calp0 := math.Hypot(calp1, salp1*sbet1) // > 0

	// tan β1 = tan σ1 cos α1; tan ω1 = sin α0 tan σ1.
	ssig1, csig1 := sbet1, calp1*cbet1
	somg1, comg1 := salp0*sbet1, calp1*cbet1
	ssig1, csig1 = gdNorm(ssig1, csig1)

	// Enforce the symmetry |β2| = −β1 exactly: it avoids singularities in
	// the Newton iteration.
	if cbet2 != cbet1 {
		r.salp2 = salp0 / cbet2
	} else {
		r.salp2 = salp1
	}
	if cbet2 != cbet1 || math.Abs(sbet2) != -sbet1 {
		var d float64
		if cbet1 < -sbet1 {
			d = (cbet2 - cbet1) * (cbet1 + cbet2)
		} else {
			d = (sbet1 - sbet2) * (sbet1 + sbet2)
		}
		r.calp2 = math.Sqrt((calp1*cbet1)*(calp1*cbet1)+d) / cbet2
	} else {
		r.calp2 = math.Abs(calp1)
	}
	ssig2, csig2 := sbet2, r.calp2*cbet2
	somg2, comg2 := salp0*sbet2, r.calp2*cbet2
	ssig2, csig2 = gdNorm(ssig2, csig2)

	// σ12 = σ2 − σ1 and ω12 = ω2 − ω1, both in [0, π].
	r.sig12 = math.Atan2(math.Max(0, csig1*ssig2-ssig1*csig2), csig1*csig2+ssig1*ssig2)
	somg12 := math.Max(0, comg1*somg2-somg1*comg2)
	comg12 := comg1*comg2 + somg1*somg2
	// η = ω12 − λ12target
	eta := math.Atan2(somg12*clam120-comg12*slam120, comg12*clam120+somg12*slam120)
	k2 := calp0 * calp0 * g.ep2
	r.eps = gdEpsFromK2(k2)
	var c3 [6]float64
	g.c3(r.eps, &c3)
	b312 := gdSinSeries(ssig2, csig2, c3[:]) - gdSinSeries(ssig1, csig1, c3[:])
	domg12 := -g.f * g.a3(r.eps) * salp0 * (r.sig12 + b312)
	r.lam12 = eta + domg12
	r.ssig1, r.csig1, r.ssig2, r.csig2 = ssig1, csig1, ssig2, csig2

	if diffp {
		if r.calp2 == 0 {
			r.dlam12 = -2 * g.f1 * dn1 / sbet1
		} else {
			_, m12b, _ := g.lengths(r.eps, r.sig12, ssig1, csig1, dn1, ssig2, csig2, dn2)
			r.dlam12 = m12b * g.f1 / (r.calp2 * cbet2)
		}
	}
	return r
}

// inverseStart returns a starting α1 for Newton's method (Karney 2013 §5).
// For short lines it solves the problem outright and returns σ12 ≥ 0 with
// α2 and dnm; otherwise σ12 = −1. Near-antipodal points take the astroid
// estimate (eqs. 55–57).
func (g *geodEllipsoid) inverseStart(sbet1, cbet1, sbet2, cbet2, lam12, slam12, clam12 float64) (sig12, salp1, calp1, salp2, calp2, dnm float64) {
	sig12 = -1
	// β12 = β2 − β1 in [0, π); β12a = β2 + β1 in (−π, 0]
	sbet12 := sbet2*cbet1 - cbet2*sbet1
	cbet12 := cbet2*cbet1 + sbet2*sbet1
	sbet12a := sbet2*cbet1 + cbet2*sbet1
	shortline := cbet12 >= 0 && sbet12 < 0.5 && cbet2*lam12 < 0.5
	var somg12, comg12 float64
	if shortline {
		sbetm2 := (sbet1 + sbet2) * (sbet1 + sbet2)
		sbetm2 /= sbetm2 + (cbet1+cbet2)*(cbet1+cbet2) // sin²((β1+β2)/2)
		dnm = math.Sqrt(1 + g.ep2*sbetm2)
		omg12 := lam12 / (g.f1 * dnm)
		somg12, comg12 = math.Sincos(omg12)
	} else {
		somg12, comg12 = slam12, clam12
	}

	salp1 = cbet2 * somg12
	if comg12 >= 0 {
		calp1 = sbet12 + cbet2*sbet1*somg12*somg12/(1+comg12)
	} else {
		calp1 = sbet12a - cbet2*sbet1*somg12*somg12/(1-comg12)
	}
	ssig12 := math.Hypot(salp1, calp1)
	csig12 := sbet1*sbet2 + cbet1*cbet2*comg12

	switch {
	case shortline && ssig12 < g.etol2:
		// Really short lines.
		salp2 = cbet1 * somg12
		var t float64
		if comg12 >= 0 {
			t = somg12 * somg12 / (1 + comg12)
		} else {
			t = 1 - comg12
		}
		calp2 = sbet12 - cbet1*sbet2*t
		salp2, calp2 = gdNorm(salp2, calp2)
		sig12 = math.Atan2(ssig12, csig12)
	case math.Abs(g.n) > 0.1 || csig12 >= 0 || ssig12 >= 6*math.Abs(g.n)*math.Pi*cbet1*cbet1:
		// The spherical estimate is good enough.
	default:
		// Nearly antipodal. Scale λ12 and β2 to x, y coordinates in which
		// the antipode is the origin and the singular point is (−1, 0).
		// This package only builds oblate (f > 0) ellipsoids.
		lam12x := math.Atan2(-slam12, -clam12) // λ12 − π
		k2 := sbet1 * sbet1 * g.ep2
		eps := gdEpsFromK2(k2)
		lamscale := g.f * cbet1 * g.a3(eps) * math.Pi
		betscale := lamscale * cbet1
		x := lam12x / lamscale
		y := sbet12a / betscale
		if y > -gdTol1 && x > -1-gdXThresh {
			// Strip near the cut.
			salp1 = math.Min(1, -x)
			calp1 = -math.Sqrt(1 - salp1*salp1)
		} else {
			// Estimate ω12 from the astroid and α1 from the spherical
			// formula with it (works with π − ω12 since ω12 ≈ π).
			k := gdAstroid(x, y)
			omg12a := lamscale * (-x * k / (1 + k))
			somg12, comg12 = math.Sincos(omg12a)
			comg12 = -comg12
			salp1 = cbet2 * somg12
			calp1 = sbet12a - cbet2*sbet1*somg12*somg12/(1-comg12)
		}
	}
	// Sanity check on the guess; the reversed test lets NaN through.
	if !(salp1 <= 0) {
		salp1, calp1 = gdNorm(salp1, calp1)
	} else {
		salp1, calp1 = 1, 0
	}
	return sig12, salp1, calp1, salp2, calp2, dnm
}

// inverse solves the inverse problem (Karney 2013 §5) and returns the
// distance in metres and the sines and cosines of the forward azimuths at
// both ends.
func (g *geodEllipsoid) inverse(lat1, lon1, lat2, lon2 float64) (s12, salp1, calp1, salp2, calp2 float64) {
	// Bring the problem to the canonical form 0 ≤ λ12 ≤ 180°,
	// −90° ≤ φ1 ≤ −0, φ1 ≤ φ2 ≤ −φ1; lonsign, swapp, latsign record the
	// transformation (1 = unchanged).
	lon12, lon12s := gdAngDiff(lon1, lon2)
	lonsign := 1.0
	if math.Signbit(lon12) {
		lonsign = -1
	}
	lon12 *= lonsign
	lon12s *= lonsign
	lam12 := lon12 * gdDeg
	slam12, clam12 := gdSincosde(lon12, lon12s)
	lon12s = (180 - lon12) - lon12s // supplementary longitude difference

	lat1 = gdAngRound(gdLatFix(lat1))
	lat2 = gdAngRound(gdLatFix(lat2))
	swapp := 1.0
	if math.Abs(lat1) < math.Abs(lat2) || math.IsNaN(lat2) {
		swapp = -1
		lonsign = -lonsign
		lat1, lat2 = lat2, lat1
	}
	latsign := -1.0
	if math.Signbit(lat1) {
		latsign = 1
	}
	lat1 *= latsign
	lat2 *= latsign

	sbet1, cbet1 := gdSincosd(lat1)
	sbet1 *= g.f1
	sbet1, cbet1 = gdNorm(sbet1, cbet1)
	cbet1 = math.Max(gdTiny, cbet1) // +ε at the poles
	sbet2, cbet2 := gdSincosd(lat2)
	sbet2 *= g.f1
	sbet2, cbet2 = gdNorm(sbet2, cbet2)
	cbet2 = math.Max(gdTiny, cbet2)

	// Force β2 = ±β1 exactly when the measure used for it in lambda12
	// vanishes.
	if cbet1 < -sbet1 {
		if cbet2 == cbet1 {
			sbet2 = math.Copysign(sbet1, sbet2)
		}
	} else if math.Abs(sbet2) == -sbet1 {
		cbet2 = cbet1
	}
	dn1 := math.Sqrt(1 + g.ep2*sbet1*sbet1)
	dn2 := math.Sqrt(1 + g.ep2*sbet2*sbet2)

	var s12x, m12x, sig12 float64
	meridian := lat1 == -90 || slam12 == 0
	if meridian {
		// Both ends on one meridian (or point 1 at a pole): the geodesic
		// may run along it.
		calp1, salp1 = clam12, slam12 // head to the target longitude
		calp2, salp2 = 1, 0           // heading north at the target
		ssig1, csig1 := sbet1, calp1*cbet1
		ssig2, csig2 := sbet2, calp2*cbet2
		sig12 = math.Atan2(math.Max(0, csig1*ssig2-ssig1*csig2), csig1*csig2+ssig1*ssig2)
		s12x, m12x, _ = g.lengths(g.n, sig12, ssig1, csig1, dn1, ssig2, csig2, dn2)
		// m12 < 0 past the conjugate point: then the meridian is not the
		// shortest path.
		if sig12 < 1 || m12x >= 0 {
			if sig12 < 3*gdTiny || (sig12 < gdTol0 && (s12x < 0 || m12x < 0)) {
				sig12, m12x, s12x = 0, 0, 0
			}
			s12x *= g.b
		} else {
			meridian = false
		}
	}

	switch {
	case meridian:
	case sbet1 == 0 && (g.f <= 0 || lon12s >= g.f*180):
		// Along the equator (β1 = β2 = 0, not too close to antipodal).
		calp1, calp2, salp1, salp2 = 0, 0, 1, 1
		s12x = g.a * lam12
	default:
		var dnm float64
		sig12, salp1, calp1, salp2, calp2, dnm = g.inverseStart(sbet1, cbet1, sbet2, cbet2, lam12, slam12, clam12)
		if sig12 >= 0 {
			// Short line solved by inverseStart.
			s12x = sig12 * g.b * dnm
			break
		}
		// Newton's method on f(α1) = λ12(α1) − λ12. f has one root in
		// (0, π), with positive slope there; the bracket [α1a, α1b] keeps
		// it, and a step that leaves the bracket or has a non-positive
		// slope is replaced by bisection.
		var lam gdLambda
		salp1a, calp1a, salp1b, calp1b := gdTiny, 1.0, gdTiny, -1.0
		tripn, tripb := false, false
		for numit := 0; ; numit++ {
			lam = g.lambda12(sbet1, cbet1, dn1, sbet2, cbet2, dn2, salp1, calp1, slam12, clam12, numit < gdMaxit1)
			v := lam.lam12
			tol := 1.0
			if tripn {
				tol = 8
			}
			// Reversed test to escape on NaN.
			if tripb || !(math.Abs(v) >= tol*gdTol0) || numit == gdMaxit2 {
				break
			}
			if v > 0 && (numit > gdMaxit1 || calp1/salp1 > calp1b/salp1b) {
				salp1b, calp1b = salp1, calp1
			} else if v < 0 && (numit > gdMaxit1 || calp1/salp1 < calp1a/salp1a) {
				salp1a, calp1a = salp1, calp1
			}
			if numit < gdMaxit1 && lam.dlam12 > 0 {
				dalp1 := -v / lam.dlam12
				if math.Abs(dalp1) < math.Pi {
					sdalp1, cdalp1 := math.Sincos(dalp1)
					nsalp1 := salp1*cdalp1 + calp1*sdalp1
					if nsalp1 > 0 {
						calp1 = calp1*cdalp1 - salp1*sdalp1
						salp1 = nsalp1
						salp1, calp1 = gdNorm(salp1, calp1)
						// Where the slope vanishes convergence is not
						// quadratic: test against ε, not √ε.
						tripn = math.Abs(v) <= 16*gdTol0
						continue
					}
				}
			}
			// Bisection.
			salp1 = (salp1a + salp1b) / 2
			calp1 = (calp1a + calp1b) / 2
			salp1, calp1 = gdNorm(salp1, calp1)
			tripn = false
			tripb = math.Abs(salp1a-salp1)+(calp1a-calp1) < gdTolB ||
				math.Abs(salp1-salp1b)+(calp1-calp1b) < gdTolB
		}
		salp2, calp2 = lam.salp2, lam.calp2
		s12x, _, _ = g.lengths(lam.eps, lam.sig12, lam.ssig1, lam.csig1, dn1, lam.ssig2, lam.csig2, dn2)
		s12x *= g.b
	}

	// Undo the canonical transformation.
	if swapp < 0 {
		salp1, salp2 = salp2, salp1
		calp1, calp2 = calp2, calp1
	}
	salp1 *= swapp * lonsign
	calp1 *= swapp * latsign
	salp2 *= swapp * lonsign
	calp2 *= swapp * latsign
	return 0 + s12x, salp1, calp1, salp2, calp2 // 0 + turns −0 into 0
}

// Inverse solves the inverse geodesic problem on WGS84 by Karney's algorithm
// (C. F. F. Karney, "Algorithms for geodesics", J. Geodesy 87 (2013) 43–55,
// §5; series to order 6): the shortest path from (lat1, lon1) to
// (lat2, lon2), all in degrees. It returns the length distM in metres and the
// forward azimuths azi1Deg at point 1 and azi2Deg at point 2 (the direction
// of travel on arrival, not the back azimuth), degrees clockwise from north
// in [−180°, 180°]. In the tests the results agree with GeographicLib's
// GeodSolve to a few nanometres and 1e−8° everywhere, nearly antipodal and
// nearly polar points included (azimuths of lines shorter than a metre are
// limited by the rounding of the input coordinates). Longitudes may have any
// value; a latitude outside [−90°, 90°] gives NaN results. When the shortest
// path is not unique (exactly antipodal points, or a point at a pole) one of
// the valid azimuths is returned.
func Inverse(lat1, lon1, lat2, lon2 float64) (distM, azi1Deg, azi2Deg float64) {
	s12, salp1, calp1, salp2, calp2 := wgs84Geod.inverse(lat1, lon1, lat2, lon2)
	return s12, gdAtan2d(salp1, calp1), gdAtan2d(salp2, calp2)
}

// Direct solves the direct geodesic problem on WGS84 by Karney's algorithm
// (Karney 2013, §4; series to order 6): from (lat1, lon1), degrees, heading
// azi1Deg degrees clockwise from north, travel distM metres (negative goes
// backwards) along the geodesic. It returns the end point (lat2, lon2),
// degrees with lon2 in [−180°, 180°], and the forward azimuth azi2Deg there,
// degrees. A latitude outside [−90°, 90°] gives NaN results.
func Direct(lat1, lon1, azi1Deg, distM float64) (lat2, lon2, azi2Deg float64) {
	var l Line // on the stack: Direct does not allocate
	wgs84Geod.initLineDeg(&l, lat1, lon1, azi1Deg)
	lat2, lon2, _, _, calp2 := l.position(distM)
	return lat2, lon2, gdAtan2d(l.salp0, calp2)
}

// Line is a geodesic on WGS84 from a starting point in a given direction,
// with the coefficients of Karney's series (Karney 2013, §4: the reverted
// distance series, eq. 21, and the longitude series, eqs. 23–25) worked out
// once, so that Position and Positions are cheap and do not allocate. A Line
// is read-only after construction and safe for concurrent use.
type Line struct {
	lat1, lon1   float64 // start, degrees; lon1 reduced to [−180°, 180°]
	a            float64 // equatorial radius, m
	f1           float64 // 1 − f
	salp0, calp0 float64 // azimuth at the equator crossing, α0
	ssig1, csig1 float64 // σ1, arc from the northward equator crossing
	somg1, comg1 float64 // ω1, spherical longitude (not normalised)
	stau1, ctau1 float64 // τ1 = σ1 + B11 (eq. 20 scaled)
	b11          float64 // B1(σ1)
	b31          float64 // B3(σ1)
	a3c          float64 // −f sin α0 A3, radians of λ per radian of σ
	invBA1       float64 // 1/(b·A1), radians of τ per metre
	c1p          [7]float64
	c3           [6]float64
}

// NewLine returns the geodesic on WGS84 leaving (lat1, lon1), degrees, with
// forward azimuth azi1Deg, degrees clockwise from north (Karney 2013, §4).
// A latitude outside [−90°, 90°] gives a line whose positions are NaN.
func NewLine(lat1, lon1, azi1Deg float64) *Line {
	// Kept small enough to inline, so that a Line that does not escape the
	// caller stays on its stack.
	l := new(Line)
	wgs84Geod.initLineDeg(l, lat1, lon1, azi1Deg)
	return l
}

// InverseLine returns the geodesic on WGS84 from (lat1, lon1) through
// (lat2, lon2), degrees, solved as in Inverse, and its length distM in metres
// between the two points: l.Position(distM) is point 2 and
// l.Position(distM/2) the midpoint. Degenerate and ambiguous cases follow
// Inverse.
func InverseLine(lat1, lon1, lat2, lon2 float64) (l *Line, distM float64) {
	// Kept small enough to inline (see NewLine).
	l = new(Line)
	distM = wgs84Geod.initInverseLine(l, lat1, lon1, lat2, lon2)
	return l, distM
}

// initLineDeg sets l to the geodesic leaving (lat1, lon1) with azimuth
// azi1Deg, all degrees.
func (g *geodEllipsoid) initLineDeg(l *Line, lat1, lon1, azi1Deg float64) {
	azi1Deg = gdAngNormalize(azi1Deg)
	salp1, calp1 := gdSincosd(gdAngRound(azi1Deg))
	g.initLine(l, lat1, lon1, salp1, calp1)
}

// initInverseLine sets l to the geodesic from (lat1, lon1) through
// (lat2, lon2), degrees, and returns the distance between them in metres.
func (g *geodEllipsoid) initInverseLine(l *Line, lat1, lon1, lat2, lon2 float64) float64 {
	s12, salp1, calp1, _, _ := g.inverse(lat1, lon1, lat2, lon2)
	g.initLine(l, lat1, lon1, salp1, calp1)
	return s12
}

// initLine sets l to the geodesic leaving (lat1, lon1), degrees, with
// azimuth α1 given by its sine and cosine.
func (g *geodEllipsoid) initLine(l *Line, lat1, lon1, salp1, calp1 float64) {
	*l = Line{a: g.a, f1: g.f1}
	l.lat1 = gdLatFix(lat1)
	l.lon1 = gdAngNormalize(lon1)
	sbet1, cbet1 := gdSincosd(gdAngRound(l.lat1))
	sbet1 *= g.f1
	sbet1, cbet1 = gdNorm(sbet1, cbet1)
	cbet1 = math.Max(gdTiny, cbet1) // +ε at the poles

	// sin α0 = sin α1 cos β1 (eq. 5); cos α0 = hypot(cos α1, sin α1 sin β1).
	l.salp0 = salp1 * cbet1
	l.calp0 = math.Hypot(calp1, salp1*sbet1)
	// tan β1 = tan σ1 cos α1 (eq. 11); tan ω1 = sin α0 tan σ1 (eq. 12).
	// σ = 0 at the northward equator crossing.
	l.ssig1 = sbet1
	l.somg1 = l.salp0 * sbet1
	if sbet1 != 0 || calp1 != 0 {
		l.csig1 = cbet1 * calp1
	} else {
		l.csig1 = 1
	}
	l.comg1 = l.csig1
	l.ssig1, l.csig1 = gdNorm(l.ssig1, l.csig1)

	k2 := l.calp0 * l.calp0 * g.ep2
	eps := gdEpsFromK2(k2)

	var c1 [7]float64
	gdC1(eps, &c1)
	l.invBA1 = 1 / (g.b * (1 + gdA1m1(eps)))
	l.b11 = gdSinSeries(l.ssig1, l.csig1, c1[:])
	s, c := math.Sincos(l.b11)
	l.stau1 = l.ssig1*c + l.csig1*s
	l.ctau1 = l.csig1*c - l.ssig1*s
	gdC1p(eps, &l.c1p)

	g.c3(eps, &l.c3)
	l.a3c = -g.f * l.salp0 * g.a3(eps)
	l.b31 = gdSinSeries(l.ssig1, l.csig1, l.c3[:])
}

// Position returns the point (lat, lon), degrees with lon in [−180°, 180°],
// reached after distM metres along the line (negative goes backwards), by
// Karney's direct solution (Karney 2013, §4, eqs. 20–21 and 23–25). It does
// not allocate.
func (l *Line) Position(distM float64) (lat, lon float64) {
	lat, lon, _, _, _ = l.position(distM)
	return lat, lon
}

// Positions fills lats[i] and lons[i], degrees (lon in [−180°, 180°]), with
// the point startM + i·stepM metres along the line, for
// i < min(len(lats), len(lons)): the samples of a terrain profile. Every
// k-th point, with k ≤ 1024 chosen so that these nodes are at most 2 km
// apart, and the last point are computed exactly as by Position; the points
// between are cubic Hermite interpolation in latitude and longitude between the nodes, using the
// exact derivatives dφ/ds = cos α/M and dλ/ds = sin α/(a cos β) there (M the
// meridional radius of curvature, β the reduced latitude). This stays within
// 1e−11° (about 1 µm) of Position. Where a node lies within 15° of a pole
// the points are all computed exactly. It does not allocate.
func (l *Line) Positions(startM, stepM float64, lats, lons []float64) {
	n := min(len(lats), len(lons))
	lats, lons = lats[:n], lons[:n]
	k := 1
	if math.Abs(stepM) > 0 {
		// Cubic Hermite over 2 km errs by about (2 km/R)⁴·R/384, below
		// 1e−9 m; the cap only bounds the work of a tiny step.
		k = int(min(1024, 2000/math.Abs(stepM)))
	}
	if k <= 1 || n < 3 {
		for i := range n {
			lats[i], lons[i] = l.Position(startM + float64(i)*stepM)
		}
		return
	}
	lat0, lon0, dlat0, dlon0, ok0 := l.node(startM)
	for j := 0; j < n-1; {
		lats[j], lons[j] = lat0, lon0
		end := min(j+k, n-1) // the next node
		lat1, lon1, dlat1, dlon1, ok1 := l.node(startM + float64(end)*stepM)
		if !ok0 || !ok1 {
			for i := j + 1; i < end; i++ {
				lats[i], lons[i] = l.Position(startM + float64(i)*stepM)
			}
		} else {
			dl := lon1 - lon0
			if dl > 180 {
				dl -= 360
			} else if dl < -180 {
				dl += 360
			}
			// The last stretch may be shorter than k steps.
			kk := end - j
			h := float64(kk) * stepM
			inv := 1 / float64(kk)
			for i := 1; i < kk; i++ {
				t := float64(i) * inv
				t2 := t * t
				t3 := t2 * t
				h01 := 3*t2 - 2*t3         // weight of the value at node 1
				h10 := (t3 - 2*t2 + t) * h // of the slope at node 0
				h11 := (t3 - t2) * h       // of the slope at node 1
				lats[j+i] = lat0 + h01*(lat1-lat0) + h10*dlat0 + h11*dlat1
				lon := lon0 + h01*dl + h10*dlon0 + h11*dlon1
				if lon > 180 {
					lon -= 360
				} else if lon < -180 {
					lon += 360
				}
				lons[j+i] = lon
			}
		}
		lat0, lon0, dlat0, dlon0, ok0 = lat1, lon1, dlat1, dlon1, ok1
		j = end
	}
	lats[n-1], lons[n-1] = lat0, lon0
}

// node returns the point distM metres along the line, the rates of change
// of its latitude and longitude in degrees per metre, and whether it is far
// enough from the poles (|φ| ≤ 75°) for Positions to interpolate there.
func (l *Line) node(distM float64) (lat, lon, dlat, dlon float64, ok bool) {
	lat, lon, sbet2, cbet2, calp2 := l.position(distM)
	// With (sin φ, cos φ) ∝ (sin β, (1 − f) cos β):
	// M = a D^(3/2)/(1 − f), D = sin²β + (1 − f)² cos²β, and cos α = calp2/cos β;
	// the radius of the parallel is N cos φ = a cos β.
	fc := l.f1 * cbet2
	d := sbet2*sbet2 + fc*fc
	dlat = calp2 / cbet2 * l.f1 / (l.a * d * math.Sqrt(d)) * (180 / math.Pi)
	dlon = l.salp0 / (l.a * cbet2 * cbet2) * (180 / math.Pi)
	return lat, lon, dlat, dlon, math.Abs(lat) <= 75
}

// position returns the point after distM metres, sin β2 and cos β2 (reduced
// latitude) there, and cos α2 · cos β2 (sin α2 · cos β2 = sin α0): the
// forward azimuth there, not normalised.
func (l *Line) position(distM float64) (lat, lon, sbet2, cbet2, calp2 float64) {
	// τ12 from s12 = b A1 τ12 (eq. 20); τ2 = τ1 + τ12.
	tau12 := distM * l.invBA1
	s, c := math.Sincos(tau12)
	stau2 := l.stau1*c + l.ctau1*s
	ctau2 := l.ctau1*c - l.stau1*s
	// σ2 = τ2 + Σ C′1l sin 2lτ2 (eq. 21); the correction d is small
	// (|d| < ε ≤ 0.0017 for WGS84), so its sine and cosine come from their
	// Taylor series, exact in float64 below |d| = 0.01.
	// (gdSinSeries6 written out: it is just too large for the inliner.)
	c1p := &l.c1p
	ar := 2 * (ctau2 - stau2) * (ctau2 + stau2) // 2 cos 2τ2
	b1 := c1p[6]
	b2 := ar*b1 + c1p[5]
	b1 = ar*b2 - b1 + c1p[4]
	b2 = ar*b1 - b2 + c1p[3]
	b1 = ar*b2 - b1 + c1p[2]
	b2 = ar*b1 - b2 + c1p[1]
	d := 2 * stau2 * ctau2 * b2
	var sd, cd float64
	if math.Abs(d) < 0.01 {
		d2 := d * d
		// Horner form with constant factors (no divisions).
		sd = d * (1 + d2*(-1.0/6+d2*(1.0/120+d2*(-1.0/5040))))
		cd = 1 + d2*(-1.0/2+d2*(1.0/24+d2*(-1.0/720+d2*(1.0/40320))))
	} else {
		sd, cd = math.Sincos(d)
	}
	ssig2 := stau2*cd + ctau2*sd
	csig2 := ctau2*cd - stau2*sd
	// σ12 = σ2 − σ1 = τ12 + d + B11 (τ1 = σ1 + B11).
	sig12 := tau12 + d + l.b11

	// sin β2 = cos α0 sin σ2; cos β2 = hypot(sin α0, cos α0 cos σ2).
	sbet2 = l.calp0 * ssig2
	cbet2 = math.Sqrt(l.salp0*l.salp0 + (l.calp0*csig2)*(l.calp0*csig2)) // both ≤ 1: no overflow
	if cbet2 == 0 {
		// Meridian through a pole (sin α0 = 0, cos σ2 = 0).
		cbet2, csig2 = gdTiny, gdTiny
	}
	// tan ω2 = sin α0 tan σ2 (eq. 12).
	somg2, comg2 := l.salp0*ssig2, csig2
	omg12 := math.Atan2(somg2*l.comg1-comg2*l.somg1, comg2*l.comg1+somg2*l.somg1)
	// λ12 = ω12 − f sin α0 A3 (σ12 + B3(σ2) − B3(σ1)) (eqs. 8, 23).
	lam12 := omg12 + l.a3c*(sig12+(gdSinSeries5(ssig2, csig2, &l.c3)-l.b31))
	lon = l.lon1 + lam12*(180/math.Pi)
	if lon > 180 {
		lon -= 360
	} else if lon < -180 {
		lon += 360
	}
	// tan φ2 = tan β2 / (1 − f); cos β2 > 0.
	lat = math.Atan(sbet2/(l.f1*cbet2)) * (180 / math.Pi)
	lat = min(90, max(-90, lat)) // atan(±∞)/deg may round past ±90
	return lat, lon, sbet2, cbet2, l.calp0 * csig2
}
