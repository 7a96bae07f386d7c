package report

import (
	"archive/zip"
	"bytes"
	"encoding/xml"
	"image/png"
	"io"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"github.com/paulmach/orb"
)

// testKMZ is a small coverage overlay: 40 × 30 cells of margins rising
// to the east, the south-west corner without data.
func testKMZ() KMZ {
	g := Grid{Width: 40, Height: 30, NoData: -9999, HasNoData: true,
		Bounds: Bounds{West: 11.8125, South: 57.6375, East: 11.9236111111, North: 57.7208333333}}
	g.Values = make([]float32, g.Width*g.Height)
	for r := 0; r < g.Height; r++ {
		for c := 0; c < g.Width; c++ {
			g.Values[r*g.Width+c] = float32(c) - 5
			if r > 25 && c < 4 {
				g.Values[r*g.Width+c] = -9999
			}
		}
	}
	return KMZ{
		Name: "Coverage from Harrow Knoll", Description: "margin over −117 dBm & more <invented>",
		Overlay: g, Scale: Scale{Levels: []float64{0, 10, 20}, Name: "margin", Unit: "dB"},
		Placemarks: []Placemark{{Name: "Harrow Knoll", At: orb.Point{11.86, 57.68}, Description: "site, 10 m mast"}},
	}
}

// Structure of the KML read back (OGC 07-147r2 element names).
type kmlBack struct {
	XMLName  xml.Name
	Document struct {
		Name          string `xml:"name"`
		Description   string `xml:"description"`
		GroundOverlay struct {
			Icon struct {
				Href string `xml:"href"`
			} `xml:"Icon"`
			LatLonBox struct {
				North float64 `xml:"north"`
				South float64 `xml:"south"`
				East  float64 `xml:"east"`
				West  float64 `xml:"west"`
			} `xml:"LatLonBox"`
		} `xml:"GroundOverlay"`
		ScreenOverlay struct {
			Icon struct {
				Href string `xml:"href"`
			} `xml:"Icon"`
		} `xml:"ScreenOverlay"`
		Placemark []struct {
			Name  string `xml:"name"`
			Point struct {
				Coordinates string `xml:"coordinates"`
			} `xml:"Point"`
		} `xml:"Placemark"`
	} `xml:"Document"`
}

func TestWriteKMZ(t *testing.T) {
	k := testKMZ()
	var buf bytes.Buffer
	if err := WriteKMZ(&buf, k); err != nil {
		t.Fatal(err)
	}
	zr, err := zip.NewReader(bytes.NewReader(buf.Bytes()), int64(buf.Len()))
	if err != nil {
		t.Fatalf("not a zip archive: %v", err)
	}
	files := map[string][]byte{}
	var names []string
	for _, f := range zr.File {
		rc, err := f.Open()
		if err != nil {
			t.Fatal(err)
		}
		data, err := io.ReadAll(rc)
		rc.Close()
		if err != nil {
			t.Fatal(err)
		}
		files[f.Name] = data
		names = append(names, f.Name)
		if !f.Modified.Equal(kmzTime) {
			t.Errorf("%s: time %v, want the fixed %v", f.Name, f.Modified, kmzTime)
		}
	}
	// The root KML file comes first in the archive (common practice: a
	// KMZ reader opens the first .kml file).
	if len(names) != 3 || names[0] != "doc.kml" {
		t.Fatalf("archive holds %v; want doc.kml first, then the two images", names)
	}
	var doc kmlBack
	if err := xml.Unmarshal(files["doc.kml"], &doc); err != nil {
		t.Fatalf("doc.kml is not XML: %v\n%s", err, files["doc.kml"])
	}
	if doc.XMLName.Space != "http://www.opengis.net/kml/2.2" || doc.XMLName.Local != "kml" {
		t.Errorf("root element %v, want kml in the KML 2.2 namespace", doc.XMLName)
	}
	d := doc.Document
	if d.Name != k.Name || d.Description != k.Description {
		t.Errorf("name %q, description %q", d.Name, d.Description)
	}
	box := d.GroundOverlay.LatLonBox
	b := k.Overlay.Bounds
	if box.North != b.North || box.South != b.South || box.East != b.East || box.West != b.West {
		t.Errorf("LatLonBox %+v, want the grid's bounds %+v exactly", box, b)
	}
	for _, href := range []string{d.GroundOverlay.Icon.Href, d.ScreenOverlay.Icon.Href} {
		if _, ok := files[href]; !ok {
			t.Errorf("the KML refers to %q, which is not in the archive", href)
		}
	}
	if len(d.Placemark) != 1 || d.Placemark[0].Name != "Harrow Knoll" {
		t.Fatalf("placemarks %+v", d.Placemark)
	}
	// KML coordinates are longitude,latitude[,altitude] (OGC 07-147r2 §16.10).
	xy := strings.Split(d.Placemark[0].Point.Coordinates, ",")
	lon, _ := strconv.ParseFloat(xy[0], 64)
	lat, _ := strconv.ParseFloat(xy[len(xy)-1], 64)
	if len(xy) != 2 || lon != 11.86 || lat != 57.68 {
		t.Errorf("placemark coordinates %q, want 11.86,57.68", d.Placemark[0].Point.Coordinates)
	}

	// The overlay image: one pixel per cell, transparent where there is no
	// data or the value is below the first level, the band colour at 60 %.
	img, err := png.Decode(bytes.NewReader(files[d.GroundOverlay.Icon.Href]))
	if err != nil {
		t.Fatal(err)
	}
	if img.Bounds().Dx() != 40 || img.Bounds().Dy() != 30 {
		t.Fatalf("overlay is %v, want 40 × 30 pixels", img.Bounds())
	}
	alpha := func(x, y int) uint32 { _, _, _, a := img.At(x, y).RGBA(); return a >> 8 }
	wantA := uint32(math.Round(255 * DefaultOverlayOpacity))
	cases := []struct {
		x, y int
		a    uint32
		band int
	}{
		{0, 0, 0, -1},      // value −5: below 0
		{5, 0, wantA, 0},   // 0
		{16, 10, wantA, 1}, // 11
		{39, 29, wantA, 2}, // 34
		{2, 28, 0, -1},     // no data
	}
	for _, c := range cases {
		if a := alpha(c.x, c.y); a != c.a {
			t.Errorf("pixel (%d, %d): alpha %d, want %d", c.x, c.y, a, c.a)
			continue
		}
		if c.band >= 0 {
			r, g, bl, _ := img.At(c.x, c.y).RGBA()
			want := BandColour(c.band, 3)
			// Un-premultiply.
			got := [3]float64{float64(r>>8) * 255 / float64(c.a), float64(g>>8) * 255 / float64(c.a), float64(bl>>8) * 255 / float64(c.a)}
			if math.Abs(got[0]-float64(want.R)) > 2 || math.Abs(got[1]-float64(want.G)) > 2 || math.Abs(got[2]-float64(want.B)) > 2 {
				t.Errorf("pixel (%d, %d): colour %v, want band %d %v", c.x, c.y, got, c.band, want)
			}
		}
	}
	if _, err := png.Decode(bytes.NewReader(files["files/legend.png"])); err != nil {
		t.Errorf("legend: %v", err)
	}
	if *mapDir != "" {
		for name, data := range map[string][]byte{"kmz-doc.kml": files["doc.kml"], "kmz-legend.png": files["files/legend.png"], "kmz-overlay.png": files["files/overlay.png"]} {
			if err := os.WriteFile(filepath.Join(*mapDir, name), data, 0o644); err != nil {
				t.Fatal(err)
			}
		}
	}

	// The same input gives the same bytes.
	var again bytes.Buffer
	if err := WriteKMZ(&again, testKMZ()); err != nil {
		t.Fatal(err)
	}
	if !bytes.Equal(buf.Bytes(), again.Bytes()) {
		t.Error("two KMZ files of the same input differ")
	}
}

func TestWriteKMZBadInput(t *testing.T) {
	cases := []struct {
		name   string
		change func(*KMZ)
	}{
		{"no levels", func(k *KMZ) { k.Scale.Levels = nil }},
		{"bounds swapped", func(k *KMZ) {
			k.Overlay.Bounds.North, k.Overlay.Bounds.South = k.Overlay.Bounds.South, k.Overlay.Bounds.North
		}},
		{"placemark off the earth", func(k *KMZ) { k.Placemarks[0].At = orb.Point{11, 95} }},
		{"opacity above 1", func(k *KMZ) { k.Opacity = 1.5 }},
	}
	for _, c := range cases {
		k := testKMZ()
		c.change(&k)
		var buf bytes.Buffer
		if err := WriteKMZ(&buf, k); err == nil || buf.Len() != 0 {
			t.Errorf("%s: error %v, %d bytes written", c.name, err, buf.Len())
		}
	}
}
