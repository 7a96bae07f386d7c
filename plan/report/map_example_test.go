package report_test

import (
	"archive/zip"
	"bytes"
	"encoding/json"
	"fmt"
	"image/png"
	"math"

	"github.com/mastlink/mastlink/plan/report"
	"github.com/paulmach/orb"
)

// coneGrid is an invented hill 300 m high in the middle of a 0.1° square
// near 46.5° N, 60 × 60 cells, with a 10 m mast on top.
func coneGrid() report.Grid {
	g := report.Grid{Width: 60, Height: 60, Bounds: report.Bounds{West: 8.0, South: 46.45, East: 8.1, North: 46.55}}
	g.Values = make([]float32, 60*60)
	for r := 0; r < 60; r++ {
		for c := 0; c < 60; c++ {
			d := math.Hypot(float64(c)-29.5, float64(r)-29.5)
			g.Values[r*60+c] = float32(600 + 300*math.Max(0, 1-d/25))
		}
	}
	return g
}

// ExampleMapPNG draws a coverage map of margins around an invented site
// with a link to a relay and reads the image size back.
func ExampleMapPNG() {
	dem := coneGrid()
	margin := report.Grid{Width: 60, Height: 60, Bounds: dem.Bounds, Values: make([]float32, 3600), NoData: -9999, HasNoData: true}
	for i := range margin.Values {
		margin.Values[i] = 40 - float32(i%60+i/60)/3 // made-up margins, dB
	}
	site := orb.Point{8.05, 46.5}
	var buf bytes.Buffer
	err := report.MapPNG(&buf, report.Map{
		Title:   "Coverage from Harrow Knoll",
		WidthPx: 900,
		Terrain: &dem,
		Overlay: &margin,
		Scale:   report.Scale{Levels: []float64{0, 10, 20, 30}, Name: "margin", Unit: "dB"},
		Links:   []report.Link{{From: site, To: orb.Point{8.09, 46.54}, Value: 12.5, Label: "+12.5 dB"}},
		Circles: []report.Circle{{Centre: site, RadiusM: 250, Label: "keep-out 250 m"}},
		Markers: []report.Marker{
			{At: site, Label: "Harrow Knoll", Kind: report.MarkerSite},
			{At: orb.Point{8.09, 46.54}, Label: "Tarn relay", Kind: report.MarkerTarget},
		},
	})
	if err != nil {
		fmt.Println(err)
		return
	}
	cfg, err := png.DecodeConfig(&buf)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("%d × %d px\n", cfg.Width, cfg.Height)
	// Output:
	// 900 × 1399 px
}

// ExampleHillshade shades an invented hill lit from the north-west: its
// north-west flank is lit more than flat ground, its south-east flank
// less.
func ExampleHillshade() {
	dem := coneGrid()
	s, err := report.Hillshade(dem)
	if err != nil {
		fmt.Println(err)
		return
	}
	at := func(c, r int) float32 { return s[r*dem.Width+c] }
	fmt.Printf("north-west flank %.2f, flat %.2f, south-east flank %.2f\n", at(20, 20), at(1, 1), at(39, 39))
	// Output:
	// north-west flank 0.76, flat 0.71, south-east flank 0.65
}

// ExampleLevelAreas turns a small grid of margins into GeoJSON polygons
// of the areas at or above 0 and 10 dB. The cell of −5 dB in the middle is
// a hole in the first, wound clockwise (north, east, south, west).
func ExampleLevelAreas() {
	g := report.Grid{Width: 3, Height: 3, Bounds: report.Bounds{West: 8, South: 46, East: 8.03, North: 46.03},
		Values: []float32{
			12, 12, 12,
			12, -5, 12,
			3, 3, 12,
		}}
	fc, err := report.LevelAreas(g, report.Scale{Levels: []float64{0, 10}, Name: "margin", Unit: "dB"})
	if err != nil {
		fmt.Println(err)
		return
	}
	for _, f := range fc.Features {
		mp := f.Geometry.(orb.MultiPolygon)
		rings := 0
		for _, p := range mp {
			rings += len(p)
		}
		fmt.Printf("%s: %d polygon(s), %d ring(s), %v cells\n", f.Properties["label"], len(mp), rings, f.Properties["cells"])
	}
	raw, _ := json.Marshal(fc.Features[0].Geometry.(orb.MultiPolygon)[0][1])
	fmt.Println("hole:", string(raw))
	// Output:
	// margin ≥ 0 dB: 1 polygon(s), 2 ring(s), 8 cells
	// margin ≥ 10 dB: 1 polygon(s), 1 ring(s), 6 cells
	// hole: [[8.01,46.01],[8.01,46.02],[8.02,46.02],[8.02,46.01],[8.01,46.01]]
}

// ExampleWriteKMZ writes a coverage overlay for a globe viewer and lists
// the archive.
func ExampleWriteKMZ() {
	g := coneGrid()
	var buf bytes.Buffer
	err := report.WriteKMZ(&buf, report.KMZ{
		Name:       "Coverage from Harrow Knoll",
		Overlay:    g, // heights stand in for values here
		Scale:      report.Scale{Levels: []float64{700, 800}, Name: "ground", Unit: "m"},
		Placemarks: []report.Placemark{{Name: "Harrow Knoll", At: orb.Point{8.05, 46.5}}},
	})
	if err != nil {
		fmt.Println(err)
		return
	}
	zr, err := zip.NewReader(bytes.NewReader(buf.Bytes()), int64(buf.Len()))
	if err != nil {
		fmt.Println(err)
		return
	}
	for _, f := range zr.File {
		fmt.Println(f.Name)
	}
	// Output:
	// doc.kml
	// files/overlay.png
	// files/legend.png
}
