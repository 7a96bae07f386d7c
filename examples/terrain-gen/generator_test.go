package main

import (
	"bufio"
	"bytes"
	"compress/gzip"
	"encoding/binary"
	"encoding/xml"
	"fmt"
	"io"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"sort"
	"strconv"
	"strings"
	"sync"
	"testing"
	"time"
)

// The tests read the committed files with a reader of their own (not the
// generator's grid), so a change to either side shows up.

func repoRoot(t *testing.T) string {
	t.Helper()
	root, err := moduleRoot()
	if err != nil {
		t.Fatal(err)
	}
	return root
}

func terrainDir(t *testing.T) string { return filepath.Join(repoRoot(t), "examples", "terrain") }
func valleyDir(t *testing.T) string  { return filepath.Join(repoRoot(t), "examples", "valley") }

// committedTile is a tile read back from examples/terrain.
type committedTile struct {
	name       string
	latS, lonW int
	h          []int16
}

func (c *committedTile) at(row, col int) int16 { return c.h[row*tileSamples+col] }

var (
	loadOnce  sync.Once
	loaded    map[string]*committedTile
	loadError error
)

// tilesFromDisk reads S49W125 and S49W124 as an HGT reader would: gunzip,
// size must be 1201×1201×2 bytes, big-endian int16, rows from the north.
func tilesFromDisk(t *testing.T) map[string]*committedTile {
	t.Helper()
	dir := terrainDir(t)
	loadOnce.Do(func() {
		loaded = map[string]*committedTile{}
		for _, spec := range []struct {
			name       string
			latS, lonW int
		}{{"S49W125", -49, -125}, {"S49W124", -49, -124}} {
			f, err := os.Open(filepath.Join(dir, spec.name+".hgt.gz"))
			if err != nil {
				loadError = err
				return
			}
			zr, err := gzip.NewReader(f)
			if err != nil {
				f.Close()
				loadError = fmt.Errorf("%s: %w", spec.name, err)
				return
			}
			raw, err := io.ReadAll(zr)
			f.Close()
			if err != nil {
				loadError = fmt.Errorf("%s: %w", spec.name, err)
				return
			}
			if len(raw) != 1201*1201*2 { // SRTM 3″: 1201×1201 int16 (NASA SRTM Topography documentation, 2003)
				loadError = fmt.Errorf("%s: %d bytes, want %d", spec.name, len(raw), 1201*1201*2)
				return
			}
			h := make([]int16, 1201*1201)
			for i := range h {
				h[i] = int16(binary.BigEndian.Uint16(raw[2*i:]))
			}
			loaded[spec.name] = &committedTile{spec.name, spec.latS, spec.lonW, h}
		}
	})
	if loadError != nil {
		t.Fatalf("read committed tiles: %v (regenerate with `go run ./examples/terrain-gen`)", loadError)
	}
	return loaded
}

// bilinearM samples the committed tiles as a terrain reader does.
func bilinearM(t *testing.T, latDeg, lonDeg float64) float64 {
	t.Helper()
	var tile *committedTile
	for _, c := range tilesFromDisk(t) {
		if latDeg >= float64(c.latS) && latDeg <= float64(c.latS+1) && lonDeg >= float64(c.lonW) && lonDeg <= float64(c.lonW+1) {
			tile = c
			break
		}
	}
	if tile == nil {
		t.Fatalf("%.6f,%.6f is outside the example tiles", latDeg, lonDeg)
	}
	fr := (float64(tile.latS+1) - latDeg) * 1200
	fc := (lonDeg - float64(tile.lonW)) * 1200
	r0, c0 := min(int(fr), 1199), min(int(fc), 1199)
	dr, dc := fr-float64(r0), fc-float64(c0)
	v := func(r, c int) float64 {
		x := tile.at(r, c)
		if x == -32768 {
			t.Fatalf("void sample next to %.6f,%.6f", latDeg, lonDeg)
		}
		return float64(x)
	}
	return (v(r0, c0)*(1-dc)+v(r0, c0+1)*dc)*(1-dr) + (v(r0+1, c0)*(1-dc)+v(r0+1, c0+1)*dc)*dr
}

// skipOrFail skips a cross-check whose tool is missing, or fails it when
// MASTLINK_REQUIRE_CROSSCHECKS=1 (as in CI).
func skipOrFail(t *testing.T, format string, args ...any) {
	t.Helper()
	if os.Getenv("MASTLINK_REQUIRE_CROSSCHECKS") == "1" {
		t.Fatalf(format+" (MASTLINK_REQUIRE_CROSSCHECKS=1)", args...)
	}
	t.Skipf(format, args...)
}

// --- the committed files are the generator's output --------------------------

func TestCommittedFilesMatchGenerator(t *testing.T) {
	var stderr bytes.Buffer
	code := run([]string{"-check", "-out", terrainDir(t), "-gpx", valleyDir(t)}, &stderr)
	if code != 0 {
		t.Fatalf("terrain-gen -check: exit %d\n%s", code, stderr.String())
	}
}

func TestCheckDetectsDrift(t *testing.T) {
	// Copy the committed files, damage one byte of one, and -check must fail.
	tiles, gpx := t.TempDir(), t.TempDir()
	for _, c := range []struct{ from, to string }{{terrainDir(t), tiles}, {valleyDir(t), gpx}} {
		entries, err := os.ReadDir(c.from)
		if err != nil {
			t.Fatal(err)
		}
		for _, e := range entries {
			b, err := os.ReadFile(filepath.Join(c.from, e.Name()))
			if err != nil {
				t.Fatal(err)
			}
			if e.Name() == "hike.gpx" {
				b = bytes.Replace(b, []byte("<ele>"), []byte("<ele>1"), 1)
			}
			if err := os.WriteFile(filepath.Join(c.to, e.Name()), b, 0o644); err != nil {
				t.Fatal(err)
			}
		}
	}
	var stderr bytes.Buffer
	if code := run([]string{"-check", "-out", tiles, "-gpx", gpx}, &stderr); code != 1 {
		t.Fatalf("-check on a damaged copy: exit %d, want 1", code)
	}
	if !strings.Contains(stderr.String(), "hike.gpx") {
		t.Errorf("-check did not name the damaged file:\n%s", stderr.String())
	}
}

func TestGzipHeaderIsBare(t *testing.T) {
	// RFC 1952 §2.3: MTIME = 0 means no time stamp; FLG without FNAME.
	for _, name := range []string{"S49W125.hgt.gz", "S49W124.hgt.gz"} {
		b, err := os.ReadFile(filepath.Join(terrainDir(t), name))
		if err != nil {
			t.Fatal(err)
		}
		if len(b) < 10 || b[0] != 0x1f || b[1] != 0x8b {
			t.Fatalf("%s: not a gzip stream", name)
		}
		if flg := b[3]; flg != 0 {
			t.Errorf("%s: gzip FLG = %#x, want 0 (no name, comment or extra field)", name, flg)
		}
		if mtime := binary.LittleEndian.Uint32(b[4:8]); mtime != 0 {
			t.Errorf("%s: gzip MTIME = %d, want 0", name, mtime)
		}
	}
}

func TestTileNames(t *testing.T) {
	tests := []struct {
		id   tileID
		want string
	}{
		{tileID{-49, -124}, "S49W124"},
		{tileID{-49, -125}, "S49W125"},
		{tileID{45, 7}, "N45E007"}, // SRTM tile naming (NASA SRTM Topography documentation, 2003)
		{tileID{-1, 0}, "S01E000"},
	}
	for _, tc := range tests {
		if got := tc.id.name(); got != tc.want {
			t.Errorf("%v: %s, want %s", tc.id, got, tc.want)
		}
	}
}

// --- landscape properties ----------------------------------------------------

func TestSeamIsContinuous(t *testing.T) {
	ts := tilesFromDisk(t)
	w, e := ts["S49W125"], ts["S49W124"]
	land := 0
	for r := 0; r < 1201; r++ {
		a, b := w.at(r, 1200), e.at(r, 0) // both on 124°W
		if a != b {
			t.Fatalf("row %d: 124°W is %d m in S49W125 but %d m in S49W124", r, a, b)
		}
		if a > 0 {
			land++
		}
	}
	// The island straddles the seam, so a demo over it exercises the seam.
	if land < 200 {
		t.Errorf("only %d land samples on the seam, want the island across it", land)
	}
	// No cliff at the seam: the step across it is like steps elsewhere.
	worstSeam, worstNear := 0, 0
	for r := 0; r < 1201; r++ {
		worstSeam = max(worstSeam, absInt(int(e.at(r, 1))-int(w.at(r, 1199))))
		worstNear = max(worstNear, absInt(int(e.at(r, 101))-int(e.at(r, 99))))
	}
	if worstSeam > 2*worstNear+50 {
		t.Errorf("largest two-sample step across the seam %d m, elsewhere %d m", worstSeam, worstNear)
	}
}

func absInt(a int) int {
	if a < 0 {
		return -a
	}
	return a
}

func TestSeaAtTileEdges(t *testing.T) {
	ts := tilesFromDisk(t)
	for name, c := range ts {
		for i := 0; i < 1201; i++ {
			edges := [][2]int{{0, i}, {1200, i}}
			if name == "S49W125" {
				edges = append(edges, [2]int{i, 0})
			} else {
				edges = append(edges, [2]int{i, 1200})
			}
			for _, rc := range edges {
				if v := c.at(rc[0], rc[1]); v != 0 {
					t.Fatalf("%s row %d col %d: %d m on an outer edge, want sea (0)", name, rc[0], rc[1], v)
				}
			}
		}
	}
}

func TestVoidsOnlyInRemoteCorner(t *testing.T) {
	ts := tilesFromDisk(t)
	n := 0
	for name, c := range ts {
		for r := 0; r < 1201; r++ {
			for col := 0; col < 1201; col++ {
				if c.at(r, col) != -32768 {
					continue
				}
				n++
				// The far south-west corner of S49W125, about 48.99°S 124.99°W.
				if name != "S49W125" || r < 1150 || col > 50 {
					t.Errorf("void at %s row %d col %d, outside the south-west corner of S49W125", name, r, col)
				}
				// Over open sea: everything within 20 samples is sea or void.
				for dr := -20; dr <= 20; dr++ {
					for dc := -20; dc <= 20; dc++ {
						rr, cc := r+dr, col+dc
						if rr < 0 || rr > 1200 || cc < 0 || cc > 1200 {
							continue
						}
						if v := c.at(rr, cc); v != 0 && v != -32768 {
							t.Fatalf("land (%d m) next to the void at %s row %d col %d", v, name, r, col)
						}
					}
				}
			}
		}
	}
	if n < 3 || n > 20 {
		t.Errorf("%d void samples, want a handful (3–20)", n)
	}
}

func TestSummit(t *testing.T) {
	ts := tilesFromDisk(t)
	type top struct {
		name     string
		row, col int
		h        int16
	}
	best := top{h: -1}
	for _, name := range []string{"S49W125", "S49W124"} {
		c := ts[name]
		for i, v := range c.h {
			if v > best.h {
				best = top{name, i / 1201, i % 1201, v}
			}
		}
	}
	// The brief: a prominent summit of about 1650–1800 m for the repeater.
	if best.h < 1650 || best.h > 1800 {
		t.Errorf("highest sample %d m, want 1650–1800 m", best.h)
	}
	c := ts[best.name]
	lat := float64(c.latS+1) - float64(best.row)/1200
	lon := float64(c.lonW) + float64(best.col)/1200
	peak := waypointByName(t, readGPX(t, "points.gpx"), "Corvane Peak")
	if math.Abs(peak.Lat-lat) > 1e-6 || math.Abs(peak.Lon-lon) > 1e-6 || peak.Ele != float64(best.h) {
		t.Errorf("Corvane Peak at %.7f,%.7f %.1f m, but the highest sample is %.7f,%.7f %d m",
			peak.Lat, peak.Lon, peak.Ele, lat, lon, best.h)
	}
	// Prominent: nothing beyond 2 km of it comes within 150 m.
	second := int16(0)
	for _, ct := range ts {
		for i, v := range ct.h {
			la := float64(ct.latS+1) - float64(i/1201)/1200
			lo := float64(ct.lonW) + float64(i%1201)/1200
			if v > second && haversineTest(la, lo, lat, lon) > 2000 {
				second = v
			}
		}
	}
	if best.h-second < 150 {
		t.Errorf("highest ground beyond 2 km of the summit is %d m, only %d m lower", second, best.h-second)
	}
}

func TestLakeIsFlatAndContained(t *testing.T) {
	ts := tilesFromDisk(t)
	hut := waypointByName(t, readGPX(t, "points.gpx"), "Ondrell Water hut")
	// The lake centre in the design frame, on the valley axis.
	lat, lon := latLonDeg(-7.4, mainAxisY(-7.4))
	c := ts["S49W125"]
	r0 := int(math.Round((float64(c.latS+1) - lat) * 1200))
	c0 := int(math.Round((lon - float64(c.lonW)) * 1200))
	level := c.at(r0, c0)
	if level != 412 { // the lake surface, metres (README)
		t.Fatalf("lake centre at %d m, want the flat surface at 412 m", level)
	}
	// Flood the samples at the surface height; the shore must stand above it.
	seen := map[[2]int]bool{{r0, c0}: true}
	queue := [][2]int{{r0, c0}}
	lowShore := 0
	for len(queue) > 0 {
		p := queue[0]
		queue = queue[1:]
		for _, d := range [][2]int{{1, 0}, {-1, 0}, {0, 1}, {0, -1}} {
			q := [2]int{p[0] + d[0], p[1] + d[1]}
			if seen[q] || q[1] > 1200 {
				continue
			}
			v := c.at(q[0], q[1])
			switch {
			case v == level:
				seen[q] = true
				queue = append(queue, q)
			case v < level:
				lowShore++
			}
		}
	}
	if lowShore > 0 {
		t.Errorf("%d shore samples lie below the lake surface (the lake would spill)", lowShore)
	}
	// Area: samples × 3″ × 3″ at 48.5°S (≈ 92.6 m × 61.4 m).
	areaKm2 := float64(len(seen)) * 0.0926 * 0.0614
	if areaKm2 < 4 || areaKm2 > 30 {
		t.Errorf("lake area %.1f km², want 4–30 km²", areaKm2)
	}
	if hut.Ele <= float64(level) {
		t.Errorf("the hut (%.1f m) stands in the lake (%d m)", hut.Ele, level)
	}
	t.Logf("lake: %d samples, %.1f km² at %d m", len(seen), areaKm2, level)
}

func TestValleyFloorAndRidges(t *testing.T) {
	// Along the main valley below the lake, every 0.5 km: the floor (lowest
	// point within 2 km of the river's line) and the highest ground on each
	// side (Corvane Peak's surroundings left out).
	var floors, north, south []float64
	for x := -2.0; x <= 15; x += 0.5 {
		yv := mainAxisY(x)
		lo, hiN, hiS := math.Inf(1), 0.0, 0.0
		for y := yv - 6.5; y <= yv+6.5; y += 0.05 {
			lat, lon := latLonDeg(x, y)
			h := bilinearM(t, lat, lon)
			switch {
			case math.Abs(y-yv) < 2:
				lo = math.Min(lo, h)
			case y > yv && math.Hypot(x-summitXKm, y-northCrestY(summitXKm)) > 2.5:
				hiN = math.Max(hiN, h)
			case y < yv:
				hiS = math.Max(hiS, h)
			}
		}
		floors = append(floors, lo)
		if hiN > 0 {
			north = append(north, hiN)
		}
		south = append(south, hiS)
	}
	sort.Float64s(floors)
	// The brief's design figures: floor ~200–400 m, ridges 900–1400 m.
	tests := []struct {
		name   string
		got    float64
		lo, hi float64
	}{
		{"lowest valley floor", floors[0], 200, 400},
		{"highest valley floor", floors[len(floors)-1], 200, 400},
		{"Corvane Ridge crest (median)", median(north), 900, 1400},
		{"Fennick Range crest (median)", median(south), 900, 1400},
	}
	for _, tc := range tests {
		if tc.got < tc.lo || tc.got > tc.hi {
			t.Errorf("%s: %.0f m, want %.0f–%.0f m", tc.name, tc.got, tc.lo, tc.hi)
		}
	}
}

func median(v []float64) float64 {
	s := append([]float64(nil), v...)
	sort.Float64s(s)
	return s[len(s)/2]
}

// lineOfSight checks the straight ray between two antennas over the
// committed terrain, with the earth bulge for an effective earth radius
// of k = 4/3 (common practice) and the WGS84 mean radius 6371.0 km.
func lineOfSight(t *testing.T, a, b gpxPoint, mastA, mastB float64) bool {
	t.Helper()
	const reM = 4.0 / 3 * 6371000 // k = 4/3, common practice
	d := haversineTest(a.Lat, a.Lon, b.Lat, b.Lon)
	ha, hb := a.Ele+mastA, b.Ele+mastB
	n := int(d/30) + 2
	for i := 1; i < n; i++ {
		u := float64(i) / float64(n)
		lat, lon := a.Lat+(b.Lat-a.Lat)*u, a.Lon+(b.Lon-a.Lon)*u
		d1 := u * d
		ground := bilinearM(t, lat, lon) + d1*(d-d1)/(2*reM)
		if ground > ha+(hb-ha)*u {
			return false
		}
	}
	return true
}

func TestLinesOfSight(t *testing.T) {
	pts := readGPX(t, "points.gpx")
	peak := waypointByName(t, pts, "Corvane Peak")
	cp := waypointByName(t, pts, "Wethermoss Saddle")
	tests := []struct {
		name         string
		a, b         gpxPoint
		mastA, mastB float64 // m above ground
		want         bool
	}{
		{"repeater to command post", peak, cp, 20, 9, true},
		{"repeater to staging area", peak, waypointByName(t, pts, "Ostral Flats staging area"), 20, 2, true},
		{"repeater to Team Birch", peak, waypointByName(t, pts, "Team Birch, upper Ostral"), 20, 2, true},
		{"repeater to Team Alder (hidden)", peak, waypointByName(t, pts, "Team Alder, Quillet Glen"), 20, 2, false},
		{"command post to Team Alder", cp, waypointByName(t, pts, "Team Alder, Quillet Glen"), 9, 2, true},
	}
	for _, tc := range tests {
		if got := lineOfSight(t, tc.a, tc.b, tc.mastA, tc.mastB); got != tc.want {
			t.Errorf("%s: line of sight %v, want %v", tc.name, got, tc.want)
		}
	}

	// The hike sees the repeater for part of the way only (coverage gaps).
	hike := readGPX(t, "hike.gpx")
	seen := 0
	for _, p := range hike {
		if lineOfSight(t, p, peak, 1.5, 20) {
			seen++
		}
	}
	frac := float64(seen) / float64(len(hike))
	if frac < 0.2 || frac > 0.9 {
		t.Errorf("repeater visible from %.0f%% of the hike, want a mix of covered and hidden stretches", 100*frac)
	}
	t.Logf("repeater visible from %.0f%% of the hike's points", 100*frac)
}

// --- GPX ----------------------------------------------------------------------

type gpxPoint struct {
	Lat  float64 `xml:"lat,attr"`
	Lon  float64 `xml:"lon,attr"`
	Ele  float64 `xml:"ele"`
	Time string  `xml:"time"`
	Name string  `xml:"name"`
	Desc string  `xml:"desc"`
	Sym  string  `xml:"sym"`
}

type gpxFile struct {
	XMLName xml.Name   `xml:"http://www.topografix.com/GPX/1/1 gpx"`
	Version string     `xml:"version,attr"`
	Wpts    []gpxPoint `xml:"wpt"`
	Trkpts  []gpxPoint `xml:"trk>trkseg>trkpt"`
}

// readGPX returns the waypoints, or the track points when there are none.
func readGPX(t *testing.T, name string) []gpxPoint {
	t.Helper()
	b, err := os.ReadFile(filepath.Join(valleyDir(t), name))
	if err != nil {
		t.Fatal(err)
	}
	var g gpxFile
	if err := xml.Unmarshal(b, &g); err != nil {
		t.Fatalf("%s: %v", name, err)
	}
	if g.Version != "1.1" {
		t.Fatalf("%s: GPX version %q, want 1.1", name, g.Version)
	}
	if len(g.Wpts) > 0 {
		return g.Wpts
	}
	return g.Trkpts
}

func waypointByName(t *testing.T, pts []gpxPoint, name string) gpxPoint {
	t.Helper()
	for _, p := range pts {
		if p.Name == name {
			return p
		}
	}
	t.Fatalf("no waypoint %q", name)
	return gpxPoint{}
}

func haversineTest(lat1, lon1, lat2, lon2 float64) float64 {
	const r, rad = 6371008.8, math.Pi / 180 // mean earth radius (IUGG), m
	s1 := math.Sin((lat2 - lat1) * rad / 2)
	s2 := math.Sin((lon2 - lon1) * rad / 2)
	a := s1*s1 + math.Cos(lat1*rad)*math.Cos(lat2*rad)*s2*s2
	return 2 * r * math.Asin(math.Sqrt(a))
}

func TestWaypoints(t *testing.T) {
	pts := readGPX(t, "points.gpx")
	cands := readGPX(t, "candidates.gpx")
	if len(cands) < 4 || len(cands) > 5 {
		t.Errorf("%d candidate sites, want 4–5", len(cands))
	}
	byName := map[string]gpxPoint{}
	for _, p := range pts {
		if _, dup := byName[p.Name]; dup {
			t.Errorf("duplicate waypoint name %q", p.Name)
		}
		byName[p.Name] = p
		if p.Desc == "" || p.Sym == "" {
			t.Errorf("%s: missing desc or sym", p.Name)
		}
		// Elevations are the tiles' bilinear height at the written position.
		if got := bilinearM(t, p.Lat, p.Lon); math.Abs(got-p.Ele) > 0.051 {
			t.Errorf("%s: <ele> %.1f m, tiles give %.2f m", p.Name, p.Ele, got)
		}
		if p.Ele <= 0 {
			t.Errorf("%s: in the sea", p.Name)
		}
	}
	for _, c := range cands {
		if p, ok := byName[c.Name]; !ok || p != c {
			t.Errorf("candidate %q is not the same waypoint in points.gpx", c.Name)
		}
	}
	teams := 0
	for n := range byName {
		if strings.HasPrefix(n, "Team ") {
			teams++
		}
	}
	if teams < 2 || teams > 3 {
		t.Errorf("%d field teams, want 2–3", teams)
	}
	cp := byName["Wethermoss Saddle"]
	if cp.Ele < 800 || cp.Ele > 1300 {
		t.Errorf("command-post saddle at %.0f m, want a saddle between ridges", cp.Ele)
	}
}

func TestHike(t *testing.T) {
	pts := readGPX(t, "hike.gpx")
	if len(pts) < 100 {
		t.Fatalf("%d track points", len(pts))
	}
	trailhead := waypointByName(t, readGPX(t, "points.gpx"), "Gorsefold trailhead")
	if d := haversineTest(pts[0].Lat, pts[0].Lon, trailhead.Lat, trailhead.Lon); d > 50 {
		t.Errorf("hike starts %.0f m from the trailhead", d)
	}
	total := 0.0
	var prev time.Time
	inGlen := false
	for i, p := range pts {
		tm, err := time.Parse(time.RFC3339, p.Time)
		if err != nil || !strings.HasSuffix(p.Time, "Z") {
			t.Fatalf("point %d: time %q is not RFC 3339 UTC", i, p.Time)
		}
		if got := bilinearM(t, p.Lat, p.Lon); math.Abs(got-p.Ele) > 0.051 {
			t.Errorf("point %d: <ele> %.1f m, tiles give %.2f m", i, p.Ele, got)
		}
		x, y := localKm(p.Lat, p.Lon)
		if x > lakeWestXKm && x < lakeEastXKm && math.Abs(y-mainAxisY(x)) < lakeHalfYKm && p.Ele < 412.5 {
			t.Errorf("point %d (%.5f,%.5f) walks on the lake", i, p.Lat, p.Lon)
		}
		if y < southCrestY(x)-2 {
			inGlen = true
		}
		if i == 0 {
			prev = tm
			continue
		}
		d := haversineTest(pts[i-1].Lat, pts[i-1].Lon, p.Lat, p.Lon)
		if d < 25 || d > 50 {
			t.Errorf("point %d: %.1f m from the previous one, want 25–50 m", i, d)
		}
		// Walking pace: 0.5–7 km/h between points (common practice for hikers).
		dt := tm.Sub(prev).Seconds()
		if dt <= 0 || d/dt*3.6 > 7 || d/dt*3.6 < 0.5 {
			t.Errorf("point %d: %.1f m in %.0f s", i, d, dt)
		}
		total += d
		prev = tm
	}
	if total < 8000 || total > 15000 {
		t.Errorf("hike %.1f km, want 8–15 km", total/1000)
	}
	if !inGlen {
		t.Error("the hike never reaches Quillet Glen")
	}
	t.Logf("hike: %d points, %.2f km", len(pts), total/1000)
}

// --- cross-checks with reference tools ---------------------------------------

// GDAL reads the committed tiles: its nearest-sample value at every waypoint
// equals the sample our own reader finds, so the layout, byte order and
// georeferencing of the HGT files are what the SRTM format says.
func TestGDALReadsTiles(t *testing.T) {
	if _, err := exec.LookPath("gdallocationinfo"); err != nil {
		skipOrFail(t, "gdallocationinfo (Debian gdal-bin) not found")
	}
	tmp := t.TempDir()
	ts := tilesFromDisk(t)
	for name, c := range ts {
		// GDAL's SRTMHGT driver knows the tile from its file name.
		path := filepath.Join(tmp, name+".hgt")
		if err := os.WriteFile(path, encodeHGT(c.h), 0o644); err != nil {
			t.Fatal(err)
		}
	}
	pts := readGPX(t, "points.gpx")
	for i, p := range readGPX(t, "hike.gpx") {
		if i%20 == 0 {
			pts = append(pts, p)
		}
	}
	for _, name := range []string{"S49W125", "S49W124"} {
		c := ts[name]
		var in bytes.Buffer
		var want []int16
		for _, p := range pts {
			if p.Lon < float64(c.lonW) || p.Lon >= float64(c.lonW+1) {
				continue
			}
			fmt.Fprintf(&in, "%.7f %.7f\n", p.Lon, p.Lat)
			r := int(math.Round((float64(c.latS+1) - p.Lat) * 1200))
			col := int(math.Round((p.Lon - float64(c.lonW)) * 1200))
			want = append(want, c.at(r, col))
		}
		if len(want) == 0 {
			continue
		}
		cmd := exec.Command("gdallocationinfo", "-valonly", "-wgs84", filepath.Join(tmp, name+".hgt"))
		cmd.Stdin = &in
		out, err := cmd.Output()
		if err != nil {
			t.Fatalf("gdallocationinfo %s: %v", name, err)
		}
		sc := bufio.NewScanner(bytes.NewReader(out))
		i := 0
		for sc.Scan() {
			if i >= len(want) {
				t.Fatalf("%s: gdallocationinfo gave more values than points", name)
			}
			got, err := strconv.Atoi(strings.TrimSpace(sc.Text()))
			if err != nil {
				t.Fatalf("%s: gdallocationinfo line %d: %q", name, i+1, sc.Text())
			}
			if got != int(want[i]) {
				t.Errorf("%s point %d: GDAL reads %d m, our reader %d m", name, i, got, want[i])
			}
			i++
		}
		if i != len(want) {
			t.Fatalf("%s: gdallocationinfo gave %d values for %d points", name, i, len(want))
		}
	}
}

// GeographicLib agrees with the walking distance the hike's times and the
// 8–15 km length were computed from (a sphere; the ellipsoid differs by
// well under 1 %).
func TestGeodSolveHikeLength(t *testing.T) {
	if _, err := exec.LookPath("GeodSolve"); err != nil {
		skipOrFail(t, "GeodSolve (Debian geographiclib-tools) not found")
	}
	pts := readGPX(t, "hike.gpx")
	var in bytes.Buffer
	sphere := 0.0
	for i := 1; i < len(pts); i++ {
		a, b := pts[i-1], pts[i]
		fmt.Fprintf(&in, "%.7f %.7f %.7f %.7f\n", a.Lat, a.Lon, b.Lat, b.Lon)
		sphere += haversineTest(a.Lat, a.Lon, b.Lat, b.Lon)
	}
	cmd := exec.Command("GeodSolve", "-i", "-p", "3") // output: azi1 azi2 s12
	cmd.Stdin = &in
	out, err := cmd.Output()
	if err != nil {
		t.Fatalf("GeodSolve: %v", err)
	}
	ellipsoid := 0.0
	lines := 0
	sc := bufio.NewScanner(bytes.NewReader(out))
	for sc.Scan() {
		f := strings.Fields(sc.Text())
		if len(f) != 3 {
			t.Fatalf("GeodSolve line %d: %q", lines+1, sc.Text())
		}
		s, err := strconv.ParseFloat(f[2], 64)
		if err != nil {
			t.Fatalf("GeodSolve line %d: %v", lines+1, err)
		}
		ellipsoid += s
		lines++
	}
	if lines != len(pts)-1 {
		t.Fatalf("GeodSolve gave %d lines for %d segments", lines, len(pts)-1)
	}
	if ellipsoid < 8000 || ellipsoid > 15000 {
		t.Errorf("hike %.2f km on WGS84 (GeodSolve), want 8–15 km", ellipsoid/1000)
	}
	if rel := math.Abs(sphere-ellipsoid) / ellipsoid; rel > 0.01 {
		t.Errorf("sphere %.1f m vs WGS84 %.1f m: %.2f%% apart", sphere, ellipsoid, 100*rel)
	}
	t.Logf("hike: %.1f m on WGS84 (GeodSolve), %.1f m on the sphere", ellipsoid, sphere)
}
