package terrain

import (
	"math"
	"math/rand/v2"
	"slices"
	"testing"
)

// TestSamplerMatchesGDAL samples a 2×2 mosaic of 3″ tiles (with voids)
// across its seams with a Sampler and compares with the bilinear
// interpolation (common practice) of the samples gdallocationinfo reads
// (GDAL 3.6), and with Set.Elevation to rounding.
func TestSamplerMatchesGDAL(t *testing.T) {
	dir := htMosaic(t)
	set, err := Open(dir)
	if err != nil {
		t.Fatal(err)
	}
	rng := rand.New(rand.NewPCG(3, 9))
	const k = 300
	lats, lons := make([]float64, k), make([]float64, k)
	for i := range lats {
		lats[i] = 45.5 + rng.Float64()
		lons[i] = 7.5 + rng.Float64()
	}
	want := htGDALBilinear(t, dir, lats, lons)
	sp := set.NewSampler()
	for i := range lats {
		got, err := sp.Height(lats[i], lons[i])
		if err != nil {
			t.Fatal(err)
		}
		elev, _, err := set.Elevation(lats[i], lons[i])
		if err != nil {
			t.Fatal(err)
		}
		if math.Abs(got-elev) > 1e-9 {
			t.Errorf("%.7f,%.7f: Sampler %.9f m, Elevation %.9f m", lats[i], lons[i], got, elev)
		}
		if !math.IsNaN(want[i]) && math.Abs(got-want[i]) > 1e-6 {
			t.Errorf("%.7f,%.7f: Sampler %.6f m, bilinear of gdallocationinfo samples %.6f m", lats[i], lons[i], got, want[i])
		}
	}
	if sp.NoData != 0 {
		t.Errorf("NoData %d inside the mosaic", sp.NoData)
	}
	if h, _ := sp.Height(10, 10); h != 0 || sp.NoData != 1 {
		t.Errorf("outside every tile: %v m, NoData %d; want 0 m and 1", h, sp.NoData)
	}
}

// TestSamplerRadial: the positions of a radial are the geodesic's (Karney,
// Direct) and its heights the Sampler's.
func TestSamplerRadial(t *testing.T) {
	set, err := Open()
	if err != nil {
		t.Fatal(err)
	}
	n := 500
	lats, lons, hs := make([]float64, n), make([]float64, n), make([]float64, n)
	if err := set.NewSampler().Radial(45.5, 7.5, 63.5, 30, lats, lons, hs); err != nil {
		t.Fatal(err)
	}
	for _, i := range []int{0, 1, 77, 250, 499} {
		lat, lon, _ := Direct(45.5, 7.5, 63.5, float64(i)*30)
		if math.Abs(lat-lats[i]) > 1e-9 || math.Abs(lon-lons[i]) > 1e-9 {
			t.Errorf("point %d: %.10f,%.10f, Direct %.10f,%.10f", i, lats[i], lons[i], lat, lon)
		}
	}
	// RadialFrom: the same points from the 100th on.
	l2, o2, h2 := make([]float64, 400), make([]float64, 400), make([]float64, 400)
	if err := set.NewSampler().RadialFrom(45.5, 7.5, 63.5, 100*30, 30, l2, o2, h2); err != nil {
		t.Fatal(err)
	}
	for _, i := range []int{0, 1, 150, 399} {
		if math.Abs(l2[i]-lats[i+100]) > 1e-11 || math.Abs(o2[i]-lons[i+100]) > 1e-11 || h2[i] != hs[i+100] {
			t.Errorf("RadialFrom point %d: %.12f,%.12f, Radial %.12f,%.12f", i, l2[i], o2[i], lats[i+100], lons[i+100])
		}
	}
	if err := set.NewSampler().Radial(45.5, 7.5, 10, 0, lats, lons, hs); err == nil {
		t.Error("zero step accepted")
	}
	if err := set.NewSampler().RadialFrom(45.5, 7.5, 10, -1, 30, lats, lons, hs); err == nil {
		t.Error("negative start accepted")
	}
}

// TestSamplerRow: Row gives, cell for cell, what Height gives (as float32)
// along rows of a 2×2 mosaic of 3″ tiles with voids, across its seams, on
// and off the sample grid, and past its edge (no data: 0 m, counted).
func TestSamplerRow(t *testing.T) {
	dir := htMosaic(t)
	set, err := Open(dir)
	if err != nil {
		t.Fatal(err)
	}
	for _, tc := range []struct {
		name            string
		lat, lon0, dLon float64
		n               int
	}{
		{"on the grid across the seam", 46.0 + 1.0/1200*7, 7.5, 1.0 / 1200, 1300},
		{"on the seam row", 46.0, 7.9, 1.0 / 1200, 400},
		{"off the grid", 45.77777, 7.41234, 0.00071, 1700},
		{"past the east edge", 46.3, 8.9, 1.0 / 1200, 300},
		{"from no data into the mosaic", 45.6, 6.9, 1.0 / 3600, 2000},
	} {
		t.Run(tc.name, func(t *testing.T) {
			ref, row := set.NewSampler(), set.NewSampler()
			out := make([]float32, tc.n)
			lo, hi := 3, tc.n-5
			if err := row.Row(tc.lat, tc.lon0, tc.dLon, out, lo, hi); err != nil {
				t.Fatal(err)
			}
			for c := range out {
				if c < lo || c >= hi {
					if out[c] != 0 {
						t.Errorf("column %d outside [%d, %d) written: %v", c, lo, hi, out[c])
					}
					continue
				}
				want, err := ref.Height(tc.lat, normLon(tc.lon0+float64(c)*tc.dLon))
				if err != nil {
					t.Fatal(err)
				}
				if out[c] != float32(want) {
					t.Fatalf("column %d: Row %v m, Height %v m", c, out[c], want)
				}
			}
			if row.NoData != ref.NoData {
				t.Errorf("NoData %d, Height's %d", row.NoData, ref.NoData)
			}
		})
	}
}

// TestRadialHeightsAgainstRadial: RadialHeightsFrom interpolates the
// samples in the rows and columns of the tile in use, RadialFrom in
// latitude and longitude; the heights must agree within 1e−9 m, with the
// same NoData and missing tiles, on radials over a 2×2 mosaic of 3″ tiles
// with voids (from inside, from outside across it, from offsets), across
// the antimeridian, beyond 75°, with steps over the 2 km node spacing,
// and with one, two and no samples; bad steps and starts are refused.
func TestRadialHeightsAgainstRadial(t *testing.T) {
	got, want := twoMosaicSets(t)
	type radial struct {
		lat, lon, azi, start, step float64
		n                          int
	}
	radials := []radial{
		{46, 8, 0, 0, 90, 2000},
		{46, 8, 137.5, 0, 30, 5000},
		{44.8, 6.8, 45, 0, 60, 6000},    // from outside, across the mosaic
		{46.5, 7.5, 270, 1234, 25, 900}, // from an offset, leaving it westwards
		{10, 179.95, 90, 0, 90, 500},    // across the antimeridian
		{74.8, 20, 10, 0, 30, 3000},     // beyond 75°
		{46, 8, 200, 0, 3000, 50},       // a step over 2 km: every point exact
		{46, 8, 20, 500, 90, 1},
		{46, 8, 20, 500, 90, 2},
		{46, 8, 20, 500, 90, 0},
	}
	rng := rand.New(rand.NewPCG(11, 12))
	for range 150 {
		radials = append(radials, radial{44.8 + rng.Float64()*2.4, 6.8 + rng.Float64()*2.4, rng.Float64() * 360,
			float64(rng.IntN(3)) * rng.Float64() * 20000, []float64{21.7, 30, 90}[rng.IntN(3)], 10 + rng.IntN(4000)})
	}
	gs, ws := got.NewSampler(), want.NewSampler()
	worst := 0.0
	for k, r := range radials {
		h := make([]float64, r.n)
		lats, lons, hw := make([]float64, r.n), make([]float64, r.n), make([]float64, r.n)
		gs.NoData, ws.NoData = 0, 0
		if err := gs.RadialHeightsFrom(r.lat, r.lon, r.azi, r.start, r.step, h); err != nil {
			t.Fatal(err)
		}
		if err := ws.RadialFrom(r.lat, r.lon, r.azi, r.start, r.step, lats, lons, hw); err != nil {
			t.Fatal(err)
		}
		for i := range h {
			d := math.Abs(h[i] - hw[i])
			worst = max(worst, d)
			if !(d <= 1e-9) {
				t.Fatalf("radial %d (%+v) point %d: %v m, RadialFrom %v m", k, r, i, h[i], hw[i])
			}
		}
		if gs.NoData != ws.NoData {
			t.Fatalf("radial %d (%+v): NoData %d, RadialFrom %d", k, r, gs.NoData, ws.NoData)
		}
	}
	if g, w := got.Missing(), want.Missing(); !slices.Equal(g, w) {
		t.Errorf("missing tiles %v, RadialFrom gives %v", g, w)
	}
	t.Logf("largest height difference %.3g m", worst)
	for _, bad := range [][2]float64{{0, 0}, {-1, 30}, {0, math.NaN()}, {math.Inf(1), 30}, {0, -5}} {
		if err := gs.RadialHeightsFrom(46, 8, 10, bad[0], bad[1], make([]float64, 5)); err == nil {
			t.Errorf("start %v m, step %v m accepted", bad[0], bad[1])
		}
	}
}
