package propagation

import "math"

// Radial computes line of sight and delta-Bullington diffraction (ITU-R
// P.526-16 §4.5) for many receivers along one radial from a transmitter,
// in O(1) or O(log n) per receiver instead of one O(n) profile scan each.
//
// The radial is fed its terrain outward with Add, one point at a time at
// strictly increasing distances; after k points have been added, Visible
// and Loss answer for a receiver beyond them, as if the path were the
// transmitter's ground, those k points as intermediate profile points, and
// the receiver's ground (the Path a profile of that receiver would give).
//
// How each term of §4.5 becomes incremental (C_e = 1/a_e, distances d in
// km from the transmitter, heights in m):
//
//   - Work in the frame of the transmitter's tangent plane: y_i = h_i −
//     500 C_e d_i². The earth-bulge term of eqs. 49 and 53 is then linear in
//     the path length d: h_i + 500 C_e d_i (d − d_i) = y_i + 500 C_e d d_i.
//   - S_tim (eq. 49) = max_i (y_i − h_ts)/d_i + 500 C_e d: a running
//     maximum of a quantity of the point alone, O(1). The line-of-sight test
//     of eq. 50 uses only it.
//   - S_rim (eq. 53) = max_i (y_i − Y_r)/(d − d_i) − 500 C_e d with
//     Y_r = h_rs − 500 C_e d²: the slope of the tangent from the receiver
//     (d, Y_r) to the points before it. The maximum lies on the upper convex
//     hull of the points (d_i, y_i), kept incrementally by the monotone
//     chain (A. M. Andrew, "Another efficient algorithm for convex hulls in
//     two dimensions", Inf. Proc. Letters 9, 1979), and along the hull the
//     slope rises then falls, so a binary search finds it: O(log n).
//   - The smooth surface (eqs. 58–60) needs the sums v1, v2 over the
//     segments: running sums, plus the receiver's own segment.
//   - The obstruction terms (eqs. 61a–c) use the terrain without bulge
//     against the straight antenna line: h_obs is the hull vertex of the
//     raw points (d_i, h_i) where the hull's edge slopes pass the line's
//     slope (binary search), α_obt a running maximum of (h_i − h_ts)/d_i,
//     α_obr a tangent from (d, h_rs) to the same hull.
//   - The smooth profile (eq. 64) has zero heights: its maxima are unimodal
//     in d_i and found by binary search over the distances, as in
//     DeltaBullington.
//
// ν_max of a line-of-sight path (eq. 51) is the one term no hull orders:
// ν_i = e_i √(0.002 d/(λ d_i (d − d_i))), with e_i the height of the point
// above the ray (negative on a line-of-sight path), weighs the points by
// their position, and a point below the hull in the middle of the path can
// beat the hull vertices near an end. Radial therefore starts from the hull
// vertex that comes closest to the ray in height (binary search: it
// maximises y_i minus a linear function) and its RadialNuWindow neighbours
// each side, then searches the points themselves by branch and bound: it
// keeps the highest y_i of every block of 16 points and of every 256, and
// skips a block whose bound on ν (highest y against the ray at the block's
// most favourable end, times the smallest weight over the block) cannot
// beat the best so far, nor −0.78, below which J(ν) is 0 (eq. 31). The
// loss is therefore exact; only the ν reported for a path whose
// J(ν) is 0 may be the hull's instead of the true maximum. The search costs
// little where the terrain lies well below the ray and approaches O(n)
// only where much of the path grazes it within a fraction of the first
// Fresnel zone.
//
// A Radial is not safe for concurrent use; Reset reuses its storage.
type Radial struct {
	rp       params
	needLoss bool
	ft       firstTerm // smooth-earth constants for a_e (eqs. 11a–16)
	fc       firstTermScale

	hts, h0 float64 // transmitter antenna amsl, ground at the transmitter (m)
	bulge   float64 // 500 C_e, m/km²

	n      int     // intermediate points added
	dp, hp float64 // last point (the transmitter's ground at first)

	timMax float64 // max (y_i − h_ts)/d_i
	timD   float64 // its d_i
	timY   float64 // its y_i
	obtMax float64 // max (h_i − h_ts)/d_i, terrain alone
	v1, v2 float64 // eqs. 58, 59 over the segments so far

	dist   []float64 // 0 (the transmitter) then every intermediate distance
	ys     []float64 // y_i of every intermediate point, in order
	bmax   []float64 // highest y_i of each block of radialBlock points
	smax   []float64 // highest y_i of each block of radialSuper points
	cd, cy []float64 // upper hull of (d_i, y_i)
	rd, rh []float64 // upper hull of (d_i, h_i)

	nuFrac float64 // smoothMaxima: where ν peaked last, as a fraction of the path (a search's first guess)

	horizonPerRootM float64 // √(2 a_e/1000): eq. 21's horizon in km per √m of antenna height
	inv2aeM         float64 // 1/(2 a_e), a_e in metres
}

// RadialNuWindow is the number of hull vertices on either side of the one
// nearest the ray at which Radial evaluates ν for a line-of-sight path.
const RadialNuWindow = 2

// Block sizes of the branch-and-bound search for ν_max.
const (
	radialBlock = 16
	radialSuper = 256
)

// RadialLoss is the loss of one receiver of a Radial, in dB.
type RadialLoss struct {
	FreeSpaceDB float64 // ITU-R P.525-4 over the horizontal distance
	ExcessDB    float64 // delta-Bullington diffraction, eq. 66
	PathLossDB  float64 // FreeSpaceDB + ExcessDB
	LineOfSight bool    // eq. 50: S_tim < S_tr
}

// NewRadial returns a Radial for the frequency, antenna heights (TxHeightM
// at the transmitter, RxHeightM at every receiver), effective earth
// radius, polarization and ground of prm (defaults as in Params). With
// needLoss false it keeps only what the line-of-sight test needs (Loss
// must then not be called). Errors wrap ErrBadParams.
func NewRadial(prm Params, needLoss bool) (*Radial, error) {
	rp, err := prm.resolve()
	if err != nil {
		return nil, err
	}
	w := &Radial{rp: rp, needLoss: needLoss, bulge: 500 / rp.aeKM, ft: newFirstTerm(rp.aeKM, rp), fc: newFirstTermScale(rp),
		horizonPerRootM: math.Sqrt(2 * rp.aeKM / 1000), inv2aeM: 1 / (2 * rp.aeKM * 1000)}
	w.Reset(0)
	return w, nil
}

// Reset starts a new radial from a transmitter whose ground is
// siteGroundM metres above mean sea level.
func (w *Radial) Reset(siteGroundM float64) {
	w.h0 = siteGroundM
	w.hts = siteGroundM + w.rp.txM
	w.n = 0
	w.dp, w.hp = 0, siteGroundM
	w.timMax, w.timD, w.timY = math.Inf(-1), 0, 0
	w.obtMax = math.Inf(-1)
	w.v1, w.v2 = 0, 0
	w.dist = append(w.dist[:0], 0)
	w.ys, w.bmax, w.smax = w.ys[:0], w.bmax[:0], w.smax[:0]
	w.cd, w.cy = w.cd[:0], w.cy[:0]
	w.rd, w.rh = w.rd[:0], w.rh[:0]
	w.nuFrac = 0.5
}

// CopyFrom makes w the radial src is: the same parameters, transmitter and
// points added (copied into w's own storage, so that both can go on
// independently). A radial can so branch: the points added so far shared,
// the next ones each its own.
func (w *Radial) CopyFrom(src *Radial) {
	dist, ys, bmax, smax := w.dist, w.ys, w.bmax, w.smax
	cd, cy, rd, rh := w.cd, w.cy, w.rd, w.rh
	*w = *src
	w.dist = append(dist[:0], src.dist...)
	w.ys = append(ys[:0], src.ys...)
	w.bmax = append(bmax[:0], src.bmax...)
	w.smax = append(smax[:0], src.smax...)
	w.cd = append(cd[:0], src.cd...)
	w.cy = append(cy[:0], src.cy...)
	w.rd = append(rd[:0], src.rd...)
	w.rh = append(rh[:0], src.rh...)
}

// Len returns the number of intermediate points added since Reset.
func (w *Radial) Len() int { return w.n }

// Add appends the next profile point: distKM kilometres from the
// transmitter (more than the previous point's, and more than 0), ground
// heightM metres above mean sea level (a number; fill voids first).
// Points that break these rules are ignored.
func (w *Radial) Add(distKM, heightM float64) {
	if !(distKM > w.dp) || heightM-heightM != 0 {
		return
	}
	d, h := distKM, heightM
	y := h - w.bulge*d*d
	if v := (y - w.hts) / d; v > w.timMax {
		w.timMax, w.timD, w.timY = v, d, y
	}
	w.n++
	dl, hl := w.dp, w.hp
	w.dp, w.hp = d, h
	if !w.needLoss {
		return
	}
	dd := d - dl
	w.v1 += dd * (h + hl)
	w.v2 += dd * (h*(2*d+dl) + hl*(d+2*dl))
	w.dist = append(w.dist, d)
	i := len(w.ys)
	w.ys = append(w.ys, y)
	if i%radialBlock == 0 {
		w.bmax = append(w.bmax, y)
	} else if b := &w.bmax[len(w.bmax)-1]; y > *b {
		*b = y
	}
	if i%radialSuper == 0 {
		w.smax = append(w.smax, y)
	} else if b := &w.smax[len(w.smax)-1]; y > *b {
		*b = y
	}
	if v := (h - w.hts) / d; v > w.obtMax {
		w.obtMax = v
	}
	w.cd, w.cy = hullPush(w.cd, w.cy, d, y)
	w.rd, w.rh = hullPush(w.rd, w.rh, d, h)
}

// hullPush adds (x, y), right of every point so far, to the upper convex
// hull (xs, ys) by the monotone chain: vertices that fall on or below the
// segment from their predecessor to the new point leave the hull.
func hullPush(xs, ys []float64, x, y float64) ([]float64, []float64) {
	n := len(xs)
	for n >= 2 {
		ax, ay := xs[n-2], ys[n-2]
		bx, by := xs[n-1], ys[n-1]
		if (by-ay)*(x-ax) > (y-ay)*(bx-ax) {
			break // b strictly above the chord a → new point
		}
		n--
	}
	return append(xs[:n], x), append(ys[:n], y)
}

// hullTangent returns the index of the hull vertex maximising the slope
// (ys[k] − qy)/(qx − xs[k]) seen from (qx, qy) right of every vertex.
// Along an upper hull that slope rises and then falls.
func hullTangent(xs, ys []float64, qx, qy float64) int {
	lo, hi := 0, len(xs)-1
	for lo < hi {
		m := lo + (hi-lo)/2
		if (ys[m+1]-qy)*(qx-xs[m]) > (ys[m]-qy)*(qx-xs[m+1]) {
			lo = m + 1
		} else {
			hi = m
		}
	}
	return lo
}

// hullTop returns the index of the hull vertex maximising ys[k] − s·xs[k]:
// the first vertex whose next edge is no steeper than s.
func hullTop(xs, ys []float64, s float64) int {
	lo, hi := 0, len(xs)-1
	for lo < hi {
		m := lo + (hi-lo)/2
		if ys[m+1]-ys[m] > s*(xs[m+1]-xs[m]) {
			lo = m + 1
		} else {
			hi = m
		}
	}
	return lo
}

// Visible reports whether a receiver distKM kilometres from the
// transmitter (beyond the points added), its antenna RxHeightM above
// ground groundM metres amsl, has line of sight to the transmitter's
// antenna over the points added and the earth's curvature: S_tim < S_tr
// (ITU-R P.526-16 eqs. 49, 50). With no points added it is true.
func (w *Radial) Visible(distKM, groundM float64) bool {
	if w.n == 0 {
		return true
	}
	d := distKM
	return (w.timMax+w.bulge*d)*d < groundM+w.rp.rxM-w.hts
}

// Loss returns the free-space loss and the delta-Bullington diffraction
// loss (ITU-R P.526-16 §4.5, eqs. 49–66, with smooth-earth diffraction of
// §3.2 for the Radial's polarization and ground) of the path from the
// transmitter to a receiver distKM kilometres away (beyond the points
// added), its antenna RxHeightM above ground groundM metres amsl, over the
// points added. Every term is exact but ν_max of a line-of-sight path
// (see Radial). It panics when the Radial was made without needLoss.
func (w *Radial) Loss(distKM, groundM float64) RadialLoss {
	if !w.needLoss {
		panic("propagation: Radial.Loss on a Radial made for line of sight only")
	}
	rp := &w.rp
	d := distKM
	hts, hrs := w.hts, groundM+rp.rxM
	fs := 20 * log10Fast(4*math.Pi*d*1000/rp.wavelengthM) // FreeSpaceLossWavelengthDB
	out := RadialLoss{FreeSpaceDB: fs}
	if !(d > w.dp) {
		// The receiver does not lie beyond the points: treat it as free space.
		out.PathLossDB, out.LineOfSight = fs, true
		return out
	}
	bulge := w.bulge
	str := (hrs - hts) / d
	stim, srim, nuMax := math.Inf(-1), math.Inf(-1), math.Inf(-1)
	if w.n > 0 {
		stim = w.timMax + bulge*d // eq. 49
		yr := hrs - bulge*d*d
		if stim < str {
			nuMax, _ = w.nuMax(d, yr)
		} else {
			k := hullTangent(w.cd, w.cy, d, yr)
			srim = (w.cy[k]-yr)/(d-w.cd[k]) - bulge*d // eq. 53
		}
	}
	lba := bullingtonLossTab(stim, srim, nuMax, hts, hrs, d, rp.wavelengthM)
	out.LineOfSight = !(stim >= str)

	// Smooth surface (eqs. 58–63), the receiver's segment added.
	dl, hl := w.dp, w.hp
	dd := d - dl
	v1 := w.v1 + dd*(groundM+hl)
	v2 := w.v2 + dd*(groundM*(2*d+dl)+hl*(d+2*dl))
	hstp := (2*v1*d - v2) / (d * d) // eq. 60a
	hsrp := (v2 - v1*d) / (d * d)   // eq. 60b
	if w.n > 0 {
		s := str
		k := hullTop(w.rd, w.rh, s)
		if hobs := w.rh[k] - hts - s*w.rd[k]; hobs > 0 { // eqs. 61a, 61d
			aobt := w.obtMax - s // eq. 61b
			j := hullTangent(w.rd, w.rh, d, hrs)
			aobr := (w.rh[j]-hrs)/(d-w.rd[j]) + s // eq. 61c
			hstp -= hobs * aobt / (aobt + aobr)   // eq. 62
			hsrp -= hobs * aobr / (aobt + aobr)
		}
	}
	hst := min(hstp, w.h0)         // eq. 63
	hsr := min(hsrp, groundM)      // eq. 63
	htsS, hrsS := hts-hst, hrs-hsr // eq. 64

	// Smooth spherical earth (eq. 65); where it gives no loss, eq. 66 needs
	// no Bullington loss of the smooth profile (L_bs ≥ 0).
	lsph := w.smoothEarthLoss(d, htsS, hrsS)
	lbs := lsph
	if lsph > 0 {
		// Bullington over the smooth profile (eq. 64) on the same distances.
		st, sr, nu := w.smoothMaxima(d, htsS, hrsS)
		lbs = bullingtonLossTab(st, sr, nu, htsS, hrsS, d, rp.wavelengthM)
	}
	out.ExcessDB = lba + max(lsph-lbs, 0) // eq. 66
	out.PathLossDB = fs + out.ExcessDB
	return out
}

// nuMax returns ν_max of eq. 51 for a line-of-sight path of length d to a
// receiver at yr (tangent-plane frame), and the distance of its point; see
// Radial for the search.
func (w *Radial) nuMax(d, yr float64) (nu, atKM float64) {
	hts := w.hts
	slope := (yr - hts) / d // the ray in the tangent-plane frame
	sk := math.Sqrt(0.002 * d / w.rp.wavelengthM)
	best, at := math.Inf(-1), math.NaN()
	try := func(di, yi float64) {
		e := yi - hts - slope*di
		if v := e * sk / math.Sqrt(di*(d-di)); v > best {
			best, at = v, di
		}
	}
	try(w.timD, w.timY)
	if len(w.cd) == 0 {
		return best, at
	}
	k := hullTop(w.cd, w.cy, slope)
	for j := max(k-RadialNuWindow, 0); j <= min(k+RadialNuWindow, len(w.cd)-1); j++ {
		try(w.cd[j], w.cy[j])
	}
	// bound is an upper bound of ν over the points lo..hi (indices into
	// ys, dist[i+1]) whose highest y is ymax.
	bound := func(ymax float64, lo, hi int) float64 {
		dlo, dhi := w.dist[lo+1], w.dist[hi+1]
		e := ymax - hts
		if slope >= 0 {
			e -= slope * dlo
		} else {
			e -= slope * dhi
		}
		if e >= 0 {
			return math.Inf(1)
		}
		m := d / 2 // where d_i (d − d_i) peaks
		m = min(max(m, dlo), dhi)
		return e * sk / math.Sqrt(m*(d-m))
	}
	n := len(w.ys)
	for s, smax := range w.smax {
		lo := s * radialSuper
		hi := min(lo+radialSuper, n) - 1
		if bound(smax, lo, hi) <= max(best, -0.78) {
			continue
		}
		for b := lo / radialBlock; b*radialBlock <= hi; b++ {
			blo := b * radialBlock
			bhi := min(blo+radialBlock, n) - 1
			if bound(w.bmax[b], blo, bhi) <= max(best, -0.78) {
				continue
			}
			for i := blo; i <= bhi; i++ {
				try(w.dist[i+1], w.ys[i])
			}
		}
	}
	return best, at
}

// smoothMaxima is smoothProfileMaxima over the points added, for a
// receiver d km out: the same maxima of the same expressions, found
// faster. S_tim's bulge·(d − d_i) − h_ts/d_i is concave in d_i with its
// peak at d_i = √(h_ts/bulge), and S_rim's bulge·d_i − h_rs/(d − d_i) at
// d − d_i = √(h_rs/bulge), so each maximum over the points is at one of
// the two points around the peak. ν_max (eq. 51) is needed only when the
// smooth profile is line of sight (eq. 50); ν(x) = (bulge·u − h_ts −
// slope·x)·√(kNu/u), u = x(d − x), rises then falls, and its derivative has
// the sign of the polynomial H(x) = u′(bulge·u + h_ts + slope·x) − 2·slope·u
// (u′ = d − 2x), so the first point where H ≤ 0 is the first past the
// peak and the maximum over the points is there or at the point before.
// Otherwise ν_max is returned as −∞.
//
// The three points are found by galloping searches (searchFrom) from a
// guess: the index the peak would have if the points stood every
// dist[1] km, as a coverage radial's do, and for ν the peak's fraction of
// the path at the previous call. With evenly spaced points each search
// costs a comparison or two instead of a binary search's ten mispredicted
// branches; the answers are the binary search's whatever the spacing.
func (w *Radial) smoothMaxima(d, hts, hrs float64) (stim, srim, nuMax float64) {
	inf := math.Inf(-1)
	pts := w.dist[1:] // the intermediate points
	if len(pts) == 0 {
		return inf, inf, inf
	}
	inv := 1 / pts[0] // points per km if evenly spaced
	bulge := w.bulge
	stim, srim, nuMax = inf, inf, inf
	x := math.Sqrt(hts / bulge)
	i := searchFrom(len(pts), guessIndex(x, inv), func(j int) bool { return pts[j] >= x })
	for j := max(i-1, 0); j <= min(i, len(pts)-1); j++ {
		di := pts[j]
		stim = max(stim, bulge*(d-di)-hts/di)
	}
	x = d - math.Sqrt(hrs/bulge)
	i = searchFrom(len(pts), guessIndex(x, inv), func(j int) bool { return pts[j] >= x })
	for j := max(i-1, 0); j <= min(i, len(pts)-1); j++ {
		di := pts[j]
		srim = max(srim, bulge*di-hrs/(d-di))
	}
	if stim < (hrs-hts)/d {
		kNu := 0.002 * d / w.rp.wavelengthM
		slope := (hrs - hts) / d
		i = searchFrom(len(pts), guessIndex(w.nuFrac*d, inv), func(j int) bool {
			x := pts[j]
			u := x * (d - x)
			return (d-2*x)*(bulge*u+hts+slope*x)-2*slope*u <= 0
		})
		for j := max(i-1, 0); j <= min(i, len(pts)-1); j++ {
			di := pts[j]
			ddi := d - di
			if v := (bulge*di*ddi - hts - slope*di) * math.Sqrt(kNu/(di*ddi)); v > nuMax {
				nuMax, w.nuFrac = v, di/d
			}
		}
	}
	return stim, srim, nuMax
}

// guessIndex returns the index of the first point at or beyond x km among
// points every 1/inv km from 1/inv on, clamped to int's range.
func guessIndex(x, inv float64) int {
	g := math.Ceil(x*inv) - 1
	if !(g > 0) {
		return 0
	}
	return int(min(g, 1<<40))
}

// searchFrom returns the smallest i in [0, n) with ok(i) true (n if none),
// for ok false then true along the indices (as sort.Search), galloping out
// from the guess g: O(log |answer − g|) calls.
func searchFrom(n, g int, ok func(int) bool) int {
	g = min(max(g, 0), n)
	lo, hi := 0, n // ok is false below lo and true from hi on
	if g < n && !ok(g) {
		lo = g + 1
		for s := 1; ; s *= 2 {
			p := g + s
			if p >= n {
				break
			}
			if ok(p) {
				hi = p
				break
			}
			lo = p + 1
		}
	} else {
		hi = g
		for s := 1; ; s *= 2 {
			p := g - s
			if p < 0 {
				break
			}
			if !ok(p) {
				lo = p + 1
				break
			}
			hi = p
		}
	}
	for lo < hi {
		m := int(uint(lo+hi) >> 1)
		if ok(m) {
			hi = m
		} else {
			lo = m + 1
		}
	}
	return lo
}

// firstTermScale holds the parts of eqs. 11a, 12a, 14a and 15a that do not
// depend on the effective radius: K = kc·a^(−1/3), X per km = xc·β·a^(−2/3),
// β·Y per metre = yc·β²·a^(−1/3) (a in km). Within the horizon eq. 24's
// modified radius a_em changes with every receiver; with these constants
// its first-term constants cost one cube root and one logarithm instead of
// three powers, a cube root and a logarithm (newFirstTerm), equal to
// rounding (about 1e−15 relative).
type firstTermScale struct {
	kc, xc, yc float64
}

func newFirstTermScale(rp params) firstTermScale {
	f := rp.freqMHz
	eps := rp.ground.Permittivity
	q := 18000 * rp.ground.ConductivitySM / f
	kc := 0.36 * math.Pow(f, -1.0/3) * math.Pow((eps-1)*(eps-1)+q*q, -0.25) // eq. 11a without a_e
	if rp.pol == Vertical {
		kc *= math.Sqrt(eps*eps + q*q) // eq. 12a
	}
	return firstTermScale{kc: kc, xc: 2.188 * math.Cbrt(f), yc: 9.575e-3 * math.Pow(f, 2.0/3)}
}

// at returns newFirstTerm's constants for an effective radius aeKM.
func (c *firstTermScale) at(aeKM float64) firstTerm {
	u := 1 / math.Cbrt(aeKM) // a^(−1/3)
	k := c.kc * u
	k2 := k * k
	beta := (1 + 1.6*k2 + 0.67*k2*k2) / (1 + 4.5*k2 + 1.53*k2*k2) // eq. 16
	return firstTerm{xPerKM: c.xc * beta * u * u, yb: c.yc * beta * beta * u, floor: 2 + 20*log10Fast(k)}
}

// smoothEarthLoss is smoothEarthLossC (ITU-R P.526-16 §3.2, eqs. 22–25)
// for the Radial's parameters, with the first-term constants of eq. 24's
// a_em from firstTermScale and (m+1)³ by multiplication: the same
// formulas, equal to rounding (TestRadialMatchesTerrain, 1e−9 dB).
func (w *Radial) smoothEarthLoss(dKM, h1, h2 float64) float64 {
	rp := &w.rp
	if !(dKM > 0) {
		return 0
	}
	h1 = max(h1, 0)
	h2 = max(h2, 0)
	sh := math.Sqrt(h1) + math.Sqrt(h2)
	if dKM >= w.horizonPerRootM*sh { // RadioHorizonKM (eq. 21)
		return max(w.ft.loss(dKM, h1, h2), 0)
	}
	// In metres; four divisions (1/(h1+h2), 1/(m+1), 2/q, 1/d) serve the
	// eight of eqs. 22–23.
	d := dKM * 1000
	inv2ae := w.inv2aeM
	invHs := 1 / (h1 + h2)
	c := (h1 - h2) * invHs            // eq. 22d
	m := d * d * invHs * 0.5 * inv2ae // eq. 22e, d²/(4 a_e (h1 + h2))
	invM1 := 1 / (m + 1)              //
	q := math.Sqrt(3 * m * invM1)     // √(3m/(m+1)): eq. 22c's two roots from one
	arg := 1.5 * c * q * invM1        // argument of arccos in eq. 22c, 1.5c√(3m/(m+1)³)
	arg = max(-1, min(1, arg))
	b := 2 / q * eq22cRoot(arg) // eq. 22c, 2√((m+1)/(3m))·cos(π/3 + arccos(arg)/3)
	b = max(-1, min(1, b))
	invD := 1 / d
	d1 := d / 2 * (1 + b)                                     // eq. 22a
	d2 := d - d1                                              // eq. 22b
	h := ((h1-d1*d1*inv2ae)*d2 + (h2-d2*d2*inv2ae)*d1) * invD // eq. 22
	h = max(h, 0)
	hreq := 0.552 * math.Sqrt(d1*d2*rp.wavelengthM*invD) // eq. 23
	if h > hreq {
		return 0
	}
	aem := 0.5 * (d / sh) * (d / sh) // eq. 24, metres
	ft := w.fc.at(aem / 1000)
	ah := ft.loss(dKM, h1, h2)
	if ah < 0 {
		return 0
	}
	if hreq == 0 {
		return ah
	}
	return (1 - h/hreq) * ah // eq. 25
}
