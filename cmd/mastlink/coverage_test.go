package main

import (
	"archive/zip"
	"bytes"
	"encoding/json"
	"encoding/xml"
	"image"
	"image/color"
	"image/png"
	"io"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"github.com/mastlink/mastlink/plan/report"
	"github.com/paulmach/orb"
	"github.com/paulmach/orb/geojson"
)

func TestCoverageGolden(t *testing.T) {
	cases := []struct {
		name, golden string
		args         []string
	}{
		{"plan text", "coverage-plan.txt", []string{"coverage", "--plan", demoPlanFile, "--radius", "9km"}},
		{"plan json", "coverage-plan.json", []string{"coverage", "--plan", demoPlanFile, "--radius", "9km", "--format", "json"}},
		{"plan out only", "coverage-plan-out.txt", []string{"coverage", "--plan", demoPlanFile, "--radius", "5km", "--direction", "out", "--value", "received"}},
		{"los flags", "coverage-los.txt", []string{"coverage", "--dem", demoTerrain, "--waypoints", demoPoints, "--from", "Corvane Peak",
			"--height", "20m", "--mode", "los", "--radius", "8km"}},
		{"loss flags", "coverage-loss.json", []string{"coverage", "--dem", demoTerrain, "--from", "-48.4466667,-123.9491667",
			"--height", "20m", "--freq", "147.18", "--radius", "6km", "--resolution", "200m", "--levels", "100,120,140", "--format", "json"}},
		{"imperial", "coverage-imperial.txt", []string{"coverage", "--plan", demoPlanFile, "--radius", "3mi", "--units", "imperial"}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			out, stderr, code := runCmd(t, c.args...)
			if code != 0 {
				t.Fatalf("exit %d: %s", code, stderr)
			}
			if strings.HasSuffix(c.golden, ".json") {
				goldenJSON(t, c.golden, out)
			} else {
				golden(t, c.golden, out)
			}
		})
	}
}

// TestCoverageJSONFields checks the fields scripts rely on and that the
// per-level fractions fall as the level rises (margin) and the covered
// fraction is the fraction at the needed margin.
func TestCoverageJSONFields(t *testing.T) {
	out, _, code := runCmd(t, "coverage", "--plan", demoPlanFile, "--radius", "5km", "--format", "json", "--levels", "0,10,20")
	if code != 0 {
		t.Fatal(code)
	}
	m := decodeJSON(t, out)
	for _, k := range []string{"cells", "covered_fraction", "radius_m", "levels", "level_fractions", "unit", "value", "directions"} {
		if _, ok := m[k]; !ok {
			t.Errorf("field %s missing", k)
		}
	}
	fr := m["level_fractions"].([]any)
	for i := 1; i < len(fr); i++ {
		if fr[i].(float64) > fr[i-1].(float64) {
			t.Errorf("fraction at level %d (%v) above the one below (%v)", i, fr[i], fr[i-1])
		}
	}
	if m["needed_margin_db"].(float64) == 10 && fr[1].(float64) != m["covered_fraction"].(float64) {
		t.Errorf("covered fraction %v is not the fraction at 10 dB %v", m["covered_fraction"], fr[1])
	}
	if m["radius_m"].(float64) != 5000 || m["cells"].(float64) < 1000 {
		t.Errorf("radius %v, cells %v", m["radius_m"], m["cells"])
	}
}

func TestCoverageBadInput(t *testing.T) {
	dir := t.TempDir()
	// A plan whose file name has an output extension, to be refused as -o.
	planCopy := filepath.Join(dir, "plan.geojson")
	body, err := os.ReadFile(demoPlanFile)
	if err != nil {
		t.Fatal(err)
	}
	abs, _ := filepath.Abs(filepath.Dir(demoPlanFile))
	doc := strings.NewReplacer("terrain: ../terrain", "terrain: "+filepath.Join(abs, "..", "terrain"),
		"waypoints: points.gpx", "waypoints: "+filepath.Join(abs, "points.gpx"),
		"routes: [hike.gpx]", "", "sites: [candidates.gpx]", "").Replace(string(body))
	if err := os.WriteFile(planCopy, []byte(doc), 0o644); err != nil {
		t.Fatal(err)
	}
	flat := []string{"coverage", "--dem", demoTerrain, "--from", "-48.45,-123.95", "--mode", "los"}
	cases := []struct {
		name string
		args []string
		code int
		msg  string
	}{
		{"radius 0", append(flat, "--radius", "0"), 2, "--radius: give a radius above 0 m"},
		{"radius negative", append(flat, "--radius", "-2km"), 2, "--radius:"},
		{"radius missing", flat, 2, `"radius" not set`},
		{"unknown extension", append(flat, "--radius", "2km", "-o", filepath.Join(dir, "map.jpg")), 2, `-o: "` + filepath.Join(dir, "map.jpg") + `": give a file ending in .tif, .png, .kmz, .geojson`},
		{"output over input", []string{"coverage", "--plan", planCopy, "--radius", "2km", "-o", planCopy}, 2, "is an input of this run"},
		{"output into the DEM folder", append(flat, "--radius", "2km", "-o", filepath.Join(demoTerrain, "cov.tif")), 2, "where it would be read as elevation data"},
		{"too large", append(flat, "--radius", "400km"), 2, "cells (about"},
		{"site off every tile", []string{"coverage", "--dem", demoTerrain, "--from", "10,10", "--mode", "los", "--radius", "2km"}, 1, "--from: 10.00000,10.00000 is outside every elevation file given"},
		{"unknown mode", append(flat[:len(flat)-2], "--mode", "viewshed", "--radius", "2km"), 2, `--mode: "viewshed" is not a mode`},
		{"value with los", append(flat, "--radius", "2km", "--value", "margin"), 2, "--value: a line-of-sight map"},
		{"loss without freq", []string{"coverage", "--from", "-48.45,-123.95", "--radius", "2km"}, 2, "--freq: give the frequency"},
		{"bad value", []string{"coverage", "--from", "-48.45,-123.95", "--radius", "2km", "--freq", "146", "--value", "snr"}, 2, `--value: "snr" is not a value`},
		{"bad direction", append(flat, "--radius", "2km", "--direction", "up"), 2, `--direction: "up" is not a direction`},
		{"levels descending", append(flat, "--radius", "2km", "--levels", "10,0"), 2, "--levels: levels 10 and 0 are not ascending"},
		{"bad resolution", append(flat, "--radius", "2km", "--resolution", "0m"), 2, "--resolution: give a cell size above 0 m"},
		{"station without plan", append(flat, "--radius", "2km", "--station", "x"), 2, "--station needs --plan"},
		{"kit flag with plan", []string{"coverage", "--plan", demoPlanFile, "--radius", "2km", "--power", "50W"}, 2, "--power: with --plan"},
		{"unknown station", []string{"coverage", "--plan", demoPlanFile, "--radius", "2km", "--station", "Hilltop"}, 2, `--station: the plan has no station "Hilltop"`},
		{"back without power", []string{"coverage", "--from", "-48.45,-123.95", "--radius", "2km", "--freq", "146", "--rx-sens", "-119dBm", "--direction", "back"}, 2, "--direction: back needs --target-power"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			_, stderr, code := runCmd(t, c.args...)
			if code != c.code {
				t.Errorf("exit code %d, want %d (stderr %q)", code, c.code, stderr)
			}
			if !strings.Contains(stderr, c.msg) {
				t.Errorf("stderr %q does not contain %q", stderr, c.msg)
			}
			if n := strings.Count(strings.TrimSpace(stderr), "\n"); n != 0 {
				t.Errorf("error is not one line: %q", stderr)
			}
		})
	}
	if _, err := os.Stat(filepath.Join(demoTerrain, "cov.tif")); err == nil {
		t.Error("a file was written into the elevation folder")
	}
}

// coverageRun runs coverage with -o FILE and the JSON summary.
func coverageRun(t *testing.T, file string, args ...string) map[string]any {
	t.Helper()
	args = append(append([]string{"coverage"}, args...), "--format", "json", "-o", file)
	out, stderr, code := runCmd(t, args...)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	return decodeJSON(t, out)
}

// TestCoverageGeoTIFFGDAL reads a line-of-sight map back with GDAL 3.6
// (Debian gdal-bin): gdalinfo must find EPSG:4326, the grid's size and
// corners, the nodata value, and a mean over the valid cells equal to the
// covered fraction (cells are 1 visible, 0 hidden); gdallocationinfo must
// find the site visible and the corner outside the radius as nodata.
func TestCoverageGeoTIFFGDAL(t *testing.T) {
	gdalinfo := needTool(t, "gdalinfo", "gdal-bin")
	gdalloc := needTool(t, "gdallocationinfo", "gdal-bin")
	tif := filepath.Join(t.TempDir(), "sight.tif")
	m := coverageRun(t, tif, "--dem", demoTerrain, "--from", "-48.4466667,-123.9491667", "--height", "20m", "--mode", "los", "--radius", "6km")
	out, err := exec.Command(gdalinfo, "-json", "-stats", tif).Output()
	if err != nil {
		t.Fatalf("gdalinfo: %v", err)
	}
	var info struct {
		Size             []int     `json:"size"`
		GeoTransform     []float64 `json:"geoTransform"`
		CoordinateSystem struct {
			WKT string `json:"wkt"`
		} `json:"coordinateSystem"`
		Bands []struct {
			Type        string  `json:"type"`
			NoDataValue float64 `json:"noDataValue"`
			Mean        float64 `json:"mean"`
		} `json:"bands"`
	}
	if err := json.Unmarshal(out, &info); err != nil {
		t.Fatalf("gdalinfo -json: %v", err)
	}
	if info.Size[0] != int(m["cols"].(float64)) || info.Size[1] != int(m["rows"].(float64)) {
		t.Errorf("GDAL size %v, JSON %v × %v", info.Size, m["cols"], m["rows"])
	}
	gt := info.GeoTransform
	east := gt[0] + gt[1]*float64(info.Size[0])
	south := gt[3] + gt[5]*float64(info.Size[1])
	for _, c := range []struct {
		name      string
		gdal, our float64
	}{{"west", gt[0], m["west_deg"].(float64)}, {"north", gt[3], m["north_deg"].(float64)}, {"east", east, m["east_deg"].(float64)}, {"south", south, m["south_deg"].(float64)}} {
		if math.Abs(c.gdal-c.our) > 1e-9 {
			t.Errorf("%s edge: GDAL %.10f, ours %.10f", c.name, c.gdal, c.our)
		}
	}
	if !strings.Contains(info.CoordinateSystem.WKT, `ID["EPSG",4326]`) {
		t.Errorf("coordinate system is not EPSG:4326: %.200s", info.CoordinateSystem.WKT)
	}
	if len(info.Bands) != 1 || info.Bands[0].Type != "Float32" || info.Bands[0].NoDataValue != -9999 {
		t.Fatalf("bands %+v", info.Bands)
	}
	// gdalinfo -json writes the mean with three decimals.
	if got, want := info.Bands[0].Mean, m["covered_fraction"].(float64); math.Abs(got-want) > 5e-4 {
		t.Errorf("GDAL mean of the valid cells %.6f, covered fraction %.6f", got, want)
	}
	// The site (visible from itself) and the north-west corner (outside the
	// radius).
	lat, lon := m["lat"].(float64), m["lon"].(float64)
	vals := gdalValues(t, gdalloc, tif, []float64{lat, m["north_deg"].(float64) - 1e-4}, []float64{lon, m["west_deg"].(float64) + 1e-4})
	if vals[0] != 1 || vals[1] != -9999 {
		t.Errorf("gdallocationinfo: site %v (want 1), corner %v (want -9999)", vals[0], vals[1])
	}
}

// TestCoverageKMZ checks that the ground overlay's LatLonBox (KML 2.2, OGC
// 07-147r2 §11.3) is the GeoTIFF's extent, the overlay image has one pixel
// per cell, and the site is a placemark.
func TestCoverageKMZ(t *testing.T) {
	dir := t.TempDir()
	args := []string{"--plan", demoPlanFile, "--radius", "4km"}
	mt := coverageRun(t, filepath.Join(dir, "c.tif"), args...)
	mk := coverageRun(t, filepath.Join(dir, "c.kmz"), args...)
	for _, k := range []string{"west_deg", "east_deg", "south_deg", "north_deg", "rows", "cols"} {
		if mt[k] != mk[k] {
			t.Errorf("%s: %v for the GeoTIFF, %v for the KMZ", k, mt[k], mk[k])
		}
	}
	zr, err := zip.OpenReader(filepath.Join(dir, "c.kmz"))
	if err != nil {
		t.Fatal(err)
	}
	defer zr.Close()
	var doc struct {
		Document struct {
			GroundOverlay struct {
				LatLonBox struct {
					North float64 `xml:"north"`
					South float64 `xml:"south"`
					East  float64 `xml:"east"`
					West  float64 `xml:"west"`
				} `xml:"LatLonBox"`
			} `xml:"GroundOverlay"`
			Placemark []struct {
				Name string `xml:"name"`
			} `xml:"Placemark"`
		} `xml:"Document"`
	}
	var overlay image.Config
	for _, f := range zr.File {
		rc, err := f.Open()
		if err != nil {
			t.Fatal(err)
		}
		b, _ := io.ReadAll(rc)
		rc.Close()
		switch f.Name {
		case report.KMZDocPath:
			dec := xml.NewDecoder(bytes.NewReader(b))
			if err := dec.Decode(&doc); err != nil {
				t.Fatal(err)
			}
		case report.KMZOverlayPath:
			if overlay, err = png.DecodeConfig(bytes.NewReader(b)); err != nil {
				t.Fatal(err)
			}
		}
	}
	box := doc.Document.GroundOverlay.LatLonBox
	for _, c := range []struct {
		name     string
		kml, tif float64
	}{{"west", box.West, mt["west_deg"].(float64)}, {"east", box.East, mt["east_deg"].(float64)}, {"south", box.South, mt["south_deg"].(float64)}, {"north", box.North, mt["north_deg"].(float64)}} {
		if math.Abs(c.kml-c.tif) > 1e-9 {
			t.Errorf("LatLonBox %s %.10f, GeoTIFF %.10f", c.name, c.kml, c.tif)
		}
	}
	if overlay.Width != int(mt["cols"].(float64)) || overlay.Height != int(mt["rows"].(float64)) {
		t.Errorf("overlay image %d × %d, grid %v × %v", overlay.Width, overlay.Height, mt["cols"], mt["rows"])
	}
	found := false
	for _, p := range doc.Document.Placemark {
		found = found || p.Name == "Valley Base"
	}
	if !found {
		t.Errorf("no placemark for the site: %+v", doc.Document.Placemark)
	}
}

// ringArea is twice the signed area of a ring by the shoelace formula,
// positive when it winds counter-clockwise (x east, y north).
func ringArea(r orb.Ring) float64 {
	a := 0.0
	for i := 0; i+1 < len(r); i++ {
		a += r[i][0]*r[i+1][1] - r[i+1][0]*r[i][1]
	}
	return a
}

// TestCoverageGeoJSON checks RFC 7946 §3.1.6: every ring closed, exteriors
// counter-clockwise and holes clockwise; one feature per level with its
// level and unit, the cells counted as the summary counts them; and a
// path-loss map's areas are those at or below each loss.
func TestCoverageGeoJSON(t *testing.T) {
	dir := t.TempDir()
	cases := []struct {
		name, label string
		args        []string
	}{
		{"margin", "margin ≥ 10 dB", []string{"--plan", demoPlanFile, "--radius", "5km", "--levels", "0,10,20"}},
		{"loss", "path loss ≤ 120 dB", []string{"--dem", demoTerrain, "--from", "-48.4966558,-123.8778833", "--freq", "146.55", "--height", "9m", "--radius", "5km", "--levels", "100,120,140"}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			file := filepath.Join(dir, c.name+".geojson")
			m := coverageRun(t, file, c.args...)
			b, err := os.ReadFile(file)
			if err != nil {
				t.Fatal(err)
			}
			fc, err := geojson.UnmarshalFeatureCollection(b)
			if err != nil {
				t.Fatal(err)
			}
			if len(fc.Features) != 3 {
				t.Fatalf("%d features, want one per level", len(fc.Features))
			}
			cells := m["level_cells"].([]any)
			for i, f := range fc.Features {
				if f.Properties["level"] != m["levels"].([]any)[i] || f.Properties["unit"] != "dB" {
					t.Errorf("feature %d properties %v", i, f.Properties)
				}
				if f.Properties["cells"] != cells[i] {
					t.Errorf("feature %d holds %v cells, the summary %v", i, f.Properties["cells"], cells[i])
				}
				mp, ok := f.Geometry.(orb.MultiPolygon)
				if !ok {
					t.Fatalf("feature %d is a %T", i, f.Geometry)
				}
				for _, poly := range mp {
					for k, ring := range poly {
						if len(ring) < 4 || ring[0] != ring[len(ring)-1] {
							t.Fatalf("ring not closed: %v…", ring[:min(3, len(ring))])
						}
						if a := ringArea(ring); k == 0 && a <= 0 || k > 0 && a >= 0 {
							t.Errorf("feature %d polygon ring %d winds the wrong way (area %g)", i, k, a)
						}
					}
				}
			}
			if fc.Features[1].Properties["label"] != c.label {
				t.Errorf("label %v, want %q", fc.Features[1].Properties["label"], c.label)
			}
		})
	}
}

// TestCoveragePNG decodes the map: not blank (relief and overlay give many
// colours), the legend's swatches in the footer, the site's pixel in dark
// ink, and the same bytes from a second run.
func TestCoveragePNG(t *testing.T) {
	dir := t.TempDir()
	file := filepath.Join(dir, "c.png")
	m := coverageRun(t, file, "--plan", demoPlanFile, "--radius", "5km")
	b, err := os.ReadFile(file)
	if err != nil {
		t.Fatal(err)
	}
	img, err := png.Decode(bytes.NewReader(b))
	if err != nil {
		t.Fatal(err)
	}
	bd := img.Bounds()
	if bd.Dx() != report.DefaultMapWidthPx {
		t.Errorf("width %d", bd.Dx())
	}
	colours := map[[3]uint32]bool{}
	for y := bd.Min.Y; y < bd.Max.Y; y += 3 {
		for x := bd.Min.X; x < bd.Max.X; x += 3 {
			r, g, bl, _ := img.At(x, y).RGBA()
			colours[[3]uint32{r >> 8, g >> 8, bl >> 8}] = true
		}
	}
	if len(colours) < 300 {
		t.Errorf("only %d colours: relief or overlay missing", len(colours))
	}
	// The legend: each band's colour (viridis, BandColour) blended at the
	// overlay's opacity over a grey, as the overlay is over flat ground, in
	// the footer.
	footer := image.Rect(0, bd.Max.Y-104, bd.Dx(), bd.Max.Y)
	for i := range 4 {
		want := report.BandColour(i, 4)
		n := 0
		for y := footer.Min.Y; y < footer.Max.Y; y++ {
			for x := footer.Min.X; x < footer.Max.X; x++ {
				r, g, bl, _ := img.At(x, y).RGBA()
				if overGrey([3]uint32{r >> 8, g >> 8, bl >> 8}, want, report.DefaultOverlayOpacity) {
					n++
				}
			}
		}
		if n < 50 {
			t.Errorf("legend: %d pixels of band %d's colour", n, i)
		}
	}
	// The site: the map frame starts 20 px from the left and 72 px from the
	// top (title and subtitle), and shows the grid's extent with true scale
	// at its middle latitude.
	w, s, e, n := m["west_deg"].(float64), m["south_deg"].(float64), m["east_deg"].(float64), m["north_deg"].(float64)
	latM, lonM := report.MetresPerDegree((s + n) / 2)
	kx := float64(report.DefaultMapWidthPx-40) / (e - w)
	ky := math.Round((n-s)*kx*latM/lonM) / (n - s)
	sx, sy := 20+int((m["lon"].(float64)-w)*kx), 72+int((n-m["lat"].(float64))*ky)
	dark := false
	for y := sy - 1; y <= sy+1; y++ {
		for x := sx - 1; x <= sx+1; x++ {
			r, g, bl, _ := img.At(x, y).RGBA()
			dark = dark || (r>>8 < 70 && g>>8 < 70 && bl>>8 < 70)
		}
	}
	if !dark {
		t.Errorf("site pixel (%d, %d) is %v, not marked in dark ink", sx, sy, img.At(sx, sy))
	}
	again := filepath.Join(dir, "d.png")
	coverageRun(t, again, "--plan", demoPlanFile, "--radius", "5km")
	if b2, _ := os.ReadFile(again); !bytes.Equal(b, b2) {
		t.Error("the same map gave different bytes")
	}
}

// overGrey reports whether a pixel is the band colour blended at opacity
// over one grey (the same in all three channels, within 2 levels of the
// pixel).
func overGrey(px [3]uint32, band color.NRGBA, opacity float64) bool {
	b := [3]float64{float64(band.R), float64(band.G), float64(band.B)}
	var g [3]float64
	for i := range 3 {
		g[i] = (float64(px[i]) - opacity*b[i]) / (1 - opacity)
		if g[i] < -3 || g[i] > 258 {
			return false
		}
	}
	tol := 2 / (1 - opacity)
	return math.Abs(g[0]-g[1]) <= tol && math.Abs(g[1]-g[2]) <= tol && math.Abs(g[0]-g[2]) <= tol
}

// TestRouteAndSitesPNG decodes the route and site maps: full width, many
// colours (relief and features), the legend's lowest band in the footer,
// and the same bytes from a second run.
func TestRouteAndSitesPNG(t *testing.T) {
	dir := t.TempDir()
	for _, c := range []struct {
		name string
		args []string
	}{
		{"route", []string{"route", demoHike, "--plan", demoPlanFile}},
		{"sites", []string{"sites", demoCandidates, "--plan", demoPlanFile}},
	} {
		t.Run(c.name, func(t *testing.T) {
			var first []byte
			for run := range 2 {
				file := filepath.Join(dir, c.name+strconv.Itoa(run)+".png")
				_, stderr, code := runCmd(t, append(c.args, "-o", file)...)
				if code != 0 {
					t.Fatalf("exit %d: %s", code, stderr)
				}
				b, err := os.ReadFile(file)
				if err != nil {
					t.Fatal(err)
				}
				if run == 1 {
					if !bytes.Equal(first, b) {
						t.Error("the same map gave different bytes")
					}
					return
				}
				first = b
				img, err := png.Decode(bytes.NewReader(b))
				if err != nil {
					t.Fatal(err)
				}
				bd := img.Bounds()
				if bd.Dx() != report.DefaultMapWidthPx {
					t.Errorf("width %d", bd.Dx())
				}
				colours := map[[3]uint32]bool{}
				band0 := 0
				lowest := report.BandColour(0, 4) // legend swatches of lines are the band colours themselves
				for y := bd.Min.Y; y < bd.Max.Y; y++ {
					for x := bd.Min.X; x < bd.Max.X; x++ {
						r, g, bl, _ := img.At(x, y).RGBA()
						colours[[3]uint32{r >> 8, g >> 8, bl >> 8}] = true
						if y > bd.Max.Y-104 && uint8(r>>8) == lowest.R && uint8(g>>8) == lowest.G && uint8(bl>>8) == lowest.B {
							band0++
						}
					}
				}
				if len(colours) < 300 {
					t.Errorf("only %d colours", len(colours))
				}
				if band0 < 50 {
					t.Errorf("legend: %d pixels of the lowest band's colour", band0)
				}
			}
		})
	}
}

// TestPlanCoverageOutputs checks that `plan -o DIR` writes the coverage
// map the demo plan asks for (Valley Base, 12 km) as PNG and GeoTIFF, and
// that the GeoTIFF is byte for byte the one `coverage` writes for the same
// station and radius.
func TestPlanCoverageOutputs(t *testing.T) {
	dir := filepath.Join(t.TempDir(), "out")
	_, stderr, code := runCmd(t, "plan", demoPlanFile, "-o", dir)
	if code != 0 {
		t.Fatalf("code %d: %s", code, stderr)
	}
	if !strings.Contains(stderr, "coverage-valley-base.png, coverage-valley-base.tif") {
		t.Errorf("stderr does not name the maps: %q", stderr)
	}
	b, err := os.ReadFile(filepath.Join(dir, "coverage-valley-base.png"))
	if err != nil {
		t.Fatal(err)
	}
	if _, err := png.Decode(bytes.NewReader(b)); err != nil {
		t.Fatal(err)
	}
	fromPlan, err := os.ReadFile(filepath.Join(dir, "coverage-valley-base.tif"))
	if err != nil {
		t.Fatal(err)
	}
	single := filepath.Join(t.TempDir(), "single.tif")
	coverageRun(t, single, "--plan", demoPlanFile, "--station", "valley base", "--radius", "12km")
	if b, _ := os.ReadFile(single); !bytes.Equal(b, fromPlan) {
		t.Error("plan -o and coverage give different GeoTIFFs for the same station and radius")
	}
	if fileSlug("  Team Ålder / 2 ") != "team-lder-2" || fileSlug("***") != "station" {
		t.Errorf("fileSlug: %q %q", fileSlug("  Team Ålder / 2 "), fileSlug("***"))
	}
}
