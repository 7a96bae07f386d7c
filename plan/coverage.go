package plan

import (
	"context"
	"errors"
	"fmt"
	"math"
	"strings"
	"sync/atomic"

	"github.com/mastlink/mastlink/propagation"
	"github.com/mastlink/mastlink/terrain"
	"github.com/paulmach/orb"
)

// CoverageMode says what a coverage map holds in each cell.
type CoverageMode int

const (
	// CoverageLoss maps the link over terrain: path loss by ITU-R P.526-16
	// §4.5 (delta-Bullington), or the received level or margin from it.
	CoverageLoss CoverageMode = iota
	// CoverageLOS maps line of sight: 1 visible, 0 hidden.
	CoverageLOS
)

// CoverageValue says which figure of the link a loss map holds.
type CoverageValue int

const (
	// ValuePathLoss is the basic transmission loss in dB.
	ValuePathLoss CoverageValue = iota
	// ValueReceived is the received level in dBm (needs a budget).
	ValueReceived
	// ValueMargin is the margin over the receiver's sensitivity in dB
	// (needs a budget).
	ValueMargin
)

// CoverageNoData is the value of cells outside the radius.
const CoverageNoData float32 = -9999

// DefaultMaxCoverageCells bounds the cells of a coverage grid (its bounding
// box, rows × columns): about 12 bytes each while it is computed, so the
// default stays near 300 MB.
const DefaultMaxCoverageCells = 25_000_000

// coverageBytesPerCell is the memory a grid cell takes while the map is
// computed: the float32 value, the radial it is answered from, and its
// place in that radial's list (int32 each).
const coverageBytesPerCell = 12

// Radials per cell of circumference at the radius: line of sight needs
// only that every cell at the edge is reached (neighbouring radials one
// cell apart there); loss mode halves the spacing, since the terrain near
// the receiver weighs more in diffraction and the radial passes at most a
// quarter of a cell from the cell's centre instead of half. Measured on
// the real tile N57E011 against the full profile to each cell
// (TestCoverageLossAgainstLink): 94.8 % of cells within 1 dB with one
// radial per cell, 98.0 % with two, 98.8 % with four.
const (
	coverageRadialsLOS  = 1.0
	coverageRadialsLoss = 2.0
)

// ErrCoverage is wrapped by every error about an unusable coverage request.
var ErrCoverage = errors.New("coverage")

// CoverageBudget is one direction of a link for a coverage map, the
// figures that do not depend on the path.
type CoverageBudget struct {
	EIRPDBm          float64 // transmitted power + antenna gain − feedline loss, dBm
	RxNetGainDB      float64 // receiving antenna gain − feedline loss, dB
	RxSensitivityDBm float64 // dBm
}

// CoverageRequest is an area coverage map around a site.
type CoverageRequest struct {
	Site          orb.Point // (lon, lat) degrees on WGS84
	SiteHeightM   float64   // site antenna above ground, m
	TargetHeightM float64   // antenna above ground in every cell, m
	RadiusM       float64   // cells whose centre lies within it, m (> 0)
	FreqMHz       float64   // needed for CoverageLoss
	K             float64   // effective earth-radius factor; 0 means 4/3
	Polarization  propagation.Polarization
	Ground        propagation.Ground // zero means propagation.Land
	Mode          CoverageMode
	Value         CoverageValue
	// Budgets are the directions of the link (one, or two where the kits
	// differ); received level and margin take the lowest over them.
	Budgets        []CoverageBudget
	NeededMarginDB float64 // margin a covered cell needs, dB (with Budgets)
	// SitePattern, when not nil, is the site antenna's gain toward an
	// azimuth (degrees clockwise from true north, in the horizontal plane)
	// relative to the gain the Budgets carry, dB (≤ 0 for a pattern
	// relative to its peak). It is added to every direction of every cell,
	// the site antenna taking part both ways. Nil means an antenna that is
	// the same toward every cell (Antenna.CoveragePattern).
	SitePattern func(azimuthDeg float64) float64
	// ResolutionM is the cell size in metres; 0 takes the grid of the
	// elevation file at the site (cell centres on its samples), or 3″
	// where no file covers the site.
	ResolutionM float64
	MaxCells    int // 0 means DefaultMaxCoverageCells
}

// CoverageResult is a coverage map: a float32 grid in geographic
// coordinates, row-major from the north row, pixel-is-area.
type CoverageResult struct {
	Values           []float32 // Rows × Cols; CoverageNoData outside the radius
	Rows, Cols       int
	West, North      float64 // degrees: outer corner of the north-west cell
	DLatDeg, DLonDeg float64 // cell size, degrees
	Cells            int     // cells within the radius
	Covered          int     // of them: visible (LOS), margin ≥ needed (budget), else line of sight
	CoveredFraction  float64 // Covered / Cells
	Radials          int     // radials walked
	StepM            float64 // distance between samples along a radial, m
	SiteGroundM      float64 // ground at the site, m above the EGM96 geoid
	// SmoothEarth reports that some samples had no elevation data and were
	// taken at 0 m (smooth earth); Warnings says so once, with the tiles.
	SmoothEarth bool
	Warnings    []string
}

// Bounds returns the map's extent in degrees.
func (r *CoverageResult) Bounds() (west, south, east, north float64) {
	return r.West, r.North - float64(r.Rows)*r.DLatDeg, r.West + float64(r.Cols)*r.DLonDeg, r.North
}

// coverageGrid is the geometry of the grid and of the radials.
type coverageGrid struct {
	rows, cols   int
	lat0, lon0   float64   // centre of cell (0, 0), degrees
	dLat, dLon   float64   // degrees
	siteLat      float64   // degrees
	siteLon      float64   // degrees
	rowLat       []float64 // centre latitude of each row
	rowN, rowE   []float64 // metres per degree of latitude, longitude at the row's mid-latitude with the site
	radiusM      float64
	cellN, cellE float64 // a cell's sides at the site, m
	radials      int
	stepM        float64
	samples      int       // per radial, the site included
	levels       int       // radial levels below the full set (see walkTree, coverageLOS)
	shift        int       // a level-t radial starts at R/2^(t+shift)
	thresholds   []float64 // R/2^(j+shift), m: level j serves distances from there out
	perLevel     []float64 // radials of level j and coarser per radian of azimuth
}

// CoverageMap computes a coverage map around req.Site over the elevation
// data ts (nil or empty: a smooth earth at sea level).
//
// Method: radials leave the site along WGS84 geodesics (Karney) at equal
// azimuth steps, enough that neighbouring radials lie at most one cell
// apart at the radius (half a cell for loss), sampled with bilinear
// heights every cell size (line of sight: the DEM spacing in the radial's
// own direction). They come in units of 2^levels neighbours: a unit's
// coarsest radial runs from the site, the finer ones branch off a coarser
// neighbour where the radials of the coarser levels stand too far apart
// for the cells (R/2^(t+1) for level t in line of sight, R/2^(t+2) in
// loss), taking its samples up to there. Every cell within the radius is
// answered by the nearest radial of its distance's level, with the cell's
// centre as the receiver (its own distance and ground height) and the
// radial's samples short of it by more than half a step as the
// intermediate profile points, by propagation.HorizonLOS or
// propagation.Radial: line of sight by ITU-R P.526-16 eqs. 49–50 (earth
// curvature of the chosen k), loss by §4.5 (delta-Bullington) plus free
// space (ITU-R P.525-4). A unit finds its cells in the wedge of azimuths
// it serves (sectorRows), so no list of every cell is kept. Cell distance
// and azimuth come from the mid-latitude plane approximation (metres per
// degree at the mean latitude of site and cell; Snyder, USGS PP 1395, eqs.
// 4-18, 4-20), within a few metres of the geodesic at 40 km.
//
// It uses every core (results by index: the same bytes whatever the core
// count) and calls progress, when not nil, from the calling goroutine with
// the work done (rows of the grid for the cells' ground, then radials;
// total rows + radials), about every 100 ms and once at the end. Errors: bad
// request (wrapping ErrCoverage; a grid over MaxCells names its cells and
// memory), an unreadable elevation file, or ctx's error.
func CoverageMap(ctx context.Context, ts *terrain.Set, req CoverageRequest, progress func(done, total int)) (*CoverageResult, error) {
	if ts == nil {
		var err error
		if ts, err = terrain.Open(); err != nil {
			return nil, err
		}
	}
	lat, lon := req.Site.Lat(), req.Site.Lon()
	if !(lat >= -90 && lat <= 90) || !(lon >= -180 && lon <= 180) {
		return nil, fmt.Errorf("%w: site %g,%g is not a latitude,longitude in degrees", ErrCoverage, lat, lon)
	}
	if !(req.RadiusM > 0) || math.IsInf(req.RadiusM, 0) {
		return nil, fmt.Errorf("%w: radius %g m must be positive", ErrCoverage, req.RadiusM)
	}
	if !(req.SiteHeightM >= 0) || !(req.TargetHeightM >= 0) {
		return nil, fmt.Errorf("%w: antenna heights %g m and %g m must be zero or more above ground", ErrCoverage, req.SiteHeightM, req.TargetHeightM)
	}
	if req.ResolutionM < 0 || math.IsNaN(req.ResolutionM) {
		return nil, fmt.Errorf("%w: resolution %g m must be positive (or 0 for the elevation data's cells)", ErrCoverage, req.ResolutionM)
	}
	if req.Mode == CoverageLoss && req.Value != ValuePathLoss && len(req.Budgets) == 0 {
		return nil, fmt.Errorf("%w: received level and margin need the kit (power, gains, feedlines, sensitivity)", ErrCoverage)
	}
	k := req.K
	if k == 0 {
		k = propagation.DefaultKFactor
	}
	freq := req.FreqMHz
	if req.Mode == CoverageLOS && freq == 0 {
		freq = 146 // unused by line of sight; any valid frequency
	}
	prm := propagation.Params{
		FreqMHz: freq, TxHeightM: req.SiteHeightM, RxHeightM: req.TargetHeightM,
		EarthRadiusKM: propagation.EffectiveEarthRadiusKM(k),
		Polarization:  req.Polarization, Ground: req.Ground,
	}
	if _, err := propagation.NewRadial(prm, false); err != nil {
		return nil, fmt.Errorf("%w: %v", ErrCoverage, err)
	}

	res := &CoverageResult{}
	g, err := coverageGeometry(ts, lat, lon, req, res)
	if err != nil {
		return nil, err
	}
	sp := ts.NewSampler()
	h0, err := sp.Height(lat, lon)
	if err != nil {
		return nil, err
	}
	res.SiteGroundM = h0
	res.Values = make([]float32, g.rows*g.cols)
	if req.Mode == CoverageLOS {
		if err := g.coverageLOS(ctx, ts, prm, h0, res, progress); err != nil {
			return nil, err
		}
		return finishCoverage(ts, res), nil
	}
	unit := 1 << g.levels
	total := g.rows + g.radials
	cellNoData, cells, err := g.fillGround(ctx, ts, res.Values, func(done, _ int) {
		if progress != nil {
			progress(done, total)
		}
	})
	if err != nil {
		return nil, err
	}
	res.SmoothEarth, res.Cells = cellNoData, cells

	covered := make([]int32, g.radials)
	noData := make([]bool, g.radials)
	var answered atomic.Int64
	// Units of 2^levels radials, each from its coarsest radial (walkTree),
	// with the cells they answer (unitCells).
	err = coverageParallel(ctx, g.radials/unit, func(done, _ int) {
		if progress != nil {
			progress(g.rows+done*unit, total)
		}
	}, func(ws *coverageWorker, u int) error {
		if ws.walker == nil {
			var err error
			if ws.walker, err = propagation.NewRadial(prm, true); err != nil {
				return err
			}
			ws.snaps = make([]*propagation.Radial, g.levels)
			for c := range ws.snaps {
				ws.snaps[c], _ = propagation.NewRadial(prm, true)
			}
			ws.sp = ts.NewSampler()
		}
		k0 := u * unit
		g.unitCells(ws, k0, unit, res.Values, true)
		answered.Add(int64(len(ws.found)))
		ws.walker.Reset(h0)
		return g.walkTree(ws, k0, g.levels, func(k int) radialCells {
			a, b := ws.radStart[k-k0], ws.radStart[k-k0+1]
			return radialCells{ws.byRadial[a:b], ws.byRadialD[a:b], ws.byRadialH[a:b]}
		}, &req, res.Values, covered, noData)
	})
	if err != nil {
		return nil, err
	}
	if err := g.checkAnswered(int(answered.Load()), res.Cells); err != nil {
		return nil, err
	}
	for r := range g.radials {
		res.Covered += int(covered[r])
		res.SmoothEarth = res.SmoothEarth || noData[r]
	}
	return finishCoverage(ts, res), nil
}

// finishCoverage sets the covered fraction and the smooth-earth warning.
func finishCoverage(ts *terrain.Set, res *CoverageResult) *CoverageResult {
	if res.Cells > 0 {
		res.CoveredFraction = float64(res.Covered) / float64(res.Cells)
	}
	if res.SmoothEarth {
		msg := "no elevation data for part of the area: smooth earth at 0 m there"
		if m := ts.Missing(); len(m) > 0 {
			msg += " (missing " + strings.Join(m, ", ") + ")"
		}
		res.Warnings = append(res.Warnings, msg)
	}
	return res
}

// coverageGeometry lays out the grid and the radials, and refuses a grid
// over the cell limit.
func coverageGeometry(ts *terrain.Set, lat, lon float64, req CoverageRequest, res *CoverageResult) (*coverageGrid, error) {
	density := coverageRadialsLoss
	if req.Mode == CoverageLOS {
		density = coverageRadialsLOS
	}
	g := &coverageGrid{siteLat: lat, siteLon: lon, radiusM: req.RadiusM}
	nM, eM := metresPerDegreeWGS84(lat)
	var lat0, lon0 float64 // one cell centre of the lattice
	if grid, ok := ts.GridAt(lat, lon); ok && req.ResolutionM == 0 {
		g.dLat, g.dLon, lat0, lon0 = grid.DLatDeg, grid.DLonDeg, grid.Lat0, grid.Lon0
	} else {
		r := req.ResolutionM
		if r == 0 {
			g.dLat, g.dLon = 1.0/1200, 1.0/1200 // 3″, the coarser SRTM grid
			if !ok {
				res.Warnings = append(res.Warnings, "no elevation file covers the site: 3″ cells")
			}
		} else {
			g.dLat, g.dLon = r/nM, r/eM
		}
	}
	latSpan := req.RadiusM/nM + g.dLat
	if math.Abs(lat)+latSpan > 89 {
		return nil, fmt.Errorf("%w: a %g m radius around latitude %g° comes within 1° of a pole; use a smaller radius", ErrCoverage, req.RadiusM, lat)
	}
	_, eFar := metresPerDegreeWGS84(math.Abs(lat) + latSpan)
	lonSpan := req.RadiusM/eFar + g.dLon
	// Lattice indices of the site's nearest cell, and the half-sizes.
	rs := math.Round((lat0 - lat) / g.dLat)
	cs := math.Round((lon - lon0) / g.dLon)
	hr := math.Ceil(latSpan / g.dLat)
	hc := math.Ceil(lonSpan / g.dLon)
	rowsF, colsF := 2*hr+1, 2*hc+1
	maxCells := req.MaxCells
	if maxCells <= 0 {
		maxCells = DefaultMaxCoverageCells
	}
	if rowsF*colsF > float64(maxCells) {
		cells := rowsF * colsF
		return nil, fmt.Errorf("%w: a %g m radius at %.3g m cells needs a grid of %.0f × %.0f = %.0f cells (about %.0f MB); the limit is %d cells: use a smaller radius or a coarser resolution",
			ErrCoverage, req.RadiusM, math.Min(g.dLat*nM, g.dLon*eM), rowsF, colsF, cells, cells*coverageBytesPerCell/1e6, maxCells)
	}
	g.rows, g.cols = int(rowsF), int(colsF)
	g.lat0 = lat0 - (rs-hr)*g.dLat
	g.lon0 = lon0 + (cs-hc)*g.dLon
	res.Rows, res.Cols = g.rows, g.cols
	res.DLatDeg, res.DLonDeg = g.dLat, g.dLon
	res.North = g.lat0 + g.dLat/2
	res.West = g.lon0 - g.dLon/2
	if res.West < -180 {
		res.West += 360
	} else if res.West >= 180 {
		res.West -= 360
	}
	g.rowLat = make([]float64, g.rows)
	g.rowN = make([]float64, g.rows)
	g.rowE = make([]float64, g.rows)
	for r := range g.rows {
		g.rowLat[r] = g.lat0 - float64(r)*g.dLat
		g.rowN[r], g.rowE[r] = metresPerDegreeWGS84((g.rowLat[r] + lat) / 2)
	}
	g.cellN, g.cellE = g.dLat*nM, g.dLon*eM
	cell := min(g.cellN, g.cellE)
	g.stepM = cell
	base := max(16, int(math.Ceil(density*2*math.Pi*req.RadiusM/cell)))
	for g.levels < losMaxLevels && base>>(g.levels+1) >= 16 {
		g.levels++
	}
	unit := 1 << g.levels
	g.radials = (base + unit - 1) / unit * unit
	// Line of sight branches a level-t radial off at R/2^(t+1), where it
	// stands half a radial spacing at the radius from its parent; loss,
	// more sensitive to the terrain beside the path, at R/2^(t+2).
	g.shift = 2
	if req.Mode == CoverageLOS {
		g.shift = 1
	}
	g.thresholds = make([]float64, g.levels+1)
	g.perLevel = make([]float64, g.levels+1)
	for j := range g.thresholds {
		g.thresholds[j] = req.RadiusM / float64(int(1)<<(j+g.shift))
		g.perLevel[j] = float64(g.radials) / (2 * math.Pi) / float64(int(1)<<j)
	}
	g.samples = int(req.RadiusM/g.stepM) + 3
	res.Radials, res.StepM = g.radials, g.stepM
	return g, nil
}

// metresPerDegreeWGS84 returns the length in metres of one degree of
// latitude and of longitude at latitude lat (degrees) on the WGS84
// ellipsoid, from the meridional and prime-vertical radii of curvature
// (Snyder, Map Projections – A Working Manual, USGS PP 1395, 1987, eqs.
// 4-18 and 4-20; from memory).
func metresPerDegreeWGS84(lat float64) (northM, eastM float64) {
	e2 := terrain.WGS84F * (2 - terrain.WGS84F)
	sin, cos := math.Sincos(lat * math.Pi / 180)
	w := math.Sqrt(1 - e2*sin*sin)
	return terrain.WGS84A * (1 - e2) / (w * w * w) * math.Pi / 180, terrain.WGS84A / w * math.Abs(cos) * math.Pi / 180
}

// distance returns the distance in metres of the centre of cell (r, c)
// from the site (mid-latitude plane, as east).
func (g *coverageGrid) distance(r, c int) float64 {
	e := g.east(r, c)
	n := (g.rowLat[r] - g.siteLat) * g.rowN[r]
	return math.Sqrt(e*e + n*n)
}

// fillGround stores in values, row by row on every core, each cell's own
// ground height (m, float32; terrain.Sampler.Row) within the radius, where
// the engines read it back before they write the cell's answer, and
// CoverageNoData outside. It returns whether some cell had no elevation
// data and the cells within the radius; progress counts rows.
func (g *coverageGrid) fillGround(ctx context.Context, ts *terrain.Set, values []float32, progress func(done, total int)) (noData bool, cells int, err error) {
	r2 := g.radiusM * g.radiusM
	var nd atomic.Bool
	var nCells atomic.Int64
	err = coverageParallel(ctx, g.rows, progress, func(ws *coverageWorker, r int) error {
		if ws.sp == nil {
			ws.sp = ts.NewSampler()
		}
		ws.sp.NoData = 0
		row := values[r*g.cols : (r+1)*g.cols]
		north := (g.rowLat[r] - g.siteLat) * g.rowN[r]
		cLo, cHi := g.span(north, g.rowE[r], r2)
		if err := ws.sp.Row(g.rowLat[r], g.lon0, g.dLon, row, cLo, cHi); err != nil {
			return err
		}
		if ws.sp.NoData > 0 {
			nd.Store(true)
		}
		nc := 0
		for c := range row {
			if c < cLo || c >= cHi {
				row[c] = CoverageNoData
				continue
			}
			if e := g.east(r, c); e*e+north*north > r2 {
				row[c] = CoverageNoData
				continue
			}
			nc++
		}
		nCells.Add(int64(nc))
		return nil
	})
	return nd.Load(), int(nCells.Load()), err
}

// checkAnswered guards the engines' bookkeeping: the units must answer
// exactly the cells the ground pass counted, or a cell would keep its
// ground height as its value. A mismatch is a fault of this package, so
// the map is refused rather than written.
func (g *coverageGrid) checkAnswered(answered, cells int) error {
	if answered != cells {
		return fmt.Errorf("coverage: internal error: %d of %d cells answered (site %.5f,%.5f, radius %g m); please report it", answered, cells, g.siteLat, g.siteLon, g.radiusM)
	}
	return nil
}

// unitCells gathers the cells within the radius that radials k0 …
// k0+unit−1 answer (the nearest radial of their distance's level) into
// ws.found, in row order, with the unit's radial of each (ws.foundOff,
// 0 … unit−1), its distance (m, ws.foundD) and its ground height (from
// values, ws.foundH). It scans level band by level band: the cells at
// level j round to every 2^j-th radial, so those of the unit lie in the
// wedge from half a spacing 2^j before its first radial to half a spacing
// 2^j before the next unit's, within the band's annulus (sectorRows); a
// radial spacing more each side covers rounding. With group, it also
// sorts them by radial (counting sort, row order kept within a radial)
// into ws.byRadial, ws.byRadialD and ws.byRadialH: radial k0+o's are at
// [ws.radStart[o], ws.radStart[o+1]).
func (g *coverageGrid) unitCells(ws *coverageWorker, k0, unit int, values []float32, group bool) {
	r2 := g.radiusM * g.radiusM
	per := float64(g.radials) / (2 * math.Pi)
	ws.found, ws.foundOff, ws.foundD, ws.foundH = ws.found[:0], ws.foundOff[:0], ws.foundD[:0], ws.foundH[:0]
	for j := 0; j <= g.levels; j++ {
		dLo, dHi := 0.0, g.radiusM
		if j < g.levels {
			dLo = g.thresholds[j]
		}
		if j > 0 {
			dHi = g.thresholds[j-1]
		}
		half := float64(int(1)<<j) / 2
		a1 := (float64(k0) - half - 1) / per
		a2 := (float64(k0+unit) - half + 1) / per
		g.sectorRows(a1, a2, dLo, dHi, func(r, cLo, cHi int) {
			north := (g.rowLat[r] - g.siteLat) * g.rowN[r]
			ground := values[r*g.cols : (r+1)*g.cols]
			for c := cLo; c < cHi; c++ {
				e := g.east(r, c)
				d2 := e*e + north*north
				if d2 > r2 {
					continue
				}
				d := math.Sqrt(d2)
				if g.level(d) != j {
					continue // another band's
				}
				if k := g.radialAtLevel(e, north, d, j); k >= k0 && k < k0+unit {
					ws.found = append(ws.found, int32(r*g.cols+c))
					ws.foundOff = append(ws.foundOff, int32(k-k0))
					ws.foundD = append(ws.foundD, d)
					ws.foundH = append(ws.foundH, ground[c])
				}
			}
		})
	}
	if !group {
		return
	}
	if cap(ws.radStart) < unit+1 {
		ws.radStart = make([]int32, unit+1)
	}
	start := ws.radStart[:unit+1]
	clear(start)
	for _, o := range ws.foundOff {
		start[o+1]++
	}
	for o := range unit {
		start[o+1] += start[o]
	}
	if cap(ws.byRadial) < len(ws.found) {
		ws.byRadial = make([]int32, len(ws.found))
		ws.byRadialD = make([]float64, len(ws.found))
		ws.byRadialH = make([]float32, len(ws.found))
	}
	ws.byRadial, ws.byRadialD, ws.byRadialH = ws.byRadial[:len(ws.found)], ws.byRadialD[:len(ws.found)], ws.byRadialH[:len(ws.found)]
	if cap(ws.fill) < unit {
		ws.fill = make([]int32, unit)
	}
	fill := append(ws.fill[:0], start[:unit]...)
	for i, o := range ws.foundOff {
		j := fill[o]
		ws.byRadial[j], ws.byRadialD[j], ws.byRadialH[j] = ws.found[i], ws.foundD[i], ws.foundH[i]
		fill[o]++
	}
}

// level returns the radial level that serves a cell dM metres from the
// site: the finest j whose radials have started there (dM ≥ R/2^(j+shift)),
// at most g.levels.
func (g *coverageGrid) level(dM float64) int {
	j := 0
	for j < g.levels && dM < g.thresholds[j] {
		j++
	}
	return j
}

// radialAtLevel returns the radial that answers the cell e metres east and
// n metres north of the site, dM metres away at level j (g.level): the
// nearest in azimuth among every 2^j-th radial.
func (g *coverageGrid) radialAtLevel(e, n, dM float64, j int) int {
	if dM == 0 {
		return 0
	}
	a := azimuthRad(e, n)
	if a < 0 {
		a += 2 * math.Pi
	}
	// The nearest radial of the level, rounding half up (a ≥ 0: the
	// conversion truncates, as floor would).
	k := int(a*g.perLevel[j]+0.5) << j
	if k >= g.radials {
		k -= g.radials
	}
	return k
}

// start returns the first sample a radial of level t computes, for
// samples every 1/invStep metres: the coarsest (t = g.levels) from the
// site, a finer one from a little short of R/2^(t+shift), where it
// branches off its parent.
func (g *coverageGrid) start(t int, invStep float64) int {
	if t >= g.levels {
		return 1
	}
	return max(int(g.radiusM/float64(int(1)<<(t+g.shift))*invStep)-2, 1)
}

// radialStep returns the distance in metres along azimuth aziRad (from
// north) between crossings of the DEM's rows or columns, whichever come
// first: min(Δnorth/|cos α|, Δeast/|sin α|) with the cell's sides at the
// site; never less than g.stepM (the smaller side).
func (g *coverageGrid) radialStep(aziRad float64) float64 {
	sin, cos := math.Sincos(aziRad)
	s := math.Inf(1)
	if c := math.Abs(cos); c > 1e-12 {
		s = g.cellN / c
	}
	if e := math.Abs(sin); e > 1e-12 {
		s = min(s, g.cellE/e)
	}
	return max(s, g.stepM)
}

// east returns the distance in metres east of the site of the centre of
// cell (r, c) (mid-latitude plane, as offset).
func (g *coverageGrid) east(r, c int) float64 {
	dLon := g.lon0 + float64(c)*g.dLon - g.siteLon
	if dLon > 180 {
		dLon -= 360
	} else if dLon < -180 {
		dLon += 360
	}
	return dLon * g.rowE[r]
}

// sectorRows calls fn(r, cLo, cHi) for the rows of the grid and, in each,
// the columns [cLo, cHi) that hold every cell centre at distances from dLo
// to dHi metres (dHi at most the radius) whose azimuth (radians clockwise
// from north, as azimuthRad; a1 < a2, a2 − a1 < π/2) lies between a1 and
// a2, with a cell of slack each side; the caller tests each cell. The
// annular sector is bounded by a convex polygon — two points on its rays
// at dLo (the chord between them passes inside the inner arc; the site
// itself when dLo is 0) and three on its rays and bisector at
// dHi/cos((a2 − a1)/4), so that its edges pass outside the outer arc — cut
// by each row's line. A wider wedge, or a grid that wraps the antimeridian
// near the site, gets the whole of every row within dHi.
func (g *coverageGrid) sectorRows(a1, a2, dLo, dHi float64, fn func(r, cLo, cHi int)) {
	r2 := dHi * dHi
	if !(a2-a1 < math.Pi/2) {
		for r := range g.rows {
			north := (g.rowLat[r] - g.siteLat) * g.rowN[r]
			if lo, hi := g.span(north, g.rowE[r], r2); lo < hi {
				fn(r, lo, hi)
			}
		}
		return
	}
	rr := dHi / math.Cos((a2-a1)/4)
	s1, c1 := math.Sincos(a1)
	sm, cm := math.Sincos((a1 + a2) / 2)
	s2, c2 := math.Sincos(a2)
	// The polygon, in order: inner a1, outer a1, outer bisector, outer a2,
	// inner a2 (the two inner points are the site when dLo is 0).
	pe := [5]float64{dLo * s1, rr * s1, rr * sm, rr * s2, dLo * s2}
	pn := [5]float64{dLo * c1, rr * c1, rr * cm, rr * c2, dLo * c2}
	nLo, nHi := math.Inf(1), math.Inf(-1)
	for i := range pn {
		nLo, nHi = min(nLo, pn[i]), max(nHi, pn[i])
	}
	mid := (g.siteLon - g.lon0) / g.dLon
	wraps := !(mid >= -1 && mid <= float64(g.cols))
	// Rows whose line may cross the polygon (two rows of slack).
	nM, _ := metresPerDegreeWGS84(g.siteLat)
	rFirst := max(int(math.Floor((g.lat0-g.siteLat-nHi/nM)/g.dLat))-2, 0)
	rLast := min(int(math.Ceil((g.lat0-g.siteLat-nLo/nM)/g.dLat))+2, g.rows-1)
	for r := rFirst; r <= rLast; r++ {
		y := (g.rowLat[r] - g.siteLat) * g.rowN[r]
		lo, hi := g.span(y, g.rowE[r], r2)
		if lo >= hi {
			continue
		}
		if !wraps {
			eLo, eHi := math.Inf(1), math.Inf(-1)
			for i := range pn {
				j := (i + 1) % len(pn)
				if (pn[i]-y)*(pn[j]-y) > 0 || pn[i] == pn[j] && pn[i] != y {
					continue
				}
				if pn[i] == pn[j] {
					eLo, eHi = min(eLo, pe[i], pe[j]), max(eHi, pe[i], pe[j])
					continue
				}
				e := pe[i] + (y-pn[i])*(pe[j]-pe[i])/(pn[j]-pn[i])
				eLo, eHi = min(eLo, e), max(eHi, e)
			}
			if eLo > eHi {
				continue
			}
			per := 1 / (g.rowE[r] * g.dLon) // columns per metre east
			lo = max(lo, int(math.Floor(mid+eLo*per))-1)
			hi = min(hi, int(math.Ceil(mid+eHi*per))+2)
			if lo >= hi {
				continue
			}
		}
		fn(r, lo, hi)
	}
}

// span returns the columns [lo, hi) of a row north metres north of the
// site (eScale metres per degree of longitude) that may lie within the
// radius (r2 its square): |e| ≤ √(r2 − north²), a cell wider each side for
// rounding; the distance test of each cell decides.
func (g *coverageGrid) span(north, eScale, r2 float64) (lo, hi int) {
	lo, hi = 0, g.cols
	if rem := r2 - north*north; rem < 0 {
		hi = 0
	} else if eScale > 0 {
		half := math.Sqrt(rem)/eScale/g.dLon + 1
		mid := (g.siteLon - g.lon0) / g.dLon
		if mid >= -1 && mid <= float64(g.cols) { // no wrap of the antimeridian between
			lo = max(int(math.Floor(mid-half)), 0)
			hi = min(int(math.Ceil(mid+half))+1, g.cols)
		}
	}
	return min(lo, hi), hi
}

// coverageWorker is one goroutine's storage, reused for every radial.
type coverageWorker struct {
	walker          *propagation.Radial
	snaps           []*propagation.Radial // walkTree: where each finer level branches off
	sp              *terrain.Sampler
	hgts            []float64 // the ground heights of the radial's samples
	count, order    []int32
	mOf             []int32   // samples before each cell of the radial
	horizon         []float32 // coverageLOS: running maxima of a unit's radials
	found, foundOff []int32   // unitCells: cells found, their radial in the unit
	foundD          []float64 // unitCells: their distances, m
	foundH          []float32 // unitCells: their ground, m
	byRadial        []int32   // unitCells: the unit's cells grouped by radial
	byRadialD       []float64 // with their distances
	byRadialH       []float32 // and ground heights
	radStart, fill  []int32   // unitCells: where each radial's cells start
}

// radialCells are the cells one radial answers: their indices in the map,
// distances from the site (m) and ground heights (m).
type radialCells struct {
	cells  []int32
	dist   []float64
	ground []float32
}

// walkTree answers the cells of radial k of level t and of the finer
// radials that branch off it: k + 2^c for every level c < t, each with
// its own branches. ws.walker holds radial k's state after the samples
// before g.start(t, ·) (the parent's, or none for a coarsest radial). Radial
// k + 2^c lies 2^c radial steps from k: where it starts, R/2^(c+2), that is
// at most a quarter of the radial spacing at the radius, as far as a cell
// lies from its own radial; so it takes k's samples up to there (a copy of
// k's state, ws.snaps[c]) and samples only the rest. About a sixth fewer
// samples than every radial at full length.
func (g *coverageGrid) walkTree(ws *coverageWorker, k, t int, cellsOf func(int) radialCells, req *CoverageRequest, values []float32, covered []int32, noData []bool) error {
	c, nd, err := g.walk(ws, k, t, cellsOf(k), req, values)
	if err != nil {
		return err
	}
	covered[k], noData[k] = int32(c), nd
	for c := 0; c < t; c++ {
		ws.walker.CopyFrom(ws.snaps[c])
		if err := g.walkTree(ws, k+1<<c, c, cellsOf, req, values, covered, noData); err != nil {
			return err
		}
	}
	return nil
}

// walk answers the cells (loss mode) of radial r, of level t, from ws.walker's state
// (the samples before g.start(t, ·)): it samples the rest of the radial, sorts
// its cells by the number of samples before them, and feeds the samples to
// the walker, answering each cell when its samples are in; on the way it
// keeps the state where each finer level c < t branches off in ws.snaps[c].
// It returns the cells covered and whether any sample had no elevation data.
func (g *coverageGrid) walk(ws *coverageWorker, r, t int, rc radialCells, req *CoverageRequest, values []float32) (covered int, noData bool, err error) {
	cells := rc.cells
	n := g.samples
	if cap(ws.hgts) < n {
		ws.hgts = make([]float64, n)
		ws.count = make([]int32, n+1)
	}
	s := g.start(t, 1/g.stepM)
	hgts := ws.hgts[:n-s] // samples s … n−1
	ws.sp.NoData = 0
	azi := 360 * float64(r) / float64(g.radials)
	patternDB := 0.0 // the site antenna's gain along this radial, relative
	if req.SitePattern != nil {
		patternDB = req.SitePattern(azi)
	}
	if err := ws.sp.RadialHeightsFrom(g.siteLat, g.siteLon, azi, float64(s)*g.stepM, g.stepM, hgts); err != nil {
		return 0, false, err
	}
	// Counting sort of the cells by m, the samples 1..m strictly more than
	// half a step short of the cell: the receiver's last intermediate point
	// then lies ½ to 1½ steps before it, a step on average, as in a
	// profile sampled at the same step.
	count := ws.count[:n+1]
	clear(count)
	if cap(ws.order) < len(cells) {
		ws.order = make([]int32, len(cells))
		ws.mOf = make([]int32, len(cells))
	}
	order, mOf := ws.order[:len(cells)], ws.mOf[:len(cells)]
	invStep := 1 / g.stepM
	for i, d := range rc.dist {
		m := min(max(int(math.Ceil(d*invStep-0.5))-1, s-1), n-2)
		mOf[i] = int32(m)
		count[m+1]++
	}
	for i := 1; i <= n; i++ {
		count[i] += count[i-1]
	}
	for i, m := range mOf {
		order[count[m]] = int32(i)
		count[m]++
	}
	// count[m] is now the end of bucket m. The loop runs until every cell
	// is answered and every branch's state kept.
	var branch [losMaxLevels]int // sample where level c branches off
	last := s - 1
	for c := range t {
		branch[c] = g.start(c, 1/g.stepM)
		last = max(last, branch[c]-1)
	}
	w := ws.walker
	next := 0
	for m := s - 1; m < n-1 && (next < len(order) || m <= last); m++ {
		for ; next < len(order) && next < int(count[m]); next++ {
			cell := cells[order[next]]
			dM := rc.dist[order[next]]
			hc := float64(rc.ground[order[next]])
			dKM := math.Max(dM, 1) / 1000 // a cell at the site counts as 1 m away
			val, ok := coverageValue(w.Loss(dKM, hc), req, patternDB)
			values[cell] = float32(val)
			if ok {
				covered++
			}
		}
		if m <= last {
			for c := range t {
				if branch[c] == m+1 {
					ws.snaps[c].CopyFrom(w)
				}
			}
		}
		w.Add(float64(m+1)*g.stepM/1000, hgts[m+1-s])
	}
	return covered, ws.sp.NoData > 0, nil
}

// coverageValue turns a cell's loss into the requested value, and says
// whether the cell is covered; patternDB is the site antenna's gain toward
// the cell relative to the Budgets' (CoverageRequest.SitePattern).
func coverageValue(l propagation.RadialLoss, req *CoverageRequest, patternDB float64) (float64, bool) {
	if len(req.Budgets) == 0 {
		return l.PathLossDB, l.LineOfSight
	}
	rx, margin := math.Inf(1), math.Inf(1)
	for _, b := range req.Budgets {
		p := b.EIRPDBm + patternDB - l.PathLossDB + b.RxNetGainDB
		rx = math.Min(rx, p)
		margin = math.Min(margin, p-b.RxSensitivityDBm)
	}
	ok := margin >= req.NeededMarginDB
	switch req.Value {
	case ValueReceived:
		return rx, ok
	case ValueMargin:
		return margin, ok
	}
	return l.PathLossDB, ok
}

// normLonDeg brings a longitude in degrees into [−180, 180).
func normLonDeg(lon float64) float64 {
	if lon >= 180 {
		return lon - 360
	}
	if lon < -180 {
		return lon + 360
	}
	return lon
}

// coverageParallel is the worker pool of runParallel (parallelWith) with
// the coverage engine's own storage in each goroutine.
func coverageParallel(ctx context.Context, n int, progress func(done, total int), fn func(ws *coverageWorker, i int) error) error {
	return parallelWith(ctx, n, progress, fn)
}
