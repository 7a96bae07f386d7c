package report

import (
	"math"
	"strconv"
	"strings"
	"unicode/utf8"

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

	legendBandTopPx = 38   // first row's top, in a chart whose keys run above the plot
	legendBandGapPx = 14   // last row's bottom to the plot's top
	legendGapPx     = 18.0 // between keys in a row
)

// Stroke widths, pixels.
const (
	strokeGridPx     = 1.0
	strokeGroundPx   = 1.0
	strokeCurvePx    = 1.2
	strokeMastPx     = 2.0
	strokeRayPx      = 1.6
	strokeAxisPx     = 1.0
	strokeZonePx     = 1.0
	strokeObstaclePx = 2.0
	antennaDotPx     = 3.0 // radius of the antenna drawn on a mast top
	obstacleMarkPx   = 5.0 // half-width of the obstacle's triangle
)

// Dash pattern of the earth curve, pixels on and off (the legend swatch's
// is shorter to fit).
var (
	dashCurvePx       = [2]float64{5, 4}
	dashCurveLegendPx = [2]float64{4, 2}
	dashZone06Px      = [2]float64{6, 3}
)

// zoneOutline is the closed outline, in pixels, of the part frac of the
// first Fresnel zone around the ray: its upper edge from the near end to
// the far one, then its lower edge back.
func (l *profileLayout) zoneOutline(frac float64) [][2]float64 {
	pts := make([][2]float64, 0, 2*len(l.zoneDistM))
	for j := range l.zoneDistM {
		pts = append(pts, [2]float64{l.px(l.zoneDistM[j]), l.py(l.zoneRay[j] + frac*l.zoneR1[j])})
	}
	for j := len(l.zoneDistM) - 2; j > 0; j-- {
		pts = append(pts, [2]float64{l.px(l.zoneDistM[j]), l.py(l.zoneRay[j] - frac*l.zoneR1[j])})
	}
	return pts
}

// obstacleMark is a small triangle pointing up at (x, y), the obstacle's
// top, wound clockwise on the screen.
func obstacleMark(x, y float64) [][2]float64 {
	return [][2]float64{{x, y}, {x + obstacleMarkPx, y + 1.6*obstacleMarkPx}, {x - obstacleMarkPx, y + 1.6*obstacleMarkPx}}
}

// legendKind says which swatch a legend row shows.
type legendKind int

const (
	legendGround legendKind = iota
	legendRay
	legendCurve
	legendMast
	legendZone
	legendZone06
	legendObstacle
)

// legendEntry is one row of the legend.
type legendEntry struct {
	kind legendKind
	text string
	x, y float64 // swatch's top left corner, pixels
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
	metresPerH             float64 // metres per display height unit
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
	legendLeft             bool // the key sits in the top left corner
	legendBand             bool // the keys run in rows above the plot, unboxed

	// Fresnel zone (WithFrequency): the ray and the first zone's radius at
	// zoneSteps+1 evenly spaced distances, heights in display units.
	fresnel               bool
	zoneDistM             []float64 // metres from the first sample's origin, as distM
	zoneRay, zoneR1       []float64
	obstacle              bool    // a governing obstacle was found
	obsDistM              float64 // its distance, metres (as distM)
	obsGround, obsRay     float64 // ground (with bulge) and ray there, display units
	obsClearM, obsClearF1 float64 // its clearance, metres and F1 units
}

// zoneSteps is how many straight pieces draw each edge of a Fresnel zone:
// enough for a smooth ellipse at any chart width.
const zoneSteps = 120

// speedOfLightMS is c in m/s (exact, SI definition of the metre).
const speedOfLightMS = 299_792_458.0

// layout computes the geometry of the checked chart for the data.
func (c *profileChart) layout(distM, elevM []float64) *profileLayout {
	n := len(distM)
	l := &profileLayout{widthPx: float64(c.widthPx), heightPx: float64(c.heightPx), antennas: c.antennas, curve: c.k > 0}
	unitH := 1.0
	l.unitD, l.nameD, l.nameH = 1000, "km", "m"
	if c.imperial {
		l.unitD, unitH, l.nameD, l.nameH = units.MetresPerMile, units.MetresPerFoot, "mi", "ft"
	}
	l.metresPerH = unitH
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
	if c.freqMHz > 0 {
		l.fresnelZone(c, distM, unitH)
		for i := range l.zoneRay {
			hi = math.Max(hi, l.zoneRay[i]+l.zoneR1[i])
			lo = math.Min(lo, l.zoneRay[i]-l.zoneR1[i])
		}
	}
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

	l.legend = []legendEntry{{kind: legendGround, text: "ground"}}
	if c.antennas && !l.fresnel {
		l.legend = append(l.legend, legendEntry{kind: legendRay, text: "line of sight"})
	}
	if l.fresnel {
		l.legend = append(l.legend,
			legendEntry{kind: legendMast, text: "masts " + heightLabel(c.fromHeightM/unitH) + " and " + heightLabel(c.toHeightM/unitH) + " " + l.nameH},
			legendEntry{kind: legendRay, text: "line of sight"},
			legendEntry{kind: legendZone, text: "first Fresnel zone, " + strconv.FormatFloat(c.freqMHz, 'f', -1, 64) + " MHz"},
			legendEntry{kind: legendZone06, text: "0.6 of the first zone"})
	}
	if c.k > 0 {
		l.legend = append(l.legend, legendEntry{kind: legendCurve, text: "earth curvature, k = " + kLabel(c.k)})
	}
	if l.obstacle {
		l.legend = append(l.legend, legendEntry{kind: legendObstacle, text: l.obstacleLabel()})
	}

	l.left, l.right = marginLeftPx, float64(c.widthPx-marginRightPx)
	l.plotW = l.right - l.left
	l.top = marginTopPx
	// A chart with a Fresnel zone has too many keys for a box inside the
	// plot: they run in rows between the title and the plot instead.
	l.legendBand = l.fresnel
	if l.legendBand {
		l.top = legendBandTopPx + float64(l.flowLegend())*legendRowPx + legendBandGapPx
	}
	l.plotH = l.heightPx - l.top - marginBottomPx
	l.bottom = l.top + l.plotH
	l.idx = thin(distM, l.ground, int(l.plotW))
	if !l.legendBand {
		l.legendBoxW = legendWidthPx
		for _, e := range l.legend {
			l.legendBoxW = math.Max(l.legendBoxW, legendTextPx+legendPadPx+textWidthPx(e.text, legendFontSizePx))
		}
		l.legendBoxH = legendRowPx*float64(len(l.legend)) + legendPadPx
		l.placeLegend(distM)
		for i := range l.legend {
			l.legend[i].x, l.legend[i].y = l.legendX, l.legendY+legendRowPx*float64(i)
		}
	}
	return l
}

// flowLegend places the keys left to right in rows across the plot's
// width, from legendBandTopPx down, and returns the number of rows.
func (l *profileLayout) flowLegend() int {
	x, y, rows := l.left, float64(legendBandTopPx), 1
	for i, e := range l.legend {
		w := legendTextPx + textWidthPx(e.text, legendFontSizePx)
		if x > l.left && x+w > l.right {
			x, y, rows = l.left, y+legendRowPx, rows+1
		}
		l.legend[i].x, l.legend[i].y = x, y
		x += w + legendGapPx
	}
	return rows
}

// fresnelZone computes the ray, the first Fresnel zone around it and the
// governing obstacle, from the checked data (ITU-R P.526-16 eq. 2 for the
// radius; the clearance is measured vertically, as for the zone's
// worst-clearance ratio of the terrain model).
func (l *profileLayout) fresnelZone(c *profileChart, distM []float64, unitH float64) {
	n := len(distM)
	l.fresnel = true
	totalM := distM[n-1] - l.d0
	lambdaM := speedOfLightMS / (c.freqMHz * 1e6)
	rayM := func(d1M float64) float64 {
		return (l.rayFrom + (l.rayTo-l.rayFrom)*d1M/totalM) * unitH
	}
	r1M := func(d1M float64) float64 {
		if d1M <= 0 || d1M >= totalM {
			return 0
		}
		return propagation.FresnelRadiusWavelengthM(d1M/1000, (totalM-d1M)/1000, lambdaM)
	}
	l.zoneDistM = make([]float64, zoneSteps+1)
	l.zoneRay = make([]float64, zoneSteps+1)
	l.zoneR1 = make([]float64, zoneSteps+1)
	for j := range l.zoneDistM {
		d1 := totalM * float64(j) / zoneSteps
		l.zoneDistM[j] = l.d0 + d1
		l.zoneRay[j] = rayM(d1) / unitH
		l.zoneR1[j] = r1M(d1) / unitH
	}
	best := math.Inf(1)
	for i := 1; i < n-1; i++ {
		d1 := distM[i] - l.d0
		r1 := r1M(d1)
		if r1 <= 0 {
			continue
		}
		clearM := rayM(d1) - l.ground[i]*unitH
		if f := clearM / r1; f < best {
			best = f
			l.obstacle = true
			l.obsDistM, l.obsClearM, l.obsClearF1 = distM[i], clearM, f
			l.obsGround, l.obsRay = l.ground[i], rayM(d1)/unitH
		}
	}
}

// obstacleLabel is the legend's words for the governing obstacle.
func (l *profileLayout) obstacleLabel() string {
	at := strconv.FormatFloat((l.obsDistM-l.d0)/l.unitD, 'f', 2, 64) + " " + l.nameD
	clear := strconv.FormatFloat(l.obsClearM/l.metresPerH, 'f', 1, 64) + " " + l.nameH
	f1 := strconv.FormatFloat(l.obsClearF1, 'f', 2, 64)
	if l.obsClearM < 0 {
		return "obstacle at " + at + ": blocks by " + strings.TrimPrefix(clear, "-") + " (" + f1 + " F1)"
	}
	return "obstacle at " + at + ": clears by " + f1 + " F1 (" + clear + ")"
}

// heightLabel writes a mast height with one decimal, trimming ".0".
func heightLabel(h float64) string {
	return strings.TrimSuffix(strconv.FormatFloat(h, 'f', 1, 64), ".0")
}

// textWidthPx estimates the width of s in the chart's sans-serif font at
// sizePx: 0.56 em per character, a little over the average advance of the
// Go and common sans-serif fonts, so boxes sized by it hold the text.
func textWidthPx(s string, sizePx float64) float64 {
	return 0.56 * sizePx * float64(utf8.RuneCountInString(s))
}

// placeLegend puts the key in the top right corner of the plot area, or in
// the top left when the drawing reaches under the right one and not under
// the left (else where it covers less).
func (l *profileLayout) placeLegend(distM []float64) {
	l.legendY = l.top + legendInsetPx
	boxBottom := l.legendY - legendPadPx + l.legendBoxH
	// overlap is how far, in pixels, the highest drawing between x0 and
	// x1 reaches above the box's bottom edge (≤ 0: not at all).
	overlap := func(x0, x1 float64) float64 {
		top := math.Inf(1)
		see := func(x, h float64) {
			if x >= x0-2 && x <= x1+2 {
				top = math.Min(top, l.py(h))
			}
		}
		for _, i := range l.idx {
			see(l.px(distM[i]), l.ground[i])
		}
		if l.antennas {
			n := len(distM)
			for j := 0; j <= zoneSteps; j++ {
				t := float64(j) / zoneSteps
				see(l.px(distM[0]+t*(distM[n-1]-distM[0])), l.rayFrom+t*(l.rayTo-l.rayFrom))
			}
		}
		for j := range l.zoneDistM {
			see(l.px(l.zoneDistM[j]), l.zoneRay[j]+l.zoneR1[j])
		}
		return boxBottom - top
	}
	rightX0 := l.right - legendPadPx - l.legendBoxW
	leftX0 := l.left + legendInsetPx
	r, lf := overlap(rightX0, rightX0+l.legendBoxW), overlap(leftX0, leftX0+l.legendBoxW)
	l.legendLeft = r > 0 && lf < r
	if l.legendLeft {
		l.legendX = leftX0 + legendPadPx
	} else {
		l.legendX = rightX0 + legendPadPx
	}
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
