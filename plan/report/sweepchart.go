package report

import (
	"fmt"
	"math"
	"strings"
)

// Colours of the cables in the mast sweep chart: samples of the viridis
// scale (van der Walt and Smith, matplotlib, 2015), dark enough to read as
// lines on white; each cable also has its own marker shape so the chart
// reads in greyscale.
var sweepColours = []string{"#440154", "#31688e", "#21918c", "#35b779", "#6b8e00"}

// Sweep chart geometry, pixels.
const (
	sweepWidthPx      = 560.0
	sweepHeightPx     = 250.0
	sweepLeftPx       = 58.0
	sweepRightPx      = 96.0 // room for the required-margin label
	sweepTopPx        = 44.0
	sweepBottomPx     = 42.0
	sweepMarkerPx     = 4.0
	sweepRingPx       = 9.0
	sweepLegendTopPx  = 12.0
	colourRequirement = "#333333"
	colourRecommended = "#111111"
)

// sweepSeries is one cable's points, by rising mast height.
type sweepSeries struct {
	cable  string
	hM, dB []float64
}

// sweepSVG draws the mast sweep as an inline SVG chart (no XML
// declaration): worst margin against mast height, one line per cable, the
// required margin dashed, the recommended choice ringed. Heights are drawn
// in feet when imperial.
func sweepSVG(m *BriefingMast, requiredDB float64, imperial bool) string {
	unitH, nameH := 1.0, "m"
	if imperial {
		unitH, nameH = metresPerFoot, "ft"
	}
	var series []*sweepSeries
	byCable := map[string]*sweepSeries{}
	for _, r := range m.Rows {
		s := byCable[r.Cable]
		if s == nil {
			s = &sweepSeries{cable: r.Cable}
			byCable[r.Cable] = s
			series = append(series, s)
		}
		s.hM = append(s.hM, r.HeightM)
		s.dB = append(s.dB, r.WorstMarginDB)
	}
	for _, s := range series {
		sortPairs(s.hM, s.dB)
	}
	hLo, hHi := math.Inf(1), math.Inf(-1)
	dLo, dHi := requiredDB, requiredDB
	for _, r := range m.Rows {
		hLo, hHi = math.Min(hLo, r.HeightM/unitH), math.Max(hHi, r.HeightM/unitH)
		dLo, dHi = math.Min(dLo, r.WorstMarginDB), math.Max(dHi, r.WorstMarginDB)
	}
	xt := niceTicks(hLo, hHi, 8)
	yt := niceTicks(dLo-1, dHi+1, 5)
	left, top := sweepLeftPx, sweepTopPx
	right, bottom := sweepWidthPx-sweepRightPx, sweepHeightPx-sweepBottomPx
	px := func(hM float64) float64 { return left + (hM/unitH-xt.min)/(xt.max-xt.min)*(right-left) }
	py := func(db float64) float64 { return bottom - (db-yt.min)/(yt.max-yt.min)*(bottom-top) }

	var b strings.Builder
	fmt.Fprintf(&b, `<svg xmlns="http://www.w3.org/2000/svg" class="chart" viewBox="0 0 %s %s" width="%s" height="%s" font-family="sans-serif" font-size="12" fill="%s" role="img" aria-labelledby="sweep-title">`+"\n",
		num(sweepWidthPx), num(sweepHeightPx), num(sweepWidthPx), num(sweepHeightPx), colourText)
	fmt.Fprintf(&b, `<title id="sweep-title">Worst margin against mast height for each cable at %s</title>`+"\n", esc(m.Station))
	fmt.Fprintf(&b, `<rect width="%s" height="%s" fill="#ffffff"/>`+"\n", num(sweepWidthPx), num(sweepHeightPx))
	fmt.Fprintf(&b, `<g stroke="%s" stroke-width="1">`+"\n", colourGrid)
	for _, v := range xt.values {
		svgLine(&b, left+(v-xt.min)/(xt.max-xt.min)*(right-left), top, left+(v-xt.min)/(xt.max-xt.min)*(right-left), bottom)
	}
	for _, v := range yt.values {
		svgLine(&b, left, py(v), right, py(v))
	}
	b.WriteString("</g>\n")
	fmt.Fprintf(&b, `<g stroke="%s" stroke-width="1">`+"\n", colourAxis)
	svgLine(&b, left, bottom, right, bottom)
	svgLine(&b, left, top, left, bottom)
	b.WriteString("</g>\n")
	for _, v := range xt.values {
		x := left + (v-xt.min)/(xt.max-xt.min)*(right-left)
		fmt.Fprintf(&b, `<text x="%s" y="%s" text-anchor="middle">%s</text>`+"\n", num(x), num(bottom+16), xt.label(v))
	}
	for _, v := range yt.values {
		fmt.Fprintf(&b, `<text x="%s" y="%s" text-anchor="end">%s</text>`+"\n", num(left-6), num(py(v)+4), minus(yt.label(v)))
	}
	fmt.Fprintf(&b, `<text x="%s" y="%s" text-anchor="middle">mast height (%s)</text>`+"\n", num((left+right)/2), num(sweepHeightPx-6), nameH)
	fmt.Fprintf(&b, `<text transform="translate(14 %s) rotate(-90)" text-anchor="middle">worst margin (dB)</text>`+"\n", num((top+bottom)/2))

	// The requirement.
	ry := py(requiredDB)
	fmt.Fprintf(&b, `<line x1="%s" y1="%s" x2="%s" y2="%s" stroke="%s" stroke-width="1.5" stroke-dasharray="6 4"/>`+"\n", num(left), num(ry), num(right), num(ry), colourRequirement)
	fmt.Fprintf(&b, `<text x="%s" y="%s">required %s dB</text>`+"\n", num(right+6), num(ry+4), minus(fmt1(requiredDB)))

	// One line and marker shape per cable, and its key above the plot.
	kx := left
	for i, s := range series {
		col := sweepColours[i%len(sweepColours)]
		var pts []string
		for j := range s.hM {
			pts = append(pts, num(px(s.hM[j]))+","+num(py(s.dB[j])))
		}
		fmt.Fprintf(&b, `<g stroke="%s" fill="%s"><polyline fill="none" stroke-width="1.8" points="%s"/>`+"\n", col, col, strings.Join(pts, " "))
		for j := range s.hM {
			b.WriteString(sweepMarker(i, px(s.hM[j]), py(s.dB[j])) + "\n")
		}
		b.WriteString("</g>\n")
		fmt.Fprintf(&b, `<g stroke="%s" fill="%s"><line x1="%s" y1="%s" x2="%s" y2="%s" stroke-width="1.8"/>%s</g>`+"\n",
			col, col, num(kx), num(sweepLegendTopPx+6), num(kx+22), num(sweepLegendTopPx+6), sweepMarker(i, kx+11, sweepLegendTopPx+6))
		fmt.Fprintf(&b, `<text x="%s" y="%s">%s</text>`+"\n", num(kx+28), num(sweepLegendTopPx+10), esc(s.cable))
		kx += 28 + textWidthPx(s.cable, 12) + 20
	}
	if m.RecommendedCable != "" {
		for _, r := range m.Rows {
			if r.Cable == m.RecommendedCable && r.HeightM == m.RecommendedHeightM {
				x, y := px(r.HeightM), py(r.WorstMarginDB)
				fmt.Fprintf(&b, `<circle cx="%s" cy="%s" r="%s" fill="none" stroke="%s" stroke-width="2"/>`+"\n", num(x), num(y), num(sweepRingPx), colourRecommended)
				// Above the ring when it is above the required line, else
				// below, so the label never sits on that line.
				ly := y - sweepRingPx - 4
				if r.WorstMarginDB < requiredDB {
					ly = y + sweepRingPx + 12
				}
				anchor, lx := "start", x+sweepRingPx+4
				if x > (left+right)/2 {
					anchor, lx = "end", x-sweepRingPx-4
				}
				fmt.Fprintf(&b, `<text x="%s" y="%s" text-anchor="%s" font-weight="bold">recommended</text>`+"\n", num(lx), num(ly), anchor)
				break
			}
		}
	}
	b.WriteString("</svg>\n")
	return b.String()
}

// sweepMarker is cable i's marker at (x, y): a circle, square, triangle,
// diamond or cross.
func sweepMarker(i int, x, y float64) string {
	r := sweepMarkerPx
	switch i % 5 {
	case 0:
		return fmt.Sprintf(`<circle cx="%s" cy="%s" r="%s"/>`, num(x), num(y), num(r))
	case 1:
		return fmt.Sprintf(`<rect x="%s" y="%s" width="%s" height="%s"/>`, num(x-r), num(y-r), num(2*r), num(2*r))
	case 2:
		return fmt.Sprintf(`<path d="M%s %s L%s %s L%s %s Z"/>`, num(x), num(y-r-1), num(x+r+1), num(y+r), num(x-r-1), num(y+r))
	case 3:
		return fmt.Sprintf(`<path d="M%s %s L%s %s L%s %s L%s %s Z"/>`, num(x), num(y-r-1), num(x+r+1), num(y), num(x), num(y+r+1), num(x-r-1), num(y))
	default:
		return fmt.Sprintf(`<path fill="none" stroke-width="2" d="M%s %s L%s %s M%s %s L%s %s"/>`, num(x-r), num(y-r), num(x+r), num(y+r), num(x-r), num(y+r), num(x+r), num(y-r))
	}
}

// sortPairs sorts xs rising, carrying ys along (insertion sort: a sweep
// has a few dozen heights).
func sortPairs(xs, ys []float64) {
	for i := 1; i < len(xs); i++ {
		for j := i; j > 0 && xs[j] < xs[j-1]; j-- {
			xs[j], xs[j-1] = xs[j-1], xs[j]
			ys[j], ys[j-1] = ys[j-1], ys[j]
		}
	}
}
