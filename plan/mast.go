package plan

import (
	"fmt"
	"math"

	"github.com/mastlink/mastlink/plan/antenna"
	"github.com/mastlink/mastlink/plan/exposure"
	"github.com/mastlink/mastlink/plan/feedline"
	"github.com/mastlink/mastlink/propagation"
)

// MastRow is one mast height and cable of a sweep.
type MastRow struct {
	HeightM          float64 `json:"height_m"`
	Antenna          string  `json:"antenna,omitempty"` // when the sweep tries antennas
	Cable            string  `json:"cable"`
	CableLengthM     float64 `json:"cable_length_m"`
	CableMassKg      float64 `json:"cable_mass_kg"`
	FeedlineLossDB   float64 `json:"feedline_loss_db"` // at the first required link's frequency
	WorstMarginDB    float64 `json:"worst_margin_db"`
	WorstLink        string  `json:"worst_link"` // "target (direction)"
	MeetsRequirement bool    `json:"meets_requirement"`
	// KeepoutPublicM is the public RF-exposure keep-out radius in metres
	// around the mast foot at this height and cable (exposure.Evaluate with
	// the station's exposure habits, at its worst transmit frequency).
	KeepoutPublicM float64 `json:"keepout_public_m"`
	// OverKeepoutLimit is true when KeepoutPublicM exceeds the sweep's
	// keep-out limit; such a row is never recommended.
	OverKeepoutLimit bool `json:"over_keepout_limit"`
}

// MastChoice names a mast height and cable.
type MastChoice struct {
	HeightM      float64 `json:"height_m"`
	Antenna      string  `json:"antenna,omitempty"`
	Cable        string  `json:"cable"`
	CableLengthM float64 `json:"cable_length_m"`
	CableMassKg  float64 `json:"cable_mass_kg"`
}

// MastResult is a mast-and-cable sweep for one station.
type MastResult struct {
	Station        string  `json:"station"`
	NeededMarginDB float64 `json:"needed_margin_db"`
	RunM           float64 `json:"run_m"`
	SlackM         float64 `json:"slack_m"`
	// KeepoutLimitM is the largest public keep-out radius allowed, in
	// metres; 0 (left out) when the sweep has no limit.
	KeepoutLimitM float64     `json:"keepout_limit_m,omitempty"`
	Rows          []MastRow   `json:"rows"`
	Recommended   *MastChoice `json:"recommended"`        // null when nothing meets the requirement within the keep-out limit
	Closest       *MastRow    `json:"closest"`            // the best worst margin (within the keep-out limit if any row is) when nothing is recommended
	Warnings      []string    `json:"warnings,omitempty"` // the model's warnings (Longley–Rice ITM), with the number of paths
	// Cautions are exposure.MastCautions, always present.
	Cautions []string `json:"cautions"`
}

// cable returns the cable of the sweep named name (the sweep's cables are
// distinct by name).
func (m *MastResult) cable(name string, sweep *MastSweep) feedline.Cable {
	for _, c := range sweep.Cables {
		if c.Name == name {
			return c
		}
	}
	return feedline.Cable{Name: name}
}

// SweepMast evaluates a station against targets for every mast height and
// cable of m: the cable runs up the mast and on to the radio (length =
// antenna height + run + slack). For each combination the worst margin over
// the required links in both directions is kept. The recommendation is the
// lowest mast that meets the requirement, then the lightest cable (mass per
// metre × length) at that height, among the rows whose public RF-exposure
// keep-out (exposure.Evaluate with the station's exposure habits, FCC OET
// Bulletin 65 far field) is within m.KeepoutLimitM when that is set. When m
// lists antennas, each is tried in place of the station's (catalog gain and
// pattern, the station's bearing) and the recommendation takes the lowest
// mast, then the first antenna in m's order, then the lightest cable.
// Terrain profiles are extracted once per target and reused for every
// height.
func (e *Env) SweepMast(st Station, targets []Target, m *MastSweep, req Requirement) (*MastResult, error) {
	geoms := make([]*Geometry, len(targets))
	for i, t := range targets {
		geoms[i] = &Geometry{}
		if err := e.Measure(st.Pos, t.Pos, geoms[i]); err != nil {
			return nil, fmt.Errorf("%s → %s: %w", st.Name, t.Name, err)
		}
	}
	return e.sweep(st, targets, geoms, m, req)
}

func (e *Env) sweep(st Station, targets []Target, geoms []*Geometry, m *MastSweep, req Requirement) (*MastResult, error) {
	need := req.NeededMarginDB()
	res := &MastResult{Station: st.Name, NeededMarginDB: need, RunM: m.RunM, SlackM: m.SlackM, KeepoutLimitM: m.KeepoutLimitM, Cautions: exposure.MastCautions()}
	if len(targets) == 0 {
		return nil, fmt.Errorf("mast sweep: the plan has no targets to reach")
	}
	ants := []*antenna.Antenna{nil}
	if len(m.Antennas) > 0 {
		ants = ants[:0]
		for i := range m.Antennas {
			ants = append(ants, &m.Antennas[i])
		}
	}
	antIndex := map[string]int{}
	for _, g := range geoms {
		g.modelWarn = 0
	}
	for _, h := range m.Heights.ValuesM() {
		for ai, at := range ants {
			for _, c := range m.Cables {
				s := st
				if at != nil {
					s.Antenna = withType(st.Antenna, *at)
					antIndex[at.Name] = ai
				}
				s.Antenna.HeightM = h
				s.Feedline = mastFeedline(st.Feedline, c, h, m)
				length := s.Feedline.LengthM
				row := MastRow{HeightM: h, Cable: c.Name, CableLengthM: length, CableMassKg: c.MassKgPerM * length, WorstMarginDB: math.Inf(1)}
				if at != nil {
					row.Antenna = at.Name
				}
				required := 0
				for i, t := range targets {
					if t.Optional {
						continue
					}
					required++
					links, err := e.targetLinks(geoms[i], s.End, t, need)
					if err != nil {
						return nil, err
					}
					if links[0].SamePlace { // nothing to reach: left out
						required--
						continue
					}
					if row.FeedlineLossDB == 0 {
						// The station transmits in the first direction
						// (Target.directions): its line at that frequency.
						row.FeedlineLossDB = links[0].TxFeedlineLossDB
					}
					for _, l := range links {
						if l.MarginDB < row.WorstMarginDB {
							row.WorstMarginDB = l.MarginDB
							row.WorstLink = fmt.Sprintf("%s (%s)", t.Name, l.Direction)
						}
					}
				}
				if required == 0 {
					return nil, fmt.Errorf("mast sweep: no required target away from %s's place; mark at least one target as required", st.Name)
				}
				row.MeetsRequirement = row.WorstMarginDB >= need
				ex, err := stationExposureReport(s, targets, 0, false)
				if err != nil {
					return nil, fmt.Errorf("mast sweep: %s at %g m: exposure: %w", c.Name, h, err)
				}
				row.KeepoutPublicM = ex.KeepoutPublicM
				row.OverKeepoutLimit = m.KeepoutLimitM > 0 && row.KeepoutPublicM > m.KeepoutLimitM
				res.Rows = append(res.Rows, row)
			}
		}
	}
	for i := range res.Rows {
		r := &res.Rows[i]
		if !r.MeetsRequirement || r.OverKeepoutLimit {
			continue
		}
		rec := res.Recommended
		if rec == nil || r.HeightM < rec.HeightM ||
			(r.HeightM == rec.HeightM && antIndex[r.Antenna] < antIndex[rec.Antenna]) ||
			(r.HeightM == rec.HeightM && r.Antenna == rec.Antenna && r.CableMassKg < rec.CableMassKg) {
			res.Recommended = &MastChoice{HeightM: r.HeightM, Antenna: r.Antenna, Cable: r.Cable, CableLengthM: r.CableLengthM, CableMassKg: r.CableMassKg}
		}
	}
	var warns []propagation.ITMWarnings
	for i, t := range targets {
		if !t.Optional {
			warns = append(warns, geoms[i].modelWarn)
		}
	}
	res.Warnings = itmWarningLines(warns)
	if res.Recommended == nil {
		anyWithin := false
		for _, r := range res.Rows {
			anyWithin = anyWithin || !r.OverKeepoutLimit
		}
		for i := range res.Rows {
			if anyWithin && res.Rows[i].OverKeepoutLimit {
				continue
			}
			if res.Closest == nil || res.Rows[i].WorstMarginDB > res.Closest.WorstMarginDB {
				r := res.Rows[i]
				res.Closest = &r
			}
		}
	}
	return res, nil
}

// mastFeedline is the station's line rebuilt for a mast of heightM metres
// with cable c: as long as the mast plus the run and slack of m, with the
// station's SWR, connectors and connector loss (as Env.SweepMast builds it).
func mastFeedline(station feedline.Line, c feedline.Cable, heightM float64, m *MastSweep) feedline.Line {
	fl := feedline.NewLine(c, heightM+m.RunM+m.SlackM)
	fl.SWR, fl.Connectors = station.SWR, station.Connectors
	if station.ConnectorLossDB > 0 {
		fl.ConnectorLossDB = station.ConnectorLossDB
	}
	return fl
}
