package plan

import (
	"context"
	"fmt"
	"strings"

	"github.com/mastlink/mastlink/plan/gpx"
)

// HandheldName names the plan's default kit (`defaults:`) when it is
// carried along a route.
const HandheldName = "handheld"

// StationNamed returns the plan's station called name (ignoring case and
// surrounding space); an empty name gives the first station.
func (p *Plan) StationNamed(name string) (Station, error) {
	if len(p.Stations) == 0 {
		return Station{}, fmt.Errorf("the plan has no stations")
	}
	if strings.TrimSpace(name) == "" {
		return p.Stations[0], nil
	}
	want := strings.ToLower(strings.TrimSpace(name))
	names := make([]string, len(p.Stations))
	for i, s := range p.Stations {
		if strings.ToLower(s.Name) == want {
			return s, nil
		}
		names[i] = fmt.Sprintf("%q", s.Name)
	}
	return Station{}, fmt.Errorf("the plan has no station %q (stations: %s)", name, strings.Join(names, ", "))
}

// Walker returns the kit carried along the plan's routes: the station
// called name; or, when name is empty, the plan's defaults named
// HandheldName when they give a radio, else the first station's kit.
func (p *Plan) Walker(name string) (End, error) {
	if strings.TrimSpace(name) == "" && p.Defaults.Radio.PowerW > 0 && p.Defaults.Radio.SensitivityDBm != 0 {
		w := p.Defaults
		w.Name = HandheldName
		return w, nil
	}
	s, err := p.StationNamed(name)
	if err != nil {
		return End{}, err
	}
	return s.End, nil
}

// ReachTargets returns what a route walker or a candidate site must reach:
// the plan's targets, then its stations other than the one called exclude
// as required simplex targets on the plan's frequency (left out when the
// plan gives none).
func (p *Plan) ReachTargets(exclude string) []Target {
	out := append([]Target(nil), p.Targets...)
	if p.FreqMHz <= 0 {
		return out
	}
	for _, s := range p.Stations {
		if strings.EqualFold(strings.TrimSpace(s.Name), strings.TrimSpace(exclude)) {
			continue
		}
		out = append(out, stationTarget(p, s))
	}
	return out
}

// EvaluatePlanRoutes checks every track and route of every file under the
// plan's `routes:` with Env.Route: the plan's defaults carried along (see
// Walker), the plan's targets and stations to reach (see ReachTargets),
// the plan's requirement, the default spacing.
func EvaluatePlanRoutes(ctx context.Context, p *Plan, env *Env, progress Progress) ([]RouteResult, error) {
	if len(p.Routes) == 0 {
		return nil, nil
	}
	walker, err := p.Walker("")
	if err != nil {
		return nil, fmt.Errorf("routes: %w", err)
	}
	targets := p.ReachTargets(walker.Name)
	var out []RouteResult
	for _, file := range p.Routes {
		g, err := gpx.Read(file)
		if err != nil {
			return nil, fmt.Errorf("routes: %w", err)
		}
		if len(g.Tracks) == 0 {
			return nil, fmt.Errorf("routes: %s has no track or route", file)
		}
		for _, tr := range g.Tracks {
			r, err := env.Route(ctx, RouteRequest{Track: tr, Walker: walker, Targets: targets, NeededMarginDB: p.Require.NeededMarginDB()}, progress)
			if err != nil {
				return nil, fmt.Errorf("routes: %s: %w", file, err)
			}
			r.DefaultMargin = p.Require.Default
			out = append(out, *r)
		}
	}
	return out, nil
}

// EvaluatePlanSites ranks the waypoints of every file under the plan's
// `sites:` with Env.RankSites: the first station's kit set up at each, the
// plan's targets and other stations to reach, the plan's requirement and
// mast sweep. It returns nil when the plan lists no sites.
func EvaluatePlanSites(ctx context.Context, p *Plan, env *Env, progress Progress) (*SitesResult, error) {
	if len(p.Sites) == 0 {
		return nil, nil
	}
	st, err := p.StationNamed("")
	if err != nil {
		return nil, fmt.Errorf("sites: %w", err)
	}
	var cands []gpx.Place
	for _, file := range p.Sites {
		g, err := gpx.Read(file)
		if err != nil {
			return nil, fmt.Errorf("sites: %w", err)
		}
		if len(g.Waypoints) == 0 {
			return nil, fmt.Errorf("sites: %s has no waypoints: give one waypoint per candidate site", file)
		}
		cands = append(cands, g.Waypoints...)
	}
	r, err := env.RankSites(ctx, SitesRequest{Candidates: cands, Station: st.End, Targets: p.ReachTargets(st.Name), NeededMarginDB: p.Require.NeededMarginDB(), Mast: p.Mast}, progress)
	if err != nil {
		return nil, fmt.Errorf("sites: %w", err)
	}
	r.DefaultMargin = p.Require.Default
	return r, nil
}
