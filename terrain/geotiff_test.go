package terrain

import (
	"bufio"
	"bytes"
	"encoding/json"
	"errors"
	"flag"
	"fmt"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"
	"testing"
)

// The -update flag regenerates the GeoTIFFs under testdata/geotiff with
// GDAL. Another test file of the package may define the same flag; share it.
func init() {
	if flag.Lookup("update") == nil {
		flag.Bool("update", false, "regenerate golden files under testdata/")
	}
}

func gtUpdate() bool {
	f := flag.Lookup("update")
	return f != nil && f.Value.String() == "true"
}

// gtMissing skips the test, or fails it when MASTLINK_REQUIRE_CROSSCHECKS=1.
func gtMissing(tb testing.TB, format string, a ...any) {
	tb.Helper()
	msg := fmt.Sprintf(format, a...)
	if os.Getenv("MASTLINK_REQUIRE_CROSSCHECKS") == "1" {
		tb.Fatalf("%s (MASTLINK_REQUIRE_CROSSCHECKS=1)", msg)
	}
	tb.Skipf("skipping: %s", msg)
}

// gtNeedGDAL checks for the Debian gdal-bin tools used as a reference.
func gtNeedGDAL(tb testing.TB) {
	tb.Helper()
	for _, tool := range []string{"gdal_translate", "gdallocationinfo", "gdalinfo"} {
		if _, err := exec.LookPath(tool); err != nil {
			gtMissing(tb, "%s not found; install Debian gdal-bin to cross-check the GeoTIFF reader", tool)
		}
	}
}

// gtRefData returns the path of a real reference file: $MASTLINK_REFDATA,
// else <repo>/.refdata (fetched by .ci/fetch-refdata).
func gtRefData(tb testing.TB, file string) string {
	tb.Helper()
	dir := os.Getenv("MASTLINK_REFDATA")
	if dir == "" {
		wd, _ := os.Getwd()
		for d := wd; ; d = filepath.Dir(d) {
			if _, err := os.Stat(filepath.Join(d, "go.mod")); err == nil {
				dir = filepath.Join(d, ".refdata")
				break
			}
			if filepath.Dir(d) == d {
				break
			}
		}
	}
	p := filepath.Join(dir, file)
	if _, err := os.Stat(p); err != nil {
		gtMissing(tb, "%s not found (set MASTLINK_REFDATA or run .ci/fetch-refdata)", p)
	}
	return p
}

func gtRun(tb testing.TB, stdin string, name string, args ...string) string {
	tb.Helper()
	cmd := exec.Command(name, args...)
	cmd.Stdin = strings.NewReader(stdin)
	var out, errb bytes.Buffer
	cmd.Stdout, cmd.Stderr = &out, &errb
	if err := cmd.Run(); err != nil {
		tb.Fatalf("%s %s: %v\n%s", name, strings.Join(args, " "), err, errb.String())
	}
	return out.String()
}

// gtGrid is a synthetic DEM: rows×cols samples at pixel centres, west and
// south the outer pixel edges (the ASCII grid's xllcorner/yllcorner).
type gtGrid struct {
	rows, cols    int
	west, south   float64 // degrees, pixel corner
	dlon, dlat    float64 // degrees
	typ           string  // GDAL data type: Int16, UInt16, Float32
	nodata        float64
	h             []float64 // row-major from the north row; nodata cells hold nodata
	omitAscNodata bool      // leave NODATA_value out of the .asc (set with -a_nodata)
}

// gtMakeGrid builds deterministic terrain-like heights with a few nodata
// cells. Integer types get whole metres, Float32 eighths (exact in float32
// and in decimal).
func gtMakeGrid(typ string, rows, cols int, west, south, dlon, dlat float64) *gtGrid {
	g := &gtGrid{rows: rows, cols: cols, west: west, south: south, dlon: dlon, dlat: dlat, typ: typ}
	switch typ {
	case "Int16":
		g.nodata = -32768
	case "UInt16":
		g.nodata = 65535
	default:
		g.nodata = -9999
	}
	g.h = make([]float64, rows*cols)
	for r := range rows {
		for c := range cols {
			fr, fc := float64(r), float64(c)
			v := 420 + 260*math.Sin(0.21*fc+0.3)*math.Cos(0.17*fr) + 45*math.Sin(0.9*fc+1.3*fr) + 3*fr - 2*fc
			if typ == "Float32" {
				v = math.Round(v*8) / 8
			} else {
				v = math.Round(v)
			}
			if (r*7+c*3)%41 == 5 {
				v = g.nodata
			}
			g.h[r*cols+c] = v
		}
	}
	return g
}

func (g *gtGrid) writeASC(tb testing.TB, path string) {
	tb.Helper()
	var b strings.Builder
	fmt.Fprintf(&b, "ncols %d\nnrows %d\nxllcorner %.12f\nyllcorner %.12f\n", g.cols, g.rows, g.west, g.south)
	if g.dlon == g.dlat {
		fmt.Fprintf(&b, "cellsize %.15g\n", g.dlon)
	} else {
		fmt.Fprintf(&b, "dx %.15g\ndy %.15g\n", g.dlon, g.dlat)
	}
	if !g.omitAscNodata {
		fmt.Fprintf(&b, "NODATA_value %g\n", g.nodata)
	}
	for r := range g.rows {
		for c := range g.cols {
			if c > 0 {
				b.WriteByte(' ')
			}
			b.WriteString(strconv.FormatFloat(g.h[r*g.cols+c], 'f', -1, 64))
		}
		b.WriteByte('\n')
	}
	if err := os.WriteFile(path, []byte(b.String()), 0o644); err != nil {
		tb.Fatal(err)
	}
}

// gtTranslate writes the grid with gdal_translate. southUp re-georeferences
// it through a VRT whose rows run south to north; geoTransform, if set,
// replaces the VRT geotransform outright.
func (g *gtGrid) gtTranslate(tb testing.TB, dir, out string, southUp bool, geoTransform string, args ...string) string {
	tb.Helper()
	asc := filepath.Join(dir, "grid.asc")
	g.writeASC(tb, asc)
	src := asc
	if southUp || geoTransform != "" {
		vrt := filepath.Join(dir, "grid.vrt")
		gtRun(tb, "", "gdal_translate", "-q", "-of", "VRT", asc, vrt)
		text, err := os.ReadFile(vrt)
		if err != nil {
			tb.Fatal(err)
		}
		if southUp {
			geoTransform = fmt.Sprintf("%.15g, %.15g, 0, %.15g, 0, %.15g", g.west, g.dlon, g.south, g.dlat)
		}
		re := regexp.MustCompile(`<GeoTransform>[^<]*</GeoTransform>`)
		text = re.ReplaceAll(text, []byte("<GeoTransform>"+geoTransform+"</GeoTransform>"))
		if err := os.WriteFile(vrt, text, 0o644); err != nil {
			tb.Fatal(err)
		}
		src = vrt
	}
	path := filepath.Join(dir, out)
	all := append([]string{"-q", "-ot", g.typ}, args...)
	all = append(all, src, path)
	gtRun(tb, "", "gdal_translate", all...)
	return path
}

// gtLocationInfo returns gdallocationinfo's nearest-sample values at the
// given (lat, lon) points, NaN where it reports the nodata value. It prints
// 15 significant digits, enough to identify a float32 exactly.
// Reference: GDAL 3.6 gdallocationinfo -valonly -wgs84.
func gtLocationInfo(tb testing.TB, path string, nodata float64, hasNodata bool, pts [][2]float64) []float64 {
	tb.Helper()
	var in strings.Builder
	for _, p := range pts {
		fmt.Fprintf(&in, "%.12f %.12f\n", p[1], p[0])
	}
	out := gtRun(tb, in.String(), "gdallocationinfo", "-valonly", "-wgs84", path)
	sc := bufio.NewScanner(strings.NewReader(out))
	var v []float64
	for sc.Scan() {
		f, err := strconv.ParseFloat(strings.TrimSpace(sc.Text()), 64)
		if err != nil {
			tb.Fatalf("gdallocationinfo line %d: %q: %v", len(v)+1, sc.Text(), err)
		}
		if hasNodata && f == nodata {
			f = math.NaN()
		}
		v = append(v, f)
	}
	if len(v) != len(pts) {
		tb.Fatalf("gdallocationinfo gave %d values for %d points", len(v), len(pts))
	}
	return v
}

// gtInfo is what gdalinfo -json reports about a raster (GDAL 3.6).
type gtInfo struct {
	Size         []int     `json:"size"`
	GeoTransform []float64 `json:"geoTransform"`
	Bands        []struct {
		NoData any `json:"noDataValue"`
	} `json:"bands"`
}

func gtGDALInfo(tb testing.TB, path string) (info gtInfo, nodata float64, hasNodata bool) {
	tb.Helper()
	if err := json.Unmarshal([]byte(gtRun(tb, "", "gdalinfo", "-json", path)), &info); err != nil {
		tb.Fatalf("gdalinfo -json %s: %v", path, err)
	}
	if len(info.Size) != 2 || len(info.GeoTransform) != 6 || len(info.Bands) == 0 {
		tb.Fatalf("gdalinfo -json %s: unexpected output %+v", path, info)
	}
	switch v := info.Bands[0].NoData.(type) {
	case float64:
		return info, v, true
	case string: // "nan"
		return info, math.NaN(), true
	}
	return info, 0, false
}

func gtSame(a, b float64) bool { return a == b || (math.IsNaN(a) && math.IsNaN(b)) }

// gtCheckAgainstGDAL compares every sample (or, for big tiles, a stride of
// them) with gdallocationinfo at the sample centre, and the tile's extent
// with gdalinfo's geotransform (pixel edges → centres: half a pixel in).
func gtCheckAgainstGDAL(t *testing.T, path string, tile *Tile, minPoints int) {
	t.Helper()
	info, nodata, hasNodata := gtGDALInfo(t, path)
	gt := info.GeoTransform
	if info.Size[0] != tile.Cols || info.Size[1] != tile.Rows {
		t.Fatalf("size %d×%d, gdalinfo %d×%d", tile.Cols, tile.Rows, info.Size[0], info.Size[1])
	}
	// gdalinfo's geotransform: x = gt0 + (i)·gt1, y = gt3 + (j)·gt5 at pixel corners.
	wantW, wantE := gt[0]+gt[1]/2, gt[0]+(float64(tile.Cols)-0.5)*gt[1]
	wantN, wantS := gt[3]+gt[5]/2, gt[3]+(float64(tile.Rows)-0.5)*gt[5]
	if wantN < wantS {
		wantN, wantS = wantS, wantN
	}
	w, s, e, n, err := GeoTIFFBounds(path)
	if err != nil {
		t.Fatalf("GeoTIFFBounds: %v", err)
	}
	const tolDeg = 1e-9 // degrees; both sides compute from the same doubles
	for _, c := range []struct {
		name      string
		got, want float64
	}{{"west", w, wantW}, {"east", e, wantE}, {"north", n, wantN}, {"south", s, wantS}, {"Lat0", tile.Lat0, wantN}, {"Lon0", tile.Lon0, wantW}} {
		if math.Abs(c.got-c.want) > tolDeg {
			t.Errorf("%s = %.12f, gdalinfo gives %.12f", c.name, c.got, c.want)
		}
	}
	stride := 1
	if n := tile.Rows * tile.Cols; n > 4*minPoints {
		stride = n / (2 * minPoints)
	}
	var pts [][2]float64
	var idx []int
	for i := 0; i < tile.Rows*tile.Cols; i += stride {
		r, c := i/tile.Cols, i%tile.Cols
		pts = append(pts, [2]float64{tile.Lat0 - float64(r)*tile.DLat, tile.Lon0 + float64(c)*tile.DLon})
		idx = append(idx, i)
	}
	if len(pts) < minPoints {
		t.Fatalf("only %d points to compare, want at least %d", len(pts), minPoints)
	}
	ref := gtLocationInfo(t, path, nodata, hasNodata, pts)
	bad := 0
	for k, i := range idx {
		if got := float64(tile.H[i]); !gtSame(got, float64(float32(ref[k]))) {
			if bad++; bad <= 5 {
				t.Errorf("sample (row %d, col %d) at %.6f°N %.6f°E: %v m, gdallocationinfo %v m", i/tile.Cols, i%tile.Cols, pts[k][0], pts[k][1], got, ref[k])
			}
		}
	}
	if bad > 0 {
		t.Errorf("%d of %d samples differ from gdallocationinfo", bad, len(pts))
	}
}

// gtCheckAgainstGrid compares a decoded tile with the grid it was written
// from: geometry to 1e-9° and every height exactly (nodata → NaN).
func gtCheckAgainstGrid(t *testing.T, tile *Tile, g *gtGrid, southUp bool) {
	t.Helper()
	if tile.Rows != g.rows || tile.Cols != g.cols {
		t.Fatalf("tile is %d×%d, grid %d×%d", tile.Rows, tile.Cols, g.rows, g.cols)
	}
	const tolDeg = 1e-9 // degrees
	wantLat0 := g.south + (float64(g.rows)-0.5)*g.dlat
	wantLon0 := g.west + 0.5*g.dlon
	if math.Abs(tile.Lat0-wantLat0) > tolDeg || math.Abs(tile.Lon0-wantLon0) > tolDeg ||
		math.Abs(tile.DLat-g.dlat) > tolDeg || math.Abs(tile.DLon-g.dlon) > tolDeg {
		t.Errorf("geometry Lat0 %.12f Lon0 %.12f DLat %.12f DLon %.12f, want %.12f %.12f %.12f %.12f",
			tile.Lat0, tile.Lon0, tile.DLat, tile.DLon, wantLat0, wantLon0, g.dlat, g.dlon)
	}
	voids, bad := 0, 0
	for r := range g.rows {
		gr := r
		if southUp { // the file's first row is the grid's first, now placed south
			gr = g.rows - 1 - r
		}
		for c := range g.cols {
			want := g.h[gr*g.cols+c]
			if want == g.nodata {
				want = math.NaN()
				voids++
			}
			if got := float64(tile.H[r*g.cols+c]); !gtSame(got, want) {
				if bad++; bad <= 5 {
					t.Errorf("H[%d,%d] = %v m, grid %v m", r, c, got, want)
				}
			}
		}
	}
	if tile.Voids != voids {
		t.Errorf("Voids = %d, grid has %d nodata cells", tile.Voids, voids)
	}
	if voids == 0 {
		t.Errorf("test grid has no nodata cells; the nodata path went untested")
	}
}

func TestReadGeoTIFFAgainstGDAL(t *testing.T) {
	gtNeedGDAL(t)
	const arcsec = 1.0 / 3600
	cases := []struct {
		name       string
		typ        string
		rows, cols int
		dlon, dlat float64
		southUp    bool
		omitNodata bool // set nodata with -a_nodata instead of the .asc header
		args       []string
	}{
		{"int16 LZW predictor 2 strips", "Int16", 29, 37, 3 * arcsec, 3 * arcsec, false, false,
			[]string{"-a_srs", "EPSG:4326", "-co", "COMPRESS=LZW", "-co", "PREDICTOR=2"}},
		{"int16 LZW predictor 2 tiles 16x16", "Int16", 29, 37, 3 * arcsec, 3 * arcsec, false, false,
			[]string{"-a_srs", "EPSG:4326", "-co", "TILED=YES", "-co", "BLOCKXSIZE=16", "-co", "BLOCKYSIZE=16", "-co", "COMPRESS=LZW", "-co", "PREDICTOR=2"}},
		{"int16 Deflate 5-row strips pixel-is-point", "Int16", 29, 37, 1 * arcsec, 1 * arcsec, false, false,
			[]string{"-a_srs", "EPSG:4326", "-co", "BLOCKYSIZE=5", "-co", "COMPRESS=DEFLATE", "-mo", "AREA_OR_POINT=Point"}},
		{"int16 PackBits tiles big-endian", "Int16", 29, 37, 30 * arcsec, 30 * arcsec, false, false,
			[]string{"-a_srs", "EPSG:4326", "-co", "TILED=YES", "-co", "BLOCKXSIZE=16", "-co", "BLOCKYSIZE=32", "-co", "COMPRESS=PACKBITS", "-co", "ENDIANNESS=BIG"}},
		{"int16 uncompressed -a_nodata", "Int16", 29, 37, 3 * arcsec, 3 * arcsec, false, true,
			[]string{"-a_srs", "EPSG:4326", "-co", "COMPRESS=NONE", "-a_nodata", "-32768"}},
		{"int16 LZW big-endian pixel-is-point non-square", "Int16", 31, 23, 3 * arcsec, 2 * arcsec, false, false,
			[]string{"-a_srs", "EPSG:4326", "-co", "COMPRESS=LZW", "-co", "PREDICTOR=2", "-co", "ENDIANNESS=BIG", "-mo", "AREA_OR_POINT=Point"}},
		{"int16 LZW south-up", "Int16", 29, 37, 3 * arcsec, 3 * arcsec, true, false,
			[]string{"-a_srs", "EPSG:4326", "-co", "COMPRESS=LZW"}},
		{"uint16 LZW predictor 2 tiles", "UInt16", 29, 37, 3 * arcsec, 3 * arcsec, false, false,
			[]string{"-a_srs", "EPSG:4326", "-co", "TILED=YES", "-co", "BLOCKXSIZE=16", "-co", "BLOCKYSIZE=16", "-co", "COMPRESS=LZW", "-co", "PREDICTOR=2"}},
		{"uint16 Deflate big-endian point", "UInt16", 29, 37, 3 * arcsec, 3 * arcsec, false, false,
			[]string{"-a_srs", "EPSG:4326", "-co", "COMPRESS=DEFLATE", "-co", "ENDIANNESS=BIG", "-mo", "AREA_OR_POINT=Point"}},
		{"float32 LZW predictor 3 tiles", "Float32", 29, 37, 3 * arcsec, 3 * arcsec, false, false,
			[]string{"-a_srs", "EPSG:4326", "-co", "TILED=YES", "-co", "BLOCKXSIZE=16", "-co", "BLOCKYSIZE=16", "-co", "COMPRESS=LZW", "-co", "PREDICTOR=3"}},
		// Not big-endian with predictor 3: GDAL 3.6 writes such files so that
		// it reads back values other than those written.
		{"float32 Deflate predictor 3 strips", "Float32", 29, 37, 3 * arcsec, 3 * arcsec, false, false,
			[]string{"-a_srs", "EPSG:4326", "-co", "COMPRESS=DEFLATE", "-co", "PREDICTOR=3", "-co", "BLOCKYSIZE=7"}},
		{"float32 LZW predictor 2 big-endian", "Float32", 29, 37, 3 * arcsec, 3 * arcsec, false, false,
			[]string{"-a_srs", "EPSG:4326", "-co", "COMPRESS=LZW", "-co", "PREDICTOR=2", "-co", "ENDIANNESS=BIG"}},
		{"float32 uncompressed big-endian", "Float32", 29, 37, 3 * arcsec, 3 * arcsec, false, false,
			[]string{"-a_srs", "EPSG:4326", "-co", "ENDIANNESS=BIG"}},
		{"float32 Deflate predictor 2 1-row strips", "Float32", 29, 37, 3 * arcsec, 3 * arcsec, false, false,
			[]string{"-a_srs", "EPSG:4326", "-co", "BLOCKYSIZE=1", "-co", "COMPRESS=DEFLATE", "-co", "PREDICTOR=2"}},
		{"float32 PackBits BigTIFF point", "Float32", 29, 37, 3 * arcsec, 3 * arcsec, false, false,
			[]string{"-a_srs", "EPSG:4326", "-co", "COMPRESS=PACKBITS", "-co", "BIGTIFF=YES", "-mo", "AREA_OR_POINT=Point"}},
		{"int16 LZW BigTIFF tiles big-endian", "Int16", 29, 37, 3 * arcsec, 3 * arcsec, false, false,
			[]string{"-a_srs", "EPSG:4326", "-co", "TILED=YES", "-co", "COMPRESS=LZW", "-co", "BIGTIFF=YES", "-co", "ENDIANNESS=BIG"}},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			g := gtMakeGrid(tc.typ, tc.rows, tc.cols, 7.25, 45.5, tc.dlon, tc.dlat)
			g.omitAscNodata = tc.omitNodata
			dir := t.TempDir()
			path := g.gtTranslate(t, dir, "dem.tif", tc.southUp, "", tc.args...)
			tile, err := ReadGeoTIFF(path)
			if err != nil {
				t.Fatalf("ReadGeoTIFF: %v", err)
			}
			if tile.Name != "dem.tif" {
				t.Errorf("Name = %q, want the base name dem.tif", tile.Name)
			}
			gtCheckAgainstGrid(t, tile, g, tc.southUp)
			gtCheckAgainstGDAL(t, path, tile, tc.rows*tc.cols)
		})
	}
}

func TestReadGeoTIFFRefuses(t *testing.T) {
	gtNeedGDAL(t)
	cases := []struct {
		name         string
		typ          string
		geoTransform string // replaces the geotransform through a VRT
		args         []string
		want         error
		wantMsg      string
	}{
		{"projected UTM 32N", "Int16", "", []string{"-a_srs", "EPSG:32632"},
			ErrUnsupportedGeoTIFF, "projected coordinate system (EPSG:32632); convert to WGS84 degrees with: gdalwarp -t_srs EPSG:4326 in.tif out.tif"},
		{"NAD83 degrees", "Int16", "", []string{"-a_srs", "EPSG:4269"},
			ErrUnsupportedGeoTIFF, "EPSG:4269, not WGS84 (EPSG:4326); convert with: gdalwarp -t_srs EPSG:4326"},
		{"no coordinate system", "Int16", "", nil,
			ErrUnsupportedGeoTIFF, "gdal_translate -a_srs EPSG:4326"},
		{"int32 samples", "Int32", "", []string{"-a_srs", "EPSG:4326"},
			ErrUnsupportedGeoTIFF, "32-bit signed integer samples"},
		{"byte samples", "Byte", "", []string{"-a_srs", "EPSG:4326"},
			ErrUnsupportedGeoTIFF, "8-bit unsigned integer samples"},
		{"float64 samples", "Float64", "", []string{"-a_srs", "EPSG:4326"},
			ErrUnsupportedGeoTIFF, "64-bit floating-point samples"},
		{"two bands", "Int16", "", []string{"-a_srs", "EPSG:4326", "-b", "1", "-b", "1"},
			ErrUnsupportedGeoTIFF, "2 bands; extract the elevation band with gdal_translate -b 1"},
		{"ZSTD compression", "Int16", "", []string{"-a_srs", "EPSG:4326", "-co", "COMPRESS=ZSTD"},
			ErrUnsupportedGeoTIFF, "compression 50000 is not supported"},
		{"rotated grid", "Int16", "7.25, 0.01, 0.002, 46.5, 0.001, -0.01", []string{"-a_srs", "EPSG:4326"},
			ErrUnsupportedGeoTIFF, "rotated or sheared; resample it north-up with: gdalwarp -t_srs EPSG:4326"},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			g := gtMakeGrid("Int16", 12, 10, 7.25, 45.5, 0.01, 0.01)
			g.typ = tc.typ
			path := g.gtTranslate(t, t.TempDir(), "bad.tif", false, tc.geoTransform, tc.args...)
			_, err := ReadGeoTIFF(path)
			if !errors.Is(err, tc.want) {
				t.Fatalf("ReadGeoTIFF error %v, want one wrapping %v", err, tc.want)
			}
			if !strings.Contains(err.Error(), tc.wantMsg) || !strings.HasPrefix(err.Error(), "bad.tif: ") {
				t.Errorf("error %q, want it to start with the file name and contain %q", err, tc.wantMsg)
			}
			if _, _, _, _, err := GeoTIFFBounds(path); !errors.Is(err, tc.want) {
				t.Errorf("GeoTIFFBounds error %v, want one wrapping %v", err, tc.want)
			}
		})
	}
}

// TestReadGeoTIFFRealElev checks a real DEM: elev.tif from Debian's
// r-cran-terra (30″ int16 LZW) against gdallocationinfo.
func TestReadGeoTIFFRealElev(t *testing.T) {
	path := gtRefData(t, "elev.tif")
	gtNeedGDAL(t)
	tile, err := ReadGeoTIFF(path)
	if err != nil {
		t.Fatalf("ReadGeoTIFF: %v", err)
	}
	// Extent published with the file (the terra package documentation): 5.74–6.53°E,
	// 49.44–50.19°N at 30″ — pixel edges; sample centres lie half a pixel in.
	const tolDeg = 0.01 // degrees: the published extent is rounded to 0.01°
	const arcsec30 = 30.0 / 3600
	for _, c := range []struct {
		name      string
		got, want float64
	}{
		{"west", tile.Lon0 - tile.DLon/2, 5.74},
		{"east", tile.Lon0 + (float64(tile.Cols)-0.5)*tile.DLon, 6.53},
		{"north", tile.Lat0 + tile.DLat/2, 50.19},
		{"south", tile.Lat0 - (float64(tile.Rows)-0.5)*tile.DLat, 49.44},
		{"DLat", tile.DLat, arcsec30},
		{"DLon", tile.DLon, arcsec30},
	} {
		if math.Abs(c.got-c.want) > tolDeg {
			t.Errorf("%s = %.6f, want %.6f ± %g", c.name, c.got, c.want, tolDeg)
		}
	}
	if tile.Voids == 0 || tile.Voids == len(tile.H) {
		t.Errorf("Voids = %d of %d; elev.tif has nodata outside its outline", tile.Voids, len(tile.H))
	}
	gtCheckAgainstGDAL(t, path, tile, 200)
}

// gtSeeds are the tiny GDAL-written files committed under testdata/geotiff
// (regenerated with -update). They seed the fuzzer and test the decoder
// without GDAL, against the grid they were written from.
var gtSeeds = []struct {
	file    string
	typ     string
	southUp bool
	args    []string
}{
	{"int16_lzw_pred2_strips.tif", "Int16", false, []string{"-a_srs", "EPSG:4326", "-co", "COMPRESS=LZW", "-co", "PREDICTOR=2", "-co", "BLOCKYSIZE=4"}},
	{"int16_deflate_tiles_be_point.tif", "Int16", false, []string{"-a_srs", "EPSG:4326", "-co", "TILED=YES", "-co", "BLOCKXSIZE=16", "-co", "BLOCKYSIZE=16", "-co", "COMPRESS=DEFLATE", "-co", "ENDIANNESS=BIG", "-mo", "AREA_OR_POINT=Point"}},
	{"uint16_packbits_southup.tif", "UInt16", true, []string{"-a_srs", "EPSG:4326", "-co", "COMPRESS=PACKBITS"}},
	{"float32_lzw_pred3_tiles.tif", "Float32", false, []string{"-a_srs", "EPSG:4326", "-co", "TILED=YES", "-co", "BLOCKXSIZE=16", "-co", "BLOCKYSIZE=16", "-co", "COMPRESS=LZW", "-co", "PREDICTOR=3"}},
	{"float32_none_bigtiff.tif", "Float32", false, []string{"-a_srs", "EPSG:4326", "-co", "BIGTIFF=YES"}},
}

func gtSeedGrid(typ string) *gtGrid {
	return gtMakeGrid(typ, 13, 18, 9.5, 44.25, 1.0/120, 1.0/120)
}

func TestDecodeGeoTIFFTestdata(t *testing.T) {
	dir := filepath.Join("testdata", "geotiff")
	if gtUpdate() {
		gtNeedGDAL(t)
		if err := os.MkdirAll(dir, 0o755); err != nil {
			t.Fatal(err)
		}
		for _, s := range gtSeeds {
			tmp := t.TempDir()
			p := gtSeedGrid(s.typ).gtTranslate(t, tmp, s.file, s.southUp, "", s.args...)
			b, err := os.ReadFile(p)
			if err != nil {
				t.Fatal(err)
			}
			if err := os.WriteFile(filepath.Join(dir, s.file), b, 0o644); err != nil {
				t.Fatal(err)
			}
		}
	}
	for _, s := range gtSeeds {
		t.Run(s.file, func(t *testing.T) {
			b, err := os.ReadFile(filepath.Join(dir, s.file))
			if err != nil {
				t.Fatalf("%v (regenerate with go test -run TestDecodeGeoTIFFTestdata -update)", err)
			}
			tile, err := DecodeGeoTIFF(bytes.NewReader(b), int64(len(b)), s.file)
			if err != nil {
				t.Fatalf("DecodeGeoTIFF: %v", err)
			}
			gtCheckAgainstGrid(t, tile, gtSeedGrid(s.typ), s.southUp)
		})
	}
}

// gtTIFF builds a little-endian classic TIFF by hand, for headers GDAL
// will not write. Entries are (tag, type, values); values that do not fit
// in 4 bytes are placed after the IFD. data is appended at the end and its
// offset substituted for the value gtDataOffset.
type gtEntry struct {
	tag, typ uint16
	vals     []uint64  // SHORT/LONG/ASCII bytes
	dbls     []float64 // DOUBLE
}

const gtDataOffset = 0xDA7A

func gtTIFF(entries []gtEntry, data []byte) []byte {
	le := func(b []byte, v uint64, n int) []byte {
		for i := range n {
			b = append(b, byte(v>>(8*i)))
		}
		return b
	}
	size := map[uint16]int{2: 1, 3: 2, 4: 4, 12: 8}
	ifdLen := 2 + 12*len(entries) + 4
	extra := []byte{}
	extraAt := 8 + ifdLen
	// Lay out out-of-line values first to know the data offset.
	var payload [][]byte
	for _, e := range entries {
		var v []byte
		if e.typ == 12 {
			for _, d := range e.dbls {
				v = le(v, math.Float64bits(d), 8)
			}
		} else {
			for _, x := range e.vals {
				v = le(v, x, size[e.typ])
			}
		}
		payload = append(payload, v)
		if len(v) > 4 {
			extra = append(extra, v...)
		}
	}
	dataAt := uint64(extraAt + len(extra))
	out := []byte("II*\x00")
	out = le(out, 8, 4)
	out = le(out, uint64(len(entries)), 2)
	ext := uint64(extraAt)
	for i, e := range entries {
		v := payload[i]
		out = le(out, uint64(e.tag), 2)
		out = le(out, uint64(e.typ), 2)
		n := len(e.vals)
		if e.typ == 12 {
			n = len(e.dbls)
		}
		out = le(out, uint64(n), 4)
		if len(v) > 4 {
			out = le(out, ext, 4)
			ext += uint64(len(v))
			continue
		}
		if len(e.vals) == 1 && e.vals[0] == gtDataOffset {
			v = le(nil, dataAt, 4)
		}
		for len(v) < 4 {
			v = append(v, 0)
		}
		out = append(out, v...)
	}
	out = le(out, 0, 4)
	out = append(out, extra...)
	return append(out, data...)
}

// gtGeoEntries georeferences a hand-built TIFF in WGS84, pixel-is-point.
func gtGeoEntries(scale, tie []float64) []gtEntry {
	return []gtEntry{
		{tag: tagPixelScale, typ: 12, dbls: scale},
		{tag: tagTiepoint, typ: 12, dbls: tie},
		{tag: tagGeoKeys, typ: 3, vals: []uint64{1, 1, 0, 3, keyModelType, 0, 1, 2, keyRasterType, 0, 1, 2, keyGeographic, 0, 1, epsgWGS84}},
	}
}

// gtInt16Image describes a w×h uncompressed int16 image in one strip of
// count bytes at gtDataOffset.
func gtInt16Image(w, h uint64, count uint64, extra ...gtEntry) []gtEntry {
	e := []gtEntry{
		{tag: tagImageWidth, typ: 4, vals: []uint64{w}},
		{tag: tagImageLength, typ: 4, vals: []uint64{h}},
		{tag: tagBitsPerSample, typ: 3, vals: []uint64{16}},
		{tag: tagStripOffsets, typ: 4, vals: []uint64{gtDataOffset}},
		{tag: tagStripBytes, typ: 4, vals: []uint64{count}},
		{tag: tagSampleFormat, typ: 3, vals: []uint64{2}},
	}
	return append(e, extra...)
}

// TestDecodeGeoTIFFHandBuilt covers headers GDAL does not write: south-up
// and east-to-west scales, and hostile sizes. Expected placements follow
// GeoTIFF 1.1 §7.4 (lon = X + (i − I)·Sx, lat = Y − (j − J)·Sy).
func TestDecodeGeoTIFFHandBuilt(t *testing.T) {
	// Samples 1..6 in file order, 3 wide, 2 high, little-endian int16.
	data := []byte{1, 0, 2, 0, 3, 0, 4, 0, 5, 0, 6, 0}
	geo := gtGeoEntries([]float64{0.5, 0.25, 0}, []float64{0, 0, 0, 10, 50, 0})
	cases := []struct {
		name       string
		file       []byte
		wantErr    error
		wantH      []float32
		lat0, lon0 float64
		sizeExtra  int64 // claim this many bytes more than the reader holds
	}{
		{"north-up point", gtTIFF(append(gtInt16Image(3, 2, 12), geo...), data), nil,
			[]float32{1, 2, 3, 4, 5, 6}, 50, 10, 0},
		{"south-up point", gtTIFF(append(gtInt16Image(3, 2, 12), gtGeoEntries([]float64{0.5, -0.25, 0}, []float64{0, 0, 0, 10, 50, 0})...), data), nil,
			[]float32{4, 5, 6, 1, 2, 3}, 50.25, 10, 0},
		{"east-to-west point", gtTIFF(append(gtInt16Image(3, 2, 12), gtGeoEntries([]float64{-0.5, 0.25, 0}, []float64{0, 0, 0, 10, 50, 0})...), data), nil,
			[]float32{3, 2, 1, 6, 5, 4}, 50, 9, 0},
		{"huge dimensions", gtTIFF(append(gtInt16Image(100000, 100000, 12), geo...), data), ErrUnsupportedGeoTIFF, nil, 0, 0, 0},
		{"dimensions beyond compressed data", gtTIFF(append(gtInt16Image(3000, 2000, 12), geo...), data), ErrBadGeoTIFF, nil, 0, 0, 0},
		{"strip past end of file", gtTIFF(append(gtInt16Image(3, 2, 1<<20), geo...), data), ErrBadGeoTIFF, nil, 0, 0, 0},
		{"zero width", gtTIFF(append(gtInt16Image(0, 2, 12), geo...), data), ErrBadGeoTIFF, nil, 0, 0, 0},
		{"several tiepoints", gtTIFF(append(gtInt16Image(3, 2, 12), gtGeoEntries([]float64{0.5, 0.25, 0}, []float64{0, 0, 0, 10, 50, 0, 2, 1, 0, 11, 49.75, 0})...), data), ErrUnsupportedGeoTIFF, nil, 0, 0, 0},
		{"latitude beyond the pole", gtTIFF(append(gtInt16Image(3, 2, 12), gtGeoEntries([]float64{0.5, 0.25, 0}, []float64{0, 0, 0, 10, 95, 0})...), data), ErrBadGeoTIFF, nil, 0, 0, 0},
		{"not a TIFF", []byte("PK\x03\x04 not a tiff at all"), ErrBadGeoTIFF, nil, 0, 0, 0},
		{"header only", []byte("II*\x00"), ErrBadGeoTIFF, nil, 0, 0, 0},
		{"IFD past end", []byte("II*\x00\xff\xff\x00\x00"), ErrBadGeoTIFF, nil, 0, 0, 0},
		{"reader shorter than declared size", gtTIFF(append(gtInt16Image(3, 2, 12), geo...), data)[:100], ErrBadGeoTIFF, nil, 0, 0, 300},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			tile, err := DecodeGeoTIFF(bytes.NewReader(tc.file), int64(len(tc.file))+tc.sizeExtra, "hand.tif")
			if tc.wantErr != nil {
				if !errors.Is(err, tc.wantErr) {
					t.Fatalf("error %v, want one wrapping %v", err, tc.wantErr)
				}
				return
			}
			if err != nil {
				t.Fatalf("DecodeGeoTIFF: %v", err)
			}
			const tolDeg = 1e-12 // degrees: exact binary fractions
			if math.Abs(tile.Lat0-tc.lat0) > tolDeg || math.Abs(tile.Lon0-tc.lon0) > tolDeg || tile.DLat != 0.25 || tile.DLon != 0.5 {
				t.Errorf("Lat0 %v Lon0 %v DLat %v DLon %v, want %v %v 0.25 0.5", tile.Lat0, tile.Lon0, tile.DLat, tile.DLon, tc.lat0, tc.lon0)
			}
			if fmt.Sprint(tile.H) != fmt.Sprint(tc.wantH) {
				t.Errorf("H = %v, want %v", tile.H, tc.wantH)
			}
		})
	}
}

func TestUnpackBits(t *testing.T) {
	// TIFF 6.0 §9 worked example: packed and unpacked forms.
	packed := []byte{0xFE, 0xAA, 0x02, 0x80, 0x00, 0x2A, 0xFD, 0xAA, 0x03, 0x80, 0x00, 0x2A, 0x22, 0xF7, 0xAA}
	want := []byte{0xAA, 0xAA, 0xAA, 0x80, 0x00, 0x2A, 0xAA, 0xAA, 0xAA, 0xAA, 0x80, 0x00, 0x2A, 0x22, 0xAA, 0xAA, 0xAA, 0xAA, 0xAA, 0xAA, 0xAA, 0xAA, 0xAA, 0xAA}
	cases := []struct {
		name    string
		in      []byte
		n       int
		wantErr bool
	}{
		{"spec example", packed, len(want), false},
		{"short data", packed[:5], len(want), true},
		{"run overruns output", packed, 5, true},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			out := make([]byte, tc.n)
			err := unpackBits(out, tc.in)
			if (err != nil) != tc.wantErr {
				t.Fatalf("err = %v, want error %v", err, tc.wantErr)
			}
			if err == nil && !bytes.Equal(out, want) {
				t.Errorf("got % x, want % x", out, want)
			}
		})
	}
}

func FuzzDecodeGeoTIFF(f *testing.F) {
	files, _ := filepath.Glob(filepath.Join("testdata", "geotiff", "*.tif"))
	if len(files) == 0 {
		f.Fatal("no seeds under testdata/geotiff; regenerate with -update")
	}
	for _, p := range files {
		b, err := os.ReadFile(p)
		if err != nil {
			f.Fatal(err)
		}
		f.Add(b)
	}
	f.Fuzz(func(t *testing.T, b []byte) {
		tile, err := DecodeGeoTIFF(bytes.NewReader(b), int64(len(b)), "fuzz.tif")
		if err != nil {
			if !errors.Is(err, ErrBadGeoTIFF) && !errors.Is(err, ErrUnsupportedGeoTIFF) {
				t.Fatalf("error wraps neither sentinel: %v", err)
			}
			return
		}
		if tile.Rows < 1 || tile.Cols < 1 || len(tile.H) != tile.Rows*tile.Cols || !(tile.DLat > 0) || !(tile.DLon > 0) {
			t.Fatalf("inconsistent tile: %d×%d, %d heights, spacing %v×%v", tile.Rows, tile.Cols, len(tile.H), tile.DLat, tile.DLon)
		}
	})
}

func BenchmarkDecodeGeoTIFF(b *testing.B) {
	gtNeedGDAL(b)
	for _, bc := range []struct {
		name string
		args []string
	}{
		{"1201x1201 int16 LZW", []string{"-a_srs", "EPSG:4326", "-co", "COMPRESS=LZW"}},
		{"1201x1201 int16 LZW predictor 2", []string{"-a_srs", "EPSG:4326", "-co", "COMPRESS=LZW", "-co", "PREDICTOR=2"}},
	} {
		b.Run(bc.name, func(b *testing.B) {
			g := gtMakeGrid("Int16", 1201, 1201, 7, 45, 1.0/1200, 1.0/1200)
			p := g.gtTranslate(b, b.TempDir(), "bench.tif", false, "", bc.args...)
			data, err := os.ReadFile(p)
			if err != nil {
				b.Fatal(err)
			}
			b.ReportAllocs()
			b.SetBytes(1201 * 1201 * 2)
			b.ResetTimer()
			for b.Loop() {
				if _, err := DecodeGeoTIFF(bytes.NewReader(data), int64(len(data)), "bench.tif"); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}
