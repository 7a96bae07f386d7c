package terrain

import (
	"bytes"
	"encoding/binary"
	"errors"
	"math"
	"os"
	"path/filepath"
	"testing"
)

// htTile builds a rows×cols tile from f(r, c); NaN marks a void.
func htTile(rows, cols int, f func(r, c int) float64) *Tile {
	t := &Tile{Rows: rows, Cols: cols, Lat0: 1, DLat: 1, DLon: 1, H: make([]float32, rows*cols)}
	for r := 0; r < rows; r++ {
		for c := 0; c < cols; c++ {
			t.H[r*cols+c] = float32(f(r, c))
		}
	}
	return t
}

func TestFillVoids(t *testing.T) {
	nan := math.NaN()
	plane := func(r, c int) float64 { return 3*float64(r) + 2*float64(c) + 100 }
	wide := 2*MaxFillPasses + 11
	cases := []struct {
		name          string
		tile          *Tile
		filled, voids int
		// want gives the expected height at (r, c) after filling, and tol
		// its tolerance in metres.
		want func(r, c int) float64
		tol  float64
	}{
		{"no voids", htTile(5, 5, plane), 0, 0, plane, 0},
		// The mean of a linear function over the symmetric 8-neighbourhood
		// is its centre value (exact for a plane).
		{"single void in a plane", htTile(5, 5, func(r, c int) float64 {
			if r == 2 && c == 3 {
				return nan
			}
			return plane(r, c)
		}), 1, 0, plane, 1e-4},
		// A constant field stays constant however deep the void.
		{"blob in a constant", htTile(20, 20, func(r, c int) float64 {
			if (r-10)*(r-10)+(c-9)*(c-9) < 30 {
				return nan
			}
			return 250
		}), 97, 0, func(int, int) float64 { return 250 }, 0}, // 97 points with (r−10)²+(c−9)² < 30
		{"all void", htTile(4, 6, func(int, int) float64 { return nan }), 0, 24,
			func(int, int) float64 { return nan }, 0},
		// Valid samples only at both ends of a row longer than two fill
		// ranges: the middle stays void.
		{"void wider than the fill range", htTile(1, wide, func(_, c int) float64 {
			if c == 0 || c == wide-1 {
				return 10
			}
			return nan
		}), 2 * MaxFillPasses, wide - 2 - 2*MaxFillPasses, func(_, c int) float64 {
			if c > MaxFillPasses && c < wide-1-MaxFillPasses {
				return nan
			}
			return 10
		}, 0},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			c.tile.FillVoids()
			if c.tile.Filled != c.filled || c.tile.Voids != c.voids {
				t.Errorf("filled %d, left %d; want %d, %d", c.tile.Filled, c.tile.Voids, c.filled, c.voids)
			}
			for r := 0; r < c.tile.Rows; r++ {
				for col := 0; col < c.tile.Cols; col++ {
					got, want := float64(c.tile.H[r*c.tile.Cols+col]), c.want(r, col)
					if math.IsNaN(want) != math.IsNaN(got) || math.Abs(got-want) > c.tol {
						t.Fatalf("(%d,%d) = %v; want %v ± %v", r, col, got, want, c.tol)
					}
				}
			}
		})
	}
}

// TestFillVoidsBounded: on rough invented terrain with many voids, every
// filled height lies within the range of valid heights (maximum principle
// of averaging).
func TestFillVoidsBounded(t *testing.T) {
	n := 200
	lo, hi := math.Inf(1), math.Inf(-1)
	tile := htTile(n, n, func(r, c int) float64 {
		v := float64(htTerrain(int64(r), int64(c), 50))
		if htMix(uint64(r*n+c))%3 == 0 || (r > 50 && r < 90 && c > 20 && c < 70) {
			return math.NaN()
		}
		lo, hi = math.Min(lo, v), math.Max(hi, v)
		return v
	})
	before := append([]float32(nil), tile.H...)
	tile.FillVoids()
	if tile.Voids != 0 || tile.Filled == 0 {
		t.Fatalf("filled %d, left %d", tile.Filled, tile.Voids)
	}
	for i, v := range tile.H {
		b := before[i]
		if b == b && v != b {
			t.Fatalf("valid sample %d changed from %v to %v", i, b, v)
		}
		if float64(v) < lo || float64(v) > hi {
			t.Fatalf("sample %d = %v outside [%v, %v]", i, v, lo, hi)
		}
	}
}

// FuzzDecodeHGT: DecodeHGT never panics and refuses every input that is
// not a whole SRTM grid with an ErrHGT error; the same bytes read as a
// small square grid by the decoder's core (hgtTile) give a tile consistent
// with the input, whatever pattern of voids they hold.
func FuzzDecodeHGT(f *testing.F) {
	seeds, _ := filepath.Glob(filepath.Join("testdata", "hgt", "*.bin"))
	if len(seeds) == 0 {
		f.Fatal("no seeds in testdata/hgt")
	}
	for _, s := range seeds {
		b, err := os.ReadFile(s)
		if err != nil {
			f.Fatal(err)
		}
		f.Add(b, "N45E007.hgt", int64(len(b)))
		f.Add(b, "s01w072.hgt.gz", int64(-1))
	}
	f.Fuzz(func(t *testing.T, data []byte, name string, size int64) {
		tile, err := DecodeHGT(bytes.NewReader(data), name, size)
		switch {
		case err != nil && !errors.Is(err, ErrHGT):
			t.Fatalf("error %v does not wrap ErrHGT", err)
		case err == nil && hgtSamples(int64(len(data))) == 0:
			t.Fatalf("decoded %d bytes as a %d×%d tile", len(data), tile.Rows, tile.Cols)
		}
		n := int(math.Sqrt(float64(len(data) / 2)))
		if n < 1 {
			return
		}
		tile = hgtTile(data, n, 45, 7, "N45E007.hgt")
		voids := 0
		lo, hi := math.Inf(1), math.Inf(-1)
		for i := range tile.H {
			v := int16(binary.BigEndian.Uint16(data[2*i:]))
			if v == HGTVoid {
				voids++
				continue
			}
			lo, hi = math.Min(lo, float64(v)), math.Max(hi, float64(v))
			if tile.H[i] != float32(v) {
				t.Fatalf("sample %d = %v; input %d", i, tile.H[i], v)
			}
		}
		if tile.Filled+tile.Voids != voids {
			t.Fatalf("filled %d + left %d ≠ %d voids", tile.Filled, tile.Voids, voids)
		}
		left := 0
		for _, v := range tile.H {
			if math.IsNaN(float64(v)) {
				left++
			} else if float64(v) < lo-1e-3 || float64(v) > hi+1e-3 {
				t.Fatalf("filled height %v outside the input range [%v, %v]", v, lo, hi)
			}
		}
		if left != tile.Voids {
			t.Fatalf("%d NaN left; Voids says %d", left, tile.Voids)
		}
		_ = tile.At(45.5, 7.5)
	})
}
