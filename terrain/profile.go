package terrain

import (
	"errors"
	"fmt"
	"math"
	"slices"
	"strconv"
)

// NoDEMStepM is the default profile step in metres when the set holds no
// elevation files: about the 3″ SRTM spacing (92.6 m of latitude).
const NoDEMStepM = 90

// MaxProfileSamples bounds the number of samples of one profile, so that a
// tiny step over a long path is refused instead of exhausting memory.
const MaxProfileSamples = 10_000_000

// MinAutoStepM is the shortest step the elevation data's own spacing gives:
// near the poles the east–west spacing of a geographic grid shrinks towards
// 0 (to 5.7e−15 m at 90°), and a profile there is sampled every metre
// instead.
const MinAutoStepM = 1.0

// ErrTooManySamples is wrapped when a profile would need more than
// MaxProfileSamples samples.
var ErrTooManySamples = errors.New("too many profile samples")

// samplesError is a too-many-samples error in its own words.
type samplesError string

func (e samplesError) Error() string        { return string(e) }
func (e samplesError) Is(target error) bool { return target == ErrTooManySamples }

// Profile is the terrain along the WGS84 geodesic between two points,
// sampled at equal distances with both ends included. The slices have one
// entry per sample and are reused by (*Set).Profile; (*Set).ProfileHeights
// fills ElevM alone and leaves DistM, Lat and Lon empty.
type Profile struct {
	DistanceM      float64 // geodesic length from point 1 to point 2, metres
	AzimuthDeg     float64 // azimuth at point 1 towards point 2, degrees clockwise from north in [0, 360)
	BackAzimuthDeg float64 // azimuth at point 2 back towards point 1, degrees clockwise from north in [0, 360)
	StepM          float64 // distance between samples, metres

	DistM []float64 // distance of each sample from point 1 along the geodesic, metres
	Lat   []float64 // latitude of each sample, degrees
	Lon   []float64 // longitude of each sample, degrees in [−180, 180)
	ElevM []float64 // ground height, metres above the EGM96 geoid (0 where NoData)

	Sources []string // base names of the elevation files used, in order of first use
	NoData  int      // samples no file covers or in an unfillable void (ElevM 0 there)

	hermite hermiteCache // interpolation weights kept for the next profile
}

// Len returns the number of samples.
func (p *Profile) Len() int { return len(p.ElevM) }

// grow returns s resized to n, reusing its storage when large enough.
func grow(s []float64, n int) []float64 {
	if cap(s) >= n {
		return s[:n]
	}
	return make([]float64, n)
}

// Profile fills dst with the terrain along the WGS84 geodesic from (lat1,
// lon1) to (lat2, lon2), degrees, computed by Karney's algorithm (Karney,
// "Algorithms for geodesics", J. Geodesy 87, 2013; see InverseLine), and
// sampled with bilinear interpolation like Elevation.
//
// stepM is the distance between samples in metres; 0 takes the set's finest
// sample spacing at the higher of the two end latitudes (SpacingM), or
// NoDEMStepM when the set is empty, and never less than MinAutoStepM. The step is then shortened so that the
// samples are equally spaced and both ends are samples: n = ⌈D/step⌉ + 1
// samples (at least 2; coincident ends give two samples at 0 m).
//
// Sample positions come from Line.Positions: exact geodesic points every
// few samples (at most 2 km apart) and cubic Hermite interpolation between
// them, within 1e−11° (about a micrometre) of the exact positions; near the
// poles every sample is exact. The ends are exactly the given points.
//
// dst's slices are reused: no allocation happens when they are large
// enough. Profile is safe for concurrent use with one dst per goroutine. Where no file covers a sample its height is 0 m and it counts in
// NoData (uncovered HGT tiles are added to Missing). An error means invalid
// coordinates or step, too many samples (wrapping ErrTooManySamples, with
// the shortest step that would do), or an elevation file that cannot be
// read.
func (s *Set) Profile(lat1, lon1, lat2, lon2, stepM float64, dst *Profile) error {
	var line Line // on the stack: no allocation
	step, err := s.startProfile(&line, lat1, lon1, lat2, lon2, stepM, dst, true)
	if err != nil {
		return err
	}
	return s.profileSamples(&line, lat1, lon1, lat2, lon2, step, dst)
}

// ProfileHeights is Profile without the positions of the samples: it fills
// DistanceM, the azimuths, StepM, ElevM, Sources and NoData as Profile
// does, and leaves DistM, Lat and Lon empty (length 0; sample i lies
// i·StepM metres along the geodesic, the last one at DistanceM). It is
// for the many profiles of a route, a site ranking or a link budget,
// which need only the heights.
//
// The positions are the same exact geodesic nodes every few samples
// (Karney 2013) with cubic Hermite interpolation between them, carried
// out in the row and column of the tile in use instead of in latitude and
// longitude: the grid coordinates are affine in latitude and longitude,
// so the heights agree with Profile's to rounding, within 1e−9 m
// (TestProfileHeightsAgainstProfile), with one interpolation per sample
// and no conversion.
func (s *Set) ProfileHeights(lat1, lon1, lat2, lon2, stepM float64, dst *Profile) error {
	var line Line
	step, err := s.startProfile(&line, lat1, lon1, lat2, lon2, stepM, dst, false)
	if err != nil {
		return err
	}
	return s.heightSamples(&line, lat1, lon1, lat2, lon2, step, dst)
}

// startProfile checks the points and the step, sets line to the geodesic,
// sizes dst for the samples (with positions or not) and sets its
// length, azimuths and step; it returns the step in metres.
func (s *Set) startProfile(line *Line, lat1, lon1, lat2, lon2, stepM float64, dst *Profile, positions bool) (float64, error) {
	if err := checkPoint(lat1, lon1); err != nil {
		return 0, fmt.Errorf("profile start: %w", err)
	}
	if err := checkPoint(lat2, lon2); err != nil {
		return 0, fmt.Errorf("profile end: %w", err)
	}
	if math.IsNaN(stepM) || stepM < 0 || math.IsInf(stepM, 0) {
		return 0, fmt.Errorf("profile step %v m: want a positive length, or 0 for the elevation data's spacing", stepM)
	}
	distM, azi1, azi2 := profileLine(line, lat1, lon1, lat2, lon2)
	if stepM == 0 {
		stepM = s.SpacingM(math.Max(math.Abs(lat1), math.Abs(lat2)))
		if stepM == 0 {
			stepM = NoDEMStepM
		}
		stepM = math.Max(stepM, MinAutoStepM)
	}
	nf := math.Ceil(distM/stepM) + 1
	if nf > MaxProfileSamples {
		least := distM / (MaxProfileSamples - 1)
		return 0, samplesError(fmt.Sprintf("a profile of %.0f m at a %s m step would need more than %d samples; use a step of at least %s m",
			distM, strconv.FormatFloat(stepM, 'g', 3, 64), MaxProfileSamples, strconv.FormatFloat(math.Ceil(least*1000)/1000, 'f', -1, 64)))
	}
	n := max(int(nf), 2)
	step := distM / float64(n-1)

	dst.DistanceM = distM
	dst.AzimuthDeg = math.Mod(azi1+360, 360)
	dst.BackAzimuthDeg = math.Mod(azi2+180+360, 360)
	dst.StepM = step
	if positions {
		dst.DistM = grow(dst.DistM, n)
		dst.Lat = grow(dst.Lat, n)
		dst.Lon = grow(dst.Lon, n)
	} else {
		dst.DistM, dst.Lat, dst.Lon = dst.DistM[:0], dst.Lat[:0], dst.Lon[:0]
	}
	dst.ElevM = grow(dst.ElevM, n)
	dst.Sources = dst.Sources[:0]
	dst.NoData = 0
	return step, nil
}

// profileLine solves the inverse geodesic problem once, sets line to the
// geodesic from point 1 through point 2, and returns its length in metres
// and the forward azimuths in degrees at both ends (what InverseLine and
// Inverse give, without solving twice).
func profileLine(line *Line, lat1, lon1, lat2, lon2 float64) (distM, azi1Deg, azi2Deg float64) {
	distM, salp1, calp1, salp2, calp2 := wgs84Geod.inverse(lat1, lon1, lat2, lon2)
	wgs84Geod.initLine(line, lat1, lon1, salp1, calp1)
	return distM, gdAtan2d(salp1, calp1), gdAtan2d(salp2, calp2)
}

// profilePositions fills DistM, Lat and Lon by Line.Positions, with the
// ends set exactly to the given points and longitudes in [−180, 180).
func profilePositions(line *Line, lat1, lon1, lat2, lon2, step float64, dst *Profile) {
	n := len(dst.DistM)
	line.Positions(0, step, dst.Lat, dst.Lon)
	for i := range dst.DistM {
		dst.DistM[i] = float64(i) * step
		if dst.Lon[i] >= 180 {
			dst.Lon[i] -= 360
		}
	}
	dst.DistM[n-1] = dst.DistanceM
	dst.Lat[0], dst.Lon[0] = lat1, normLon(lon1)
	dst.Lat[n-1], dst.Lon[n-1] = lat2, normLon(lon2)
}

// profileHeights fills ElevM, Sources and NoData from Lat and Lon, keeping
// the tile in use between samples and sampling it in grid coordinates:
// row and column by one multiply-add each (reciprocal spacings) and the
// bilinear weights of Tile.At without a division, so heights agree with
// Tile.At to rounding (about 1e−9 m). A sample outside the tile in use
// (or any sample when GeoTIFFs may overlap the tiles) is looked up.
func (s *Set) profileHeights(dst *Profile) error {
	w := s.newHeightWalk(dst)
	lats, lons, elev := dst.Lat, dst.Lon[:len(dst.Lat)], dst.ElevM[:len(dst.Lat)]
	for i, lat := range lats {
		h, err := w.height(lat, lons[i])
		if err != nil {
			return err
		}
		elev[i] = h
	}
	return nil
}

// heightWalk is the state of profileHeights between samples: the tile in
// use and the last tile found missing.
type heightWalk struct {
	s                      *Set
	dst                    *Profile
	g                      gridCursor
	lastMissLa, lastMissLo int
	// fast: with only HGT tiles, a point inside the tile in use needs no
	// lookup; other files may overlap tiles, so then every sample is
	// looked up.
	fast bool
}

func (s *Set) newHeightWalk(dst *Profile) heightWalk {
	return heightWalk{s: s, dst: dst, g: noGrid, lastMissLa: math.MaxInt, lastMissLo: math.MaxInt, fast: len(s.others) == 0}
}

// height returns the ground height at (lat, lon), degrees, counting a
// sample without data in dst.NoData.
func (w *heightWalk) height(lat, lon float64) (float64, error) {
	g := &w.g
	y := (g.lat0 - lat) * g.invDLat
	x := (lon - g.lon0) * g.invDLon
	if !w.fast || !(y >= 0 && y <= g.maxY && x >= 0 && x <= g.maxX) {
		s := w.s
		src := s.lookup(lat, lon)
		if src == nil {
			*g = noGrid
			w.dst.NoData++
			if la, lo := int(math.Floor(lat)), int(math.Floor(lon)); la != w.lastMissLa || lo != w.lastMissLo {
				w.lastMissLa, w.lastMissLo = la, lo
				s.noteMissing(lat, lon)
			}
			return 0, nil
		}
		if src != g.src {
			t, err := s.tile(src)
			if err != nil {
				return 0, err
			}
			g.use(t, src)
			if !slices.Contains(w.dst.Sources, src.name) {
				w.dst.Sources = append(w.dst.Sources, src.name)
			}
		}
		y = min(max((g.lat0-lat)*g.invDLat, 0), g.maxY)
		x = min(max((lon-g.lon0)*g.invDLon, 0), g.maxX)
	}
	h := g.at(y, x)
	if h != h {
		h = 0
		w.dst.NoData++
	}
	return h, nil
}

// profileSamples is profilePositions followed by profileHeights, with
// the same values to the last bit: Line.Positions' exact nodes and cubic
// Hermite interpolation between them (its weights kept from one profile
// to the next), then the heights.
func (s *Set) profileSamples(line *Line, lat1, lon1, lat2, lon2, step float64, dst *Profile) error {
	n := len(dst.DistM)
	nw, ok := newNodeWalk(line, 0, step, n)
	if !ok {
		profilePositions(line, lat1, lon1, lat2, lon2, step, dst)
		return s.profileHeights(dst)
	}
	dist, lats, lons := dst.DistM[:n], dst.Lat[:n], dst.Lon[:n]
	// put stores sample i.
	put := func(i int, lat, lon float64) {
		if lon >= 180 {
			lon -= 360
		}
		dist[i], lats[i], lons[i] = float64(i)*step, lat, lon
	}
	put(0, lat1, normLon(lon1))
	for nw.next(line, &dst.hermite) {
		j, end, st := nw.j, nw.end, &nw.st
		if j > 0 {
			put(j, st.lat0, st.lon0)
		}
		for i := j + 1; i < end; i++ {
			var la, lo float64
			if nw.exact {
				la, lo = line.Position(float64(i) * step)
			} else {
				la, lo = st.position(i - j)
			}
			put(i, la, lo)
		}
	}
	put(n-1, lat2, normLon(lon2))
	dist[n-1] = dst.DistanceM
	return s.profileHeights(dst)
}

// heightSamples fills dst.ElevM, Sources and NoData for ProfileHeights:
// the nodes of profileSamples, and between them the samples' rows and
// columns in the tile in use by the same Hermite weights
// (gridCursor.stretchHeights); a sample outside that tile gets its
// position in degrees (as profileSamples) and is looked up.
func (s *Set) heightSamples(line *Line, lat1, lon1, lat2, lon2, step float64, dst *Profile) error {
	n := len(dst.ElevM)
	nw, ok := newNodeWalk(line, 0, step, n)
	if !ok {
		// Few samples, or one node per sample: positions as Profile's,
		// in dst's position slices, emptied again after.
		dst.DistM, dst.Lat, dst.Lon = grow(dst.DistM, n), grow(dst.Lat, n), grow(dst.Lon, n)
		profilePositions(line, lat1, lon1, lat2, lon2, step, dst)
		err := s.profileHeights(dst)
		dst.DistM, dst.Lat, dst.Lon = dst.DistM[:0], dst.Lat[:0], dst.Lon[:0]
		return err
	}
	elev := dst.ElevM[:n]
	w := s.newHeightWalk(dst)
	if err := heightAt(elev, 0, lat1, normLon(lon1), w.height); err != nil {
		return err
	}
	grid := func() *gridCursor {
		if w.fast {
			return &w.g
		}
		return nil
	}
	if err := nw.heights(line, &dst.hermite, elev, false, grid, &dst.NoData, w.height); err != nil {
		return err
	}
	return heightAt(elev, n-1, lat2, normLon(lon2), w.height)
}

// heightAt sets heights[i] to height(lat, lon), the longitude taken from
// [−180, 180] into [−180, 180).
func heightAt(heights []float64, i int, lat, lon float64, height func(lat, lon float64) (float64, error)) error {
	if lon >= 180 {
		lon -= 360
	}
	h, err := height(lat, lon)
	heights[i] = h
	return err
}

// heights walks the rest of nw and fills heights at every node after the
// first (and at the first too when withFirst) and at every sample between
// nodes, all but the last sample: inside the tile in use that grid gives
// (nil for none), runs of samples by their rows and columns
// (gridCursor.stretchHeights, unfillable voids added to *noData); any
// other sample at its position in degrees, by height.
func (nw *nodeWalk) heights(line *Line, hc *hermiteCache, heights []float64, withFirst bool,
	grid func() *gridCursor, noData *int, height func(lat, lon float64) (float64, error)) error {
	for nw.next(line, hc) {
		j, st := nw.j, &nw.st
		if j > 0 || withFirst {
			if err := heightAt(heights, j, st.lat0, st.lon0, height); err != nil {
				return err
			}
		}
		out := heights[j:nw.end]
		for i := 1; i < len(out); i++ {
			if g := grid(); g != nil && !nw.exact {
				done, voids := g.stretchHeights(st, i, out)
				*noData += voids
				if i += done; i == len(out) {
					break
				}
			}
			var la, lo float64
			if nw.exact {
				la, lo = line.Position(nw.start + float64(j+i)*nw.step)
			} else {
				la, lo = st.position(i)
			}
			if err := heightAt(heights, j+i, la, lo, height); err != nil {
				return err
			}
		}
	}
	return nil
}

// nodeWalk steps along a geodesic line in stretches between exact nodes
// (Karney 2013) every k samples of step metres, as Line.Positions does:
// each stretch runs from sample j (a node) to sample end (the next one)
// and holds the cubic Hermite interpolation between them, or is exact
// (every sample from Line.Position) where a node lies beyond 75° of
// latitude and the interpolation would be poor.
type nodeWalk struct {
	start  float64 // the distance of sample 0 along the line, metres
	step   float64
	k, n   int
	j, end int
	exact  bool
	st     stretch
	// the node at end, carried to the next stretch
	lat1, lon1, dlat1, dlon1 float64
	ok1                      bool
}

// newNodeWalk starts a walk along line over n samples step metres apart,
// the first start metres along it; ok is false when there is nothing to
// interpolate (fewer than three samples, or a node at every sample).
func newNodeWalk(line *Line, start, step float64, n int) (nodeWalk, bool) {
	k := 1
	if math.Abs(step) > 0 {
		k = int(min(1024, 2000/math.Abs(step))) // as Line.Positions
	}
	w := nodeWalk{start: start, step: step, k: k, n: n}
	w.lat1, w.lon1, w.dlat1, w.dlon1, w.ok1 = line.node(start)
	return w, k > 1 && n >= 3
}

// next moves to the next stretch along line (the walk's), with weights
// from hc, and reports whether there is one. (The line and the cache are
// passed in, not kept, so that a Line on the caller's stack stays there.)
func (w *nodeWalk) next(line *Line, hc *hermiteCache) bool {
	if w.end >= w.n-1 {
		return false
	}
	w.j = w.end
	lat0, lon0, dlat0, dlon0, ok0 := w.lat1, w.lon1, w.dlat1, w.dlon1, w.ok1
	w.end = min(w.j+w.k, w.n-1)
	w.lat1, w.lon1, w.dlat1, w.dlon1, w.ok1 = line.node(w.start + float64(w.end)*w.step)
	w.exact = !ok0 || !w.ok1
	kk := w.end - w.j
	w.st = stretch{h: float64(kk) * w.step, lat0: lat0, lon0: lon0, dLat: w.lat1 - lat0, dLon: wrap180(w.lon1 - lon0),
		dlat0: dlat0, dlon0: dlon0, dlat1: w.dlat1, dlon1: w.dlon1}
	if !w.exact {
		w.st.wt = hc.weights(kk)
	}
	return true
}

// wrap180 returns a longitude difference in degrees taken into
// [−180, 180] (one turn added or taken off).
func wrap180(d float64) float64 {
	if d > 180 {
		return d - 360
	} else if d < -180 {
		return d + 360
	}
	return d
}

// stretch is the cubic Hermite interpolation between two exact geodesic
// nodes h metres apart: wt holds the weights (hermiteCache.weights), the
// first node is at (lat0, lon0) with derivatives (dlat0, dlon0), the
// second dLat and dLon further with derivatives (dlat1, dlon1), degrees
// and degrees per metre.
type stretch struct {
	wt                         *hermiteWeights
	h, lat0, lon0, dLat, dLon  float64
	dlat0, dlon0, dlat1, dlon1 float64
}

// position returns the latitude and longitude of sample i of the stretch
// (0 at the first node), degrees, the longitude in [−180, 180] (callers
// take 180 to −180), by the expressions of Line.Positions.
func (st *stretch) position(i int) (lat, lon float64) {
	w := st.wt
	h01, h10, h11 := w.h01[i], w.a10[i]*st.h, w.a11[i]*st.h
	lat = st.lat0 + h01*st.dLat + h10*st.dlat0 + h11*st.dlat1
	lon = wrap180(st.lon0 + h01*st.dLon + h10*st.dlon0 + h11*st.dlon1)
	return lat, lon
}

// stretchHeights sets out[i] to the height of sample i of the stretch st,
// from sample from on, for the samples that lie inside the tile in use,
// as heightWalk.height would at the same points, and returns how many it did
// and how many of them were unfillable voids; it stops at the first
// sample outside the tile (or at the end of out). The interpolation runs
// in the tile's rows and columns: the nodes and their derivatives are
// converted once, which is exact up to rounding since rows and columns
// are affine in latitude and longitude.
func (g *gridCursor) stretchHeights(st *stretch, from int, out []float64) (done, voids int) {
	if g.maxR < 0 {
		return 0, 0
	}
	// The first node in the tile's rows and columns; its longitude taken
	// within 180° of the tile's, so a stretch across the antimeridian
	// stays continuous.
	dx := wrap180(st.lon0 - g.lon0)
	iy, ix := -g.invDLat, g.invDLon
	y0, x0 := (g.lat0-st.lat0)*g.invDLat, dx*ix
	yA, xA := st.dLat*iy, st.dLon*ix             // times h01
	yB, xB := st.dlat0*st.h*iy, st.dlon0*st.h*ix // times the h10 weight
	yC, xC := st.dlat1*st.h*iy, st.dlon1*st.h*ix // times the h11 weight
	// Samples must lie strictly inside the last row and column, so that
	// the 2×2 cell starts at the truncated row and column; a sample on the
	// last row or column is looked up, with the same answer.
	maxY, maxX := g.maxY, g.maxX
	// The curve strays from its chord by at most 4/27 (|yB − yA| +
	// |yC − yA|) rows: with a10 = t(1−t)² and a11 = −t²(1−t), h01 − t =
	// −(a10 + a11), so y − chord = a10 (yB − yA) + a11 (yC − yA), and
	// |a10|, |a11| ≤ 4/27. When the chord's box widened by that (and by
	// far more than rounding) is inside, no sample needs checking.
	checked := !(boxInside(y0, yA, 4.0/27*(math.Abs(yB-yA)+math.Abs(yC-yA)), maxY) &&
		boxInside(x0, xA, 4.0/27*(math.Abs(xB-xA)+math.Abs(xC-xA)), maxX))
	cols, hgt := g.cols, g.h
	n := len(out)
	w01, w10, w11 := st.wt.h01[:n], st.wt.a10[:n], st.wt.a11[:n]
	for i := from; i < n; i++ {
		y := y0 + w01[i]*yA + w10[i]*yB + w11[i]*yC
		x := x0 + w01[i]*xA + w10[i]*xB + w11[i]*xC
		if checked && !(y >= 0 && y < maxY && x >= 0 && x < maxX) {
			return i - from, voids
		}
		r, cc := int(y), int(x)
		fy, fx := y-float64(r), x-float64(cc)
		o := r*cols + cc
		top, bot := hgt[o:o+2:o+2], hgt[o+cols:o+cols+2:o+cols+2]
		z00, z01 := float64(top[0]), float64(top[1])
		z10, z11 := float64(bot[0]), float64(bot[1])
		v := bilinear(z00, z01, z10, z11, fy, fx)
		if v != v {
			if v = voidMean(z00, z01, z10, z11); v != v {
				v = 0
				voids++
			}
		}
		out[i] = v
	}
	return len(out) - from, voids
}

// boxInside reports whether every value within dev of the segment from v0
// to v0 + dv lies in [0, last) with a margin of 1e−6 (rows or columns:
// far beyond the rounding of values below 10⁶).
func boxInside(v0, dv, dev, last float64) bool {
	lo, hi := min(v0, v0+dv), max(v0, v0+dv)
	return lo-dev-1e-6 >= 0 && hi+dev+1e-6 < last
}

// hermiteCache keeps the cubic Hermite weights of Line.Positions for two
// stretch lengths (the full stretch and the last, shorter one); the one
// used less recently is replaced.
type hermiteCache struct {
	k    [2]int
	w    [2]hermiteWeights
	next int
}

// hermiteWeights are the weights of cubic Hermite interpolation at the
// points i = 0 … kk−1 of a stretch of kk steps, t = i/kk: h01 (of the
// second node's value; h00 = 1 − h01 is folded into the difference), and
// a10 and a11, the weights of the two slopes before their factor, the
// stretch's length h. Index 0 is the first node (all zero).
type hermiteWeights struct {
	h01, a10, a11 []float64
}

// weights returns the weights for a stretch of kk steps, computed by the
// expressions of Line.Positions.
func (c *hermiteCache) weights(kk int) *hermiteWeights {
	for s := range c.k {
		if c.k[s] == kk && c.w[s].h01 != nil {
			c.next = 1 - s // the other one goes first
			return &c.w[s]
		}
	}
	s := c.next
	c.next = 1 - s
	w := &c.w[s]
	w.h01, w.a10, w.a11 = grow(w.h01, kk), grow(w.a10, kk), grow(w.a11, kk)
	w.h01[0], w.a10[0], w.a11[0] = 0, 0, 0
	inv := 1 / float64(kk)
	for i := 1; i < kk; i++ {
		t := float64(i) * inv
		t2 := t * t
		t3 := t2 * t
		w.h01[i], w.a10[i], w.a11[i] = 3*t2-2*t3, t3-2*t2+t, t3-t2
	}
	c.k[s] = kk
	return w
}

// gridCursor is a tile in use and its grid constants.
type gridCursor struct {
	t          *Tile
	src        *source
	h          []float32
	cols       int
	lat0, lon0 float64 // the north-west sample, degrees
	invDLat    float64 // rows per degree of latitude
	invDLon    float64 // columns per degree of longitude
	maxY, maxX float64 // last row and column as numbers; −1 with no tile
	maxR, maxC int     // last row and column a 2×2 cell may start at
}

// noGrid holds no tile: no point lies within it.
var noGrid = gridCursor{maxY: -1, maxX: -1, maxR: -1}

// use makes t (from src) the tile in use.
func (g *gridCursor) use(t *Tile, src *source) {
	*g = gridCursor{t: t, src: src, h: t.H, cols: t.Cols,
		lat0: t.Lat0, lon0: t.Lon0, invDLat: 1 / t.DLat, invDLon: 1 / t.DLon,
		maxY: float64(t.Rows - 1), maxX: float64(t.Cols - 1),
		maxR: t.Rows - 2, maxC: t.Cols - 2}
	if t.Rows < 2 || t.Cols < 2 || len(t.H) < t.Rows*t.Cols {
		g.maxR = -1 // degenerate grid: Tile.At answers
	}
}

// at interpolates the tile in use bilinearly at fractional row y and
// column x, both within the grid, as Tile.At does; NaN where all four
// samples are voids.
func (g *gridCursor) at(y, x float64) float64 {
	if g.maxR < 0 {
		if g.t == nil {
			return 0
		}
		return g.t.At(g.lat0-y*g.t.DLat, g.lon0+x*g.t.DLon)
	}
	r := min(int(y), g.maxR)
	c := min(int(x), g.maxC)
	fy, fx := y-float64(r), x-float64(c)
	i := r*g.cols + c
	h := g.h[i : i+g.cols+2 : i+g.cols+2] // one bounds check for the four samples
	h00, h01 := float64(h[0]), float64(h[1])
	h10, h11 := float64(h[g.cols]), float64(h[g.cols+1])
	if v := bilinear(h00, h01, h10, h11, fy, fx); v == v {
		return v
	}
	return voidMean(h00, h01, h10, h11)
}
