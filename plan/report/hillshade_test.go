package report

import (
	"bufio"
	"math"
	"os"
	"strconv"
	"strings"
	"testing"
)

// readASC reads the values of an ESRI ASCII grid (header lines of a word and
// a number, then the rows from the north) as a grid of w × h cells.
func readASC(t *testing.T, path string) (w, h int, vals []float32) {
	t.Helper()
	f, err := os.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	sc := bufio.NewScanner(f)
	for sc.Scan() {
		fields := strings.Fields(sc.Text())
		if len(fields) == 0 {
			continue
		}
		if _, err := strconv.ParseFloat(fields[0], 64); err != nil { // a header line
			switch strings.ToLower(fields[0]) {
			case "ncols":
				w, _ = strconv.Atoi(fields[1])
			case "nrows":
				h, _ = strconv.Atoi(fields[1])
			}
			continue
		}
		for _, s := range fields {
			v, err := strconv.ParseFloat(s, 32)
			if err != nil {
				t.Fatalf("%s: %v", path, err)
			}
			vals = append(vals, float32(v))
		}
	}
	if len(vals) != w*h {
		t.Fatalf("%s: %d values for %d × %d", path, len(vals), w, h)
	}
	return w, h, vals
}

// TestHillshadeAgainstGDAL compares the Horn shading of an invented terrain
// with non-square cells (30 m × 20 m) with GDAL 3.6.2 gdaldem hillshade
// (testdata/horn_SOURCE.txt): bytes 1 + 254·shade, within 1 (rounding).
func TestHillshadeAgainstGDAL(t *testing.T) {
	w, h, z := readASC(t, "testdata/horn_dem.asc")
	gw, gh, ref := readASC(t, "testdata/horn_gdaldem_hillshade.asc")
	if gw != w || gh != h {
		t.Fatalf("reference is %d × %d, terrain %d × %d", gw, gh, w, h)
	}
	g := Grid{Width: w, Height: h, Values: z, Bounds: Bounds{0, 0, 1, 1}}
	out := make([]float32, w)
	compared := 0
	for r := 1; r < h-1; r++ { // gdaldem leaves the edge cells out
		shadeRow(&g, r, 30, 20, out)
		for c := 1; c < w-1; c++ {
			want := float64(ref[r*w+c])
			got := 1 + 254*float64(out[c])
			if math.Abs(got-want) > 1 {
				t.Errorf("cell (%d, %d): 1 + 254·shade = %.2f, gdaldem %v", c, r, got, want)
			}
			compared++
		}
	}
	if compared != (w-2)*(h-2) {
		t.Fatalf("compared %d cells", compared)
	}
}

// cone is a grid of w × w cells over 0.1° × 0.1° around 45° N with a cone
// of peakM metres in the middle, falling 1 m per 10 m of ground.
func cone(w int, peakM float64) Grid {
	b := Bounds{West: 7.0, South: 45.0, East: 7.1, North: 45.1}
	g := Grid{Width: w, Height: w, Bounds: b, Values: make([]float32, w*w)}
	latM, lonM := MetresPerDegree(45.05)
	for r := 0; r < w; r++ {
		for c := 0; c < w; c++ {
			x := (float64(c) + 0.5 - float64(w)/2) / float64(w) * 0.1 * lonM
			y := (float64(w)/2 - float64(r) - 0.5) / float64(w) * 0.1 * latM
			g.Values[r*w+c] = float32(math.Max(0, peakM-math.Hypot(x, y)/10))
		}
	}
	return g
}

func TestHillshadeCone(t *testing.T) {
	g := cone(101, 400)
	s, err := Hillshade(g)
	if err != nil {
		t.Fatal(err)
	}
	at := func(c, r int) float64 { return float64(s[r*g.Width+c]) }
	// The cone's slope is atan(0.1) everywhere. The flank facing the light
	// (north-west of the peak) gets cos(45° − 5.71°), the one facing away
	// (south-east) cos(45° + 5.71°), flat ground sin 45° (Lambert's cosine
	// law with the light 45° up).
	slope := math.Atan(0.1)
	deg := math.Pi / 180
	nw, se := at(35, 35), at(65, 65)
	cases := []struct {
		name      string
		got, want float64
	}{
		{"north-west flank", nw, math.Cos(45*deg - slope)},
		{"south-east flank", se, math.Cos(45*deg + slope)},
		{"flat ground", at(2, 2), math.Sin(45 * deg)},
	}
	// Every cell of the flank, away from the peak and the foot: the
	// surface faces away from the peak (aspect θ, the azimuth from the peak
	// in metres), so its shade is cos S sin 45° + sin S cos 45° cos(θ − 315°).
	latM, lonM := MetresPerDegree(45.05)
	for r := 0; r < g.Height; r++ {
		for c := 0; c < g.Width; c++ {
			x := float64(c-50) * 0.1 / 101 * lonM
			y := float64(50-r) * 0.1 / 101 * latM
			if d := math.Hypot(x, y); d < 600 || d > 3400 {
				continue
			}
			theta := math.Atan2(x, y)
			want := math.Cos(slope)*math.Sin(45*deg) + math.Sin(slope)*math.Cos(45*deg)*math.Cos(theta-315*deg)
			if math.Abs(at(c, r)-want) > 0.01 {
				t.Errorf("cell (%d, %d), aspect %.0f°: shade %.4f, want %.4f", c, r, theta/deg, at(c, r), want)
			}
		}
	}
	for _, c := range cases {
		if math.Abs(c.got-c.want) > 0.01 {
			t.Errorf("%s: shade %.4f, want %.4f", c.name, c.got, c.want)
		}
	}
	if !(nw > se+0.1) {
		t.Errorf("north-west flank %.3f is not brighter than the south-east flank %.3f", nw, se)
	}
}

func TestHillshadeNoData(t *testing.T) {
	g := cone(21, 100)
	g.HasNoData, g.NoData = true, -32768
	g.Values[10*21+10] = -32768
	g.Values[3*21+4] = float32(math.NaN())
	s, err := Hillshade(g)
	if err != nil {
		t.Fatal(err)
	}
	for i, v := range s {
		isNaN := math.IsNaN(float64(v))
		want := i == 10*21+10 || i == 3*21+4
		if isNaN != want {
			t.Errorf("cell %d: shade %v; want NaN only where there is no data", i, v)
		}
		if !isNaN && (v < 0 || v > 1) {
			t.Errorf("cell %d: shade %v outside 0 to 1", i, v)
		}
	}
}

func TestHillshadeBadGrid(t *testing.T) {
	cases := []struct {
		name string
		g    Grid
	}{
		{"no cells", Grid{Bounds: Bounds{0, 0, 1, 1}}},
		{"too few values", Grid{Width: 2, Height: 2, Values: make([]float32, 3), Bounds: Bounds{0, 0, 1, 1}}},
		{"west east swapped", Grid{Width: 1, Height: 1, Values: make([]float32, 1), Bounds: Bounds{2, 0, 1, 1}}},
		{"latitude past the pole", Grid{Width: 1, Height: 1, Values: make([]float32, 1), Bounds: Bounds{0, 80, 1, 91}}},
	}
	for _, c := range cases {
		if _, err := Hillshade(c.g); err == nil {
			t.Errorf("%s: no error", c.name)
		}
	}
}
