package plan

import (
	"context"
	"fmt"
	"math"
	"sort"

	"github.com/mastlink/mastlink/plan/antenna"
	"github.com/mastlink/mastlink/plan/exposure"
	"github.com/mastlink/mastlink/plan/feedline"
	"github.com/mastlink/mastlink/plan/gpx"
	"github.com/mastlink/mastlink/propagation"
)

// SitesRequest is what Env.RankSites ranks: candidate places for a station,
// its kit, and the targets it must reach from there.
type SitesRequest struct {
	Candidates []gpx.Place // named candidate sites (GPX waypoints)
	// Station is the kit set up at each candidate (its Pos is ignored).
	Station End
	// Targets are reached in both directions from each candidate.
	Targets        []Target
	NeededMarginDB float64    // margin every required direction must meet, dB
	Mast           *MastSweep // mast heights and cables to try; nil keeps the station's own
}

// SiteTarget is how one candidate site reaches one target with the
// station's own kit.
type SiteTarget struct {
	Name     string  `json:"name"`
	MarginDB float64 `json:"margin_db"` // the lower of both directions
	Meets    bool    `json:"meets_requirement"`
	Optional bool    `json:"optional,omitempty"`
	// SamePlace marks a target closer than SamePlaceM to the candidate:
	// left out of the candidate's figures (MarginDB 0), with a warning.
	SamePlace bool `json:"same_place,omitempty"`
}

// SiteResult is one ranked candidate site.
type SiteResult struct {
	Name          string  `json:"name"`
	Lat           float64 `json:"lat"`
	Lon           float64 `json:"lon"`
	GroundM       float64 `json:"ground_m"` // from the elevation data, metres above sea level
	Rank          int     `json:"rank"`     // 1 is the best
	WorstMarginDB float64 `json:"worst_margin_db"`
	WorstLink     string  `json:"worst_link"` // "target (direction)"
	Reachable     int     `json:"reachable"`  // required targets met in both directions
	Of            int     `json:"of"`         // required targets
	// MastM is the lowest mast (antenna height above ground) that meets the
	// requirement on every required link: from the sweep when one is
	// given, else the station's own height; null when none does.
	MastM *float64 `json:"mast_m"`
	// Antenna is the first antenna of the sweep's list that meets it at
	// MastM (sweep with antennas only).
	Antenna string `json:"antenna,omitempty"`
	// feedline.Cable is the lightest cable that meets it at MastM (sweep only).
	Cable   string       `json:"cable,omitempty"`
	Targets []SiteTarget `json:"targets"`
}

// SitesResult ranks candidate sites.
type SitesResult struct {
	Station        string       `json:"station"` // whose kit is set up
	HeightM        float64      `json:"height_m"`
	NeededMarginDB float64      `json:"needed_margin_db"`
	DefaultMargin  bool         `json:"default_margin"`           // nothing was asked: plan.DefaultMarginDB
	WhatIf         []string     `json:"what_if,omitempty"`        // options that replaced the plan's figures, as given ("--power 10W")
	MastHeightsM   []float64    `json:"mast_heights_m,omitempty"` // the sweep, when given
	Sites          []SiteResult `json:"sites"`
	Paths          int          `json:"paths"` // terrain profiles extracted
	// Warnings are what the figures should be read with (see
	// Env.FrequencyWarnings, co-located candidates and targets, and the
	// model's warnings with the number of paths); commands add missing
	// elevation data.
	Warnings []string `json:"warnings"`
	Cautions []string `json:"cautions"` // exposure.MastCautions, always present
}

// RankSites evaluates the station's kit set up at every candidate against
// every target in both directions (Env.Evaluate's budget and model, one
// terrain profile per candidate and target reused for both directions and
// every mast height and cable) and ranks the candidates: by the worst
// margin over the required links, highest first, then by the number of
// required targets reached in both directions, then by name.
//
// For each candidate, MastM is the lowest mast of req.Mast at which some
// cable meets NeededMarginDB on every required link, with the lightest such
// cable (the rule of Env.SweepMast; cable length = height + run + slack).
// Without a sweep it is the station's own antenna height when that meets
// the requirement. Pairs are evaluated in parallel on all cores; the result
// does not depend on their number. progress counts candidate–target pairs.
func (e *Env) RankSites(ctx context.Context, req SitesRequest, progress Progress) (*SitesResult, error) {
	if len(req.Candidates) == 0 {
		return nil, fmt.Errorf("no candidate sites: give a GPX file with a waypoint for each")
	}
	legs, err := prepareLegs(req.Station, req.Targets)
	if err != nil {
		return nil, err
	}
	type config struct {
		heightM float64
		antenna string // "" keeps the station's
		antIdx  int    // its place in req.Mast.Antennas, the order of preference
		cable   feedline.Cable
		massKg  float64
		legs    []targetLegs
	}
	var heights []float64
	var configs []config // by height, then cable
	if req.Mast != nil {
		heights = req.Mast.Heights.ValuesM()
		ants := []*antenna.Antenna{nil}
		if len(req.Mast.Antennas) > 0 {
			ants = ants[:0]
			for i := range req.Mast.Antennas {
				ants = append(ants, &req.Mast.Antennas[i])
			}
		}
		for _, h := range heights {
			for ai, at := range ants {
				for _, c := range req.Mast.Cables {
					s := req.Station
					name := ""
					if at != nil {
						s.Antenna, name = withType(s.Antenna, *at), at.Name
					}
					s.Antenna.HeightM = h
					s.Feedline = mastFeedline(req.Station.Feedline, c, h, req.Mast)
					cl, err := prepareLegs(s, req.Targets)
					if err != nil {
						return nil, err
					}
					configs = append(configs, config{heightM: h, antenna: name, antIdx: ai, cable: c, massKg: c.MassKgPerM * s.Feedline.LengthM, legs: cl})
				}
			}
		}
	}
	nc, nt, nk := len(req.Candidates), len(legs), len(configs)
	own := make([]float64, nc*nt*2)    // margins per leg with the own kit
	swept := make([]float64, nc*nt*nk) // worst over both legs, per config
	ground := make([]float64, nc*nt)
	same := make([]bool, nc*nt) // candidate and target at one place
	warns := make([]propagation.ITMWarnings, nc*nt)
	err = runParallel(ctx, nc*nt, progress, func(g *Geometry, i int) error {
		c, t := i/nt, i%nt
		pos := req.Candidates[c].Pos
		if _, err := e.nearMargins(g, pos, &legs[t], req.Station.Antenna.HeightM, own[i*2:i*2+2]); err != nil {
			return fmt.Errorf("%s: %w", req.Candidates[c].Name, err)
		}
		ground[i] = g.Profile.ElevM[0]
		if g.Profile.DistanceM < SamePlaceM {
			same[i] = true
			return nil
		}
		var loss [2]float64
		var buf [2]float64
		var tw *towardPath
		for k := 0; k < nk; k++ {
			cf := &configs[k]
			if k == 0 || cf.heightM != configs[k-1].heightM {
				if err := e.lossesAt(g, &cf.legs[t], cf.heightM, &loss); err != nil {
					return fmt.Errorf("%s: %w", req.Candidates[c].Name, err)
				}
				tw = nil
			}
			if tw == nil && cf.legs[t].patterned {
				var err error
				if tw, err = e.towardFor(g, &cf.legs[t], cf.heightM); err != nil {
					return fmt.Errorf("%s: %w", req.Candidates[c].Name, err)
				}
			}
			swept[i*nk+k] = cf.legs[t].margins(&loss, tw, buf[:])
		}
		warns[i] = g.modelWarn
		return nil
	})
	if err != nil {
		return nil, err
	}
	need := req.NeededMarginDB
	res := &SitesResult{Station: req.Station.Name, HeightM: req.Station.Antenna.HeightM, NeededMarginDB: need, MastHeightsM: heights, Paths: nc * nt,
		Warnings: appendNew(e.legWarnings(req.Station, req.Targets), itmWarningLines(warns)...), Cautions: exposure.MastCautions()}
	for c, cand := range req.Candidates {
		s := SiteResult{Name: cand.Name, Lat: cand.Pos.Lat(), Lon: cand.Pos.Lon(), GroundM: ground[c*nt], WorstMarginDB: math.Inf(1)}
		for t := range legs {
			tl := &legs[t]
			i := c*nt + t
			if same[i] {
				s.Targets = append(s.Targets, SiteTarget{Name: tl.target.Name, Optional: tl.target.Optional, SamePlace: true})
				res.Warnings = appendNew(res.Warnings, fmt.Sprintf("candidate %s is at the same place as %s: that target is left out of %s's figures",
					cand.Name, tl.target.Name, cand.Name))
				continue
			}
			worst := math.Min(own[i*2], own[i*2+1])
			st := SiteTarget{Name: tl.target.Name, MarginDB: worst, Meets: worst >= need, Optional: tl.target.Optional}
			s.Targets = append(s.Targets, st)
			if tl.target.Optional {
				continue
			}
			s.Of++
			if st.Meets {
				s.Reachable++
			}
			for k, l := range tl.legs {
				if own[i*2+k] < s.WorstMarginDB {
					s.WorstMarginDB = own[i*2+k]
					s.WorstLink = fmt.Sprintf("%s (%s)", tl.target.Name, l.name)
				}
			}
		}
		if math.IsInf(s.WorstMarginDB, 1) { // every required target at this place
			s.WorstMarginDB, s.WorstLink = 0, "none away from this place"
		}
		if req.Mast == nil {
			if s.WorstMarginDB >= need {
				h := req.Station.Antenna.HeightM
				s.MastM = &h
			}
		} else {
			bestMass, bestAnt := math.Inf(1), len(configs)
			for k := range configs {
				cf := &configs[k]
				if s.MastM != nil && cf.heightM != *s.MastM {
					break
				}
				ok := true
				for t := range legs {
					if !legs[t].target.Optional && !same[c*nt+t] && swept[(c*nt+t)*nk+k] < need {
						ok = false
						break
					}
				}
				if ok && (cf.antIdx < bestAnt || (cf.antIdx == bestAnt && cf.massKg < bestMass)) {
					h := cf.heightM
					s.MastM, s.Antenna, s.Cable, bestMass, bestAnt = &h, cf.antenna, cf.cable.Name, cf.massKg, cf.antIdx
				}
			}
		}
		res.Sites = append(res.Sites, s)
	}
	sort.SliceStable(res.Sites, func(a, b int) bool {
		x, y := res.Sites[a], res.Sites[b]
		if x.WorstMarginDB != y.WorstMarginDB {
			return x.WorstMarginDB > y.WorstMarginDB
		}
		if x.Reachable != y.Reachable {
			return x.Reachable > y.Reachable
		}
		return x.Name < y.Name
	})
	for i := range res.Sites {
		res.Sites[i].Rank = i + 1
	}
	return res, nil
}
