package main

import (
	"errors"
	"fmt"
	"strings"

	"github.com/mastlink/mastlink/plan"
	"github.com/mastlink/mastlink/plan/feedline"
	"github.com/mastlink/mastlink/plan/gpx"
	"github.com/mastlink/mastlink/plan/units"
	"github.com/mastlink/mastlink/propagation"
	"github.com/paulmach/orb"
	"github.com/spf13/cobra"
)

// envFlags are the radio-climate and model flags of the commands that
// compute paths: link, route, sites and mast. The Longley–Rice ITM's own
// settings are a group of their own (itmflags.go).
type envFlags struct {
	k, model, polarization, ground, step string
	itm                                  itmFlags
}

func addEnvFlags(cmd *cobra.Command, e *envFlags) {
	f := cmd.Flags()
	f.StringVar(&e.k, "k", "4/3", "effective earth-radius factor")
	f.StringVar(&e.model, "model", "terrain", "propagation model: terrain (ITU-R P.526-16 delta-Bullington), free-space, or itm (Longley–Rice ITM 1.2.2)")
	f.StringVar(&e.polarization, "polarization", "vertical", "vertical or horizontal")
	f.StringVar(&e.ground, "ground", "land", "ground constants: land or sea (ITU-R P.1812)")
	f.StringVar(&e.step, "step", "", "profile sample spacing [m] (default: the elevation data's spacing)")
	addITMFlags(cmd, &e.itm)
}

// env builds the link environment from the flags (terrain not yet set).
func (e *envFlags) env() (*plan.Env, error) {
	env := &plan.Env{}
	var err error
	if env.K, err = quantity("k", e.k, units.ParseKFactor); err != nil {
		return nil, err
	}
	if env.Model, err = propagation.ModelByName(e.model); err != nil {
		return nil, usagef("--model: %q is not a model (use %s)", e.model, strings.Join(propagation.ModelNames(), " or "))
	}
	if env.Polarization, err = plan.ParsePolarization(e.polarization); err != nil {
		return nil, usagef("--polarization: %v", err)
	}
	if env.Ground, err = plan.ParseGround(e.ground); err != nil {
		return nil, usagef("--ground: %v", err)
	}
	if env.Model, err = e.itm.model(env.Model, env.Polarization); err != nil {
		return nil, err
	}
	if env.StepM, err = e.stepM(); err != nil {
		return nil, err
	}
	return env, nil
}

// stepM parses --step; 0 when it is not given.
func (e *envFlags) stepM() (float64, error) {
	if e.step == "" {
		return 0, nil
	}
	v, err := quantity("step", e.step, units.ParseLengthM)
	if err != nil {
		return 0, err
	}
	if v <= 0 {
		return 0, usagef("--step: give a spacing above 0 m")
	}
	return v, nil
}

// quantity parses the value of a quantity flag with fn; an error names the
// flag and is a usage error (exit code 2).
func quantity(flag, value string, fn func(string) (float64, error)) (float64, error) {
	v, err := fn(value)
	if err != nil {
		return 0, usagef("--%s: %v", flag, err)
	}
	return v, nil
}

// optionUsage turns an error of a group of options parsed together
// (units.OptionError: the requirement, the exposure habits) into a usage
// error naming the flag, "--tx-time" for the key "tx_time".
func optionUsage(err error) error {
	var oe *units.OptionError
	if errors.As(err, &oe) {
		return usagef("--%s: %v", strings.ReplaceAll(oe.Option, "_", "-"), oe.Err)
	}
	return usageError{err}
}

// pointResolver turns LAT,LON or a waypoint name into a position.
type pointResolver struct {
	file string // --waypoints
	gpx  *gpx.File
}

func (r *pointResolver) resolve(flag, value string) (orb.Point, string, error) {
	p, err := units.ParsePoint(value)
	if err == nil {
		return p, fmt.Sprintf("%.5f,%.5f", p.Lat(), p.Lon()), nil
	}
	if !errors.Is(err, units.ErrSyntax) {
		return orb.Point{}, "", usagef("%s: %v", flag, err)
	}
	if r.file == "" {
		return orb.Point{}, "", usagef("%s: %q is not LAT,LON; to use a waypoint name, give its GPX file with --waypoints", flag, value)
	}
	if r.gpx == nil {
		g, err := gpx.Read(r.file)
		if err != nil {
			return orb.Point{}, "", fmt.Errorf("--waypoints: %w", err)
		}
		r.gpx = g
	}
	w, err := r.gpx.Lookup(value)
	if err != nil {
		return orb.Point{}, "", usagef("%s: %v", flag, err)
	}
	return w.Pos, w.Name, nil
}

func addWaypointsFlag(cmd *cobra.Command, r *pointResolver) {
	cmd.Flags().StringVar(&r.file, "waypoints", "", "GPX file whose waypoint names may stand for points")
}

// endFlags are the kit flags of one end of a link. The flags are named
// prefix+"power", prefix+"gain", …; the sensitivity flag has its own name
// (--rx-sens, --sens, --to-sens), kept in sensFlag so errors name it.
type endFlags struct {
	prefix                                             string // "" or "to-"
	power, gain, height, cable, cableLength, swr, sens string
	sensFlag                                           string // the sensitivity flag, without "--"; "" when the end has none
	connectors                                         int
	// The antenna as it stands (plan.AntennaOptions): catalog type,
	// bearing, body loss and terminal clutter.
	antenna, bearing, bodyLoss, clutter string
	changed                             func(flag string) bool // whether a flag was given
}

// antennaFlagOf names the flag of an AntennaOptions key for an end.
var antennaFlagOf = map[string]string{
	plan.OptAntennaType: "antenna", plan.OptBearing: "bearing", plan.OptGain: "gain",
	plan.OptHeight: "height", plan.OptBodyLoss: "body-loss", plan.OptClutter: "clutter",
}

// addKitFlags registers the antenna and feedline flags of one end of a link:
// prefix is "" or "to-", what ("transmitting ", "receiving " or "") words
// the help. With power, the end's transmitter power too.
func addKitFlags(cmd *cobra.Command, e *endFlags, prefix, what string, power bool) {
	e.prefix = prefix
	f := cmd.Flags()
	if power {
		f.StringVar(&e.power, prefix+"power", "5W", "transmitter power [W]")
	}
	f.StringVar(&e.gain, prefix+"gain", "0dBi", what+"antenna gain [dBi] (dBd accepted); with --"+prefix+"antenna, overrides the catalog's")
	f.StringVar(&e.height, prefix+"height", "1.5m", what+"antenna height above ground [m]")
	addAntennaFlags(cmd, e, prefix, what)
	f.StringVar(&e.cable, prefix+"cable", "", what+"feedline cable: a name that mastlink feedline --list shows, or custom:LOSS/100ft@FREQ")
	f.StringVar(&e.cableLength, prefix+"cable-length", "", what+"feedline length [m]")
	f.IntVar(&e.connectors, prefix+"connectors", 0, "mated connector pairs in the "+what+"feedline")
	f.StringVar(&e.swr, prefix+"swr", "1", "SWR at the "+what+"antenna")
}

// addAntennaFlags registers the antenna-as-it-stands flags of one end
// (--antenna, --bearing, --body-loss, --clutter, with prefix): the one
// place they are defined, for every command with kit flags. The end's
// --gain is then taken only when given beside --antenna.
func addAntennaFlags(cmd *cobra.Command, e *endFlags, prefix, what string) {
	f := cmd.Flags()
	e.prefix, e.changed = prefix, f.Changed
	f.StringVar(&e.antenna, prefix+"antenna", "", what+"antenna from the catalog (mastlink antenna --list): its gain and pattern toward the path")
	f.StringVar(&e.bearing, prefix+"bearing", "", "where the "+what+"directional antenna points [degrees true] (default: at the far end)")
	f.StringVar(&e.bodyLoss, prefix+"body-loss", "", "body loss at the "+what+"handheld: face, belt, none, or dB (default: face, typical, for a handheld antenna type; else none)")
	f.StringVar(&e.clutter, prefix+"clutter", "", "terminal clutter around the "+what+"antenna, ITU-R P.2108-1 §3.1 (added to the path loss at the antenna's real height): "+strings.Join(propagation.ClutterClassNames(), ", "))
}

// deprecatedAlias registers old as a hidden name of the flag now called
// name, bound to the same value (p) with the same default. The command
// checks for it with oldName, which says on stderr that the name changed
// (pflag's own deprecation notice would go to stdout through cobra).
func deprecatedAlias(cmd *cobra.Command, p *string, old, name string) {
	f := cmd.Flags()
	def := f.Lookup(name).DefValue
	f.StringVar(p, old, def, "old name of --"+name)
	_ = f.MarkHidden(old)
}

// oldName reports whether the old name of a flag (deprecatedAlias) was
// used, and if so says so on stderr; giving both names is refused.
func oldName(g *globals, changed func(string) bool, old, name string) (bool, error) {
	if !changed(old) {
		return false, nil
	}
	if changed(name) {
		return true, usagef("--%s is the old name of --%s; give --%s only", old, name, name)
	}
	fmt.Fprintf(g.stderr, "mastlink: note: --%s is now called --%s; the old name will go\n", old, name)
	return true, nil
}

// addSensFlag registers the receiver-sensitivity flag of an end.
func addSensFlag(cmd *cobra.Command, e *endFlags, name, help string) {
	e.sensFlag = name
	cmd.Flags().StringVar(&e.sens, name, "0.25uV", help)
}

// antennaOptions are the end's antenna flags for plan.AntennaOptions: the
// gain counts with a catalog antenna only when given (it overrides the
// catalog's).
func (e *endFlags) antennaOptions() plan.AntennaOptions {
	gain := e.gain
	if e.antenna != "" && (e.changed == nil || !e.changed(e.prefix+"gain")) {
		gain = ""
	}
	return plan.AntennaOptions{Type: e.antenna, Bearing: e.bearing, Gain: gain, Height: e.height, BodyLoss: e.bodyLoss, Clutter: e.clutter}
}

// antennaUsage names the end's flag in an error of plan.AntennaOptions.
func (e *endFlags) antennaUsage(err error) error {
	var oe *units.OptionError
	if errors.As(err, &oe) {
		return usagef("--%s%s: %v", e.prefix, antennaFlagOf[oe.Option], oe.Err)
	}
	return usageError{err}
}

// antennaFlagNames lists the antenna flags of an end, for commands that
// refuse them beside a plan file.
func antennaFlagNames(prefix string) []string {
	return []string{prefix + "antenna", prefix + "bearing", prefix + "body-loss", prefix + "clutter"}
}

// end builds one end of a link from its flags, named name. A flag left
// empty leaves its part of the kit at zero (no power, no sensitivity, 0 m);
// without --cable there is no feedline, but --swr and --connectors still
// apply to the line a mast sweep gives the end. Errors name the flag.
func (e *endFlags) end(name string) (plan.End, error) {
	out := plan.End{Name: name}
	p := e.prefix
	var err error
	if e.power != "" {
		if out.Radio.PowerW, err = quantity(p+"power", e.power, units.ParsePowerW); err != nil {
			return out, err
		}
	}
	if e.sens != "" {
		if out.Radio.SensitivityDBm, err = quantity(e.sensFlag, e.sens, units.ParseSensitivityDBm); err != nil {
			return out, err
		}
	}
	if err := e.antennaOptions().Apply(&out.Antenna); err != nil {
		return out, e.antennaUsage(err)
	}
	if e.connectors < 0 {
		return out, usagef("--%sconnectors: give 0 or more", p)
	}
	swr := 1.0
	if e.swr != "" {
		if swr, err = quantity(p+"swr", e.swr, units.ParseSWR); err != nil {
			return out, err
		}
	}
	if e.cable == "" {
		if e.cableLength != "" {
			return out, usagef("--%scable-length needs --%scable", p, p)
		}
		out.Feedline = feedline.Line{SWR: swr, Connectors: e.connectors}
		return out, nil
	}
	c, err := feedline.ResolveCable(e.cable)
	if err != nil {
		return out, usagef("--%scable: %v", p, err)
	}
	if e.cableLength == "" {
		return out, usagef("--%scable needs --%scable-length", p, p)
	}
	l, err := quantity(p+"cable-length", e.cableLength, units.ParseLengthM)
	if err != nil {
		return out, err
	}
	out.Feedline = feedline.NewLine(c, l)
	out.Feedline.SWR, out.Feedline.Connectors = swr, e.connectors
	return out, nil
}

// over returns base with the parts of the kit whose flags were given
// (changed) replaced by the flags' values: the "what if" of a command run
// with a plan. A cable needs its length as well; the line's SWR and
// connectors stay the base's unless given.
func (e *endFlags) over(base plan.End, changed func(flag string) bool) (plan.End, error) {
	f, err := e.end(base.Name)
	if err != nil {
		return base, err
	}
	p, out := e.prefix, base
	if changed(p + "power") {
		out.Radio.PowerW = f.Radio.PowerW
	}
	if e.sensFlag != "" && changed(e.sensFlag) {
		out.Radio.SensitivityDBm = f.Radio.SensitivityDBm
	}
	// The antenna flags given, applied over the plan's antenna as the plan
	// file's own fields would be (a type brings its gain, --gain overrides).
	given := func(flag, v string) string {
		if changed(p + flag) {
			return v
		}
		return ""
	}
	ao := plan.AntennaOptions{Type: given("antenna", e.antenna), Gain: given("gain", e.gain), Height: given("height", e.height),
		Bearing: given("bearing", e.bearing), BodyLoss: given("body-loss", e.bodyLoss), Clutter: given("clutter", e.clutter)}
	if err := ao.Apply(&out.Antenna); err != nil {
		return base, e.antennaUsage(err)
	}
	if changed(p+"cable") || changed(p+"cable-length") {
		if e.cable == "" || e.cableLength == "" {
			return base, usagef("--%scable and --%scable-length go together (the plan's line is replaced whole)", p, p)
		}
		swr, conn := out.Feedline.SWR, out.Feedline.Connectors
		out.Feedline = f.Feedline
		out.Feedline.SWR, out.Feedline.Connectors = swr, conn
	}
	if changed(p + "swr") {
		out.Feedline.SWR = f.Feedline.SWR
	}
	if changed(p + "connectors") {
		out.Feedline.Connectors = f.Feedline.Connectors
	}
	return out, nil
}
