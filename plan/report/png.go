package report

import (
	"fmt"
	"image"
	"image/color"
	"image/draw"
	"image/png"
	"io"
	"math"
	"strings"
	"sync"

	"golang.org/x/image/font"
	"golang.org/x/image/font/gofont/gobold"
	"golang.org/x/image/font/gofont/goregular"
	"golang.org/x/image/font/opentype"
	"golang.org/x/image/math/fixed"
	"golang.org/x/image/vector"
)

// ProfilePNG writes the chart that ProfileSVG draws as a PNG image of the
// chart's size in pixels (DefaultWidthPx × DefaultHeightPx unless WithSize
// says otherwise), for printing or pasting into a document: the same layout,
// axes, ticks, options and thinning, rasterised with anti-aliasing (x/image
// vector) and labelled in the Go fonts (x/image gofont). The image is
// opaque 8-bit sRGB; a chart of W × H pixels takes about 4·W·H bytes of
// memory while it is drawn.
//
// The data and options are checked as by ProfileSVG: on bad data the error
// wraps ErrChartData and nothing is written. Write errors from w are
// returned as they are.
func ProfilePNG(w io.Writer, distM, elevM []float64, opts ...ProfileOption) error {
	c, err := newProfileChart(distM, elevM, opts)
	if err != nil {
		return err
	}
	img, err := rasterProfile(c.layout(distM, elevM), distM)
	if err != nil {
		return err
	}
	return png.Encode(w, img)
}

// chartFonts are the faces a raster chart is labelled with. A face is not
// safe for concurrent use, so each chart opens its own.
type chartFonts struct {
	text, title, legend font.Face
}

// goFonts parses the embedded Go fonts once; a parsed font is safe for
// concurrent use.
var goFonts = sync.OnceValues(func() ([2]*opentype.Font, error) {
	regular, err := opentype.Parse(goregular.TTF)
	if err != nil {
		return [2]*opentype.Font{}, err
	}
	bold, err := opentype.Parse(gobold.TTF)
	return [2]*opentype.Font{regular, bold}, err
})

// openFonts opens the faces of a chart: sizes in pixels (points at 72 dpi),
// hinted to the pixel grid so small labels stay sharp.
func openFonts() (*chartFonts, error) {
	fonts, err := goFonts()
	if err != nil {
		return nil, fmt.Errorf("report: reading the built-in Go fonts: %w", err)
	}
	face := func(f *opentype.Font, sizePx float64) (font.Face, error) {
		return opentype.NewFace(f, &opentype.FaceOptions{Size: sizePx, DPI: 72, Hinting: font.HintingFull})
	}
	var fs chartFonts
	if fs.text, err = face(fonts[0], fontSizePx); err != nil {
		return nil, err
	}
	if fs.title, err = face(fonts[1], titleFontSizePx); err != nil {
		return nil, err
	}
	if fs.legend, err = face(fonts[0], legendFontSizePx); err != nil {
		return nil, err
	}
	return &fs, nil
}

func (fs *chartFonts) close() {
	fs.text.Close()
	fs.title.Close()
	fs.legend.Close()
}

// canvas is an RGBA image with a rasteriser for anti-aliased shapes.
type canvas struct {
	img *image.RGBA
	r   *vector.Rasterizer
}

func newCanvas(widthPx, heightPx int) *canvas {
	return &canvas{img: image.NewRGBA(image.Rect(0, 0, widthPx, heightPx)), r: vector.NewRasterizer(1, 1)}
}

// shape is a set of closed polygons (x, y pixels) filled together with the
// non-zero rule: where polygons wound the same way overlap, the coverage
// saturates instead of doubling.
type shape [][][2]float64

// paint fills s with col, anti-aliased, rasterising only its bounding box.
func (cv *canvas) paint(col color.Color, s shape) {
	box := image.Rectangle{}
	for _, poly := range s {
		for _, p := range poly {
			box = box.Union(image.Rect(int(math.Floor(p[0])), int(math.Floor(p[1])), int(math.Ceil(p[0]))+1, int(math.Ceil(p[1]))+1))
		}
	}
	box = box.Intersect(cv.img.Bounds())
	if box.Empty() {
		return
	}
	cv.r.Reset(box.Dx(), box.Dy())
	ox, oy := float64(box.Min.X), float64(box.Min.Y)
	for _, poly := range s {
		cv.r.MoveTo(float32(poly[0][0]-ox), float32(poly[0][1]-oy))
		for _, p := range poly[1:] {
			cv.r.LineTo(float32(p[0]-ox), float32(p[1]-oy))
		}
		cv.r.ClosePath()
	}
	cv.r.Draw(cv.img, box, image.NewUniform(col), image.Point{})
}

// stroke returns a polyline through pts, widthPx wide, with butt ends and
// rounded joins, as quadrilaterals and octagons all wound clockwise on the
// screen.
func stroke(pts [][2]float64, widthPx float64) shape {
	var s shape
	h := widthPx / 2
	for i := 1; i < len(pts); i++ {
		p, q := pts[i-1], pts[i]
		dx, dy := q[0]-p[0], q[1]-p[1]
		l := math.Hypot(dx, dy)
		if l == 0 {
			continue
		}
		nx, ny := -dy/l*h, dx/l*h
		s = append(s, [][2]float64{{p[0] + nx, p[1] + ny}, {q[0] + nx, q[1] + ny}, {q[0] - nx, q[1] - ny}, {p[0] - nx, p[1] - ny}})
		if i > 1 {
			s = append(s, joint(p, h))
		}
	}
	return s
}

// strokes joins the strokes of several polylines into one shape.
func strokes(lines [][][2]float64, widthPx float64) shape {
	var s shape
	for _, l := range lines {
		s = append(s, stroke(l, widthPx)...)
	}
	return s
}

// joint is a small octagon of radius h around p, wound as stroke's
// quadrilaterals, to round a join.
func joint(p [2]float64, h float64) [][2]float64 {
	pts := make([][2]float64, 8)
	for k := range pts {
		a := -float64(k) * math.Pi / 4
		pts[k] = [2]float64{p[0] + h*math.Cos(a), p[1] + h*math.Sin(a)}
	}
	return pts
}

// disc is a 16-sided polygon of radius r around (x, y), wound as stroke's
// quadrilaterals.
func disc(x, y, r float64) [][2]float64 {
	pts := make([][2]float64, 16)
	for k := range pts {
		a := -float64(k) * math.Pi / 8
		pts[k] = [2]float64{x + r*math.Cos(a), y + r*math.Sin(a)}
	}
	return pts
}

// dashes splits a polyline into the pieces that are on in a dash pattern of
// on and off pixels, measured along the line from its start (which is on).
func dashes(pts [][2]float64, on, off float64) [][][2]float64 {
	var out [][][2]float64
	cur := [][2]float64{pts[0]}
	isOn, left := true, on // the current state and the length left in it
	for i := 1; i < len(pts); i++ {
		p, q := pts[i-1], pts[i]
		l := math.Hypot(q[0]-p[0], q[1]-p[1])
		done := 0.0
		for l-done > left {
			done += left
			t := done / l
			at := [2]float64{p[0] + t*(q[0]-p[0]), p[1] + t*(q[1]-p[1])}
			if isOn {
				out = append(out, append(cur, at))
				cur, left = nil, off
			} else {
				cur, left = [][2]float64{at}, on
			}
			isOn = !isOn
		}
		left -= l - done
		if isOn {
			cur = append(cur, q)
		}
	}
	if isOn && len(cur) > 1 {
		out = append(out, cur)
	}
	return out
}

// crisp moves the centre of an axis-parallel line widthPx wide onto the
// pixel grid, so a 1 px line covers one row of pixels instead of blurring
// over two.
func crisp(v, widthPx float64) float64 {
	if int(math.Round(widthPx))%2 == 1 {
		return math.Floor(v) + 0.5
	}
	return math.Round(v)
}

// anchor says where a text is placed relative to its x.
type anchor int

const (
	anchorStart anchor = iota
	anchorMiddle
	anchorEnd
)

// text draws s with its baseline at y, placed at x as a says.
func (cv *canvas) text(face font.Face, col color.Color, x, y float64, a anchor, s string) {
	s = printable(s)
	adv := font.MeasureString(face, s)
	switch a {
	case anchorMiddle:
		x -= float64(adv) / 64 / 2
	case anchorEnd:
		x -= float64(adv) / 64
	}
	d := font.Drawer{Dst: cv.img, Src: image.NewUniform(col), Face: face,
		Dot: fixed.P(int(math.Round(x)), int(math.Round(y)))}
	d.DrawString(s)
}

// textUp draws s reading upwards (turned 90° anticlockwise), centred on y,
// with its baseline at x.
func (cv *canvas) textUp(face font.Face, col color.Color, x, y float64, s string) {
	s = printable(s)
	m := face.Metrics()
	asc, desc := m.Ascent.Ceil(), m.Descent.Ceil()
	adv := font.MeasureString(face, s).Ceil()
	if adv <= 0 {
		return
	}
	// Draw level into a mask, then copy it turned.
	level := image.NewAlpha(image.Rect(0, 0, adv, asc+desc))
	d := font.Drawer{Dst: level, Src: image.Opaque, Face: face, Dot: fixed.P(0, asc)}
	d.DrawString(s)
	up := image.NewAlpha(image.Rect(0, 0, asc+desc, adv))
	for v := 0; v < asc+desc; v++ {
		for u := 0; u < adv; u++ {
			up.SetAlpha(v, adv-1-u, level.AlphaAt(u, v))
		}
	}
	x0 := int(math.Round(x)) - asc
	y0 := int(math.Round(y)) - adv + adv/2
	draw.DrawMask(cv.img, up.Bounds().Add(image.Pt(x0, y0)), image.NewUniform(col), image.Point{}, up, image.Point{}, draw.Over)
}

// printable drops control characters, which have no glyphs.
func printable(s string) string {
	return strings.Map(func(r rune) rune {
		if r < 0x20 || r == 0x7f {
			return -1
		}
		return r
	}, s)
}

// rgb converts a #rrggbb colour constant.
func rgb(hex string) color.NRGBA {
	var c color.NRGBA
	if _, err := fmt.Sscanf(hex, "#%02x%02x%02x", &c.R, &c.G, &c.B); err != nil {
		panic("report: bad colour constant " + hex)
	}
	c.A = 0xff
	return c
}

// rasterProfile draws the chart laid out in l, in the order and with the
// strokes of renderSVG.
func rasterProfile(l *profileLayout, distM []float64) (*image.RGBA, error) {
	fs, err := openFonts()
	if err != nil {
		return nil, err
	}
	defer fs.close()
	n := len(distM)
	cv := newCanvas(int(l.widthPx), int(l.heightPx))
	draw.Draw(cv.img, cv.img.Bounds(), image.NewUniform(rgb(colourBackground)), image.Point{}, draw.Src)
	textCol := rgb(colourText)
	cv.text(fs.title, textCol, l.widthPx/2, titleBaselinePx, anchorMiddle, l.title)

	// Grid.
	var grid [][][2]float64
	for _, v := range l.xTicks.values {
		x := crisp(l.pxTick(v), strokeGridPx)
		grid = append(grid, [][2]float64{{x, l.top}, {x, l.bottom}})
	}
	for _, v := range l.yTicks.values {
		y := crisp(l.py(v), strokeGridPx)
		grid = append(grid, [][2]float64{{l.left, y}, {l.right, y}})
	}
	cv.paint(rgb(colourGrid), strokes(grid, strokeGridPx))

	// Ground: from the (curved) sea-level floor of the chart up to the
	// terrain and back, filled, then its outline.
	outline := make([][2]float64, 0, 2*len(l.idx)+1)
	for _, i := range l.idx {
		outline = append(outline, [2]float64{l.px(distM[i]), l.py(l.ground[i])})
	}
	floor := make([][2]float64, 0, len(l.idx))
	for j := len(l.idx) - 1; j >= 0; j-- {
		i := l.idx[j]
		floor = append(floor, [2]float64{l.px(distM[i]), l.py(l.yLo + l.bulge[i])})
	}
	outline = append(outline, floor...)
	cv.paint(rgb(colourGround), shape{outline})
	cv.paint(rgb(colourGroundEdge), stroke(append(outline, outline[0]), strokeGroundPx))

	if l.curve {
		curve := make([][2]float64, len(floor))
		for j := range floor {
			curve[j] = floor[len(floor)-1-j]
		}
		cv.paint(rgb(colourCurve), strokes(dashes(curve, dashCurvePx[0], dashCurvePx[1]), strokeCurvePx))
	}

	if l.fresnel {
		zone := l.zoneOutline(1)
		fill := rgb(colourZone)
		fill.A = uint8(math.Round(zoneFillOpacity * 255))
		cv.paint(fill, shape{zone})
		cv.paint(rgb(colourZone), stroke(append(zone, zone[0]), strokeZonePx))
		z6 := l.zoneOutline(0.6)
		cv.paint(rgb(colourZone06), strokes(dashes(append(z6, z6[0]), dashZone06Px[0], dashZone06Px[1]), strokeZonePx))
	}

	if l.antennas {
		x0, x1 := l.px(distM[0]), l.px(distM[n-1])
		mx0, mx1 := crisp(x0, strokeMastPx), crisp(x1, strokeMastPx)
		cv.paint(rgb(colourMast), strokes([][][2]float64{
			{{mx0, l.py(l.ground[0])}, {mx0, l.py(l.rayFrom)}},
			{{mx1, l.py(l.ground[n-1])}, {mx1, l.py(l.rayTo)}},
		}, strokeMastPx))
		cv.paint(rgb(colourMast), shape{disc(mx0, l.py(l.rayFrom), antennaDotPx), disc(mx1, l.py(l.rayTo), antennaDotPx)})
		cv.paint(rgb(colourRay), stroke([][2]float64{{x0, l.py(l.rayFrom)}, {x1, l.py(l.rayTo)}}, strokeRayPx))
	}

	if l.obstacle {
		x := crisp(l.px(l.obsDistM), strokeObstaclePx)
		cv.paint(rgb(colourObstacle), stroke([][2]float64{{x, l.py(l.obsGround)}, {x, l.py(l.obsRay)}}, strokeObstaclePx))
		cv.paint(rgb(colourObstacle), shape{obstacleMark(x, l.py(l.obsGround))})
	}

	// Axes, ticks and labels.
	yb, xl := crisp(l.bottom, strokeAxisPx), crisp(l.left, strokeAxisPx)
	h := strokeAxisPx / 2
	axes := [][][2]float64{{{xl - h, yb}, {l.right, yb}}, {{xl, l.top}, {xl, yb + h}}}
	for _, v := range l.xTicks.values {
		x := crisp(l.pxTick(v), strokeAxisPx)
		axes = append(axes, [][2]float64{{x, yb}, {x, yb + tickLengthPx}})
	}
	for _, v := range l.yTicks.values {
		y := crisp(l.py(v), strokeAxisPx)
		axes = append(axes, [][2]float64{{xl - tickLengthPx, y}, {xl, y}})
	}
	cv.paint(rgb(colourAxis), strokes(axes, strokeAxisPx))
	for _, v := range l.xTicks.values {
		cv.text(fs.text, textCol, l.pxTick(v), l.bottom+xTickBaselinePx, anchorMiddle, l.xTicks.label(v))
	}
	for _, v := range l.yTicks.values {
		cv.text(fs.text, textCol, l.left-yTickGapPx, l.py(v)+yTickBaselinePx, anchorEnd, l.yTicks.label(v))
	}
	cv.text(fs.text, textCol, l.left+l.plotW/2, l.heightPx-xLabelBaselinePx, anchorMiddle, "distance ("+l.nameD+")")
	cv.textUp(fs.text, textCol, yLabelBaselinePx, l.top+l.plotH/2, "elevation ("+l.nameH+")")

	rasterLegend(cv, l, fs.legend, textCol)
	return cv.img, nil
}

// rasterLegend draws the key in the top right corner of the plot area.
func rasterLegend(cv *canvas, l *profileLayout, face font.Face, textCol color.Color) {
	if !l.legendBand {
		bx, by := l.legendX-legendPadPx, l.legendY-legendPadPx
		box := [][2]float64{{bx, by}, {bx + l.legendBoxW, by}, {bx + l.legendBoxW, by + l.legendBoxH}, {bx, by + l.legendBoxH}}
		back := rgb(colourBackground)
		back.A = 0xd9 // 85 % opaque, as the SVG's fill-opacity
		cv.paint(back, shape{box})
		x0, y0 := crisp(bx, strokeGridPx), crisp(by, strokeGridPx)
		x1, y1 := crisp(bx+l.legendBoxW, strokeGridPx), crisp(by+l.legendBoxH, strokeGridPx)
		cv.paint(rgb(colourGrid), stroke([][2]float64{{x0, y0}, {x1, y0}, {x1, y1}, {x0, y1}, {x0, y0}}, strokeGridPx))
	}
	for _, e := range l.legend {
		x, y := e.x, e.y
		ly := crisp(y+legendLineY, 1) // centred on a pixel row
		line := [][2]float64{{x, ly}, {x + legendSwatchPx, ly}}
		switch e.kind {
		case legendGround:
			sw := [][2]float64{{x, y}, {x + legendSwatchPx, y}, {x + legendSwatchPx, y + legendSwatchH}, {x, y + legendSwatchH}}
			cv.paint(rgb(colourGround), shape{sw})
			edge := make([][2]float64, 0, len(sw)+1)
			for _, p := range append(sw, sw[0]) {
				edge = append(edge, [2]float64{crisp(p[0], strokeGroundPx), crisp(p[1], strokeGroundPx)})
			}
			cv.paint(rgb(colourGroundEdge), stroke(edge, strokeGroundPx))
		case legendRay:
			cv.paint(rgb(colourRay), stroke(line, strokeRayPx))
		case legendCurve:
			cv.paint(rgb(colourCurve), strokes(dashes(line, dashCurveLegendPx[0], dashCurveLegendPx[1]), strokeCurvePx))
		case legendMast:
			mx := crisp(x+legendSwatchPx/2, strokeMastPx)
			cv.paint(rgb(colourMast), stroke([][2]float64{{mx, y + legendSwatchH + 1}, {mx, y + 1}}, strokeMastPx))
			cv.paint(rgb(colourMast), shape{disc(mx, y+1, antennaDotPx-0.5)})
		case legendZone:
			sw := [][2]float64{{x, y}, {x + legendSwatchPx, y}, {x + legendSwatchPx, y + legendSwatchH}, {x, y + legendSwatchH}}
			fill := rgb(colourZone)
			fill.A = uint8(math.Round(zoneFillOpacity * 255))
			cv.paint(fill, shape{sw})
			edge := make([][2]float64, 0, len(sw)+1)
			for _, p := range append(sw, sw[0]) {
				edge = append(edge, [2]float64{crisp(p[0], strokeZonePx), crisp(p[1], strokeZonePx)})
			}
			cv.paint(rgb(colourZone), stroke(edge, strokeZonePx))
		case legendZone06:
			cv.paint(rgb(colourZone06), strokes(dashes(line, dashCurveLegendPx[0], dashCurveLegendPx[1]), strokeZonePx))
		case legendObstacle:
			mx := crisp(x+legendSwatchPx/2, strokeObstaclePx)
			cv.paint(rgb(colourObstacle), stroke([][2]float64{{mx, y}, {mx, y + legendSwatchH}}, strokeObstaclePx))
			cv.paint(rgb(colourObstacle), shape{obstacleMark(mx, y+legendSwatchH+1)})
		}
		cv.text(face, textCol, x+legendTextPx, y+legendBaseline, anchorStart, e.text)
	}
}
