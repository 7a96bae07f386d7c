package main

import (
	"bytes"
	"context"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"strings"

	"github.com/mastlink/mastlink/plan"
	"github.com/mastlink/mastlink/plan/gpx"
	"github.com/mastlink/mastlink/plan/units"
	"github.com/mastlink/mastlink/propagation"
	"github.com/paulmach/orb"
	"github.com/paulmach/orb/geojson"
	"github.com/spf13/cobra"
)

// planOptions are the plan command's own options; the plan file says
// everything else.
type planOptions struct {
	briefing string // --briefing FILE.html (else the plan file's briefing:)
}

func newPlanCmd(g *globals) *cobra.Command {
	o := &planOptions{}
	cmd := &cobra.Command{
		Use:   "plan FILE.yaml [-o DIR]",
		Short: "Evaluate a whole deployment plan: every link both ways, mast sweep, RF exposure",
		Long: `Reads a plan file (YAML: stations with their kit, targets to reach, the
requirement, terrain and waypoints; see examples/valley/plan.yaml) and checks
every station against every target in both directions: talk-in and talk-out
for repeaters, out and back for simplex targets. It adds each station's
RF-exposure keep-out and, when the plan has a mast section, the lowest mast
and lightest cable that meet the requirement.

With -o DIR it writes links.geojson, keepout.geojson, plan.gpx and links.csv
into DIR for maps, GPS units and spreadsheets, plan-map.png (the links by
margin over shaded relief), route-N.geojson and sites.geojson when the plan
has routes and sites, and coverage-NAME.png and coverage-NAME.tif for every
station whose coverage: asks for a map. The plan's relays: entries are
searched as the relay command searches them (text section, relays[] in
the JSON, and the spots as waypoints "Relay N" in plan.gpx). With --briefing FILE.html (or
briefing: in the plan file) it writes the printable briefing for the team:
one self-contained page that prints on A4 or US Letter.`,
		Example: "  mastlink plan examples/valley/plan.yaml\n  mastlink plan examples/valley/plan.yaml --format json\n  mastlink plan examples/valley/plan.yaml -o briefing/\n  mastlink plan examples/valley/plan.yaml --briefing briefing.html",
		Args:    cobra.ExactArgs(1),
		RunE: func(cmd *cobra.Command, args []string) error {
			return runPlan(cmd.Context(), g, o, args)
		},
	}
	cmd.Flags().StringVar(&o.briefing, "briefing", "", "write the printable briefing (one self-contained HTML page) to FILE.html; overrides the plan file's briefing:")
	return cmd
}

// loadPlan reads a plan file and opens its terrain (with --dem as well).
func loadPlan(g *globals, path string) (*plan.Plan, *plan.Env, error) {
	p, err := plan.ReadPlan(path)
	if err != nil {
		return nil, nil, err
	}
	ts, err := g.openTerrain(terrainSource{paths: p.Terrain, where: fmt.Sprintf("%s:%d: terrain", path, p.TerrainAt)})
	if err != nil {
		return nil, nil, err
	}
	if ts == nil {
		g.noticeSmoothEarth()
	}
	return p, p.NewEnv(ts), nil
}

func runPlan(ctx context.Context, g *globals, o *planOptions, args []string) error {
	path := args[0]
	p, env, err := loadPlan(g, path)
	if err != nil {
		return err
	}
	briefing, err := briefingTarget(g, o, p)
	if err != nil {
		return err
	}
	bar := newProgress(g, "links")
	res, err := plan.EvaluatePlan(ctx, p, env, bar.update)
	bar.done()
	if err != nil {
		return err
	}
	if err := addPlanRoutesAndSites(ctx, g, p, env, res); err != nil {
		return err
	}
	relays, err := planRelays(ctx, g, p, env)
	if err != nil {
		return err
	}
	if env.Terrain != nil {
		if m := env.Terrain.Missing(); len(m) > 0 {
			where := "--dem"
			if len(p.Terrain) > 0 {
				where = fmt.Sprintf("%s:%d (terrain)", path, p.TerrainAt)
			}
			w := fmt.Sprintf("no elevation data for %s: the ground there is taken as 0 m; obtain these tiles and add them to %s", strings.Join(m, ", "), where)
			res.Warnings = append(res.Warnings, w)
		}
	}
	res.Warnings = addWarnings(res.Warnings, planWarnings(res)...)
	res.Warnings = addWarnings(res.Warnings, planModelWarnings(res)...)
	for _, w := range res.Warnings {
		fmt.Fprintf(g.stderr, "mastlink: warning: %s\n", w)
	}
	if g.out != "" {
		if err := writePlanOutputs(g, p, env, res, relays); err != nil {
			return err
		}
		maps, err := writePlanCoverage(ctx, g, p, env.Terrain, g.out)
		if err != nil {
			return err
		}
		if len(maps) > 0 {
			fmt.Fprintf(g.stderr, "mastlink: wrote %s to %s\n", strings.Join(maps, ", "), g.out)
		}
	}
	if briefing != "" {
		if err := writePlanBriefing(g, briefing, p, env, res); err != nil {
			return err
		}
	}
	return g.emit(newPlanJSON(res, relays), func(w io.Writer) error { g.cautionsToStderr(res.Cautions); return writeLinksCSV(w, res.Links) },
		func(w io.Writer) error {
			renderPlanText(w, p, env, terrainFrom(g, p), res, relays, g.imperial())
			return nil
		})
}

// terrainFrom names where the elevation data came from: the --dem paths
// and the plan's terrain: line.
func terrainFrom(g *globals, p *plan.Plan) string {
	var parts []string
	if d := g.demPaths(); len(d) > 0 {
		parts = append(parts, strings.Join(d, ", ")+" (--dem)")
	}
	if len(p.Terrain) > 0 {
		parts = append(parts, strings.Join(relPaths(p.Terrain), ", "))
	}
	return strings.Join(parts, " and ")
}

// planModelWarnings gathers the model's warnings (Longley–Rice ITM) of the
// plan's links, mast sweep, routes and sites.
func planModelWarnings(res *plan.PlanResult) []string {
	out := linkModelWarnings(res.Links)
	if res.Mast != nil {
		for _, w := range res.Mast.Warnings {
			out = append(out, "mast sweep: "+w)
		}
	}
	for _, r := range res.Routes {
		for _, w := range r.Warnings {
			out = append(out, fmt.Sprintf("route %s: %s", r.Name, w))
		}
	}
	if res.Sites != nil {
		for _, w := range res.Sites.Warnings {
			out = append(out, "sites: "+w)
		}
	}
	return out
}

// planWarnings points out what a briefing should not miss.
func planWarnings(res *plan.PlanResult) []string {
	var out []string
	for _, l := range res.Links {
		if l.Optional || l.MeetsRequirement == nil || *l.MeetsRequirement {
			continue
		}
		if l.MarginDB < 0 {
			out = append(out, fmt.Sprintf("%s → %s (%s) is not expected to work: %.1f dB below sensitivity", l.From, l.To, l.Direction, -l.MarginDB))
		}
	}
	return out
}

func writeLinksCSV(w io.Writer, links []plan.LinkResult) error {
	rows := make([][]string, len(links))
	for i, l := range links {
		rows[i] = linkCSVRow(l)
	}
	return writeCSV(w, linkCSVHeader, rows)
}

// renderPlanText writes the plan result as a briefing.
func renderPlanText(w io.Writer, p *plan.Plan, env *plan.Env, terrainFrom string, res *plan.PlanResult, relays []planRelay, im bool) {
	title := res.Name
	if title == "" {
		title = filepath.Base(p.Path)
	}
	fmt.Fprintln(w, title)
	fmt.Fprintln(w, strings.Repeat("=", len([]rune(title))))
	req := fmt.Sprintf("%.1f dB of margin on every required link", res.NeededMarginDB)
	switch {
	case p.Require.ByModel:
		req = itmRequirementText(p.Require)
	case res.DefaultMargin:
		req = fmt.Sprintf("%.1f dB of margin (default; the plan's require: asks for none)", res.NeededMarginDB)
	case p.Require.Reliability > 0:
		req += fmt.Sprintf(" (asked: %.1f dB, and %.0f%% of locations with σ %.1f dB)", p.Require.MarginDB, 100*p.Require.Reliability, p.Require.SigmaDB)
	}
	fmt.Fprintf(w, "Requirement: %s\n", req)
	terr := "smooth earth (no elevation data)"
	if env.Terrain != nil {
		terr = fmt.Sprintf("%d elevation file(s) from %s", env.Terrain.Len(), terrainFrom)
	}
	if _, ok := p.Model.(propagation.ITM); ok {
		fmt.Fprintf(w, "Terrain: %s; %s\n\n", terr, modelLine(p.Model))
	} else {
		fmt.Fprintf(w, "Terrain: %s; k = %.3g; %s\n\n", terr, p.K, propagation.ModelDescription(p.Model.Name()))
	}

	for _, s := range res.Stations {
		cable := "no feedline given"
		if s.Cable != "" {
			cable = fmt.Sprintf("%s, %s", s.Cable, units.FormatLength(s.CableLengthM, im))
		}
		fmt.Fprintf(w, "%s at %.5f,%.5f (ground %s): %s, %s at %s, %s\n", s.Name, s.Lat, s.Lon, units.FormatHeight(s.GroundM, im),
			units.FormatPower(s.PowerW), fmt.Sprintf("%.2f dBi", s.GainDBi), units.FormatHeight(s.HeightM, im), cable)
		what := "required targets"
		if len(res.Stations) > 1 {
			what = "required targets and other stations"
		}
		fmt.Fprintf(w, "  reaches %d of %d %s in both directions\n\n", s.Reached, s.Of, what)
		t := newTable(w)
		head := []string{"  target", "way", "MHz", "distance", "bearing", "path loss", "received", "margin", "clearance", "verdict"}
		_, itm := p.Model.(propagation.ITM)
		if itm {
			head = append(head, "ITM mode")
		}
		t.row(head...)
		for _, l := range res.Links {
			if l.From != s.Name && l.To != s.Name {
				continue
			}
			// The bearing is the station's own, towards the target, in every
			// row: the receiving end's azimuth when the target transmits.
			target := l.To
			bearing := l.AzimuthDeg
			if l.To == s.Name {
				target = l.From
				bearing = l.RxAzimuthDeg
			}
			if l.Optional {
				target += " (optional)"
			}
			if l.SamePlace {
				t.row("  "+target, l.Direction, fmt.Sprintf("%.3f", l.FreqMHz), units.FormatLength(l.DistanceM, im), "-", "-", "-", "-", "-", "same place")
				continue
			}
			row := []string{"  " + target, l.Direction, fmt.Sprintf("%.3f", l.FreqMHz), units.FormatLength(l.DistanceM, im), bearingText(bearing),
				fmt.Sprintf("%.1f dB", l.PathLossDB), fmt.Sprintf("%.1f dBm", l.RxPowerDBm), fmt.Sprintf("%+.1f dB", l.MarginDB), clearance(l), linkVerdict(l)}
			if itm && l.ITM != nil {
				row = append(row, l.ITM.Mode)
			}
			t.row(row...)
		}
		t.flush()
		fmt.Fprintln(w)
	}
	switch {
	case len(res.Masts) > 0:
		for _, m := range res.Masts {
			renderMastText(w, m, im)
		}
	case res.Mast != nil:
		renderMastText(w, res.Mast, im)
	}
	renderPlanRoutesAndSites(w, res, im)
	renderPlanRelays(w, relays, im)
	fmt.Fprintln(w, "RF exposure (keep people this far from the mast foot while transmitting; rounded up)")
	t := newTable(w)
	t.row("  station", "mast", "MHz", "EIRP", "public", "operators", "limits")
	for _, e := range res.Exposure {
		t.row("  "+exposureLabel(e), units.FormatHeight(e.AntennaHeightM, im), fmt.Sprintf("%.3f", e.FreqMHz), units.FormatPower(e.EIRPW), keepout(e.KeepoutPublicM, im), keepout(e.KeepoutOccupationalM, im), standardNames[e.Standard])
	}
	t.flush()
	for _, e := range res.Exposure {
		if e.LimitsFromMemory {
			fmt.Fprintf(w, "  %s: %s.\n", e.Station, limitsText(e.Report))
			break
		}
	}
	fmt.Fprintln(w)
	writeCautions(w, res.Cautions)
	if len(res.Warnings) > 0 {
		fmt.Fprintln(w, "\nWarnings:")
		for _, x := range res.Warnings {
			fmt.Fprintf(w, "  - %s\n", x)
		}
	}
	fmt.Fprintln(w)
	if res.MeetsRequirement {
		fmt.Fprintln(w, "Verdict: every required link meets the requirement.")
	} else {
		fmt.Fprintln(w, "Verdict: some required links fall short; see the table above and the mast sweep.")
	}
}

// bearingText renders an azimuth as whole degrees "047°", 359.6° as "000°".
func bearingText(deg float64) string {
	return fmt.Sprintf("%03.0f°", math.Mod(math.Round(deg), 360))
}

// keepout renders a keep-out radius for the plan's table, rounded up.
func keepout(m float64, im bool) string {
	if m <= 0 {
		return "none needed"
	}
	return safeLength(m, im)
}

// exposureLabel names a station's exposure row: the station as planned, or
// with the mast sweep's recommended mast and cable.
func exposureLabel(e plan.StationExposure) string {
	if e.Configuration == plan.ConfigRecommended {
		return fmt.Sprintf("%s (recommended mast, %s)", e.Station, e.Cable)
	}
	return e.Station
}

func clearance(l plan.LinkResult) string {
	if l.WorstClearanceF1 == nil {
		return "-"
	}
	c := *l.WorstClearanceF1
	if !l.LineOfSight {
		return "blocked"
	}
	return fmt.Sprintf("%.2f F1", c)
}

func linkVerdict(l plan.LinkResult) string {
	switch {
	case l.MeetsRequirement != nil && *l.MeetsRequirement:
		return "ok"
	case l.MarginDB >= 0:
		return "short"
	default:
		return "no"
	}
}

func relPaths(ps []string) []string {
	out := make([]string, len(ps))
	wd, _ := os.Getwd()
	for i, p := range ps {
		if r, err := filepath.Rel(wd, p); err == nil && !strings.HasPrefix(r, "..") {
			out[i] = r
		} else {
			out[i] = p
		}
	}
	return out
}

// writePlanOutputs writes links.geojson, keepout.geojson, plan.gpx and
// links.csv (and route-N.geojson, sites.geojson) into the directory g.out.
// Every file is rendered and every name checked against the plan's inputs
// before the first is written, so a refusal leaves nothing half done.
func writePlanOutputs(g *globals, p *plan.Plan, env *plan.Env, res *plan.PlanResult, relays []planRelay) error {
	dir := g.out
	if ext := extension(dir); ext != "" {
		return usagef("-o: %q: plan writes several files; give a directory", dir)
	}
	if st, err := os.Stat(dir); err == nil && !st.IsDir() {
		return usagef("-o: %s is a file; plan writes several files, give a directory", dir)
	}
	type output struct {
		name   string
		render func(w io.Writer) error
	}
	outs := []output{
		{"links.geojson", func(w io.Writer) error { return writeJSON(w, linksGeoJSON(p, res)) }},
		{"keepout.geojson", func(w io.Writer) error {
			var sites []keepoutSite
			for _, e := range res.Exposure {
				sites = append(sites, keepoutSite{name: exposureLabel(e), pos: orb.Point{e.Lon, e.Lat}, rep: e.Report})
			}
			fc, err := keepoutGeoJSON(sites)
			if err != nil {
				return err
			}
			return writeJSON(w, fc)
		}},
		{"plan.gpx", func(w io.Writer) error { return writePlanGPX(w, p, res, relays) }},
		{"links.csv", func(w io.Writer) error { return writeLinksCSV(w, res.Links) }},
		{planMapFile, func(w io.Writer) error { return writePlanMap(w, p, env, res, g.imperial()) }},
	}
	for i := range res.Routes {
		r := &res.Routes[i]
		outs = append(outs, output{fmt.Sprintf("route-%d.geojson", i+1), func(w io.Writer) error { return writeJSON(w, routeGeoJSON(r)) }})
	}
	if res.Sites != nil {
		outs = append(outs, output{"sites.geojson", func(w io.Writer) error { return writeJSON(w, sitesGeoJSON(res.Sites)) }})
	}
	data := make([][]byte, len(outs))
	for i, o := range outs {
		path := filepath.Join(dir, o.name)
		if err := checkNotInput("-o", path, p.InputFiles); err != nil {
			return usagef("-o: %s would be written over %s, an input of this plan; choose another directory", dir, path)
		}
		if st, err := os.Stat(path); err == nil && st.IsDir() {
			return usagef("-o: %s is a directory; plan writes a file of that name there, choose another directory", path)
		}
		var buf bytes.Buffer
		if err := o.render(&buf); err != nil {
			return fmt.Errorf("%s: %w", o.name, err)
		}
		data[i] = buf.Bytes()
	}
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return fmt.Errorf("-o: %w", err)
	}
	written := make([]string, len(outs))
	for i, o := range outs {
		if err := writeFileAtomic(filepath.Join(dir, o.name), data[i], p.InputFiles); err != nil {
			return err
		}
		written[i] = o.name
	}
	fmt.Fprintf(g.stderr, "mastlink: wrote %s to %s\n", strings.Join(written, ", "), dir)
	return nil
}

// linksGeoJSON is every link of the plan as a line with its figures.
func linksGeoJSON(p *plan.Plan, res *plan.PlanResult) *geojson.FeatureCollection {
	fc := geojson.NewFeatureCollection()
	for _, l := range res.Links {
		if l.SamePlace { // no line to draw
			continue
		}
		a, b := endpoints(p, l)
		f := geojson.NewFeature(splitAntimeridian(orb.LineString{a, b}))
		f.Properties["from"] = l.From
		f.Properties["to"] = l.To
		f.Properties["direction"] = l.Direction
		f.Properties["freq_mhz"] = l.FreqMHz
		f.Properties["distance_m"] = round2(l.DistanceM)
		f.Properties["path_loss_db"] = round2(l.PathLossDB)
		f.Properties["rx_power_dbm"] = round2(l.RxPowerDBm)
		f.Properties["margin_db"] = round2(l.MarginDB)
		f.Properties["line_of_sight"] = l.LineOfSight
		if l.WorstClearanceF1 != nil {
			f.Properties["worst_clearance_f1"] = round2(*l.WorstClearanceF1)
		}
		if l.MeetsRequirement != nil {
			f.Properties["meets_requirement"] = *l.MeetsRequirement
		}
		f.Properties["optional"] = l.Optional
		fc.Append(f)
	}
	return fc
}

// endpoints finds the positions of a link's two ends in the plan.
func endpoints(p *plan.Plan, l plan.LinkResult) (orb.Point, orb.Point) {
	pos := map[string]orb.Point{}
	for _, s := range p.Stations {
		pos[s.Name] = s.Pos
	}
	for _, t := range p.Targets {
		pos[t.Name] = t.Pos
	}
	return pos[l.From], pos[l.To]
}

// writePlanGPX writes the plan's places as waypoints annotated with their
// worst margins, and the relays' spots, for a GPS.
func writePlanGPX(w io.Writer, p *plan.Plan, res *plan.PlanResult, relays []planRelay) error {
	// No time of writing: the same plan gives the same bytes.
	out := gpx.Output{Name: res.Name}
	for i, s := range p.Stations {
		sum := res.Stations[i]
		out.Waypoints = append(out.Waypoints, gpx.Place{Name: s.Name, Pos: s.Pos, ElevM: sum.GroundM, Symbol: "Flag",
			Description: fmt.Sprintf("station: %s, antenna %.1f m; reaches %d of %d required targets", units.FormatPower(s.Radio.PowerW), s.Antenna.HeightM, sum.Reached, sum.Of)})
	}
	for _, t := range p.Targets {
		worst := math.Inf(1)
		var parts []string
		for _, l := range res.Links {
			if (l.From == t.Name || l.To == t.Name) && !l.SamePlace {
				if l.MarginDB < worst {
					worst = l.MarginDB
				}
				parts = append(parts, fmt.Sprintf("%s %+.1f dB", l.Direction, l.MarginDB))
			}
		}
		desc := fmt.Sprintf("worst margin %+.1f dB (%s)", worst, strings.Join(parts, ", "))
		if len(parts) == 0 {
			desc = "not evaluated: at a station's place"
		}
		out.Waypoints = append(out.Waypoints, gpx.Place{Name: t.Name, Pos: t.Pos, ElevM: math.NaN(), Symbol: "Waypoint", Description: desc})
	}
	out.Waypoints = append(out.Waypoints, relayWaypoints(relays)...)
	b, err := gpx.Encode(out)
	if err != nil {
		return err
	}
	_, err = w.Write(b)
	return err
}
