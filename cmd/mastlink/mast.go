package main

import (
	"context"
	"fmt"
	"io"
	"sort"
	"strings"

	"github.com/mastlink/mastlink/plan"
	"github.com/mastlink/mastlink/plan/antenna"
	"github.com/mastlink/mastlink/plan/feedline"
	"github.com/mastlink/mastlink/plan/units"
	"github.com/spf13/cobra"
)

// renderMastText writes a sweep as a grid: mast heights down, cables across,
// the worst margin in each cell, marked where it meets the requirement.
func renderMastText(w io.Writer, m *plan.MastResult, im bool) {
	fmt.Fprintf(w, "Mast and cable for %s (cable = mast height + %s run + %s slack; worst margin over every required link, * meets %.1f dB)\n",
		m.Station, units.FormatLength(m.RunM, im), units.FormatLength(m.SlackM, im), m.NeededMarginDB)
	if m.KeepoutLimitM > 0 {
		fmt.Fprintf(w, "  ! public RF-exposure keep-out wider than the %s limit around the mast foot: not recommended\n", units.FormatLength(m.KeepoutLimitM, im))
	}
	var cables []string
	seen := map[string]bool{}
	heights := []float64{}
	hseen := map[float64]bool{}
	cell := map[string]plan.MastRow{}
	column := func(r plan.MastRow) string { // the cable, after the antenna when the sweep tries antennas
		if r.Antenna != "" {
			return r.Antenna + " " + r.Cable
		}
		return r.Cable
	}
	for _, r := range m.Rows {
		if !seen[column(r)] {
			seen[column(r)] = true
			cables = append(cables, column(r))
		}
		if !hseen[r.HeightM] {
			hseen[r.HeightM] = true
			heights = append(heights, r.HeightM)
		}
		cell[fmt.Sprintf("%g|%s", r.HeightM, column(r))] = r
	}
	sort.Float64s(heights)
	t := newTable(w)
	t.row(append([]string{"  mast"}, cables...)...)
	for _, h := range heights {
		row := []string{"  " + units.FormatHeight(h, im)}
		for _, c := range cables {
			r := cell[fmt.Sprintf("%g|%s", h, c)]
			mark := " "
			if r.MeetsRequirement {
				mark = "*"
			}
			if r.OverKeepoutLimit {
				mark += "!"
			}
			row = append(row, db(r.WorstMarginDB)+mark)
		}
		t.row(row...)
	}
	t.flush()
	switch {
	case m.Recommended != nil:
		r := m.Recommended
		ant := ""
		if r.Antenna != "" {
			ant = ", the " + r.Antenna + ","
		}
		fmt.Fprintf(w, "Recommended: a %s mast%s with %s %s (%.1f kg of cable).\n\n", units.FormatHeight(r.HeightM, im), ant, units.FormatLength(r.CableLengthM, im), r.Cable, r.CableMassKg)
	case m.Closest != nil:
		c := m.Closest
		what := "Nothing in the sweep meets the requirement"
		if m.KeepoutLimitM > 0 {
			what += " within the keep-out limit"
		}
		fmt.Fprintf(w, "%s. Closest: %s mast with %s, worst margin %s on %s (%.1f dB short).\n\n",
			what, units.FormatHeight(c.HeightM, im), strings.TrimSpace(c.Antenna+" "+c.Cable), db(c.WorstMarginDB), c.WorstLink, m.NeededMarginDB-c.WorstMarginDB)
	default:
		fmt.Fprintln(w)
	}
}

type mastOptions struct {
	planFile, station           string
	heights, cables, run, slack string
	antennas                    string
	keepoutLimit                string
	from, to, freq              string
	envFlags                                            // --k, --model (and the ITM's settings), --polarization, --ground, --step
	station0, target            endFlags                // the station's kit (power, gain, sens, swr, connectors) and the target's (--to-…)
	req                         plan.RequirementOptions // --margin, --reliability, --sigma
	points                      pointResolver
	changed                     func(flag string) bool // whether a flag was given
}

func newMastCmd(g *globals) *cobra.Command {
	o := &mastOptions{}
	cmd := &cobra.Command{
		Use:   "mast [--plan FILE | station flags] --heights A..B step C --cables LIST --run L",
		Short: "Mast-and-cable sweep: the lowest mast and lightest cable that meet the margin",
		Long: `Tries every mast height and cable: the cable runs up the mast and on to the
radio (length = antenna height + --run + --slack). For each combination it
finds the worst margin over every required link in both directions, and
recommends the lowest mast that meets the requirement, then the lightest
cable at that height (cable mass per metre from the catalog).

With --plan the station, targets and requirement come from a plan file
(its mast section gives defaults for the flags). Without it, one station
(--from, with link's station flags) and one simplex target (--to, with the
--to- flags) are checked both ways on --freq.

` + itmHelp,
		Example: "  mastlink mast --plan examples/valley/plan.yaml\n" +
			"  mastlink mast --plan examples/valley/plan.yaml --heights '2m..8m step 0.5m' --cables RG-58,RG-8X\n" +
			"  mastlink mast --dem examples/terrain --waypoints examples/valley/points.gpx --from \"Ostral Bend\" \\\n" +
			"    --to \"Team Alder, Quillet Glen\" --freq 146.55 --power 25W --gain 2.15dBi --heights '2m..12m step 1m' \\\n" +
			"    --cables RG-58,RG-8X,RG-213 --run 10m --margin 10dB",
		Args: cobra.NoArgs,
		RunE: func(cmd *cobra.Command, args []string) error {
			return runMast(cmd.Context(), g, o, args)
		},
	}
	f := cmd.Flags()
	o.changed = f.Changed
	f.StringVar(&o.planFile, "plan", "", "plan file: station, targets and requirement")
	f.StringVar(&o.station, "station", "", "with --plan: the station to sweep (default: the first)")
	f.StringVar(&o.heights, "heights", "", "mast heights to try, e.g. '2m..12m step 1m' (quote it: it holds spaces)")
	f.StringVar(&o.cables, "cables", "", "cables to try, comma separated (names as mastlink feedline --list shows them)")
	f.StringVar(&o.run, "run", "", "cable from the mast foot to the radio [m]")
	f.StringVar(&o.slack, "slack", "", "extra cable for loops and the mast head [m] (default 1m)")
	f.StringVar(&o.keepoutLimit, "keepout-limit", "", "clear space around the mast foot [m]: rows whose public RF-exposure keep-out is wider are marked and not recommended")
	f.StringVar(&o.req.Margin, "margin", "", fmt.Sprintf("required fade margin [dB] (default: the plan's, else %g dB)", plan.DefaultMarginDB))
	f.StringVar(&o.req.Reliability, "reliability", "", "required fraction of locations, e.g. 90%")
	f.StringVar(&o.req.Sigma, "sigma", "5.5dB", "location variability σ [dB] used with --reliability")
	f.StringVar(&o.from, "from", "", "station position: LAT,LON or waypoint")
	f.StringVar(&o.to, "to", "", "target position: LAT,LON or waypoint")
	f.StringVar(&o.freq, "freq", "", "frequency [MHz]")
	st, tg := &o.station0, &o.target
	tg.prefix = "to-"
	f.StringVar(&st.power, "power", "5W", "station transmitter power [W]")
	f.StringVar(&st.gain, "gain", "0dBi", "station antenna gain [dBi]")
	addSensFlag(cmd, st, "rx-sens", "station receiver sensitivity [dBm] (µV across 50 Ω accepted)")
	deprecatedAlias(cmd, &st.sens, "sens", "rx-sens")
	f.StringVar(&st.swr, "swr", "1", "SWR at the station antenna")
	f.IntVar(&st.connectors, "connectors", 0, "mated connector pairs in the station feedline")
	f.StringVar(&tg.power, "to-power", "5W", "target transmitter power [W]")
	f.StringVar(&tg.gain, "to-gain", "0dBi", "target antenna gain [dBi]")
	f.StringVar(&tg.height, "to-height", "1.5m", "target antenna height [m]")
	addSensFlag(cmd, tg, "to-sens", "target receiver sensitivity [dBm]")
	addAntennaFlags(cmd, st, "", "station ")
	addAntennaFlags(cmd, tg, "to-", "target ")
	f.StringVar(&o.antennas, "antennas", "", "catalog antennas to try in place of the station's, comma separated, preferred first (see mastlink antenna --list)")
	addEnvFlags(cmd, &o.envFlags)
	addWaypointsFlag(cmd, &o.points)
	return cmd
}

// runMast sweeps the station of --plan (Plan.StationNamed), or the one
// station and target given by flags, over the mast heights and cables. It
// reads its options and never changes them.
func runMast(ctx context.Context, g *globals, o *mastOptions, args []string) error {
	var (
		env     *plan.Env
		st      plan.Station
		targets []plan.Target
		sweep   = plan.MastSweep{SlackM: 1}
		req     plan.Requirement
		inputs  []string
	)
	if o.planFile != "" {
		for _, name := range append([]string{"k", "model", "polarization", "ground"}, itmFlagNames...) {
			if o.itm.changed(name) {
				return usagef("--%s: with --plan the model comes from the plan file; edit it, or drop --plan", name)
			}
		}
		p, e, err := loadPlan(g, o.planFile)
		if err != nil {
			return err
		}
		if st, err = p.StationNamed(o.station); err != nil {
			return usagef("--station: %v", err)
		}
		env, targets, req, inputs = e, p.ReachTargets(st.Name), p.Require, p.InputFiles
		if env.StepM, err = o.stepM(); err != nil {
			return err
		}
		if p.Mast != nil {
			sweep = *p.Mast
		}
	} else {
		if o.from == "" || o.to == "" || o.freq == "" {
			return usagef("give --plan FILE, or --from, --to and --freq")
		}
		var err error
		if env, err = o.envFlags.env(); err != nil {
			return err
		}
		req = plan.DefaultRequirement()
		freq, err := quantity("freq", o.freq, units.ParseFreqMHz)
		if err != nil {
			return err
		}
		from, fn, err := o.points.resolve("--from", o.from)
		if err != nil {
			return err
		}
		to, tn, err := o.points.resolve("--to", o.to)
		if err != nil {
			return err
		}
		kit := o.station0
		if old, err := oldName(g, o.changed, "sens", "rx-sens"); err != nil {
			return err
		} else if old {
			kit.sensFlag = "sens" // errors name the flag given
		}
		end, err := kit.end(fn) // its height is swept
		if err != nil {
			return err
		}
		end.Pos = from
		st = plan.Station{End: end}
		tend, err := o.target.end(tn)
		if err != nil {
			return err
		}
		tend.Pos = to
		targets = []plan.Target{{End: tend, Kind: plan.Simplex, FreqMHz: freq}}
		if env.Terrain, err = g.openTerrain(); err != nil {
			return err
		}
		if env.Terrain == nil {
			g.noticeSmoothEarth()
		}
		inputs = []string{o.points.file}
	}
	var err error
	if o.heights != "" {
		if sweep.Heights, err = units.ParseLengthRange(o.heights); err != nil {
			return usagef("--heights: %v", err)
		}
	}
	if o.cables != "" {
		sweep.Cables = nil
		for _, name := range strings.Split(o.cables, ",") {
			c, err := feedline.ResolveCable(strings.TrimSpace(name))
			if err != nil {
				return usagef("--cables: %v", err)
			}
			sweep.Cables = append(sweep.Cables, c)
		}
	}
	if o.antennas != "" {
		sweep.Antennas = nil
		for _, name := range strings.Split(o.antennas, ",") {
			a, err := antenna.Lookup(name)
			if err != nil {
				return usagef("--antennas: %v", err)
			}
			sweep.Antennas = append(sweep.Antennas, a)
		}
	}
	if o.run != "" {
		if sweep.RunM, err = quantity("run", o.run, units.ParseLengthM); err != nil {
			return err
		}
	}
	if o.slack != "" {
		if sweep.SlackM, err = quantity("slack", o.slack, units.ParseLengthM); err != nil {
			return err
		}
	}
	if o.keepoutLimit != "" {
		if sweep.KeepoutLimitM, err = quantity("keepout-limit", o.keepoutLimit, units.ParseLengthM); err != nil {
			return err
		}
		if !(sweep.KeepoutLimitM > 0) {
			return usagef("--keepout-limit: give the clear space around the mast foot as a length above 0, e.g. 3m")
		}
	}
	if sweep.Heights.Len() == 0 || sweep.Heights.ToM == 0 {
		return usagef("--heights: give the mast heights to try (e.g. '2m..12m step 1m')")
	}
	if len(sweep.Cables) == 0 {
		return usagef("--cables: give the cables to try (e.g. RG-58,RG-8X,RG-213)")
	}
	// The flags override the plan's requirement; --sigma only goes with
	// --reliability, so the plan's σ stands otherwise.
	ro := o.req
	if ro.Reliability == "" {
		ro.Sigma = ""
	}
	if err := ro.Apply(&req); err != nil {
		return optionUsage(err)
	}
	if o.planFile == "" {
		if err := o.itm.requirement(env, &req); err != nil {
			return err
		}
	} else if o.req.Reliability != "" && req.ByModel {
		// The plan's ITM takes the reliability of --reliability.
		var err error
		if env.Model, err = plan.ITMRequirement(env.Model, &req); err != nil {
			return optionUsage(err)
		}
	}
	if err := ctx.Err(); err != nil {
		return err
	}
	res, err := env.SweepMast(st, targets, &sweep, req)
	if err != nil {
		return err
	}
	g.warnMissing(env.Terrain)
	g.warn(res.Warnings)
	if g.out != "" {
		kind, err := outputKind(g.out, "csv", "json")
		if err != nil {
			return err
		}
		if err := renderTo(g.out, inputs, func(w io.Writer) error {
			if kind == "json" {
				return writeJSON(w, res)
			}
			return writeMastCSV(w, res)
		}); err != nil {
			return err
		}
	}
	return g.emit(res, func(w io.Writer) error { g.cautionsToStderr(res.Cautions); return writeMastCSV(w, res) },
		func(w io.Writer) error {
			renderMastText(w, res, g.imperial())
			writeCautions(w, res.Cautions)
			return nil
		})
}

func writeMastCSV(w io.Writer, m *plan.MastResult) error {
	rows := make([][]string, len(m.Rows))
	for i, r := range m.Rows {
		rows[i] = []string{f2(r.HeightM), r.Cable, f2(r.CableLengthM), f2(r.CableMassKg), f2(r.FeedlineLossDB), f2(r.WorstMarginDB), r.WorstLink, fmt.Sprint(r.MeetsRequirement),
			exact(r.KeepoutPublicM), fmt.Sprint(r.OverKeepoutLimit), r.Antenna}
	}
	return writeCSV(w, []string{"height_m", "cable", "cable_length_m", "cable_mass_kg", "feedline_loss_db", "worst_margin_db", "worst_link", "meets_requirement",
		"keepout_public_m", "over_keepout_limit", "antenna"}, rows)
}
