package terrain

import (
	"math"
	"math/rand/v2"
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
