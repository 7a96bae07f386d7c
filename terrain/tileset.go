package terrain

import (
	"container/list"
	"errors"
	"fmt"
	"io/fs"
	"math"
	"os"
	"path/filepath"
	"slices"
	"sort"
	"strings"
	"sync"
)

// DefaultCacheBytes is the default memory budget of a Set's tile cache:
// 1 GiB, room for about 20 1″ tiles or 180 3″ tiles as float32 grids.
const DefaultCacheBytes int64 = 1 << 30

// NoSource is the source name reported for a point no elevation file
// covers (or an unfillable void); its height is then 0 m (smooth earth).
const NoSource = "none"

// ErrUnsupportedFile is wrapped by Open's error for a file given by name
// that is not an elevation format the package reads.
var ErrUnsupportedFile = errors.New("unsupported elevation file")

// source is one elevation file a Set can load.
type source struct {
	name                     string  // file base name, reported as the sample's source
	path                     string  // file path
	south, west, north, east float64 // degrees, extent of the sample grid
	dLatDeg, dLonDeg         float64 // sample spacing in degrees; 0 when unknown before loading
	load                     func(path string) (*Tile, error)

	// Guarded by Set.mu.
	tile *Tile         // loaded grid, nil when not cached
	err  error         // load error, kept so a bad file is read once
	wait chan struct{} // closed when a load in progress ends
	elem *list.Element // position in Set.lru while cached
}

// Set is a collection of elevation files (SRTM HGT tiles and GeoTIFF DEMs)
// answering heights and profiles anywhere they cover. Files are
// read lazily on first use and kept in a least-recently-used cache bounded
// in bytes. A Set is safe for concurrent use; each file is read once even
// when many goroutines ask for it together. A Set with no files is valid:
// every point is then "none" at 0 m (smooth earth).
type Set struct {
	hgt    map[[2]int]*source // HGT tiles by south-west corner (lat, lon)
	others []*source          // GeoTIFF files, searched in order
	all    []*source          // every source in use

	mu      sync.Mutex
	lru     list.List // of *source, most recently used at the front
	used    int64     // bytes of cached tiles
	limit   int64     // cache budget in bytes
	missing map[[2]int]bool

	skipped []error // files in directories that could not be used
}

// Open builds a Set from directories (searched recursively) and files.
// Recognised files, in either case: SRTM tiles *.hgt, *.hgt.zip, *.hgt.gz
// named after their tile (ParseHGTName), and single-band geographic
// GeoTIFF DEMs *.tif, *.tiff (ReadGeoTIFF). Other files in directories are
// listed by Skipped with the reason, as are unusable GeoTIFFs; a file named
// explicitly must be usable (else the error wraps ErrUnsupportedFile or
// the GeoTIFF reader's error). When two HGT files cover the same tile, the
// finer one (1″ over 3″) is used, then the first in path order; where a
// GeoTIFF and a tile overlap, the finer grid wins. Nothing is read
// beyond directory listings and file headers until heights are asked for.
// The cache budget starts at DefaultCacheBytes.
func Open(paths ...string) (*Set, error) {
	s := &Set{hgt: map[[2]int]*source{}, limit: DefaultCacheBytes, missing: map[[2]int]bool{}}
	for _, p := range paths {
		fi, err := os.Stat(p)
		if err != nil {
			return nil, fmt.Errorf("elevation data: %w; check the path given", err)
		}
		if !fi.IsDir() {
			n := len(s.skipped)
			if !s.add(p) {
				if len(s.skipped) > n {
					return nil, s.skipped[n]
				}
				return nil, fmt.Errorf("%s: %w: want SRTM tiles named like N45E007.hgt (.hgt.zip, .hgt.gz) or GeoTIFF DEMs (.tif)", p, ErrUnsupportedFile)
			}
			continue
		}
		var names []string
		err = filepath.WalkDir(p, func(path string, d fs.DirEntry, err error) error {
			if err != nil {
				return err
			}
			if !d.IsDir() {
				names = append(names, path)
			}
			return nil
		})
		if err != nil {
			return nil, fmt.Errorf("elevation data: %w", err)
		}
		sort.Strings(names)
		for _, n := range names {
			before := len(s.skipped)
			if !s.add(n) && len(s.skipped) == before && !quietlyIgnored(n) {
				s.skipped = append(s.skipped, fmt.Errorf("%s: %w: not an elevation file; want SRTM tiles named like N45E007.hgt (.hgt.zip, .hgt.gz) or geographic GeoTIFF DEMs (.tif)", n, ErrUnsupportedFile))
			}
		}
	}
	for _, src := range s.hgt {
		s.all = append(s.all, src)
	}
	s.all = append(s.all, s.others...)
	return s, nil
}

// add registers path when it is a recognised elevation file.
func (s *Set) add(path string) bool {
	base := filepath.Base(path)
	lower := strings.ToLower(base)
	if hasHGTSuffix(lower) {
		lat, lon, ok := ParseHGTName(base)
		if !ok {
			s.skipped = append(s.skipped, fmt.Errorf("%s: %w: name does not give the tile position; rename it like N45E007.hgt", path, ErrHGT))
			return false
		}
		src := &source{
			name: base, path: path,
			south: float64(lat), north: float64(lat + 1), west: float64(lon), east: float64(lon + 1),
			load: ReadHGT,
		}
		if n := hgtSamples(hgtRawSize(path)); n > 0 {
			src.dLatDeg, src.dLonDeg = 1/float64(n-1), 1/float64(n-1)
		}
		key := [2]int{lat, lon}
		if old := s.hgt[key]; old != nil && !finer(src, old) {
			return true
		}
		s.hgt[key] = src
		return true
	}
	if strings.HasSuffix(lower, ".tif") || strings.HasSuffix(lower, ".tiff") {
		src, err := geoTIFFSource(path)
		if err != nil {
			s.skipped = append(s.skipped, err)
			return false
		}
		s.others = append(s.others, src)
		return true
	}
	return false
}

// quietlyIgnored reports whether a file found in a DEM directory that is
// not elevation data is expected there and need not be reported: hidden
// files and the side files of GIS tools and archives (world files,
// projection files, GDAL's .aux.xml, checksums, read-me texts).
func quietlyIgnored(path string) bool {
	base := strings.ToLower(filepath.Base(path))
	if strings.HasPrefix(base, ".") {
		return true
	}
	for _, suf := range []string{".aux.xml", ".ovr", ".tfw", ".tifw", ".prj", ".xml", ".md5", ".sha256", ".txt", ".md", ".json"} {
		if strings.HasSuffix(base, suf) {
			return true
		}
	}
	return base == "readme" || base == "source" || base == "license"
}

// geoTIFFSource reads the header of a GeoTIFF DEM (see ReadGeoTIFF) for
// its extent and spacing. Its nodata samples are not filled: in a GeoTIFF
// they usually mark the outside of the surveyed area, not SRTM-style holes.
func geoTIFFSource(path string) (*source, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, err
	}
	defer f.Close()
	fi, err := f.Stat()
	if err != nil {
		return nil, err
	}
	g, err := readGeoTIFFHeader(f, fi.Size(), path)
	if err != nil {
		return nil, err
	}
	return &source{
		name: filepath.Base(path), path: path,
		west: g.lon0, north: g.lat0,
		east:    g.lon0 + float64(g.width-1)*g.dlon,
		south:   g.lat0 - float64(g.height-1)*g.dlat,
		dLatDeg: g.dlat, dLonDeg: g.dlon,
		load: ReadGeoTIFF,
	}, nil
}

// finer reports whether a has a known spacing finer than b's.
func finer(a, b *source) bool {
	if a.dLatDeg == 0 {
		return false
	}
	return b.dLatDeg == 0 || a.dLatDeg < b.dLatDeg
}

// Skipped returns the errors of files found in directories that cannot be
// used, each naming the file and the reason (a tile name that gives no
// position, a GeoTIFF in a projected coordinate system, a file of another
// format; hidden files and GIS side files are not listed), so that a caller
// can warn about them. Files named
// explicitly in Open make Open fail instead.
func (s *Set) Skipped() []error { return slices.Clone(s.skipped) }

// Len reports how many elevation files the set holds.
func (s *Set) Len() int { return len(s.hgt) + len(s.others) }

// SetCacheLimit sets the cache budget in bytes of tile grids kept in
// memory (4 bytes per sample), evicting least-recently-used tiles at once
// if needed. The tile used last always stays, even when it alone exceeds
// the budget; bytes ≤ 0 therefore keeps just that one.
func (s *Set) SetCacheLimit(bytes int64) {
	s.mu.Lock()
	defer s.mu.Unlock()
	s.limit = bytes
	s.evict()
}

// CacheBytes reports the bytes of tile grids held in the cache now.
func (s *Set) CacheBytes() int64 {
	s.mu.Lock()
	defer s.mu.Unlock()
	return s.used
}

// evict drops least-recently-used tiles beyond the budget; s.mu held.
func (s *Set) evict() {
	for s.used > s.limit && s.lru.Len() > 1 {
		e := s.lru.Back()
		src := e.Value.(*source)
		s.lru.Remove(e)
		s.used -= src.tile.Bytes()
		src.tile, src.elem = nil, nil
	}
}

// tile returns src's grid, loading it once however many goroutines ask.
func (s *Set) tile(src *source) (*Tile, error) {
	s.mu.Lock()
	for {
		if src.tile != nil {
			s.lru.MoveToFront(src.elem)
			t := src.tile
			s.mu.Unlock()
			return t, nil
		}
		if src.err != nil {
			err := src.err
			s.mu.Unlock()
			return nil, err
		}
		if src.wait == nil {
			break
		}
		ch := src.wait
		s.mu.Unlock()
		<-ch
		s.mu.Lock()
	}
	ch := make(chan struct{})
	src.wait = ch
	s.mu.Unlock()

	t, err := src.load(src.path)

	s.mu.Lock()
	defer s.mu.Unlock()
	src.wait = nil
	close(ch)
	if err != nil {
		src.err = err
		return nil, err
	}
	src.tile = t
	src.elem = s.lru.PushFront(src)
	s.used += t.Bytes()
	s.evict()
	return t, nil
}

// normLon brings a longitude in degrees into [−180, 180).
func normLon(lon float64) float64 {
	if lon >= -180 && lon < 180 {
		return lon
	}
	lon = math.Mod(lon+180, 360)
	if lon < 0 {
		lon += 360
	}
	return lon - 180
}

// lookup returns the source for (lat, lon), degrees with lon in
// [−180, 180), or nil. A point on a tile edge belongs to either tile; the
// finer source wins where several cover it.
func (s *Set) lookup(lat, lon float64) *source {
	la, lo := int(math.Floor(lat)), int(math.Floor(lon))
	src := s.hgt[[2]int{la, lo}]
	if src == nil && len(s.hgt) > 0 {
		onS, onW := lat == float64(la), lon == float64(lo)
		west := lo - 1
		if west < -180 {
			west += 360
		}
		switch {
		case onS && s.hgt[[2]int{la - 1, lo}] != nil:
			src = s.hgt[[2]int{la - 1, lo}]
		case onW && s.hgt[[2]int{la, west}] != nil:
			src = s.hgt[[2]int{la, west}]
		case onS && onW:
			src = s.hgt[[2]int{la - 1, west}]
		}
	}
	for _, o := range s.others {
		if lat >= o.south && lat <= o.north && lon >= o.west && lon <= o.east && (src == nil || finer(o, src)) {
			src = o
		}
	}
	return src
}

// checkPoint validates a position in degrees.
func checkPoint(lat, lon float64) error {
	if !(lat >= -90 && lat <= 90) {
		return fmt.Errorf("latitude %v° out of range: want −90 to 90", lat)
	}
	if math.IsNaN(lon) || math.IsInf(lon, 0) {
		return fmt.Errorf("longitude %v° is not a number: want −180 to 180", lon)
	}
	return nil
}

// Elevation returns the ground height in metres above the EGM96 geoid at
// (lat, lon), degrees on WGS84, by bilinear interpolation between the four
// surrounding samples (Tile.At), and the base name of the file it came
// from. Where no file covers the point, or the point falls in a void too
// large to fill, it returns 0 m and NoSource ("none") with no error; an
// uncovered point also adds its HGT tile name to Missing. A point on the
// shared edge of two tiles gets the same height from either. Longitudes
// outside [−180, 180) are wrapped. Errors come from invalid coordinates or
// a file that cannot be read (the same error every time it is asked for).
func (s *Set) Elevation(lat, lon float64) (hM float64, source string, err error) {
	if err := checkPoint(lat, lon); err != nil {
		return 0, NoSource, err
	}
	lon = normLon(lon)
	src := s.lookup(lat, lon)
	if src == nil {
		s.noteMissing(lat, lon)
		return 0, NoSource, nil
	}
	t, err := s.tile(src)
	if err != nil {
		return 0, NoSource, err
	}
	h := t.At(lat, lon)
	if math.IsNaN(h) {
		return 0, NoSource, nil
	}
	return h, src.name, nil
}

// noteMissing records the HGT tile that would cover (lat, lon).
func (s *Set) noteMissing(lat, lon float64) {
	la, lo := int(math.Floor(lat)), int(math.Floor(lon))
	if la > 89 {
		la = 89
	}
	s.mu.Lock()
	s.missing[[2]int{la, lo}] = true
	s.mu.Unlock()
}

// Missing returns the sorted file names (HGTName) of the SRTM tiles that
// were asked for but that no file in the set covers.
func (s *Set) Missing() []string {
	s.mu.Lock()
	defer s.mu.Unlock()
	names := make([]string, 0, len(s.missing))
	for k := range s.missing {
		names = append(names, HGTName(k[0], k[1]))
	}
	sort.Strings(names)
	return names
}

// metresPerDegree returns the length in metres of one degree of latitude
// and of longitude at latitude lat (degrees) on the WGS84 ellipsoid
// (WGS84A, WGS84F), from
// the meridional and prime-vertical radii of curvature M and N·cos φ
// (Snyder, Map Projections – A Working Manual, USGS PP 1395, 1987, eqs.
// 4-18 and 4-20; from memory).
func metresPerDegree(lat float64) (latM, lonM float64) {
	e2 := WGS84F * (2 - WGS84F)
	sin, cos := math.Sincos(lat * math.Pi / 180)
	w := math.Sqrt(1 - e2*sin*sin)
	m := WGS84A * (1 - e2) / (w * w * w)
	n := WGS84A / w
	return m * math.Pi / 180, n * math.Abs(cos) * math.Pi / 180
}

// SpacingM returns the finest sample spacing in metres, at latitude lat
// (degrees), of the files in the set: the smaller of the north–south and
// east–west spacing, over all files whose spacing is known before loading
// (every well-formed HGT tile). It returns 0 for an empty set. Profile uses
// it as its default step.
func (s *Set) SpacingM(lat float64) float64 {
	latM, lonM := metresPerDegree(lat)
	best := 0.0
	for _, src := range s.all {
		if src.dLatDeg == 0 {
			continue
		}
		d := math.Min(src.dLatDeg*latM, src.dLonDeg*lonM)
		if d > 0 && (best == 0 || d < best) {
			best = d
		}
	}
	return best
}
