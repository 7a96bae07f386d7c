package terrain

import (
	"math"
	"math/rand/v2"
	"testing"
)

// TestProfileGridSampling: Profile samples heights in grid coordinates
// (reciprocal spacings, no division per sample) and places its samples
// from exact geodesic nodes up to 2 km apart. Against the direct path,
// Tile.At (via Elevation, itself checked against the bilinear interpolation
// of gdallocationinfo's samples in TestSetSeams) at the exact geodesic
// point (Line.Position, Karney 2013), heights must agree within 2 mm and
// positions within 1e−11°, on random profiles over a 2×2 mosaic of 3″
// tiles with voids, crossing its seams, and on profiles along the seams
// themselves (a meridian on a tile edge, and ends on the edges and corner).
func TestProfileGridSampling(t *testing.T) {
	dir := htMosaicRaw(t)
	set, err := Open(dir)
	if err != nil {
		t.Fatal(err)
	}
	type path struct{ lat1, lon1, lat2, lon2, step float64 }
	paths := []path{
		{45.2, 8, 46.8, 8, 0},                 // along the meridian of the E–W seam
		{46, 7.2, 46, 8.9, 0},                 // ends on the N–S seam
		{45.5, 7.5, 46, 8, 0},                 // ends on the corner
		{45, 7, 47, 9, 0},                     // corner to corner of the mosaic
		{46.9, 7.1, 45.95, 7.05, 0},           // short, across one seam
		{45.9999, 7.9999, 46.0001, 8.0001, 0}, // a few metres over the corner
		{45.5, 7.5, 45.5001, 7.5, 0},          // shorter than a step
	}
	rng := rand.New(rand.NewPCG(11, 3))
	for range 60 {
		paths = append(paths, path{45 + rng.Float64()*2, 7 + rng.Float64()*2, 45 + rng.Float64()*2, 7 + rng.Float64()*2, []float64{0, 7.5, 30, 90}[rng.IntN(4)]})
	}
	var p Profile
	worstH, worstPos, samples := 0.0, 0.0, 0
	for k, c := range paths {
		if err := set.Profile(c.lat1, c.lon1, c.lat2, c.lon2, c.step, &p); err != nil {
			t.Fatal(err)
		}
		line, _ := InverseLine(c.lat1, c.lon1, c.lat2, c.lon2)
		for i := range p.Len() {
			lat, lon := line.Position(p.DistM[i])
			if i == p.Len()-1 {
				lat, lon = c.lat2, c.lon2
			}
			if d := math.Max(math.Abs(lat-p.Lat[i]), math.Abs(lon-p.Lon[i])); d > 1e-11 {
				t.Fatalf("path %d sample %d: position %.13f,%.13f, Line.Position %.13f,%.13f", k, i, p.Lat[i], p.Lon[i], lat, lon)
			} else {
				worstPos = math.Max(worstPos, d)
			}
			want, _, err := set.Elevation(lat, lon)
			if err != nil {
				t.Fatal(err)
			}
			if d := math.Abs(want - p.ElevM[i]); !(d <= 0.002) {
				t.Fatalf("path %d sample %d (%.7f, %.7f): height %.6f m, Tile.At %.6f m", k, i, lat, lon, p.ElevM[i], want)
			} else {
				worstH = math.Max(worstH, d)
			}
			samples++
		}
	}
	t.Logf("%d samples on %d profiles: worst height difference %.2g m, position %.2g°", samples, len(paths), worstH, worstPos)
}
