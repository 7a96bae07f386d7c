package propagation

import (
	"fmt"
	"math"
)

// MeanEarthRadiusKM is the mean radius of the earth, 6371 km, the value
// ITU-R P.1812-8 (§4.3) and ITU-R P.452-17 use to derive the effective
// earth radius.
const MeanEarthRadiusKM = 6371.0

// DefaultKFactor is the median effective earth-radius factor k = 4/3 used
// when no local refractivity data is available (ITU-R P.530-19 §2.2,
// referring to ITU-R P.310).
const DefaultKFactor = 4.0 / 3.0

// EffectiveEarthRadiusKM returns the effective earth radius a_e = k · 6371 km
// (ITU-R P.530-19 §2.2). k must be positive; k = 4/3 gives 8494.67 km.
func EffectiveEarthRadiusKM(k float64) float64 {
	return k * MeanEarthRadiusKM
}

// KFactorFromDeltaN returns the median effective earth-radius factor from
// the average radio-refractivity lapse rate through the lowest 1 km of the
// atmosphere, ΔN in N-units/km: k = 157/(157 − ΔN) (ITU-R P.1812-8 eq. 6).
// ΔN must be below 157 (at 157 and above the ray curves as fast as the earth:
// ducting, for which no effective radius exists); outside that range it
// returns an error.
func KFactorFromDeltaN(deltaN float64) (float64, error) {
	if !(deltaN < 157) || math.IsInf(deltaN, 0) {
		return 0, fmt.Errorf("refractivity gradient ΔN %g N-units/km is outside the range below 157 where k = 157/(157 − ΔN) is defined; use a typical value such as 45", deltaN)
	}
	return 157 / (157 - deltaN), nil
}

// RadioHorizonKM returns the distance in km at which the ray between two
// antennas h1M and h2M metres above a smooth earth of effective radius
// earthRadiusKM grazes the surface: d_los = √(2 a_e) (√h1 + √h2) (ITU-R
// P.526-16 eq. 21). Pass h2M = 0 for the horizon distance of one antenna.
// Negative heights count as 0.
func RadioHorizonKM(h1M, h2M, earthRadiusKM float64) float64 {
	h1 := math.Max(h1M, 0) / 1000
	h2 := math.Max(h2M, 0) / 1000
	return math.Sqrt(2*earthRadiusKM) * (math.Sqrt(h1) + math.Sqrt(h2))
}

// EarthBulgeM returns the height in metres of the earth's bulge above the
// chord between the two ends of a path, at a point d1KM from one end and
// d2KM from the other, on an earth of effective radius earthRadiusKM:
// 500 d1 d2 / a_e (the term in ITU-R P.526-16 eq. 49).
func EarthBulgeM(d1KM, d2KM, earthRadiusKM float64) float64 {
	return 500 * d1KM * d2KM / earthRadiusKM
}
