package report

import (
	"fmt"
	"io"
	"strconv"
	"strings"
)

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
	c, err := newProfileChart(distM, elevM, opts)
	if err != nil {
		return err
	}
	var b strings.Builder
	renderSVG(&b, c.layout(distM, elevM), distM)
	_, err = io.WriteString(w, b.String())
	return err
}

// renderSVG draws the chart laid out in l into b.
func renderSVG(b *strings.Builder, l *profileLayout, distM []float64) {
	n := len(distM)
	fmt.Fprintf(b, `<?xml version="1.0" encoding="UTF-8"?>`+"\n")
	fmt.Fprintf(b, `<svg xmlns="http://www.w3.org/2000/svg" version="1.1" width="%s" height="%s" viewBox="0 0 %s %s" font-family="sans-serif" font-size="%d" fill="%s">`+"\n",
		num(l.widthPx), num(l.heightPx), num(l.widthPx), num(l.heightPx), fontSizePx, colourText)
	fmt.Fprintf(b, "<title>%s</title>\n", esc(l.title))
	fmt.Fprintf(b, `<rect width="%s" height="%s" fill="%s"/>`+"\n", num(l.widthPx), num(l.heightPx), colourBackground)
	fmt.Fprintf(b, `<text id="title" x="%s" y="%d" text-anchor="middle" font-size="%d" font-weight="bold">%s</text>`+"\n",
		num(l.widthPx/2), titleBaselinePx, titleFontSizePx, esc(l.title))

	// Grid.
	fmt.Fprintf(b, `<g id="grid" stroke="%s" stroke-width="%s">`+"\n", colourGrid, num(strokeGridPx))
	for _, v := range l.xTicks.values {
		x := l.pxTick(v)
		svgLine(b, x, l.top, x, l.bottom)
	}
	for _, v := range l.yTicks.values {
		y := l.py(v)
		svgLine(b, l.left, y, l.right, y)
	}
	b.WriteString("</g>\n")

	// Ground: from the (curved) sea-level floor of the chart up to the
	// terrain and back.
	fmt.Fprintf(b, `<path id="terrain" fill="%s" stroke="%s" stroke-width="%s" stroke-linejoin="round" d="`, colourGround, colourGroundEdge, num(strokeGroundPx))
	for j, i := range l.idx {
		cmd := "L"
		if j == 0 {
			cmd = "M"
		}
		fmt.Fprintf(b, "%s%s %s ", cmd, num(l.px(distM[i])), num(l.py(l.ground[i])))
	}
	for j := len(l.idx) - 1; j >= 0; j-- {
		i := l.idx[j]
		fmt.Fprintf(b, "L%s %s ", num(l.px(distM[i])), num(l.py(l.yLo+l.bulge[i])))
	}
	b.WriteString("Z\"/>\n")

	if l.curve {
		fmt.Fprintf(b, `<path id="earth-curve" fill="none" stroke="%s" stroke-width="%s" stroke-dasharray="%s %s" d="`,
			colourCurve, num(strokeCurvePx), num(dashCurvePx[0]), num(dashCurvePx[1]))
		for j, i := range l.idx {
			cmd := "L"
			if j == 0 {
				cmd = "M"
			}
			fmt.Fprintf(b, "%s%s %s ", cmd, num(l.px(distM[i])), num(l.py(l.yLo+l.bulge[i])))
		}
		b.WriteString("\"/>\n")
	}

	if l.fresnel {
		fmt.Fprintf(b, `<path id="fresnel-zone" fill="%s" fill-opacity="%s" stroke="%s" stroke-width="%s" d="%s"/>`+"\n",
			colourZone, num(zoneFillOpacity), colourZone, num(strokeZonePx), svgPolygon(l.zoneOutline(1)))
		fmt.Fprintf(b, `<path id="fresnel-zone-06" fill="none" stroke="%s" stroke-width="%s" stroke-dasharray="%s %s" d="%s"/>`+"\n",
			colourZone06, num(strokeZonePx), num(dashZone06Px[0]), num(dashZone06Px[1]), svgPolygon(l.zoneOutline(0.6)))
	}

	if l.antennas {
		x0, x1 := l.px(distM[0]), l.px(distM[n-1])
		fmt.Fprintf(b, `<g id="masts" stroke="%s" stroke-width="%s" fill="%s">`+"\n", colourMast, num(strokeMastPx), colourMast)
		svgLine(b, x0, l.py(l.ground[0]), x0, l.py(l.rayFrom))
		svgLine(b, x1, l.py(l.ground[n-1]), x1, l.py(l.rayTo))
		fmt.Fprintf(b, `<circle cx="%s" cy="%s" r="%s" stroke="none"/>`+"\n", num(x0), num(l.py(l.rayFrom)), num(antennaDotPx))
		fmt.Fprintf(b, `<circle cx="%s" cy="%s" r="%s" stroke="none"/>`+"\n", num(x1), num(l.py(l.rayTo)), num(antennaDotPx))
		b.WriteString("</g>\n")
		fmt.Fprintf(b, `<line id="line-of-sight" x1="%s" y1="%s" x2="%s" y2="%s" stroke="%s" stroke-width="%s"/>`+"\n",
			num(x0), num(l.py(l.rayFrom)), num(x1), num(l.py(l.rayTo)), colourRay, num(strokeRayPx))
	}

	if l.obstacle {
		x := l.px(l.obsDistM)
		fmt.Fprintf(b, `<g id="obstacle" stroke="%s" stroke-width="%s" fill="%s">`+"\n", colourObstacle, num(strokeObstaclePx), colourObstacle)
		fmt.Fprintf(b, `<title>%s</title>`+"\n", esc(l.obstacleLabel()))
		svgLine(b, x, l.py(l.obsGround), x, l.py(l.obsRay))
		fmt.Fprintf(b, `<path stroke="none" d="%s"/>`+"\n", svgPolygon(obstacleMark(x, l.py(l.obsGround))))
		b.WriteString("</g>\n")
	}

	// Axes, ticks and labels.
	fmt.Fprintf(b, `<g id="axes" stroke="%s" stroke-width="%s">`+"\n", colourAxis, num(strokeAxisPx))
	svgLine(b, l.left, l.bottom, l.right, l.bottom)
	svgLine(b, l.left, l.top, l.left, l.bottom)
	for _, v := range l.xTicks.values {
		x := l.pxTick(v)
		svgLine(b, x, l.bottom, x, l.bottom+tickLengthPx)
	}
	for _, v := range l.yTicks.values {
		y := l.py(v)
		svgLine(b, l.left-tickLengthPx, y, l.left, y)
	}
	b.WriteString("</g>\n")
	b.WriteString(`<g id="tick-labels">` + "\n")
	for _, v := range l.xTicks.values {
		fmt.Fprintf(b, `<text x="%s" y="%s" text-anchor="middle">%s</text>`+"\n", num(l.pxTick(v)), num(l.bottom+xTickBaselinePx), l.xTicks.label(v))
	}
	for _, v := range l.yTicks.values {
		fmt.Fprintf(b, `<text x="%s" y="%s" text-anchor="end">%s</text>`+"\n", num(l.left-yTickGapPx), num(l.py(v)+yTickBaselinePx), l.yTicks.label(v))
	}
	b.WriteString("</g>\n")
	fmt.Fprintf(b, `<text id="x-axis-label" x="%s" y="%s" text-anchor="middle">distance (%s)</text>`+"\n", num(l.left+l.plotW/2), num(l.heightPx-xLabelBaselinePx), l.nameD)
	fmt.Fprintf(b, `<text id="y-axis-label" transform="translate(%d %s) rotate(-90)" text-anchor="middle">elevation (%s)</text>`+"\n", yLabelBaselinePx, num(l.top+l.plotH/2), l.nameH)

	svgLegend(b, l)
	b.WriteString("</svg>\n")
}

// svgLine writes a line element (stroke from the enclosing group).
func svgLine(b *strings.Builder, x1, y1, x2, y2 float64) {
	fmt.Fprintf(b, `<line x1="%s" y1="%s" x2="%s" y2="%s"/>`+"\n", num(x1), num(y1), num(x2), num(y2))
}

// svgLegend draws the key in the top right corner of the plot area.
func svgLegend(b *strings.Builder, l *profileLayout) {
	mid := num(legendLineY)
	fmt.Fprintf(b, `<g id="legend" font-size="%d">`+"\n", legendFontSizePx)
	if !l.legendBand {
		fmt.Fprintf(b, `<rect x="%s" y="%s" width="%s" height="%s" fill="%s" fill-opacity="0.85" stroke="%s"/>`+"\n",
			num(l.legendX-legendPadPx), num(l.legendY-legendPadPx), num(l.legendBoxW), num(l.legendBoxH), colourBackground, colourGrid)
	}
	for _, e := range l.legend {
		ry := e.y
		var swatch string
		switch e.kind {
		case legendGround:
			swatch = fmt.Sprintf(`<rect width="%s" height="%s" fill="%s" stroke="%s"/>`, num(legendSwatchPx), num(legendSwatchH), colourGround, colourGroundEdge)
		case legendRay:
			swatch = fmt.Sprintf(`<line x1="0" y1="%s" x2="%s" y2="%s" stroke="%s" stroke-width="%s"/>`, mid, num(legendSwatchPx), mid, colourRay, num(strokeRayPx))
		case legendCurve:
			swatch = fmt.Sprintf(`<line x1="0" y1="%s" x2="%s" y2="%s" stroke="%s" stroke-width="%s" stroke-dasharray="%s %s"/>`,
				mid, num(legendSwatchPx), mid, colourCurve, num(strokeCurvePx), num(dashCurveLegendPx[0]), num(dashCurveLegendPx[1]))
		case legendMast:
			swatch = fmt.Sprintf(`<line x1="%s" y1="%s" x2="%s" y2="%s" stroke="%s" stroke-width="%s"/><circle cx="%s" cy="%s" r="%s" fill="%s"/>`,
				num(legendSwatchPx/2), num(legendSwatchH+1), num(legendSwatchPx/2), num(1), colourMast, num(strokeMastPx), num(legendSwatchPx/2), num(1), num(antennaDotPx-0.5), colourMast)
		case legendZone:
			swatch = fmt.Sprintf(`<rect width="%s" height="%s" fill="%s" fill-opacity="%s" stroke="%s" stroke-width="%s"/>`,
				num(legendSwatchPx), num(legendSwatchH), colourZone, num(zoneFillOpacity), colourZone, num(strokeZonePx))
		case legendZone06:
			swatch = fmt.Sprintf(`<line x1="0" y1="%s" x2="%s" y2="%s" stroke="%s" stroke-width="%s" stroke-dasharray="%s %s"/>`,
				mid, num(legendSwatchPx), mid, colourZone06, num(strokeZonePx), num(dashCurveLegendPx[0]), num(dashCurveLegendPx[1]))
		case legendObstacle:
			swatch = fmt.Sprintf(`<line x1="%s" y1="0" x2="%s" y2="%s" stroke="%s" stroke-width="%s"/><path d="%s" fill="%s"/>`,
				num(legendSwatchPx/2), num(legendSwatchPx/2), num(legendSwatchH), colourObstacle, num(strokeObstaclePx), svgPolygon(obstacleMark(legendSwatchPx/2, legendSwatchH+1)), colourObstacle)
		}
		fmt.Fprintf(b, `<g transform="translate(%s %s)">%s</g>`+"\n", num(e.x), num(ry), swatch)
		fmt.Fprintf(b, `<text x="%s" y="%s">%s</text>`+"\n", num(e.x+legendTextPx), num(ry+legendBaseline), esc(e.text))
	}
	b.WriteString("</g>\n")
}

// svgPolygon writes a closed path through pts.
func svgPolygon(pts [][2]float64) string {
	var b strings.Builder
	for j, p := range pts {
		if j == 0 {
			b.WriteString("M")
		} else {
			b.WriteString(" L")
		}
		b.WriteString(num(p[0]) + " " + num(p[1]))
	}
	b.WriteString(" Z")
	return b.String()
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
