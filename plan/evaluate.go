package plan

import (
	"context"
	"fmt"
	"sort"

	"github.com/mastlink/mastlink/plan/exposure"
	"github.com/mastlink/mastlink/terrain"
)

// StationSummary is a station as the plan result lists it.
type StationSummary struct {
	Name           string  `json:"name"`
	Lat            float64 `json:"lat"`
	Lon            float64 `json:"lon"`
	GroundM        float64 `json:"ground_m"`
	PowerW         float64 `json:"power_w"`
	GainDBi        float64 `json:"gain_dbi"`
	HeightM        float64 `json:"height_m"`
	Cable          string  `json:"cable"`
	CableLengthM   float64 `json:"cable_length_m"`
	SensitivityDBm float64 `json:"sensitivity_dbm"`
	Reached        int     `json:"reached"` // required targets reached in every direction
	Of             int     `json:"of"`      // required targets
}

// StationExposure is a station's RF-exposure evaluation at the frequency
// where its keep-out is largest, for one configuration of its mast and
// cable: the station as planned, or the mast sweep's recommendation.
type StationExposure struct {
	Station string  `json:"station"`
	Lat     float64 `json:"lat"`
	Lon     float64 `json:"lon"`
	// Configuration is ConfigPlanned or ConfigRecommended.
	Configuration string `json:"configuration"`
	// Cable and CableLengthM are the feedline of this configuration.
	Cable        string  `json:"cable"`
	CableLengthM float64 `json:"cable_length_m"`
	exposure.Report
}

// The configurations of StationExposure.
const (
	ConfigPlanned     = "planned"     // the station's own antenna height and feedline
	ConfigRecommended = "recommended" // the mast sweep's recommended height and cable
)

// PlanResult is the outcome of a whole plan.
type PlanResult struct {
	Name             string            `json:"name"`
	NeededMarginDB   float64           `json:"needed_margin_db"`
	DefaultMargin    bool              `json:"default_margin"` // the plan asks for nothing: plan.DefaultMarginDB
	Stations         []StationSummary  `json:"stations"`
	Links            []LinkResult      `json:"links"`
	Exposure         []StationExposure `json:"exposure"`
	Mast             *MastResult       `json:"mast,omitempty"`   // the first station's sweep
	Masts            []*MastResult     `json:"masts,omitempty"`  // every station's sweep, when the plan has more than one station
	Routes           []RouteResult     `json:"routes,omitempty"` // see EvaluatePlanRoutes
	Sites            *SitesResult      `json:"sites,omitempty"`  // see EvaluatePlanSites
	Warnings         []string          `json:"warnings"`
	MeetsRequirement bool              `json:"meets_requirement"` // every required link of every station
	Cautions         []string          `json:"cautions"`          // exposure.Cautions: RF exposure and masts
}

// Progress is told how far a long evaluation has come: done of total units.
// It is called from one goroutine at a time.
type Progress func(done, total int)

// NewEnv returns the link environment a plan asks for over the given
// terrain (nil for a smooth earth). With a model that gives its own
// variability (Requirement.ByModel) there is no σ-based probability.
func (p *Plan) NewEnv(ts *terrain.Set) *Env {
	sigma := p.Require.SigmaDB
	if p.Require.ByModel {
		sigma = 0
	}
	return &Env{Terrain: ts, Model: p.Model, K: p.K, Polarization: p.Polarization, Ground: p.Ground, SigmaDB: sigma}
}

// EvaluatePlan evaluates every station against every target in both
// directions, every pair of stations in both directions (simplex on the
// plan's frequency), every station's RF exposure, and, when the plan asks
// for one, every station's mast sweep against the plan's targets and the
// other stations. Profiles are extracted once per station–target pair.
func EvaluatePlan(ctx context.Context, p *Plan, env *Env, progress Progress) (*PlanResult, error) {
	res := &PlanResult{Name: p.Name, NeededMarginDB: p.Require.NeededMarginDB(), DefaultMargin: p.Require.Default, MeetsRequirement: true,
		Warnings: []string{}, Links: []LinkResult{}, Exposure: []StationExposure{}, Cautions: exposure.Cautions()}
	need := res.NeededMarginDB
	ns, nt := len(p.Stations), len(p.Targets)
	if ns > 1 && !(p.FreqMHz > 0) {
		return nil, fmt.Errorf("the plan has %d stations but no frequency: the stations are checked against each other on it", ns)
	}
	total := ns*nt + ns*(ns-1)/2
	done := 0
	step := func() {
		done++
		if progress != nil {
			progress(done, total)
		}
	}
	sums := make([]StationSummary, ns)
	count := func(sum *StationSummary, links []LinkResult, optional bool) {
		ok := true
		for _, l := range links {
			ok = ok && *l.MeetsRequirement
		}
		if optional {
			return
		}
		sum.Of++
		if ok {
			sum.Reached++
		} else {
			res.MeetsRequirement = false
		}
	}
	geoms := make([][]*Geometry, ns)
	for si, st := range p.Stations {
		sums[si] = StationSummary{Name: st.Name, Lat: st.Pos.Lat(), Lon: st.Pos.Lon(), PowerW: st.Radio.PowerW, GainDBi: st.Antenna.GainDBi,
			HeightM: st.Antenna.HeightM, Cable: st.Feedline.Cable.Name, CableLengthM: st.Feedline.LengthM, SensitivityDBm: st.Radio.SensitivityDBm}
		geoms[si] = make([]*Geometry, nt)
		for ti, tg := range p.Targets {
			if err := ctx.Err(); err != nil {
				return nil, err
			}
			g := &Geometry{}
			if err := env.Measure(st.Pos, tg.Pos, g); err != nil {
				return nil, fmt.Errorf("%s → %s: %w", st.Name, tg.Name, err)
			}
			geoms[si][ti] = g
			if ti == 0 {
				sums[si].GroundM = g.Profile.ElevM[0]
			}
			links, err := env.targetLinks(g, st.End, tg, need)
			if err != nil {
				return nil, err
			}
			count(&sums[si], links, tg.Optional)
			res.Links = append(res.Links, links...)
			step()
		}
		if nt == 0 {
			h, _, err := env.terrainSet().Elevation(st.Pos.Lat(), st.Pos.Lon())
			if err == nil {
				sums[si].GroundM = h
			}
		}
	}
	// Every pair of stations, once, both ways: out from the first listed,
	// back from the second.
	for si, st := range p.Stations {
		for sj := si + 1; sj < ns; sj++ {
			if err := ctx.Err(); err != nil {
				return nil, err
			}
			other := p.Stations[sj]
			g := &Geometry{}
			if err := env.Measure(st.Pos, other.Pos, g); err != nil {
				return nil, fmt.Errorf("%s → %s: %w", st.Name, other.Name, err)
			}
			links, err := env.targetLinks(g, st.End, stationTarget(p, other), need)
			if err != nil {
				return nil, err
			}
			count(&sums[si], links, false)
			count(&sums[sj], links, false)
			res.Links = append(res.Links, links...)
			step()
		}
	}
	for si, st := range p.Stations {
		res.Stations = append(res.Stations, sums[si])
		ex, err := stationExposure(p, st)
		if err != nil {
			return nil, fmt.Errorf("%s: exposure: %w", st.Name, err)
		}
		res.Exposure = append(res.Exposure, ex)
	}
	if p.Mast != nil {
		for si, st := range p.Stations {
			targets := p.ReachTargets(st.Name)
			gs := append([]*Geometry(nil), geoms[si]...)
			for _, t := range targets[nt:] {
				g := &Geometry{}
				if err := env.Measure(st.Pos, t.Pos, g); err != nil {
					return nil, fmt.Errorf("%s → %s: %w", st.Name, t.Name, err)
				}
				gs = append(gs, g)
			}
			m, err := env.sweep(st, targets, gs, p.Mast, p.Require)
			if err != nil {
				return nil, fmt.Errorf("%s: %w", st.Name, err)
			}
			if si == 0 {
				res.Mast = m
			}
			if ns > 1 {
				res.Masts = append(res.Masts, m)
			}
			// The recommendation changes the antenna height or the cable, and
			// with them the keep-out: report it at that configuration too.
			if r := m.Recommended; r != nil && (r.HeightM != st.Antenna.HeightM || r.Cable != st.Feedline.Cable.Name || r.CableLengthM != st.Feedline.LengthM) {
				rs := st
				rs.Antenna.HeightM = r.HeightM
				rs.Feedline = mastFeedline(st.Feedline, m.cable(r.Cable, p.Mast), r.HeightM, p.Mast)
				ex, err := stationExposure(p, rs)
				if err != nil {
					return nil, fmt.Errorf("%s: exposure: %w", st.Name, err)
				}
				ex.Configuration = ConfigRecommended
				res.Exposure = append(res.Exposure, ex)
			}
		}
	}
	return res, nil
}

// stationTarget is station s as a target of the other stations: required,
// simplex on the plan's frequency.
func stationTarget(p *Plan, s Station) Target {
	return Target{End: s.End, Kind: Simplex, FreqMHz: p.FreqMHz}
}

// targetLinks evaluates the links between a station and a target over g
// (station at g.From): talk-in and talk-out for a repeater, out and back
// for a simplex target, each judged against the needed margin.
func (e *Env) targetLinks(g *Geometry, st End, tg Target, needDB float64) ([]LinkResult, error) {
	out := make([]LinkResult, 0, 2)
	for _, d := range tg.directions() {
		var r LinkResult
		var err error
		if d.nearTx {
			r, err = e.Evaluate(g, st, tg.End, d.freqMHz, true)
		} else {
			r, err = e.Evaluate(g, tg.End, st, d.freqMHz, false)
		}
		if err != nil {
			return nil, fmt.Errorf("%s → %s: %w", st.Name, tg.Name, err)
		}
		r.Direction = d.name
		n := needDB
		ok := r.MarginDB >= n
		r.NeededMarginDB, r.MeetsRequirement = &n, &ok
		r.Optional = tg.Optional
		out = append(out, r)
	}
	return out, nil
}

// stationExposure evaluates a station's RF exposure, as configured, at each
// frequency it transmits on to the plan's targets (the plan's frequency
// when it has none) and keeps the one with the largest public compliance
// distance.
func stationExposure(p *Plan, st Station) (StationExposure, error) {
	best, err := stationExposureReport(st, p.Targets, p.FreqMHz, len(p.Stations) > 1)
	if err != nil {
		return StationExposure{}, err
	}
	return StationExposure{Station: st.Name, Lat: st.Pos.Lat(), Lon: st.Pos.Lon(), Configuration: ConfigPlanned,
		Cable: st.Feedline.Cable.Name, CableLengthM: st.Feedline.LengthM, Report: best}, nil
}

// stationExposureReport is exposure.Evaluate for st (its power, gain,
// antenna height, feedline loss and exposure habits) at each frequency it
// transmits on to targets (and freqMHz when there are none, or when
// stations call each other on it), keeping the one with the largest public
// compliance distance.
func stationExposureReport(st Station, targets []Target, freqMHz float64, stationsCall bool) (exposure.Report, error) {
	freqs := map[float64]bool{}
	for _, t := range targets {
		freqs[t.directions()[0].freqMHz] = true // the station transmits
	}
	if (len(freqs) == 0 || stationsCall) && freqMHz > 0 {
		freqs[freqMHz] = true // the stations call each other on it
	}
	list := make([]float64, 0, len(freqs))
	for f := range freqs {
		list = append(list, f)
	}
	sort.Float64s(list)
	var best exposure.Report
	found := false
	for _, f := range list {
		in := st.Exposure
		in.PowerW, in.GainDBi, in.FreqMHz, in.AntennaHeightM = st.Radio.PowerW, st.Antenna.GainDBi, f, st.Antenna.HeightM
		fl, err := st.Feedline.Loss(f)
		if err != nil {
			return exposure.Report{}, err
		}
		in.FeedlineLossDB = fl.TotalLossDB
		r, err := exposure.Evaluate(in)
		if err != nil {
			return exposure.Report{}, err
		}
		if !found || r.DistancePublicM > best.DistancePublicM {
			best, found = r, true
		}
	}
	if !found {
		return exposure.Report{}, fmt.Errorf("no transmit frequency: give the plan a frequency")
	}
	return best, nil
}
