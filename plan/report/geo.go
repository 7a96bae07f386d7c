package report

import (
	"fmt"
	"math"
)

// Bounds is a geographic extent in degrees on WGS84: longitudes West < East
// (east positive, within -180 to 180, not crossing the antimeridian) and
// latitudes South < North (north positive, within -90 to 90).
type Bounds struct {
	West, South, East, North float64
}

// check says what is wrong with b, naming it by what.
func (b Bounds) check(what string) error {
	if !finite(b.West) || !finite(b.East) || !finite(b.South) || !finite(b.North) {
		return fmt.Errorf("%w: %s bounds %v are not all finite numbers", ErrChartData, what, b)
	}
	if !(b.West < b.East) || b.West < -180 || b.East > 180 {
		return fmt.Errorf("%w: %s bounds: west %g° and east %g° must satisfy -180 ≤ west < east ≤ 180", ErrChartData, what, b.West, b.East)
	}
	if !(b.South < b.North) || b.South < -90 || b.North > 90 {
		return fmt.Errorf("%w: %s bounds: south %g° and north %g° must satisfy -90 ≤ south < north ≤ 90", ErrChartData, what, b.South, b.North)
	}
	return nil
}

// Grid is a raster of float32 values on a geographic (lon/lat) grid:
// Width × Height cells stored row by row from the north-west corner
// (Values[row*Width+col], row 0 the northernmost). Bounds are the outer
// edges of the cells (each cell is an area, "pixel is area"), so a cell is
// (East−West)/Width degrees wide and (North−South)/Height degrees tall.
// A grid whose samples are points on the cell corners, as an SRTM HGT tile,
// has bounds half a sample spacing outside its first and last samples.
//
// A cell has no data when it is NaN, or equal to NoData when HasNoData is
// set (the GeoTIFF GDAL_NODATA convention).
type Grid struct {
	Width, Height int
	Bounds        Bounds
	Values        []float32
	NoData        float32
	HasNoData     bool
}

// valid reports whether v is data, not the no-data mark.
func (g *Grid) valid(v float32) bool {
	return v == v && !(g.HasNoData && v == g.NoData)
}

// cellDeg is the size of a cell, degrees of longitude and latitude.
func (g *Grid) cellDeg() (dLon, dLat float64) {
	return (g.Bounds.East - g.Bounds.West) / float64(g.Width), (g.Bounds.North - g.Bounds.South) / float64(g.Height)
}

// check says what is wrong with g, naming it by what.
func (g *Grid) check(what string) error {
	if g.Width < 1 || g.Height < 1 {
		return fmt.Errorf("%w: %s grid is %d × %d cells; give at least 1 × 1", ErrChartData, what, g.Width, g.Height)
	}
	if len(g.Values) != g.Width*g.Height {
		return fmt.Errorf("%w: %s grid has %d values for %d × %d cells; give one value per cell", ErrChartData, what, len(g.Values), g.Width, g.Height)
	}
	return g.Bounds.check(what)
}

// WGS84 ellipsoid (NIMA TR8350.2, 3rd edition, 2000, table 3.1): semi-major
// axis a in metres and flattening f.
const (
	wgs84A = 6378137.0
	wgs84F = 1 / 298.257223563
)

// MetresPerDegree returns the length in metres of one degree of latitude
// (along the meridian) and one degree of longitude (along the parallel) at
// latitude latDeg on the WGS84 ellipsoid: π/180 times the meridional radius
// of curvature M = a(1−e²)/(1−e² sin²φ)^{3/2}, and π/180 times the radius of
// the parallel N cos φ with N = a/(1−e² sin²φ)^{1/2} (J. P. Snyder, Map
// Projections — A Working Manual, USGS Professional Paper 1395, 1987, ch. 3
// and 4). At the equator a degree of latitude is about 110 574 m and one of
// longitude 111 319 m.
func MetresPerDegree(latDeg float64) (latM, lonM float64) {
	e2 := wgs84F * (2 - wgs84F)
	s, c := math.Sincos(latDeg * math.Pi / 180)
	w := 1 - e2*s*s
	k := math.Pi / 180
	return k * wgs84A * (1 - e2) / (w * math.Sqrt(w)), k * wgs84A * c / math.Sqrt(w)
}
