package plan

import (
	"context"
	"errors"
	"fmt"
	"math"
	"sort"
	"time"

	"github.com/mastlink/mastlink/plan/gpx"
	"github.com/mastlink/mastlink/propagation"
	"github.com/paulmach/orb"
)

// Route defaults.
const (
	// DefaultRouteSpacingM is the distance in metres between the points at
	// which a route is checked: about a minute's walk, and finer than the
	// 90 m of 3″ elevation data, so no ridge shadow is stepped over.
	DefaultRouteSpacingM = 50
	// DefaultSpotWindowM is how far in metres before and after a dead
	// stretch the best spots to call from are looked for: about a quarter
	// of an hour's walk.
	DefaultSpotWindowM = 1000
	// MaxRoutePoints bounds the number of points a route is checked at
	// (length / spacing), so a tiny spacing is refused instead of taking
	// hours.
	MaxRoutePoints = 5_000_000
	// minPathM is the shortest path evaluated over terrain: ends closer
	// than 1 m are taken as 1 m apart in free space (the link works).
	minPathM = 1
)

// ErrNoTargets is wrapped when a route or a site ranking has nothing to
// reach, or every target is optional.
var ErrNoTargets = errors.New("no required targets")

// RouteRequest is what Env.Route checks: a track walked with a radio, and
// the targets to reach from every point of it.
type RouteRequest struct {
	Track  gpx.Track // a GPX track or route; its points in order
	Walker End       // the kit carried along the track (Pos is ignored)
	// Targets are reached in both directions from every point: talk-in
	// and talk-out for repeaters, out and back for simplex targets.
	Targets        []Target
	NeededMarginDB float64 // margin every required direction must meet, dB
	SpacingM       float64 // metres between checked points; 0 means DefaultRouteSpacingM
	SpotWindowM    float64 // metres before and after a gap searched for spots; 0 means DefaultSpotWindowM
}

// LatLon is a position in decimal degrees on WGS84.
type LatLon struct {
	Lat float64 `json:"lat"`
	Lon float64 `json:"lon"`
}

// RoutePoint is one checked point of a route.
type RoutePoint struct {
	DistanceM     float64   `json:"distance_m"`      // along the track from its start
	Lat           float64   `json:"lat"`             // degrees
	Lon           float64   `json:"lon"`             // degrees
	ElevationM    float64   `json:"elevation_m"`     // ground from the elevation data, metres above sea level (0 without data)
	WorstMarginDB float64   `json:"worst_margin_db"` // lowest margin over the required targets, both directions
	Covered       bool      `json:"covered"`         // every required direction meets the needed margin
	MarginsDB     []float64 `json:"margins_db"`      // per target (order of targets[]), the lower of its two directions
}

// RouteGap is a stretch of the track where coverage is lost. Its ends lie
// half way between the last point with coverage and the first without (and
// back), so gaps and covered stretches add up to the length of the track.
type RouteGap struct {
	StartM        float64  `json:"start_m"`  // along the track
	EndM          float64  `json:"end_m"`    // along the track
	LengthM       float64  `json:"length_m"` // EndM − StartM
	Start         LatLon   `json:"start"`
	End           LatLon   `json:"end"`
	WorstMarginDB float64  `json:"worst_margin_db"`   // lowest margin at the points inside
	Missing       []string `json:"missing,omitempty"` // required targets out of reach somewhere in the gap
	first, end    int      // the points inside: Points[first:end]
}

// RouteTarget is the coverage of one target along a route.
type RouteTarget struct {
	Name          string     `json:"name"`
	Optional      bool       `json:"optional,omitempty"` // not part of overall_fraction
	Directions    []string   `json:"directions"`         // e.g. talk-in, talk-out
	Fraction      float64    `json:"fraction"`           // of the length where both directions meet the margin
	CoveredM      float64    `json:"covered_m"`
	BestMarginDB  float64    `json:"best_margin_db"`  // highest margin (lower of both directions) along the track
	BestDistanceM float64    `json:"best_distance_m"` // where it is
	Gaps          []RouteGap `json:"gaps"`
}

// BestSpot is a point near a gap in one target's coverage where that target
// is reached with the most margin: the place to stop and call before the
// dead stretch, or the first good place after it.
type BestSpot struct {
	Target     string  `json:"target"`
	Side       string  `json:"side"`        // "before" or "after" the gap
	GapStartM  float64 `json:"gap_start_m"` // the gap it belongs to
	GapEndM    float64 `json:"gap_end_m"`
	DistanceM  float64 `json:"distance_m"` // along the track
	Lat        float64 `json:"lat"`
	Lon        float64 `json:"lon"`
	ElevationM float64 `json:"elevation_m"`
	MarginDB   float64 `json:"margin_db"` // to the target, lower of both directions
}

// RouteResult is the coverage along a route.
type RouteResult struct {
	Name            string        `json:"name"`   // the track's name
	Walker          string        `json:"walker"` // the kit carried
	SpacingM        float64       `json:"spacing_m"`
	NeededMarginDB  float64       `json:"needed_margin_db"`
	DefaultMargin   bool          `json:"default_margin"`    // nothing was asked: plan.DefaultMarginDB
	WhatIf          []string      `json:"what_if,omitempty"` // options that replaced the plan's figures, as given ("--power 10W")
	LengthM         float64       `json:"length_m"`
	OverallFraction float64       `json:"overall_fraction"` // of the length where every required direction meets the margin
	CoveredM        float64       `json:"covered_m"`
	Targets         []RouteTarget `json:"targets"`
	Gaps            []RouteGap    `json:"gaps"` // where some required target is out of reach
	BestSpots       []BestSpot    `json:"best_spots"`
	Points          []RoutePoint  `json:"points"`
	Paths           int           `json:"paths"`   // terrain profiles extracted
	Terrain         string        `json:"terrain"` // "terrain" or "smooth earth" (no elevation data on any path)
	// Warnings are what the figures should be read with: a frequency
	// outside the model's band or a cable's fitted range, a 75 Ω cable
	// (see Env.FrequencyWarnings), the model's warnings (Longley–Rice ITM)
	// with the number of paths; commands add missing elevation data.
	Warnings []string   `json:"warnings"`
	line     *trackLine // for positions between points
}

// PositionAt returns the position in degrees and the time (UTC; zero when
// the track has none) at distM metres along the route's track, following
// the geodesics between its points.
func (r *RouteResult) PositionAt(distM float64) (lat, lon float64, t time.Time) {
	if r.line == nil {
		return math.NaN(), math.NaN(), time.Time{}
	}
	return r.line.at(distM)
}

// Route checks a track walked with the request's kit: it resamples the
// track every SpacingM metres along the WGS84 geodesics between its points
// (and at its end), and at every point evaluates each target in both
// directions over the terrain profile between them (Env.Evaluate's budget
// and model; one profile per point and target, reused for both
// directions). A point is covered for a target when both directions meet
// NeededMarginDB, and covered overall when every required target is.
//
// Each point stands for the track half way to its neighbours, so the
// fractions are shares of the length. Gaps are maximal runs of uncovered
// points, their ends half way to the covered neighbours: a gap edge is
// therefore within half a spacing of where coverage really changes. For
// each gap in each target's coverage, the best spots are the points within
// SpotWindowM before and after it with the highest margin to that target.
//
// The points are evaluated in parallel on all cores (see runParallel); the
// result does not depend on their number. Memory grows with the number of
// points (a small summary each), never with the profiles. progress counts
// paths (points × targets).
func (e *Env) Route(ctx context.Context, req RouteRequest, progress Progress) (*RouteResult, error) {
	spacing := req.SpacingM
	if spacing == 0 {
		spacing = DefaultRouteSpacingM
	}
	if !(spacing > 0) || math.IsInf(spacing, 0) {
		return nil, fmt.Errorf("route spacing %g m: give a spacing above 0 m", req.SpacingM)
	}
	window := req.SpotWindowM
	if window == 0 {
		window = DefaultSpotWindowM
	}
	if !(window >= 0) {
		return nil, fmt.Errorf("spot window %g m: give a distance of 0 m or more", req.SpotWindowM)
	}
	legs, err := prepareLegs(req.Walker, req.Targets)
	if err != nil {
		return nil, err
	}
	line, err := newTrackLine(req.Track)
	if err != nil {
		return nil, err
	}
	length := line.lengthM()
	if math.Ceil(length/spacing) > MaxRoutePoints {
		return nil, fmt.Errorf("a %.0f m track at a %g m spacing needs more than %d points: use a longer spacing", length, spacing, MaxRoutePoints)
	}
	n := sampleCount(length, spacing)
	nt := len(legs)
	if n*nt > MaxRoutePoints {
		return nil, fmt.Errorf("a %.0f m track at a %g m spacing with %d targets needs %d paths (limit %d): use a longer spacing", length, spacing, nt, n*nt, MaxRoutePoints)
	}
	res := &RouteResult{
		Name: req.Track.Name, Walker: req.Walker.Name, SpacingM: spacing, NeededMarginDB: req.NeededMarginDB,
		LengthM: length, Points: make([]RoutePoint, n), Paths: n * nt, line: line,
		Warnings: e.legWarnings(req.Walker, req.Targets),
	}
	margins := make([]float64, n*nt)
	for k := range res.Points {
		d := sampleDistanceM(k, n, length, spacing)
		lat, lon, _ := line.at(d)
		res.Points[k] = RoutePoint{DistanceM: d, Lat: lat, Lon: lon, MarginsDB: margins[k*nt : (k+1)*nt : (k+1)*nt]}
	}
	// One job per point and target, target by target: consecutive jobs
	// then follow nearly the same path, so the tile rows they read stay in
	// the processor's cache.
	smooth := make([]bool, n*nt)
	warns := make([]propagation.ITMWarnings, n*nt)
	err = runParallel(ctx, n*nt, progress, func(g *Geometry, job int) error {
		t, i := job/n, job%n
		p := &res.Points[i]
		var buf [2]float64
		m, err := e.nearMargins(g, orb.Point{p.Lon, p.Lat}, &legs[t], req.Walker.Antenna.HeightM, buf[:])
		if err != nil {
			return fmt.Errorf("route point at %.0f m: %w", p.DistanceM, err)
		}
		if t == 0 {
			p.ElevationM = g.Profile.ElevM[0]
		}
		smooth[job] = g.Source == "smooth earth"
		warns[job] = g.modelWarn
		p.MarginsDB[t] = m
		return nil
	})
	if err != nil {
		return nil, err
	}
	res.Warnings = appendNew(res.Warnings, itmWarningLines(warns)...)
	res.Terrain = "smooth earth"
	for _, s := range smooth {
		if !s {
			res.Terrain = "terrain"
			break
		}
	}
	for i := range res.Points {
		p := &res.Points[i]
		p.WorstMarginDB = math.Inf(1)
		for t, m := range p.MarginsDB {
			if !legs[t].target.Optional {
				p.WorstMarginDB = math.Min(p.WorstMarginDB, m)
			}
		}
		p.Covered = p.WorstMarginDB >= req.NeededMarginDB
	}
	res.summarise(legs, window)
	return res, nil
}

// prepareLegs checks the targets and prepares the legs from near to each.
func prepareLegs(near End, targets []Target) ([]targetLegs, error) {
	if len(targets) == 0 {
		return nil, fmt.Errorf("%w: give targets to reach (a plan's targets, or a GPX file of them)", ErrNoTargets)
	}
	required := 0
	legs := make([]targetLegs, len(targets))
	for i, t := range targets {
		if !t.Optional {
			required++
		}
		tl, err := newTargetLegs(near, t)
		if err != nil {
			return nil, err
		}
		legs[i] = tl
	}
	if required == 0 {
		return nil, fmt.Errorf("%w: every target is optional; mark at least one as required", ErrNoTargets)
	}
	if near.Radio.PowerW <= 0 || near.Radio.SensitivityDBm == 0 {
		return nil, fmt.Errorf("%s: the radio needs a power and a sensitivity", near.Name)
	}
	return legs, nil
}

// nearMargins measures the profile from pos to the target of tl into g and
// returns the margins of its legs (into out) and the smallest, with the
// near antenna nearHeightM above the ground.
func (e *Env) nearMargins(g *Geometry, pos orb.Point, tl *targetLegs, nearHeightM float64, out []float64) (float64, error) {
	if err := e.Measure(pos, tl.target.Pos, g); err != nil {
		return 0, fmt.Errorf("%s: %w", tl.target.Name, err)
	}
	var loss [2]float64
	if err := e.lossesAt(g, tl, nearHeightM, &loss); err != nil {
		return 0, err
	}
	tw, err := e.towardFor(g, tl, nearHeightM)
	if err != nil {
		return 0, err
	}
	return tl.margins(&loss, tw, out), nil
}

// lossesAt is pathLosses, except that ends closer than minPathM are taken
// as minPathM apart in free space (ITU-R P.525-4 eq. 5).
func (e *Env) lossesAt(g *Geometry, tl *targetLegs, nearHeightM float64, loss *[2]float64) error {
	if g.Profile.DistanceM < minPathM {
		for i, f := range tl.freqsMHz {
			loss[i] = propagation.FreeSpaceLossDB(minPathM/1000.0, f)
		}
		return nil
	}
	return e.pathLosses(g, tl, nearHeightM, loss)
}

// coverage returns the length in metres outside gaps and its share of
// the whole. Each point stands for the track half way to its neighbours,
// so this is the summed length of the covered points.
func (r *RouteResult) coverage(gaps []RouteGap) (coveredM, fraction float64) {
	out := 0.0
	for _, g := range gaps {
		out += g.LengthM
	}
	coveredM = r.LengthM - out
	return coveredM, coveredM / r.LengthM
}

// summarise works out fractions, gaps and best spots from the points.
func (r *RouteResult) summarise(legs []targetLegs, window float64) {
	pts := r.Points
	n := len(pts)
	edge := func(k int) float64 { // the boundary between points k−1 and k
		if k <= 0 {
			return 0
		}
		if k >= n {
			return r.LengthM
		}
		return (pts[k-1].DistanceM + pts[k].DistanceM) / 2
	}
	gapsOf := func(covered func(k int) bool, margin func(k int) float64) []RouteGap {
		gaps := []RouteGap{}
		for k := 0; k < n; {
			if covered(k) {
				k++
				continue
			}
			j := k
			worst := math.Inf(1)
			for j < n && !covered(j) {
				worst = math.Min(worst, margin(j))
				j++
			}
			g := RouteGap{StartM: edge(k), EndM: edge(j), WorstMarginDB: worst, first: k, end: j}
			g.LengthM = g.EndM - g.StartM
			g.Start.Lat, g.Start.Lon, _ = r.line.at(g.StartM)
			g.End.Lat, g.End.Lon, _ = r.line.at(g.EndM)
			gaps = append(gaps, g)
			k = j
		}
		return gaps
	}
	need := r.NeededMarginDB
	r.Targets = make([]RouteTarget, len(legs))
	r.BestSpots = []BestSpot{}
	for t := range legs {
		tl := &legs[t]
		rt := RouteTarget{Name: tl.target.Name, Optional: tl.target.Optional, BestMarginDB: math.Inf(-1)}
		for _, l := range tl.legs {
			rt.Directions = append(rt.Directions, l.name)
		}
		ok := func(k int) bool { return pts[k].MarginsDB[t] >= need }
		m := func(k int) float64 { return pts[k].MarginsDB[t] }
		for k := range pts {
			if m(k) > rt.BestMarginDB {
				rt.BestMarginDB, rt.BestDistanceM = m(k), pts[k].DistanceM
			}
		}
		rt.Gaps = gapsOf(ok, m)
		rt.CoveredM, rt.Fraction = r.coverage(rt.Gaps)
		for _, g := range rt.Gaps {
			for _, side := range []string{"before", "after"} {
				// Points g.first−1, g.first−2, … before; g.end, g.end+1, … after.
				from, step, limit := g.first-1, -1, g.StartM-window
				if side == "after" {
					from, step, limit = g.end, 1, g.EndM+window
				}
				best := -1
				for k := from; k >= 0 && k < n; k += step {
					if d := pts[k].DistanceM; (step < 0 && d < limit) || (step > 0 && d > limit) {
						break
					}
					if ok(k) && (best < 0 || m(k) > m(best)) {
						best = k
					}
				}
				if best < 0 {
					continue
				}
				p := pts[best]
				r.BestSpots = append(r.BestSpots, BestSpot{Target: rt.Name, Side: side, GapStartM: g.StartM, GapEndM: g.EndM,
					DistanceM: p.DistanceM, Lat: p.Lat, Lon: p.Lon, ElevationM: p.ElevationM, MarginDB: m(best)})
			}
		}
		r.Targets[t] = rt
	}
	r.Gaps = gapsOf(func(k int) bool { return pts[k].Covered }, func(k int) float64 { return pts[k].WorstMarginDB })
	r.CoveredM, r.OverallFraction = r.coverage(r.Gaps)
	for i := range r.Gaps {
		g := &r.Gaps[i]
		for t := range legs {
			if legs[t].target.Optional {
				continue
			}
			for k := g.first; k < g.end; k++ {
				if pts[k].MarginsDB[t] < need {
					g.Missing = append(g.Missing, legs[t].target.Name)
					break
				}
			}
		}
	}
}

// Piece returns the track between fromM and toM metres along it: the
// positions at both distances and the track's own points between them, so
// a map shows the walked line rather than the checked points. Distances
// are clamped to the track; fromM > toM gives an empty line.
func (r *RouteResult) Piece(fromM, toM float64) orb.LineString {
	if r.line == nil || fromM > toM {
		return nil
	}
	t := r.line
	lat, lon, _ := t.at(fromM)
	out := orb.LineString{{lon, lat}}
	for i := sort.SearchFloat64s(t.cumM, fromM); i < len(t.cumM) && t.cumM[i] < toM; i++ {
		if t.cumM[i] > fromM {
			out = append(out, t.points[i].Pos)
		}
	}
	lat, lon, _ = t.at(toM)
	return append(out, orb.Point{lon, lat})
}
