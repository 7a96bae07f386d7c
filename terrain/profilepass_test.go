package terrain

import (
	"math"
	"math/rand/v2"
	"slices"
	"testing"
)

// TestProfileOnePass: Profile places the samples stretch by stretch with
// cached weights (profileSamples, nodeWalk), then takes their heights; it
// must give to the last bit what the plain steps give, Line.Positions
// (Karney 2013 nodes, cubic Hermite between them; checked against
// Line.Position in TestProfileGridSampling) then every sample's height
// looked up on its own (heightWalk.height): distances, positions, heights,
// the files used in their order, NoData and the missing tiles, on the
// profiles of profilePassPaths (a mosaic with voids, off it, the
// antimeridian, beyond 75°).
func TestProfileOnePass(t *testing.T) {
	got, want := twoMosaicSets(t)
	paths := profilePassPaths(5, 8, 80)
	var p, q Profile
	for k, c := range paths {
		if err := got.Profile(c.lat1, c.lon1, c.lat2, c.lon2, c.step, &p); err != nil {
			t.Fatal(err)
		}
		// The two steps, as Profile did them before.
		var line Line
		distM, _, _ := profileLine(&line, c.lat1, c.lon1, c.lat2, c.lon2)
		n := p.Len()
		q.DistanceM, q.StepM = distM, p.StepM
		q.DistM, q.Lat, q.Lon, q.ElevM = grow(q.DistM, n), grow(q.Lat, n), grow(q.Lon, n), grow(q.ElevM, n)
		q.Sources, q.NoData = q.Sources[:0], 0
		profilePositions(&line, c.lat1, c.lon1, c.lat2, c.lon2, p.StepM, &q)
		w := want.newHeightWalk(&q)
		for i := range n {
			h, err := w.height(q.Lat[i], q.Lon[i])
			if err != nil {
				t.Fatal(err)
			}
			q.ElevM[i] = h
		}
		for i := range n {
			for _, v := range [][2]float64{{p.DistM[i], q.DistM[i]}, {p.Lat[i], q.Lat[i]}, {p.Lon[i], q.Lon[i]}, {p.ElevM[i], q.ElevM[i]}} {
				if math.Float64bits(v[0]) != math.Float64bits(v[1]) {
					t.Fatalf("path %d sample %d of %d: %v, two steps give %v", k, i, n, v[0], v[1])
				}
			}
		}
		if p.NoData != q.NoData || !slices.Equal(p.Sources, q.Sources) {
			t.Fatalf("path %d: NoData %d, sources %v; two steps give %d, %v", k, p.NoData, p.Sources, q.NoData, q.Sources)
		}
	}
	if g, w := got.Missing(), want.Missing(); !slices.Equal(g, w) {
		t.Errorf("missing tiles %v, two steps give %v", g, w)
	}
}

// TestProfileHeightsAgainstProfile: ProfileHeights interpolates the
// samples in the rows and columns of the tile in use, Profile in latitude
// and longitude; the two are the same affine map up to rounding, so the
// heights must agree within 1e−9 m, with the same length, step, azimuths,
// files used, NoData and missing tiles, and no positions, on the
// profiles of profilePassPaths.
func TestProfileHeightsAgainstProfile(t *testing.T) {
	got, want := twoMosaicSets(t)
	paths := profilePassPaths(7, 9, 120)
	var p, q Profile
	worst := 0.0
	for k, c := range paths {
		if err := got.ProfileHeights(c.lat1, c.lon1, c.lat2, c.lon2, c.step, &p); err != nil {
			t.Fatal(err)
		}
		if err := want.Profile(c.lat1, c.lon1, c.lat2, c.lon2, c.step, &q); err != nil {
			t.Fatal(err)
		}
		if p.Len() != q.Len() || p.DistanceM != q.DistanceM || p.StepM != q.StepM || p.AzimuthDeg != q.AzimuthDeg || p.BackAzimuthDeg != q.BackAzimuthDeg {
			t.Fatalf("path %d: %d samples, %v m, step %v m, azimuths %v %v; Profile gives %d, %v, %v, %v %v",
				k, p.Len(), p.DistanceM, p.StepM, p.AzimuthDeg, p.BackAzimuthDeg, q.Len(), q.DistanceM, q.StepM, q.AzimuthDeg, q.BackAzimuthDeg)
		}
		if len(p.DistM)+len(p.Lat)+len(p.Lon) != 0 {
			t.Fatalf("path %d: positions filled (%d, %d, %d)", k, len(p.DistM), len(p.Lat), len(p.Lon))
		}
		for i := range p.ElevM {
			d := math.Abs(p.ElevM[i] - q.ElevM[i])
			worst = max(worst, d)
			if !(d <= 1e-9) {
				t.Fatalf("path %d sample %d of %d: %v m, Profile gives %v m", k, i, p.Len(), p.ElevM[i], q.ElevM[i])
			}
		}
		if p.NoData != q.NoData || !slices.Equal(p.Sources, q.Sources) {
			t.Fatalf("path %d: NoData %d, sources %v; Profile gives %d, %v", k, p.NoData, p.Sources, q.NoData, q.Sources)
		}
	}
	if g, w := got.Missing(), want.Missing(); !slices.Equal(g, w) {
		t.Errorf("missing tiles %v, Profile gives %v", g, w)
	}
	t.Logf("largest height difference %.3g m", worst)
}

// TestHermiteChordBound checks the bound stretchHeights relies on to skip
// the per-sample check: a cubic Hermite curve with end difference A and
// end slopes times length B, C strays from its chord by at most
// 4/27 (|B − A| + |C − A|), on random curves, at 2001 points each, with
// the basis functions of Line.Positions (hermiteCache.weights); and the
// bound is reached (within 1e−6) by the curves it is sharp for.
func TestHermiteChordBound(t *testing.T) {
	var c hermiteCache
	w := c.weights(2000)
	rng := rand.New(rand.NewPCG(3, 4))
	for k := range 2000 {
		a := (rng.Float64() - 0.5) * 200
		b := a + (rng.Float64()-0.5)*math.Pow(10, float64(rng.IntN(5)-2))
		cc := a + (rng.Float64()-0.5)*math.Pow(10, float64(rng.IntN(5)-2))
		if k == 0 { // sharp: only the first slope differs; its largest stray is at t = 1/3
			a, b, cc = 0, 1, 0
		}
		bound := 4.0 / 27 * (math.Abs(b-a) + math.Abs(cc-a))
		worst := 0.0
		for i := range 2000 {
			tt := float64(i) / 2000
			y := w.h01[i]*a + w.a10[i]*b + w.a11[i]*cc
			worst = max(worst, math.Abs(y-tt*a))
		}
		if worst > bound*(1+1e-12)+1e-12 {
			t.Fatalf("curve %d (A %g, B %g, C %g): strays %g from its chord, bound %g", k, a, b, cc, worst, bound)
		}
		if k == 0 && worst < bound-1e-6 {
			t.Errorf("sharp curve strays %g, bound %g: the bound is loose", worst, bound)
		}
	}
}

// passPath is a profile to compare: its ends, degrees, and step, metres.
type passPath struct{ lat1, lon1, lat2, lon2, step float64 }

// profilePassPaths returns the profiles TestProfileOnePass and
// TestProfileHeightsAgainstProfile compare over the 2×2 mosaic of 3″
// tiles at 45–47°N, 7–9°E (htMosaicRaw): along and across it, off it,
// across the antimeridian, beyond 75°, steps over the 2 km node spacing,
// one place, then n random ones (seeded by s1, s2) over and around it.
func profilePassPaths(s1, s2 uint64, n int) []passPath {
	paths := []passPath{
		{45.2, 8, 46.8, 8, 0},
		{45, 7, 47, 9, 0},
		{46.9, 8.9, 45.1, 7.05, 0},
		{45.5, 7.5, 45.5001, 7.5, 0},
		{44.5, 6.5, 47.5, 9.5, 0},       // off the mosaic at both ends
		{10, 179.9, 10.3, -179.8, 90},   // across the antimeridian
		{74.5, 20, 76.5, 21, 30},        // nodes beyond 75°
		{-80, 10, -79, 170, 500},        // far south, long
		{45.5, 7.5, 46.5, 8.5, 3000},    // a step over 2 km: every point exact
		{45.5, 7.5, 46.5, 8.5, 1000},    // two steps per node
		{45.95, 7.95, 46.05, 8.05, 0.5}, // half-metre step
		{45.5, 7.5, 45.5, 7.5, 0},       // one place
	}
	rng := rand.New(rand.NewPCG(s1, s2))
	for range n {
		paths = append(paths, passPath{44.7 + rng.Float64()*2.6, 6.7 + rng.Float64()*2.6, 44.7 + rng.Float64()*2.6, 6.7 + rng.Float64()*2.6, []float64{0, 7.5, 30, 90}[rng.IntN(4)]})
	}
	return paths
}

// twoMosaicSets returns two sets over one 2×2 mosaic of 3″ tiles with
// voids (htMosaicRaw), each with its own cache and missing-tile list.
func twoMosaicSets(t *testing.T) (a, b *Set) {
	t.Helper()
	dir := htMosaicRaw(t)
	open := func() *Set {
		s, err := Open(dir)
		if err != nil {
			t.Fatal(err)
		}
		return s
	}
	return open(), open()
}
