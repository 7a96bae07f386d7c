package report

import (
	"errors"
	"fmt"
	"math"
)

// ErrChartData is wrapped by every error about the data or options given to
// a chart.
var ErrChartData = errors.New("chart data")

// Chart colours (sRGB, #rrggbb), chosen for this package and shared by the
// SVG and PNG renderers: an earth tone for the ground, a plain blue for the
// radio path, greys for the frame.
const (
	colourBackground = "#ffffff"
	colourGround     = "#cdbb8e"
	colourGroundEdge = "#7a6a44"
	colourRay        = "#2464a8"
	colourMast       = "#3b3b3b"
	colourCurve      = "#8c8c8c"
	colourGrid       = "#e4e4e4"
	colourAxis       = "#333333"
	colourText       = "#222222"
	colourZone       = "#2464a8" // first Fresnel zone: the ray's blue, filled faintly
	colourZone06     = "#17406c" // its 0.6 part, dashed, darker
	colourObstacle   = "#b3261e" // the governing obstacle
)

// zoneFillOpacity is how opaque the first Fresnel zone's fill is, so the
// ground stays visible through it where the zone is obstructed.
const zoneFillOpacity = 0.16

// Default chart size in pixels (SVG user units).
const (
	DefaultWidthPx  = 800
	DefaultHeightPx = 360
)

// profileChart holds the options of ProfileSVG and ProfilePNG.
type profileChart struct {
	title             string
	imperial          bool
	widthPx, heightPx int
	antennas          bool
	fromHeightM       float64
	toHeightM         float64
	k                 float64 // effective earth-radius factor; 0 draws a flat earth
	freqMHz           float64 // 0: no Fresnel zone
}

// ProfileOption changes how ProfileSVG and ProfilePNG draw a chart.
type ProfileOption func(*profileChart)

// WithTitle sets the title line drawn above the chart (plain text; it is
// escaped for XML in an SVG, and control characters are dropped).
func WithTitle(title string) ProfileOption { return func(c *profileChart) { c.title = title } }

// WithImperial labels the axes in miles and feet instead of kilometres and
// metres. The data stay in metres.
func WithImperial() ProfileOption { return func(c *profileChart) { c.imperial = true } }

// WithSize sets the chart size in pixels (SVG user units, PNG pixels); each
// must be at least 320 × 200 and at most 10000.
func WithSize(widthPx, heightPx int) ProfileOption {
	return func(c *profileChart) { c.widthPx, c.heightPx = widthPx, heightPx }
}

// WithAntennas draws masts of fromHeightM and toHeightM metres above the
// ground at the two ends, and the straight line of sight between their tops.
// Heights must be 0 or more.
func WithAntennas(fromHeightM, toHeightM float64) ProfileOption {
	return func(c *profileChart) {
		c.antennas, c.fromHeightM, c.toHeightM = true, fromHeightM, toHeightM
	}
}

// WithEarthBulge draws the terrain on an earth of effective radius
// k × 6371 km: each height is raised by the earth bulge above the chord
// between the ends, 500 d1 d2 / a_e metres with d1, d2 in km (ITU-R
// P.526-16 eq. 49, propagation.EarthBulgeM), and the curved sea-level line
// under the terrain is drawn dashed. A straight line on the chart is then a
// radio ray bent by the atmosphere of that k. k must be between 0.1 and 100;
// 4/3 is the usual median (propagation.DefaultKFactor).
func WithEarthBulge(k float64) ProfileOption { return func(c *profileChart) { c.k = k } }

// WithFrequency draws, around the line of sight of WithAntennas, the first
// Fresnel zone at freqMHz (1 MHz to 100 GHz) and its 0.6 part, and marks
// the governing obstacle: the intermediate sample whose clearance below the
// ray is the smallest fraction of the first zone's radius there, with that
// clearance in F1 units and in metres (feet with WithImperial). The radius
// is R1 = √(λ d1 d2 / (d1 + d2)) (ITU-R P.526-16 eq. 2, n = 1,
// propagation.FresnelRadiusWavelengthM) with λ = c/f. With WithEarthBulge
// the ground is raised by the earth bulge, so clearances are those over an
// earth of that k, as the terrain model measures them; 0.6 F1 is the usual
// planning minimum (ITU-R P.526-16 §2.3). It needs WithAntennas.
func WithFrequency(freqMHz float64) ProfileOption {
	return func(c *profileChart) { c.freqMHz = freqMHz }
}

// newProfileChart applies opts to the defaults and checks them with the
// data.
func newProfileChart(distM, elevM []float64, opts []ProfileOption) (*profileChart, error) {
	c := &profileChart{widthPx: DefaultWidthPx, heightPx: DefaultHeightPx}
	for _, o := range opts {
		o(c)
	}
	if err := c.check(distM, elevM); err != nil {
		return nil, err
	}
	return c, nil
}

// check validates the data and options.
func (c *profileChart) check(distM, elevM []float64) error {
	if len(distM) != len(elevM) {
		return fmt.Errorf("%w: %d distances but %d heights; give one height per distance", ErrChartData, len(distM), len(elevM))
	}
	if len(distM) < 2 {
		return fmt.Errorf("%w: a profile needs at least 2 samples, got %d", ErrChartData, len(distM))
	}
	for i := range distM {
		if !finite(distM[i]) || !finite(elevM[i]) {
			return fmt.Errorf("%w: sample %d is not a finite number (distance %v m, height %v m)", ErrChartData, i, distM[i], elevM[i])
		}
		if i > 0 && distM[i] < distM[i-1] {
			return fmt.Errorf("%w: sample %d: distance %g m is less than the one before (%g m); distances must not decrease", ErrChartData, i, distM[i], distM[i-1])
		}
	}
	if !(distM[len(distM)-1] > distM[0]) {
		return fmt.Errorf("%w: the path has no length (all samples at %g m)", ErrChartData, distM[0])
	}
	if c.widthPx < 320 || c.heightPx < 200 || c.widthPx > 10000 || c.heightPx > 10000 {
		return fmt.Errorf("%w: size %d × %d px: give at least 320 × 200 and at most 10000 × 10000", ErrChartData, c.widthPx, c.heightPx)
	}
	if c.antennas && (!finite(c.fromHeightM) || !finite(c.toHeightM) || c.fromHeightM < 0 || c.toHeightM < 0) {
		return fmt.Errorf("%w: antenna heights %v m and %v m: give 0 m or more", ErrChartData, c.fromHeightM, c.toHeightM)
	}
	if c.freqMHz != 0 {
		if !(c.freqMHz >= 1 && c.freqMHz <= 100_000) {
			return fmt.Errorf("%w: frequency %v MHz is outside 1 MHz to 100 GHz", ErrChartData, c.freqMHz)
		}
		if !c.antennas {
			return fmt.Errorf("%w: a Fresnel zone (frequency %v MHz) needs the antenna heights at both ends; give them with WithAntennas", ErrChartData, c.freqMHz)
		}
	}
	if c.k != 0 && !(c.k >= 0.1 && c.k <= 100) {
		return fmt.Errorf("%w: k-factor %v is outside 0.1 to 100 (4/3 is the usual median)", ErrChartData, c.k)
	}
	return nil
}

func finite(v float64) bool { return !math.IsNaN(v) && !math.IsInf(v, 0) }
