package plan

// The coverage map by one profile per cell: the fallback for models the
// radial engine does not walk (Longley–Rice ITM, free space).

import (
	"context"
	"fmt"
	"math"

	"github.com/mastlink/mastlink/propagation"
	"github.com/paulmach/orb"
)

// CoverageByCell reports whether a loss map with model m is computed one
// profile per cell (Env.CoverageCells) rather than by the radial engine
// (CoverageMap), which walks ITU-R P.526-16 delta-Bullington only. A nil
// model is delta-Bullington.
func CoverageByCell(m propagation.Model) bool {
	if m == nil {
		return false
	}
	_, terrain := m.(propagation.Terrain)
	return !terrain
}

// CoverageCells computes the same map as CoverageMap (the same grid, cell
// centres, nodata outside the radius, values, covered count and bounds) by
// one terrain profile per cell: for every cell whose centre lies within
// req.RadiusM of the site, the profile along the WGS84 geodesic (Karney)
// from the site to the cell's centre is measured at the Env's step
// (Env.Measure) and the Env's model gives the path loss (Env.PathLoss: for
// the Longley–Rice ITM 1.2.2 point-to-point mode with its settings, for
// propagation.Terrain ITU-R P.526-16 §4.5 delta-Bullington plus free space
// ITU-R P.525-4). The site antenna is req.SiteHeightM and the antenna in
// every cell req.TargetHeightM above ground, in metres; req.K,
// req.Polarization and req.Ground replace the Env's. A cell whose centre is
// within SamePlaceM of the site is measured 1 m north of the site, as the
// radial engine takes it 1 m away. A covered cell of a map without a
// budget is a line-of-sight cell, as in CoverageMap.
//
// Cost: one profile and one model call per cell, so tens of times the
// radial engine's time (see DEVELOPERS.md); the grid limit is CoverageMap's.
// Line-of-sight maps (CoverageLOS) do not depend on the model and are
// passed to CoverageMap. The model's warnings (Longley–Rice ITM) are
// counted over the cells into the result's Warnings ("… (n of m paths)").
// Rows are shared among all cores (results by index: the same bytes
// whatever the core count); progress counts rows. Errors as CoverageMap's,
// and the model's first error (lowest row).
func (e *Env) CoverageCells(ctx context.Context, req CoverageRequest, progress Progress) (*CoverageResult, error) {
	ts := e.terrainSet()
	if req.Mode == CoverageLOS {
		return CoverageMap(ctx, ts, req, progress)
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
	if req.Value != ValuePathLoss && len(req.Budgets) == 0 {
		return nil, fmt.Errorf("%w: received level and margin need the kit (power, gains, feedlines, sensitivity)", ErrCoverage)
	}
	if !(req.FreqMHz > 0) {
		return nil, fmt.Errorf("%w: no frequency given", ErrCoverage)
	}
	env := *e
	env.K, env.Polarization, env.Ground = req.K, req.Polarization, req.Ground

	res := &CoverageResult{}
	g, err := coverageGeometry(ts, lat, lon, req, res)
	if err != nil {
		return nil, err
	}
	h0, err := ts.NewSampler().Height(lat, lon)
	if err != nil {
		return nil, err
	}
	res.SiteGroundM = h0
	res.Radials, res.StepM = 0, 0 // no radials walked
	res.Values = make([]float32, g.rows*g.cols)
	warns := make([]propagation.ITMWarnings, g.rows*g.cols)
	in := make([]bool, g.rows*g.cols)
	covered := make([]int32, g.rows)
	noData := make([]bool, g.rows)
	northM, _ := metresPerDegreeWGS84(lat)
	site := orb.Point{lon, lat}
	err = runParallel(ctx, g.rows, progress, func(geo *Geometry, r int) error {
		for c := range g.cols {
			i := r*g.cols + c
			d := g.distance(r, c)
			if d > g.radiusM {
				res.Values[i] = CoverageNoData
				continue
			}
			in[i] = true
			to := orb.Point{normLonDeg(g.lon0 + float64(c)*g.dLon), g.rowLat[r]}
			if d < SamePlaceM {
				to = orb.Point{lon, lat + 1/northM}
			}
			if err := env.Measure(site, to, geo); err != nil {
				return err
			}
			noData[r] = noData[r] || geo.Profile.NoData > 0
			l, err := env.PathLoss(geo, req.SiteHeightM, req.TargetHeightM, req.FreqMHz)
			if err != nil {
				return fmt.Errorf("cell %.5f,%.5f: %w", to.Lat(), to.Lon(), err)
			}
			warns[i] = geo.modelWarn
			patternDB := 0.0
			if req.SitePattern != nil {
				patternDB = req.SitePattern(geo.Profile.AzimuthDeg)
			}
			v, ok := coverageValue(propagation.RadialLoss{PathLossDB: l.PathLossDB, LineOfSight: l.LineOfSight}, &req, patternDB)
			res.Values[i] = float32(v)
			if ok {
				covered[r]++
			}
		}
		return nil
	})
	if err != nil {
		return nil, err
	}
	cellWarns := warns[:0]
	for i, ok := range in {
		if ok {
			res.Cells++
			cellWarns = append(cellWarns, warns[i])
		}
	}
	for r := range g.rows {
		res.Covered += int(covered[r])
		res.SmoothEarth = res.SmoothEarth || noData[r]
	}
	res = finishCoverage(ts, res)
	res.Warnings = append(res.Warnings, itmWarningLines(cellWarns)...)
	return res, nil
}
