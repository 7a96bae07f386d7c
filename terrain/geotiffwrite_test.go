package terrain

import (
	"bytes"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"strconv"
	"strings"
	"testing"
)

// gwGrid is a small test raster: values from their row and column, with
// nodata in one corner and a negative value.
func gwGrid(nodata float32) GeoTIFFGrid {
	g := GeoTIFFGrid{Rows: 7, Cols: 5000, West: 11.25, North: 57.75, DLatDeg: 1.0 / 1200, DLonDeg: 1.0 / 600, NoData: nodata}
	g.Values = make([]float32, g.Rows*g.Cols)
	for r := range g.Rows {
		for c := range g.Cols {
			g.Values[r*g.Cols+c] = float32(r)*1000 + float32(c)*0.25 - 3.5
		}
	}
	g.Values[0] = nodata
	return g
}

func gwWrite(t *testing.T, g GeoTIFFGrid) string {
	t.Helper()
	var buf bytes.Buffer
	if err := EncodeGeoTIFF(&buf, g); err != nil {
		t.Fatal(err)
	}
	var again bytes.Buffer
	if err := EncodeGeoTIFF(&again, g); err != nil {
		t.Fatal(err)
	}
	if !bytes.Equal(buf.Bytes(), again.Bytes()) {
		t.Fatal("the same grid gave different bytes")
	}
	path := filepath.Join(t.TempDir(), "grid.tif")
	if err := os.WriteFile(path, buf.Bytes(), 0o644); err != nil {
		t.Fatal(err)
	}
	return path
}

// TestEncodeGeoTIFFReadBack reads the file back with our own reader
// (ReadGeoTIFF, which takes pixel-is-area to sample positions at the cell
// centres) for the two nodata conventions.
func TestEncodeGeoTIFFReadBack(t *testing.T) {
	for _, nd := range []float32{-9999, float32(math.NaN())} {
		g := gwGrid(nd)
		tile, err := ReadGeoTIFF(gwWrite(t, g))
		if err != nil {
			t.Fatal(err)
		}
		if tile.Rows != g.Rows || tile.Cols != g.Cols {
			t.Fatalf("%d × %d, want %d × %d", tile.Rows, tile.Cols, g.Rows, g.Cols)
		}
		if math.Abs(tile.Lat0-(g.North-g.DLatDeg/2)) > 1e-12 || math.Abs(tile.Lon0-(g.West+g.DLonDeg/2)) > 1e-12 ||
			math.Abs(tile.DLat-g.DLatDeg) > 1e-15 || math.Abs(tile.DLon-g.DLonDeg) > 1e-15 {
			t.Errorf("georeference: first centre %v,%v spacing %v,%v", tile.Lat0, tile.Lon0, tile.DLat, tile.DLon)
		}
		for i, v := range g.Values {
			got := tile.H[i]
			if i == 0 {
				if got == got {
					t.Errorf("nodata %v read as %v, want NaN", nd, got)
				}
				continue
			}
			if got != v {
				t.Fatalf("value %d: %v, want %v", i, got, v)
			}
		}
	}
}

func TestEncodeGeoTIFFBadGrid(t *testing.T) {
	for name, g := range map[string]GeoTIFFGrid{
		"short":     {Values: make([]float32, 3), Rows: 2, Cols: 2, DLatDeg: 1, DLonDeg: 1},
		"spacing":   {Values: make([]float32, 4), Rows: 2, Cols: 2, DLatDeg: 0, DLonDeg: 1},
		"past pole": {Values: make([]float32, 4), Rows: 2, Cols: 2, North: 95, DLatDeg: 1, DLonDeg: 1},
	} {
		if err := EncodeGeoTIFF(&bytes.Buffer{}, g); err == nil {
			t.Errorf("%s: accepted", name)
		}
	}
}

// TestEncodeGeoTIFFWithGDAL reads the file with GDAL 3.6 (Debian gdal-bin):
// gdalinfo for the coordinate system, origin, pixel size, type and nodata;
// gdallocationinfo for values at cell centres.
func TestEncodeGeoTIFFWithGDAL(t *testing.T) {
	gtNeedGDAL(t)
	g := gwGrid(-9999)
	path := gwWrite(t, g)
	out, err := exec.Command("gdalinfo", path).CombinedOutput()
	if err != nil {
		t.Fatalf("gdalinfo: %v: %s", err, out)
	}
	info := string(out)
	for _, want := range []string{
		"Size is 5000, 7",
		`ID["EPSG",4326]`,
		"Origin = (11.250000000000000,57.750000000000000)",
		"Pixel Size = (0.001666666666667,-0.000833333333333)",
		"Type=Float32",
		"NoData Value=-9999",
		"AREA_OR_POINT=Area",
	} {
		if !strings.Contains(info, want) {
			t.Errorf("gdalinfo lacks %q:\n%s", want, info)
		}
	}
	for _, rc := range [][2]int{{0, 0}, {0, 1}, {3, 2500}, {6, 4999}, {5, 17}} {
		r, c := rc[0], rc[1]
		lon := g.West + (float64(c)+0.5)*g.DLonDeg
		lat := g.North - (float64(r)+0.5)*g.DLatDeg
		out, err := exec.Command("gdallocationinfo", "-valonly", "-wgs84", path,
			strconv.FormatFloat(lon, 'f', -1, 64), strconv.FormatFloat(lat, 'f', -1, 64)).CombinedOutput()
		if err != nil {
			t.Fatalf("gdallocationinfo: %v: %s", err, out)
		}
		got, err := strconv.ParseFloat(strings.TrimSpace(string(out)), 64)
		if err != nil {
			t.Fatalf("gdallocationinfo printed %q", out)
		}
		if want := float64(g.Values[r*g.Cols+c]); got != want {
			t.Errorf("cell (%d, %d) at %.6f,%.6f: gdallocationinfo %v, want %v", r, c, lat, lon, got, want)
		}
	}
}
