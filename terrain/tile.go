package terrain

import (
	"errors"
	"fmt"
	"math"
)

// ErrImplausibleHeight is wrapped by the error of a tile holding a height
// no terrain on earth has (see MinPlausibleM, MaxPlausibleM): the file is
// corrupt, or is not a terrain model in metres.
var ErrImplausibleHeight = errors.New("implausible height")

// MinPlausibleM and MaxPlausibleM bound the terrain heights, in metres above
// the geoid, that a tile may hold: the lowest dry land (the Dead Sea shore,
// about −430 m) and the highest summit (8849 m), each with a margin. A
// height outside them (other than a void) marks a corrupt file, a
// bathymetric grid or one in other units, and the tile is refused.
const (
	MinPlausibleM = -500
	MaxPlausibleM = 9000
)

// checkHeights returns an error wrapping ErrImplausibleHeight that names
// the first sample (row and column from the north-west) outside
// MinPlausibleM…MaxPlausibleM; NaN voids are allowed.
func (t *Tile) checkHeights() error {
	for i, h := range t.H {
		if h < MinPlausibleM || h > MaxPlausibleM {
			r, c := i/max(t.Cols, 1), i%max(t.Cols, 1)
			return fmt.Errorf("%w: %g m at row %d, column %d (lat %.5f, lon %.5f) is outside %d…%d m; the file is corrupt or not a terrain model in metres",
				ErrImplausibleHeight, h, r, c, t.Lat0-float64(r)*t.DLat, t.Lon0+float64(c)*t.DLon, MinPlausibleM, MaxPlausibleM)
		}
	}
	return nil
}

// Tile is a regular latitude/longitude grid of terrain heights held in memory.
//
// Samples are point values (pixel-is-point): sample (row r, column c) stands
// at latitude Lat0 − r·DLat and longitude Lon0 + c·DLon, degrees on WGS84.
// Heights are metres above the EGM96 geoid; a void that could not be filled
// from valid neighbours is NaN.
type Tile struct {
	Name       string    // file base name, reported as the sample's source
	Rows, Cols int       // grid size
	Lat0, Lon0 float64   // degrees: the north-west sample (row 0, column 0)
	DLat, DLon float64   // degrees between samples, both positive
	H          []float32 // metres, row-major from the north row, NaN = void
	Filled     int       // voids filled from neighbours when the tile was read
	Voids      int       // voids left (NaN) after filling
}

// Bytes reports the memory the tile's height grid occupies, in bytes.
func (t *Tile) Bytes() int64 { return int64(len(t.H)) * 4 }

// Covers reports whether the point (lat, lon), degrees, lies within the
// tile's sample grid (edges included).
func (t *Tile) Covers(lat, lon float64) bool {
	south := t.Lat0 - float64(t.Rows-1)*t.DLat
	east := t.Lon0 + float64(t.Cols-1)*t.DLon
	return lat <= t.Lat0 && lat >= south && lon >= t.Lon0 && lon <= east
}

// At returns the height in metres at (lat, lon), degrees, by bilinear
// interpolation between the four surrounding samples. Points outside the
// grid are clamped to its edge. A NaN sample among the four makes the
// result the mean of the valid ones; all four void gives NaN.
func (t *Tile) At(lat, lon float64) float64 {
	if t.Rows < 2 || t.Cols < 2 {
		if len(t.H) == 0 {
			return math.NaN()
		}
		return float64(t.H[0])
	}
	// Fractional row and column, clamped to the grid (min/max compile to
	// branch-free instructions); a NaN position ends up at row/column 0.
	y := min(max((t.Lat0-lat)/t.DLat, 0), float64(t.Rows-1))
	x := min(max((lon-t.Lon0)/t.DLon, 0), float64(t.Cols-1))
	r := max(min(int(y), t.Rows-2), 0)
	c := max(min(int(x), t.Cols-2), 0)
	fy, fx := y-float64(r), x-float64(c)
	i := r*t.Cols + c
	h := t.H[i : i+t.Cols+2 : i+t.Cols+2] // one bounds check for the four samples
	h00, h01 := float64(h[0]), float64(h[1])
	h10, h11 := float64(h[t.Cols]), float64(h[t.Cols+1])
	if v := bilinear(h00, h01, h10, h11, fy, fx); v == v {
		return v
	}
	return voidMean(h00, h01, h10, h11)
}

// quad returns the four samples around fractional row y and column x
// (both within the grid, which has at least 2 × 2 samples) and the
// fractions of the point between them, in bilinear's order.
func (t *Tile) quad(y, x float64) (z00, z01, z10, z11, fy, fx float64) {
	n := t.Cols
	r, c := min(int(y), t.Rows-2), min(int(x), n-2)
	h := t.H[r*n+c : r*n+c+n+2] // one bounds check for the four samples
	return float64(h[0]), float64(h[1]), float64(h[n]), float64(h[n+1]), y - float64(r), x - float64(c)
}

// bilinear interpolates between four samples, z00 north-west, z01
// north-east, z10 south-west and z11 south-east, at fractions fy south and
// fx east of z00 (common practice): NaN when any of them is a void. Every
// height the package reads goes through it, so all agree to the bit.
func bilinear(z00, z01, z10, z11, fy, fx float64) float64 {
	top := z00 + fx*(z01-z00)
	return top + fy*(z10+fx*(z11-z10)-top)
}

// voidMean returns the mean of the valid (non-NaN) values among four, NaN
// when all are voids: Tile.At's answer next to a void.
func voidMean(h00, h01, h10, h11 float64) float64 {
	sum, n := 0.0, 0
	for _, v := range [4]float64{h00, h01, h10, h11} {
		if v == v {
			sum += v
			n++
		}
	}
	if n == 0 {
		return math.NaN()
	}
	return sum / float64(n)
}
