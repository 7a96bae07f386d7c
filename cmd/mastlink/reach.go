package main

import (
	"fmt"
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
	kit                              endFlags
	envFlags
	margin, reliability, sigma string
	only                       []string // --target: reach only these
	kitFlags                   []string // names of the flags a plan replaces
	kitName                    string   // the kit's name without a plan
}

func addReachFlags(cmd *cobra.Command, o *reachOptions, kitName string) {
	o.kitName = kitName
	f := cmd.Flags()
	f.StringVar(&o.planFile, "plan", "", "plan file (YAML) giving the kit, targets, requirement and terrain")
	f.StringVar(&o.station, "station", "", "with --plan: the station whose kit is used (default: see the help above)")
	f.StringVar(&o.targets, "targets", "", "GPX file whose waypoints are the targets (simplex on --freq, with the same kit)")
	f.StringArrayVar(&o.only, "target", nil, "reach only this target (a name from the plan or --targets); repeat for several")
	f.StringVar(&o.freq, "freq", "", "frequency of targets from --targets [MHz] (default: the plan's)")
	addKitFlags(cmd, &o.kit, "", "", true)
	f.StringVar(&o.kit.sens, "rx-sens", "0.25uV", "receiver sensitivity [dBm] (µV across 50 Ω accepted)")
	f.StringVar(&o.margin, "margin", "10dB", "margin every direction must meet [dB]")
	f.StringVar(&o.reliability, "reliability", "", "wanted fraction of locations, e.g. 90%: raises the margin needed")
	f.StringVar(&o.sigma, "sigma", "5.5dB", "location variability σ [dB] used with --reliability")
	addEnvFlags(cmd, &o.envFlags)
	o.kitFlags = []string{"power", "gain", "height", "cable", "cable-length", "connectors", "swr", "rx-sens", "margin", "reliability", "sigma", "k", "model", "polarization", "ground"}
}

// reach is everything a route or a site ranking needs, resolved.
type reach struct {
	plan    *plan.Plan // nil without --plan
	env     *plan.Env
	kit     plan.End
	targets []plan.Target
	needDB  float64
	mast    *plan.MastSweep
	inputs  []string
}

// resolve builds the kit, targets and environment from the plan or the
// flags. forSites picks the plan's station (moved to each candidate) rather
// than the handheld carried along a route.
func (o *reachOptions) resolve(cmd *cobra.Command, g *globals, forSites bool) (*reach, error) {
	r := &reach{}
	if o.planFile != "" {
		for _, name := range o.kitFlags {
			if cmd.Flags().Changed(name) {
				return nil, usagef("--%s: with --plan the kit, requirement and model come from the plan file; edit it, or drop --plan", name)
			}
		}
		p, env, err := loadPlan(g, o.planFile)
		if err != nil {
			return nil, err
		}
		r.plan, r.env, r.inputs = p, env, append(r.inputs, p.InputFiles...)
		if forSites {
			st, err := p.StationNamed(o.station)
			if err != nil {
				return nil, usagef("--station: %v", err)
			}
			r.kit, r.mast = st.End, p.Mast
		} else if r.kit, err = p.Walker(o.station); err != nil {
			return nil, usagef("--station: %v", err)
		}
		r.targets = p.ReachTargets(r.kit.Name)
		r.needDB = p.Require.NeededMarginDB()
		if env.StepM, err = o.stepM(); err != nil {
			return nil, err
		}
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
		if r.kit, err = o.kit.end(o.kitName, "", true); err != nil {
			return nil, err
		}
		req := plan.Requirement{}
		if req.MarginDB, err = quantity("margin", o.margin, units.ParseLossDB); err != nil {
			return nil, err
		}
		if req.SigmaDB, err = quantity("sigma", o.sigma, units.ParseLossDB); err != nil {
			return nil, err
		}
		if o.reliability != "" {
			if req.Reliability, err = quantity("reliability", o.reliability, units.ParseRatio); err != nil {
				return nil, err
			}
			if !(req.Reliability > 0 && req.Reliability < 1) {
				return nil, usagef("--reliability: give a fraction above 0%% and below 100%%")
			}
		}
		r.needDB = req.NeededMarginDB()
		if o.targets == "" {
			return nil, usagef("--targets FILE.gpx is needed without --plan: the places to reach, as waypoints")
		}
	}
	if o.targets != "" {
		ts, err := o.readTargets(r)
		if err != nil {
			return nil, err
		}
		r.targets = ts
		r.inputs = append(r.inputs, o.targets)
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
// (or the plan's frequency) with the same kit: the plan's defaults when it
// gives a radio, else the kit in use.
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
	kit := r.kit
	if r.plan != nil && r.plan.Defaults.Radio.PowerW > 0 && r.plan.Defaults.Radio.SensitivityDBm != 0 {
		kit = r.plan.Defaults
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
