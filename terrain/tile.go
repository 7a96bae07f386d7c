package terrain

import "math"

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
	y := (t.Lat0 - lat) / t.DLat
	x := (lon - t.Lon0) / t.DLon
	maxY, maxX := float64(t.Rows-1), float64(t.Cols-1)
	if y < 0 {
		y = 0
	} else if y > maxY {
		y = maxY
	}
	if x < 0 {
		x = 0
	} else if x > maxX {
		x = maxX
	}
	r, c := int(y), int(x)
	if r >= t.Rows-1 {
		r = t.Rows - 2
	}
	if c >= t.Cols-1 {
		c = t.Cols - 2
	}
	if r < 0 {
		r = 0
	}
	if c < 0 {
		c = 0
	}
	fy, fx := y-float64(r), x-float64(c)
	i := r*t.Cols + c
	if t.Rows == 1 || t.Cols == 1 {
		return float64(t.H[0])
	}
	h00, h01 := float64(t.H[i]), float64(t.H[i+1])
	h10, h11 := float64(t.H[i+t.Cols]), float64(t.H[i+t.Cols+1])
	v := h00*(1-fx)*(1-fy) + h01*fx*(1-fy) + h10*(1-fx)*fy + h11*fx*fy
	if !math.IsNaN(v) {
		return v
	}
	sum, n := 0.0, 0
	for _, h := range [4]float64{h00, h01, h10, h11} {
		if !math.IsNaN(h) {
			sum += h
			n++
		}
	}
	if n == 0 {
		return math.NaN()
	}
	return sum / float64(n)
}
