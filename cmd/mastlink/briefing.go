package main

import (
	"bytes"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"time"
	_ "time/tzdata" // plan files name IANA time zones; work without a system zone database

	"github.com/mastlink/mastlink/plan"
	"github.com/mastlink/mastlink/plan/exposure"
	"github.com/mastlink/mastlink/plan/report"
	"github.com/mastlink/mastlink/plan/units"
	"github.com/mastlink/mastlink/propagation"
	"github.com/paulmach/orb"
)

// maxBriefingProfiles is the most terrain profiles a briefing shows, so
// the demo-sized plan prints on a few pages.
const maxBriefingProfiles = 4

// briefingCautions are the planning cautions the briefing adds to the
// RF-exposure and mast cautions of exposure.Cautions (common practice).
var briefingCautions = []string{
	"Margins are predictions, not measurements: make a radio check from every site before the team relies on a link.",
	"Transmit only as your licence and the band plan allow; land owners' permission and local rules on masts and access apply.",
}

// briefingTarget is where the briefing goes (--briefing, else the plan
// file's briefing:), checked before the plan is evaluated: an HTML file
// name, not an input of the run, in a folder that exists and can be
// written. It returns "" when no briefing is asked for.
func briefingTarget(g *globals, o *planOptions, p *plan.Plan) (string, error) {
	path, what := o.briefing, "--briefing"
	if path == "" {
		if p.Briefing == "" {
			return "", nil
		}
		path, what = p.Briefing, fmt.Sprintf("%s:%d: briefing", p.Path, p.BriefingAt)
	}
	bad := func(format string, a ...any) error {
		err := fmt.Errorf("%s: %s", what, fmt.Sprintf(format, a...))
		if what == "--briefing" {
			return usageError{err}
		}
		return err
	}
	if ext := extension(path); ext != "html" && ext != "htm" {
		return "", bad("%s: the briefing is an HTML page; give a file name ending in .html", path)
	}
	if err := checkNotInput(what, path, briefingInputs(g, p)); err != nil {
		return "", err
	}
	if st, err := os.Stat(path); err == nil && st.IsDir() {
		return "", bad("%s is a folder; give a file name ending in .html", path)
	}
	dir := filepath.Dir(path)
	st, err := os.Stat(dir)
	if err != nil || !st.IsDir() {
		return "", bad("%s: the folder %s does not exist; create it first", path, dir)
	}
	f, err := os.CreateTemp(dir, ".mastlink-check-*")
	if err != nil {
		return "", bad("%s: cannot write in %s (%v)", path, dir, unwrapErr(err))
	}
	f.Close()
	os.Remove(f.Name())
	return path, nil
}

// unwrapErr is the innermost cause of a file error, without the path
// the message already names.
func unwrapErr(err error) error {
	var pe *os.PathError
	for {
		if e, ok := err.(*os.PathError); ok {
			pe = e
			err = e.Err
			continue
		}
		break
	}
	if pe != nil {
		return pe.Err
	}
	return err
}

// briefingInputs are the files a briefing must never replace.
func briefingInputs(g *globals, p *plan.Plan) []string {
	return slices.Concat(p.InputFiles, p.Terrain, g.demPaths())
}

// writePlanBriefing fills the briefing from the plan's results and writes
// it to path atomically.
func writePlanBriefing(g *globals, path string, p *plan.Plan, env *plan.Env, res *plan.PlanResult) error {
	pm, err := newPlanMap(p, env, res, g.imperial(), briefingMapWidthPx)
	if err != nil {
		return err
	}
	d, err := newBriefingData(g, p, env, res, pm)
	if err != nil {
		return err
	}
	var buf bytes.Buffer
	if err := report.Briefing(&buf, d); err != nil {
		return fmt.Errorf("briefing: %w", err)
	}
	if err := writeFileAtomic(path, buf.Bytes(), briefingInputs(g, p)); err != nil {
		return err
	}
	fmt.Fprintf(g.stderr, "mastlink: wrote the briefing to %s\n", path)
	return nil
}

// briefingDate is when the briefing is for: the plan's date: (shown with
// its time of day when it gives one), else the day the plan file was last
// changed (its modification time), so the same plan file gives the same
// page. Both are shown in the plan's time zone, UTC when it gives none.
func briefingDate(p *plan.Plan) (t time.Time, dateOnly bool, note string, err error) {
	loc := p.Location
	if loc == nil {
		loc = time.UTC
	}
	if !p.Date.IsZero() {
		return p.Date.In(loc), !p.DateHasTime, "", nil
	}
	st, err := os.Stat(p.Path)
	if err != nil {
		return time.Time{}, false, "", fmt.Errorf("%s: %w", p.Path, unwrapErr(err))
	}
	m := st.ModTime().In(loc)
	day := time.Date(m.Year(), m.Month(), m.Day(), 0, 0, 0, 0, loc)
	return day, true, "the day the plan file was last changed; give date: in the plan to set the deployment's date", nil
}

// newBriefingData fills the briefing from the plan and its results.
func newBriefingData(g *globals, p *plan.Plan, env *plan.Env, res *plan.PlanResult, pm *planMap) (report.BriefingData, error) {
	im := g.imperial()
	date, dateOnly, dateNote, err := briefingDate(p)
	if err != nil {
		return report.BriefingData{}, err
	}
	d := report.BriefingData{
		Title:    planTitle(p, res),
		Date:     date,
		DateOnly: dateOnly,
		Location: p.Location,
		Area:     p.Area,
		Imperial: im,
		Requirement: report.BriefingRequirement{
			MarginDB:       res.NeededMarginDB,
			ReliabilityPct: 100 * p.Require.Reliability,
		},
	}
	if d.Area == "" {
		c := orb.Point{(pm.bounds.West + pm.bounds.East) / 2, (pm.bounds.South + pm.bounds.North) / 2}
		d.Area = "around " + latLonText(c)
	}
	if p.Require.Reliability > 0 {
		d.Requirement.Note = fmt.Sprintf("The plan asks for %s dB of margin and %s of locations with a location variability σ of %s dB (log-normal, ITU-R P.1812-8 §4.9); the larger margin of the two is kept.",
			trimNum(p.Require.MarginDB, 1), percent(p.Require.Reliability), trimNum(p.Require.SigmaDB, 1))
	}
	d.Map = &report.BriefingMap{PNG: pm.png, Alt: pm.alt, Caption: planMapCaption(pm)}

	// Stations and their links, both ways.
	sites := waypointNames(p)
	for _, s := range p.Stations {
		bs := report.BriefingStation{Name: s.Name, Site: sites[s.Pos]}
		if bs.Site == "" {
			bs.Site = latLonText(s.Pos)
		}
		for _, l := range res.Links {
			if l.From != s.Name && l.To != s.Name {
				continue
			}
			tg := l.To
			if l.To == s.Name {
				tg = l.From
			}
			bs.Links = append(bs.Links, report.BriefingLink{Target: tg, StationTransmits: l.From == s.Name, Direction: l.Direction,
				FreqMHz: l.FreqMHz, DistanceM: l.DistanceM, MarginDB: l.MarginDB,
				Meets: l.MeetsRequirement != nil && *l.MeetsRequirement, Optional: l.Optional})
		}
		d.Stations = append(d.Stations, bs)
	}

	if m := res.Mast; m != nil {
		bm := &report.BriefingMast{Station: m.Station, RunM: m.RunM}
		for _, r := range m.Rows {
			bm.Rows = append(bm.Rows, report.BriefingMastRow{HeightM: r.HeightM, Cable: r.Cable, WorstMarginDB: r.WorstMarginDB, Meets: r.MeetsRequirement})
		}
		if c := m.Recommended; c != nil {
			bm.RecommendedHeightM, bm.RecommendedCable, bm.RecommendedCableLengthM = c.HeightM, c.Cable, c.CableLengthM
			bm.Note = fmt.Sprintf("The cable runs up the mast, %s to the radio and %s of slack; %s of it weighs about %s kg.",
				units.FormatLength(m.RunM, im), units.FormatLength(m.SlackM, im), c.Cable, trimNum(c.CableMassKg, 1))
		}
		d.Mast = bm
	}

	profiles, files, left, err := briefingProfiles(p, env, res, im)
	if err != nil {
		return report.BriefingData{}, err
	}
	d.Profiles = profiles

	for i := range res.Routes {
		d.Routes = append(d.Routes, briefingRoute(p, &res.Routes[i], im))
	}

	for _, e := range res.Exposure {
		d.Exposure = append(d.Exposure, report.BriefingKeepout{Station: briefingExposureLabel(e), FreqMHz: e.FreqMHz, EIRPW: e.EIRPW,
			Mode: modeNames[e.Mode], DutyFactor: e.DutyFactor, TxFraction: math.Max(e.TxFractionPublic, e.TxFractionOccupational),
			AveragingPublicS: e.AveragingPublicS, AveragingOccupationalS: e.AveragingOccupationalS, Standard: standardNames[e.Standard],
			AntennaHeightM: e.AntennaHeightM, HeadHeightM: e.HeadHeightM, KeepoutPublicM: e.KeepoutPublicM, KeepoutOccupationalM: e.KeepoutOccupationalM})
	}

	d.Cautions = append(exposure.Cautions(), briefingCautions...)

	in := report.BriefingInputs{PlanFile: relPaths([]string{p.Path})[0], Model: propagation.ModelDescription(p.Model.Name()), K: p.K}
	for _, f := range pm.terrain {
		if !slices.Contains(files, f) {
			files = append(files, f)
		}
	}
	slices.Sort(files)
	in.TerrainFiles = files
	for _, s := range p.Stations {
		in.Kit = append(in.Kit, briefingKit(s.Name, s.End))
	}
	if len(p.Routes) > 0 {
		if w, err := p.Walker(""); err == nil && w.Name == plan.HandheldName {
			in.Kit = append(in.Kit, briefingKit("handheld (routes)", w))
		}
	}
	in.Notes = append(in.Notes, fmt.Sprintf("%s polarization; ground ε %s, σ %s S/m", p.Polarization, trimNum(p.Ground.Permittivity, 1), trimNum(p.Ground.ConductivitySM, 4)))
	if dateNote != "" {
		in.Notes = append(in.Notes, "Date: "+dateNote)
	}
	if left > 0 {
		in.Notes = append(in.Notes, fmt.Sprintf("%d more weak link(s) have no profile here; draw them with mastlink profile --freq", left))
	}
	for _, w := range res.Warnings {
		in.Notes = append(in.Notes, "Warning: "+w)
	}
	in.Notes = append(in.Notes, "mastlink "+version)
	d.Inputs = in
	return d, nil
}

// modeNames are the emission modes in words.
var modeNames = map[exposure.TxMode]string{
	exposure.ModeFM:           "FM voice",
	exposure.ModeSSB:          "SSB voice",
	exposure.ModeSSBProcessed: "SSB voice, processed",
	exposure.ModeCW:           "CW",
	exposure.ModeDigital:      "digital",
	exposure.ModeCarrier:      "carrier",
}

// planMapCaption is the map's legend in words.
func planMapCaption(pm *planMap) string {
	s := "Stations: dark discs; targets: white squares. Each link is coloured by the worse margin of its two directions (scale under the map); dashed grey: not expected to work."
	if pm.circles > 0 {
		s += " Dashed circles: RF-exposure keep-out for the public, rounded up."
	} else {
		s += " No RF-exposure keep-out is needed at these heights and powers."
	}
	if pm.tracks > 0 {
		s += " Routes are coloured by their worst margin; dark bands are dead stretches."
	}
	return s
}

// waypointNames maps the positions of the plan's waypoints to their names.
func waypointNames(p *plan.Plan) map[orb.Point]string {
	out := map[orb.Point]string{}
	if p.Waypoints == nil {
		return out
	}
	for _, w := range p.Waypoints.Waypoints {
		if _, dup := out[w.Pos]; !dup {
			out[w.Pos] = w.Name
		}
	}
	return out
}

// latLonText writes a position as 48.49666° S, 123.87788° W.
func latLonText(pt orb.Point) string {
	ns, ew := "N", "E"
	lat, lon := pt.Lat(), pt.Lon()
	if lat < 0 {
		ns, lat = "S", -lat
	}
	if lon < 0 {
		ew, lon = "W", -lon
	}
	return fmt.Sprintf("%.5f° %s, %.5f° %s", lat, ns, lon, ew)
}

// briefingKit is an end's equipment for the inputs table.
func briefingKit(name string, e plan.End) report.BriefingKit {
	return report.BriefingKit{Station: name, PowerW: e.Radio.PowerW, SensitivityDBm: e.Radio.SensitivityDBm, GainDBi: e.Antenna.GainDBi,
		HeightM: e.Antenna.HeightM, Cable: e.Feedline.Cable.Name, CableLengthM: e.Feedline.LengthM, Connectors: e.Feedline.Connectors, SWR: e.Feedline.SWR}
}

// briefingProfiles draws the links that fall short of the requirement
// (required or optional) and the required ones whose line of sight the
// terrain blocks, shortest margin first, at most maxBriefingProfiles; it
// returns them, the elevation files every station–target path read, and
// how many were left out.
func briefingProfiles(p *plan.Plan, env *plan.Env, res *plan.PlanResult, im bool) ([]report.BriefingProfile, []string, int, error) {
	ends := map[string]plan.End{}
	for _, s := range p.Stations {
		ends[s.Name] = s.End
	}
	for _, t := range p.Targets {
		ends[t.Name] = t.End
	}
	files := map[string]bool{}
	var weak []linkPair
	var geom plan.Geometry
	for _, pr := range linkPairs(res) {
		a, b := ends[pr.station], ends[pr.target]
		if err := env.Measure(a.Pos, b.Pos, &geom); err != nil {
			return nil, nil, 0, fmt.Errorf("%s → %s: %w", pr.station, pr.target, err)
		}
		for _, f := range geom.Profile.Sources {
			files[f] = true
		}
		if !pr.meets || !pr.lineOfSight && !pr.optional {
			weak = append(weak, pr)
		}
	}
	slices.SortStableFunc(weak, func(x, y linkPair) int {
		if x.meets != y.meets {
			if !x.meets {
				return -1
			}
			return 1
		}
		switch {
		case x.worstDB < y.worstDB:
			return -1
		case x.worstDB > y.worstDB:
			return 1
		}
		return 0
	})
	left := max(len(weak)-maxBriefingProfiles, 0)
	weak = weak[:len(weak)-left]
	var out []report.BriefingProfile
	for _, pr := range weak {
		a, b := ends[pr.station], ends[pr.target]
		if err := env.Measure(a.Pos, b.Pos, &geom); err != nil {
			return nil, nil, 0, fmt.Errorf("%s → %s: %w", pr.station, pr.target, err)
		}
		worst := pr.links[0]
		for _, l := range pr.links[1:] {
			if l.MarginDB < worst.MarginDB {
				worst = l
			}
		}
		out = append(out, report.BriefingProfile{
			Title: pr.station + " to " + pr.target,
			DistM: sampleDistances(&geom), ElevM: slices.Clone(geom.Profile.ElevM),
			FromHeightM: a.Antenna.HeightM, ToHeightM: b.Antenna.HeightM, FreqMHz: worst.FreqMHz,
			Note: profileNote(pr, res.NeededMarginDB, im),
		})
	}
	names := make([]string, 0, len(files))
	for f := range files {
		names = append(names, f)
	}
	slices.Sort(names)
	return out, names, left, nil
}

// profileNote says in one line what to read on a weak link's profile:
// the verdict, the margins both ways, and what the terrain does.
func profileNote(pr linkPair, needDB float64, im bool) string {
	var b strings.Builder
	switch {
	case pr.worstDB < 0:
		b.WriteString("Will not work")
	case !pr.meets:
		fmt.Fprintf(&b, "Short of %s dB", trimNum(needDB, 1))
	default:
		b.WriteString("Works")
	}
	var ms []string
	for _, l := range pr.links {
		ms = append(ms, fmt.Sprintf("%s dB %s", minusSign(signed(l.MarginDB)), l.Direction))
	}
	fmt.Fprintf(&b, ": %s at %s MHz; ", strings.Join(ms, ", "), trimNum(pr.links[0].FreqMHz, 5))
	l := pr.links[0]
	switch {
	case !pr.lineOfSight && l.Obstacle != nil:
		fmt.Fprintf(&b, "blocked by the ground %s from %s.", distance(l.Obstacle.DistanceM, im), l.From)
	case !pr.lineOfSight:
		b.WriteString("blocked by the ground.")
	case l.WorstClearanceF1 != nil && *l.WorstClearanceF1 < 0.6:
		fmt.Fprintf(&b, "the ground enters the first Fresnel zone (%s of its radius clear).", trimNum(*l.WorstClearanceF1, 2))
	default:
		b.WriteString("clear line of sight: the loss is distance and kit.")
	}
	return b.String()
}

// minusSign writes a leading hyphen as the minus sign, as print does.
func minusSign(s string) string {
	if strings.HasPrefix(s, "-") {
		return "−" + s[1:]
	}
	return s
}

// briefingRoute is a route's dead stretches and call spots.
func briefingRoute(p *plan.Plan, r *plan.RouteResult, im bool) report.BriefingRoute {
	br := report.BriefingRoute{Name: r.Name, LengthM: r.LengthM, CoveredFraction: r.OverallFraction}
	if w, err := p.Walker(""); err == nil {
		br.Walker = fmt.Sprintf("the %s (%s, %s antenna at %s)", r.Walker, units.FormatPower(w.Radio.PowerW), dbi(w.Antenna.GainDBi), units.FormatHeight(w.Antenna.HeightM, im))
	} else {
		br.Walker = r.Walker
	}
	for _, gp := range r.Gaps {
		br.Gaps = append(br.Gaps, report.BriefingGap{StartM: gp.StartM, EndM: gp.EndM, WorstMarginDB: gp.WorstMarginDB, Missing: gp.Missing})
	}
	// A spot between two dead stretches of one target is the spot after the
	// first and before the next: listed once, as the place to call before
	// going on.
	seen := map[string]int{}
	for _, s := range r.BestSpots {
		key := fmt.Sprintf("%s\x00%.3f", s.Target, s.DistanceM)
		if i, dup := seen[key]; dup {
			if s.Side == "before" {
				br.CallSpots[i].Side = "before"
			}
			continue
		}
		seen[key] = len(br.CallSpots)
		br.CallSpots = append(br.CallSpots, report.BriefingCallSpot{Target: s.Target, Side: s.Side, DistanceM: s.DistanceM, Lat: s.Lat, Lon: s.Lon, MarginDB: s.MarginDB})
	}
	return br
}

// briefingExposureLabel names a keep-out row of the briefing: the station,
// and for the mast sweep's recommendation a short note (the table's
// assumptions column gives the antenna height).
func briefingExposureLabel(e plan.StationExposure) string {
	if e.Configuration == plan.ConfigRecommended {
		return e.Station + " (recommended mast)"
	}
	return e.Station
}

// sampleDistances returns the distance of every sample of g's profile from
// its start, metres.
func sampleDistances(g *plan.Geometry) []float64 {
	d := make([]float64, g.Profile.Len())
	for i := range d {
		d[i] = g.SampleDistanceM(i)
	}
	return d
}
