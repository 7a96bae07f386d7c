package plan

import (
	"testing"

	"github.com/mastlink/mastlink/plan/feedline"
	"github.com/mastlink/mastlink/terrain"
	"github.com/paulmach/orb"
)

// BenchmarkLink measures one whole link evaluation on the example terrain
// (two 3″ tiles, cached after the first run): profile extraction along the
// geodesic, delta-Bullington loss and the budget. Target: ≤ 0.5 ms.
func BenchmarkLink(b *testing.B) {
	ts, err := terrain.Open("../examples/terrain")
	if err != nil {
		b.Fatal(err)
	}
	env := &Env{Terrain: ts, SigmaDB: 5.5}
	rg8x, _ := feedline.LookupCable("RG-8X")
	tx := End{Name: "base", Pos: orb.Point{-123.8778833, -48.4966558}, Radio: Radio{PowerW: 25, SensitivityDBm: -119}, Antenna: Antenna{GainDBi: 2.15, HeightM: 9}, Feedline: feedline.NewLine(rg8x, 20)}
	rx := End{Name: "team", Pos: orb.Point{-124.1696065, -48.5115380}, Radio: Radio{PowerW: 5, SensitivityDBm: -119}, Antenna: Antenna{HeightM: 1.5}}
	var g Geometry
	if err := env.Measure(tx.Pos, rx.Pos, &g); err != nil { // loads the tiles
		b.Fatal(err)
	}
	b.ReportAllocs()
	b.ResetTimer()
	for b.Loop() {
		if err := env.Measure(tx.Pos, rx.Pos, &g); err != nil {
			b.Fatal(err)
		}
		if _, err := env.Evaluate(&g, tx, rx, 146.55, true); err != nil {
			b.Fatal(err)
		}
	}
	b.ReportMetric(float64(len(g.Profile.DistM)), "samples")
}
