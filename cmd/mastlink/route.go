package main

import (
	"context"
	"fmt"
	"io"
	"math"
	"strings"

	"github.com/mastlink/mastlink/plan"
	"github.com/mastlink/mastlink/plan/gpx"
	"github.com/mastlink/mastlink/plan/units"
	"github.com/paulmach/orb"
	"github.com/paulmach/orb/geojson"
	"github.com/spf13/cobra"
)

type routeOptions struct {
	reachOptions
	spacing, track string
}

func newRouteCmd(g *globals) *cobra.Command {
	o := &routeOptions{}
	cmd := &cobra.Command{
		Use:   "route TRACK.gpx [--plan FILE] [--targets FILE.gpx] [--spacing L]",
		Short: "Coverage along a track: where the targets can be reached, the dead stretches, the best spots to call from",
		Long: `Walks a GPX track (or route) with a radio and checks, every --spacing metres
along it, every target in both directions over the terrain: talk-in and
talk-out for repeaters, out and back for simplex targets. It reports the
share of the distance where each target (and every required one at once)
meets the margin, the dead stretches, and the best spots to call from just
before and after each.

With --plan the kit carried is the plan's defaults (a handheld), or the
station named by --station; the targets are the plan's targets and its
stations (simplex on the plan's frequency), each with its own kit. Kit,
requirement and model flags given with --plan replace the plan's figures
for this run ("what if": --power 10W, --margin 6dB, --model free-space),
and the output lists them. Without a plan the kit comes from --power,
--gain, --height, --rx-sens … and the targets from --targets, each a
waypoint with the kit of the --to- flags (--to-power, --to-gain,
--to-height, --to-sens …; a 5 W handheld at 1.5 m unless they say).

Two spacings: --spacing is the distance between the points checked along
the track (one radio path from each point to each target); --step is the
distance between terrain samples along each of those radio paths (the
elevation data's own spacing unless given).

-o writes F.geojson (the track in covered and uncovered pieces), F.gpx (the
track with waypoints at the ends of dead stretches and at the best spots) or
F.csv (every checked point) or F.png (a map: the track coloured by the
worst margin, the dead stretches, the best spots to call from and the
targets, over a shaded relief).

` + itmHelp,
		Example: "  mastlink route examples/valley/hike.gpx --plan examples/valley/plan.yaml\n" +
			"  mastlink route examples/valley/hike.gpx --plan examples/valley/plan.yaml -o hike-coverage.gpx\n" +
			"  mastlink route hike.gpx --dem tiles/ --targets repeater.gpx --freq 147.78 --power 5W --rx-sens -119dBm",
		Args: cobra.ExactArgs(1),
		RunE: func(cmd *cobra.Command, args []string) error {
			return runRoute(cmd.Context(), g, cmd, o, args)
		},
	}
	addReachFlags(cmd, &o.reachOptions, plan.HandheldName, "the plan's defaults: as a handheld when they give a radio, else the first station")
	cmd.Flags().StringVar(&o.spacing, "spacing", "50m", "distance between checked points along the track [m] (--step: between terrain samples on each radio path)")
	cmd.Flags().Lookup("step").Usage = "distance between terrain samples along each radio path [m] (default: the elevation data's spacing; --spacing: between checked points on the track)"
	cmd.Flags().StringVar(&o.track, "track", "", "name of the track or route in the file (default: the first)")
	return cmd
}

func runRoute(ctx context.Context, g *globals, cmd *cobra.Command, o *routeOptions, args []string) error {
	spacing, err := quantity("spacing", o.spacing, units.ParseLengthM)
	if err != nil {
		return err
	}
	if !(spacing > 0) {
		return usagef("--spacing: give a distance above 0 m")
	}
	var track gpx.Track
	var rr *reach
	return runReach(ctx, g, cmd, &o.reachOptions, args[0], reachRun[*plan.RouteResult]{
		outKinds: []string{"geojson", "gpx", "csv", "png"},
		warnings: func(res *plan.RouteResult) []string { return res.Warnings },
		check: func(gf *gpx.File) error {
			track, err = pickTrack(g, gf, o.track)
			return err
		},
		compute: func(ctx context.Context, r *reach, _ *gpx.File, progress plan.Progress) (*plan.RouteResult, error) {
			rr = r
			return r.env.Route(ctx, plan.RouteRequest{Track: track, Walker: r.kit, Targets: r.targets, NeededMarginDB: r.needDB, SpacingM: spacing}, progress)
		},
		note: func(res *plan.RouteResult, def bool, whatIf []string) { res.DefaultMargin, res.WhatIf = def, whatIf },
		write: func(kind string, inputs []string, res *plan.RouteResult) error {
			switch kind {
			case "geojson":
				return renderTo(g.out, inputs, func(w io.Writer) error { return writeJSON(w, routeGeoJSON(res)) })
			case "gpx":
				return writeRouteGPX(g.out, inputs, track, res)
			case "png":
				return renderTo(g.out, inputs, func(w io.Writer) error { return routeMap(w, res, rr.targets, rr.env.Terrain, g.imperial()) })
			}
			return renderTo(g.out, inputs, func(w io.Writer) error { return writeRouteCSV(w, res) })
		},
		csv:  writeRouteCSV,
		text: func(w io.Writer, res *plan.RouteResult) error { renderRouteText(w, res, g.imperial()); return nil },
	})
}

// pickTrack returns the track or route called name, or the first.
func pickTrack(g *globals, gf *gpx.File, name string) (gpx.Track, error) {
	if len(gf.Tracks) == 0 {
		return gpx.Track{}, fmt.Errorf("%s has no track or route: record the walk as a GPX track", gf.Path)
	}
	if name == "" {
		if len(gf.Tracks) > 1 {
			fmt.Fprintf(g.stderr, "mastlink: %s holds %d tracks and routes; checking the first, %q (choose with --track)\n", gf.Path, len(gf.Tracks), gf.Tracks[0].Name)
		}
		return gf.Tracks[0], nil
	}
	var names []string
	for _, t := range gf.Tracks {
		if strings.EqualFold(strings.TrimSpace(t.Name), strings.TrimSpace(name)) {
			return t, nil
		}
		names = append(names, fmt.Sprintf("%q", t.Name))
	}
	return gpx.Track{}, usagef("--track: %s has no track or route %q (it has %s)", gf.Path, name, strings.Join(names, ", "))
}

// renderRouteText writes a route's coverage as a short briefing.
func renderRouteText(w io.Writer, r *plan.RouteResult, im bool) {
	fmt.Fprintf(w, "Route: %s\n", r.Name)
	fmt.Fprintf(w, "  %s checked every %s (%d points) carrying the %s kit; %.1f dB of margin needed both ways%s\n",
		units.FormatLength(r.LengthM, im), units.FormatLength(r.SpacingM, im), len(r.Points), r.Walker, r.NeededMarginDB, defaultNote(r.DefaultMargin))
	renderWhatIf(w, r.WhatIf)
	if r.Terrain == "smooth earth" {
		fmt.Fprintln(w, "  (no elevation data along the way: a smooth earth)")
	}
	fmt.Fprintln(w)
	t := newTable(w)
	t.row("  target", "ways", "covered", "best margin")
	for _, x := range r.Targets {
		name := x.Name
		if x.Optional {
			name += " (optional)"
		}
		t.row("  "+name, strings.Join(x.Directions, "/"), percent(x.Fraction),
			fmt.Sprintf("%s at %s", db(x.BestMarginDB), units.FormatLength(x.BestDistanceM, im)))
	}
	t.row("  every required target", "", percent(r.OverallFraction), "")
	t.flush()
	fmt.Fprintln(w)
	if len(r.Gaps) == 0 {
		fmt.Fprintln(w, "  No dead stretches: every required target is in reach all the way.")
	} else {
		fmt.Fprintln(w, "  Dead stretches (some required target out of reach):")
		for _, gp := range r.Gaps {
			fmt.Fprintf(w, "    %s to %s (%s): %s\n", units.FormatLength(gp.StartM, im), units.FormatLength(gp.EndM, im),
				units.FormatLength(gp.LengthM, im), strings.Join(gp.Missing, "; "))
		}
	}
	if len(r.BestSpots) > 0 {
		fmt.Fprintln(w, "\n  Best spots to call from, before and after each target's dead stretches:")
		t := newTable(w)
		t.row("    target", "dead stretch", "call at", "position", "margin")
		for _, s := range r.BestSpots {
			t.row("    "+s.Target, fmt.Sprintf("%s–%s", units.FormatLength(s.GapStartM, im), units.FormatLength(s.GapEndM, im)),
				fmt.Sprintf("%s (%s)", units.FormatLength(s.DistanceM, im), s.Side), fmt.Sprintf("%.5f,%.5f", s.Lat, s.Lon), db(s.MarginDB))
		}
		t.flush()
	}
	for _, x := range r.Targets {
		if !x.Optional && x.Fraction == 0 {
			fmt.Fprintf(w, "\n  %s is out of reach all along the route (best %s at %s).\n", x.Name, db(x.BestMarginDB), units.FormatLength(x.BestDistanceM, im))
		}
	}
	fmt.Fprintln(w)
}

// writeRouteCSV writes one row per checked point.
func writeRouteCSV(w io.Writer, r *plan.RouteResult) error {
	header := []string{"distance_m", "lat", "lon", "elevation_m", "worst_margin_db", "covered"}
	for _, t := range r.Targets {
		header = append(header, t.Name+" margin_db")
	}
	rows := make([][]string, len(r.Points))
	for i, p := range r.Points {
		row := []string{f1(p.DistanceM), fmt.Sprintf("%.7f", p.Lat), fmt.Sprintf("%.7f", p.Lon), f1(p.ElevationM), f2(p.WorstMarginDB), fmt.Sprint(p.Covered)}
		for _, m := range p.MarginsDB {
			row = append(row, f2(m))
		}
		rows[i] = row
	}
	return writeCSV(w, header, rows)
}

// routeGeoJSON splits the track into covered and uncovered pieces (the
// overall coverage), with their figures as properties, and adds the best
// spots as points.
func routeGeoJSON(r *plan.RouteResult) *geojson.FeatureCollection {
	fc := geojson.NewFeatureCollection()
	pts := r.Points
	edge := func(k int) float64 {
		switch {
		case k <= 0:
			return 0
		case k >= len(pts):
			return r.LengthM
		}
		return (pts[k-1].DistanceM + pts[k].DistanceM) / 2
	}
	for k := 0; k < len(pts); {
		j := k
		worst := math.Inf(1)
		per := make([]float64, len(r.Targets))
		for i := range per {
			per[i] = math.Inf(1)
		}
		for j < len(pts) && pts[j].Covered == pts[k].Covered {
			worst = math.Min(worst, pts[j].WorstMarginDB)
			for i, m := range pts[j].MarginsDB {
				per[i] = math.Min(per[i], m)
			}
			j++
		}
		from, to := edge(k), edge(j)
		f := geojson.NewFeature(r.Piece(from, to))
		f.Properties["covered"] = pts[k].Covered
		f.Properties["start_m"] = round2(from)
		f.Properties["end_m"] = round2(to)
		f.Properties["length_m"] = round2(to - from)
		f.Properties["worst_margin_db"] = round2(worst)
		margins := map[string]any{}
		var out []string
		for i, t := range r.Targets {
			margins[t.Name] = round2(per[i])
			if !t.Optional && per[i] < r.NeededMarginDB {
				out = append(out, t.Name)
			}
		}
		f.Properties["worst_margins_db"] = margins
		if out != nil {
			f.Properties["out_of_reach"] = out
		}
		fc.Append(f)
		k = j
	}
	for _, s := range r.BestSpots {
		f := geojson.NewFeature(orb.Point{s.Lon, s.Lat})
		f.Properties["best_spot"] = true
		f.Properties["target"] = s.Target
		f.Properties["side"] = s.Side
		f.Properties["distance_m"] = round2(s.DistanceM)
		f.Properties["margin_db"] = round2(s.MarginDB)
		f.Properties["gap_start_m"] = round2(s.GapStartM)
		f.Properties["gap_end_m"] = round2(s.GapEndM)
		fc.Append(f)
	}
	return fc
}

// writeRouteGPX writes the track with waypoints at the ends of every dead
// stretch and at the best spots, their margins in the descriptions; times
// (UTC) are the track's, interpolated along it, where it has them.
func writeRouteGPX(path string, inputs []string, track gpx.Track, r *plan.RouteResult) error {
	out := gpx.Output{Name: "Coverage along " + r.Name, Tracks: []gpx.Track{track}}
	for i, gp := range r.Gaps {
		for _, end := range []struct {
			name string
			d    float64
			desc string
		}{
			{fmt.Sprintf("Gap %d start", i+1), gp.StartM, fmt.Sprintf("coverage lost for %.1f km: %s out of reach (worst margin %+.1f dB)", gp.LengthM/1000, strings.Join(gp.Missing, "; "), gp.WorstMarginDB)},
			{fmt.Sprintf("Gap %d end", i+1), gp.EndM, fmt.Sprintf("coverage back after %.1f km", gp.LengthM/1000)},
		} {
			lat, lon, tm := r.PositionAt(end.d)
			out.Waypoints = append(out.Waypoints, gpx.Place{Name: end.name, Pos: orb.Point{lon, lat}, ElevM: math.NaN(), Time: tm, Symbol: "Danger Area",
				Description: fmt.Sprintf("%s at %.2f km along the track", end.desc, end.d/1000)})
		}
	}
	for _, s := range r.BestSpots {
		_, _, tm := r.PositionAt(s.DistanceM)
		out.Waypoints = append(out.Waypoints, gpx.Place{Name: "Call " + s.Target, Pos: orb.Point{s.Lon, s.Lat}, ElevM: s.ElevationM, Time: tm, Symbol: "Flag",
			Description: fmt.Sprintf("best spot %s the dead stretch %.2f–%.2f km: margin %+.1f dB to %s, at %.2f km along the track",
				s.Side, s.GapStartM/1000, s.GapEndM/1000, s.MarginDB, s.Target, s.DistanceM/1000)})
	}
	b, err := gpx.Encode(out)
	if err != nil {
		return err
	}
	return writeFileAtomic(path, b, inputs)
}

// defaultNote marks the default requirement in a briefing line.
func defaultNote(def bool) string {
	if def {
		return " (default)"
	}
	return ""
}

// renderWhatIf lists the flags that replaced a plan's figures.
func renderWhatIf(w io.Writer, whatIf []string) {
	if len(whatIf) > 0 {
		fmt.Fprintf(w, "  What if: %s (instead of the plan's figures)\n", strings.Join(whatIf, ", "))
	}
}
