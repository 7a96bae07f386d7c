package terrain

import (
	"fmt"
	"math"
)

// Sampler reads ground heights from a Set for one goroutine at a time. It
// keeps the tile in use with its grid constants, and samples it
// bilinearly in grid coordinates: row and column come from the position by
// one multiply-add each (reciprocal spacings), and the four surrounding
// samples are weighted without any division. Heights agree with
// Set.Elevation to rounding (about 1e−12 m). Where no file covers a point,
// or it falls in a void too large to fill, the height is 0 m (smooth earth
// at sea level), NoData counts it and Set.Missing learns the tile.
type Sampler struct {
	set  *Set
	fast bool // only HGT tiles: a point in the tile in use needs no lookup

	cur        *Tile
	src        *source
	lat0, lon0 float64 // the tile's north-west sample, degrees
	invDLat    float64 // samples per degree of latitude
	invDLon    float64 // samples per degree of longitude
	maxY, maxX float64 // last row and column, as numbers

	// NoData counts the points sampled with no data since the Sampler was
	// made (or NoData was last set to 0).
	NoData int

	lastMissLa, lastMissLo int

	hermite hermiteCache // RadialHeightsFrom's interpolation weights
	grid    gridCursor   // RadialHeightsFrom's view of cur
	gridOf  *Tile        // the tile grid was made from
}

// NewSampler returns a Sampler over s. Make one per goroutine.
func (s *Set) NewSampler() *Sampler {
	return &Sampler{set: s, fast: len(s.others) == 0, lastMissLa: math.MaxInt, lastMissLo: math.MaxInt}
}

// use makes src's tile the one in use.
func (p *Sampler) use(src *source) error {
	if src == p.src {
		return nil
	}
	t, err := p.set.tile(src)
	if err != nil {
		return err
	}
	p.cur, p.src = t, src
	p.lat0, p.lon0 = t.Lat0, t.Lon0
	p.invDLat, p.invDLon = 1/t.DLat, 1/t.DLon
	p.maxY, p.maxX = float64(t.Rows-1), float64(t.Cols-1)
	return nil
}

// Height returns the ground height in metres above the EGM96 geoid at
// (lat, lon), degrees on WGS84 (lon within [−180, 180)), by bilinear
// interpolation like Set.Elevation; 0 m where there is no data. The error
// is a file that cannot be read.
func (p *Sampler) Height(lat, lon float64) (float64, error) {
	if p.cur != nil && (p.fast || p.src == p.set.lookup(lat, lon)) {
		y := (p.lat0 - lat) * p.invDLat
		x := (lon - p.lon0) * p.invDLon
		if y >= 0 && y <= p.maxY && x >= 0 && x <= p.maxX {
			return p.at(y, x), nil
		}
	}
	src := p.set.lookup(lat, lon)
	if src == nil {
		p.NoData++
		if la, lo := int(math.Floor(lat)), int(math.Floor(lon)); la != p.lastMissLa || lo != p.lastMissLo {
			p.lastMissLa, p.lastMissLo = la, lo
			p.set.noteMissing(lat, lon)
		}
		return 0, nil
	}
	if err := p.use(src); err != nil {
		return 0, err
	}
	y := min(max((p.lat0-lat)*p.invDLat, 0), p.maxY)
	x := min(max((lon-p.lon0)*p.invDLon, 0), p.maxX)
	return p.at(y, x), nil
}

// at interpolates the tile in use at fractional row y and column x, both
// within the grid; a void counts as no data (0 m).
func (p *Sampler) at(y, x float64) float64 {
	t := p.cur
	if t.Rows < 2 || t.Cols < 2 {
		if len(t.H) == 0 || t.H[0] != t.H[0] {
			p.NoData++
			return 0
		}
		return float64(t.H[0])
	}
	h00, h01, h10, h11, fy, fx := t.quad(y, x)
	if v := bilinear(h00, h01, h10, h11, fy, fx); v == v {
		return v
	}
	if v := voidMean(h00, h01, h10, h11); v == v {
		return v
	}
	p.NoData++
	return 0
}

// Radial fills lats, lons and heights (all the same length n) with the
// positions and ground heights of n points along the WGS84 geodesic leaving
// (lat, lon), degrees, at azimuth aziDeg (clockwise from north), at
// distances 0, stepM, 2·stepM, … metres. Positions come from Line.Positions
// (Karney's algorithm at exact points every ≤ 2 km, cubic Hermite between,
// within about a micrometre); heights from Height. Errors: invalid
// position or step, or a file that cannot be read.
func (p *Sampler) Radial(lat, lon, aziDeg, stepM float64, lats, lons, heights []float64) error {
	return p.RadialFrom(lat, lon, aziDeg, 0, stepM, lats, lons, heights)
}

// RadialFrom is Radial for the points at distances startM, startM + stepM,
// startM + 2·stepM, … metres (startM ≥ 0) along the same geodesic.
func (p *Sampler) RadialFrom(lat, lon, aziDeg, startM, stepM float64, lats, lons, heights []float64) error {
	if err := checkPoint(lat, lon); err != nil {
		return fmt.Errorf("radial start: %w", err)
	}
	if !(stepM > 0) || math.IsInf(stepM, 0) || math.IsNaN(aziDeg) || math.IsInf(aziDeg, 0) || !(startM >= 0) || math.IsInf(startM, 0) {
		return fmt.Errorf("radial: step %v m must be positive, start %v m zero or more and azimuth %v° a number", stepM, startM, aziDeg)
	}
	n := min(len(lats), len(lons), len(heights))
	var line Line
	wgs84Geod.initLineDeg(&line, lat, lon, aziDeg)
	line.Positions(startM, stepM, lats[:n], lons[:n])
	for i := range n {
		la, lo := lats[i], lons[i]
		if lo >= 180 {
			lo -= 360
			lons[i] = lo
		}
		// Inside the tile in use (HGT only): Height's bilinear, inline.
		if t := p.cur; p.fast && t != nil && t.Rows >= 2 && t.Cols >= 2 {
			y := (p.lat0 - la) * p.invDLat
			x := (lo - p.lon0) * p.invDLon
			if y >= 0 && y <= p.maxY && x >= 0 && x <= p.maxX {
				if v := bilinear(t.quad(y, x)); v == v {
					heights[i] = v
					continue
				}
			}
		}
		h, err := p.Height(la, lo)
		if err != nil {
			return err
		}
		heights[i] = h
	}
	return nil
}

// RadialHeightsFrom fills heights with the ground heights of the points
// at distances startM, startM + stepM, startM + 2·stepM, … metres along
// the WGS84 geodesic leaving (lat, lon), degrees, at azimuth aziDeg, as
// RadialFrom does, without their positions: between the exact nodes of
// Line.Positions (Karney 2013, every ≤ 2 km) the cubic Hermite
// interpolation runs in the rows and columns of the tile in use (as
// Set.ProfileHeights), so the heights agree with RadialFrom's within
// 1e−9 m (TestRadialHeightsAgainstRadial), for about half the cost.
// Errors as RadialFrom's.
func (p *Sampler) RadialHeightsFrom(lat, lon, aziDeg, startM, stepM float64, heights []float64) error {
	if err := checkPoint(lat, lon); err != nil {
		return fmt.Errorf("radial start: %w", err)
	}
	if !(stepM > 0) || math.IsInf(stepM, 0) || math.IsNaN(aziDeg) || math.IsInf(aziDeg, 0) || !(startM >= 0) || math.IsInf(startM, 0) {
		return fmt.Errorf("radial: step %v m must be positive, start %v m zero or more and azimuth %v° a number", stepM, startM, aziDeg)
	}
	n := len(heights)
	var line Line
	wgs84Geod.initLineDeg(&line, lat, lon, aziDeg)
	nw, ok := newNodeWalk(&line, startM, stepM, n)
	if !ok {
		for i := range n {
			la, lo := line.Position(startM + float64(i)*stepM)
			if err := heightAt(heights, i, la, lo, p.Height); err != nil {
				return err
			}
		}
		return nil
	}
	grid := func() *gridCursor {
		if !p.fast || p.cur == nil {
			return nil
		}
		if p.cur != p.gridOf {
			p.grid.use(p.cur, p.src)
			p.gridOf = p.cur
		}
		return &p.grid
	}
	if err := nw.heights(&line, &p.hermite, heights, true, grid, &p.NoData, p.Height); err != nil {
		return err
	}
	return heightAt(heights, n-1, nw.lat1, nw.lon1, p.Height)
}

// Grid describes the sample grid of the finest elevation file covering a
// point: its spacing and one of its samples, in degrees. Samples stand at
// Lat0 − r·DLatDeg, Lon0 + c·DLonDeg for whole r, c (pixel-is-point).
type Grid struct {
	DLatDeg, DLonDeg float64 // spacing, degrees
	Lat0, Lon0       float64 // one sample (the file's north-west one), degrees
	Source           string  // the file's base name
}

// GridAt returns the sample grid of the elevation file that Elevation
// would use at (lat, lon), degrees, without reading the file's heights
// (HGT spacing follows from the file size, GeoTIFF from its header). ok is
// false where no file covers the point or its spacing is unknown.
func (s *Set) GridAt(lat, lon float64) (g Grid, ok bool) {
	if checkPoint(lat, lon) != nil {
		return Grid{}, false
	}
	src := s.lookup(lat, normLon(lon))
	if src == nil || src.dLatDeg == 0 {
		return Grid{}, false
	}
	return Grid{DLatDeg: src.dLatDeg, DLonDeg: src.dLonDeg, Lat0: src.north, Lon0: src.west, Source: src.name}, true
}

// Row fills out[c], for lo ≤ c < hi, with the ground height in metres at
// latitude lat and longitude lon0 + c·dLon (degrees; brought into
// [−180, 180)), as Height would one point at a time (bilinear
// interpolation, 0 m and NoData counted where there is no data), stored as
// float32. Along a row of a tile in use it keeps the tile row and the
// row weight, so a point costs one multiply-add for its column and four
// loads. Errors: a file that cannot be read.
func (p *Sampler) Row(lat, lon0, dLon float64, out []float32, lo, hi int) error {
	for c := lo; c < hi; {
		h, err := p.Height(lat, normLon(lon0+float64(c)*dLon))
		if err != nil {
			return err
		}
		out[c] = float32(h)
		c++
		t := p.cur
		if !p.fast || t == nil || t.Rows < 2 || t.Cols < 2 {
			continue
		}
		y := (p.lat0 - lat) * p.invDLat
		if !(y >= 0 && y <= p.maxY) {
			continue
		}
		r := min(int(y), t.Rows-2)
		fy := y - float64(r)
		top := t.H[r*t.Cols : (r+1)*t.Cols]
		bot := t.H[(r+1)*t.Cols : (r+2)*t.Cols]
		for ; c < hi; c++ {
			x := (normLon(lon0+float64(c)*dLon) - p.lon0) * p.invDLon
			if !(x >= 0 && x <= p.maxX) {
				break
			}
			j := min(int(x), t.Cols-2)
			fx := x - float64(j)
			h00, h01 := float64(top[j]), float64(top[j+1])
			h10, h11 := float64(bot[j]), float64(bot[j+1])
			v := bilinear(h00, h01, h10, h11, fy, fx)
			if v != v {
				if v = voidMean(h00, h01, h10, h11); v != v {
					p.NoData++
					v = 0
				}
			}
			out[c] = float32(v)
		}
	}
	return nil
}
