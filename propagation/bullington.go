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
// this). It reads the profile two or three times and does not allocate.
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
	iMax       int     // index of nuMax, −1 if none
	v1, v2     float64 // eqs. 58, 59
	hobs       float64 // eq. 61a
	aobt, aobr float64 // eqs. 61b, 61c
}

// scanProfile validates p and reads it: one pass for the checks and the
// terrain sums, one for the real-profile maxima, and a third only when the
// terrain rises above the antenna line (eqs. 61b, 61c).
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
	d := s.dKM
	s.htsM = hgt[0] + rp.txM
	s.hrsM = hgt[n-1] + rp.rxM
	hts, hrs := s.htsM, s.hrsM
	s.str = (hrs - hts) / d
	slope := s.str                    // the ray rises by (h_rs − h_ts)/d per km
	bulge := 500 / rp.aeKM            // 500 C_e of eq. 49
	kNu := 0.002 * d / rp.wavelengthM // eq. 51 factor without 1/(d_i (d−d_i))
	// Pass over the terrain: checks, the smooth-surface sums of eqs. 58
	// and 59 over every segment, and the highest obstruction of the
	// terrain above the antenna line (eqs. 61a, 61d).
	var v1, v2 float64
	hobs := math.Inf(-1)
	dp, hp := 0.0, hgt[0]
	for i := 1; i < n; i++ {
		di := dist[i] - s.d0
		hi := hgt[i]
		if !(di > dp) {
			return s, fmt.Errorf("%w: distance %g km at point %d does not increase from %g km at point %d", ErrBadPath, dist[i], i, dist[i-1], i-1)
		}
		if hi-hi != 0 { // NaN or ±Inf
			return s, fmt.Errorf("%w: terrain height %g m at point %d is not a number; fill voids before computing loss", ErrBadPath, hi, i)
		}
		dd := di - dp
		v1 += dd * (hi + hp)
		v2 += dd * (hi*(2*di+dp) + hp*(di+2*dp))
		dp, hp = di, hi
		if hob := hi - hts - slope*di; hob > hobs && i < n-1 {
			hobs = hob
		}
	}
	if clut != nil {
		for i, c := range clut[1 : n-1] {
			if !(c >= 0) || c-c != 0 {
				return s, fmt.Errorf("%w: clutter height %g m at point %d must be zero or more", ErrBadPath, c, i+1)
			}
		}
	}
	s.v1, s.v2, s.hobs = v1, v2, hobs

	// The obstruction slopes (eqs. 61b, 61c) matter only when the terrain
	// rises above the antenna line (eq. 62).
	aobt, aobr := s.aobt, s.aobr
	if hobs > 0 {
		for i := 1; i < n-1; i++ {
			di := dist[i] - s.d0
			ddi := d - di
			hob := (hgt[i] - hts - slope*di) / (di * ddi)
			if a := hob * ddi; a > aobt {
				aobt = a
			}
			if a := hob * di; a > aobr {
				aobr = a
			}
		}
	}

	// Pass over the real profile of terrain, clutter and bulge: eqs. 49,
	// 51 and 53. Inputs are finite here, so plain comparisons keep maxima.
	stim, srim, iMax := s.stim, s.srim, s.iMax
	qMax := math.Inf(-1)
	for i := 1; i < n-1; i++ {
		di := dist[i] - s.d0
		ddi := d - di
		r := 1 / (di * ddi) // one division gives both reciprocals
		g := hgt[i] + bulge*di*ddi
		if clut != nil {
			g += clut[i]
		}
		if v := (g - hts) * ddi * r; v > stim {
			stim = v
		}
		if v := (g - hrs) * di * r; v > srim {
			srim = v
		}
		// ν = e √(kNu r) with e = g − ray; x ↦ sign(x) x² is increasing,
		// so the largest e |e| r marks ν_max without a square root per point.
		if e := g - hts - slope*di; e*math.Abs(e)*r > qMax {
			qMax, iMax = e*math.Abs(e)*r, i
		}
	}
	nuMax := math.Inf(-1)
	if iMax >= 0 {
		nuMax = math.Copysign(math.Sqrt(kNu*math.Abs(qMax)), qMax)
	}
	s.stim, s.srim, s.nuMax, s.iMax = stim, srim, nuMax, iMax
	s.aobt, s.aobr = aobt, aobr
	return s, nil
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
