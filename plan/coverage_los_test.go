package plan

import (
	"math"
	"math/rand/v2"
	"testing"

	"github.com/mastlink/mastlink/terrain"
)

// TestAzimuthRad: the polynomial arctangent that assigns cells to radials
// stays within its documented 1e−8 rad of math.Atan2 over every octant and
// on the axes and diagonals.
func TestAzimuthRad(t *testing.T) {
	rng := rand.New(rand.NewPCG(2, 7))
	cases := [][2]float64{{0, 1}, {1, 0}, {0, -1}, {-1, 0}, {1, 1}, {-1, 1}, {1, -1}, {-1, -1}, {1e-9, 1}, {3, 1e-12}}
	for range 100000 {
		cases = append(cases, [2]float64{rng.NormFloat64() * 1e4, rng.NormFloat64() * 1e4})
	}
	worst := 0.0
	for _, c := range cases {
		got, want := azimuthRad(c[0], c[1]), math.Atan2(c[0], c[1])
		d := math.Abs(got - want)
		if d > math.Pi { // ±π are the same direction
			d = 2*math.Pi - d
		}
		if !(d <= 1e-8) {
			t.Fatalf("azimuthRad(%g, %g) = %.12f, atan2 %.12f", c[0], c[1], got, want)
		}
		worst = math.Max(worst, d)
	}
	t.Logf("worst difference from math.Atan2: %.2g rad", worst)
}

// TestSectorRowsCoverEveryCell: for wedges of every width the units use
// and wider (the whole-row fallback), whole and cut to annuli, on grids at
// the equator, at 60°N, at 45°S across the antimeridian and with a coarse
// resolution, every cell centre in the annular sector falls inside the
// column interval sectorRows gives for its row, and rows are visited once.
func TestSectorRowsCoverEveryCell(t *testing.T) {
	ts, err := terrain.Open()
	if err != nil {
		t.Fatal(err)
	}
	for _, tc := range []struct {
		name     string
		lat, lon float64
		radiusM  float64
		resM     float64
	}{
		{"equator", 0.3, 10.2, 3000, 30},
		{"60N", 60.1, 24.9, 5000, 50},
		{"antimeridian 45S", -45.2, 179.97, 4000, 40},
		{"coarse", 12, -70, 20000, 900},
	} {
		t.Run(tc.name, func(t *testing.T) {
			res := &CoverageResult{}
			g, err := coverageGeometry(ts, tc.lat, tc.lon, CoverageRequest{RadiusM: tc.radiusM, ResolutionM: tc.resM, Mode: CoverageLOS}, res)
			if err != nil {
				t.Fatal(err)
			}
			for _, w := range []struct{ a1, a2, lo, hi float64 }{
				{-0.05, 0.08, 0, 1}, {0.7, 0.79, 0, 1}, {1.5, 1.62, 0.5, 1}, {3.1, 3.2, 0.25, 0.5}, {-1.6, -1.5, 0, 0.125},
				{2.9, 3.3, 0.1, 0.9}, {-3.3, -3.0, 0, 1}, {0.2, 1.7, 0, 1}, {-2, 1, 0.5, 1},
			} {
				dLo, dHi := w.lo*g.radiusM, w.hi*g.radiusM
				seen := map[int][2]int{}
				g.sectorRows(w.a1, w.a2, dLo, dHi, func(r, lo, hi int) {
					if _, dup := seen[r]; dup {
						t.Fatalf("wedge %v: row %d visited twice", w, r)
					}
					seen[r] = [2]int{lo, hi}
				})
				in := 0
				for r := range g.rows {
					north := (g.rowLat[r] - g.siteLat) * g.rowN[r]
					for c := range g.cols {
						e := g.east(r, c)
						if d := math.Hypot(e, north); d > dHi || d < dLo {
							continue
						}
						a := azimuthRad(e, north)
						if e == 0 && north == 0 {
							a = 0
						}
						// the same direction, whichever turn the wedge is written in
						if d := math.Remainder(a-(w.a1+w.a2)/2, 2*math.Pi); math.Abs(d) > (w.a2-w.a1)/2 {
							continue
						}
						in++
						span, ok := seen[r]
						if !ok || c < span[0] || c >= span[1] {
							t.Fatalf("wedge %v: cell (%d, %d) at azimuth %.4f outside row %d's columns %v", w, r, c, a, r, span)
						}
					}
				}
				if in == 0 {
					t.Errorf("wedge %v: no cell inside; the check checked nothing", w)
				}
			}
		})
	}
}
