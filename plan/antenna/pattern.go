package antenna

// The pattern model: a cosⁿ main lobe per principal plane, fitted to the
// half-power beamwidth, with a floor behind.

import "math"

// OmniFloorDB is how far below the peak gain the pattern of an antenna that
// is omnidirectional in azimuth is allowed to fall, in dB. The cosⁿ
// elevation lobe has true nulls straight up and down, which real antennas
// fill through feedline currents, the mast and ground reflections; the
// floor keeps a link budget finite there. It is a modelling choice of this
// package, not a property of any antenna.
const OmniFloorDB = 25

// cosExponent returns the exponent n for which cosⁿ(θ) = 1/2 at θ equal to
// half the beamwidth: n = ln(1/2) / ln(cos(bw/2)). Beamwidths must be in
// (0°, 180°).
func cosExponent(beamwidthDeg float64) float64 {
	half := beamwidthDeg / 2 * math.Pi / 180
	return math.Log(0.5) / math.Log(math.Cos(half))
}

// lobeDB returns 10·n·log10(cos θ) for |θ| < 90°, the cosⁿ power pattern
// in dB relative to its peak, and −Inf at and beyond 90°.
func lobeDB(offDeg, beamwidthDeg float64) float64 {
	c := math.Cos(offDeg * math.Pi / 180)
	if c <= 0 || math.Abs(offDeg) >= 90 {
		return math.Inf(-1)
	}
	return 10 * cosExponent(beamwidthDeg) * math.Log10(c)
}

// AzimuthOffsetDeg returns the angle from a bearing to an azimuth, both in
// degrees clockwise from true north, normalised to (−180°, 180°].
func AzimuthOffsetDeg(azimuthDeg, bearingDeg float64) float64 {
	d := math.Mod(azimuthDeg-bearingDeg, 360)
	switch {
	case d > 180:
		d -= 360
	case d <= -180:
		d += 360
	}
	return d
}

// RelativeDB returns the pattern in dB relative to the peak gain (0 at
// boresight, negative elsewhere) toward a direction offAzimuthDeg from the
// antenna's bearing and elevationDeg above the horizontal, with the antenna
// level (mechanical tilt 0).
//
// The model is the cosⁿ main lobe of antenna textbooks (radiation intensity
// U = cosⁿθ, as in C. A. Balanis, Antenna Theory, 3rd ed., ch. 2; from
// memory), applied separately in the two principal planes and added in dB:
// in each plane n is fitted so that the lobe is exactly 3.01 dB down at half
// the catalog's half-power beamwidth. Directional antennas (a horizontal
// beamwidth under 360°) have a floor at −FrontToBackDB, which is what they
// give behind; antennas omnidirectional in azimuth have only the elevation
// lobe, floored at −OmniFloorDB. Elevations beyond ±90° are taken as ±90°;
// a NaN elevation, or a NaN azimuth for a directional antenna, gives NaN.
func (a Antenna) RelativeDB(offAzimuthDeg, elevationDeg float64) float64 {
	if math.IsNaN(elevationDeg) || (a.Directional() && math.IsNaN(offAzimuthDeg)) {
		return math.NaN()
	}
	el := math.Max(-90, math.Min(90, elevationDeg))
	rel := lobeDB(el, a.VBeamwidthDeg)
	floor := -float64(OmniFloorDB)
	if a.Directional() {
		rel += lobeDB(AzimuthOffsetDeg(offAzimuthDeg, 0), a.HBeamwidthDeg)
		floor = -a.FrontToBackDB
	}
	return math.Max(rel, floor)
}

// GainTowardDBi returns the antenna's gain in dBi toward a direction:
// azimuthDeg (degrees clockwise from true north) and elevationDeg (degrees
// above the horizontal), for an antenna aimed at bearingDeg (true north) and
// level (mechanical tilt 0). Omnidirectional antennas ignore the bearing.
// It is GainDBi + RelativeDB (the cosⁿ pattern model described there).
func (a Antenna) GainTowardDBi(azimuthDeg, elevationDeg, bearingDeg float64) float64 {
	return a.GainDBi + a.RelativeDB(AzimuthOffsetDeg(azimuthDeg, bearingDeg), elevationDeg)
}
