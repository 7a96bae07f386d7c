package plan

import (
	"bytes"
	"context"
	"encoding/json"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"runtime"
	"strings"
	"testing"

	"github.com/mastlink/mastlink/plan/gpx"
	"github.com/mastlink/mastlink/plan/units"
	"github.com/mastlink/mastlink/propagation"
	"github.com/mastlink/mastlink/terrain"
	"github.com/paulmach/orb"
)

// demoPlan reads the example plan over the example terrain.
func demoPlan(t testing.TB) (*Plan, *Env) {
	t.Helper()
	p, err := ReadPlan(filepath.Join("..", "examples", "valley", "plan.yaml"))
	if err != nil {
		t.Fatal(err)
	}
	ts, err := terrain.Open(p.Terrain...)
	if err != nil {
		t.Fatal(err)
	}
	return p, p.NewEnv(ts)
}

// demoRoute checks the example hike with the example plan's handheld.
func demoRoute(t testing.TB, p *Plan, env *Env) *RouteResult {
	t.Helper()
	g, err := gpx.Read(filepath.Join("..", "examples", "valley", "hike.gpx"))
	if err != nil {
		t.Fatal(err)
	}
	w, err := p.Walker("")
	if err != nil {
		t.Fatal(err)
	}
	r, err := env.Route(context.Background(), RouteRequest{Track: g.Tracks[0], Walker: w, Targets: p.ReachTargets(w.Name), NeededMarginDB: p.Require.NeededMarginDB()}, nil)
	if err != nil {
		t.Fatal(err)
	}
	return r
}

// TestRouteAgreesWithEvaluate checks route points against the single-link
// evaluation (Env.Measure, Env.Evaluate in both directions, as `mastlink
// link` and `plan` do) from the same point to each target: the same margins.
func TestRouteAgreesWithEvaluate(t *testing.T) {
	p, env := demoPlan(t)
	r := demoRoute(t, p, env)
	w, _ := p.Walker("")
	targets := p.ReachTargets(w.Name)
	need := p.Require.NeededMarginDB()
	for _, k := range []int{0, 37, 101, 160, 222, len(r.Points) - 1} {
		pt := r.Points[k]
		walker := w
		walker.Pos = orb.Point{pt.Lon, pt.Lat}
		worst := math.Inf(1)
		for ti, tg := range targets {
			var g Geometry
			if err := env.Measure(walker.Pos, tg.Pos, &g); err != nil {
				t.Fatal(err)
			}
			links, err := env.targetLinks(&g, walker, tg, need)
			if err != nil {
				t.Fatal(err)
			}
			m := math.Min(links[0].MarginDB, links[1].MarginDB)
			// Same arithmetic on the same profile: agreement to rounding.
			if math.Abs(m-pt.MarginsDB[ti]) > 1e-9 {
				t.Errorf("point %d (%.0f m) → %s: route margin %.6f dB, Evaluate %.6f dB", k, pt.DistanceM, tg.Name, pt.MarginsDB[ti], m)
			}
			if !tg.Optional {
				worst = math.Min(worst, m)
			}
			if ti == 0 && math.Abs(pt.ElevationM-links[0].TxGroundM) > 1e-9 {
				t.Errorf("point %d: ground %.3f m, link %.3f m", k, pt.ElevationM, links[0].TxGroundM)
			}
		}
		if math.Abs(worst-pt.WorstMarginDB) > 1e-9 || pt.Covered != (worst >= need) {
			t.Errorf("point %d: worst %.3f dB covered %v; Evaluate gives %.3f dB", k, pt.WorstMarginDB, pt.Covered, worst)
		}
	}
}

// TestRouteResampling checks the resampled points against GeographicLib's
// direct solution along each track segment (terrain.Direct, itself checked
// against GeodSolve in the terrain package): equal spacing, the ends kept,
// every point on the track.
func TestRouteResampling(t *testing.T) {
	p, env := demoPlan(t)
	r := demoRoute(t, p, env)
	g, _ := gpx.Read(filepath.Join("..", "examples", "valley", "hike.gpx"))
	pts := g.Tracks[0].Points
	// The track length is the sum of the geodesic segment lengths (Karney 2013).
	length := 0.0
	for i := 1; i < len(pts); i++ {
		d, _, _ := terrain.Inverse(pts[i-1].Pos.Lat(), pts[i-1].Pos.Lon(), pts[i].Pos.Lat(), pts[i].Pos.Lon())
		length += d
	}
	if math.Abs(r.LengthM-length) > 1e-6 {
		t.Errorf("length %.6f m, segments add to %.6f m", r.LengthM, length)
	}
	if want := int(math.Ceil(length/DefaultRouteSpacingM)) + 1; len(r.Points) != want {
		t.Errorf("%d points, want %d", len(r.Points), want)
	}
	first, last := r.Points[0], r.Points[len(r.Points)-1]
	if first.Lat != pts[0].Pos.Lat() || first.Lon != pts[0].Pos.Lon() || last.Lat != pts[len(pts)-1].Pos.Lat() || last.DistanceM != r.LengthM {
		t.Errorf("ends not kept: %+v … %+v", first, last)
	}
	// Every point lies on its segment of the track: the geodesic distances
	// to the segment's ends add up to the segment's length.
	cum := make([]float64, len(pts))
	for i := 1; i < len(pts); i++ {
		d, _, _ := terrain.Inverse(pts[i-1].Pos.Lat(), pts[i-1].Pos.Lon(), pts[i].Pos.Lat(), pts[i].Pos.Lon())
		cum[i] = cum[i-1] + d
	}
	j := 0
	for k, p := range r.Points {
		if k > 0 && k < len(r.Points)-1 && p.DistanceM-r.Points[k-1].DistanceM != DefaultRouteSpacingM {
			t.Fatalf("points %d–%d are %.6f m apart along the track", k-1, k, p.DistanceM-r.Points[k-1].DistanceM)
		}
		for j < len(pts)-2 && cum[j+1] < p.DistanceM {
			j++
		}
		a, b := pts[j].Pos, pts[j+1].Pos
		da, _, _ := terrain.Inverse(a.Lat(), a.Lon(), p.Lat, p.Lon)
		db, _, _ := terrain.Inverse(p.Lat, p.Lon, b.Lat(), b.Lon())
		if math.Abs(da+db-(cum[j+1]-cum[j])) > 1e-3 || math.Abs(da-(p.DistanceM-cum[j])) > 1e-3 {
			t.Fatalf("point %d at %.3f m is off its segment %d: %.4f + %.4f m vs %.4f m", k, p.DistanceM, j, da, db, cum[j+1]-cum[j])
		}
	}
	// Gaps and covered stretches add up to the length.
	sum := r.CoveredM
	for _, gp := range r.Gaps {
		sum += gp.LengthM
	}
	if math.Abs(sum-r.LengthM) > 1e-6 || r.OverallFraction < 0 || r.OverallFraction > 1 {
		t.Errorf("covered %.1f m + gaps = %.1f m, length %.1f m (fraction %v)", r.CoveredM, sum, r.LengthM, r.OverallFraction)
	}
}

// ridgeWorld writes a 1″ tile N00E010 of flat ground at 0 m with a wall
// ridgeM metres high along the meridian 10.15°E (column 540) from row r0 to
// row r1 (latitudes 1 − r/3600), and returns the tile set.
func ridgeWorld(t testing.TB, r0, r1 int, ridgeM int16) *terrain.Set {
	t.Helper()
	dir := t.TempDir()
	write1sHGT(t, dir, "N00E010.hgt", func(row, col int) int16 {
		if col == 540 && row >= r0 && row <= r1 {
			return ridgeM
		}
		return 0
	})
	ts, err := terrain.Open(dir)
	if err != nil {
		t.Fatal(err)
	}
	return ts
}

// crossingLat returns the latitude at which the geodesic from a to b
// crosses the meridian lon (degrees), by bisection on the distance along
// it (Karney's direct solution, terrain.Line).
func crossingLat(a, b orb.Point, lon float64) float64 {
	l, d := terrain.InverseLine(a.Lat(), a.Lon(), b.Lat(), b.Lon())
	lo, hi := 0.0, d
	for range 80 {
		mid := (lo + hi) / 2
		if _, x := l.Position(mid); x < lon {
			lo = mid
		} else {
			hi = mid
		}
	}
	lat, _ := l.Position((lo + hi) / 2)
	return lat
}

// shadowEdge returns the latitude on the meridian trackLon at which the
// geodesic from target crosses the ridge meridian ridgeLon at latitude
// edgeLat: the edge of the ridge's shadow on the track, by bisection.
func shadowEdge(target orb.Point, ridgeLon, trackLon, edgeLat, loLat, hiLat float64) float64 {
	f := func(lat float64) float64 { return crossingLat(target, orb.Point{trackLon, lat}, ridgeLon) - edgeLat }
	flo := f(loLat)
	for range 60 {
		mid := (loLat + hiLat) / 2
		if fm := f(mid); (fm < 0) == (flo < 0) {
			loLat, flo = mid, fm
		} else {
			hiLat = mid
		}
	}
	return (loLat + hiLat) / 2
}

// TestRouteRidgeGap walks a straight track (the meridian 10.16°E, a
// geodesic) past the end-on shadow of a wall: flat ground at 0 m and a
// 3000 m ridge along the meridian 10.15°E from 0.48°N to 0.52°N, with the
// target's antenna 150 m up at 0.5°N 10.05°E. A path is blocked when its
// geodesic crosses the ridge (the ray between antennas 150 m and 1.5 m up
// passes the wall less than 20 m up: ITU-R P.526-16 eq. 26 gives ν ≫ 1)
// and clear when it passes beyond the ridge's end. So the gap must start and end where the
// geodesic from the target through the ridge's ends meets the track.
//
// In the DEM the wall's end is not sharp: bilinear interpolation brings
// its height from 3000 m on the last ridge row to 0 m on the next, one
// arc-second (30.7 m) further. The covered/uncovered transition lies
// between the shadow edges through those two latitudes, and a gap end is
// half way between the checked points on either side of it, so each end
// must lie within that band widened by half the spacing.
func TestRouteRidgeGap(t *testing.T) {
	const (
		r0, r1   = 1728, 1872 // rows: 1 − r/3600 = 0.52°N … 0.48°N
		ridgeLon = 10.15
		trackLon = 10.16
		spacingM = 50.0
		cellDeg  = 1.0 / 3600 // 1″
	)
	ts := ridgeWorld(t, r0, r1, 3000)
	env := &Env{Terrain: ts}
	hand := End{Radio: Radio{PowerW: 5, SensitivityDBm: units.DBmFromMicrovolts(0.25)}, Antenna: Antenna{HeightM: 1.5}}
	tg := Target{End: hand, Kind: Simplex, FreqMHz: 146.55}
	tg.Name, tg.Pos, tg.Antenna = "mast", orb.Point{10.05, 0.5}, Antenna{GainDBi: 6, HeightM: 150}
	hand.Name = "walker"
	track := gpx.Track{Name: "meridian", Points: []gpx.Place{{Pos: orb.Point{trackLon, 0.40}}, {Pos: orb.Point{trackLon, 0.60}}}}
	const need = 27.0
	r, err := env.Route(context.Background(), RouteRequest{Track: track, Walker: hand, Targets: []Target{tg}, NeededMarginDB: need, SpacingM: spacingM}, nil)
	if err != nil {
		t.Fatal(err)
	}
	// The premise: far from the edges, clear paths pass with room to spare
	// and blocked ones fail by far.
	for _, p := range r.Points {
		mid := math.Abs(p.Lat - 0.5)
		switch {
		case mid < 0.015 && p.MarginsDB[0] > need-8:
			t.Fatalf("behind the wall at %.4f°N the margin is %.1f dB: the wall does not block", p.Lat, p.MarginsDB[0])
		case mid > 0.03 && p.MarginsDB[0] < need+8:
			t.Fatalf("in the clear at %.4f°N the margin is %.1f dB: the budget is too tight for this test", p.Lat, p.MarginsDB[0])
		}
	}
	if len(r.Gaps) != 1 {
		t.Fatalf("%d gaps, want 1: %+v", len(r.Gaps), r.Gaps)
	}
	g := r.Gaps[0]
	// Latitudes of the track at the gap ends, from their distances along it
	// (the track starts at 0.40°N on a meridian).
	south, north := 1-float64(r1)/3600, 1-float64(r0)/3600
	cases := []struct {
		name           string
		gotLat         float64
		fullLat, noLat float64 // the ridge at full height, and gone
	}{
		{"start (south end)", g.Start.Lat, south, south - cellDeg},
		{"end (north end)", g.End.Lat, north, north + cellDeg},
	}
	for _, c := range cases {
		a := shadowEdge(tg.Pos, ridgeLon, trackLon, c.fullLat, 0.41, 0.59)
		b := shadowEdge(tg.Pos, ridgeLon, trackLon, c.noLat, 0.41, 0.59)
		lo, hi := math.Min(a, b), math.Max(a, b)
		// Half the spacing, in degrees of latitude (WGS84 meridian arc near
		// the equator, 110 574 m per degree; NIMA TR8350.2).
		half := spacingM / 2 / 110574
		t.Logf("gap %s at %.6f°N; shadow edge band %.6f…%.6f°N, ± %.6f° for the spacing", c.name, c.gotLat, lo, hi, half)
		if c.gotLat < lo-half-1e-9 || c.gotLat > hi+half+1e-9 {
			t.Errorf("gap %s at %.6f°N; geometry puts it in %.6f…%.6f°N (± %.6f°)", c.name, c.gotLat, lo, hi, half)
		}
	}
	if math.Abs(g.Start.Lon-trackLon) > 1e-9 || math.Abs(g.End.Lon-trackLon) > 1e-9 {
		t.Errorf("gap ends off the track: %+v", g)
	}
	// Best spots: the covered points next to the gap, on either side.
	if len(r.BestSpots) != 2 || r.BestSpots[0].Side != "before" || r.BestSpots[1].Side != "after" {
		t.Fatalf("best spots %+v", r.BestSpots)
	}
	for _, s := range r.BestSpots {
		if s.MarginDB < need || (s.Side == "before" && s.DistanceM > g.StartM) || (s.Side == "after" && s.DistanceM < g.EndM) ||
			math.Abs(s.DistanceM-g.StartM) > DefaultSpotWindowM && math.Abs(s.DistanceM-g.EndM) > DefaultSpotWindowM {
			t.Errorf("best spot %+v does not fit gap %.0f–%.0f m", s, g.StartM, g.EndM)
		}
	}
}

// TestRouteDeterministic checks that the result does not depend on the
// number of cores.
func TestRouteDeterministic(t *testing.T) {
	p, env := demoPlan(t)
	var out [2][]byte
	for i, procs := range []int{1, 2} {
		old := runtime.GOMAXPROCS(procs)
		r := demoRoute(t, p, env)
		runtime.GOMAXPROCS(old)
		b, err := json.Marshal(r)
		if err != nil {
			t.Fatal(err)
		}
		out[i] = b
	}
	if !bytes.Equal(out[0], out[1]) {
		t.Error("route results differ between GOMAXPROCS 1 and 2")
	}
}

// TestRouteBoundedMemory walks a 100 000-point GPX track (a serpentine
// 1 km square, points 5 m apart) checked every 25 m against a target 25 km
// away, with 10 m profile samples: each profile holds about 2 500 samples
// in four slices (80 kB), so keeping one per point would take 1.6 GB. The
// run may allocate only a small summary per point.
func TestRouteBoundedMemory(t *testing.T) {
	tr := serpentine("long", 45, 7, 100_000, 5, 1000, 1000.0/500)
	doc, err := gpx.Encode(gpx.Output{Tracks: []gpx.Track{tr}})
	if err != nil {
		t.Fatal(err)
	}
	f, err := gpx.Decode(doc, "long.gpx")
	if err != nil || len(f.Tracks[0].Points) != 100_000 {
		t.Fatalf("%v, %d points", err, len(f.Tracks[0].Points))
	}
	hand := End{Name: "walker", Radio: Radio{PowerW: 5, SensitivityDBm: -119}, Antenna: Antenna{HeightM: 1.5}}
	tg := Target{End: hand, Kind: Simplex, FreqMHz: 146.55}
	tg.Name, tg.Pos = "far", orb.Point{7.3, 45.05}
	env := &Env{Model: propagation.FreeSpace{}, StepM: 10}
	req := RouteRequest{Track: f.Tracks[0], Walker: hand, Targets: []Target{tg}, NeededMarginDB: 10, SpacingM: 25}
	runtime.GC()
	var before, after runtime.MemStats
	runtime.ReadMemStats(&before)
	r, err := env.Route(context.Background(), req, nil)
	runtime.ReadMemStats(&after)
	if err != nil {
		t.Fatal(err)
	}
	n := len(r.Points)
	if n < 19_000 {
		t.Fatalf("%d points checked, want about 20 000", n)
	}
	perPoint := float64(after.TotalAlloc-before.TotalAlloc) / float64(n)
	t.Logf("%d points, %.0f bytes allocated per point", n, perPoint)
	if perPoint > 1000 {
		t.Errorf("%.0f bytes allocated per checked point: profiles are being kept or reallocated", perPoint)
	}
}

// TestRouteErrors checks the refusals.
func TestRouteErrors(t *testing.T) {
	hand := End{Name: "walker", Radio: Radio{PowerW: 5, SensitivityDBm: -119}, Antenna: Antenna{HeightM: 1.5}}
	tg := Target{End: hand, Kind: Simplex, FreqMHz: 146.55}
	tg.Name, tg.Pos = "t", orb.Point{7.01, 45.01}
	opt := tg
	opt.Optional = true
	line := gpx.Track{Name: "l", Points: []gpx.Place{{Pos: orb.Point{7, 45}}, {Pos: orb.Point{7.001, 45}}}}
	cases := []struct {
		name string
		req  RouteRequest
		want string
	}{
		{"no targets", RouteRequest{Track: line, Walker: hand}, "no required targets"},
		{"all optional", RouteRequest{Track: line, Walker: hand, Targets: []Target{opt}}, "every target is optional"},
		{"one point", RouteRequest{Track: gpx.Track{Name: "p", Points: line.Points[:1]}, Walker: hand, Targets: []Target{tg}}, "at least two"},
		{"no length", RouteRequest{Track: gpx.Track{Name: "z", Points: []gpx.Place{line.Points[0], line.Points[0]}}, Walker: hand, Targets: []Target{tg}}, "no length"},
		{"negative spacing", RouteRequest{Track: line, Walker: hand, Targets: []Target{tg}, SpacingM: -1}, "spacing"},
		{"tiny spacing", RouteRequest{Track: line, Walker: hand, Targets: []Target{tg}, SpacingM: 1e-6}, "longer spacing"},
		{"no radio", RouteRequest{Track: line, Walker: End{Name: "w"}, Targets: []Target{tg}}, "power and a sensitivity"},
	}
	env := &Env{}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			_, err := env.Route(context.Background(), c.req, nil)
			if err == nil || !strings.Contains(err.Error(), c.want) {
				t.Errorf("error %v, want one containing %q", err, c.want)
			}
		})
	}
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	if _, err := env.Route(ctx, RouteRequest{Track: line, Walker: hand, Targets: []Target{tg}}, nil); err == nil {
		t.Error("a cancelled context was not noticed")
	}
}

// ExampleEnv_Route checks a 2 km walk due east on a smooth earth against a
// repeater 5 km to the north.
func ExampleEnv_Route() {
	hand := End{Name: "handheld", Radio: Radio{PowerW: 5, SensitivityDBm: units.DBmFromMicrovolts(0.25)}, Antenna: Antenna{HeightM: 1.5}}
	rpt := Target{End: End{Name: "repeater", Pos: orb.Point{7.01, 45.045}, Radio: Radio{PowerW: 50, SensitivityDBm: -122}, Antenna: Antenna{GainDBi: 6, HeightM: 20}},
		Kind: Repeater, ListenMHz: 147.78, TransmitMHz: 147.18}
	walk := gpx.Track{Name: "walk", Points: []gpx.Place{{Pos: orb.Point{7, 45}}, {Pos: orb.Point{7.025, 45}}}}
	env := &Env{} // no elevation data: a smooth earth, ITU-R P.526-16; vertical polarization over land (the zero values)
	r, err := env.Route(context.Background(), RouteRequest{Track: walk, Walker: hand, Targets: []Target{rpt}, NeededMarginDB: 10}, nil)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("%.0f m in %d points, %.0f %% covered, %d gaps\n", r.LengthM, len(r.Points), 100*r.OverallFraction, len(r.Gaps))
	fmt.Printf("margin at the start %.1f dB, at the end %.1f dB\n", r.Points[0].WorstMarginDB, r.Points[len(r.Points)-1].WorstMarginDB)
	// Output:
	// 1971 m in 41 points, 100 % covered, 0 gaps
	// margin at the start 47.1 dB, at the end 46.9 dB
}

// FuzzRouteTrack feeds Route tracks decoded from arbitrary GPX documents
// (seeded with the example hike): it must never panic; a track it accepts
// gives points in order along it, fractions in 0…1, and gaps inside it.
func FuzzRouteTrack(f *testing.F) {
	if b, err := os.ReadFile(filepath.Join("..", "examples", "valley", "hike.gpx")); err == nil {
		f.Add(b)
	}
	f.Add([]byte(`<gpx><trk><trkseg><trkpt lat="0" lon="179.9"/><trkpt lat="0.01" lon="-179.9"/></trkseg></trk></gpx>`))
	f.Add([]byte(`<gpx><rte><rtept lat="89.99" lon="0"/><rtept lat="89.99" lon="180"/><rtept lat="89.99" lon="180"/></rte></gpx>`))
	hand := End{Name: "walker", Radio: Radio{PowerW: 5, SensitivityDBm: -119}, Antenna: Antenna{HeightM: 1.5}}
	tg := Target{End: hand, Kind: Simplex, FreqMHz: 146.55}
	tg.Name = "t"
	env := &Env{Model: propagation.FreeSpace{}, StepM: 500}
	f.Fuzz(func(t *testing.T, data []byte) {
		g, err := gpx.Decode(data, "fuzz.gpx")
		if err != nil || len(g.Tracks) == 0 || len(g.Tracks[0].Points) > 2000 {
			return
		}
		tr := g.Tracks[0]
		total := 0.0 // keep the run short: tracks up to 100 km
		for i := 1; i < len(tr.Points); i++ {
			d, _, _ := terrain.Inverse(tr.Points[i-1].Pos.Lat(), tr.Points[i-1].Pos.Lon(), tr.Points[i].Pos.Lat(), tr.Points[i].Pos.Lon())
			total += d
		}
		if !(total < 100e3) {
			return
		}
		if len(tr.Points) > 0 {
			tg.Pos = tr.Points[0].Pos
		}
		r, err := env.Route(context.Background(), RouteRequest{Track: tr, Walker: hand, Targets: []Target{tg}, NeededMarginDB: 10, SpacingM: 1000}, nil)
		if err != nil {
			return
		}
		if !(r.OverallFraction >= 0 && r.OverallFraction <= 1) || len(r.Points) < 2 {
			t.Fatalf("fraction %v, %d points", r.OverallFraction, len(r.Points))
		}
		for k := 1; k < len(r.Points); k++ {
			if !(r.Points[k].DistanceM > r.Points[k-1].DistanceM) {
				t.Fatalf("points out of order at %d", k)
			}
		}
		for _, gp := range r.Gaps {
			if gp.StartM < 0 || gp.EndM > r.LengthM || gp.LengthM <= 0 {
				t.Fatalf("gap %+v outside a %v m track", gp, r.LengthM)
			}
		}
	})
}
