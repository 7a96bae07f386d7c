package main

import (
	"bytes"
	"fmt"
	"io"
	"math"
	"path/filepath"
	"slices"
	"strings"

	"github.com/mastlink/mastlink/plan"
	"github.com/mastlink/mastlink/plan/report"
	"github.com/mastlink/mastlink/plan/units"
	"github.com/mastlink/mastlink/terrain"
	"github.com/paulmach/orb"
)

// planMapFile is the map plan -o writes into its directory.
const planMapFile = "plan-map.png"

// planMap is a plan's map, drawn once for -o and the briefing.
type planMap struct {
	png      []byte
	terrain  []string // elevation files under the map, sorted
	circles  int      // keep-out circles drawn
	tracks   int      // routes drawn
	alt      string   // the map in words
	bounds   report.Bounds
	linkKeys []string // "station → target" in the order drawn
}

// writePlanMap draws the plan's map for plan -o (planMapFile).
func writePlanMap(w io.Writer, p *plan.Plan, env *plan.Env, res *plan.PlanResult, imperial bool) error {
	pm, err := newPlanMap(p, env, res, imperial, 0)
	if err != nil {
		return err
	}
	_, err = w.Write(pm.png)
	return err
}

// newPlanMap draws the map of a plan's results: the shaded relief of the
// plan's elevation data under the stations (dark discs) and targets (white
// squares), each station–target link drawn and labelled with the worse
// margin of its two directions, coloured by the margin bands of the
// requirement; the public RF-exposure keep-out around each station rounded
// up (as printed); and the plan's routes coloured by their worst margin with
// their dead stretches. widthPx is the image's width (0: the renderer's
// default). The same results give the same bytes.
func newPlanMap(p *plan.Plan, env *plan.Env, res *plan.PlanResult, imperial bool, widthPx int) (*planMap, error) {
	pm := &planMap{}
	m := report.Map{Title: planTitle(p, res), Imperial: imperial, Scale: report.Scale{Levels: marginLevels(res.NeededMarginDB), Name: "margin", Unit: "dB"}, WidthPx: widthPx}
	m.Subtitle = fmt.Sprintf("Links labelled with the worse margin of their two directions; %s dB needed", trimNum(res.NeededMarginDB, 1))

	pos := map[string]orb.Point{}
	for _, s := range p.Stations {
		pos[s.Name] = s.Pos
	}
	for _, t := range p.Targets {
		pos[t.Name] = t.Pos
	}
	// Routes first, so the markers and links are drawn over them.
	for i := range res.Routes {
		r := &res.Routes[i]
		tr := report.Track{} // named in the briefing; a label here would crowd the links
		for _, pt := range r.Points {
			tr.Points = append(tr.Points, orb.Point{pt.Lon, pt.Lat})
			tr.Values = append(tr.Values, pt.WorstMarginDB)
		}
		if len(tr.Points) < 2 {
			continue
		}
		m.Tracks = append(m.Tracks, tr)
		pm.tracks++
		for _, gp := range r.Gaps {
			line := r.Piece(gp.StartM, gp.EndM)
			if len(line) < 2 {
				continue
			}
			m.Stretches = append(m.Stretches, report.Stretch{Line: []orb.Point(line), Label: "dead stretch " + units.FormatLength(gp.LengthM, imperial)})
		}
	}
	for _, e := range res.Exposure {
		r := keepoutRadiusM(e.KeepoutPublicM, imperial)
		if r <= 0 {
			continue
		}
		m.Circles = append(m.Circles, report.Circle{Centre: orb.Point{e.Lon, e.Lat}, RadiusM: r, Label: "keep-out " + keepoutText(e.KeepoutPublicM, imperial)})
		pm.circles++
	}
	for _, pair := range linkPairs(res) {
		a, b := pos[pair.station], pos[pair.target]
		m.Links = append(m.Links, report.Link{From: a, To: b, Value: pair.worstDB, Label: signed(pair.worstDB) + " dB"})
		pm.linkKeys = append(pm.linkKeys, pair.station+" → "+pair.target)
	}
	for _, s := range p.Stations {
		m.Markers = append(m.Markers, report.Marker{At: s.Pos, Label: s.Name, Kind: report.MarkerStation})
	}
	for _, t := range p.Targets {
		label := t.Name
		if t.Optional {
			label += " (optional)"
		}
		m.Markers = append(m.Markers, report.Marker{At: t.Pos, Label: label, Kind: report.MarkerTarget})
	}
	m.Bounds = planMapBounds(m)
	pm.bounds = m.Bounds
	if env.Terrain != nil && env.Terrain.Len() > 0 {
		if m.Terrain = terrainGrid(env.Terrain, m.Bounds, 1600); m.Terrain != nil {
			pm.terrain = terrainFiles(env.Terrain, m.Bounds)
		}
	}
	if len(pm.terrain) > 0 {
		m.Credit = "Terrain: " + strings.Join(pm.terrain, ", ")
	} else {
		m.Credit = "No elevation data: plain base"
	}
	var buf bytes.Buffer
	if err := report.MapPNG(&buf, m); err != nil {
		return nil, fmt.Errorf("plan map: %w", err)
	}
	pm.png = buf.Bytes()
	pm.alt = planMapAlt(p, res, pm)
	return pm, nil
}

// planTitle is the plan's name, or its file name when it has none.
func planTitle(p *plan.Plan, res *plan.PlanResult) string {
	if strings.TrimSpace(res.Name) != "" {
		return res.Name
	}
	return filepath.Base(p.Path)
}

// linkPair is a station and a target with the worse margin of their two
// directions.
type linkPair struct {
	station, target string
	worstDB         float64
	meets, optional bool
	lineOfSight     bool
	links           []plan.LinkResult
}

// linkPairs groups the plan's links by station and target, in the order
// of the results.
func linkPairs(res *plan.PlanResult) []linkPair {
	stations := map[string]bool{}
	for _, s := range res.Stations {
		stations[s.Name] = true
	}
	var out []linkPair
	index := map[[2]string]int{}
	for _, l := range res.Links {
		st, tg := l.From, l.To
		if !stations[st] {
			st, tg = l.To, l.From
		}
		k := [2]string{st, tg}
		i, ok := index[k]
		if !ok {
			i = len(out)
			index[k] = i
			out = append(out, linkPair{station: st, target: tg, worstDB: math.Inf(1), meets: true, optional: l.Optional, lineOfSight: true})
		}
		pr := &out[i]
		pr.worstDB = math.Min(pr.worstDB, l.MarginDB)
		pr.meets = pr.meets && l.MeetsRequirement != nil && *l.MeetsRequirement
		pr.lineOfSight = pr.lineOfSight && l.LineOfSight
		pr.links = append(pr.links, l)
	}
	return out
}

// keepoutRadiusM is a keep-out radius rounded up as it is printed: to the
// next 0.1 m, or the next whole foot; 0 when none is needed.
func keepoutRadiusM(m float64, imperial bool) float64 {
	if m <= 0 {
		return 0
	}
	if imperial {
		return math.Ceil(m/units.MetresPerFoot-1e-9) * units.MetresPerFoot
	}
	return up(m)
}

// keepoutText writes a keep-out radius rounded up, as the briefing does.
func keepoutText(m float64, imperial bool) string {
	if imperial {
		return fmt.Sprintf("%.0f ft", keepoutRadiusM(m, true)/units.MetresPerFoot)
	}
	return fmt.Sprintf("%.1f m", keepoutRadiusM(m, false))
}

// trimNum writes v with up to dec decimals, without trailing zeros.
func trimNum(v float64, dec int) string {
	s := fmt.Sprintf("%.*f", dec, v)
	if strings.Contains(s, ".") {
		s = strings.TrimRight(strings.TrimRight(s, "0"), ".")
	}
	return s
}

// planMapBounds is the area of a plan map: every marker, link, track and
// circle with 10 % to spare on each side (at least 2 km across), widened to
// a landscape page: at least 1.3 times as wide as tall, and at least half
// as tall as wide.
func planMapBounds(m report.Map) report.Bounds {
	west, east, south, north := math.Inf(1), math.Inf(-1), math.Inf(1), math.Inf(-1)
	add := func(p orb.Point) {
		west, east = math.Min(west, p[0]), math.Max(east, p[0])
		south, north = math.Min(south, p[1]), math.Max(north, p[1])
	}
	for _, mk := range m.Markers {
		add(mk.At)
	}
	for _, t := range m.Tracks {
		for _, p := range t.Points {
			add(p)
		}
	}
	for _, c := range m.Circles {
		latM, lonM := report.MetresPerDegree(c.Centre[1])
		add(orb.Point{c.Centre[0] - c.RadiusM/lonM, c.Centre[1] - c.RadiusM/latM})
		add(orb.Point{c.Centre[0] + c.RadiusM/lonM, c.Centre[1] + c.RadiusM/latM})
	}
	midLat := (south + north) / 2
	latM, lonM := report.MetresPerDegree(midLat)
	wM, hM := (east-west)*lonM, (north-south)*latM
	wM, hM = math.Max(wM*1.2, 2000), math.Max(hM*1.2, 2000)
	wM = math.Max(wM, 1.3*hM)
	hM = math.Max(hM, 0.5*wM)
	cx := (west + east) / 2
	b := report.Bounds{West: cx - wM/2/lonM, East: cx + wM/2/lonM, South: midLat - hM/2/latM, North: midLat + hM/2/latM}
	b.South, b.North = math.Max(b.South, -89.9), math.Min(b.North, 89.9)
	b.West, b.East = math.Max(b.West, -180), math.Min(b.East, 180)
	return b
}

// terrainFiles names the elevation files under b: those GridAt finds at
// the points of a 9 × 9 lattice over it (enough for the one to four tiles
// of a plan's area), sorted.
func terrainFiles(ts *terrain.Set, b report.Bounds) []string {
	seen := map[string]bool{}
	for i := range 9 {
		for j := range 9 {
			lat := b.South + (b.North-b.South)*float64(i)/8
			lon := b.West + (b.East-b.West)*float64(j)/8
			if g, ok := ts.GridAt(lat, lon); ok {
				seen[g.Source] = true
			}
		}
	}
	names := make([]string, 0, len(seen))
	for f := range seen {
		names = append(names, f)
	}
	slices.Sort(names)
	return names
}

// planMapAlt says in words what the plan map shows.
func planMapAlt(p *plan.Plan, res *plan.PlanResult, pm *planMap) string {
	var b strings.Builder
	fmt.Fprintf(&b, "Map of %s", planTitle(p, res))
	if len(pm.terrain) > 0 {
		b.WriteString(" over shaded relief")
	}
	b.WriteString(": ")
	var parts []string
	for _, pr := range linkPairs(res) {
		word := "meets the requirement"
		switch {
		case pr.worstDB < 0:
			word = "is not expected to work"
		case !pr.meets:
			word = "falls short of the requirement"
		}
		if pr.optional {
			word += " (optional)"
		}
		parts = append(parts, fmt.Sprintf("%s to %s %s with %s dB at worst", pr.station, pr.target, word, strings.Replace(signed(pr.worstDB), "-", "−", 1)))
	}
	b.WriteString(strings.Join(parts, "; "))
	b.WriteString(".")
	if pm.circles > 0 {
		b.WriteString(" Dashed circles mark the RF-exposure keep-out around the masts.")
	}
	if pm.tracks > 0 {
		fmt.Fprintf(&b, " %d route(s) drawn coloured by their worst margin, dead stretches in a dark band.", pm.tracks)
	}
	return b.String()
}

// briefingMapWidthPx is the width of the map in the briefing: narrower
// than a map file, so its labels stay legible printed 17 cm wide.
const briefingMapWidthPx = 820
