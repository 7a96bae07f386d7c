package report

import (
	"math"
	"strconv"

	"github.com/mastlink/mastlink/plan/units"
	"github.com/mastlink/mastlink/propagation"
)

// Margins around the plot area, pixels: room for the title, tick labels and
// axis titles.
const (
	marginLeftPx   = 76
	marginRightPx  = 24
	marginTopPx    = 48
	marginBottomPx = 54
)

// Text sizes and positions, pixels. A text's y is its baseline.
const (
	fontSizePx       = 12 // tick labels and axis titles
	titleFontSizePx  = 15 // the title, bold
	legendFontSizePx = 11
	titleBaselinePx  = 26 // from the top of the chart
	xLabelBaselinePx = 10 // x-axis title, above the bottom of the chart
	yLabelBaselinePx = 18 // y-axis title (turned 90° anticlockwise), from the left edge
	xTickBaselinePx  = 19 // x tick labels, below the plot area
	yTickGapPx       = 8  // y tick labels end this far left of the plot area
	yTickBaselinePx  = 4  // y tick labels' baseline below their tick
	tickLengthPx     = 5
)

// Legend geometry, pixels: a box of rows in the top right corner of the
// plot area.
const (
	legendRowPx    = 16.0
	legendWidthPx  = 190.0
	legendInsetPx  = 8.0  // first row's top below the plot area's top
	legendPadPx    = 6.0  // box edge outside the swatches and text
	legendSwatchPx = 14.0 // swatch width
	legendSwatchH  = 9.0  // ground swatch height
	legendLineY    = 5.0  // line swatches, below the row's top
	legendBaseline = 9.0  // text baseline, below the row's top
	legendTextPx   = 20.0 // text start right of the swatch's left edge
)

// Stroke widths, pixels.
const (
	strokeGridPx   = 1.0
	strokeGroundPx = 1.0
	strokeCurvePx  = 1.2
	strokeMastPx   = 2.0
	strokeRayPx    = 1.6
	strokeAxisPx   = 1.0
)

// Dash pattern of the earth curve, pixels on and off (the legend swatch's
// is shorter to fit).
var (
	dashCurvePx       = [2]float64{5, 4}
	dashCurveLegendPx = [2]float64{4, 2}
)

// legendKind says which swatch a legend row shows.
type legendKind int

const (
	legendGround legendKind = iota
	legendRay
	legendCurve
)

// legendEntry is one row of the legend.
type legendEntry struct {
	kind legendKind
	text string
}

// profileLayout is the geometry of a profile chart, computed once from the
// checked options and data and drawn by each renderer: axis ranges and
// ticks, the scale from data to pixels, the heights drawn (ground raised by
// the earth bulge, antenna tops) and the samples kept after thinning.
// Heights are in display units (m or ft), x tick values in km or mi.
type profileLayout struct {
	widthPx, heightPx      float64
	title                  string
	nameD, nameH           string  // unit names of the axes
	unitD                  float64 // metres per display distance unit
	d0                     float64 // distance of the first sample, m
	xMax                   float64 // path length in display units
	bulge, ground          []float64
	antennas               bool
	rayFrom, rayTo         float64 // antenna tops at the two ends
	xTicks, yTicks         ticks
	yLo, yHi               float64 // y axis range
	left, top              float64 // plot area, pixels
	right, bottom          float64
	plotW, plotH           float64
	idx                    []int // samples to draw, from thin
	curve                  bool  // draw the earth curve
	legend                 []legendEntry
	legendX, legendY       float64 // first swatch's top left corner
	legendBoxW, legendBoxH float64
}

// layout computes the geometry of the checked chart for the data.
func (c *profileChart) layout(distM, elevM []float64) *profileLayout {
	n := len(distM)
	l := &profileLayout{widthPx: float64(c.widthPx), heightPx: float64(c.heightPx), antennas: c.antennas, curve: c.k > 0}
	unitH := 1.0
	l.unitD, l.nameD, l.nameH = 1000, "km", "m"
	if c.imperial {
		l.unitD, unitH, l.nameD, l.nameH = units.MetresPerMile, units.MetresPerFoot, "mi", "ft"
	}
	l.title = c.title
	if l.title == "" {
		l.title = "Terrain profile"
	}
	l.d0 = distM[0]
	totalM := distM[n-1] - l.d0

	// Heights drawn, in display units: the ground raised by the bulge, and
	// the bulge itself (0 on a flat earth).
	l.bulge = make([]float64, n)
	l.ground = make([]float64, n)
	minElev := math.Inf(1)
	hi := math.Inf(-1)
	for i := range distM {
		if c.k > 0 {
			d1 := (distM[i] - l.d0) / 1000
			l.bulge[i] = propagation.EarthBulgeM(d1, totalM/1000-d1, propagation.EffectiveEarthRadiusKM(c.k)) / unitH
		}
		l.ground[i] = elevM[i]/unitH + l.bulge[i]
		minElev = math.Min(minElev, elevM[i]/unitH)
		hi = math.Max(hi, l.ground[i])
	}
	if c.antennas {
		l.rayFrom = l.ground[0] + c.fromHeightM/unitH
		l.rayTo = l.ground[n-1] + c.toHeightM/unitH
		hi = math.Max(hi, math.Max(l.rayFrom, l.rayTo))
	}
	lo := minElev
	span := math.Max(hi-lo, 10/unitH)
	pad := 0.06 * span
	if lo >= 0 && lo-pad < 0 {
		lo = 0
	} else {
		lo -= pad
	}
	hi += pad
	// The x axis spans the path exactly; the y axis whole tick steps.
	l.xMax = totalM / l.unitD
	l.xTicks = niceTicks(0, l.xMax, 8)
	l.xTicks.values = upTo(l.xTicks.values, l.xMax)
	l.yTicks = niceTicks(lo, hi, 6)
	l.yLo, l.yHi = l.yTicks.min, l.yTicks.max

	l.left, l.top = marginLeftPx, marginTopPx
	l.plotW = float64(c.widthPx - marginLeftPx - marginRightPx)
	l.plotH = float64(c.heightPx - marginTopPx - marginBottomPx)
	l.bottom, l.right = l.top+l.plotH, l.left+l.plotW
	l.idx = thin(distM, l.ground, int(l.plotW))

	l.legend = []legendEntry{{legendGround, "ground"}}
	if c.antennas {
		l.legend = append(l.legend, legendEntry{legendRay, "line of sight"})
	}
	if c.k > 0 {
		l.legend = append(l.legend, legendEntry{legendCurve, "earth curvature, k = " + kLabel(c.k)})
	}
	l.legendX, l.legendY = l.right-legendWidthPx, l.top+legendInsetPx
	l.legendBoxW, l.legendBoxH = legendWidthPx, legendRowPx*float64(len(l.legend))+legendPadPx
	return l
}

// px is the x pixel of a distance along the path, metres.
func (l *profileLayout) px(distM float64) float64 {
	return l.left + (distM-l.d0)/l.unitD/l.xMax*l.plotW
}

// pxTick is the x pixel of an x tick value (display units).
func (l *profileLayout) pxTick(v float64) float64 { return l.left + v/l.xMax*l.plotW }

// py is the y pixel of a height in display units.
func (l *profileLayout) py(h float64) float64 {
	return l.bottom - (h-l.yLo)/(l.yHi-l.yLo)*l.plotH
}

// kLabel writes k as 4/3 when it is that, else with two decimals.
func kLabel(k float64) string {
	if math.Abs(k-4.0/3) < 1e-9 {
		return "4/3"
	}
	return strconv.FormatFloat(k, 'f', 2, 64)
}

// thin returns the indices of the samples to draw: all of them when there
// are at most two per pixel column, else the first and last sample and,
// for each column, its lowest and highest sample in path order.
func thin(distM, h []float64, columns int) []int {
	n := len(distM)
	if n <= 2*columns {
		idx := make([]int, n)
		for i := range idx {
			idx[i] = i
		}
		return idx
	}
	d0, span := distM[0], distM[n-1]-distM[0]
	idx := []int{0}
	col := func(i int) int { return min(int((distM[i]-d0)/span*float64(columns)), columns-1) }
	for i := 1; i < n-1; {
		c := col(i)
		lo, hi := i, i
		j := i
		for ; j < n-1 && col(j) == c; j++ {
			if h[j] < h[lo] {
				lo = j
			}
			if h[j] > h[hi] {
				hi = j
			}
		}
		idx = append(idx, min(lo, hi))
		if lo != hi {
			idx = append(idx, max(lo, hi))
		}
		i = j
	}
	return append(idx, n-1)
}

// ticks are the round values marked on one axis.
type ticks struct {
	min, max float64 // axis range, a whole number of steps
	step     float64
	values   []float64
}

// niceTicks covers [lo, hi] with about target steps of 1, 2, 2.5 or 5 times
// a power of ten (common practice for chart axes).
func niceTicks(lo, hi float64, target int) ticks {
	if !(hi > lo) {
		hi = lo + 1
	}
	raw := (hi - lo) / float64(target)
	p := math.Pow(10, math.Floor(math.Log10(raw)))
	step := 10 * p
	for _, m := range []float64{1, 2, 2.5, 5} {
		if m*p >= raw {
			step = m * p
			break
		}
	}
	t := ticks{step: step, min: math.Floor(lo/step+1e-9) * step, max: math.Ceil(hi/step-1e-9) * step}
	for k := 0; ; k++ {
		v := t.min + float64(k)*step
		if v > t.max+step/1e6 {
			break
		}
		t.values = append(t.values, v)
	}
	return t
}

// upTo returns the values not above limit (with a little slack for
// rounding).
func upTo(values []float64, limit float64) []float64 {
	out := values[:0]
	for _, v := range values {
		if v <= limit*(1+1e-9) {
			out = append(out, v)
		}
	}
	return out
}

// label formats a tick value with as many decimals as the step needs.
func (t ticks) label(v float64) string {
	dec := 0
	for s := t.step; dec < 6 && math.Abs(s-math.Round(s)) > 1e-9*math.Max(1, math.Abs(s)); s *= 10 {
		dec++
	}
	if math.Abs(v) < t.step/1e6 {
		v = 0
	}
	return strconv.FormatFloat(v, 'f', dec, 64)
}
