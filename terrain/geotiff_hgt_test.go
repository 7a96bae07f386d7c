package terrain

import (
	"math"
	"os/exec"
	"path/filepath"
	"testing"
)

// TestGeoTIFFEqualsHGT writes one generated grid with GDAL 3.6 as an SRTM
// tile (gdal_translate -of SRTMHGT), has GDAL rewrite that tile as GeoTIFFs of every layout the
// reader supports (int16 and float32, striped and tiled, LZW and Deflate,
// with the horizontal predictor) and checks that the GeoTIFF reader returns
// exactly the HGT reader's samples at exactly the same positions.
func TestGeoTIFFEqualsHGT(t *testing.T) {
	htNeedGDAL(t)
	dir := t.TempDir()
	hgt := htWriteHGT(t, dir, HGTSamples3, 45, 7, htGrid(HGTSamples3, 45, 7, false))
	want, err := ReadHGT(hgt)
	if err != nil {
		t.Fatal(err)
	}
	variants := []struct {
		name string
		args []string
	}{
		{"int16-strips-lzw-pred2", []string{"-ot", "Int16", "-co", "COMPRESS=LZW", "-co", "PREDICTOR=2"}},
		{"int16-tiles-deflate-pred2", []string{"-ot", "Int16", "-co", "TILED=YES", "-co", "COMPRESS=DEFLATE", "-co", "PREDICTOR=2"}},
		{"int16-strips-none", []string{"-ot", "Int16"}},
		{"float32-tiles-lzw", []string{"-ot", "Float32", "-co", "TILED=YES", "-co", "COMPRESS=LZW"}},
		{"float32-strips-deflate-pred3", []string{"-ot", "Float32", "-co", "COMPRESS=DEFLATE", "-co", "PREDICTOR=3"}},
	}
	for _, v := range variants {
		t.Run(v.name, func(t *testing.T) {
			tif := filepath.Join(dir, v.name+".tif")
			args := append([]string{"-q", "-a_srs", "EPSG:4326"}, v.args...)
			args = append(args, hgt, tif) // GDAL reads the tile it wrote and rewrites the grid as a GeoTIFF
			if out, err := exec.Command("gdal_translate", args...).CombinedOutput(); err != nil {
				t.Fatalf("gdal_translate: %v\n%s", err, out)
			}
			got, err := ReadGeoTIFF(tif)
			if err != nil {
				t.Fatal(err)
			}
			if got.Rows != want.Rows || got.Cols != want.Cols {
				t.Fatalf("size %d×%d, HGT %d×%d", got.Rows, got.Cols, want.Rows, want.Cols)
			}
			for _, d := range []struct {
				name string
				a, b float64
			}{{"Lat0", got.Lat0, want.Lat0}, {"Lon0", got.Lon0, want.Lon0}, {"DLat", got.DLat, want.DLat}, {"DLon", got.DLon, want.DLon}} {
				if math.Abs(d.a-d.b) > 1e-9 {
					t.Errorf("%s %.12f, HGT %.12f", d.name, d.a, d.b)
				}
			}
			bad := 0
			for i := range want.H {
				if got.H[i] != want.H[i] {
					if bad < 5 {
						t.Errorf("sample %d: GeoTIFF %v, HGT %v", i, got.H[i], want.H[i])
					}
					bad++
				}
			}
			if bad > 0 {
				t.Errorf("%d samples differ", bad)
			}
		})
	}
}
