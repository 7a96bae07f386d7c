package report

import (
	"archive/zip"
	"bytes"
	"encoding/xml"
	"fmt"
	"image"
	"image/color"
	"image/draw"
	"image/png"
	"io"
	"math"
	"strconv"
	"time"

	"github.com/paulmach/orb"
)

// OverlayPNG writes g as a PNG image of one pixel per cell, row 0 at the
// top: each cell at or above the first level of s in its band's colour
// (BandColour) with the given opacity (0 to 1; DefaultOverlayOpacity when
// 0), cells without data or below the first level fully transparent. It is
// the image a KML GroundOverlay stretches over the grid's bounds. On bad
// data the error wraps ErrChartData and nothing is written.
func OverlayPNG(w io.Writer, g Grid, s Scale, opacity float64) error {
	img, err := overlayImage(&g, &s, opacity)
	if err != nil {
		return err
	}
	return png.Encode(w, img)
}

func overlayImage(g *Grid, s *Scale, opacity float64) (*image.NRGBA, error) {
	if err := g.check("overlay"); err != nil {
		return nil, err
	}
	if err := s.check(); err != nil {
		return nil, err
	}
	if !(opacity >= 0 && opacity <= 1) {
		return nil, fmt.Errorf("%w: overlay opacity %v: give 0 to 1", ErrChartData, opacity)
	}
	if opacity == 0 {
		opacity = DefaultOverlayOpacity
	}
	n := len(s.Levels)
	colours := make([]color.NRGBA, n)
	for i := range colours {
		colours[i] = BandColour(i, n)
		colours[i].A = uint8(math.Round(255 * opacity))
	}
	img := image.NewNRGBA(image.Rect(0, 0, g.Width, g.Height))
	for r := 0; r < g.Height; r++ {
		for c := 0; c < g.Width; c++ {
			v := g.Values[r*g.Width+c]
			if !g.valid(v) {
				continue
			}
			if b := s.band(float64(v)); b >= 0 {
				img.SetNRGBA(c, r, colours[b])
			}
		}
	}
	return img, nil
}

// Placemark is a named point in a KMZ file.
type Placemark struct {
	Name        string
	Description string    // plain text; may be empty
	At          orb.Point // lon, lat in degrees (WGS84)
}

// KMZ is a coverage overlay for a globe viewer: the grid drawn in the
// scale's colours over its bounds, a legend, and placemarks.
type KMZ struct {
	// Name and Description of the KML document (plain text).
	Name, Description string
	// Overlay holds the values in Scale units; its Bounds become the
	// GroundOverlay's LatLonBox.
	Overlay Grid
	Scale   Scale
	// Opacity of the overlay, 0 to 1 (DefaultOverlayOpacity when 0).
	Opacity    float64
	Placemarks []Placemark
}

// Paths inside a KMZ archive.
const (
	KMZDocPath     = "doc.kml"
	KMZOverlayPath = "files/overlay.png"
	KMZLegendPath  = "files/legend.png"
)

// kmzTime is the modification time of every file in a KMZ archive, fixed
// so the same input gives the same bytes.
var kmzTime = time.Date(2000, 1, 1, 0, 0, 0, 0, time.UTC)

// WriteKMZ writes k as a KMZ archive: a zip (PKWARE APPNOTE) whose first
// file, doc.kml, is a KML 2.2 document (OGC 07-147r2) holding a
// GroundOverlay of files/overlay.png (OverlayPNG of the grid, one pixel per
// cell) with a LatLonBox of the grid's bounds (§11.3, north, south, east,
// west in degrees), a ScreenOverlay of the legend (files/legend.png) in the
// lower left corner of the view, and a Placemark with a Point for each
// placemark. Every file has the same fixed time, so the same input gives
// the same bytes. On bad data the error wraps ErrChartData and nothing is
// written.
func WriteKMZ(w io.Writer, k KMZ) error {
	for _, p := range k.Placemarks {
		if err := checkPoint(p.At, "placemark "+quote(p.Name)); err != nil {
			return err
		}
	}
	ov, err := overlayImage(&k.Overlay, &k.Scale, k.Opacity)
	if err != nil {
		return err
	}
	var ovPNG, legPNG bytes.Buffer
	if err := png.Encode(&ovPNG, ov); err != nil {
		return err
	}
	leg, err := legendImage(&k.Scale, k.Opacity)
	if err != nil {
		return err
	}
	if err := png.Encode(&legPNG, leg); err != nil {
		return err
	}
	doc, err := kmlDocument(&k, leg.Bounds().Dx(), leg.Bounds().Dy())
	if err != nil {
		return err
	}

	var buf bytes.Buffer
	zw := zip.NewWriter(&buf)
	for _, f := range []struct {
		name   string
		data   []byte
		method uint16
	}{
		{KMZDocPath, doc, zip.Deflate},
		{KMZOverlayPath, ovPNG.Bytes(), zip.Store}, // already compressed
		{KMZLegendPath, legPNG.Bytes(), zip.Store},
	} {
		fw, err := zw.CreateHeader(&zip.FileHeader{Name: f.name, Method: f.method, Modified: kmzTime})
		if err != nil {
			return err
		}
		if _, err := fw.Write(f.data); err != nil {
			return err
		}
	}
	if err := zw.Close(); err != nil {
		return err
	}
	_, err = w.Write(buf.Bytes())
	return err
}

// KML 2.2 elements written (OGC 07-147r2), in the order its schema gives.
type (
	kmlRoot struct {
		XMLName  xml.Name `xml:"http://www.opengis.net/kml/2.2 kml"`
		Document kmlDoc   `xml:"Document"`
	}
	kmlDoc struct {
		Name          string         `xml:"name"`
		Description   string         `xml:"description,omitempty"`
		GroundOverlay kmlGround      `xml:"GroundOverlay"`
		ScreenOverlay kmlScreen      `xml:"ScreenOverlay"`
		Placemarks    []kmlPlacemark `xml:"Placemark"`
	}
	kmlIcon struct {
		Href string `xml:"href"`
	}
	kmlGround struct {
		Name      string    `xml:"name"`
		Icon      kmlIcon   `xml:"Icon"`
		LatLonBox kmlLatLon `xml:"LatLonBox"`
	}
	kmlLatLon struct {
		North string `xml:"north"`
		South string `xml:"south"`
		East  string `xml:"east"`
		West  string `xml:"west"`
	}
	kmlVec2 struct {
		X      string `xml:"x,attr"`
		Y      string `xml:"y,attr"`
		XUnits string `xml:"xunits,attr"`
		YUnits string `xml:"yunits,attr"`
	}
	kmlScreen struct {
		Name      string  `xml:"name"`
		Icon      kmlIcon `xml:"Icon"`
		OverlayXY kmlVec2 `xml:"overlayXY"`
		ScreenXY  kmlVec2 `xml:"screenXY"`
		Size      kmlVec2 `xml:"size"`
	}
	kmlPlacemark struct {
		Name        string   `xml:"name"`
		Description string   `xml:"description,omitempty"`
		Point       kmlPoint `xml:"Point"`
	}
	kmlPoint struct {
		Coordinates string `xml:"coordinates"`
	}
)

// deg writes a coordinate in the fewest digits that read back as the same
// float64.
func deg(v float64) string { return strconv.FormatFloat(v, 'f', -1, 64) }

// kmlDocument is the doc.kml of k.
func kmlDocument(k *KMZ, legendW, legendH int) ([]byte, error) {
	name := k.Name
	if name == "" {
		name = k.Scale.title()
	}
	b := k.Overlay.Bounds
	d := kmlDoc{
		Name:        printable(name),
		Description: printable(k.Description),
		GroundOverlay: kmlGround{
			Name:      printable(k.Scale.title()),
			Icon:      kmlIcon{Href: KMZOverlayPath},
			LatLonBox: kmlLatLon{North: deg(b.North), South: deg(b.South), East: deg(b.East), West: deg(b.West)},
		},
		ScreenOverlay: kmlScreen{
			Name:      "Legend",
			Icon:      kmlIcon{Href: KMZLegendPath},
			OverlayXY: kmlVec2{"0", "0", "fraction", "fraction"},
			ScreenXY:  kmlVec2{"0.01", "0.04", "fraction", "fraction"},
			Size:      kmlVec2{strconv.Itoa(legendW), strconv.Itoa(legendH), "pixels", "pixels"},
		},
	}
	for _, p := range k.Placemarks {
		d.Placemarks = append(d.Placemarks, kmlPlacemark{
			Name: printable(p.Name), Description: printable(p.Description),
			Point: kmlPoint{Coordinates: deg(p.At[0]) + "," + deg(p.At[1])},
		})
	}
	out, err := xml.MarshalIndent(kmlRoot{Document: d}, "", "  ")
	if err != nil {
		return nil, err
	}
	return append([]byte(xml.Header), append(out, '\n')...), nil
}

// legendImage is the legend of s alone, as under a map: the bands (as the
// overlay shows them over flat ground) with their thresholds and title, on
// white.
func legendImage(s *Scale, opacity float64) (*image.RGBA, error) {
	fs, err := openMapFonts()
	if err != nil {
		return nil, err
	}
	defer fs.close()
	n := len(s.Levels)
	w := 2*12 + int(math.Max(float64(n)*legendMaxSwatchPx, float64(textBox(fs.labelBold, 0, 0, s.title()).widthPx()))) + 24
	h := legendLabelBaseline + 10
	l := &mapLayout{mapX: 12, footerY: -4, barX: w + 40 + 3*110, anyValued: true}
	page := newCanvas(w, h)
	draw.Draw(page.img, page.img.Bounds(), image.NewUniform(rgb(mapPaper)), image.Point{}, draw.Src)
	op := opacity
	if op == 0 {
		op = DefaultOverlayOpacity
	}
	l.drawLegend(page, &Map{Scale: *s, Overlay: &Grid{}, OverlayOpacity: op}, fs)
	edge := [][2]float64{{0.5, 0.5}, {float64(w) - 0.5, 0.5}, {float64(w) - 0.5, float64(h) - 0.5}, {0.5, float64(h) - 0.5}, {0.5, 0}}
	page.paint(rgb(mapFrame), stroke(edge, 1))
	return page.img, nil
}

func (b box) widthPx() int { return int(math.Ceil(b.x1 - b.x0)) }
