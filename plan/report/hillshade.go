package report

import (
	"math"
)

// Light of the hillshade, degrees: from the north-west (azimuth 315°,
// clockwise from north) at 45° above the horizon, the usual convention of
// GIS hillshades (common practice; the defaults of GDAL's gdaldem).
const (
	HillshadeAzimuthDeg  = 315.0
	HillshadeAltitudeDeg = 45.0
)

// Hillshade returns the shading of a terrain grid (heights in metres above
// any datum, no-data cells allowed), lit from HillshadeAzimuthDeg at
// HillshadeAltitudeDeg: for each cell the cosine of the angle between the
// surface normal and the direction of the light, 0 (facing away or in
// shade) to 1 (facing the light); flat ground gets sin 45° ≈ 0.707. The
// result has the grid's size and row order; a cell without data gives NaN.
//
// Slopes follow Horn's method: the weighted differences over the 3 × 3
// neighbourhood (B. K. P. Horn, "Hill shading and the reflectance map",
// Proc. IEEE 69(1), 1981, pp. 14–47), with the cell spacing in metres from
// the grid's degrees: MetresPerDegree at each row's latitude. The shading
// is the Lambertian cosine cos Z cos S + sin Z sin S cos(A − aspect) (as in
// P. A. Burrough and R. A. McDonnell, Principles of Geographical
// Information Systems, 1998, and GDAL's gdaldem hillshade). Cells on the
// edge of the grid repeat their edge neighbour; a missing neighbour takes
// the centre cell's height.
func Hillshade(dem Grid) ([]float32, error) {
	if err := dem.check("terrain"); err != nil {
		return nil, err
	}
	out := make([]float32, len(dem.Values))
	dLon, dLat := dem.cellDeg()
	for r := 0; r < dem.Height; r++ {
		lat := dem.Bounds.North - (float64(r)+0.5)*dLat
		mLat, mLon := MetresPerDegree(lat)
		shadeRow(&dem, r, dLon*mLon, dLat*mLat, out[r*dem.Width:(r+1)*dem.Width])
	}
	return out, nil
}

// shadeRow shades row r of g into out, with cells dx metres wide (west to
// east) and dy metres tall (north to south).
func shadeRow(g *Grid, r int, dx, dy float64, out []float32) {
	const deg = math.Pi / 180
	sAz, cAz := math.Sincos(HillshadeAzimuthDeg * deg)
	sAlt, cAlt := math.Sincos(HillshadeAltitudeDeg * deg)
	// Unit vector towards the light: east, north, up.
	le, ln, lu := sAz*cAlt, cAz*cAlt, sAlt
	w := g.Width
	rows := [3][]float32{
		g.Values[max(r-1, 0)*w : max(r-1, 0)*w+w],
		g.Values[r*w : r*w+w],
		g.Values[min(r+1, g.Height-1)*w : min(r+1, g.Height-1)*w+w],
	}
	for c := 0; c < w; c++ {
		e := rows[1][c]
		if !g.valid(e) {
			out[c] = float32(math.NaN())
			continue
		}
		cl, cr := max(c-1, 0), min(c+1, w-1)
		at := func(row []float32, i int) float64 {
			if v := row[i]; g.valid(v) {
				return float64(v)
			}
			return float64(e)
		}
		a, b, cc := at(rows[0], cl), at(rows[0], c), at(rows[0], cr)
		d, f := at(rows[1], cl), at(rows[1], cr)
		gg, h, i := at(rows[2], cl), at(rows[2], c), at(rows[2], cr)
		// Horn (1981): rise towards the east and towards the north.
		gE := ((cc + 2*f + i) - (a + 2*d + gg)) / (8 * dx)
		gN := ((a + 2*b + cc) - (gg + 2*h + i)) / (8 * dy)
		// The surface normal is (−gE, −gN, 1) / |…|.
		s := (lu - gE*le - gN*ln) / math.Sqrt(1+gE*gE+gN*gN)
		out[c] = float32(max(s, 0))
	}
}
