package plan

import (
	"context"
	"encoding/binary"
	"math"
	"os"
	"path/filepath"
	"testing"

	"github.com/mastlink/mastlink/plan/gpx"
	"github.com/mastlink/mastlink/plan/units"
	"github.com/mastlink/mastlink/propagation"
	"github.com/mastlink/mastlink/terrain"
	"github.com/paulmach/orb"
)

// roughTerrainM is an invented rough landscape in metres: broad hills, a
// finer ripple and a little hashed noise, all deterministic.
func roughTerrainM(row, col int) int16 {
	x, y := float64(col)*30, float64(row)*30 // metres, about
	h := 600 + 350*math.Sin(x/7000)*math.Cos(y/5000) + 150*math.Sin(x/1300+y/2100) + 60*math.Sin(y/450-x/700)
	u := uint32(row*3601+col) * 2654435761 // Knuth's multiplicative hash
	h += float64(u>>24) / 255 * 20
	return int16(h)
}

// write1sHGT writes a 1″ SRTM tile (3601×3601 big-endian int16, rows from
// the north edge; SRTM documentation §2) named name into dir.
func write1sHGT(tb testing.TB, dir, name string, h func(row, col int) int16) {
	tb.Helper()
	const n = terrain.HGTSamples1
	buf := make([]byte, n*n*2)
	for r := 0; r < n; r++ {
		for c := 0; c < n; c++ {
			binary.BigEndian.PutUint16(buf[(r*n+c)*2:], uint16(h(r, c)))
		}
	}
	if err := os.WriteFile(filepath.Join(dir, name), buf, 0o644); err != nil {
		tb.Fatal(err)
	}
}

// serpentine returns a track of n points stepM apart, walking east–west
// rows widthM long, rowGapM apart, starting at (lat0, lon0) and going
// north; positions from a local flat approximation (111 320 m per degree
// of latitude; common practice), which is all a test track needs.
func serpentine(name string, lat0, lon0 float64, n int, stepM, widthM, rowGapM float64) gpx.Track {
	tr := gpx.Track{Name: name, Points: make([]gpx.Place, 0, n)}
	perRow := int(widthM / stepM)
	mPerDegLat := 111320.0
	mPerDegLon := mPerDegLat * math.Cos(lat0*math.Pi/180)
	for i := 0; i < n; i++ {
		row, k := i/perRow, i%perRow
		x := float64(k) * stepM
		if row%2 == 1 {
			x = widthM - x
		}
		y := float64(row) * rowGapM
		tr.Points = append(tr.Points, gpx.Place{Pos: orb.Point{lon0 + x/mPerDegLon, lat0 + y/mPerDegLat}, ElevM: math.NaN()})
	}
	return tr
}

// benchTargets are five targets around a 20 km square at (lat0, lon0):
// a repeater on a mast in the middle (two frequencies) and four simplex
// handhelds at the corners, so paths run up to about 30 km.
func benchTargets(lat0, lon0 float64) []Target {
	hand := End{Radio: Radio{PowerW: 5, SensitivityDBm: units.DBmFromMicrovolts(0.25)}, Antenna: Antenna{HeightM: 1.5}}
	dLat, dLon := 20000/111320.0, 20000/(111320*math.Cos(lat0*math.Pi/180))
	ts := []Target{{End: End{Name: "repeater", Pos: orb.Point{lon0 + dLon/2, lat0 + dLat/2},
		Radio: Radio{PowerW: 50, SensitivityDBm: -122}, Antenna: Antenna{GainDBi: 6, HeightM: 20}},
		Kind: Repeater, ListenMHz: 147.78, TransmitMHz: 147.18}}
	for i, c := range [][2]float64{{-0.05, -0.05}, {1.05, -0.05}, {-0.05, 1.05}, {1.05, 1.05}} {
		e := hand
		e.Name = string(rune('A' + i))
		e.Pos = orb.Point{lon0 + c[0]*dLon, lat0 + c[1]*dLat}
		ts = append(ts, Target{End: e, Kind: Simplex, FreqMHz: 146.55})
	}
	return ts
}

// BenchmarkRoute1s is the speed case: a 10 000-point track against
// five targets (one repeater, four simplex) over a 1″ tile of rough
// terrain, 50 000 terrain paths of up to about 30 km, at the DEM's spacing.
//
// The sub-benchmarks run the same route with the terrain model
// (delta-Bullington, ITU-R P.526-16) and with the Longley–Rice ITM
// (defaults); the ITM's time over the terrain model's is the ratio the
// speed target holds within 3×.
func BenchmarkRoute1s(b *testing.B) {
	for _, m := range []propagation.Model{propagation.Terrain{}, propagation.ITM{}} {
		b.Run(m.Name(), func(b *testing.B) { benchRoute1s(b, m) })
	}
}

func benchRoute1s(b *testing.B, model propagation.Model) {
	dir := b.TempDir()
	write1sHGT(b, dir, "N45E007.hgt", roughTerrainM)
	ts, err := terrain.Open(dir)
	if err != nil {
		b.Fatal(err)
	}
	const lat0, lon0 = 45.3, 7.3
	if _, _, err := ts.Elevation(lat0, lon0); err != nil { // load the tile outside the timing
		b.Fatal(err)
	}
	tr := serpentine("bench", lat0, lon0, 10000, 50, 20000, 20000.0/25)
	walker := End{Name: "handheld", Radio: Radio{PowerW: 5, SensitivityDBm: units.DBmFromMicrovolts(0.25)}, Antenna: Antenna{HeightM: 1.5}}
	env := &Env{Terrain: ts, Model: model}
	req := RouteRequest{Track: tr, Walker: walker, Targets: benchTargets(lat0, lon0), NeededMarginDB: 10, SpacingM: 50}
	var paths int
	b.ReportAllocs()
	for b.Loop() {
		r, err := env.Route(context.Background(), req, nil)
		if err != nil {
			b.Fatal(err)
		}
		paths = r.Paths
	}
	b.ReportMetric(float64(paths), "paths/op")
	b.ReportMetric(float64(paths)*float64(b.N)/b.Elapsed().Seconds(), "paths/s")
}

// BenchmarkRankSitesDemo ranks the example's five candidate sites against
// its six targets and stations, with the plan's 10 heights × 4 cables.
func BenchmarkRankSitesDemo(b *testing.B) {
	p, env := demoPlan(b)
	demoSites(b, p, env, p.Mast) // load the tiles outside the timing
	b.ReportAllocs()
	for b.Loop() {
		demoSites(b, p, env, p.Mast)
	}
}

// BenchmarkRouteDemo checks the example hike (282 points, six targets)
// over the example's 3″ terrain.
func BenchmarkRouteDemo(b *testing.B) {
	p, env := demoPlan(b)
	g, err := gpx.Read(filepath.Join("..", "examples", "valley", "hike.gpx"))
	if err != nil {
		b.Fatal(err)
	}
	w, _ := p.Walker("")
	req := RouteRequest{Track: g.Tracks[0], Walker: w, Targets: p.ReachTargets(w.Name), NeededMarginDB: p.Require.NeededMarginDB()}
	var paths int
	b.ReportAllocs()
	for b.Loop() {
		r, err := env.Route(context.Background(), req, nil)
		if err != nil {
			b.Fatal(err)
		}
		paths = r.Paths
	}
	b.ReportMetric(float64(paths)*float64(b.N)/b.Elapsed().Seconds(), "paths/s")
}
