package report

import (
	"fmt"
	"image"
	"image/color"
	"image/draw"
	"math"
	"strconv"

	"github.com/mastlink/mastlink/terrain"
	"github.com/paulmach/orb"
	"golang.org/x/image/font"
	"golang.org/x/image/font/opentype"
	"golang.org/x/image/math/fixed"
)

// Map colours (sRGB, #rrggbb), chosen for this package: a paper white, the
// greys of the relief, dark ink for symbols and text; the scale's bands
// take viridis. Nothing here is red, amber or green.
const (
	mapPaper     = "#ffffff"
	mapNoTerrain = "#efeee9" // base where no terrain is given
	mapInk       = "#1c1c1c" // symbols, text
	mapGreyInk   = "#404040" // values below the lowest level
	mapFrame     = "#5a5a5a"
	mapSoftText  = "#5c5c5c" // credit line
	mapHalo      = "#ffffff"
)

// Relief tone: a cell's shade s (0 to 1) becomes the grey level
// reliefFlat + reliefGain·(s − sin 45°) of white, kept within reliefDark
// and 1: flat ground is a light grey, slopes facing the light lighter, and
// those facing away darker but well above black, so the colours over them
// keep their hue.
const (
	reliefFlat = 0.85
	reliefGain = 0.8
	reliefDark = 0.40
)

// mapFonts are the faces of a map; a face is not safe for concurrent use.
type mapFonts struct {
	title, sub, label, labelBold, small, smallBold font.Face
}

func openMapFonts() (*mapFonts, error) {
	fonts, err := goFonts()
	if err != nil {
		return nil, fmt.Errorf("report: reading the built-in Go fonts: %w", err)
	}
	var fs mapFonts
	for _, f := range []struct {
		dst  *font.Face
		font *opentype.Font
		size float64
	}{
		{&fs.title, fonts[1], mapTitleSizePx},
		{&fs.sub, fonts[0], mapSubSizePx},
		{&fs.label, fonts[0], mapLabelSizePx},
		{&fs.labelBold, fonts[1], mapLabelSizePx},
		{&fs.small, fonts[0], mapSmallSizePx},
		{&fs.smallBold, fonts[1], mapSmallSizePx},
	} {
		if *f.dst, err = opentype.NewFace(f.font, &opentype.FaceOptions{Size: f.size, DPI: 72, Hinting: font.HintingFull}); err != nil {
			return nil, err
		}
	}
	return &fs, nil
}

func (fs *mapFonts) close() {
	for _, f := range []font.Face{fs.title, fs.sub, fs.label, fs.labelBold, fs.small, fs.smallBold} {
		f.Close()
	}
}

// draw renders the checked map m laid out in l.
func (l *mapLayout) draw(m *Map) (*image.RGBA, error) {
	fs, err := openMapFonts()
	if err != nil {
		return nil, err
	}
	defer fs.close()

	// The map frame is drawn on its own canvas, so nothing spills over the
	// header and footer, then copied onto the page.
	mc := newCanvas(l.mapW, l.mapH)
	if err := l.drawBase(mc, m); err != nil {
		return nil, err
	}
	if m.Overlay != nil {
		l.drawOverlay(mc, m)
	}
	var obstacles []box
	var labels []labelReq
	l.drawCircles(mc, m, &labels)
	l.drawStretches(mc, m, &labels)
	l.drawTracks(mc, m, &labels)
	l.drawLinks(mc, m, &labels)
	l.drawMarkers(mc, m, fs, &labels, &obstacles)
	north := l.drawNorthArrow(mc, fs)
	obstacles = append(obstacles, north)
	placeLabels(mc, fs, labels, obstacles)

	page := newCanvas(l.widthPx, l.heightPx)
	draw.Draw(page.img, page.img.Bounds(), image.NewUniform(rgb(mapPaper)), image.Point{}, draw.Src)
	draw.Draw(page.img, image.Rect(l.mapX, l.mapY, l.mapX+l.mapW, l.mapY+l.mapH), mc.img, image.Point{}, draw.Src)
	x0, y0 := float64(l.mapX)-0.5, float64(l.mapY)-0.5
	x1, y1 := float64(l.mapX+l.mapW)+0.5, float64(l.mapY+l.mapH)+0.5
	page.paint(rgb(mapFrame), stroke([][2]float64{{x0, y0}, {x1, y0}, {x1, y1}, {x0, y1}, {x0, y0 - 0.5}}, 1))

	ink := rgb(mapInk)
	page.text(fs.title, ink, float64(l.mapX), mapTitleBaseline, anchorStart, mapTitle(m))
	if m.Subtitle != "" {
		page.text(fs.sub, rgb(mapSoftText), float64(l.mapX), mapSubBaseline, anchorStart, m.Subtitle)
	}
	l.drawLegend(page, m, fs)
	l.drawScaleBar(page, fs)
	credit := "Equirectangular, true scale at " + latText(l.lat0) + "."
	if l.anyValued {
		credit = "Colours: viridis. " + credit
	}
	if m.Terrain != nil {
		credit = "Relief: Horn's slopes, lit from the north-west at 45°. " + credit
	}
	if m.Credit != "" {
		credit = m.Credit + "  ·  " + credit
	}
	page.text(fs.small, rgb(mapSoftText), float64(l.mapX), float64(l.footerY+creditBaseline), anchorStart, credit)
	return page.img, nil
}

// mapTitle is the title printed, "Map" when none is given.
func mapTitle(m *Map) string {
	if m.Title == "" {
		return "Map"
	}
	return m.Title
}

// latText writes a latitude as 45.05° N.
func latText(lat float64) string {
	h := "N"
	if lat < 0 {
		h = "S"
	}
	return strconv.FormatFloat(math.Abs(lat), 'f', 2, 64) + "° " + h
}

// drawBase paints the shaded relief of the terrain under the map, or the
// plain base where there is none.
func (l *mapLayout) drawBase(cv *canvas, m *Map) error {
	draw.Draw(cv.img, cv.img.Bounds(), image.NewUniform(rgb(mapNoTerrain)), image.Point{}, draw.Src)
	if m.Terrain == nil {
		return nil
	}
	sub, ok := cropGrid(m.Terrain, l.b, 2)
	if !ok {
		return nil
	}
	shade, err := Hillshade(sub)
	if err != nil {
		return err
	}
	// Bilinear interpolation between cell centres; the fractional cell
	// position of each column and row is worked out once.
	dLon, dLat := sub.cellDeg()
	fx := make([]float64, l.mapW)
	for x := range fx {
		lon, _ := l.lonLat(x, 0)
		fx[x] = (lon-sub.Bounds.West)/dLon - 0.5
	}
	w, h := sub.Width, sub.Height
	pix := cv.img.Pix
	for y := 0; y < l.mapH; y++ {
		_, lat := l.lonLat(0, y)
		fy := (sub.Bounds.North-lat)/dLat - 0.5
		if fy < -0.5 || fy > float64(h)-0.5 {
			continue
		}
		r0 := min(max(int(math.Floor(fy)), 0), h-1)
		r1 := min(r0+1, h-1)
		ty := math.Min(math.Max(fy-float64(r0), 0), 1)
		row0, row1 := shade[r0*w:r0*w+w], shade[r1*w:r1*w+w]
		o := y * cv.img.Stride
		for x := 0; x < l.mapW; x++ {
			f := fx[x]
			if f < -0.5 || f > float64(w)-0.5 {
				continue
			}
			c0 := min(max(int(math.Floor(f)), 0), w-1)
			c1 := min(c0+1, w-1)
			tx := math.Min(math.Max(f-float64(c0), 0), 1)
			a, b, c, d := row0[c0], row0[c1], row1[c0], row1[c1]
			var s float64
			if a == a && b == b && c == c && d == d {
				s = (float64(a)*(1-tx)+float64(b)*tx)*(1-ty) + (float64(c)*(1-tx)+float64(d)*tx)*ty
			} else if v := nearestOf(a, b, c, d, tx, ty); v == v {
				s = float64(v)
			} else {
				continue
			}
			g := uint8(math.Round(255 * math.Min(1, math.Max(reliefDark, reliefFlat+reliefGain*(s-math.Sqrt2/2)))))
			p := pix[o+4*x : o+4*x+4 : o+4*x+4]
			p[0], p[1], p[2], p[3] = g, g, g, 0xff
		}
	}
	return nil
}

// nearestOf is the corner value nearest to (tx, ty) among a (0,0), b (1,0),
// c (0,1), d (1,1).
func nearestOf(a, b, c, d float32, tx, ty float64) float32 {
	if ty < 0.5 {
		if tx < 0.5 {
			return a
		}
		return b
	}
	if tx < 0.5 {
		return c
	}
	return d
}

// cropGrid is the part of g covering b, with pad cells more on each side
// where g has them; ok is false when they do not overlap.
func cropGrid(g *Grid, b Bounds, pad int) (Grid, bool) {
	dLon, dLat := g.cellDeg()
	c0 := max(int(math.Floor((b.West-g.Bounds.West)/dLon))-pad, 0)
	c1 := min(int(math.Ceil((b.East-g.Bounds.West)/dLon))+pad, g.Width)
	r0 := max(int(math.Floor((g.Bounds.North-b.North)/dLat))-pad, 0)
	r1 := min(int(math.Ceil((g.Bounds.North-b.South)/dLat))+pad, g.Height)
	if c0 >= c1 || r0 >= r1 {
		return Grid{}, false
	}
	if c0 == 0 && r0 == 0 && c1 == g.Width && r1 == g.Height {
		return *g, true
	}
	sub := Grid{Width: c1 - c0, Height: r1 - r0, NoData: g.NoData, HasNoData: g.HasNoData,
		Bounds: Bounds{
			West: g.Bounds.West + float64(c0)*dLon, East: g.Bounds.West + float64(c1)*dLon,
			North: g.Bounds.North - float64(r0)*dLat, South: g.Bounds.North - float64(r1)*dLat,
		}}
	sub.Values = make([]float32, sub.Width*sub.Height)
	for r := r0; r < r1; r++ {
		copy(sub.Values[(r-r0)*sub.Width:], g.Values[r*g.Width+c0:r*g.Width+c1])
	}
	return sub, true
}

// drawOverlay colours each pixel by the band of the overlay cell under its
// centre, blended with the base; a pixel on the edge of a band (next to a
// lower band or no colour) is drawn nearly opaque, so the bands keep a
// crisp outline.
func (l *mapLayout) drawOverlay(cv *canvas, m *Map) {
	g := m.Overlay
	dLon, dLat := g.cellDeg()
	col := make([]int, l.mapW)
	for x := range col {
		lon, _ := l.lonLat(x, 0)
		col[x] = int(math.Floor((lon - g.Bounds.West) / dLon))
		if lon < g.Bounds.West || col[x] >= g.Width {
			col[x] = -1
		}
	}
	n := len(m.Scale.Levels)
	band := make([]int8, l.mapW*l.mapH)
	for y := 0; y < l.mapH; y++ {
		_, lat := l.lonLat(0, y)
		r := int(math.Floor((g.Bounds.North - lat) / dLat))
		inRow := lat <= g.Bounds.North && r < g.Height
		for x := 0; x < l.mapW; x++ {
			b := int8(-1)
			if inRow && col[x] >= 0 {
				if v := g.Values[r*g.Width+col[x]]; g.valid(v) {
					b = int8(m.Scale.band(float64(v)))
				}
			}
			band[y*l.mapW+x] = b
		}
	}
	op := m.OverlayOpacity
	if op == 0 {
		op = DefaultOverlayOpacity
	}
	edgeOp := math.Min(1, op+0.3)
	colours := make([]color.NRGBA, n)
	for i := range colours {
		colours[i] = BandColour(i, n)
	}
	pix := cv.img.Pix
	for y := 0; y < l.mapH; y++ {
		for x := 0; x < l.mapW; x++ {
			b := band[y*l.mapW+x]
			if b < 0 {
				continue
			}
			a := op
			if (x > 0 && band[y*l.mapW+x-1] < b) || (x+1 < l.mapW && band[y*l.mapW+x+1] < b) ||
				(y > 0 && band[(y-1)*l.mapW+x] < b) || (y+1 < l.mapH && band[(y+1)*l.mapW+x] < b) {
				a = edgeOp
			}
			c := colours[b]
			o := y*cv.img.Stride + 4*x
			p := pix[o : o+4 : o+4]
			p[0] = uint8(math.Round(float64(p[0])*(1-a) + float64(c.R)*a))
			p[1] = uint8(math.Round(float64(p[1])*(1-a) + float64(c.G)*a))
			p[2] = uint8(math.Round(float64(p[2])*(1-a) + float64(c.B)*a))
		}
	}
}

// Feature strokes and sizes, pixels.
const (
	casingPx       = 7.0 // white casing under lines
	linePx         = 3.6
	belowPx        = 2.6
	stretchPx      = 18.0
	circleEdgePx   = 1.6
	minCircleRPx   = 3.0
	labelGapPx     = 5.0
	dashOnPx       = 7.0
	dashOffPx      = 4.0
	stretchBarPx   = 24.0
	siteSizePx     = 11.0 // half the triangle's height
	stationRadius  = 6.0
	targetHalfPx   = 6.5
	candidateR     = 11.0
	spotHalfPx     = 6.5
	haloPx         = 2.5 // white edge around symbols
	northDiscR     = 26.0
	northArrowHigh = 16.0
)

// lineEdge is the thin grey edge outside a line's white casing, so the
// light bands (yellow) stand out on light ground too.
var lineEdge = color.NRGBA{0x1c, 0x1c, 0x1c, 0x70}

// labelReq is a label to be placed near a point: right of it first, then
// left, above, below, at the corners.
type labelReq struct {
	at     [2]float64 // the point, map pixels
	gap    float64    // half the symbol's size plus a gap
	text   string
	bold   bool
	centre bool // try centred on the point first (labels of lines)
}

// box is a rectangle on the map, pixels.
type box struct{ x0, y0, x1, y1 float64 }

func (a box) overlaps(b box) bool {
	return a.x0 < b.x1 && b.x0 < a.x1 && a.y0 < b.y1 && b.y0 < a.y1
}

// lineColour is the colour of a line with value v, and whether it is
// below the lowest level (drawn dashed grey).
func lineColour(s *Scale, v float64) (color.NRGBA, bool) {
	b := s.band(v)
	if b < 0 {
		return rgb(mapGreyInk), true
	}
	return BandColour(b, len(s.Levels)), false
}

func (l *mapLayout) drawCircles(cv *canvas, m *Map, labels *[]labelReq) {
	for _, c := range m.Circles {
		const n = 96
		ring := make([][2]float64, n+1)
		for k := 0; k < n; k++ {
			lat, lon, _ := terrain.Direct(c.Centre[1], c.Centre[0], float64(k)*360/n, c.RadiusM)
			ring[k] = l.xy(orb.Point{lon, lat})
		}
		ring[n] = ring[0]
		ctr := l.xy(c.Centre)
		rPx := c.RadiusM / l.metresPerPx
		if rPx < minCircleRPx {
			ring = polygonAround(ctr, minCircleRPx, 24)
			ring = append(ring, ring[0])
			cv.paint(rgb(mapInk), stroke(ring, circleEdgePx))
		} else {
			cv.paint(color.NRGBA{0x1c, 0x1c, 0x1c, 0x24}, shape{ring[:n]})
			cv.paint(rgb(mapHalo), stroke(ring, circleEdgePx+2))
			cv.paint(rgb(mapInk), strokes(dashes(ring, 5, 3.5), circleEdgePx))
		}
		if c.Label != "" {
			*labels = append(*labels, labelReq{at: ctr, gap: math.Max(rPx, minCircleRPx) + labelGapPx, text: c.Label})
		}
	}
}

func (l *mapLayout) drawStretches(cv *canvas, m *Map, labels *[]labelReq) {
	band := color.NRGBA{0x1c, 0x1c, 0x1c, 0x50}
	for _, s := range m.Stretches {
		pts := make([][2]float64, len(s.Line))
		for i, p := range s.Line {
			pts[i] = l.xy(p)
		}
		cv.paint(band, stroke(pts, stretchPx))
		// A bar across each end.
		for _, e := range [][2][2]float64{{pts[0], pts[1]}, {pts[len(pts)-1], pts[len(pts)-2]}} {
			dx, dy := e[1][0]-e[0][0], e[1][1]-e[0][1]
			d := math.Hypot(dx, dy)
			if d == 0 {
				continue
			}
			nx, ny := -dy/d*stretchBarPx/2, dx/d*stretchBarPx/2
			cv.paint(rgb(mapInk), stroke([][2]float64{{e[0][0] - nx, e[0][1] - ny}, {e[0][0] + nx, e[0][1] + ny}}, 2.5))
		}
		if s.Label != "" {
			mid := pointAlong(pts, 0.5)
			*labels = append(*labels, labelReq{at: mid, gap: stretchPx/2 + labelGapPx, text: s.Label})
		}
	}
}

// pointAlong is the point at fraction f of the length of a polyline.
func pointAlong(pts [][2]float64, f float64) [2]float64 {
	total := 0.0
	for i := 1; i < len(pts); i++ {
		total += math.Hypot(pts[i][0]-pts[i-1][0], pts[i][1]-pts[i-1][1])
	}
	want := f * total
	for i := 1; i < len(pts); i++ {
		d := math.Hypot(pts[i][0]-pts[i-1][0], pts[i][1]-pts[i-1][1])
		if want <= d && d > 0 {
			t := want / d
			return [2]float64{pts[i-1][0] + t*(pts[i][0]-pts[i-1][0]), pts[i-1][1] + t*(pts[i][1]-pts[i-1][1])}
		}
		want -= d
	}
	return pts[len(pts)-1]
}

func (l *mapLayout) drawTracks(cv *canvas, m *Map, labels *[]labelReq) {
	for _, t := range m.Tracks {
		pts := make([][2]float64, len(t.Points))
		for i, p := range t.Points {
			pts[i] = l.xy(p)
		}
		cv.paint(lineEdge, stroke(pts, casingPx+1.6))
		cv.paint(rgb(mapHalo), stroke(pts, casingPx))
		// Runs of segments in the same band, each drawn as one polyline so
		// joins and dashes run on.
		start := 0
		bandOf := func(i int) int { return m.Scale.band(math.Min(t.Values[i], t.Values[i+1])) }
		for i := 1; i <= len(pts)-1; i++ {
			if i < len(pts)-1 && bandOf(i) == bandOf(start) {
				continue
			}
			run := pts[start : i+1]
			col, below := lineColour(&m.Scale, math.Min(t.Values[start], t.Values[start+1]))
			if below {
				cv.paint(col, strokes(dashes(run, dashOnPx, dashOffPx), belowPx))
			} else {
				cv.paint(col, stroke(run, linePx))
			}
			start = i
		}
		if t.Label != "" {
			*labels = append(*labels, labelReq{at: pts[0], gap: casingPx/2 + labelGapPx, text: t.Label})
		}
	}
}

func (l *mapLayout) drawLinks(cv *canvas, m *Map, labels *[]labelReq) {
	for _, k := range m.Links {
		pts := [][2]float64{l.xy(k.From), l.xy(k.To)}
		cv.paint(lineEdge, stroke(pts, casingPx+0.6))
		cv.paint(rgb(mapHalo), stroke(pts, casingPx-1))
		col, below := lineColour(&m.Scale, k.Value)
		if below {
			cv.paint(col, strokes(dashes(pts, dashOnPx, dashOffPx), belowPx))
		} else {
			cv.paint(col, stroke(pts, linePx))
		}
		if k.Label != "" {
			mid := [2]float64{(pts[0][0] + pts[1][0]) / 2, (pts[0][1] + pts[1][1]) / 2}
			*labels = append(*labels, labelReq{at: mid, gap: linePx + 2, text: k.Label, centre: true})
		}
	}
}

// polygonAround is a regular polygon of n corners and radius r around c,
// wound clockwise on the screen (the first corner straight up).
func polygonAround(c [2]float64, r float64, n int) [][2]float64 {
	pts := make([][2]float64, n)
	for k := range pts {
		a := float64(k) * 2 * math.Pi / float64(n)
		pts[k] = [2]float64{c[0] + r*math.Sin(a), c[1] - r*math.Cos(a)}
	}
	return pts
}

func (l *mapLayout) drawMarkers(cv *canvas, m *Map, fs *mapFonts, labels *[]labelReq, obstacles *[]box) {
	ink, halo := rgb(mapInk), rgb(mapHalo)
	for _, mk := range m.Markers {
		p := l.xy(mk.At)
		x, y := p[0], p[1]
		var half float64
		switch mk.Kind {
		case MarkerSite:
			// An upright triangle whose centre of area is the site.
			h := siteSizePx
			tri := func(s float64) [][2]float64 {
				return [][2]float64{{x, y - s*4/3}, {x + s*1.0, y + s*2/3}, {x - s*1.0, y + s*2/3}}
			}
			cv.paint(halo, shape{tri(h + haloPx*1.8)})
			cv.paint(ink, shape{tri(h)})
			half = h * 1.2
		case MarkerStation:
			cv.paint(halo, shape{polygonAround(p, stationRadius+haloPx, 32)})
			cv.paint(ink, shape{polygonAround(p, stationRadius, 32)})
			half = stationRadius
		case MarkerTarget:
			sq := func(s float64) [][2]float64 {
				return [][2]float64{{x - s, y - s}, {x + s, y - s}, {x + s, y + s}, {x - s, y + s}}
			}
			cv.paint(halo, shape{sq(targetHalfPx + haloPx)})
			cv.paint(ink, shape{sq(targetHalfPx)})
			cv.paint(halo, shape{sq(targetHalfPx - 2.5)})
			half = targetHalfPx
		case MarkerSpot:
			cv.paint(halo, shape{polygonAround(p, spotHalfPx+haloPx*1.4, 4)})
			cv.paint(ink, shape{polygonAround(p, spotHalfPx, 4)})
			half = spotHalfPx
		case MarkerCandidate:
			fill := halo
			if mk.HasValue {
				if b := m.Scale.band(mk.Value); b >= 0 {
					fill = BandColour(b, len(m.Scale.Levels))
				}
			}
			cv.paint(halo, shape{polygonAround(p, candidateR+haloPx, 48)})
			cv.paint(ink, shape{polygonAround(p, candidateR, 48)})
			cv.paint(fill, shape{polygonAround(p, candidateR-2, 48)})
			if mk.Rank > 0 {
				txt := ink
				if lightness(fill) < 55 {
					txt = halo
				}
				cv.text(fs.smallBold, txt, x, y+4, anchorMiddle, strconv.Itoa(mk.Rank))
			}
			half = candidateR
		}
		*obstacles = append(*obstacles, box{x - half, y - half, x + half, y + half})
		if mk.Label != "" {
			*labels = append(*labels, labelReq{at: p, gap: half + labelGapPx, text: mk.Label, bold: mk.Kind == MarkerSite})
		}
	}
}

// drawNorthArrow draws the north arrow in the top right corner of the map
// frame and returns the box it covers. The map is north-up, so the arrow
// points straight up.
func (l *mapLayout) drawNorthArrow(cv *canvas, fs *mapFonts) box {
	cx, cy := float64(l.mapW)-northDiscR-12, northDiscR+12
	back := rgb(mapHalo)
	back.A = 0xd9
	cv.paint(back, shape{polygonAround([2]float64{cx, cy}, northDiscR, 64)})
	tipY, tailY, notchY := cy-northArrowHigh+6, cy+northArrowHigh, cy+northArrowHigh-6
	const halfW = 7.0
	left := [][2]float64{{cx, tipY}, {cx, notchY}, {cx - halfW, tailY}}
	right := [][2]float64{{cx, tipY}, {cx + halfW, tailY}, {cx, notchY}}
	ink := rgb(mapInk)
	cv.paint(ink, shape{left})
	cv.paint(ink, stroke(append(right, right[0]), 1.2))
	cv.text(fs.labelBold, ink, cx, tipY-3, anchorMiddle, "N")
	return box{cx - northDiscR, cy - northDiscR, cx + northDiscR, cy + northDiscR}
}

// textBox is the box of s drawn with its baseline at y from x.
func textBox(face font.Face, x, y float64, s string) box {
	m := face.Metrics()
	w := float64(font.MeasureString(face, s)) / 64
	return box{x, y - float64(m.Ascent.Ceil()), x + w, y + float64(m.Descent.Ceil())}
}

// placeLabels writes the labels, each at the first of its candidate places
// that stays inside the map and hides neither a symbol nor a label placed
// before it (the first place when none does), in white-edged dark text.
func placeLabels(cv *canvas, fs *mapFonts, labels []labelReq, obstacles []box) {
	frame := box{2, 2, float64(cv.img.Bounds().Dx()) - 2, float64(cv.img.Bounds().Dy()) - 2}
	placed := append([]box(nil), obstacles...)
	for _, lb := range labels {
		face := fs.label
		if lb.bold {
			face = fs.labelBold
		}
		s := printable(lb.text)
		w := float64(font.MeasureString(face, s)) / 64
		m := face.Metrics()
		asc, desc := float64(m.Ascent.Ceil()), float64(m.Descent.Ceil())
		x, y, g := lb.at[0], lb.at[1], lb.gap
		mid := y + (asc-desc)/2 // baseline that centres the text on y
		cands := [][2]float64{
			{x + g, mid}, {x - g - w, mid}, {x - w/2, y - g - desc}, {x - w/2, y + g + asc},
			{x + g*0.7, y - g*0.7 - desc}, {x + g*0.7, y + g*0.7 + asc},
			{x - g*0.7 - w, y - g*0.7 - desc}, {x - g*0.7 - w, y + g*0.7 + asc},
		}
		if lb.centre {
			cands = append([][2]float64{{x - w/2, mid}}, cands...)
		}
		pick := -1
		for i, c := range cands {
			bx := textBox(face, c[0], c[1], s)
			if bx.x0 < frame.x0 || bx.y0 < frame.y0 || bx.x1 > frame.x1 || bx.y1 > frame.y1 {
				continue
			}
			free := true
			for _, o := range placed {
				if bx.overlaps(o) {
					free = false
					break
				}
			}
			if free {
				pick = i
				break
			}
			if pick < 0 {
				pick = -2 - i // the first place inside the frame, if none is free
			}
		}
		if pick < -1 {
			pick = -2 - pick
		} else if pick == -1 {
			pick = 0
		}
		c := cands[pick]
		bx := textBox(face, c[0], c[1], s)
		placed = append(placed, bx)
		if lb.centre && pick == 0 {
			// On the line itself: a white tab with a thin edge.
			tab := box{bx.x0 - 4, bx.y0 - 2, bx.x1 + 4, bx.y1 + 1}
			cv.paint(rgb(mapHalo), shape{{{tab.x0, tab.y0}, {tab.x1, tab.y0}, {tab.x1, tab.y1}, {tab.x0, tab.y1}}})
			cv.paint(rgb(mapFrame), stroke([][2]float64{{tab.x0, tab.y0}, {tab.x1, tab.y0}, {tab.x1, tab.y1}, {tab.x0, tab.y1}, {tab.x0, tab.y0 - 0.5}}, 1))
			cv.text(face, rgb(mapInk), c[0], c[1], anchorStart, s)
			continue
		}
		haloText(cv, face, c[0], c[1], s)
	}
}

// haloText draws s in dark ink edged in white, from x with its baseline at
// y, so it reads over any background.
func haloText(cv *canvas, face font.Face, x, y float64, s string) {
	halo := image.NewUniform(rgb(mapHalo))
	dot := fixed.P(int(math.Round(x)), int(math.Round(y)))
	for _, o := range [][2]int{{-2, 0}, {2, 0}, {0, -2}, {0, 2}, {-1, -1}, {1, -1}, {-1, 1}, {1, 1}, {-2, -1}, {2, -1}, {-2, 1}, {2, 1}, {-1, -2}, {1, -2}, {-1, 2}, {1, 2}} {
		d := font.Drawer{Dst: cv.img, Src: halo, Face: face, Dot: dot.Add(fixed.P(o[0], o[1]))}
		d.DrawString(s)
	}
	d := font.Drawer{Dst: cv.img, Src: image.NewUniform(rgb(mapInk)), Face: face, Dot: dot}
	d.DrawString(s)
}

// drawLegend draws the key under the map: the scale's bands as a stepped
// colour bar titled "Name (Unit)", with the thresholds at the band edges
// (or the bands' labels under them), then swatches for lines below the
// lowest level, stretches and circles when the map has them.
func (l *mapLayout) drawLegend(page *canvas, m *Map, fs *mapFonts) {
	ink := rgb(mapInk)
	x := float64(l.mapX)
	top := float64(l.footerY)
	sw0, sw1 := top+legendSwatchTop, top+legendSwatchTop+legendSwatchHeight
	if l.anyValued {
		n := len(m.Scale.Levels)
		page.text(fs.labelBold, ink, x, top+legendTitleBaseline, anchorStart, m.Scale.title())
		room := float64(l.barX-l.mapX) - 40 - 3*110
		sw := math.Max(28, math.Min(legendMaxSwatchPx, room/float64(n)))
		op := m.OverlayOpacity
		if op == 0 {
			op = DefaultOverlayOpacity
		}
		for i := 0; i < n; i++ {
			c := BandColour(i, n)
			if m.Overlay != nil {
				c = legendSwatch(c, op)
			}
			x0, x1 := x+float64(i)*sw, x+float64(i+1)*sw
			page.paint(c, shape{{{x0, sw0}, {x1, sw0}, {x1, sw1}, {x0, sw1}}})
			if len(m.Scale.Labels) == n {
				page.text(fs.small, ink, (x0+x1)/2, top+legendLabelBaseline, anchorMiddle, m.Scale.Labels[i])
			} else {
				page.paint(ink, stroke([][2]float64{{math.Floor(x0) + 0.5, sw1}, {math.Floor(x0) + 0.5, sw1 + 4}}, 1))
				lbl := levelText(m.Scale.Levels[i])
				if i == n-1 {
					lbl = "≥ " + lbl
				}
				page.text(fs.small, ink, x0, top+legendLabelBaseline, anchorMiddle, lbl)
			}
		}
		edge := [][2]float64{{x - 0.5, sw0 - 0.5}, {x + float64(n)*sw + 0.5, sw0 - 0.5}, {x + float64(n)*sw + 0.5, sw1 + 0.5}, {x - 0.5, sw1 + 0.5}, {x - 0.5, sw0 - 1}}
		page.paint(rgb(mapFrame), stroke(edge, 1))
		x += float64(n)*sw + 36
	}
	mid := (sw0 + sw1) / 2
	entry := func(swatch func(x0, x1 float64), text string) {
		swatch(x, x+28)
		page.text(fs.small, ink, x+34, mid+4, anchorStart, text)
		x += 34 + float64(font.MeasureString(fs.small, text))/64 + 22
	}
	if l.anyBelow {
		entry(func(x0, x1 float64) {
			page.paint(rgb(mapGreyInk), strokes(dashes([][2]float64{{x0, mid}, {x1, mid}}, dashOnPx, dashOffPx), belowPx))
		}, "below "+levelText(m.Scale.Levels[0]))
	}
	if l.anyStretch {
		entry(func(x0, x1 float64) {
			page.paint(color.NRGBA{0x1c, 0x1c, 0x1c, 0x50}, stroke([][2]float64{{x0, mid}, {x1, mid}}, 12))
		}, "no contact")
	}
	if l.anyCircle {
		entry(func(x0, x1 float64) {
			c := [2]float64{(x0 + x1) / 2, mid}
			ring := polygonAround(c, 8, 48)
			page.paint(color.NRGBA{0x1c, 0x1c, 0x1c, 0x24}, shape{ring})
			page.paint(ink, strokes(dashes(append(ring, ring[0]), 4, 2.5), circleEdgePx))
		}, "keep-out")
	}
}

// legendSwatch is band colour c as the overlay shows it over flat ground:
// blended, opacity op, with the relief's flat grey.
func legendSwatch(c color.NRGBA, op float64) color.NRGBA {
	g := 255 * reliefFlat
	mix := func(v uint8) uint8 { return uint8(math.Round(g*(1-op) + float64(v)*op)) }
	return color.NRGBA{mix(c.R), mix(c.G), mix(c.B), 0xff}
}

// drawScaleBar draws the scale bar under the right end of the map: two
// halves, dark and light, with the lengths at 0, the middle and the end.
func (l *mapLayout) drawScaleBar(page *canvas, fs *mapFonts) {
	ink := rgb(mapInk)
	y0 := float64(l.footerY + scaleBarTop)
	y1 := y0 + scaleBarHeight
	x0 := float64(l.barX)
	x1 := x0 + float64(l.barPx)
	xm := math.Round((x0 + x1) / 2)
	page.paint(ink, shape{{{x0, y0}, {x1, y0}, {x1, y1}, {x0, y1}}})
	page.paint(rgb(mapPaper), shape{{{xm, y0 + 1}, {x1 - 1, y0 + 1}, {x1 - 1, y1 - 1}, {xm, y1 - 1}}})
	for _, xt := range []float64{x0, xm, x1} {
		page.paint(ink, shape{{{xt - 0.5, y0 - 4}, {xt + 0.5, y0 - 4}, {xt + 0.5, y1}, {xt - 0.5, y1}}})
	}
	by := y1 + 16
	page.text(fs.small, ink, x0, by, anchorMiddle, "0")
	page.text(fs.small, ink, xm, by, anchorMiddle, l.barLabel(l.barMetres/2))
	page.text(fs.small, ink, x1, by, anchorMiddle, l.barLabel(l.barMetres)+" "+l.barUnit)
}
