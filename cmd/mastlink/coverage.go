package main

import (
	"context"
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"strings"

	"github.com/mastlink/mastlink/plan"
	"github.com/mastlink/mastlink/plan/report"
	"github.com/mastlink/mastlink/plan/units"
	"github.com/mastlink/mastlink/propagation"
	"github.com/mastlink/mastlink/terrain"
	"github.com/spf13/cobra"
)

type coverageOptions struct {
	from, radius, mode, freq, value, resolution, levels, direction string
	planFile, station                                              string
	k, polarization, ground, model                                 string
	itm                                                            itmFlags
	site, cell                                                     endFlags
	req                                                            plan.RequirementOptions // --margin, --reliability, --sigma
	points                                                         pointResolver
	changed                                                        func(flag string) bool
}

// coveragePlanFlags are the flags a plan replaces (its station, its
// defaults and its requirement); --height, --target-height, --freq and
// --from still apply.
var coveragePlanFlags = append([]string{"model", "power", "gain", "cable", "cable-length", "connectors", "swr", "sens",
	"target-power", "target-gain", "target-cable", "target-cable-length", "target-connectors", "target-swr", "rx-sens",
	"margin", "reliability", "sigma", "k", "polarization", "ground",
	"antenna", "bearing", "body-loss", "clutter", "target-antenna", "target-bearing", "target-body-loss", "target-clutter"}, itmFlagNames...)

// coverageKitFlags are the flags that make the kit known (so the map's
// value defaults to the margin).
var coverageKitFlags = []string{"power", "gain", "antenna", "cable", "sens", "target-power", "target-gain", "target-antenna", "target-cable", "rx-sens", "margin", "reliability"}

func newCoverageCmd(g *globals) *cobra.Command {
	o := &coverageOptions{}
	cmd := &cobra.Command{
		Use:   "coverage --from P --radius L [--height L] [--target-height L] [--mode los|loss] [--freq F] [--value loss|received|margin] [--model terrain|itm|free-space] [--plan FILE --station NAME] [--resolution L] [--levels LIST] -o F.tif|.png|.kmz|.geojson",
		Short: "Area coverage around a site: line of sight or the link over terrain in every cell within a radius",
		Long: `Maps every cell within --radius of a site: line of sight (--mode los: 1
visible, 0 hidden, with the earth's curvature for --k) or the link over the
terrain (--mode loss, the default: ITU-R P.526-16 delta-Bullington, walked
along radials from the site) as path loss in dB, received level in dBm, or
margin in dB over the receiver's sensitivity (--value; margin is the default
when the kit is known from a plan or kit flags, path loss otherwise).

The site's kit comes from --power, --gain, --height, --cable … and the radio
in each cell from --target-gain, --target-height, --rx-sens …; with
--target-power (and --sens, the site's receiver) the way back is mapped too.
With --plan the site is the plan's station (--station NAME, default the
first) and each cell holds the plan's handheld (its defaults); both ways are
mapped and each cell takes the worse of the two unless --direction says out
or back.

The grid follows the elevation data's own cells (1″ or 3″) unless
--resolution gives a cell size; outside the data the ground is a smooth
earth at sea level, said once on stderr. -o writes the map: .tif a float32
GeoTIFF (EPSG:4326, nodata -9999 outside the radius), .png a map over a
shaded relief with legend, scale bar and north arrow, .kmz a KML 2.2 ground
overlay, .geojson the areas at or above each of --levels.

--model itm (or a plan whose model: is itm) maps the Longley–Rice ITM,
which the radial engine does not walk: the map falls back to one terrain
profile per cell, each cell exactly what link gives to the cell's centre.
That costs one terrain profile per cell: about 15× slower than the radial
engine at 12 km on 3″ data, and the factor grows with the radius in cells
(each profile is as long as its cell is far; far more at 40 km on 1″
data): keep the radius small. The ITM's warnings are counted over the
cells. --model free-space is mapped the same way. Line of sight (--mode
los) does not depend on the model.

` + itmHelp,
		Example: "  mastlink coverage --plan examples/valley/plan.yaml --radius 15km -o coverage.png\n" +
			"  mastlink coverage --dem examples/terrain --from -48.4467,-123.9492 --height 20m --mode los --radius 20km -o sight.tif\n" +
			"  mastlink coverage --dem tiles/ --from 46.5,8.05 --freq 146.55 --power 25W --height 9m --rx-sens -119dBm --radius 10km -o margin.kmz",
		Args: cobra.NoArgs,
		RunE: func(cmd *cobra.Command, args []string) error {
			return runCoverage(cmd.Context(), g, o, args)
		},
	}
	f := cmd.Flags()
	o.changed = f.Changed
	f.StringVar(&o.from, "from", "", "the site: LAT,LON or waypoint (default with --plan: the station's place)")
	f.StringVar(&o.radius, "radius", "", "radius of the map [m] (required)")
	f.StringVar(&o.mode, "mode", "loss", "loss (the link over terrain) or los (line of sight)")
	f.StringVar(&o.freq, "freq", "", "frequency [MHz] (loss mode; default with --plan: the plan's)")
	f.StringVar(&o.value, "value", "", "what a loss map holds: loss (dB), received (dBm) or margin (dB)")
	f.StringVar(&o.resolution, "resolution", "", "cell size [m] (default: the elevation data's own cells)")
	f.StringVar(&o.levels, "levels", "", "levels of the legend and of the .geojson areas, comma separated, in the value's unit (default by value)")
	f.StringVar(&o.direction, "direction", "worse", "with a way back: out (site transmits), back (cell transmits) or worse (the lower of the two)")
	f.StringVar(&o.planFile, "plan", "", "plan file (YAML) giving the site's kit, the handheld in each cell, the requirement and terrain")
	f.StringVar(&o.station, "station", "", "with --plan: the station at the site (default: the first)")
	addKitFlags(cmd, &o.site, "", "site ", true)
	addSensFlag(cmd, &o.site, "sens", "site receiver sensitivity, for the way back [dBm] (µV across 50 Ω accepted)")
	addKitFlags(cmd, &o.cell, "target-", "cell ", false)
	f.StringVar(&o.cell.power, "target-power", "", "transmitter power of the radio in each cell, for the way back [W]")
	addSensFlag(cmd, &o.cell, "rx-sens", "receiver sensitivity in each cell [dBm] (µV across 50 Ω accepted)")
	f.StringVar(&o.req.Margin, "margin", "10dB", "margin a covered cell needs [dB]")
	f.StringVar(&o.req.Reliability, "reliability", "", "wanted fraction of locations, e.g. 90%: raises the margin needed")
	f.StringVar(&o.req.Sigma, "sigma", "5.5dB", "location variability σ [dB] used with --reliability")
	f.StringVar(&o.k, "k", "4/3", "effective earth-radius factor")
	f.StringVar(&o.polarization, "polarization", "vertical", "vertical or horizontal")
	f.StringVar(&o.ground, "ground", "land", "ground constants: land or sea (ITU-R P.1812)")
	f.StringVar(&o.model, "model", "terrain", "propagation model of a loss map: terrain (ITU-R P.526-16 delta-Bullington, radial engine), itm (Longley–Rice ITM 1.2.2) or free-space (one profile per cell: slower, keep the radius small)")
	addITMFlags(cmd, &o.itm)
	addWaypointsFlag(cmd, &o.points)
	_ = cmd.MarkFlagRequired("radius")
	return cmd
}

// coverageOutput is the JSON of `mastlink coverage`.
type coverageOutput struct {
	Site            string    `json:"site"`
	Lat             float64   `json:"lat"`
	Lon             float64   `json:"lon"`
	GroundM         float64   `json:"ground_m"`
	HeightM         float64   `json:"height_m"`
	TargetHeightM   float64   `json:"target_height_m"`
	RadiusM         float64   `json:"radius_m"`
	Mode            string    `json:"mode"`
	Value           string    `json:"value"`
	Unit            string    `json:"unit"`
	FreqMHz         float64   `json:"freq_mhz,omitempty"`
	Directions      []string  `json:"directions,omitempty"`
	NeededMarginDB  *float64  `json:"needed_margin_db,omitempty"`
	CellNorthM      float64   `json:"cell_north_m"`
	CellEastM       float64   `json:"cell_east_m"`
	Rows            int       `json:"rows"`
	Cols            int       `json:"cols"`
	WestDeg         float64   `json:"west_deg"`
	SouthDeg        float64   `json:"south_deg"`
	EastDeg         float64   `json:"east_deg"`
	NorthDeg        float64   `json:"north_deg"`
	Radials         int       `json:"radials"`
	Cells           int       `json:"cells"`
	CoveredFraction float64   `json:"covered_fraction"`
	Model           string    `json:"model,omitempty"` // loss mode: the propagation model
	Engine          string    `json:"engine"`          // "radials" or "cells" (one profile per cell)
	Levels          []float64 `json:"levels"`
	LevelCells      []int     `json:"level_cells"`
	LevelFractions  []float64 `json:"level_fractions"`
	SmoothEarth     bool      `json:"smooth_earth"`
	Output          string    `json:"output,omitempty"`
	Warnings        []string  `json:"warnings,omitempty"`
}

// coverageSetup is a coverage request resolved from the flags or a plan.
type coverageSetup struct {
	req        plan.CoverageRequest
	siteName   string
	directions []string
	budget     bool
	markers    []report.Marker
	inputs     []string
	ts         *terrain.Set
	demPaths   []string          // elevation files and folders in use
	model      propagation.Model // of a loss map; nil: delta-Bullington
}

func runCoverage(ctx context.Context, g *globals, o *coverageOptions, args []string) error {
	radius, err := quantity("radius", o.radius, units.ParseLengthM)
	if err != nil {
		return err
	}
	if !(radius > 0) {
		return usagef("--radius: give a radius above 0 m")
	}
	mode, err := plan.ParseCoverageMode(o.mode)
	if err != nil {
		return usagef("--mode: %v", err)
	}
	var outKind string
	if g.out != "" {
		if outKind, err = outputKind(g.out, coverageKinds...); err != nil {
			return err
		}
	}
	if o.value != "" {
		if _, err := plan.ParseCoverageValue(o.value); err != nil {
			return usagef("--value: %v", err)
		}
		if mode == plan.CoverageLOS {
			return usagef("--value: a line-of-sight map holds visible or hidden; drop --value or use --mode loss")
		}
	}
	if o.levels != "" {
		if _, err := plan.ParseCoverageLevels(o.levels); err != nil {
			return usagef("--levels: %v", err)
		}
	}
	dir, err := plan.ParseCoverageDirection(o.direction)
	if err != nil {
		return usagef("--direction: %v", err)
	}
	var resM float64
	if o.resolution != "" {
		if resM, err = quantity("resolution", o.resolution, units.ParseLengthM); err != nil {
			return err
		}
		if !(resM > 0) {
			return usagef("--resolution: give a cell size above 0 m")
		}
	}
	var su *coverageSetup
	if o.planFile != "" {
		su, err = o.fromPlan(g, mode, dir)
	} else {
		su, err = o.fromFlags(g, mode, dir)
	}
	if err != nil {
		return err
	}
	req := &su.req
	req.RadiusM, req.Mode, req.ResolutionM = radius, mode, resM
	if mode == plan.CoverageLoss {
		if req.Value, err = o.pickValue(su.budget); err != nil {
			return err
		}
	}
	levels := defaultLevels(mode, req.Value)
	if o.levels != "" {
		if levels, err = plan.ParseCoverageLevels(o.levels); err != nil {
			return usagef("--levels: %v", err)
		}
	}
	if g.out != "" {
		if err := checkNotInput("--out", g.out, su.inputs); err != nil {
			return err
		}
		if err := checkNotDEM(g.out, su.demPaths); err != nil {
			return err
		}
	}
	if su.ts != nil {
		if _, ok := su.ts.GridAt(req.Site.Lat(), req.Site.Lon()); !ok {
			return fmt.Errorf("--from: %.5f,%.5f is outside every elevation file given; add the tile that covers it, or leave out the elevation data for a smooth earth", req.Site.Lat(), req.Site.Lon())
		}
	}
	res, err := coverageCompute(ctx, g, su.ts, su.model, req, "")
	if err != nil {
		if errors.Is(err, plan.ErrCoverage) {
			return usageError{err}
		}
		return err
	}
	for _, w := range res.Warnings {
		fmt.Fprintf(g.stderr, "mastlink: warning: %s\n", w)
	}
	v := &coverageView{res: res, mode: mode, value: req.Value, levels: levels, needDB: req.NeededMarginDB, budget: su.budget,
		siteName: su.siteName, site: req.Site, markers: su.markers, imperial: g.imperial(), model: su.model}
	v.title, v.subtitle = coverageTitles(v, req, su.directions)
	if outKind != "" {
		if err := writeCoverageFile(g.out, outKind, su.inputs, v, su.ts); err != nil {
			return err
		}
		g.wrote()
	}
	out := coverageJSON(v, req, su)
	out.Output = g.out
	return g.emit(out, nil, func(w io.Writer) error { renderCoverageText(w, v, &out, g.imperial()); return nil })
}

// pickValue reads --value; margin is the default when the kit is known.
func (o *coverageOptions) pickValue(budget bool) (plan.CoverageValue, error) {
	if o.value == "" {
		if budget {
			return plan.ValueMargin, nil
		}
		return plan.ValuePathLoss, nil
	}
	v, err := plan.ParseCoverageValue(o.value)
	if err != nil {
		return 0, usagef("--value: %v", err)
	}
	if v != plan.ValuePathLoss && !budget {
		// From flags the kit has defaults, so it is always there.
		return 0, usagef("--value: %s needs the kit: give --power and --rx-sens, or --plan", o.value)
	}
	return v, nil
}

// fromFlags resolves the site, its kit and the radio in each cell from
// the flags.
func (o *coverageOptions) fromFlags(g *globals, mode plan.CoverageMode, dir plan.CoverageDirection) (*coverageSetup, error) {
	if o.station != "" {
		return nil, usagef("--station needs --plan")
	}
	if o.from == "" {
		return nil, usagef("--from: give the site as LAT,LON or a waypoint name (or --plan)")
	}
	su := &coverageSetup{}
	pos, name, err := o.points.resolve("--from", o.from)
	if err != nil {
		return nil, err
	}
	su.siteName = name
	su.inputs = append(su.inputs, o.points.file)
	req := &su.req
	req.Site = pos
	if req.K, err = quantity("k", o.k, units.ParseKFactor); err != nil {
		return nil, err
	}
	if req.Polarization, err = plan.ParsePolarization(o.polarization); err != nil {
		return nil, usagef("--polarization: %v", err)
	}
	if req.Ground, err = plan.ParseGround(o.ground); err != nil {
		return nil, usagef("--ground: %v", err)
	}
	env := &plan.Env{}
	if mode == plan.CoverageLOS {
		if o.changed("model") {
			return nil, usagef("--model: a line-of-sight map does not depend on the propagation model; drop --model or use --mode loss")
		}
		for _, f := range itmFlagNames {
			if o.changed(f) {
				return nil, usagef("--%s: a line-of-sight map does not depend on the propagation model; drop it or use --mode loss with --model itm", f)
			}
		}
	} else {
		if env.Model, err = propagation.ModelByName(o.model); err != nil {
			return nil, usagef("--model: %q is not a model (use %s)", o.model, strings.Join(propagation.ModelNames(), " or "))
		}
		if env.Model, err = o.itm.model(env.Model, req.Polarization); err != nil {
			return nil, err
		}
	}
	site, err := o.site.end(name)
	if err != nil {
		return nil, err
	}
	cell, err := o.cell.end("cell")
	if err != nil {
		return nil, err
	}
	req.SiteHeightM, req.TargetHeightM = site.Antenna.HeightM, cell.Antenna.HeightM
	req.SitePattern = site.Antenna.CoveragePattern()
	if a := site.Antenna; a.Directional() && !a.Aimed {
		fmt.Fprintf(g.stderr, "mastlink: note: the map takes the site's %s at its peak gain toward every cell (as if turned to each); give --bearing to apply its pattern\n", a.Name())
	}
	if a := cell.Antenna; a.Directional() {
		fmt.Fprintf(g.stderr, "mastlink: note: the %s in each cell is taken as turned toward the site (its peak gain)\n", a.Name())
	}
	if mode == plan.CoverageLoss {
		if o.freq == "" {
			return nil, usagef("--freq: give the frequency of the link (loss mode), or use --mode los")
		}
		if req.FreqMHz, err = quantity("freq", o.freq, units.ParseFreqMHz); err != nil {
			return nil, err
		}
		for _, f := range coverageKitFlags {
			su.budget = su.budget || o.changed(f)
		}
		su.budget = su.budget || (o.value != "" && o.value != "loss")
		if su.budget {
			var rq plan.Requirement
			if err := o.req.Apply(&rq); err != nil {
				return nil, optionUsage(err)
			}
			if err := o.itm.requirement(env, &rq); err != nil {
				return nil, err
			}
			req.NeededMarginDB = rq.NeededMarginDB()
			if cell.Radio.PowerW == 0 && dir == plan.CoverageBack {
				return nil, usagef("--direction: back needs --target-power, the power of the radio in each cell")
			}
			if req.Budgets, err = plan.CoverageBudgets(site, cell, req.FreqMHz, dir); err != nil {
				return nil, usageError{err}
			}
			su.directions = coverageDirections(site, cell, dir)
		}
	}
	su.model = env.Model
	if su.ts, err = g.openTerrain(); err != nil {
		return nil, err
	}
	su.demPaths = g.demPaths()
	if su.ts == nil {
		g.noticeSmoothEarth()
	}
	return su, nil
}

// fromPlan resolves the site (the plan's station, or --from), its kit and
// the handheld in each cell from a plan file.
func (o *coverageOptions) fromPlan(g *globals, mode plan.CoverageMode, dir plan.CoverageDirection) (*coverageSetup, error) {
	for _, name := range coveragePlanFlags {
		if o.changed(name) {
			return nil, usagef("--%s: with --plan the kit, requirement and radio climate come from the plan file; edit it, or drop --plan", name)
		}
	}
	p, err := plan.ReadPlan(o.planFile)
	if err != nil {
		return nil, err
	}
	st, err := p.StationNamed(o.station)
	if err != nil {
		return nil, usagef("--station: %v", err)
	}
	ts, err := g.openTerrain(terrainSource{paths: p.Terrain, where: fmt.Sprintf("%s:%d: terrain", p.Path, p.TerrainAt)})
	if err != nil {
		return nil, err
	}
	if ts == nil {
		g.noticeSmoothEarth()
	}
	if o.from != "" {
		o.points.gpx = p.Waypoints
		if p.Waypoints != nil {
			o.points.file = p.Waypoints.Path
		}
		pos, name, err := o.points.resolve("--from", o.from)
		if err != nil {
			return nil, err
		}
		st.Pos, st.Name = pos, st.Name+" at "+name
	}
	cell, err := p.Walker("")
	if err != nil {
		return nil, err
	}
	if o.changed("height") {
		if st.Antenna.HeightM, err = quantity("height", o.site.height, units.ParseLengthM); err != nil {
			return nil, err
		}
	}
	if o.changed("target-height") {
		if cell.Antenna.HeightM, err = quantity("target-height", o.cell.height, units.ParseLengthM); err != nil {
			return nil, err
		}
	}
	freq := p.FreqMHz
	if o.freq != "" {
		if freq, err = quantity("freq", o.freq, units.ParseFreqMHz); err != nil {
			return nil, err
		}
	}
	su, err := planCoverageSetup(p, st, cell, freq, mode, dir)
	if err != nil {
		return nil, err
	}
	su.ts = ts
	su.demPaths = append(g.demPaths(), p.Terrain...)
	return su, nil
}

// planCoverageSetup builds the coverage request around station st of plan
// p with the radio cell in every cell (both ways, per dir), as `coverage
// --plan` and `plan -o` make it.
func planCoverageSetup(p *plan.Plan, st plan.Station, cell plan.End, freqMHz float64, mode plan.CoverageMode, dir plan.CoverageDirection) (*coverageSetup, error) {
	su := &coverageSetup{siteName: st.Name, inputs: p.InputFiles, budget: true, model: p.Model}
	su.req = plan.CoverageRequest{Site: st.Pos, SiteHeightM: st.Antenna.HeightM, TargetHeightM: cell.Antenna.HeightM,
		K: p.K, Polarization: p.Polarization, Ground: p.Ground, NeededMarginDB: p.Require.NeededMarginDB()}
	if mode == plan.CoverageLoss {
		if !(freqMHz > 0) {
			return nil, usagef("--freq: the plan gives no frequency; give one")
		}
		su.req.FreqMHz = freqMHz
		var err error
		if su.req.Budgets, err = plan.CoverageBudgets(st.End, cell, freqMHz, dir); err != nil {
			return nil, err
		}
		su.req.SitePattern = st.Antenna.CoveragePattern()
		su.directions = coverageDirections(st.End, cell, dir)
	}
	for _, t := range p.Targets {
		su.markers = append(su.markers, report.Marker{At: t.Pos, Label: t.Name, Kind: report.MarkerTarget})
	}
	for _, s := range p.Stations {
		if s.Pos != st.Pos {
			su.markers = append(su.markers, report.Marker{At: s.Pos, Label: s.Name, Kind: report.MarkerStation})
		}
	}
	return su, nil
}

// coverageDirections names the ways a budget map holds, as CoverageBudgets
// builds them.
func coverageDirections(site, cell plan.End, dir plan.CoverageDirection) []string {
	var out []string
	if dir != plan.CoverageBack && site.Radio.PowerW > 0 && cell.Radio.SensitivityDBm != 0 {
		out = append(out, plan.DirOut)
	}
	if dir != plan.CoverageOut && cell.Radio.PowerW > 0 && site.Radio.SensitivityDBm != 0 {
		out = append(out, plan.DirBack)
	}
	return out
}

// checkNotDEM refuses an output file that is one of the elevation files
// in use, or a GeoTIFF written into a folder of elevation data (it would
// be read as elevation data by the next run).
func checkNotDEM(path string, demPaths []string) error {
	abs, err := filepath.Abs(path)
	if err != nil {
		return nil
	}
	for _, d := range demPaths {
		st, err := os.Stat(d)
		if err != nil {
			continue
		}
		dAbs, _ := filepath.Abs(d)
		if st.IsDir() && filepath.Dir(abs) == dAbs && extension(path) == "tif" {
			return usagef("--out: %s is in the elevation folder %s, where it would be read as elevation data; choose another folder", path, d)
		}
		if ost, err := os.Stat(path); err == nil && os.SameFile(ost, st) {
			return usagef("--out: %s is an elevation file of this run; choose another output file", path)
		}
	}
	return nil
}

// coverageTitles are the PNG's title and subtitle (and the KMZ's name and
// description).
func coverageTitles(v *coverageView, req *plan.CoverageRequest, dirs []string) (string, string) {
	name, unit, _ := valueWords(v.mode, v.value)
	title := "Coverage from " + v.siteName
	if v.mode == plan.CoverageLOS {
		title = "Line of sight from " + v.siteName
	}
	var parts []string
	if v.mode == plan.CoverageLoss {
		parts = append(parts, units.FormatFreq(req.FreqMHz))
		what := name
		if unit != "" {
			what += " (" + unit + ")"
		}
		switch len(dirs) {
		case 2:
			what += ", the worse of out and back"
		case 1:
			what += ", " + dirs[0]
		}
		parts = append(parts, what)
		if plan.CoverageByCell(v.model) {
			parts = append(parts, "model "+v.model.Name())
		}
	}
	parts = append(parts, fmt.Sprintf("site antenna %s, %s in each cell", units.FormatHeight(req.SiteHeightM, v.imperial), units.FormatHeight(req.TargetHeightM, v.imperial)),
		"radius "+units.FormatLength(req.RadiusM, v.imperial))
	return title, strings.Join(parts, " · ")
}

// coverageJSON gathers the command's JSON result.
func coverageJSON(v *coverageView, req *plan.CoverageRequest, su *coverageSetup) coverageOutput {
	r := v.res
	_, unit, key := valueWords(v.mode, v.value)
	w, s, e, n := r.Bounds()
	latM, lonM := report.MetresPerDegree(req.Site.Lat())
	out := coverageOutput{Site: su.siteName, Lat: req.Site.Lat(), Lon: req.Site.Lon(), GroundM: round2(r.SiteGroundM),
		HeightM: req.SiteHeightM, TargetHeightM: req.TargetHeightM, RadiusM: req.RadiusM, Mode: "loss", Value: key, Unit: unit,
		CellNorthM: round2(r.DLatDeg * latM), CellEastM: round2(r.DLonDeg * lonM), Rows: r.Rows, Cols: r.Cols,
		WestDeg: w, SouthDeg: s, EastDeg: e, NorthDeg: n, Radials: r.Radials, Cells: r.Cells,
		CoveredFraction: r.CoveredFraction, Levels: v.levels, SmoothEarth: r.SmoothEarth, Directions: su.directions}
	if v.mode == plan.CoverageLOS {
		out.Mode = "los"
	} else {
		out.FreqMHz = req.FreqMHz
	}
	out.Warnings = r.Warnings
	out.Engine = "radials"
	if v.mode == plan.CoverageLoss {
		m := su.model
		if m == nil {
			m = propagation.Terrain{}
		}
		out.Model = m.Name()
		if plan.CoverageByCell(m) {
			out.Engine = "cells"
		}
	}
	if su.budget && v.mode == plan.CoverageLoss {
		need := req.NeededMarginDB
		out.NeededMarginDB = &need
	}
	out.LevelCells, out.LevelFractions = v.levelFractions()
	return out
}

// renderCoverageText writes the summary of a coverage map.
func renderCoverageText(w io.Writer, v *coverageView, o *coverageOutput, im bool) {
	fmt.Fprintf(w, "%s\n", v.title)
	fmt.Fprintf(w, "  site %.5f,%.5f, ground %s; %s\n", o.Lat, o.Lon, units.FormatHeight(o.GroundM, im), v.subtitle)
	if o.Engine == "cells" {
		fmt.Fprintf(w, "  %d cells of %s × %s (north × east) within %s, one terrain profile per cell\n",
			o.Cells, units.FormatLength(o.CellNorthM, im), units.FormatLength(o.CellEastM, im), units.FormatLength(o.RadiusM, im))
		fmt.Fprintf(w, "  model: %s\n", modelLine(v.model))
	} else {
		fmt.Fprintf(w, "  %d cells of %s × %s (north × east) within %s, answered along %d radials\n",
			o.Cells, units.FormatLength(o.CellNorthM, im), units.FormatLength(o.CellEastM, im), units.FormatLength(o.RadiusM, im), o.Radials)
	}
	switch {
	case v.mode == plan.CoverageLOS:
		fmt.Fprintf(w, "  visible from the site: %s of the area\n", percent1(o.CoveredFraction))
	case o.NeededMarginDB != nil:
		fmt.Fprintf(w, "  covered (margin at least %.1f dB): %s of the area\n", *o.NeededMarginDB, percent1(o.CoveredFraction))
	default:
		fmt.Fprintf(w, "  in line of sight: %s of the area\n", percent1(o.CoveredFraction))
	}
	if v.mode == plan.CoverageLoss {
		fmt.Fprintln(w)
		t := newTable(w)
		t.row("  level", "cells", "of the area")
		for i, l := range o.Levels {
			t.row("  "+v.levelLabel(l), fmt.Sprint(o.LevelCells[i]), percent1(o.LevelFractions[i]))
		}
		t.flush()
	}
	fmt.Fprintln(w)
}

// percent1 renders a fraction 0–1 as a percentage with one decimal.
func percent1(f float64) string { return fmt.Sprintf("%.1f %%", 100*f) }

// coverageCompute computes a map: the radial engine (plan.CoverageMap) for
// delta-Bullington and line of sight, one profile per cell
// (Env.CoverageCells) for the other models, with the progress bar; what
// prefixes the bar's label.
func coverageCompute(ctx context.Context, g *globals, ts *terrain.Set, m propagation.Model, req *plan.CoverageRequest, what string) (*plan.CoverageResult, error) {
	var res *plan.CoverageResult
	var err error
	if req.Mode == plan.CoverageLoss && plan.CoverageByCell(m) {
		bar := newProgress(g, what+"rows (one profile per cell)")
		env := &plan.Env{Terrain: ts, Model: m}
		res, err = env.CoverageCells(ctx, *req, bar.update)
		bar.done()
	} else {
		bar := newProgress(g, what+"ground rows, then radials")
		res, err = plan.CoverageMap(ctx, ts, *req, bar.update)
		bar.done()
	}
	return res, err
}
