package propagation

import "math"

// LinkProbability returns the probability (0–1) that a link with a median
// margin of marginDB works at a location, when the path loss varies about
// its median as a normal distribution in dB with standard deviation
// sigmaDB: Φ(M/σ) (the location-variability model of ITU-R P.1812-8 eq. 69).
// sigmaDB = 0 gives 1 for a non-negative margin and 0 otherwise; a negative
// or NaN sigma gives NaN.
func LinkProbability(marginDB, sigmaDB float64) float64 {
	switch {
	case math.IsNaN(marginDB) || math.IsNaN(sigmaDB) || sigmaDB < 0:
		return math.NaN()
	case sigmaDB == 0:
		if marginDB >= 0 {
			return 1
		}
		return 0
	}
	return 0.5 * math.Erfc(-marginDB/(sigmaDB*math.Sqrt2))
}

// MarginForReliabilityDB returns the median margin in dB a link needs to work
// at a fraction reliability (0–1, exclusive) of locations when the loss has
// standard deviation sigmaDB: σ Φ⁻¹(reliability), the inverse of
// LinkProbability (from math.Erfinv). Outside (0, 1) it returns ±Inf or NaN.
func MarginForReliabilityDB(reliability, sigmaDB float64) float64 {
	return sigmaDB * math.Sqrt2 * math.Erfinv(2*reliability-1)
}

// InverseNormalP1812 returns z with Φ(z) = x, the inverse of the standard
// normal cumulative distribution, by the rational approximation of ITU-R
// P.1812-8 Attachment 2 (maximum error 0.00054) for 0.000001 ≤ x ≤ 0.999999:
// T = √(−2 ln x), ξ = ((C2 T + C1) T + C0)/(((D3 T + D2) T + D1) T + 1),
// and T − ξ is the upper-tail quantile for x ≤ 0.5; the other half follows by
// symmetry. Outside its range x is clamped to it; NaN gives NaN.
func InverseNormalP1812(x float64) float64 {
	if math.IsNaN(x) {
		return math.NaN()
	}
	x = math.Max(1e-6, math.Min(0.999999, x))
	if x <= 0.5 {
		return -upperTailP1812(x)
	}
	return upperTailP1812(1 - x)
}

// upperTailP1812 is T(x) − ξ(x) of ITU-R P.1812-8 Attachment 2 for x ≤ 0.5.
func upperTailP1812(x float64) float64 {
	const (
		c0 = 2.515516698
		c1 = 0.802853
		c2 = 0.010328
		d1 = 1.432788
		d2 = 0.189269
		d3 = 0.001308
	)
	t := math.Sqrt(-2 * math.Log(x))
	xi := ((c2*t+c1)*t + c0) / (((d3*t+d2)*t+d1)*t + 1)
	return t - xi
}
