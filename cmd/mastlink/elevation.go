package main

import (
	"context"
	"fmt"
	"io"
	"regexp"

	"github.com/mastlink/mastlink/plan/units"
	"github.com/mastlink/mastlink/terrain"
	"github.com/spf13/cobra"
)

type elevationOptions struct {
	points pointResolver
}

// elevationPoint is one point of the JSON of `mastlink elevation`.
type elevationPoint struct {
	Name       string  `json:"name,omitempty"`
	Lat        float64 `json:"lat"`
	Lon        float64 `json:"lon"`
	ElevationM float64 `json:"elevation_m"`
	Source     string  `json:"source"` // file name, or "none"
}

// elevationOutput is the JSON of `mastlink elevation`.
type elevationOutput struct {
	Points []elevationPoint `json:"points"`
}

func newElevationCmd(g *globals) *cobra.Command {
	o := &elevationOptions{}
	cmd := &cobra.Command{
		Use:   "elevation POINT...",
		Short: "Ground height at points",
		Long: `Ground height above sea level (the EGM96 geoid of SRTM data) at each point,
interpolated bilinearly between the four surrounding samples of the
elevation data, and the file it came from.

Points are LAT,LON in decimal degrees (a negative latitude is fine) or
waypoint names from --waypoints. Elevation data
comes from --dem or MASTLINK_DEM. A point no file covers is reported at 0 m
with source "none", and the missing tiles are named on stderr.`,
		Example: "  mastlink elevation --dem examples/terrain -48.5,-123.95 -48.45,-123.95\n" +
			"  mastlink elevation --dem examples/terrain --waypoints examples/valley/points.gpx \"Corvane Peak\" \"Wethermoss Saddle\"",
		Args: cobra.MinimumNArgs(1),
		RunE: func(cmd *cobra.Command, args []string) error {
			return runElevation(cmd.Context(), g, o, args)
		},
	}
	addWaypointsFlag(cmd, &o.points)
	cmd.SetFlagErrorFunc(func(c *cobra.Command, err error) error {
		if m := negativePoint.FindStringSubmatch(err.Error()); m != nil {
			return usagef("%s reads as a flag: put -- before points with a negative latitude (mastlink elevation [flags] -- %s)", m[1], m[1])
		}
		return flagError(c, err)
	})
	return cmd
}

// negativePoint finds a LAT,LON with a negative latitude in the error the
// flag parser gives for it ("unknown shorthand flag: '4' in -48.5,-123.9").
var negativePoint = regexp.MustCompile(`in (-[0-9.]+,\S*)$`)

func runElevation(ctx context.Context, g *globals, o *elevationOptions, args []string) error {
	out := elevationOutput{Points: make([]elevationPoint, len(args))}
	for i, a := range args {
		pos, name, err := o.points.resolve(fmt.Sprintf("point %d", i+1), a)
		if err != nil {
			return err
		}
		if _, err := units.ParsePoint(a); err == nil {
			name = "" // given as coordinates
		}
		out.Points[i] = elevationPoint{Name: name, Lat: pos.Lat(), Lon: pos.Lon(), Source: terrain.NoSource}
	}
	set, err := g.openTerrain()
	if err != nil {
		return err
	}
	if set == nil {
		fmt.Fprintln(g.stderr, "mastlink: no elevation data given (--dem or MASTLINK_DEM): every height is 0 m (smooth earth)")
	}
	none := 0
	for i := range out.Points {
		p := &out.Points[i]
		if set != nil {
			if p.ElevationM, p.Source, err = set.Elevation(p.Lat, p.Lon); err != nil {
				return fmt.Errorf("%s: %w", pointLabel(*p), err)
			}
		}
		if p.Source == terrain.NoSource {
			none++
		}
	}
	if set != nil && none > 0 {
		if len(set.Missing()) > 0 {
			g.warnMissing(set)
		} else {
			fmt.Fprintf(g.stderr, "mastlink: warning: %d of the points fall in a void of the elevation data; their height is given as 0 m\n", none)
		}
	}
	return g.emit(out, func(w io.Writer) error {
		rows := make([][]string, len(out.Points))
		for i, p := range out.Points {
			rows[i] = []string{p.Name, deg(p.Lat), deg(p.Lon), f2(p.ElevationM), p.Source}
		}
		return writeCSV(w, []string{"name", "lat", "lon", "elevation_m", "source"}, rows)
	}, func(w io.Writer) error { return renderElevationText(w, out, g.imperial()) })
}

// renderElevationText writes the points as a table, with a name column
// when any point was given by name.
func renderElevationText(w io.Writer, out elevationOutput, im bool) error {
	named := false
	for _, p := range out.Points {
		named = named || p.Name != ""
	}
	t := newTable(w)
	head := []string{"lat", "lon", "elevation", "source"}
	if named {
		head = append([]string{"point"}, head...)
	}
	t.row(head...)
	for _, p := range out.Points {
		cells := []string{fmt.Sprintf("%.6f", p.Lat), fmt.Sprintf("%.6f", p.Lon), units.FormatHeight(p.ElevationM, im), p.Source}
		if named {
			cells = append([]string{p.Name}, cells...)
		}
		t.row(cells...)
	}
	return t.flush()
}

// pointLabel names a point in messages: its waypoint name or LAT,LON.
func pointLabel(p elevationPoint) string {
	if p.Name != "" {
		return p.Name
	}
	return deg(p.Lat) + "," + deg(p.Lon)
}
