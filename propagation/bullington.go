package propagation

import (
	"fmt"
	"math"
)

// BullingtonTerms are the intermediate and final values of the
// delta-Bullington method (ITU-R P.526-16 §4.5), for diagnostics and
// validation. Losses are in dB, heights in metres above mean sea level,
// distances in km from the transmitter.
type BullingtonTerms struct {
	// LossDB is the diffraction loss L = L_ba + max(L_sph − L_bs, 0) (eq. 66).
	LossDB float64
	// LbaDB is the Bullington loss of the real profile, terrain plus clutter
	// (eq. 57 applied as §4.5.1 says).
	LbaDB float64
	// LbsDB is the Bullington loss of the smooth profile (eq. 64).
	LbsDB float64
	// LsphDB is the smooth spherical-earth loss for the effective antenna
	// heights over the smooth surface (eq. 65, §3.2).
	LsphDB float64
	// LucDB is the knife-edge loss J(ν) of the real profile before the
	// empirical correction of eq. 57 (eq. 52 or 56).
	LucDB float64
	// Nu is the diffraction parameter of the real profile: ν_max (eq. 51)
	// for a line-of-sight path, ν_b (eq. 55) otherwise.
	Nu float64
	// EdgeKM is the distance of the Bullington point d_b (eq. 54) on a
	// trans-horizon path, or of the profile point giving ν_max on a
	// line-of-sight path (NaN when the path has no intermediate points).
	EdgeKM float64
	// LineOfSight reports the eq. 50 test S_tim < S_tr on the real profile.
	LineOfSight bool
	// HtsM and HrsM are the antenna heights amsl, terrain plus antenna.
	HtsM, HrsM float64
	// HstipM and HsripM are the heights amsl at the transmitter and
	// receiver of the least-squares straight line fitted to the terrain
	// (eqs. 58–60), before the obstruction correction.
	HstipM, HsripM float64
	// HstM and HsrM are the heights amsl of the smooth surface at the
	// transmitter and receiver after the obstruction correction and the
	// limit to the ground heights (eqs. 61–63).
	HstM, HsrM float64
	// HtsSmoothM and HrsSmoothM are the antenna heights above the smooth
	// surface, h'_ts = h_ts − h_st and h'_rs = h_rs − h_sr (eq. 64).
	HtsSmoothM, HrsSmoothM float64
}

// DeltaBullington returns the diffraction loss of a path by the
// delta-Bullington method of ITU-R P.526-16 §4.5 (eqs. 49–66), with every
// intermediate term. Clutter heights in p are part of the real profile
// (L_ba, eqs. 49–57); the smooth surface (eqs. 58–63) is fitted to the
// terrain alone, as in ITU-R P.1812-8 (its validation results confirm
// this). It reads the profile once, then the parts of it that can hold
// the maxima of eqs. 49–53 and 61 (see scanProfile), and does not allocate.
func DeltaBullington(p Path, prm Params) (BullingtonTerms, error) {
	rp, err := prm.resolve()
	if err != nil {
		return BullingtonTerms{}, err
	}
	s, err := scanProfile(p, rp)
	if err != nil {
		return BullingtonTerms{}, err
	}
	return deltaBullington(p, rp, &s), nil
}

// profileScan gathers everything the delta-Bullington method and the
// clearance need from the real profile.
type profileScan struct {
	n          int
	d0, dKM    float64 // first distance, path length
	htsM, hrsM float64 // antenna heights amsl
	stim, srim float64 // eqs. 49, 53
	str        float64 // eq. 50
	nuMax      float64 // eq. 51 maximum (computed for every path)
	qMax       float64 // e|e|/(d_i (d−d_i)) at iMax: nuMax without the wavelength (see atWavelength)
	iMax       int     // index of nuMax, −1 if none
	v1, v2     float64 // eqs. 58, 59
	hobs       float64 // eq. 61a
	aobt, aobr float64 // eqs. 61b, 61c
}

// scanBlocks is the most blocks scanProfile splits the intermediate
// points of a profile into; minScanBlock is the fewest points in a block.
const (
	scanBlocks   = 64
	minScanBlock = 16
)

// scanProfile validates p and reads it: one pass over every point for the
// checks, the terrain sums of the smooth surface (eqs. 58, 59) and the
// highest obstruction above the antenna line (eq. 61a), then the maxima
// of eqs. 49, 51, 53, 61b and 61c block by block, reading only the blocks
// that can hold them.
//
// Every value is computed by the same floating-point expressions as a
// plain reading of the equations (each maximum over every point in
// order), so the results are identical to the last bit
// (TestScanProfileAgainstPlain). The first pass also keeps, for blocks of
// consecutive points, the largest height of the terrain above the antenna
// line; from it an upper bound of each quantity over the block follows
// (the quantities are that height over d_i or d − d_i plus terms of the
// ray, the bulge and the clutter, bounded over the block). The blocks
// with the largest bounds are read first, then every block whose bound,
// raised by a margin of 1e−9 of the magnitudes involved, reaches the
// maximum found so far. The margin is far beyond the few roundings of
// relative size 2⁻⁵³ in each value (IEEE 754 round to nearest; Higham,
// "Accuracy and Stability of Numerical Algorithms", 2nd ed., §2.2), so a
// block left out cannot hold a larger value.
func scanProfile(p Path, rp params) (profileScan, error) {
	if err := checkPath(p); err != nil {
		return profileScan{}, err
	}
	n := len(p.DistKM)
	dist, hgt, clut := p.DistKM[:n], p.HeightM[:n], p.ClutterM
	s := profileScan{
		n:     n,
		d0:    dist[0],
		iMax:  -1,
		stim:  math.Inf(-1),
		srim:  math.Inf(-1),
		nuMax: math.Inf(-1),
		hobs:  math.Inf(-1),
		aobt:  math.Inf(-1),
		aobr:  math.Inf(-1),
	}
	s.dKM = dist[n-1] - dist[0]
	if !finite(dist[0]) || !finite(s.dKM) || !(s.dKM > 0) {
		return s, fmt.Errorf("%w: path length %g km from distances %g to %g km must be positive", ErrBadPath, s.dKM, dist[0], dist[n-1])
	}
	if !finite(hgt[0]) || !finite(hgt[n-1]) {
		return s, fmt.Errorf("%w: terminal terrain heights %g and %g m must be numbers", ErrBadPath, hgt[0], hgt[n-1])
	}
	d, d0 := s.dKM, s.d0
	s.htsM = hgt[0] + rp.txM
	s.hrsM = hgt[n-1] + rp.rxM
	hts, hrs := s.htsM, s.hrsM
	s.str = (hrs - hts) / d
	slope := s.str         // the ray rises by (h_rs − h_ts)/d per km
	bulge := 500 / rp.aeKM // 500 C_e of eq. 49

	// Pass over the terrain: checks, the smooth-surface sums of eqs. 58
	// and 59 over every segment, and the highest obstruction of the
	// terrain above the antenna line (eqs. 61a, 61d), per block and in all.
	blk := max(minScanBlock, (n-2+scanBlocks-1)/scanBlocks)
	var bm [scanBlocks]float64 // per block, the largest h_i − h_ts − slope·d_i
	nb := 0
	var v1, v2 float64
	hobs := math.Inf(-1)
	amax := max(math.Abs(hgt[0]), math.Abs(hgt[n-1])) // largest |h_i|
	dp, hp := 0.0, hgt[0]
	for lo := 1; lo < n; lo += blk {
		hi := min(lo+blk, n-1)
		if lo == n-1 {
			hi = n // the last point alone: the last segment of the sums
		}
		var m float64
		var bad int
		m, dp, hp, v1, v2, amax, bad = terrainBlock(dist[lo:hi], hgt[lo:hi], d0, hts, slope, dp, hp, v1, v2, amax)
		if bad >= 0 {
			i := lo + bad
			if !(dist[i]-d0 > dp) {
				return s, fmt.Errorf("%w: distance %g km at point %d does not increase from %g km at point %d", ErrBadPath, dist[i], i, dist[i-1], i-1)
			}
			return s, fmt.Errorf("%w: terrain height %g m at point %d is not a number; fill voids before computing loss", ErrBadPath, hgt[i], i)
		}
		if hi == n {
			break
		}
		bm[nb] = m
		nb++
		if m > hobs {
			hobs = m
		}
		if hi == n-1 {
			lo = n - 1 - blk // the last point next
		}
	}
	cmax := 0.0
	if clut != nil {
		for i, c := range clut[1 : n-1] {
			if !(c >= 0) || c-c != 0 {
				return s, fmt.Errorf("%w: clutter height %g m at point %d must be zero or more", ErrBadPath, c, i+1)
			}
			if c > cmax {
				cmax = c
			}
		}
	}
	s.v1, s.v2, s.hobs = v1, v2, hobs
	if nb == 0 {
		return s, nil // no intermediate points
	}

	// The magnitudes every value is made of, metres: the margin's scale.
	scale := amax + math.Abs(hts) + math.Abs(hrs) + bulge*d*d + cmax
	sc := scanner{dist: dist, hgt: hgt, clut: clut, d0: d0, d: d, hts: hts, hrs: hrs, slope: slope, bulge: bulge,
		aobt: math.Inf(-1), aobr: math.Inf(-1), stim: math.Inf(-1), srim: math.Inf(-1), qMax: math.Inf(-1), iMax: -1}
	var ub [5][scanBlocks]float64 // bounds with their margins: a_obt, a_obr, S_tim, S_rim, e|e|/(d_i (d−d_i))
	best := [5]int{-1, -1, -1, -1, -1}
	for b := range nb {
		lo := 1 + b*blk
		hi := min(lo+blk, n-1)
		da, db := dist[lo]-d0, dist[hi-1]-d0 // d_i over the block
		ea, eb := d-da, d-db                 // d − d_i over the block
		m := bm[b]
		// Eqs. 61b, 61c: a_obt ≈ h_obi/d_i, a_obr ≈ h_obi/(d − d_i),
		// needed only when some h_obi > 0, and then positive.
		ub[0][b], ub[1][b] = math.Inf(-1), math.Inf(-1)
		if hobs > 0 && m > 0 {
			ub[0][b] = m / da * (1 + 1e-9)
			ub[1][b] = m / eb * (1 + 1e-9)
		}
		// Eq. 49: (g − h_ts)/d_i = h_obi/d_i + slope + C d(−d_i) + c_i/d_i.
		mt := m / da
		if m < 0 {
			mt = m / db
		}
		ut := mt + slope + bulge*ea + cmax/da
		ub[2][b] = ut + 1e-9*(scale/da+math.Abs(ut))
		// Eq. 53: (g − h_rs)/(d − d_i) = h_obi/(d − d_i) − slope + C d_i + c_i/(d − d_i).
		mr := m / eb
		if m < 0 {
			mr = m / ea
		}
		ur := mr - slope + bulge*db + cmax/eb
		ub[3][b] = ur + 1e-9*(scale/eb+math.Abs(ur))
		// Eq. 51: e = g − ray = h_obi + C d_i (d − d_i) + c_i ≤ E.
		e := m + bulge*db*ea + cmax + 1e-9*scale
		uq := -e * e / (db * ea)
		if e >= 0 {
			uq = e * e / min(da*ea, db*eb)
		}
		ub[4][b] = uq + 1e-9*math.Abs(uq)
		for k := range best {
			if best[k] < 0 || ub[k][b] > ub[k][best[k]] {
				best[k] = b
			}
		}
	}
	// Read the most promising blocks first, then every block that can
	// still raise a maximum.
	var done uint64
	read := func(b int) {
		if done&(1<<b) != 0 {
			return
		}
		done |= 1 << b
		lo := 1 + b*blk
		hi := min(lo+blk, n-1)
		if ub[0][b] > math.Inf(-1) && (ub[0][b] >= sc.aobt || ub[1][b] >= sc.aobr) {
			sc.obstruction(lo, hi)
		}
		if ub[2][b] >= sc.stim || ub[3][b] >= sc.srim || ub[4][b] >= sc.qMax {
			sc.real(lo, hi)
		}
	}
	for _, b := range best {
		read(b)
	}
	for b := range nb {
		read(b)
	}
	if hobs > 0 {
		s.aobt, s.aobr = sc.aobt, sc.aobr
	}
	s.stim, s.srim, s.qMax, s.iMax = sc.stim, sc.srim, sc.qMax, sc.iMax
	s.atWavelength(rp.wavelengthM)
	return s, nil
}

// atWavelength sets nuMax, the largest ν of eq. 51, for the wavelength
// wavelengthM in metres. It is the only part of the scan that depends on
// the frequency, so one scan serves several frequencies over the same
// path and antenna heights.
func (s *profileScan) atWavelength(wavelengthM float64) {
	s.nuMax = math.Inf(-1)
	if s.iMax >= 0 {
		kNu := 0.002 * s.dKM / wavelengthM // eq. 51 factor without 1/(d_i (d−d_i))
		s.nuMax = math.Copysign(math.Sqrt(kNu*math.Abs(s.qMax)), s.qMax)
	}
}

// terrainBlock is the first pass of scanProfile over one block of
// points (distances dist, km, and heights hgt, m): it carries the previous
// point (dp, hp), the sums of eqs. 58 and 59 (v1, v2) and the largest
// magnitude of the heights (amax), and returns them with the block's largest h_i − h_ts − slope·d_i
// (eq. 61a). bad is the index in the block of the first point whose
// distance does not increase or whose height is not a number, −1 if none;
// the values returned are then meaningless. A function of its own keeps
// every running value in a register; the maximum is taken on orderKey.
func terrainBlock(dist, hgt []float64, d0, hts, slope, dp, hp, v1, v2, amax float64) (m, dpOut, hpOut, v1Out, v2Out, amaxOut float64, bad int) {
	mk := orderKey(math.Inf(-1)) // the running maximum of h_i − h_ts − slope·d_i as orderKey
	dist = dist[:len(hgt)]
	// Two points a turn, each value by the same expression and the sums
	// in the same order as one at a time; a pair with a bad point is left
	// to the loop below, which names it.
	i := 0
	for ; i+1 < len(hgt); i += 2 {
		h1, h2 := hgt[i], hgt[i+1]
		d1, d2 := dist[i]-d0, dist[i+1]-d0
		if !(d1 > dp) || !(d2 > d1) || h1-h1 != 0 || h2-h2 != 0 {
			break
		}
		dd := d1 - dp
		v1 += dd * (h1 + hp)
		v2 += dd * (h1*(2*d1+dp) + hp*(d1+2*dp))
		dd = d2 - d1
		v1 += dd * (h2 + h1)
		v2 += dd * (h2*(2*d2+d1) + h1*(d2+2*d1))
		dp, hp = d2, h2
		mk = max(mk, orderKey(h1-hts-slope*d1))
		mk = max(mk, orderKey(h2-hts-slope*d2))
		amax = maxAbs(amax, h1)
		amax = maxAbs(amax, h2)
	}
	for ; i < len(hgt); i++ {
		h := hgt[i]
		di := dist[i] - d0
		if !(di > dp) || h-h != 0 { // not increasing; NaN or ±Inf
			return 0, dp, hp, v1, v2, amax, i
		}
		dd := di - dp
		v1 += dd * (h + hp)
		v2 += dd * (h*(2*di+dp) + hp*(di+2*dp))
		dp, hp = di, h
		mk = max(mk, orderKey(h-hts-slope*di))
		amax = maxAbs(amax, h)
	}
	return fromOrderKey(mk), dp, hp, v1, v2, amax, -1
}

// orderKey maps a float64 that is not NaN to an int64 in the same order
// (IEEE 754 bit patterns: sign and magnitude, negatives reversed), so a
// running maximum is an integer one, without a branch to mispredict on
// rough terrain. −0 orders just below +0, where a comparison keeps the
// first of the two; they are equal as numbers, and the block maxima only
// bound the block's values or, as h_obs of eq. 61a, count when above 0.
func orderKey(x float64) int64 {
	k := int64(math.Float64bits(x))
	return k ^ int64(uint64(k>>63)>>1)
}

// fromOrderKey is the inverse of orderKey.
func fromOrderKey(k int64) float64 {
	return math.Float64frombits(uint64(k ^ int64(uint64(k>>63)>>1)))
}

// maxAbs returns max(a, |h|) for a ≥ 0 by comparisons only (math.Abs costs
// a trip through an integer register here).
func maxAbs(a, h float64) float64 {
	if h > a {
		return h
	}
	if -h > a {
		return -h
	}
	return a
}

// scanner reads blocks of a profile for the maxima of scanProfile.
type scanner struct {
	dist, hgt, clut               []float64
	d0, d, hts, hrs, slope, bulge float64
	aobt, aobr, stim, srim, qMax  float64
	iMax                          int
}

// obstruction updates a_obt and a_obr (eqs. 61b, 61c) with points lo to
// hi−1.
func (sc *scanner) obstruction(lo, hi int) {
	dist, hgt := sc.dist[lo:hi], sc.hgt[lo:hi]
	d0, d, hts, slope := sc.d0, sc.d, sc.hts, sc.slope
	aobt, aobr := sc.aobt, sc.aobr
	for i, h := range hgt {
		di := dist[i] - d0
		ddi := d - di
		hob := (h - hts - slope*di) / (di * ddi)
		if a := hob * ddi; a > aobt {
			aobt = a
		}
		if a := hob * di; a > aobr {
			aobr = a
		}
	}
	sc.aobt, sc.aobr = aobt, aobr
}

// real updates S_tim, S_rim and the point of ν_max (eqs. 49, 51, 53) with
// points lo to hi−1 of the real profile of terrain, clutter and bulge.
// Inputs are finite here, so plain comparisons keep maxima; of equal
// values of ν the first point is kept, as when reading in order.
func (sc *scanner) real(lo, hi int) {
	dist, hgt := sc.dist[:hi], sc.hgt[:hi]
	d0, d, hts, hrs, slope, bulge := sc.d0, sc.d, sc.hts, sc.hrs, sc.slope, sc.bulge
	stim, srim, qMax, iMax := sc.stim, sc.srim, sc.qMax, sc.iMax
	for i := lo; i < hi; i++ {
		di := dist[i] - d0
		ddi := d - di
		r := 1 / (di * ddi) // one division gives both reciprocals
		g := hgt[i] + bulge*di*ddi
		if sc.clut != nil {
			g += sc.clut[i]
		}
		if v := (g - hts) * ddi * r; v > stim {
			stim = v
		}
		if v := (g - hrs) * di * r; v > srim {
			srim = v
		}
		// ν = e √(kNu r) with e = g − ray; x ↦ sign(x) x² is increasing,
		// so the largest e |e| r marks ν_max without a square root per
		// point.
		if e := g - hts - slope*di; e*math.Abs(e)*r > qMax || (e*math.Abs(e)*r == qMax && i < iMax) {
			qMax, iMax = e*math.Abs(e)*r, i
		}
	}
	sc.stim, sc.srim, sc.qMax, sc.iMax = stim, srim, qMax, iMax
}

// clearance converts the scan into first-Fresnel-zone terms: with
// R1 = √(λ d_i (d−d_i)/d) the eq. 51 factor √(0.002 d/(λ d_i (d−d_i))) is
// √2/R1, so the worst clearance is −ν_max/√2.
func (s *profileScan) clearance() Clearance {
	if s.iMax < 0 {
		return Clearance{WorstF1: math.Inf(1), Index: -1, LineOfSight: true}
	}
	return Clearance{
		WorstF1:     -s.nuMax / math.Sqrt2,
		Index:       s.iMax,
		LineOfSight: s.stim < s.str,
	}
}

// bullingtonLoss applies eqs. 50–57 given the maxima of a profile.
// It returns L_uc, ν, the edge distance and L_b.
func bullingtonLoss(stim, srim, nuMax, edgeKM, hts, hrs, d, wavelengthM float64) (luc, nu, dEdge, lb float64) {
	str := (hrs - hts) / d
	if stim < str { // eq. 50: line of sight
		nu, dEdge = nuMax, edgeKM
	} else {
		db := (hrs - hts + srim*d) / (stim + srim)                                                // eq. 54
		nu = (hts + stim*db - (hts*(d-db)+hrs*db)/d) * math.Sqrt(0.002*d/(wavelengthM*db*(d-db))) // eq. 55
		dEdge = db
	}
	luc = KnifeEdgeLossDB(nu) // eqs. 52, 56
	if luc == 0 {
		return luc, nu, dEdge, 0 // eq. 57 with L_uc = 0, without the exponential
	}
	lb = luc + (1-math.Exp(-luc/6))*(10+0.02*d) // eq. 57
	return luc, nu, dEdge, lb
}

// deltaBullington completes §4.5 from the scan of the real profile; it makes
// the second pass, over the smooth profile.
func deltaBullington(p Path, rp params, s *profileScan) BullingtonTerms {
	d := s.dKM
	t := BullingtonTerms{HtsM: s.htsM, HrsM: s.hrsM, EdgeKM: math.NaN()}
	edge := math.NaN()
	if s.iMax >= 0 {
		edge = p.DistKM[s.iMax] - s.d0
	}
	t.LineOfSight = s.stim < s.str
	t.LucDB, t.Nu, t.EdgeKM, t.LbaDB = bullingtonLoss(s.stim, s.srim, s.nuMax, edge, s.htsM, s.hrsM, d, rp.wavelengthM)

	// Smooth surface (eqs. 60–63).
	hstip := (2*s.v1*d - s.v2) / (d * d)
	hsrip := (s.v2 - s.v1*d) / (d * d)
	t.HstipM, t.HsripM = hstip, hsrip
	hstp, hsrp := hstip, hsrip
	if s.hobs > 0 {
		gt := s.aobt / (s.aobt + s.aobr)
		gr := s.aobr / (s.aobt + s.aobr)
		hstp -= s.hobs * gt
		hsrp -= s.hobs * gr
	}
	n := s.n
	t.HstM = math.Min(hstp, p.HeightM[0])
	t.HsrM = math.Min(hsrp, p.HeightM[n-1])
	t.HtsSmoothM = s.htsM - t.HstM
	t.HrsSmoothM = s.hrsM - t.HsrM

	// Bullington on the smooth profile: every h_i = 0 (eq. 64).
	hts, hrs := t.HtsSmoothM, t.HrsSmoothM
	stim, srim, nuMax := smoothProfileMaxima(p.DistKM[:n], s.d0, d, hts, hrs, rp)
	_, _, _, t.LbsDB = bullingtonLoss(stim, srim, nuMax, 0, hts, hrs, d, rp.wavelengthM)

	// Smooth spherical earth for the same heights (eq. 65), and eq. 66.
	t.LsphDB = smoothEarthLoss(d, hts, hrs, rp)
	t.LossDB = t.LbaDB + math.Max(t.LsphDB-t.LbsDB, 0)
	return t
}

// smoothProfileMaxima returns S_tim (eq. 49), S_rim (eq. 53) and ν_max
// (eq. 51) over the intermediate points of a profile whose heights are all
// zero (eq. 64), for antennas hts, hrs ≥ 0 m above it.
//
// On such a profile each quantity is unimodal in d_i, so a binary search
// over the sorted points finds its maximum in O(log n):
//   - (500 C_e d_i (d−d_i) − h_ts)/d_i = 500 C_e (d−d_i) − h_ts/d_i is
//     concave in d_i for h_ts ≥ 0, and likewise (eq. 53) in d − d_i;
//   - with d_i = d sin²θ, ν = √(0.002 d/λ) [250 C_e d sin 2θ −
//     (h_ts cot θ + h_rs tan θ)/d] is concave in θ on (0, π/2) (sin 2θ is
//     concave there, cot θ and tan θ convex), and θ grows with d_i.
func smoothProfileMaxima(dist []float64, d0, d, hts, hrs float64, rp params) (stim, srim, nuMax float64) {
	n := len(dist)
	if n < 3 {
		inf := math.Inf(-1)
		return inf, inf, inf
	}
	bulge := 500 / rp.aeKM
	kNu := 0.002 * d / rp.wavelengthM
	slope := (hrs - hts) / d
	tim := func(i int) float64 {
		di := dist[i] - d0
		return bulge*(d-di) - hts/di
	}
	rim := func(i int) float64 {
		di := dist[i] - d0
		return bulge*di - hrs/(d-di)
	}
	nu := func(i int) float64 {
		di := dist[i] - d0
		ddi := d - di
		return (bulge*di*ddi - hts - slope*di) * math.Sqrt(kNu/(di*ddi))
	}
	return maxUnimodal(1, n-2, tim), maxUnimodal(1, n-2, rim), maxUnimodal(1, n-2, nu)
}

// maxUnimodal returns the largest f(i) for lo ≤ i ≤ hi, for f that rises
// and then falls (ties only at the peak), by binary search.
func maxUnimodal(lo, hi int, f func(int) float64) float64 {
	for lo < hi {
		mid := lo + (hi-lo)/2
		if f(mid) < f(mid+1) {
			lo = mid + 1
		} else {
			hi = mid
		}
	}
	return f(lo)
}
