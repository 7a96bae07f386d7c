package terrain

import (
	"encoding/binary"
	"errors"
	"math"
	"math/rand/v2"
	"os"
	"os/exec"
	"path/filepath"
	"slices"
	"strconv"
	"strings"
	"sync"
	"sync/atomic"
	"testing"
)

// htRaw returns an n×n HGT grid (big-endian int16) with heights f(r, c).
func htRaw(n int, f func(r, c int) int16) []byte {
	b := make([]byte, 2*n*n)
	for r := 0; r < n; r++ {
		for c := 0; c < n; c++ {
			binary.BigEndian.PutUint16(b[2*(r*n+c):], uint16(f(r, c)))
		}
	}
	return b
}

// htMosaic writes the 2×2 tiles N45E007, N45E008, N46E007, N46E008 of the
// invented terrain with GDAL into a new directory (interior voids only, so
// the shared edges hold data).
func htMosaic(t *testing.T) string {
	t.Helper()
	htNeedGDAL(t)
	dir := t.TempDir()
	for _, ll := range [][2]int{{45, 7}, {45, 8}, {46, 7}, {46, 8}} {
		htWriteHGT(t, dir, HGTSamples3, ll[0], ll[1], htGrid(HGTSamples3, ll[0], ll[1], true))
	}
	return dir
}

// TestSetSeams: a point on the shared edge of two tiles gets the same
// height from either tile, and heights across the 2×2 mosaic equal the
// bilinear interpolation of the samples gdallocationinfo reads from the
// file holding each cell.
func TestSetSeams(t *testing.T) {
	dir := htMosaic(t)
	set, err := Open(dir)
	if err != nil {
		t.Fatal(err)
	}
	tiles := map[string]*Tile{}
	for _, name := range []string{"N45E007.hgt", "N45E008.hgt", "N46E007.hgt", "N46E008.hgt"} {
		if tiles[name], err = ReadHGT(filepath.Join(dir, name)); err != nil {
			t.Fatal(err)
		}
	}
	rng := rand.New(rand.NewPCG(7, 8))
	edges := []struct {
		name string
		a, b string
		pt   func(f float64) (lat, lon float64)
	}{
		{"north-south edge 46°N west", "N45E007.hgt", "N46E007.hgt", func(f float64) (float64, float64) { return 46, 7 + f }},
		{"north-south edge 46°N east", "N45E008.hgt", "N46E008.hgt", func(f float64) (float64, float64) { return 46, 8 + f }},
		{"east-west edge 8°E south", "N45E007.hgt", "N45E008.hgt", func(f float64) (float64, float64) { return 45 + f, 8 }},
		{"east-west edge 8°E north", "N46E007.hgt", "N46E008.hgt", func(f float64) (float64, float64) { return 46 + f, 8 }},
	}
	for _, e := range edges {
		t.Run(e.name, func(t *testing.T) {
			for i := 0; i < 300; i++ {
				f := rng.Float64()
				if i == 0 {
					f = 0
				} else if i == 1 {
					f = 1
				}
				lat, lon := e.pt(f)
				ha, hb := tiles[e.a].At(lat, lon), tiles[e.b].At(lat, lon)
				hs, src, err := set.Elevation(lat, lon)
				if err != nil {
					t.Fatal(err)
				}
				// Shared edge samples are identical, so both bilinear
				// interpolations reduce to the same 1-D one (tolerance for
				// float64 rounding of the cell fractions).
				if math.Abs(ha-hb) > 1e-6 || math.Abs(hs-ha) > 1e-6 {
					t.Fatalf("%.7f,%.7f: %s %.6f m, %s %.6f m, set %.6f m (%s)", lat, lon, e.a, ha, e.b, hb, hs, src)
				}
			}
		})
	}
	t.Run("mosaic against gdallocationinfo", func(t *testing.T) {
		htCompareSet(t, set, dir, 45, 7, 47, 9, 800, 3)
	})
}

// htCompareSet checks set.Elevation at k random points of the box
// [lat0, lat1]×[lon0, lon1] against htGDALBilinear.
func htCompareSet(t *testing.T, set *Set, dir string, lat0, lon0, lat1, lon1 float64, k int, seed uint64) {
	t.Helper()
	rng := rand.New(rand.NewPCG(seed, 4))
	lats, lons := make([]float64, k), make([]float64, k)
	for i := range lats {
		lats[i] = lat0 + rng.Float64()*(lat1-lat0)
		lons[i] = lon0 + rng.Float64()*(lon1-lon0)
	}
	want := htGDALBilinear(t, dir, lats, lons)
	checked := 0
	for i, w := range want {
		if math.IsNaN(w) {
			continue
		}
		got, src, err := set.Elevation(lats[i], lons[i])
		if err != nil {
			t.Fatal(err)
		}
		if math.Abs(got-w) > 1e-6 {
			t.Errorf("%.7f,%.7f: %.6f m from %s; bilinear of gdallocationinfo samples %.6f m", lats[i], lons[i], got, src, w)
		}
		checked++
	}
	if checked < k*9/10 {
		t.Errorf("only %d of %d points checked", checked, k)
	}
}

// htGDALBilinear returns, for points in 3″ tiles of dir, the bilinear
// interpolation (common practice) of the four samples around each as
// gdallocationinfo reads them from the tile holding the cell; NaN where a
// sample is void or no tile is there.
func htGDALBilinear(t *testing.T, dir string, lats, lons []float64) []float64 {
	t.Helper()
	const d = 1.0 / 1200
	type cell struct{ nlat, wlon float64 }
	cells := make([]cell, len(lats))
	byFile := map[string][]int{}
	for i := range lats {
		row := math.Floor((90 - lats[i]) / d) // global row from 90°N
		col := math.Floor((lons[i] + 180) / d)
		nlat, wlon := 90-row*d, -180+col*d
		cells[i] = cell{nlat, wlon}
		file := HGTName(int(math.Floor(nlat-d/2)), int(math.Floor(wlon+d/2)))
		byFile[file] = append(byFile[file], i)
	}
	out := make([]float64, len(lats))
	for i := range out {
		out[i] = math.NaN()
	}
	for file, idx := range byFile {
		path := filepath.Join(dir, file)
		if _, err := os.Stat(path); err != nil {
			continue
		}
		var ql, qo []float64
		for _, i := range idx {
			c := cells[i]
			ql = append(ql, c.nlat, c.nlat, c.nlat-d, c.nlat-d)
			qo = append(qo, c.wlon, c.wlon+d, c.wlon, c.wlon+d)
		}
		ref := htGDALValues(t, path, ql, qo)
		for m, i := range idx {
			v := ref[4*m : 4*m+4]
			if slices.Contains(v, HGTVoid) || slices.ContainsFunc(v, math.IsNaN) {
				continue
			}
			fy, fx := (cells[i].nlat-lats[i])/d, (lons[i]-cells[i].wlon)/d
			out[i] = v[0]*(1-fx)*(1-fy) + v[1]*fx*(1-fy) + v[2]*(1-fx)*fy + v[3]*fx*fy
		}
	}
	return out
}

// htWriteTiles writes constant-ramp 3″ tiles for the given corners into dir:
// height = 10·index + row/100 (so a wrong tile or row shows).
func htWriteTiles(t testing.TB, dir string, corners [][2]int) {
	t.Helper()
	for i, ll := range corners {
		raw := htRaw(HGTSamples3, func(r, c int) int16 { return int16(10*i + r/100) })
		if err := os.WriteFile(filepath.Join(dir, HGTName(ll[0], ll[1])), raw, 0o644); err != nil {
			t.Fatal(err)
		}
	}
}

func TestSetMissingAndEmpty(t *testing.T) {
	dir := t.TempDir()
	htWriteTiles(t, dir, [][2]int{{45, 7}})
	os.WriteFile(filepath.Join(dir, "notes.txt"), []byte("ignored"), 0o644)
	set, err := Open(dir)
	if err != nil {
		t.Fatal(err)
	}
	if set.Len() != 1 {
		t.Fatalf("Len %d; want 1", set.Len())
	}
	cases := []struct {
		name     string
		lat, lon float64
		wantSrc  string
	}{
		{"inside", 45.5, 7.5, "N45E007.hgt"},
		{"north edge belongs to the tile", 46, 7.5, "N45E007.hgt"},
		{"east edge belongs to the tile", 45.5, 8, "N45E007.hgt"},
		{"north-east corner", 46, 8, "N45E007.hgt"},
		{"north of it", 46.2, 7.5, NoSource},
		{"southern hemisphere", -33.5, -70.5, NoSource},
		{"wrapped longitude", 45.5, 367.5, "N45E007.hgt"},
		{"antimeridian", 10.5, 180, NoSource},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			h, src, err := set.Elevation(c.lat, c.lon)
			if err != nil {
				t.Fatal(err)
			}
			if src != c.wantSrc || (src == NoSource && h != 0) {
				t.Errorf("Elevation = %v m from %q; want source %q", h, src, c.wantSrc)
			}
		})
	}
	// Tile names of the uncovered points, sorted (SRTM naming, NASA SRTM Topography documentation, 2003).
	want := []string{"N10W180.hgt", "N46E007.hgt", "S34W071.hgt"}
	if got := set.Missing(); !slices.Equal(got, want) {
		t.Errorf("Missing = %v; want %v", got, want)
	}
	for _, bad := range [][2]float64{{91, 0}, {math.NaN(), 0}, {0, math.Inf(1)}} {
		if _, _, err := set.Elevation(bad[0], bad[1]); err == nil {
			t.Errorf("Elevation(%v, %v): no error", bad[0], bad[1])
		}
	}

	empty, err := Open()
	if err != nil {
		t.Fatal(err)
	}
	if h, src, err := empty.Elevation(45.5, 7.5); err != nil || src != NoSource || h != 0 {
		t.Errorf("empty set: %v m, %q, %v; want 0 m, none", h, src, err)
	}
	if empty.SpacingM(45) != 0 || empty.Len() != 0 {
		t.Errorf("empty set: spacing %v, len %d", empty.SpacingM(45), empty.Len())
	}

	if _, err := Open(filepath.Join(dir, "notes.txt")); !errors.Is(err, ErrUnsupportedFile) {
		t.Errorf("Open(notes.txt) error %v; want ErrUnsupportedFile", err)
	}
	if _, err := Open(filepath.Join(dir, "nowhere")); !errors.Is(err, os.ErrNotExist) {
		t.Errorf("Open(nowhere) error %v; want os.ErrNotExist", err)
	}
}

func TestSetPrefersFinerAndReportsBadFiles(t *testing.T) {
	dir := t.TempDir()
	coarse := htRaw(HGTSamples3, func(int, int) int16 { return 100 })
	fine := htRaw(HGTSamples1, func(int, int) int16 { return 200 })
	os.WriteFile(filepath.Join(dir, "N45E007.hgt"), coarse, 0o644)
	os.MkdirAll(filepath.Join(dir, "one"), 0o755)
	os.WriteFile(filepath.Join(dir, "one", "n45e007.hgt"), fine, 0o644)
	os.WriteFile(filepath.Join(dir, "N46E007.hgt"), coarse[:1000], 0o644)
	set, err := Open(dir)
	if err != nil {
		t.Fatal(err)
	}
	if h, src, err := set.Elevation(45.3, 7.3); err != nil || h != 200 || src != "n45e007.hgt" {
		t.Errorf("got %v m from %q (%v); want 200 m from the 1″ tile n45e007.hgt", h, src, err)
	}
	_, _, err = set.Elevation(46.5, 7.5)
	if !errors.Is(err, ErrHGT) || !strings.Contains(err.Error(), "N46E007.hgt") {
		t.Errorf("truncated tile: error %v; want ErrHGT naming N46E007.hgt", err)
	}
	// The 1″ spacing: 1/3600° of longitude at 45°N; reference from GeodSolve
	// in TestSpacingM.
	if got := set.SpacingM(45); got > 22 || got < 21 {
		t.Errorf("SpacingM(45) = %v m; want the 1″ east-west spacing ≈ 21.9 m", got)
	}
}

// TestSpacingM compares the sample spacing of 3″ and 1″ tiles with
// geodesic distances of one sample step from GeographicLib's GeodSolve.
func TestSpacingM(t *testing.T) {
	if _, err := exec.LookPath("GeodSolve"); err != nil {
		htCrosscheckMissing(t, "GeodSolve not found (install Debian geographiclib-tools)")
	}
	cases := []struct {
		name string
		n    int
		lat  float64
	}{
		{"3as equator", HGTSamples3, 0.5},
		{"3as 45N", HGTSamples3, 45},
		{"1as 60S", HGTSamples1, -60},
		{"1as 80N", HGTSamples1, 80},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			dir := t.TempDir()
			la := int(math.Floor(c.lat))
			os.WriteFile(filepath.Join(dir, HGTName(la, 7)), make([]byte, 2*c.n*c.n), 0o644)
			set, err := Open(dir)
			if err != nil {
				t.Fatal(err)
			}
			d := 1 / float64(c.n-1)
			ns := htGeodSolveInverse(t, c.lat-d/2, 7, c.lat+d/2, 7)
			ew := htGeodSolveInverse(t, c.lat, 7, c.lat, 7+d)
			want := math.Min(ns, ew)
			// The parallel arc and the geodesic chord of one sample differ
			// by far less than a millimetre.
			if got := set.SpacingM(c.lat); math.Abs(got-want) > 1e-3 {
				t.Errorf("SpacingM(%v) = %.6f m; GeodSolve gives %.6f m (north-south %.6f m)", c.lat, got, want, ns)
			}
		})
	}
}

// htGeodSolveInverse returns the WGS84 geodesic distance in metres from
// GeographicLib's GeodSolve -i.
func htGeodSolveInverse(t testing.TB, lat1, lon1, lat2, lon2 float64) float64 {
	t.Helper()
	cmd := exec.Command("GeodSolve", "-i", "-p", "9")
	cmd.Stdin = strings.NewReader(strconv.FormatFloat(lat1, 'g', 17, 64) + " " + strconv.FormatFloat(lon1, 'g', 17, 64) + " " +
		strconv.FormatFloat(lat2, 'g', 17, 64) + " " + strconv.FormatFloat(lon2, 'g', 17, 64) + "\n")
	out, err := cmd.Output()
	if err != nil {
		t.Fatalf("GeodSolve: %v", err)
	}
	f := strings.Fields(string(out))
	if len(f) != 3 {
		t.Fatalf("GeodSolve output %q", out)
	}
	v, err := strconv.ParseFloat(f[2], 64)
	if err != nil {
		t.Fatal(err)
	}
	return v
}

// TestSetCache: the cache stays within its budget, drops the least recently
// used tile first, and reads each tile once however many goroutines ask.
func TestSetCache(t *testing.T) {
	dir := t.TempDir()
	corners := [][2]int{{45, 7}, {45, 8}, {46, 7}, {46, 8}, {47, 7}, {47, 8}}
	htWriteTiles(t, dir, corners)
	open := func(limit int64) (*Set, *atomic.Int64) {
		set, err := Open(dir)
		if err != nil {
			t.Fatal(err)
		}
		set.SetCacheLimit(limit)
		loads := new(atomic.Int64)
		for _, src := range set.all {
			src.load = func(p string) (*Tile, error) { loads.Add(1); return ReadHGT(p) }
		}
		return set, loads
	}
	tileBytes := int64(HGTSamples3*HGTSamples3) * 4

	t.Run("LRU order and budget", func(t *testing.T) {
		set, loads := open(2*tileBytes + tileBytes/2)
		at := func(i int) {
			if _, _, err := set.Elevation(float64(corners[i][0])+0.5, float64(corners[i][1])+0.5); err != nil {
				t.Fatal(err)
			}
			if b := set.CacheBytes(); b > 2*tileBytes+tileBytes/2 {
				t.Fatalf("cache holds %d bytes; budget %d", b, 2*tileBytes+tileBytes/2)
			}
		}
		at(0)
		at(1)
		at(0) // 0 most recent
		at(2) // evicts 1
		if n := loads.Load(); n != 3 {
			t.Fatalf("%d loads; want 3", n)
		}
		at(0)
		if n := loads.Load(); n != 3 {
			t.Errorf("tile 0 was evicted: %d loads", n)
		}
		at(1)
		if n := loads.Load(); n != 4 {
			t.Errorf("tile 1 should have been evicted and read again: %d loads", n)
		}
		set.SetCacheLimit(0)
		if b := set.CacheBytes(); b != tileBytes {
			t.Errorf("limit 0 keeps %d bytes; want the last tile, %d", b, tileBytes)
		}
	})

	t.Run("one load for many goroutines", func(t *testing.T) {
		set, loads := open(DefaultCacheBytes)
		var wg sync.WaitGroup
		for g := 0; g < 32; g++ {
			wg.Add(1)
			go func() {
				defer wg.Done()
				if _, _, err := set.Elevation(45.5, 7.5); err != nil {
					t.Error(err)
				}
			}()
		}
		wg.Wait()
		if n := loads.Load(); n != 1 {
			t.Errorf("%d loads; want 1", n)
		}
	})

	t.Run("concurrent with evictions", func(t *testing.T) {
		limit := 2 * tileBytes
		set, _ := open(limit)
		var wg sync.WaitGroup
		var maxBytes atomic.Int64
		for g := 0; g < 8; g++ {
			wg.Add(1)
			go func(g int) {
				defer wg.Done()
				rng := rand.New(rand.NewPCG(uint64(g), 9))
				var p Profile
				for i := 0; i < 60; i++ {
					k := rng.IntN(len(corners))
					r := rng.IntN(HGTSamples3)
					lat := float64(corners[k][0]+1) - float64(r)/1200
					lon := float64(corners[k][1]) + 0.1 + 0.8*rng.Float64()
					h, src, err := set.Elevation(lat, lon)
					if err != nil {
						t.Error(err)
						return
					}
					// On a node row, the ramp gives 10·index + row/100 exactly
					// (rows on a tile's north or south edge may come from the
					// neighbour, whose ramp differs: skip those).
					if want := float64(10*k + r/100); r > 0 && r < HGTSamples3-1 && (math.Abs(h-want) > 1e-6 || src != HGTName(corners[k][0], corners[k][1])) {
						t.Errorf("%v,%v: %v m from %s; want %v m from %s", lat, lon, h, src, want, HGTName(corners[k][0], corners[k][1]))
						return
					}
					if i%30 == 0 {
						if err := set.Profile(45.2, 7.2, 47.8, 8.8, 500, &p); err != nil {
							t.Error(err)
							return
						}
					}
					b := set.CacheBytes()
					for {
						m := maxBytes.Load()
						if b <= m || maxBytes.CompareAndSwap(m, b) {
							break
						}
					}
				}
			}(g)
		}
		wg.Wait()
		if m := maxBytes.Load(); m > limit {
			t.Errorf("cache reached %d bytes; budget %d", m, limit)
		}
	})
}

// TestSetSpacingBeforeLoading: the grid size of plain, zipped and gzipped
// tiles is known from file headers (zip member size, gzip ISIZE trailer,
// RFC 1952 §2.3.1) without reading the tiles.
func TestSetSpacingBeforeLoading(t *testing.T) {
	latM, lonM := metresPerDegree(45)
	cases := []struct {
		name, file, member string
		n                  int
	}{
		{"plain 3″", "N45E007.hgt", "", HGTSamples3},
		{"zip 1″", "N45E007.SRTMGL1.hgt.zip", "N45E007.hgt", HGTSamples1},
		{"gzip 3″", "n45e007.hgt.gz", "", HGTSamples3},
		{"gzip 1″", "N45E007.hgt.gz", "", HGTSamples1},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			dir := t.TempDir()
			htWriteContainer(t, filepath.Join(dir, c.file), c.member, make([]byte, 2*c.n*c.n))
			set, err := Open(dir)
			if err != nil {
				t.Fatal(err)
			}
			// One sample step: 1/(n−1) degree of longitude at 45°N.
			want := math.Min(latM, lonM) / float64(c.n-1)
			if got := set.SpacingM(45); math.Abs(got-want) > 1e-9 {
				t.Errorf("SpacingM %v m; want %v m", got, want)
			}
			if b := set.CacheBytes(); b != 0 {
				t.Errorf("%d bytes cached before any height was asked for", b)
			}
		})
	}
}
