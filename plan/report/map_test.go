package report

import (
	"bytes"
	"flag"
	"image"
	"image/color"
	"image/png"
	"math"
	"os"
	"path/filepath"
	"testing"

	"github.com/mastlink/mastlink/terrain"
	"github.com/paulmach/orb"
)

// -mapdir writes the maps the tests draw into a folder, to look at them.
var mapDir = flag.String("mapdir", "", "write the test maps as PNG files into this folder")

// hills is an invented terrain for the tests: w × h cells over b, a few
// round hills and a ridge on a gentle slope, heights in metres.
func hills(b Bounds, w, h int) Grid {
	g := Grid{Width: w, Height: h, Bounds: b, Values: make([]float32, w*h)}
	latM, lonM := MetresPerDegree((b.North + b.South) / 2)
	type hill struct{ lon, lat, hM, rM float64 }
	hs := []hill{
		{b.West + 0.30*(b.East-b.West), b.South + 0.62*(b.North-b.South), 620, 1300},
		{b.West + 0.72*(b.East-b.West), b.South + 0.30*(b.North-b.South), 530, 1500},
		{b.West + 0.58*(b.East-b.West), b.South + 0.80*(b.North-b.South), 400, 900},
		{b.West + 0.15*(b.East-b.West), b.South + 0.20*(b.North-b.South), 360, 1100},
		{b.West + 0.85*(b.East-b.West), b.South + 0.75*(b.North-b.South), 450, 1200},
	}
	for r := 0; r < h; r++ {
		lat := b.North - (float64(r)+0.5)*(b.North-b.South)/float64(h)
		for c := 0; c < w; c++ {
			lon := b.West + (float64(c)+0.5)*(b.East-b.West)/float64(w)
			z := 300 + 0.004*(lon-b.West)*lonM
			for _, hl := range hs {
				dx, dy := (lon-hl.lon)*lonM, (lat-hl.lat)*latM
				z += hl.hM * math.Exp(-(dx*dx+dy*dy)/(2*hl.rM*hl.rM))
			}
			// A ridge running south-west to north-east, with a ripple.
			u := ((lon-b.West)*lonM - (lat-b.South)*latM*0.8) / 1000
			z += 260*math.Exp(-u*u/1.2) + 40*math.Sin((lat-b.South)*latM/500)*math.Cos((lon-b.West)*lonM/700)
			g.Values[r*w+c] = float32(z)
		}
	}
	return g
}

// margins is a made-up field of values around a site for the tests: it
// falls with distance and drops by 25 behind terrain seen from 10 m above
// the site (a crude line-of-sight walk, enough to give the bands shapes
// with holes and islands). Cells beyond radiusM have no data.
func margins(dem Grid, site orb.Point, radiusM float64) Grid {
	g := Grid{Width: dem.Width, Height: dem.Height, Bounds: dem.Bounds, Values: make([]float32, len(dem.Values)), NoData: -9999, HasNoData: true}
	latM, lonM := MetresPerDegree(site[1])
	dLon, dLat := dem.cellDeg()
	at := func(lon, lat float64) float64 {
		c := min(max(int((lon-dem.Bounds.West)/dLon), 0), dem.Width-1)
		r := min(max(int((dem.Bounds.North-lat)/dLat), 0), dem.Height-1)
		return float64(dem.Values[r*dem.Width+c])
	}
	h0 := at(site[0], site[1]) + 10
	for r := 0; r < g.Height; r++ {
		lat := dem.Bounds.North - (float64(r)+0.5)*dLat
		for c := 0; c < g.Width; c++ {
			lon := dem.Bounds.West + (float64(c)+0.5)*dLon
			dx, dy := (lon-site[0])*lonM, (lat-site[1])*latM
			d := math.Hypot(dx, dy)
			if d > radiusM {
				g.Values[r*g.Width+c] = -9999
				continue
			}
			v := 52 - 20*math.Log10(math.Max(d, 100)/100)
			h1 := at(lon, lat) + 2
			for k := 1; k < 40; k++ {
				f := float64(k) / 40
				if at(site[0]+f*(lon-site[0]), site[1]+f*(lat-site[1])) > h0+f*(h1-h0) {
					v -= 25
					break
				}
			}
			g.Values[r*g.Width+c] = float32(v)
		}
	}
	return g
}

// demoMap is a coverage map of an invented valley with everything a map
// can show.
func demoMap() Map {
	b := Bounds{West: 9.30, South: 46.40, East: 9.50, North: 46.55}
	dem := hills(b, 300, 225)
	site := orb.Point{9.385, 46.465}
	ov := margins(dem, site, 7000)
	track := []orb.Point{}
	vals := []float64{}
	for k := 0; k <= 60; k++ {
		f := float64(k) / 60
		p := orb.Point{9.33 + 0.14*f, 46.43 + 0.08*f + 0.015*math.Sin(f*7)}
		track = append(track, p)
		vals = append(vals, 34-60*math.Abs(f-0.35)+4*math.Sin(f*19))
	}
	// The stretch where the values are below 0.
	dead0, dead1 := -1, -1
	for k, v := range vals {
		if v < 0 && dead0 < 0 && k > 30 {
			dead0 = k
		}
		if v < 0 && dead0 >= 0 {
			dead1 = k
		}
	}
	return Map{
		Title:    "Coverage from Harrow Knoll",
		Subtitle: "146.940 MHz · antenna 10 m · margin over −117 dBm",
		Terrain:  &dem,
		Overlay:  &ov,
		Scale:    Scale{Levels: []float64{0, 10, 20, 30}, Name: "margin", Unit: "dB"},
		Circles:  []Circle{{Centre: site, RadiusM: 400, Label: "keep-out 400 m"}},
		Tracks:   []Track{{Points: track, Values: vals, Label: "Ferngill trail"}},
		Stretches: []Stretch{
			{Line: track[dead0 : dead1+1], Label: "no contact"},
		},
		Links: []Link{
			{From: site, To: orb.Point{9.46, 46.52}, Value: 14.2, Label: "+14.2 dB"},
			{From: site, To: orb.Point{9.32, 46.51}, Value: -3.5, Label: "−3.5 dB"},
		},
		Markers: []Marker{
			{At: site, Label: "Harrow Knoll", Kind: MarkerSite},
			{At: orb.Point{9.46, 46.52}, Label: "Tarn relay", Kind: MarkerTarget},
			{At: orb.Point{9.32, 46.51}, Label: "Oxbow hut", Kind: MarkerStation},
			{At: track[20], Label: "call here", Kind: MarkerSpot},
			{At: orb.Point{9.44, 46.44}, Label: "Scree col", Kind: MarkerCandidate, Rank: 1, Value: 24, HasValue: true},
			{At: orb.Point{9.34, 46.45}, Label: "Birch top", Kind: MarkerCandidate, Rank: 2, Value: 8, HasValue: true},
		},
		Credit: "Invented terrain",
	}
}

// renderMap draws m and decodes the PNG again, writing it to -mapdir when
// that is set.
func renderMap(t testing.TB, name string, m Map) (image.Image, []byte) {
	t.Helper()
	var buf bytes.Buffer
	if err := MapPNG(&buf, m); err != nil {
		t.Fatal(err)
	}
	if *mapDir != "" {
		if err := os.WriteFile(filepath.Join(*mapDir, name+".png"), buf.Bytes(), 0o644); err != nil {
			t.Fatal(err)
		}
	}
	img, err := png.Decode(bytes.NewReader(buf.Bytes()))
	if err != nil {
		t.Fatalf("the map does not decode as PNG: %v", err)
	}
	return img, buf.Bytes()
}

// blend is c over base at opacity op, as the overlay is drawn.
func blend(base, c color.NRGBA, op float64) color.NRGBA {
	mix := func(b, v uint8) uint8 { return uint8(math.Round(float64(b)*(1-op) + float64(v)*op)) }
	return color.NRGBA{mix(base.R, c.R), mix(base.G, c.G), mix(base.B, c.B), 0xff}
}

// same: within tol in every channel.
func same(a color.Color, b color.NRGBA, tol int) bool {
	r, g, bl, _ := a.RGBA()
	d := func(x uint32, y uint8) bool { return math.Abs(float64(x>>8)-float64(y)) <= float64(tol) }
	return d(r, b.R) && d(g, b.G) && d(bl, b.B)
}

// find counts the pixels of img within r that are within tol of c.
func find(img image.Image, r image.Rectangle, c color.NRGBA, tol int) int {
	n := 0
	for y := r.Min.Y; y < r.Max.Y; y++ {
		for x := r.Min.X; x < r.Max.X; x++ {
			if same(img.At(x, y), c, tol) {
				n++
			}
		}
	}
	return n
}

// quadrants is an overlay of 4 bands, one per quadrant of 20 × 20 cells,
// on no terrain, with the site in the middle.
func quadrants() Map {
	g := Grid{Width: 20, Height: 20, Bounds: Bounds{West: 6.0, South: 49.5, East: 6.2, North: 49.63}, Values: make([]float32, 400)}
	for r := 0; r < 20; r++ {
		for c := 0; c < 20; c++ {
			g.Values[r*20+c] = float32(10 * (2*(r/10) + c/10)) // 0, 10 / 20, 30
		}
	}
	return Map{
		Title:   "Quadrants",
		Overlay: &g,
		Scale:   Scale{Levels: []float64{0, 10, 20, 30}, Name: "margin", Unit: "dB"},
		Markers: []Marker{{At: orb.Point{6.1, 49.565}, Label: "Site", Kind: MarkerSite}},
	}
}

func TestMapPNGOverlayAndLegend(t *testing.T) {
	m := quadrants()
	img, _ := renderMap(t, "quadrants", m)
	l, err := layoutMap(&m)
	if err != nil {
		t.Fatal(err)
	}
	base := rgb(mapNoTerrain)
	// The middle of each quadrant shows its band blended over the base;
	// the bands' lightness rises with the value, so the map reads in
	// greyscale (luma, ITU-R BT.601 weights).
	prevLuma := -1.0
	for i, q := range [][2]float64{{0.25, 0.25}, {0.75, 0.25}, {0.25, 0.75}, {0.75, 0.75}} {
		x, y := l.mapX+int(q[0]*float64(l.mapW)), l.mapY+int(q[1]*float64(l.mapH))
		want := blend(base, BandColour(i, 4), DefaultOverlayOpacity)
		if !same(img.At(x, y), want, 1) {
			t.Errorf("quadrant %d at (%d, %d): %v, want band %d blended %v", i, x, y, img.At(x, y), i, want)
		}
		if lu := luma(img.At(x, y)); lu <= prevLuma+10 {
			t.Errorf("quadrant %d luma %.0f is not well above the band below (%.0f)", i, lu, prevLuma)
		} else {
			prevLuma = lu
		}
		// The legend under the map shows the same colour.
		footer := image.Rect(0, l.footerY, l.widthPx, l.heightPx)
		if n := find(img, footer, legendSwatch(BandColour(i, 4), DefaultOverlayOpacity), 1); n < 100 {
			t.Errorf("legend: %d pixels of band %d's colour, want a swatch of at least 100", n, i)
		}
	}
	// The site's own pixel is marked in dark ink.
	p := l.xy(orb.Point{6.1, 49.565})
	if c := img.At(l.mapX+int(p[0]), l.mapY+int(p[1])); !same(c, rgb(mapInk), 12) {
		t.Errorf("site pixel is %v, not the marker's ink", c)
	}
}

func TestMapPNGNotBlank(t *testing.T) {
	img, _ := renderMap(t, "demo", demoMap())
	b := img.Bounds()
	colours := map[color.RGBA]bool{}
	for y := b.Min.Y; y < b.Max.Y; y += 3 {
		for x := b.Min.X; x < b.Max.X; x += 3 {
			r, g, bl, _ := img.At(x, y).RGBA()
			colours[color.RGBA{uint8(r >> 8), uint8(g >> 8), uint8(bl >> 8), 0xff}] = true
		}
	}
	if len(colours) < 500 {
		t.Errorf("only %d colours on the demo map: relief, overlay and features are missing", len(colours))
	}
}

func TestMapPNGReliefLitFromNorthWest(t *testing.T) {
	g := cone(201, 400)
	m := Map{Terrain: &g, Bounds: g.Bounds, Title: "Cone"}
	img, _ := renderMap(t, "cone", m)
	l, err := layoutMap(&m)
	if err != nil {
		t.Fatal(err)
	}
	// Points 1.5 km from the peak on each side (the cone's flank).
	latM, lonM := MetresPerDegree(45.05)
	at := func(eastM, northM float64) float64 {
		p := l.xy(orb.Point{7.05 + eastM/lonM, 45.05 + northM/latM})
		return luma(img.At(l.mapX+int(p[0]), l.mapY+int(p[1])))
	}
	d := 1500 / math.Sqrt2
	nw, se, ne, sw, flat := at(-d, d), at(d, -d), at(d, d), at(-d, -d), at(3500, 3500)
	if !(nw > ne+5 && nw > sw+5 && ne > se+5 && sw > se+5) {
		t.Errorf("luma NW %.0f, NE %.0f, SW %.0f, SE %.0f: want the NW flank brightest and SE darkest (light from 315°)", nw, ne, sw, se)
	}
	if !(nw > flat && flat > se) {
		t.Errorf("flat ground %.0f is not between the lit (%.0f) and shaded (%.0f) flanks", flat, nw, se)
	}
}

func TestMapPNGScaleBar(t *testing.T) {
	cases := []struct {
		name     string
		imperial bool
		width    int
		unit     string
	}{
		{"metric", false, 1200, "km"},
		{"imperial", true, 1200, "mi"},
		{"metric narrow", false, 600, "km"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			m := quadrants()
			m.Imperial, m.WidthPx = c.imperial, c.width
			img, _ := renderMap(t, "scalebar-"+c.name, m)
			l, err := layoutMap(&m)
			if err != nil {
				t.Fatal(err)
			}
			if l.barUnit != c.unit {
				t.Errorf("bar in %s, want %s", l.barUnit, c.unit)
			}
			// Metres per pixel from outside the renderer: the geodesic
			// across the map at its middle latitude (GeographicLib's
			// method, terrain.Inverse) over the frame's width in pixels.
			lat0 := (m.Overlay.Bounds.South + m.Overlay.Bounds.North) / 2
			across, _, _ := terrain.Inverse(lat0, l.b.West, lat0, l.b.East)
			mpp := across / float64(l.mapW)
			if want := l.barMetres / mpp; math.Abs(float64(l.barPx)-want) > 1 {
				t.Errorf("bar of %g m drawn %d px long; at %.3f m/px it should be %.1f px", l.barMetres, l.barPx, mpp, want)
			}
			// On the page: the bar's ink spans barPx pixels, its left half
			// solid.
			y := l.footerY + scaleBarTop + scaleBarHeight/2
			first, last := -1, -1
			for x := 0; x < l.widthPx; x++ {
				if luma(img.At(x, y)) < 90 {
					if first < 0 {
						first = x
					}
					last = x
				}
			}
			if math.Abs(float64(last-first)-float64(l.barPx)) > 1.5 {
				t.Errorf("bar ink from x = %d to %d (%d px), want %d px", first, last, last-first, l.barPx)
			}
			for x := first + 2; x < first+l.barPx/2-2; x++ {
				if luma(img.At(x, y)) > 90 {
					t.Errorf("bar's first half is not solid at x = %d", x)
					break
				}
			}
			// Its length is a round number: 1, 2 or 5 times a power of ten
			// of the unit.
			v := l.barMetres / l.barUnitM
			e := v / math.Pow(10, math.Floor(math.Log10(v)))
			if math.Abs(e-1) > 1e-9 && math.Abs(e-2) > 1e-9 && math.Abs(e-5) > 1e-9 {
				t.Errorf("bar length %g %s is not round", v, l.barUnit)
			}
		})
	}
}

func TestMapPNGNorthArrow(t *testing.T) {
	m := quadrants()
	img, _ := renderMap(t, "quadrants", m)
	l, _ := layoutMap(&m)
	cx := l.mapX + l.mapW - northDiscR - 12
	cy := l.mapY + northDiscR + 12
	dark := func(x, y int) bool { return luma(img.At(x, y)) < 90 }
	// The arrow points up: its left half solid ink, its right half light
	// inside an inked edge, the letter N above its tip.
	if !dark(cx-2, cy+4) || dark(cx+2, cy+4) {
		t.Errorf("arrow halves at (%d, %d): left dark %v, right dark %v; want left solid, right light", cx, cy+4, dark(cx-2, cy+4), dark(cx+2, cy+4))
	}
	tip := cy - int(northArrowHigh) + 6
	if !dark(cx, tip+3) || dark(cx, cy+int(northArrowHigh)+3) {
		t.Errorf("arrow shaft not from its tip (y = %d) down to its tail", tip)
	}
	letter := 0
	for y := tip - 16; y < tip-2; y++ {
		for x := cx - 6; x <= cx+6; x++ {
			if dark(x, y) {
				letter++
			}
		}
	}
	if letter < 15 {
		t.Errorf("%d ink pixels above the arrow, want the letter N", letter)
	}
}

func TestMapPNGSameBytes(t *testing.T) {
	_, a := renderMap(t, "demo", demoMap())
	_, b := renderMap(t, "demo", demoMap())
	if !bytes.Equal(a, b) {
		t.Error("two maps of the same input differ")
	}
}

func TestMapPNGBadInput(t *testing.T) {
	cases := []struct {
		name   string
		change func(*Map)
	}{
		{"too narrow", func(m *Map) { m.WidthPx = 100 }},
		{"track values short", func(m *Map) { m.Tracks[0].Values = m.Tracks[0].Values[1:] }},
		{"circle of no radius", func(m *Map) { m.Circles[0].RadiusM = 0 }},
		{"no levels", func(m *Map) { m.Scale.Levels = nil }},
		{"opacity", func(m *Map) { m.OverlayOpacity = -0.1 }},
		{"marker off the earth", func(m *Map) { m.Markers[0].At = orb.Point{200, 0} }},
		{"bounds a sliver", func(m *Map) { m.Bounds = Bounds{West: 9, East: 10, South: 46, North: 46.0001} }},
		{"one-point link", func(m *Map) { m.Stretches[0].Line = m.Stretches[0].Line[:1] }},
	}
	for _, c := range cases {
		m := demoMap()
		c.change(&m)
		var buf bytes.Buffer
		err := MapPNG(&buf, m)
		if err == nil || buf.Len() != 0 {
			t.Errorf("%s: error %v, %d bytes written", c.name, err, buf.Len())
		}
	}
	var buf bytes.Buffer
	if err := MapPNG(&buf, Map{}); err == nil {
		t.Error("empty map: no error")
	}
}

// TestMapPNGFitsFeatures draws a map of candidate sites and a route with
// no bounds given: every marker and track point lands inside the frame,
// clear of its edge.
func TestMapPNGFitsFeatures(t *testing.T) {
	d := demoMap()
	m := Map{
		Title:     "Candidate sites",
		Terrain:   d.Terrain,
		Scale:     d.Scale,
		Tracks:    d.Tracks,
		Stretches: d.Stretches,
		Markers: []Marker{
			{At: orb.Point{9.44, 46.44}, Label: "Scree col", Kind: MarkerCandidate, Rank: 1, Value: 24, HasValue: true},
			{At: orb.Point{9.34, 46.45}, Label: "Birch top", Kind: MarkerCandidate, Rank: 2, Value: 8, HasValue: true},
			{At: orb.Point{9.41, 46.47}, Label: "Ling moor", Kind: MarkerCandidate, Rank: 3, Value: -4, HasValue: true},
			{At: d.Tracks[0].Points[20], Label: "call here", Kind: MarkerSpot},
		},
	}
	renderMap(t, "sites", m)
	l, err := layoutMap(&m)
	if err != nil {
		t.Fatal(err)
	}
	pts := []orb.Point{}
	for _, mk := range m.Markers {
		pts = append(pts, mk.At)
	}
	pts = append(pts, m.Tracks[0].Points...)
	for _, p := range pts {
		xy := l.xy(p)
		if xy[0] < 20 || xy[1] < 20 || xy[0] > float64(l.mapW-20) || xy[1] > float64(l.mapH-20) {
			t.Errorf("%v is drawn at %v, outside or at the edge of the %d × %d frame", p, xy, l.mapW, l.mapH)
		}
	}
}
