package main

import (
	"context"
	"fmt"
	"io"

	"github.com/mastlink/mastlink/plan"
	"github.com/mastlink/mastlink/plan/gpx"
	"github.com/mastlink/mastlink/plan/units"
	"github.com/paulmach/orb"
	"github.com/paulmach/orb/geojson"
	"github.com/spf13/cobra"
)

func newSitesCmd(g *globals) *cobra.Command {
	o := &reachOptions{}
	cmd := &cobra.Command{
		Use:   "sites CANDIDATES.gpx [--plan FILE]",
		Short: "Rank candidate sites for a station by how well each reaches every target",
		Long: `Sets the station up at every waypoint of CANDIDATES.gpx and checks every
target in both directions over the terrain. The candidates are ranked by
their worst margin over the required links, then by how many required
targets they reach both ways. For each, the lowest mast that meets the
requirement is given: from the plan's mast sweep (with the lightest cable
that does it), or the station's own antenna height when the plan has no
sweep.

With --plan the station is the plan's first (or --station NAME) and the
targets are the plan's targets and other stations, each with its own kit.
Kit, requirement and model flags given with --plan replace the plan's
figures for this run ("what if": --power 50W, --margin 6dB), and the
output lists them. Without a plan the station's kit comes from --power,
--gain, --height, --rx-sens … and the targets from --targets, each a
waypoint with the kit of the --to- flags (--to-power, --to-gain,
--to-height, --to-sens …; a 5 W handheld at 1.5 m unless they say).

-o F.geojson writes the candidates as points with their figures, F.csv
the ranking, and F.png a map of the candidates numbered by rank and
coloured by their worst margin, with the targets, over a shaded relief.

` + itmHelp,
		Example: "  mastlink sites examples/valley/candidates.gpx --plan examples/valley/plan.yaml\n" +
			"  mastlink sites examples/valley/candidates.gpx --plan examples/valley/plan.yaml -o sites.geojson",
		Args: cobra.ExactArgs(1),
		RunE: func(cmd *cobra.Command, args []string) error {
			return runSites(cmd.Context(), g, cmd, o, args)
		},
	}
	addReachFlags(cmd, o, "station", "the plan's first station")
	return cmd
}

func runSites(ctx context.Context, g *globals, cmd *cobra.Command, o *reachOptions, args []string) error {
	var rr *reach
	return runReach(ctx, g, cmd, o, args[0], reachRun[*plan.SitesResult]{
		forSites: true,
		outKinds: []string{"geojson", "csv", "png"},
		warnings: func(res *plan.SitesResult) []string { return res.Warnings },
		check: func(gf *gpx.File) error {
			if len(gf.Waypoints) == 0 {
				return fmt.Errorf("%s has no waypoints: give one waypoint per candidate site", gf.Path)
			}
			return nil
		},
		compute: func(ctx context.Context, r *reach, gf *gpx.File, progress plan.Progress) (*plan.SitesResult, error) {
			rr = r
			return r.env.RankSites(ctx, plan.SitesRequest{Candidates: gf.Waypoints, Station: r.kit, Targets: r.targets, NeededMarginDB: r.needDB, Mast: r.mast}, progress)
		},
		note: func(res *plan.SitesResult, def bool, whatIf []string) { res.DefaultMargin, res.WhatIf = def, whatIf },
		write: func(kind string, inputs []string, res *plan.SitesResult) error {
			switch kind {
			case "geojson":
				return renderTo(g.out, inputs, func(w io.Writer) error { return writeJSON(w, sitesGeoJSON(res)) })
			case "png":
				return renderTo(g.out, inputs, func(w io.Writer) error { return sitesMap(w, res, rr.targets, rr.env.Terrain, g.imperial()) })
			}
			return renderTo(g.out, inputs, func(w io.Writer) error { return writeSitesCSV(w, res) })
		},
		csv: func(w io.Writer, res *plan.SitesResult) error {
			g.cautionsToStderr(res.Cautions)
			return writeSitesCSV(w, res)
		},
		text: func(w io.Writer, res *plan.SitesResult) error {
			renderSitesText(w, res, g.imperial())
			writeCautions(w, res.Cautions)
			return nil
		},
	})
}

// renderSitesText writes the ranking as a table.
func renderSitesText(w io.Writer, s *plan.SitesResult, im bool) {
	mast := fmt.Sprintf("its own %s antenna height", units.FormatHeight(s.HeightM, im))
	if n := len(s.MastHeightsM); n > 0 {
		mast = fmt.Sprintf("masts of %s to %s", units.FormatHeight(s.MastHeightsM[0], im), units.FormatHeight(s.MastHeightsM[n-1], im))
	}
	fmt.Fprintf(w, "Candidate sites for %s (%.1f dB of margin needed both ways%s; %s)\n", s.Station, s.NeededMarginDB, defaultNote(s.DefaultMargin), mast)
	renderWhatIf(w, s.WhatIf)
	t := newTable(w)
	t.row("  rank", "site", "ground", "worst margin", "worst link", "reaches", "lowest mast")
	for _, c := range s.Sites {
		m := "none meets it"
		if c.MastM != nil {
			m = units.FormatHeight(*c.MastM, im)
			if c.Cable != "" {
				m += " with " + c.Cable
			}
		}
		t.row(fmt.Sprintf("  %d", c.Rank), c.Name, units.FormatHeight(c.GroundM, im), db(c.WorstMarginDB), c.WorstLink,
			fmt.Sprintf("%d of %d", c.Reachable, c.Of), m)
	}
	t.flush()
	fmt.Fprintln(w)
}

// writeSitesCSV writes one row per candidate, best first.
func writeSitesCSV(w io.Writer, s *plan.SitesResult) error {
	header := []string{"rank", "name", "lat", "lon", "ground_m", "worst_margin_db", "worst_link", "reachable", "of", "mast_m", "cable"}
	rows := make([][]string, len(s.Sites))
	for i, c := range s.Sites {
		m := ""
		if c.MastM != nil {
			m = f1(*c.MastM)
		}
		rows[i] = []string{fmt.Sprint(c.Rank), c.Name, fmt.Sprintf("%.7f", c.Lat), fmt.Sprintf("%.7f", c.Lon), f1(c.GroundM), f2(c.WorstMarginDB),
			c.WorstLink, fmt.Sprint(c.Reachable), fmt.Sprint(c.Of), m, c.Cable}
	}
	return writeCSV(w, header, rows)
}

// sitesGeoJSON writes the candidates as points with their figures.
func sitesGeoJSON(s *plan.SitesResult) *geojson.FeatureCollection {
	fc := geojson.NewFeatureCollection()
	for _, c := range s.Sites {
		f := geojson.NewFeature(orb.Point{c.Lon, c.Lat})
		f.Properties["name"] = c.Name
		f.Properties["rank"] = c.Rank
		f.Properties["ground_m"] = round2(c.GroundM)
		f.Properties["worst_margin_db"] = round2(c.WorstMarginDB)
		f.Properties["worst_link"] = c.WorstLink
		f.Properties["reachable"] = c.Reachable
		f.Properties["of"] = c.Of
		if c.MastM != nil {
			f.Properties["mast_m"] = *c.MastM
		} else {
			f.Properties["mast_m"] = nil
		}
		if c.Cable != "" {
			f.Properties["cable"] = c.Cable
		}
		margins := map[string]any{}
		for _, t := range c.Targets {
			margins[t.Name] = round2(t.MarginDB)
		}
		f.Properties["margins_db"] = margins
		fc.Append(f)
	}
	return fc
}
