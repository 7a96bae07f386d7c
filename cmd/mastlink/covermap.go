package main

import (
	"context"
	"fmt"
	"io"
	"math"
	"path/filepath"
	"slices"
	"strings"

	"github.com/mastlink/mastlink/plan"
	"github.com/mastlink/mastlink/plan/report"
	"github.com/mastlink/mastlink/plan/units"
	"github.com/mastlink/mastlink/propagation"
	"github.com/mastlink/mastlink/terrain"
	"github.com/paulmach/orb"
)

// coverageKinds are the extensions a coverage map may be written as.
var coverageKinds = []string{"tif", "png", "kmz", "geojson"}

// coverageView is a computed coverage map with what its files show
// besides the grid: the quantity, its levels, the site and the places
// around it.
type coverageView struct {
	res      *plan.CoverageResult
	mode     plan.CoverageMode
	value    plan.CoverageValue
	levels   []float64 // ascending, in the value's unit (1 for line of sight)
	needDB   float64   // margin a covered cell needs, with a budget
	budget   bool      // the value comes from a link budget
	siteName string
	site     orb.Point
	markers  []report.Marker // targets and other stations
	title    string
	subtitle string
	imperial bool
	model    propagation.Model // of a loss map; nil: delta-Bullington (radial engine)
}

// defaultLevels are the levels of a map when none are asked for: margins
// every 10 dB from 0, received levels every 10 dB from −120 dBm (near a
// handheld's 0.25 µV, −119 dBm; common practice), path losses every 10 dB
// from 110 to 160 dB, and "visible" for line of sight.
func defaultLevels(mode plan.CoverageMode, value plan.CoverageValue) []float64 {
	switch {
	case mode == plan.CoverageLOS:
		return []float64{1}
	case value == plan.ValueMargin:
		return []float64{0, 10, 20, 30}
	case value == plan.ValueReceived:
		return []float64{-120, -110, -100, -90, -80}
	}
	return []float64{110, 120, 130, 140, 150, 160}
}

// valueWords names a map's quantity and unit.
func valueWords(mode plan.CoverageMode, value plan.CoverageValue) (name, unit, key string) {
	switch {
	case mode == plan.CoverageLOS:
		return "line of sight", "", "visible"
	case value == plan.ValueMargin:
		return "margin", "dB", "margin"
	case value == plan.ValueReceived:
		return "received level", "dBm", "received"
	}
	return "path loss", "dB", "loss"
}

// lowerIsBetter is true for path loss: a cell counts at a level when its
// loss is at or below it.
func (v *coverageView) lowerIsBetter() bool {
	return v.mode == plan.CoverageLoss && v.value == plan.ValuePathLoss
}

// levelFractions returns, for each level, the cells within the radius at
// or above it (at or below it for path loss) and their share of all cells.
func (v *coverageView) levelFractions() (cells []int, fractions []float64) {
	cells = make([]int, len(v.levels))
	for _, x := range v.res.Values {
		if x == plan.CoverageNoData {
			continue
		}
		for i, l := range v.levels {
			if v.lowerIsBetter() && float64(x) <= l || !v.lowerIsBetter() && float64(x) >= l {
				cells[i]++
			}
		}
	}
	fractions = make([]float64, len(v.levels))
	for i, n := range cells {
		if v.res.Cells > 0 {
			fractions[i] = float64(n) / float64(v.res.Cells)
		}
	}
	return cells, fractions
}

// levelLabel is "margin ≥ 10 dB", "path loss ≤ 140 dB" or "visible".
func (v *coverageView) levelLabel(l float64) string {
	name, unit, _ := valueWords(v.mode, v.value)
	if v.mode == plan.CoverageLOS {
		return "visible"
	}
	op := "≥"
	if v.lowerIsBetter() {
		op = "≤"
	}
	return fmt.Sprintf("%s %s %s %s", name, op, trimNumber(l), unit)
}

// trimNumber writes a level with the decimals it needs (up to 2).
func trimNumber(v float64) string {
	s := fmt.Sprintf("%.2f", v)
	s = strings.TrimRight(strings.TrimRight(s, "0"), ".")
	if s == "-0" {
		s = "0"
	}
	return s
}

// scaleAndGrid returns the colour scale of the map and the grid drawn with
// it. Path loss, where less is better, is drawn as its negative so the
// brightest band is the lowest loss; the legend's labels give the losses.
func (v *coverageView) scaleAndGrid() (report.Scale, report.Grid) {
	name, unit, _ := valueWords(v.mode, v.value)
	r := v.res
	w, s, e, n := r.Bounds()
	g := report.Grid{Width: r.Cols, Height: r.Rows, Bounds: report.Bounds{West: w, South: s, East: e, North: n},
		Values: r.Values, NoData: plan.CoverageNoData, HasNoData: true}
	sc := report.Scale{Levels: v.levels, Name: name, Unit: unit}
	switch {
	case v.mode == plan.CoverageLOS:
		sc.Labels = []string{"visible"}
	case v.lowerIsBetter():
		k := len(v.levels)
		sc.Levels = make([]float64, k)
		sc.Labels = make([]string, k)
		for i := range k {
			l := v.levels[k-1-i]
			sc.Levels[i] = -l
			sc.Labels[i] = "≤ " + trimNumber(l)
		}
		vals := make([]float32, len(r.Values))
		for i, x := range r.Values {
			vals[i] = x
			if x != plan.CoverageNoData {
				vals[i] = -x
			}
		}
		g.Values = vals
	}
	return sc, g
}

// writeCoverageFile writes the map to path as kind (an entry of
// coverageKinds), refusing to write over any of inputs. ts gives the
// ground for the PNG's shaded relief (nil: a plain base).
func writeCoverageFile(path, kind string, inputs []string, v *coverageView, ts *terrain.Set) error {
	r := v.res
	switch kind {
	case "tif":
		return renderTo(path, inputs, func(w io.Writer) error {
			return terrain.EncodeGeoTIFF(w, terrain.GeoTIFFGrid{Values: r.Values, Rows: r.Rows, Cols: r.Cols,
				West: r.West, North: r.North, DLatDeg: r.DLatDeg, DLonDeg: r.DLonDeg, NoData: plan.CoverageNoData})
		})
	case "geojson":
		sc, g := v.scaleAndGrid()
		fc, err := report.LevelAreas(g, sc)
		if err != nil {
			return err
		}
		if v.lowerIsBetter() { // back from the drawn negatives to losses, in the levels' order
			slices.Reverse(fc.Features)
			for i, f := range fc.Features {
				f.Properties["level"] = v.levels[i]
				f.Properties["label"] = v.levelLabel(v.levels[i])
			}
		}
		return renderTo(path, inputs, func(w io.Writer) error { return writeJSON(w, fc) })
	case "kmz":
		sc, g := v.scaleAndGrid()
		k := report.KMZ{Name: v.title, Description: v.subtitle, Overlay: g, Scale: sc}
		k.Placemarks = append(k.Placemarks, report.Placemark{Name: v.siteName, Description: "the site of the map", At: v.site})
		for _, m := range v.markers {
			k.Placemarks = append(k.Placemarks, report.Placemark{Name: m.Label, At: m.At})
		}
		return renderTo(path, inputs, func(w io.Writer) error { return report.WriteKMZ(w, k) })
	}
	sc, g := v.scaleAndGrid()
	m := report.Map{Title: v.title, Subtitle: v.subtitle, Imperial: v.imperial, Overlay: &g, Scale: sc, Bounds: g.Bounds}
	m.Terrain = terrainGrid(ts, g.Bounds, 1600)
	m.Credit = coverageCredit(v, m.Terrain != nil)
	for _, mk := range v.markers {
		if inside(g.Bounds, mk.At) {
			m.Markers = append(m.Markers, mk)
		}
	}
	m.Markers = append(m.Markers, report.Marker{At: v.site, Label: v.siteName, Kind: report.MarkerSite})
	return renderTo(path, inputs, func(w io.Writer) error { return report.MapPNG(w, m) })
}

// coverageCredit is the small print of a coverage map.
func coverageCredit(v *coverageView, relief bool) string {
	parts := []string{}
	if v.mode == plan.CoverageLOS {
		parts = append(parts, "line of sight over the earth's curvature (ITU-R P.526-16)")
	} else {
		parts = append(parts, "ITU-R P.526-16 delta-Bullington over the terrain")
	}
	if v.budget && v.mode == plan.CoverageLoss {
		parts = append(parts, fmt.Sprintf("%s dB margin needed", trimNumber(math.Round(v.needDB*10)/10)))
	}
	switch {
	case !relief:
		parts = append(parts, "no elevation data: smooth earth")
	case v.res.SmoothEarth:
		parts = append(parts, "smooth earth where elevation data is missing")
	}
	return strings.Join(parts, "; ")
}

// inside reports whether p lies within b.
func inside(b report.Bounds, p orb.Point) bool {
	return p[0] >= b.West && p[0] <= b.East && p[1] >= b.South && p[1] <= b.North
}

// terrainGrid samples the ground over b for a shaded relief: cells of the
// elevation data's own spacing at the middle of b, or coarser so the grid
// is at most maxCols wide (a map is rarely wider in pixels); each cell's
// height is the bilinear height at its centre, NaN where no file covers
// it. nil without elevation data or where none covers the middle of b.
func terrainGrid(ts *terrain.Set, b report.Bounds, maxCols int) *report.Grid {
	if ts == nil {
		return nil
	}
	midLat, midLon := (b.South+b.North)/2, (b.West+b.East)/2
	dLat, dLon := 1.0/1200, 1.0/1200 // 3″, the coarser SRTM spacing
	if dg, ok := ts.GridAt(midLat, midLon); ok {
		dLat, dLon = dg.DLatDeg, dg.DLonDeg
	}
	cols := max(2, int(math.Ceil((b.East-b.West)/dLon)))
	rows := max(2, int(math.Ceil((b.North-b.South)/dLat)))
	if cols > maxCols {
		rows = max(2, int(math.Ceil(float64(rows)*float64(maxCols)/float64(cols))))
		cols = maxCols
	}
	g := &report.Grid{Width: cols, Height: rows, Bounds: b, Values: make([]float32, rows*cols)}
	sp := ts.NewSampler()
	cw, ch := (b.East-b.West)/float64(cols), (b.North-b.South)/float64(rows)
	any := false
	for r := range rows {
		lat := b.North - (float64(r)+0.5)*ch
		for c := range cols {
			before := sp.NoData
			h, err := sp.Height(lat, b.West+(float64(c)+0.5)*cw)
			if err != nil || sp.NoData != before {
				g.Values[r*cols+c] = float32(math.NaN())
				continue
			}
			g.Values[r*cols+c] = float32(h)
			any = true
		}
	}
	if !any {
		return nil
	}
	return g
}

// featureBounds is the area a map of points shows: their extent with a
// margin of a sixth each side, at least 1 km across, and widened so the
// shorter side is at least 0.6 of the longer.
func featureBounds(pts []orb.Point) report.Bounds {
	b := report.Bounds{West: math.Inf(1), South: math.Inf(1), East: math.Inf(-1), North: math.Inf(-1)}
	for _, p := range pts {
		b.West, b.East = math.Min(b.West, p[0]), math.Max(b.East, p[0])
		b.South, b.North = math.Min(b.South, p[1]), math.Max(b.North, p[1])
	}
	latM, lonM := report.MetresPerDegree((b.South + b.North) / 2)
	hM := math.Max((b.North-b.South)*latM*4/3, 1000)
	wM := math.Max((b.East-b.West)*lonM*4/3, 1000)
	// Not much wider than tall or taller than wide (the shorter side at
	// least 0.6 of the longer), so the page stays readable.
	wM, hM = math.Max(wM, 0.6*hM), math.Max(hM, 0.6*wM)
	cx, cy := (b.West+b.East)/2, (b.South+b.North)/2
	return report.Bounds{West: math.Max(cx-wM/2/lonM, -180), East: math.Min(cx+wM/2/lonM, 180),
		South: math.Max(cy-hM/2/latM, -89.9), North: math.Min(cy+hM/2/latM, 89.9)}
}

// marginLevels are the levels of a map of margins with needDB needed: 0,
// the need, and 10 and 20 dB above it (0, 10, 20, 30 dB for the usual
// 10 dB), so a line drawn in colour meets the need from the second band
// up.
func marginLevels(needDB float64) []float64 {
	need := math.Round(needDB*10) / 10
	if !(need > 0) {
		return []float64{0, 10, 20}
	}
	return []float64{0, need, need + 10, need + 20}
}

// targetMarkers marks the targets of a route or a site ranking.
func targetMarkers(ts []plan.Target) []report.Marker {
	out := make([]report.Marker, len(ts))
	for i, t := range ts {
		out[i] = report.Marker{At: t.Pos, Label: t.Name, Kind: report.MarkerTarget}
	}
	return out
}

// routeMap draws a route's coverage: the track coloured by the worst
// margin over the required targets at each checked point, the dead
// stretches under it, the best spots to call from, and the targets, over
// a shaded relief of ts (nil: a plain base).
func routeMap(w io.Writer, res *plan.RouteResult, targets []plan.Target, ts *terrain.Set, imperial bool) error {
	tr := report.Track{Label: res.Name}
	var pts []orb.Point
	for _, p := range res.Points {
		tr.Points = append(tr.Points, orb.Point{p.Lon, p.Lat})
		tr.Values = append(tr.Values, p.WorstMarginDB)
	}
	pts = append(pts, tr.Points...)
	m := report.Map{Title: "Coverage along " + res.Name, Imperial: imperial,
		Subtitle: fmt.Sprintf("worst margin over the required targets, both ways; %s dB needed; checked every %s", trimNumber(math.Round(res.NeededMarginDB*10)/10), units.FormatLength(res.SpacingM, imperial)),
		Scale:    report.Scale{Levels: marginLevels(res.NeededMarginDB), Name: "worst margin", Unit: "dB"},
		Credit:   "ITU-R P.526-16 delta-Bullington over the terrain"}
	if len(tr.Points) >= 2 {
		m.Tracks = []report.Track{tr}
	}
	for _, g := range res.Gaps {
		line := res.Piece(g.StartM, g.EndM)
		if len(line) >= 2 {
			m.Stretches = append(m.Stretches, report.Stretch{Line: line, Label: "no contact " + units.FormatLength(g.LengthM, imperial)})
		}
	}
	for _, s := range res.BestSpots {
		m.Markers = append(m.Markers, report.Marker{At: orb.Point{s.Lon, s.Lat}, Label: fmt.Sprintf("call %s %+.0f dB", s.Target, s.MarginDB), Kind: report.MarkerSpot})
	}
	for _, mk := range targetMarkers(targets) {
		m.Markers = append(m.Markers, mk)
		pts = append(pts, mk.At)
	}
	m.Bounds = featureBounds(pts)
	m.Terrain = terrainGrid(ts, m.Bounds, 1600)
	return report.MapPNG(w, m)
}

// sitesMap draws the candidate sites, each numbered by rank and coloured
// by its worst margin, with the targets, over a shaded relief of ts (nil:
// a plain base).
func sitesMap(w io.Writer, res *plan.SitesResult, targets []plan.Target, ts *terrain.Set, imperial bool) error {
	m := report.Map{Title: "Candidate sites for " + res.Station, Imperial: imperial,
		Subtitle: fmt.Sprintf("numbered by rank, coloured by the worst margin over the required targets; %s dB needed", trimNumber(math.Round(res.NeededMarginDB*10)/10)),
		Scale:    report.Scale{Levels: marginLevels(res.NeededMarginDB), Name: "worst margin", Unit: "dB"},
		Credit:   "ITU-R P.526-16 delta-Bullington over the terrain"}
	var pts []orb.Point
	for _, s := range res.Sites {
		m.Markers = append(m.Markers, report.Marker{At: orb.Point{s.Lon, s.Lat}, Label: s.Name, Kind: report.MarkerCandidate, Rank: s.Rank, Value: s.WorstMarginDB, HasValue: true})
		pts = append(pts, orb.Point{s.Lon, s.Lat})
	}
	for _, mk := range targetMarkers(targets) {
		m.Markers = append(m.Markers, mk)
		pts = append(pts, mk.At)
	}
	m.Bounds = featureBounds(pts)
	m.Terrain = terrainGrid(ts, m.Bounds, 1600)
	return report.MapPNG(w, m)
}

// writePlanCoverage computes the coverage maps the plan asks for
// (`coverage:` under a station) and writes each as coverage-NAME.png and
// coverage-NAME.tif into dir, NAME the station's name in lower case with
// every run of other characters than letters and digits as one '-'. It
// returns the files written.
func writePlanCoverage(ctx context.Context, g *globals, p *plan.Plan, ts *terrain.Set, dir string) ([]string, error) {
	var written []string
	used := map[string]bool{}
	cell, err := p.Walker("")
	if err != nil {
		return nil, err
	}
	for _, st := range p.Stations {
		spec := st.Coverage
		if spec == nil {
			continue
		}
		su, err := planCoverageSetup(p, st, cell, p.FreqMHz, spec.Mode, plan.CoverageWorse)
		if err != nil {
			return nil, fmt.Errorf("%s:%d: stations: %s: coverage: %w", p.Path, spec.Line, st.Name, err)
		}
		req := &su.req
		req.RadiusM, req.Mode, req.ResolutionM = spec.RadiusM, spec.Mode, spec.ResolutionM
		req.Value = plan.ValueMargin
		if spec.HasValue {
			req.Value = spec.Value
		}
		levels := spec.Levels
		if levels == nil {
			levels = defaultLevels(spec.Mode, req.Value)
		}
		res, err := coverageCompute(ctx, g, ts, su.model, req, "coverage ")
		if err != nil {
			return nil, fmt.Errorf("%s:%d: stations: %s: coverage: %w", p.Path, spec.Line, st.Name, err)
		}
		for _, w := range res.Warnings {
			fmt.Fprintf(g.stderr, "mastlink: warning: %s: %s\n", st.Name, w)
		}
		v := &coverageView{res: res, mode: spec.Mode, value: req.Value, levels: levels, needDB: req.NeededMarginDB, budget: true,
			siteName: st.Name, site: st.Pos, markers: su.markers, imperial: g.imperial(), model: su.model}
		v.title, v.subtitle = coverageTitles(v, req, su.directions)
		name := "coverage-" + fileSlug(st.Name)
		for i := 2; used[name]; i++ {
			name = fmt.Sprintf("coverage-%s-%d", fileSlug(st.Name), i)
		}
		used[name] = true
		for _, kind := range []string{"png", "tif"} {
			file := name + "." + kind
			if err := writeCoverageFile(filepath.Join(dir, file), kind, p.InputFiles, v, ts); err != nil {
				return nil, err
			}
			written = append(written, file)
		}
	}
	return written, nil
}

// fileSlug is s in lower case with every run of characters other than
// ASCII letters and digits as one '-' ("Valley Base" → "valley-base").
func fileSlug(s string) string {
	var b strings.Builder
	dash := false
	for _, r := range strings.ToLower(s) {
		if r >= 'a' && r <= 'z' || r >= '0' && r <= '9' {
			b.WriteRune(r)
			dash = false
		} else if !dash && b.Len() > 0 {
			b.WriteByte('-')
			dash = true
		}
	}
	out := strings.TrimSuffix(b.String(), "-")
	if out == "" {
		return "station"
	}
	return out
}
