package main

import (
	"context"
	"fmt"
	"io"
	"strings"

	"github.com/mastlink/mastlink/plan"
	"github.com/mastlink/mastlink/plan/gpx"
	"github.com/mastlink/mastlink/plan/units"
	"github.com/spf13/cobra"
)

// reachOptions are the flags route and sites share: a plan file, or a kit,
// targets and radio climate given by flags.
type reachOptions struct {
	planFile, station, targets, freq string
	kit                              endFlags // the walker's or the station's (--power, --gain, …, --rx-sens)
	target                           endFlags // the targets' of --targets (--to-power, --to-gain, …, --to-sens)
	envFlags
	req     plan.RequirementOptions // --margin, --reliability, --sigma
	only    []string                // --target: reach only these
	kitName string                  // the kit's name without a plan
	changed func(flag string) bool  // whether a flag was given (the command's flag set)
}

func addReachFlags(cmd *cobra.Command, o *reachOptions, kitName, stationDefault string) {
	o.kitName = kitName
	f := cmd.Flags()
	o.changed = f.Changed
	f.StringVar(&o.planFile, "plan", "", "plan file (YAML) giving the kit, targets, requirement and terrain; kit, requirement and model flags given as well replace the plan's figures (what if)")
	f.StringVar(&o.station, "station", "", "with --plan: the station whose kit is used (default: "+stationDefault+")")
	f.StringVar(&o.targets, "targets", "", "GPX file whose waypoints are the targets (simplex on --freq, each with the --to- kit)")
	f.StringArrayVar(&o.only, "target", nil, "reach only this target (a name from the plan or --targets); repeat for several")
	f.StringVar(&o.freq, "freq", "", "frequency of targets from --targets [MHz] (default: the plan's)")
	addKitFlags(cmd, &o.kit, "", "", true)
	addSensFlag(cmd, &o.kit, "rx-sens", "receiver sensitivity [dBm] (µV across 50 Ω accepted)")
	addKitFlags(cmd, &o.target, "to-", "targets' ", true)
	f.Lookup("to-power").Usage = "targets' transmitter power [W] (targets of --targets; default a handheld, or the plan's defaults:)"
	addSensFlag(cmd, &o.target, "to-sens", "targets' receiver sensitivity [dBm] (µV across 50 Ω accepted)")
	f.StringVar(&o.req.Margin, "margin", "", fmt.Sprintf("margin every direction must meet [dB] (default: the plan's require:, else %g dB)", plan.DefaultMarginDB))
	f.StringVar(&o.req.Reliability, "reliability", "", "wanted fraction of locations, e.g. 90%: raises the margin needed")
	f.StringVar(&o.req.Sigma, "sigma", "5.5dB", "location variability σ [dB] used with --reliability")
	addEnvFlags(cmd, &o.envFlags)
}

// reach is everything a route or a site ranking needs, resolved.
type reach struct {
	plan          *plan.Plan // nil without --plan
	env           *plan.Env
	kit           plan.End
	targets       []plan.Target
	needDB        float64
	defaultMargin bool     // nothing asked: plan.DefaultMarginDB
	whatIf        []string // flags that replaced the plan's figures
	mast          *plan.MastSweep
	inputs        []string
}

// given returns "--name value" for each of names given on the command
// line, with the value the flag holds (value).
func (o *reachOptions) given(value func(name string) string, names ...string) []string {
	var out []string
	for _, n := range names {
		if o.changed(n) {
			out = append(out, "--"+n+" "+value(n))
		}
	}
	return out
}

// resolve builds the kit, targets and environment from the plan or the
// flags. forSites picks the plan's station (moved to each candidate) rather
// than the handheld carried along a route. With a plan, the kit,
// requirement and model flags given replace the plan's figures ("what
// if"), and r.whatIf lists them.
func (o *reachOptions) resolve(g *globals, cmd *cobra.Command, forSites bool) (*reach, error) {
	r := &reach{}
	value := func(n string) string { return cmd.Flags().Lookup(n).Value.String() }
	req := plan.DefaultRequirement()
	if o.planFile != "" {
		p, env, err := loadPlan(g, o.planFile)
		if err != nil {
			return nil, err
		}
		r.plan, r.env, r.inputs = p, env, append(r.inputs, p.InputFiles...)
		var base plan.End
		if forSites {
			st, err := p.StationNamed(o.station)
			if err != nil {
				return nil, usagef("--station: %v", err)
			}
			base, r.mast = st.End, p.Mast
		} else if base, err = p.Walker(o.station); err != nil {
			return nil, usagef("--station: %v", err)
		}
		if r.kit, err = o.kit.over(base, o.changed); err != nil {
			return nil, err
		}
		r.targets = p.ReachTargets(base.Name)
		req = p.Require
		ro := plan.RequirementOptions{}
		if o.changed("margin") {
			ro.Margin = o.req.Margin
		}
		if o.changed("reliability") {
			ro.Reliability = o.req.Reliability
		}
		if o.changed("sigma") {
			ro.Sigma = o.req.Sigma
		}
		if err := ro.Apply(&req); err != nil {
			return nil, optionUsage(err)
		}
		fe, err := o.envFlags.env()
		if err != nil {
			return nil, err
		}
		if o.changed("k") {
			env.K = fe.K
		}
		if o.changed("model") {
			env.Model = fe.Model
		}
		if o.changed("polarization") {
			env.Polarization = fe.Polarization
		}
		if o.changed("ground") {
			env.Ground = fe.Ground
		}
		env.SigmaDB = req.SigmaDB
		env.StepM = fe.StepM
		if err := o.envFlags.itm.requirement(env, &req); err != nil {
			return nil, err
		}
		r.whatIf = o.given(value, append(append([]string{"power", "gain", "height", "cable", "cable-length", "connectors", "swr", "rx-sens",
			"margin", "reliability", "sigma", "k", "model", "polarization", "ground"}, antennaFlagNames("")...), itmFlagNames...)...)
	} else {
		if o.station != "" {
			return nil, usagef("--station needs --plan")
		}
		env, err := o.envFlags.env()
		if err != nil {
			return nil, err
		}
		if env.Terrain, err = g.openTerrain(); err != nil {
			return nil, err
		}
		if env.Terrain == nil {
			g.noticeSmoothEarth()
		}
		r.env = env
		if r.kit, err = o.kit.end(o.kitName); err != nil {
			return nil, err
		}
		if err := o.req.Apply(&req); err != nil {
			return nil, optionUsage(err)
		}
		env.SigmaDB = req.SigmaDB
		if err := o.envFlags.itm.requirement(r.env, &req); err != nil {
			return nil, err
		}
		if o.targets == "" {
			return nil, usagef("--targets FILE.gpx is needed without --plan: the places to reach, as waypoints")
		}
	}
	r.needDB, r.defaultMargin = req.NeededMarginDB(), req.Default
	if o.targets != "" {
		ts, err := o.readTargets(r)
		if err != nil {
			return nil, err
		}
		r.targets = ts
		r.inputs = append(r.inputs, o.targets)
	} else {
		for _, n := range append([]string{"to-power", "to-gain", "to-height", "to-cable", "to-cable-length", "to-connectors", "to-swr", "to-sens"}, antennaFlagNames("to-")...) {
			if o.changed(n) {
				return nil, usagef("--%s: the --to- flags give the kit of the targets of --targets; the plan's targets carry their own (edit the plan)", n)
			}
		}
	}
	if len(o.only) > 0 {
		ts, err := onlyTargets(r.targets, o.only)
		if err != nil {
			return nil, err
		}
		r.targets = ts
	}
	return r, nil
}

// onlyTargets keeps the targets named in names (ignoring case), in the
// order given, each as a required target.
func onlyTargets(all []plan.Target, names []string) ([]plan.Target, error) {
	var out []plan.Target
	for _, n := range names {
		found := false
		for _, t := range all {
			if strings.EqualFold(strings.TrimSpace(t.Name), strings.TrimSpace(n)) {
				t.Optional = false
				out, found = append(out, t), true
				break
			}
		}
		if !found {
			known := make([]string, len(all))
			for i, t := range all {
				known[i] = fmt.Sprintf("%q", t.Name)
			}
			return nil, usagef("--target: no target %q (targets: %s)", n, strings.Join(known, ", "))
		}
	}
	return out, nil
}

// readTargets makes every waypoint of --targets a simplex target on --freq
// (or the plan's frequency), each with the kit of the --to- flags: over the
// plan's defaults when the plan gives a radio there, else over a handheld
// (the flags' defaults).
func (o *reachOptions) readTargets(r *reach) ([]plan.Target, error) {
	freq := 0.0
	if o.freq != "" {
		var err error
		if freq, err = quantity("freq", o.freq, units.ParseFreqMHz); err != nil {
			return nil, err
		}
	} else if r.plan != nil {
		freq = r.plan.FreqMHz
	}
	if freq <= 0 {
		return nil, usagef("--freq: give the frequency to reach the targets of --targets on")
	}
	gf, err := gpx.Read(o.targets)
	if err != nil {
		return nil, fmt.Errorf("--targets: %w", err)
	}
	if len(gf.Waypoints) == 0 {
		return nil, fmt.Errorf("--targets: %s has no waypoints: give one waypoint per place to reach", o.targets)
	}
	kit, err := o.target.end("target")
	if err != nil {
		return nil, err
	}
	if r.plan != nil && r.plan.Defaults.Radio.PowerW > 0 && r.plan.Defaults.Radio.SensitivityDBm != 0 {
		if kit, err = o.target.over(r.plan.Defaults, o.changed); err != nil {
			return nil, err
		}
	}
	var out []plan.Target
	for i, w := range gf.Waypoints {
		e := kit
		e.Name, e.Pos = strings.TrimSpace(w.Name), w.Pos
		if e.Name == "" {
			e.Name = fmt.Sprintf("waypoint %d", i+1)
		}
		out = append(out, plan.Target{End: e, Kind: plan.Simplex, FreqMHz: freq})
	}
	return out, nil
}

// outputKind checks the extension of -o against the ones a command writes.
func outputKind(path string, allowed ...string) (string, error) {
	ext := extension(path)
	for _, a := range allowed {
		if ext == a {
			return ext, nil
		}
	}
	return "", usagef("-o: %q: give a file ending in .%s", path, strings.Join(allowed, ", ."))
}

// reachRun is what route and sites each add to the pipeline they share
// (runReach): R is the result they compute.
type reachRun[R any] struct {
	forSites bool     // the plan's station moved to each place, not the walker
	outKinds []string // the extensions -o may have
	// check looks at the input GPX file before anything is computed.
	check func(gf *gpx.File) error
	// compute does the work, reporting progress.
	compute func(ctx context.Context, r *reach, gf *gpx.File, progress plan.Progress) (R, error)
	// note records the requirement's default and the what-if flags in
	// the result.
	note func(res R, defaultMargin bool, whatIf []string)
	// write writes the result to the -o file of the given kind.
	write func(kind string, inputs []string, res R) error
	// csv and text render the result on stdout.
	csv, text func(w io.Writer, res R) error
	// warnings points at the result's warnings (the model's, the
	// frequency's), to which missing elevation data is added; all are
	// written to stderr too.
	warnings func(res R) *[]string
}

// runReach is the pipeline of route and sites: check the flags and -o,
// read the input GPX file, resolve the kit, targets and terrain (reach),
// compute with a progress bar, warn of missing tiles, write -o, and emit
// the result.
func runReach[R any](ctx context.Context, g *globals, cmd *cobra.Command, o *reachOptions, file string, run reachRun[R]) error {
	if o.freq != "" && o.targets == "" {
		return usagef("--freq is the frequency of the targets of --targets; give that file too")
	}
	var outKind string
	var err error
	if g.out != "" {
		if outKind, err = outputKind(g.out, run.outKinds...); err != nil {
			return err
		}
	}
	gf, err := gpx.Read(file)
	if err != nil {
		return err
	}
	if err := run.check(gf); err != nil {
		return err
	}
	r, err := o.resolve(g, cmd, run.forSites)
	if err != nil {
		return err
	}
	inputs := append([]string{file}, r.inputs...)
	if g.out != "" {
		if err := checkNotInput("--out", g.out, inputs); err != nil {
			return err
		}
	}
	bar := newProgress(g, "paths")
	res, err := run.compute(ctx, r, gf, bar.update)
	bar.done()
	if err != nil {
		return err
	}
	run.note(res, r.defaultMargin, r.whatIf)
	ws := run.warnings(res)
	*ws = addWarnings(*ws, missingWarning(r.env.Terrain))
	g.warn(*ws)
	if outKind != "" {
		if err := run.write(outKind, inputs, res); err != nil {
			return err
		}
		g.wrote()
	}
	return g.emit(res, func(w io.Writer) error { return run.csv(w, res) }, func(w io.Writer) error { return run.text(w, res) })
}
