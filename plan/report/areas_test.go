package report

import (
	"bytes"
	"encoding/json"
	"math"
	"math/rand/v2"
	"testing"

	"github.com/paulmach/orb"
	"github.com/paulmach/orb/geojson"
	"github.com/paulmach/orb/planar"
)

// maskGrid turns rows of '#' (value 1), '.' (0) and '?' (no data) into a
// grid over 10° E … 10° E + 0.01° per column, 50° N down by 0.01° per row.
func maskGrid(rows ...string) Grid {
	h, w := len(rows), len(rows[0])
	g := Grid{Width: w, Height: h, Values: make([]float32, w*h), NoData: -9999, HasNoData: true,
		Bounds: Bounds{West: 10, East: 10 + 0.01*float64(w), North: 50, South: 50 - 0.01*float64(h)}}
	for r, row := range rows {
		for c, ch := range row {
			switch ch {
			case '#':
				g.Values[r*w+c] = 1
			case '?':
				g.Values[r*w+c] = -9999
			}
		}
	}
	return g
}

// checkAreas checks the polygons of the cells of g at or above level
// against the rules of RFC 7946 §3.1.6 and the cells themselves, with
// orb/planar as the independent geometry: every ring closed, without
// repeated corners, exteriors counter-clockwise and holes clockwise
// (orb.Ring.Orientation); the area (planar.Area) is the number of cells
// times a cell's area in square degrees; each cell's centre is inside
// (planar.MultiPolygonContains) exactly when the cell is at or above the
// level.
func checkAreas(t *testing.T, g Grid, level float64, mp orb.MultiPolygon) {
	t.Helper()
	dLon, dLat := g.cellDeg()
	for i, p := range mp {
		for j, r := range p {
			if len(r) < 5 || r[0] != r[len(r)-1] {
				t.Fatalf("polygon %d ring %d is not closed or has fewer than 4 corners: %v", i, j, r)
			}
			seen := map[orb.Point]bool{}
			for _, q := range r[:len(r)-1] {
				if seen[q] {
					t.Errorf("polygon %d ring %d passes %v twice (touches itself)", i, j, q)
				}
				seen[q] = true
			}
			want := orb.CCW
			if j > 0 {
				want = orb.CW
			}
			if got := r.Orientation(); got != want {
				t.Errorf("polygon %d ring %d winds %v, want %v", i, j, got, want)
			}
		}
	}
	cells := 0
	for r := 0; r < g.Height; r++ {
		for c := 0; c < g.Width; c++ {
			v := g.Values[r*g.Width+c]
			isIn := g.valid(v) && float64(v) >= level
			if isIn {
				cells++
			}
			centre := orb.Point{g.Bounds.West + (float64(c)+0.5)*dLon, g.Bounds.North - (float64(r)+0.5)*dLat}
			if got := planar.MultiPolygonContains(mp, centre); got != isIn {
				t.Errorf("cell (%d, %d) value %v: inside the polygons = %v", c, r, v, got)
			}
		}
	}
	if got, want := planar.Area(mp), float64(cells)*dLon*dLat; math.Abs(got-want) > 1e-9*want+1e-15 {
		t.Errorf("area %.10g deg², want %d cells × %.4g deg² = %.10g", got, cells, dLon*dLat, want)
	}
}

func TestLevelAreasShapes(t *testing.T) {
	cases := []struct {
		name          string
		rows          []string
		polys, holes  int
		cornersOfRing []int // corners of each ring of the first polygon, closure included
	}{
		{"one cell", []string{"...", ".#.", "..."}, 1, 0, []int{5}},
		{"whole grid", []string{"##", "##"}, 1, 0, []int{5}},
		{"L shape", []string{"#.", "##"}, 1, 0, []int{7}},
		{"ring with a hole", []string{"###", "#.#", "###"}, 1, 1, []int{5, 5}},
		{"corners only touch", []string{"#.", ".#"}, 2, 0, []int{5}},
		{"hole touching the exterior at a corner", []string{"####", "#..#", "#.##", "###."}, 1, 1, nil},
		{"island in a hole", []string{"#####", "#...#", "#.#.#", "#...#", "#####"}, 2, 1, []int{5, 5}},
		{"no data is outside", []string{"#?#", "###"}, 1, 0, []int{9}},
		{"nothing", []string{"..", ".?"}, 0, 0, nil},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			g := maskGrid(c.rows...)
			mp, _ := levelArea(&g, 1)
			checkAreas(t, g, 1, mp)
			holes := 0
			for _, p := range mp {
				holes += len(p) - 1
			}
			if len(mp) != c.polys || holes != c.holes {
				t.Fatalf("%d polygons with %d holes, want %d and %d: %v", len(mp), holes, c.polys, c.holes, mp)
			}
			for j, n := range c.cornersOfRing {
				if len(mp[0][j]) != n {
					t.Errorf("ring %d has %d points, want %d: %v", j, len(mp[0][j]), n, mp[0][j])
				}
			}
		})
	}
}

func TestLevelAreasRandom(t *testing.T) {
	// Seeded random grids of every density: many touching corners,
	// nested islands and holes.
	rng := rand.New(rand.NewPCG(11, 4))
	for k := 0; k < 60; k++ {
		w, h := 3+rng.IntN(30), 3+rng.IntN(30)
		g := Grid{Width: w, Height: h, Values: make([]float32, w*h), Bounds: Bounds{West: -3, East: -3 + 0.0003*float64(w), North: 57.1, South: 57.1 - 0.0002*float64(h)}}
		for i := range g.Values {
			g.Values[i] = float32(rng.Float64() * 30)
			if rng.IntN(20) == 0 {
				g.Values[i] = float32(math.NaN())
			}
		}
		for _, level := range []float64{5, 15, 25} {
			mp, _ := levelArea(&g, level)
			checkAreas(t, g, level, mp)
		}
	}
}

func TestLevelAreasGeoJSON(t *testing.T) {
	g := maskGrid("###.", "#.#.", "###.", "....")
	for i := range g.Values {
		if g.Values[i] == 1 && i%4 == 0 {
			g.Values[i] = 25 // the west column reaches the second level
		}
	}
	fc, err := LevelAreas(g, Scale{Levels: []float64{1, 20, 40}, Name: "margin", Unit: "dB"})
	if err != nil {
		t.Fatal(err)
	}
	raw, err := json.Marshal(fc)
	if err != nil {
		t.Fatal(err)
	}
	// Read back as plain JSON, as any GeoJSON reader would (RFC 7946 §3.2,
	// §3.3: a FeatureCollection of Features with geometry and properties).
	var doc struct {
		Type     string
		Features []struct {
			Type     string
			Geometry struct {
				Type        string
				Coordinates [][][][2]float64
			}
			Properties map[string]any
		}
	}
	if err := json.Unmarshal(raw, &doc); err != nil {
		t.Fatalf("%v\n%s", err, raw)
	}
	if doc.Type != "FeatureCollection" || len(doc.Features) != 3 {
		t.Fatalf("type %q with %d features, want a FeatureCollection of 3", doc.Type, len(doc.Features))
	}
	want := []struct {
		level       float64
		label       string
		polys, ring int
		cells       float64
	}{
		{1, "margin ≥ 1 dB", 1, 2, 8},
		{20, "margin ≥ 20 dB", 1, 1, 3},
		{40, "margin ≥ 40 dB", 0, 0, 0},
	}
	for i, f := range doc.Features {
		w := want[i]
		p := f.Properties
		if f.Type != "Feature" || f.Geometry.Type != "MultiPolygon" {
			t.Errorf("feature %d: %s of %s", i, f.Type, f.Geometry.Type)
		}
		if p["level"] != w.level || p["unit"] != "dB" || p["quantity"] != "margin" || p["label"] != w.label || p["cells"] != w.cells {
			t.Errorf("feature %d properties %v, want level %v, unit dB, quantity margin, label %q, cells %v", i, p, w.level, w.label, w.cells)
		}
		if len(f.Geometry.Coordinates) != w.polys || (w.polys > 0 && len(f.Geometry.Coordinates[0]) != w.ring) {
			t.Errorf("feature %d: coordinates %v, want %d polygon(s) of %d ring(s)", i, f.Geometry.Coordinates, w.polys, w.ring)
		}
	}
	// And orb's own reader takes it.
	back, err := geojson.UnmarshalFeatureCollection(raw)
	if err != nil || len(back.Features) != 3 {
		t.Fatalf("orb/geojson reads it back as %v, %v", back, err)
	}
	if !bytes.Contains(raw, []byte(`"coordinates":[]`)) {
		t.Errorf("the empty level is not an empty MultiPolygon: %s", raw)
	}
}

func TestLevelAreasBadInput(t *testing.T) {
	g := maskGrid("#.", ".#")
	if _, err := LevelAreas(g, Scale{}); err == nil {
		t.Error("no levels: no error")
	}
	g.Values = g.Values[:3]
	if _, err := LevelAreas(g, Scale{Levels: []float64{1}}); err == nil {
		t.Error("short grid: no error")
	}
}
