package terrain

import (
	"bytes"
	"errors"
	"fmt"
	"math"
	"math/rand/v2"
	"os"
	"os/exec"
	"path/filepath"
	"slices"
	"strconv"
	"testing"
)

// htGDALTileBilinear returns, for points inside tile (read from file), the
// bilinear interpolation (common practice) of the four samples around each
// as gdallocationinfo reads them from file; NaN where one is nodata (NaN in
// tile) or missing, and for points outside the tile.
func htGDALTileBilinear(t *testing.T, tile *Tile, file string, lats, lons []float64) []float64 {
	t.Helper()
	var ql, qo []float64
	var idx []int
	for i := range lats {
		// Clamped into the grid; points outside give NaN below.
		r := math.Max(0, math.Min(math.Floor((tile.Lat0-lats[i])/tile.DLat), float64(tile.Rows-2)))
		c := math.Max(0, math.Min(math.Floor((lons[i]-tile.Lon0)/tile.DLon), float64(tile.Cols-2)))
		idx = append(idx, int(r)*tile.Cols+int(c))
		for _, d := range [4][2]float64{{0, 0}, {0, 1}, {1, 0}, {1, 1}} {
			ql = append(ql, tile.Lat0-(r+d[0])*tile.DLat)
			qo = append(qo, tile.Lon0+(c+d[1])*tile.DLon)
		}
	}
	ref := htGDALValues(t, file, ql, qo)
	out := make([]float64, len(lats))
	for i := range lats {
		j := idx[i]
		nodata := false
		for _, k := range [4]int{j, j + 1, j + tile.Cols, j + tile.Cols + 1} {
			nodata = nodata || math.IsNaN(float64(tile.H[k]))
		}
		v := ref[4*i : 4*i+4]
		if nodata || !tile.Covers(lats[i], lons[i]) || slices.ContainsFunc(v, math.IsNaN) {
			out[i] = math.NaN()
			continue
		}
		fy := (ql[4*i] - lats[i]) / tile.DLat
		fx := (lons[i] - qo[4*i]) / tile.DLon
		out[i] = v[0]*(1-fx)*(1-fy) + v[1]*fx*(1-fy) + v[2]*(1-fx)*fy + v[3]*fx*fy
	}
	return out
}

// TestSetGeoTIFFRealFile reads the real 30″ GeoTIFF elev.tif (Debian
// r-cran-terra, terra/ex/elev.tif) through a Set and compares heights with
// gdallocationinfo.
func TestSetGeoTIFFRealFile(t *testing.T) {
	htNeedGDAL(t)
	path := htRefData(t, "elev.tif")
	set, err := Open(path)
	if err != nil {
		t.Fatal(err)
	}
	tile, err := ReadGeoTIFF(path)
	if err != nil {
		t.Fatal(err)
	}
	latM, lonM := metresPerDegree(49.8)
	if got, want := set.SpacingM(49.8), math.Min(tile.DLat*latM, tile.DLon*lonM); math.Abs(got-want) > 1e-9 {
		t.Errorf("SpacingM %v m; want the file's %v m", got, want)
	}
	rng := rand.New(rand.NewPCG(49, 6))
	south := tile.Lat0 - float64(tile.Rows-1)*tile.DLat
	east := tile.Lon0 + float64(tile.Cols-1)*tile.DLon
	var lats, lons []float64
	for i := 0; i < 400; i++ {
		lats = append(lats, south+rng.Float64()*(tile.Lat0-south))
		lons = append(lons, tile.Lon0+rng.Float64()*(east-tile.Lon0))
	}
	want := htGDALTileBilinear(t, tile, path, lats, lons)
	checked, none := 0, 0
	for i, w := range want {
		h, src, err := set.Elevation(lats[i], lons[i])
		if err != nil {
			t.Fatal(err)
		}
		if src == NoSource {
			none++
			continue
		}
		if src != "elev.tif" {
			t.Fatalf("source %q; want elev.tif", src)
		}
		if math.IsNaN(w) {
			continue
		}
		if math.Abs(h-w) > 1e-6 {
			t.Errorf("%.6f,%.6f: %.4f m; bilinear of gdallocationinfo samples %.4f m", lats[i], lons[i], h, w)
		}
		checked++
	}
	if checked < 100 {
		t.Errorf("only %d points with data checked (%d without)", checked, none)
	}
}

// htWriteGeoTIFF writes an invented int16 grid with cell centres on
// whole multiples of 1/perDeg degree, north-west sample (lat0, lon0), as a
// GeoTIFF with gdal_translate (srs: the -a_srs argument).
func htWriteGeoTIFF(t *testing.T, path string, rows, cols, perDeg int, lat0, lon0 float64, srs string) {
	t.Helper()
	cell := 1 / float64(perDeg)
	var b bytes.Buffer
	fmt.Fprintf(&b, "ncols %d\nnrows %d\nxllcorner %.15g\nyllcorner %.15g\ncellsize %.15g\nNODATA_value %d\n",
		cols, rows, lon0-cell/2, lat0-float64(rows-1)*cell-cell/2, cell, HGTVoid)
	gr0 := int64(math.Round(lat0 * float64(perDeg)))
	gc0 := int64(math.Round(lon0 * float64(perDeg)))
	for r := 0; r < rows; r++ {
		for c := 0; c < cols; c++ {
			if c > 0 {
				b.WriteByte(' ')
			}
			b.WriteString(strconv.Itoa(int(htTerrain(gr0-int64(r), gc0+int64(c), perDeg)) + 7))
		}
		b.WriteByte('\n')
	}
	asc := path + ".asc"
	if err := os.WriteFile(asc, b.Bytes(), 0o644); err != nil {
		t.Fatal(err)
	}
	defer os.Remove(asc)
	cmd := exec.Command("gdal_translate", "-q", "-of", "GTiff", "-ot", "Int16", "-a_srs", srs, asc, path)
	if msg, err := cmd.CombinedOutput(); err != nil {
		t.Fatalf("gdal_translate: %v: %s", err, msg)
	}
	os.Remove(path + ".aux.xml")
}

// TestSetMixedHGTAndGeoTIFF: a 1″ GeoTIFF patch inside a 3″ tile is used
// where it covers (finer wins), the tile elsewhere, in Elevation and in
// Profile; unusable files in a directory are reported by Skipped.
func TestSetMixedHGTAndGeoTIFF(t *testing.T) {
	htNeedGDAL(t)
	dir := t.TempDir()
	hgt := htWriteHGT(t, dir, HGTSamples3, 45, 7, htGrid(HGTSamples3, 45, 7, false))
	patch := filepath.Join(dir, "patch.tif")
	htWriteGeoTIFF(t, patch, 721, 721, 3600, 45.6, 7.4, "EPSG:4326") // 45.4–45.6°N, 7.4–7.6°E
	set, err := Open(dir)
	if err != nil {
		t.Fatal(err)
	}
	if set.Len() != 2 || len(set.Skipped()) != 0 {
		t.Fatalf("Len %d, skipped %v; want 2 files, none skipped", set.Len(), set.Skipped())
	}
	ptile, err := ReadGeoTIFF(patch)
	if err != nil {
		t.Fatal(err)
	}
	htile, err := ReadHGT(hgt)
	if err != nil {
		t.Fatal(err)
	}
	var p Profile
	if err := set.Profile(45.3, 7.3, 45.7, 7.7, 0, &p); err != nil {
		t.Fatal(err)
	}
	if want := []string{"N45E007.hgt", "patch.tif"}; !slices.Equal(p.Sources, want) {
		t.Errorf("Sources %v; want %v", p.Sources, want)
	}
	wantP := htGDALTileBilinear(t, ptile, patch, p.Lat, p.Lon)
	wantH := htGDALTileBilinear(t, htile, hgt, p.Lat, p.Lon)
	inPatch := 0
	for i := range p.Lat {
		in := p.Lat[i] >= 45.4 && p.Lat[i] <= 45.6 && p.Lon[i] >= 7.4 && p.Lon[i] <= 7.6
		want := wantH[i]
		if in {
			want = wantP[i]
			inPatch++
		}
		h, src, err := set.Elevation(p.Lat[i], p.Lon[i])
		if err != nil {
			t.Fatal(err)
		}
		if (src == "patch.tif") != in {
			t.Errorf("sample %d (%.6f, %.6f) from %s", i, p.Lat[i], p.Lon[i], src)
		}
		// The profile samples in grid coordinates (reciprocal spacings):
		// equal to Elevation to rounding.
		if math.Abs(h-p.ElevM[i]) > 1e-9 || math.Abs(h-want) > 1e-6 {
			t.Errorf("sample %d (%.6f, %.6f): profile %.4f m, Elevation %.4f m from %s; bilinear of gdallocationinfo samples %.4f m",
				i, p.Lat[i], p.Lon[i], p.ElevM[i], h, src, want)
		}
	}
	if inPatch < 100 || inPatch == p.Len() {
		t.Errorf("%d of %d samples in the patch", inPatch, p.Len())
	}
	// The 1″ patch sets the default step: 1″ of longitude at 45.7°N.
	latM, lonM := metresPerDegree(45.7)
	if want := math.Min(latM, lonM) / 3600; math.Abs(set.SpacingM(45.7)-want) > 1e-6 {
		t.Errorf("SpacingM %v m; want %v m", set.SpacingM(45.7), want)
	}

	t.Run("unusable files", func(t *testing.T) {
		bad := t.TempDir()
		utm := filepath.Join(bad, "utm.tif")
		htWriteGeoTIFF(t, utm, 20, 20, 3600, 45.6, 7.4, "EPSG:32632")
		os.WriteFile(filepath.Join(bad, "tile.hgt"), make([]byte, HGTBytes3), 0o644)
		set, err := Open(bad)
		if err != nil {
			t.Fatal(err)
		}
		sk := set.Skipped()
		if set.Len() != 0 || len(sk) != 2 {
			t.Fatalf("Len %d, skipped %v; want both files skipped", set.Len(), sk)
		}
		found := map[string]bool{}
		for _, e := range sk {
			found["geotiff"] = found["geotiff"] || errors.Is(e, ErrUnsupportedGeoTIFF)
			found["hgt"] = found["hgt"] || errors.Is(e, ErrHGT)
		}
		if !found["geotiff"] || !found["hgt"] {
			t.Errorf("skipped %v; want ErrUnsupportedGeoTIFF and ErrHGT", sk)
		}
		if _, err := Open(utm); !errors.Is(err, ErrUnsupportedGeoTIFF) {
			t.Errorf("Open(utm.tif) error %v; want ErrUnsupportedGeoTIFF", err)
		}
	})
}
