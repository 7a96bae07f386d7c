package main

import (
	"errors"
	"fmt"
	"strings"

	"github.com/mastlink/mastlink/plan"
	"github.com/mastlink/mastlink/plan/gpx"
	"github.com/mastlink/mastlink/plan/units"
	"github.com/mastlink/mastlink/propagation"
	"github.com/paulmach/orb"
	"github.com/spf13/cobra"
)

// envFlags are the radio-climate and model flags of the commands that
// compute paths: link, route and sites.
type envFlags struct {
	k, model, polarization, ground, step string
}

func addEnvFlags(cmd *cobra.Command, e *envFlags) {
	f := cmd.Flags()
	f.StringVar(&e.k, "k", "4/3", "effective earth-radius factor")
	f.StringVar(&e.model, "model", "terrain", "propagation model: terrain (ITU-R P.526-16 delta-Bullington) or free-space")
	f.StringVar(&e.polarization, "polarization", "vertical", "vertical or horizontal")
	f.StringVar(&e.ground, "ground", "land", "ground constants: land or sea (ITU-R P.1812)")
	f.StringVar(&e.step, "step", "", "profile sample spacing [m] (default: the elevation data's spacing)")
}

// env builds the link environment from the flags (terrain not yet set).
func (e *envFlags) env() (*plan.Env, error) {
	env := &plan.Env{}
	var err error
	if env.K, err = kFactor(e.k); err != nil {
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

// kFactor parses --k (units.ParseKFactor); an error names the flag.
func kFactor(value string) (float64, error) { return quantity("k", value, units.ParseKFactor) }

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

// addKitFlags registers the antenna and feedline flags of one end of a link:
// prefix is "" or "to-", what ("transmitting ", "receiving " or "") words
// the help. With power, the end's transmitter power too.
func addKitFlags(cmd *cobra.Command, e *endFlags, prefix, what string, power bool) {
	f := cmd.Flags()
	if power {
		f.StringVar(&e.power, prefix+"power", "5W", "transmitter power [W]")
	}
	f.StringVar(&e.gain, prefix+"gain", "0dBi", what+"antenna gain [dBi] (dBd accepted)")
	f.StringVar(&e.height, prefix+"height", "1.5m", what+"antenna height above ground [m]")
	f.StringVar(&e.cable, prefix+"cable", "", what+"feedline cable (see `mastlink feedline --list`)")
	f.StringVar(&e.cableLength, prefix+"cable-length", "", what+"feedline length [m]")
	f.IntVar(&e.connectors, prefix+"connectors", 0, "mated connector pairs in the "+what+"feedline")
	f.StringVar(&e.swr, prefix+"swr", "1", "SWR at the "+what+"antenna")
}
