package report

import (
	"errors"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"

	"github.com/mastlink/mastlink/plan"
	"github.com/mastlink/mastlink/propagation"
)

// ErrChartData is wrapped by every error about the data or options given to
// a chart.
var ErrChartData = errors.New("chart data")

// Chart colours, chosen for this package: an earth tone for the ground, a
// plain blue for the radio path, greys for the frame.
const (
	colourGround     = "#cdbb8e"
	colourGroundEdge = "#7a6a44"
	colourRay        = "#2464a8"
	colourMast       = "#3b3b3b"
	colourCurve      = "#8c8c8c"
	colourGrid       = "#e4e4e4"
	colourAxis       = "#333333"
	colourText       = "#222222"
)

// Default chart size in pixels (SVG user units).
const (
	DefaultWidthPx  = 800
	DefaultHeightPx = 360
)

// Margins around the plot area, pixels: room for the title, tick labels and
// axis titles.
const (
	marginLeftPx   = 76
	marginRightPx  = 24
	marginTopPx    = 48
	marginBottomPx = 54
)

// profileChart holds the options of ProfileSVG.
type profileChart struct {
	title             string
	imperial          bool
	widthPx, heightPx int
	antennas          bool
	fromHeightM       float64
	toHeightM         float64
	k                 float64 // effective earth-radius factor; 0 draws a flat earth
}

// ProfileOption changes how ProfileSVG draws a chart.
type ProfileOption func(*profileChart)

// WithTitle sets the title line drawn above the chart (plain text; it is
// escaped for XML).
func WithTitle(title string) ProfileOption { return func(c *profileChart) { c.title = title } }

// WithImperial labels the axes in miles and feet instead of kilometres and
// metres. The data stay in metres.
func WithImperial() ProfileOption { return func(c *profileChart) { c.imperial = true } }

// WithSize sets the chart size in pixels (SVG user units); each must be at
// least 320 × 200 and at most 10000.
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

// ProfileSVG writes an SVG 1.1 chart of a terrain profile to w: distance
// along the path (distM, metres from any origin, non-decreasing) against
// ground height (elevM, metres above sea level), the ground filled, with a
// light grid, labelled axes in km and m (mi and ft with WithImperial) and an
// optional title, masts and line of sight (WithAntennas) and earth bulge
// (WithEarthBulge). Profiles with more samples than two per pixel column are
// thinned to the lowest and highest sample of each column, so peaks are kept.
//
// distM and elevM must have the same length, at least 2, finite values and a
// path longer than 0 m; otherwise the error wraps ErrChartData and nothing is
// written. Write errors from w are returned as they are.
func ProfileSVG(w io.Writer, distM, elevM []float64, opts ...ProfileOption) error {
	c := profileChart{widthPx: DefaultWidthPx, heightPx: DefaultHeightPx}
	for _, o := range opts {
		o(&c)
	}
	if err := c.check(distM, elevM); err != nil {
		return err
	}
	var b strings.Builder
	c.render(&b, distM, elevM)
	_, err := io.WriteString(w, b.String())
	return err
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
	if c.k != 0 && !(c.k >= 0.1 && c.k <= 100) {
		return fmt.Errorf("%w: k-factor %v is outside 0.1 to 100 (4/3 is the usual median)", ErrChartData, c.k)
	}
	return nil
}

func finite(v float64) bool { return !math.IsNaN(v) && !math.IsInf(v, 0) }

// render draws the checked chart into b.
func (c *profileChart) render(b *strings.Builder, distM, elevM []float64) {
	n := len(distM)
	unitD, unitH, nameD, nameH := 1000.0, 1.0, "km", "m"
	if c.imperial {
		unitD, unitH, nameD, nameH = plan.MetresPerMile, plan.MetresPerFoot, "mi", "ft"
	}
	d0 := distM[0]
	totalM := distM[n-1] - d0

	// Heights drawn, in display units: the ground raised by the bulge, and
	// the bulge itself (0 on a flat earth).
	bulge := make([]float64, n)
	ground := make([]float64, n)
	minElev := math.Inf(1)
	hi := math.Inf(-1)
	for i := range distM {
		if c.k > 0 {
			d1 := (distM[i] - d0) / 1000
			bulge[i] = propagation.EarthBulgeM(d1, totalM/1000-d1, propagation.EffectiveEarthRadiusKM(c.k)) / unitH
		}
		ground[i] = elevM[i]/unitH + bulge[i]
		minElev = math.Min(minElev, elevM[i]/unitH)
		hi = math.Max(hi, ground[i])
	}
	var rayFrom, rayTo float64
	if c.antennas {
		rayFrom = ground[0] + c.fromHeightM/unitH
		rayTo = ground[n-1] + c.toHeightM/unitH
		hi = math.Max(hi, math.Max(rayFrom, rayTo))
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
	xMax := totalM / unitD
	xTicks := niceTicks(0, xMax, 8)
	xTicks.values = upTo(xTicks.values, xMax)
	yTicks := niceTicks(lo, hi, 6)
	yLo, yHi := yTicks.min, yTicks.max

	left, top := float64(marginLeftPx), float64(marginTopPx)
	plotW := float64(c.widthPx - marginLeftPx - marginRightPx)
	plotH := float64(c.heightPx - marginTopPx - marginBottomPx)
	bottom, right := top+plotH, left+plotW
	px := func(distM float64) float64 { return left + (distM-d0)/unitD/xMax*plotW }
	py := func(h float64) float64 { return bottom - (h-yLo)/(yHi-yLo)*plotH }

	fmt.Fprintf(b, `<?xml version="1.0" encoding="UTF-8"?>`+"\n")
	fmt.Fprintf(b, `<svg xmlns="http://www.w3.org/2000/svg" version="1.1" width="%d" height="%d" viewBox="0 0 %d %d" font-family="sans-serif" font-size="12" fill="%s">`+"\n",
		c.widthPx, c.heightPx, c.widthPx, c.heightPx, colourText)
	title := c.title
	if title == "" {
		title = "Terrain profile"
	}
	fmt.Fprintf(b, "<title>%s</title>\n", esc(title))
	fmt.Fprintf(b, `<rect width="%d" height="%d" fill="#ffffff"/>`+"\n", c.widthPx, c.heightPx)
	fmt.Fprintf(b, `<text id="title" x="%s" y="26" text-anchor="middle" font-size="15" font-weight="bold">%s</text>`+"\n", num(float64(c.widthPx)/2), esc(title))

	// Grid.
	fmt.Fprintf(b, `<g id="grid" stroke="%s" stroke-width="1">`+"\n", colourGrid)
	for _, v := range xTicks.values {
		x := left + v/xMax*plotW
		fmt.Fprintf(b, `<line x1="%s" y1="%s" x2="%s" y2="%s"/>`+"\n", num(x), num(top), num(x), num(bottom))
	}
	for _, v := range yTicks.values {
		y := py(v)
		fmt.Fprintf(b, `<line x1="%s" y1="%s" x2="%s" y2="%s"/>`+"\n", num(left), num(y), num(right), num(y))
	}
	b.WriteString("</g>\n")

	// Ground: from the (curved) sea-level floor of the chart up to the
	// terrain and back.
	idx := thin(distM, ground, int(plotW))
	b.WriteString(`<path id="terrain" fill="` + colourGround + `" stroke="` + colourGroundEdge + `" stroke-width="1" stroke-linejoin="round" d="`)
	for j, i := range idx {
		cmd := "L"
		if j == 0 {
			cmd = "M"
		}
		fmt.Fprintf(b, "%s%s %s ", cmd, num(px(distM[i])), num(py(ground[i])))
	}
	for j := len(idx) - 1; j >= 0; j-- {
		i := idx[j]
		fmt.Fprintf(b, "L%s %s ", num(px(distM[i])), num(py(yLo+bulge[i])))
	}
	b.WriteString("Z\"/>\n")

	if c.k > 0 {
		b.WriteString(`<path id="earth-curve" fill="none" stroke="` + colourCurve + `" stroke-width="1.2" stroke-dasharray="5 4" d="`)
		for j, i := range idx {
			cmd := "L"
			if j == 0 {
				cmd = "M"
			}
			fmt.Fprintf(b, "%s%s %s ", cmd, num(px(distM[i])), num(py(yLo+bulge[i])))
		}
		b.WriteString("\"/>\n")
	}

	if c.antennas {
		x0, x1 := px(distM[0]), px(distM[n-1])
		fmt.Fprintf(b, `<g id="masts" stroke="%s" stroke-width="2">`+"\n", colourMast)
		fmt.Fprintf(b, `<line x1="%s" y1="%s" x2="%s" y2="%s"/>`+"\n", num(x0), num(py(ground[0])), num(x0), num(py(rayFrom)))
		fmt.Fprintf(b, `<line x1="%s" y1="%s" x2="%s" y2="%s"/>`+"\n", num(x1), num(py(ground[n-1])), num(x1), num(py(rayTo)))
		b.WriteString("</g>\n")
		fmt.Fprintf(b, `<line id="line-of-sight" x1="%s" y1="%s" x2="%s" y2="%s" stroke="%s" stroke-width="1.6"/>`+"\n",
			num(x0), num(py(rayFrom)), num(x1), num(py(rayTo)), colourRay)
	}

	// Axes, ticks and labels.
	fmt.Fprintf(b, `<g id="axes" stroke="%s" stroke-width="1">`+"\n", colourAxis)
	fmt.Fprintf(b, `<line x1="%s" y1="%s" x2="%s" y2="%s"/>`+"\n", num(left), num(bottom), num(right), num(bottom))
	fmt.Fprintf(b, `<line x1="%s" y1="%s" x2="%s" y2="%s"/>`+"\n", num(left), num(top), num(left), num(bottom))
	for _, v := range xTicks.values {
		x := left + v/xMax*plotW
		fmt.Fprintf(b, `<line x1="%s" y1="%s" x2="%s" y2="%s"/>`+"\n", num(x), num(bottom), num(x), num(bottom+5))
	}
	for _, v := range yTicks.values {
		y := py(v)
		fmt.Fprintf(b, `<line x1="%s" y1="%s" x2="%s" y2="%s"/>`+"\n", num(left-5), num(y), num(left), num(y))
	}
	b.WriteString("</g>\n")
	b.WriteString(`<g id="tick-labels">` + "\n")
	for _, v := range xTicks.values {
		x := left + v/xMax*plotW
		fmt.Fprintf(b, `<text x="%s" y="%s" text-anchor="middle">%s</text>`+"\n", num(x), num(bottom+19), xTicks.label(v))
	}
	for _, v := range yTicks.values {
		fmt.Fprintf(b, `<text x="%s" y="%s" text-anchor="end">%s</text>`+"\n", num(left-8), num(py(v)+4), yTicks.label(v))
	}
	b.WriteString("</g>\n")
	fmt.Fprintf(b, `<text id="x-axis-label" x="%s" y="%s" text-anchor="middle">distance (%s)</text>`+"\n", num(left+plotW/2), num(float64(c.heightPx)-10), nameD)
	fmt.Fprintf(b, `<text id="y-axis-label" transform="translate(18 %s) rotate(-90)" text-anchor="middle">elevation (%s)</text>`+"\n", num(top+plotH/2), nameH)

	c.legend(b, right, top)
	b.WriteString("</svg>\n")
}

// legend draws a key in the top right corner of the plot area.
func (c *profileChart) legend(b *strings.Builder, right, top float64) {
	type entry struct{ swatch, text string }
	entries := []entry{{fmt.Sprintf(`<rect width="14" height="9" fill="%s" stroke="%s"/>`, colourGround, colourGroundEdge), "ground"}}
	if c.antennas {
		entries = append(entries, entry{fmt.Sprintf(`<line x1="0" y1="5" x2="14" y2="5" stroke="%s" stroke-width="1.6"/>`, colourRay), "line of sight"})
	}
	if c.k > 0 {
		entries = append(entries, entry{fmt.Sprintf(`<line x1="0" y1="5" x2="14" y2="5" stroke="%s" stroke-width="1.2" stroke-dasharray="4 2"/>`, colourCurve),
			"earth curvature, k = " + kLabel(c.k)})
	}
	const rowPx, widthPx = 16.0, 190.0
	x := right - widthPx
	y := top + 8
	fmt.Fprintf(b, `<g id="legend" font-size="11">`+"\n")
	fmt.Fprintf(b, `<rect x="%s" y="%s" width="%s" height="%s" fill="#ffffff" fill-opacity="0.85" stroke="%s"/>`+"\n",
		num(x-6), num(y-6), num(widthPx), num(rowPx*float64(len(entries))+6), colourGrid)
	for i, e := range entries {
		ry := y + rowPx*float64(i)
		fmt.Fprintf(b, `<g transform="translate(%s %s)">%s</g>`+"\n", num(x), num(ry), e.swatch)
		fmt.Fprintf(b, `<text x="%s" y="%s">%s</text>`+"\n", num(x+20), num(ry+9), esc(e.text))
	}
	b.WriteString("</g>\n")
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

// num formats an SVG coordinate with two decimals, trimming zeros.
func num(v float64) string {
	s := strconv.FormatFloat(v, 'f', 2, 64)
	s = strings.TrimRight(strings.TrimRight(s, "0"), ".")
	if s == "-0" {
		return "0"
	}
	return s
}

// esc escapes text for XML character data and attribute values.
func esc(s string) string {
	var b strings.Builder
	for _, r := range s {
		switch r {
		case '&':
			b.WriteString("&amp;")
		case '<':
			b.WriteString("&lt;")
		case '>':
			b.WriteString("&gt;")
		case '"':
			b.WriteString("&quot;")
		case '\'':
			b.WriteString("&apos;")
		default:
			if r < 0x20 && r != '\t' && r != '\n' && r != '\r' {
				continue // not allowed in XML 1.0
			}
			b.WriteRune(r)
		}
	}
	return b.String()
}
