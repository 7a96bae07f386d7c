package propagation

import "math"

// FresnelRadiusM returns the radius in metres of the first Fresnel zone at a
// point d1KM from one end and d2KM from the other of a path at freqMHz:
// R1 = 550 √(d1 d2 / ((d1 + d2) f)) (ITU-R P.526-16 eq. 3). The constant 550
// rounds √(c/1e6 · 1000) = 547.5; FresnelRadiusWavelengthM is the exact form.
func FresnelRadiusM(d1KM, d2KM, freqMHz float64) float64 {
	return 550 * math.Sqrt(d1KM*d2KM/((d1KM+d2KM)*freqMHz))
}

// FresnelRadiusWavelengthM returns the exact radius in metres of the first
// Fresnel zone for a wavelength in metres, R1 = √(λ d1 d2/(d1 + d2)) (the
// n = 1 case of ITU-R P.526-16 eq. 2), with d1KM and d2KM the distances in
// km to the two ends. It is the radius the Terrain model uses for
// Result.WorstClearanceF1, consistent with ν = −√2 · clearance/R1 (eq. 26).
func FresnelRadiusWavelengthM(d1KM, d2KM, wavelengthM float64) float64 {
	return math.Sqrt(wavelengthM * d1KM * d2KM * 1000 / (d1KM + d2KM))
}

// Clearance describes how the terrain of a path clears the straight ray
// between the antennas over an earth of effective radius (see Params).
type Clearance struct {
	// WorstF1 is the smallest ratio, over the intermediate profile points, of
	// the clearance in metres between the ray and terrain + clutter + earth
	// bulge to the first Fresnel-zone radius there (FresnelRadiusWavelengthM).
	// 1 or more is a clear first zone, 0.6 the usual planning minimum (ITU-R
	// P.526-16 §2.3), negative means the terrain cuts the ray. +Inf when the
	// path has no intermediate points.
	WorstF1 float64
	// Index is the index in Path of the point where WorstF1 occurs, or −1
	// when the path has no intermediate points.
	Index int
	// LineOfSight is true when every intermediate point lies below the ray
	// (ITU-R P.526-16 eq. 50 test, S_tim < S_tr).
	LineOfSight bool
}

// PathClearance returns the worst first-Fresnel-zone clearance of a path and
// whether it is line of sight, for the antenna heights, frequency and
// effective earth radius in prm. It reads the profile once and does not
// allocate.
func PathClearance(p Path, prm Params) (Clearance, error) {
	rp, err := prm.resolve()
	if err != nil {
		return Clearance{}, err
	}
	s, err := scanProfile(p, rp)
	if err != nil {
		return Clearance{}, err
	}
	return s.clearance(), nil
}
