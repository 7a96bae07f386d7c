package report

import (
	"io"
	"testing"

	"github.com/paulmach/orb"
)

// bench1000 is a 1000 × 1000 cell terrain and a margin overlay over the
// same 0.28° × 0.28° (1″ cells), the size of a 15 km coverage map.
func bench1000(b *testing.B) (Grid, Grid) {
	b.Helper()
	bd := Bounds{West: 9.30, South: 46.40, East: 9.30 + 1000.0/3600, North: 46.40 + 1000.0/3600}
	dem := hills(bd, 1000, 1000)
	ov := margins(hills(bd, 250, 250), orb.Point{9.44, 46.54}, 14000)
	// The overlay at the terrain's resolution: each made-up cell 4 × 4.
	big := Grid{Width: 1000, Height: 1000, Bounds: bd, Values: make([]float32, 1000*1000), NoData: ov.NoData, HasNoData: true}
	for r := 0; r < 1000; r++ {
		for c := 0; c < 1000; c++ {
			big.Values[r*1000+c] = ov.Values[(r/4)*250+c/4]
		}
	}
	return dem, big
}

func BenchmarkHillshade1000(b *testing.B) {
	dem, _ := bench1000(b)
	b.ReportAllocs()
	b.ResetTimer()
	for b.Loop() {
		if _, err := Hillshade(dem); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkMapPNG1000 draws a 1200 px wide coverage map of a 1000 × 1000
// terrain and overlay, PNG encoding included.
func BenchmarkMapPNG1000(b *testing.B) {
	dem, ov := bench1000(b)
	m := Map{Title: "Benchmark", Terrain: &dem, Overlay: &ov,
		Scale:   Scale{Levels: []float64{0, 10, 20, 30}, Name: "margin", Unit: "dB"},
		Markers: []Marker{{At: orb.Point{9.44, 46.54}, Label: "Site", Kind: MarkerSite}}}
	b.ReportAllocs()
	b.ResetTimer()
	for b.Loop() {
		if err := MapPNG(io.Discard, m); err != nil {
			b.Fatal(err)
		}
	}
}

func BenchmarkLevelAreas1000(b *testing.B) {
	_, ov := bench1000(b)
	s := Scale{Levels: []float64{0, 10, 20, 30}, Name: "margin", Unit: "dB"}
	b.ReportAllocs()
	b.ResetTimer()
	for b.Loop() {
		if _, err := LevelAreas(ov, s); err != nil {
			b.Fatal(err)
		}
	}
}
