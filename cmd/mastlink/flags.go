package main

import (
	"errors"
	"fmt"
	"strconv"
	"strings"

	"github.com/mastlink/mastlink/plan"
	"github.com/paulmach/orb"
	"github.com/spf13/cobra"
)

// quantity parses the value of a quantity flag with fn; an error names the
// flag and is a usage error (exit code 2).
func quantity(flag, value string, fn func(string) (float64, error)) (float64, error) {
	v, err := fn(value)
	if err != nil {
		return 0, usagef("--%s: %v", flag, err)
	}
	return v, nil
}

// kFactor parses --k: a number or a fraction such as 4/3.
func kFactor(value string) (float64, error) {
	var k float64
	if a, b, ok := strings.Cut(value, "/"); ok {
		x, e1 := strconv.ParseFloat(strings.TrimSpace(a), 64)
		y, e2 := strconv.ParseFloat(strings.TrimSpace(b), 64)
		if e1 != nil || e2 != nil || y == 0 {
			return 0, usagef("--k: %q is not a k-factor (write e.g. 4/3 or 1.333)", value)
		}
		k = x / y
	} else {
		x, err := strconv.ParseFloat(strings.TrimSpace(value), 64)
		if err != nil {
			return 0, usagef("--k: %q is not a k-factor (write e.g. 4/3 or 1.333)", value)
		}
		k = x
	}
	if !(k >= 0.5 && k <= 10) {
		return 0, usagef("--k: %g is outside 0.5 to 10 (4/3 is the usual median)", k)
	}
	return k, nil
}

// pointResolver turns LAT,LON or a waypoint name into a position.
type pointResolver struct {
	file string // --waypoints
	gpx  *plan.GPXFile
}

func (r *pointResolver) resolve(flag, value string) (orb.Point, string, error) {
	p, err := plan.ParsePoint(value)
	if err == nil {
		return p, fmt.Sprintf("%.5f,%.5f", p.Lat(), p.Lon()), nil
	}
	if !errors.Is(err, plan.ErrSyntax) {
		return orb.Point{}, "", usagef("%s: %v", flag, err)
	}
	if r.file == "" {
		return orb.Point{}, "", usagef("%s: %q is not LAT,LON; to use a waypoint name, give its GPX file with --waypoints", flag, value)
	}
	if r.gpx == nil {
		g, err := plan.ReadGPX(r.file)
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
