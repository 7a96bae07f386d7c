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

var _ = terrain.Direct
var _ color.Color

func TestMapPNGDemo(t *testing.T) {
	renderMap(t, "demo", demoMap())
}
