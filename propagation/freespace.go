package propagation

import "math"

// SpeedOfLightMS is the speed of light in vacuum, 299 792 458 m/s (SI
// definition), used when Params.SpeedOfLight is zero.
const SpeedOfLightMS = 299792458.0

// WavelengthM returns the wavelength in metres of a frequency in MHz for a
// propagation speed in m/s (0 selects SpeedOfLightMS).
func WavelengthM(freqMHz, speedOfLightMS float64) float64 {
	if speedOfLightMS == 0 {
		speedOfLightMS = SpeedOfLightMS
	}
	return speedOfLightMS / (freqMHz * 1e6)
}

// FreeSpaceLossDB returns the free-space basic transmission loss in dB over
// distKM kilometres at freqMHz megahertz: L_bf = 20 log10(4π d/λ) (ITU-R
// P.525-4 eq. 5), with λ from the SI speed of light. In practical units that
// is 32.448 + 20 log10 f[MHz] + 20 log10 d[km]. Distance and frequency must
// be positive; otherwise the result is not finite.
func FreeSpaceLossDB(distKM, freqMHz float64) float64 {
	return FreeSpaceLossWavelengthDB(distKM, WavelengthM(freqMHz, 0))
}

// FreeSpaceLossWavelengthDB returns the free-space basic transmission loss in
// dB over distKM kilometres for a wavelength in metres: 20 log10(4π d/λ)
// (ITU-R P.525-4 eq. 5). Use it where a validation set fixes its own speed of
// light.
func FreeSpaceLossWavelengthDB(distKM, wavelengthM float64) float64 {
	return 20 * math.Log10(4*math.Pi*distKM*1000/wavelengthM)
}

// SlantDistanceKM returns the straight-line distance in km between two
// antennas distKM apart horizontally whose heights above sea level differ by
// heightDiffM metres: d_fs = √(d² + (Δh/1000)²) (ITU-R P.1812-8 §4.2).
func SlantDistanceKM(distKM, heightDiffM float64) float64 {
	return math.Hypot(distKM, heightDiffM/1000)
}

// FreeSpaceLossP1812DB returns the free-space basic transmission loss in dB
// as ITU-R P.1812-8 §4.2 writes it, L_bfs = 92.4 + 20 log10 f[GHz] +
// 20 log10 d_fs[km], for a slant distance in km (see SlantDistanceKM) and a
// frequency in MHz. Its rounded constant 92.4 differs from the exact P.525
// value (92.45 with the SI speed of light); it exists to reproduce P.1812
// validation results. Use FreeSpaceLossDB otherwise.
func FreeSpaceLossP1812DB(slantKM, freqMHz float64) float64 {
	return 92.4 + 20*math.Log10(freqMHz/1000) + 20*math.Log10(slantKM)
}
