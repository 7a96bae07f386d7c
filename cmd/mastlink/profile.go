package main

import (
	"context"
	"fmt"
	"io"
	"strings"

	"github.com/mastlink/mastlink/plan/report"
	"github.com/mastlink/mastlink/plan/units"
	"github.com/mastlink/mastlink/terrain"
	"github.com/spf13/cobra"
)

type profileOptions struct {
	from, to, step   string
	height, toHeight string
	k                string
	freq, size       string // chart only: Fresnel zone frequency, picture size
	points           pointResolver
}

// profileEnd is one end of the path in the JSON of `mastlink profile`.
type profileEnd struct {
	Name       string  `json:"name"`
	Lat        float64 `json:"lat"`
	Lon        float64 `json:"lon"`
	ElevationM float64 `json:"elevation_m"`
}

// profileSample is one sample of the profile.
type profileSample struct {
	DistanceM  float64 `json:"distance_m"`
	Lat        float64 `json:"lat"`
	Lon        float64 `json:"lon"`
	ElevationM float64 `json:"elevation_m"`
}

// profileOutput is the JSON of `mastlink profile`.
type profileOutput struct {
	From           profileEnd      `json:"from"`
	To             profileEnd      `json:"to"`
	DistanceM      float64         `json:"distance_m"`
	AzimuthDeg     float64         `json:"azimuth_deg"`
	BackAzimuthDeg float64         `json:"back_azimuth_deg"`
	StepM          float64         `json:"step_m"`
	Sources        []string        `json:"sources"`
	NoDataSamples  int             `json:"no_data_samples"`
	Lowest         profileSample   `json:"lowest"`
	Highest        profileSample   `json:"highest"`
	Samples        []profileSample `json:"samples"`
}

// profileTableRows is the most sample rows the text output shows.
const profileTableRows = 25

func newProfileCmd(g *globals) *cobra.Command {
	o := &profileOptions{}
	cmd := &cobra.Command{
		Use:   "profile --from P --to P [--step L] [-o F.csv|F.svg|F.png]",
		Short: "Terrain along the path between two points",
		Long: `The ground along the WGS84 geodesic (shortest path on the ellipsoid, Karney's
algorithm) from --from to --to: its length, the bearings at both ends, and
the ground height sampled every --step (default: the elevation data's own
spacing), interpolated bilinearly between the data's samples.

Text output is a summary with every Nth sample; --format csv or json gives
every sample on stdout. -o FILE.csv writes the samples as CSV (distance_m,
lat, lon, elevation_m; read back by mastlink link --profile), -o FILE.svg a
chart (vector, for the web or further editing), -o FILE.png the same chart
as a picture to print or put in a briefing. With --height or --to-height the
chart also shows the masts, the straight line of sight between their tops,
and the terrain raised by the earth bulge for --k. With --freq it draws the
first Fresnel zone and its 0.6 part about the line of sight (ITU-R P.526)
and marks the governing obstacle with its clearance; --size WxH sets the
picture's size in pixels.

Points are LAT,LON in decimal degrees or waypoint names from --waypoints.
Elevation data comes from --dem or MASTLINK_DEM; without it the ground is
0 m (smooth earth).`,
		Example: "  mastlink profile --dem examples/terrain --waypoints examples/valley/points.gpx \\\n" +
			"    --from \"Wethermoss Saddle\" --to \"Corvane Peak\"\n" +
			"  mastlink profile --dem examples/terrain --from -48.535,-123.963 --to -48.4467,-123.9492 \\\n" +
			"    --height 9m --to-height 20m --freq 146.55MHz --size 1000x420 -o saddle-peak.png",
		Args: cobra.NoArgs,
		RunE: func(cmd *cobra.Command, args []string) error {
			return runProfile(cmd.Context(), g, o, args)
		},
	}
	f := cmd.Flags()
	f.StringVar(&o.from, "from", "", "start of the path: LAT,LON or waypoint (required)")
	f.StringVar(&o.to, "to", "", "end of the path: LAT,LON or waypoint (required)")
	f.StringVar(&o.step, "step", "", "sample spacing [m] (default: the elevation data's spacing, about 90 m for 3″ SRTM)")
	f.StringVar(&o.height, "height", "", "antenna height above ground at --from, drawn on a chart (-o F.svg or F.png) [m]")
	f.StringVar(&o.toHeight, "to-height", "", "antenna height above ground at --to, drawn on a chart (-o F.svg or F.png) [m]")
	f.StringVar(&o.k, "k", "4/3", "effective earth-radius factor for the earth bulge on a chart with antennas")
	f.StringVar(&o.freq, "freq", "", "frequency for the chart's first Fresnel zone, its 0.6 part and the governing obstacle (needs -o F.svg or F.png) [MHz]")
	f.StringVar(&o.size, "size", "", "chart size in pixels, WIDTHxHEIGHT (default 800x360; at least 320x200)")
	addWaypointsFlag(cmd, &o.points)
	_ = cmd.MarkFlagRequired("from")
	_ = cmd.MarkFlagRequired("to")
	return cmd
}

func runProfile(ctx context.Context, g *globals, o *profileOptions, args []string) error {
	inputs := append(g.demPaths(), o.points.file)
	if g.out != "" {
		if err := checkNotInput("--out", g.out, inputs); err != nil {
			return err
		}
		switch extension(g.out) {
		case "csv", "svg", "png":
		default:
			return usagef("--out: %s: cannot tell the format from the extension; use .csv for the samples, .svg or .png for a chart", g.out)
		}
	}
	var stepM float64
	var err error
	if o.step != "" {
		if stepM, err = quantity("step", o.step, units.ParseLengthM); err != nil {
			return err
		}
		if !(stepM > 0) {
			return usagef("--step: give a spacing above 0 m")
		}
	}
	var chartOpts []report.ProfileOption
	if o.height != "" || o.toHeight != "" {
		var h1, h2 float64
		if o.height != "" {
			if h1, err = quantity("height", o.height, units.ParseLengthM); err != nil {
				return err
			}
		}
		if o.toHeight != "" {
			if h2, err = quantity("to-height", o.toHeight, units.ParseLengthM); err != nil {
				return err
			}
		}
		if h1 < 0 || h2 < 0 {
			return usagef("--height, --to-height: give heights of 0 m or more")
		}
		k, err := quantity("k", o.k, units.ParseKFactor)
		if err != nil {
			return err
		}
		chartOpts = append(chartOpts, report.WithAntennas(h1, h2), report.WithEarthBulge(k))
	}
	more, err := profileChartFlags(o, g.out, len(chartOpts) > 0)
	if err != nil {
		return err
	}
	chartOpts = append(chartOpts, more...)
	from, fromName, err := o.points.resolve("--from", o.from)
	if err != nil {
		return err
	}
	to, toName, err := o.points.resolve("--to", o.to)
	if err != nil {
		return err
	}
	if from == to {
		return usagef("--from and --to are the same point; give two different points")
	}

	set, err := g.openTerrain()
	if err != nil {
		return err
	}
	smooth := set == nil
	if smooth {
		g.noticeSmoothEarth()
		if set, err = terrain.Open(); err != nil {
			return err
		}
	}
	var p terrain.Profile
	if err := set.Profile(from.Lat(), from.Lon(), to.Lat(), to.Lon(), stepM, &p); err != nil {
		return fmt.Errorf("profile: %w", err)
	}
	if !smooth {
		g.warnMissing(set)
	}
	out := newProfileOutput(&p, fromName, toName)

	if g.out != "" {
		err := renderTo(g.out, inputs, func(w io.Writer) error {
			ext := extension(g.out)
			if ext == "csv" {
				return terrain.WriteProfileCSV(w, p.DistM, p.Lat, p.Lon, p.ElevM)
			}
			opts := append([]report.ProfileOption{report.WithTitle(fmt.Sprintf("Terrain from %s to %s", fromName, toName))}, chartOpts...)
			if g.imperial() {
				opts = append(opts, report.WithImperial())
			}
			if ext == "png" {
				return report.ProfilePNG(w, p.DistM, p.ElevM, opts...)
			}
			return report.ProfileSVG(w, p.DistM, p.ElevM, opts...)
		})
		if err != nil {
			return err
		}
		fmt.Fprintf(g.stderr, "mastlink: wrote the profile (%d samples) to %s\n", p.Len(), g.out)
	}
	return g.emit(out, func(w io.Writer) error { return terrain.WriteProfileCSV(w, p.DistM, p.Lat, p.Lon, p.ElevM) },
		func(w io.Writer) error { renderProfileText(w, out, g.out, g.imperial()); return nil })
}

// demPaths lists the paths given with --dem (the inputs not to overwrite).
func (g *globals) demPaths() []string {
	var paths []string
	for _, p := range strings.Split(g.dem, ",") {
		if p = strings.TrimSpace(p); p != "" {
			paths = append(paths, p)
		}
	}
	return paths
}

func newProfileOutput(p *terrain.Profile, fromName, toName string) profileOutput {
	n := p.Len()
	out := profileOutput{
		From:      profileEnd{fromName, p.Lat[0], p.Lon[0], p.ElevM[0]},
		To:        profileEnd{toName, p.Lat[n-1], p.Lon[n-1], p.ElevM[n-1]},
		DistanceM: p.DistanceM, AzimuthDeg: p.AzimuthDeg, BackAzimuthDeg: p.BackAzimuthDeg, StepM: p.StepM,
		Sources:       append([]string{}, p.Sources...),
		NoDataSamples: p.NoData,
		Samples:       make([]profileSample, n),
	}
	lo, hi := 0, 0
	for i := range n {
		out.Samples[i] = profileSample{p.DistM[i], p.Lat[i], p.Lon[i], p.ElevM[i]}
		if p.ElevM[i] < p.ElevM[lo] {
			lo = i
		}
		if p.ElevM[i] > p.ElevM[hi] {
			hi = i
		}
	}
	out.Lowest, out.Highest = out.Samples[lo], out.Samples[hi]
	return out
}

// renderProfileText writes the summary and every Nth sample, in at most
// about 40 lines.
func renderProfileText(w io.Writer, o profileOutput, outFile string, im bool) {
	n := len(o.Samples)
	at := func(s profileSample) string {
		return fmt.Sprintf("%s at %s (%.5f, %.5f)", units.FormatHeight(s.ElevationM, im), distance(s.DistanceM, im), s.Lat, s.Lon)
	}
	fmt.Fprintf(w, "Terrain from %s to %s\n", o.From.Name, o.To.Name)
	t := newTable(w)
	t.row("  length", units.FormatLength(o.DistanceM, im)+" along the WGS84 geodesic")
	t.row("  bearing", fmt.Sprintf("%.2f° true out, %.2f° true back", o.AzimuthDeg, o.BackAzimuthDeg))
	t.row("  ends", fmt.Sprintf("ground %s at the start, %s at the end", units.FormatHeight(o.From.ElevationM, im), units.FormatHeight(o.To.ElevationM, im)))
	t.row("  lowest", at(o.Lowest))
	t.row("  highest", at(o.Highest))
	data := strings.Join(o.Sources, ", ")
	if data == "" {
		data = "none: the ground is taken as 0 m (smooth earth)"
	}
	if o.NoDataSamples > 0 && len(o.Sources) > 0 {
		data += fmt.Sprintf("; %d samples without data are 0 m", o.NoDataSamples)
	}
	t.row("  elevation data", data)
	every := (n - 1 + profileTableRows - 2) / (profileTableRows - 1)
	all := "all of them with --format csv or -o FILE.csv"
	if outFile != "" {
		all = "all of them are in " + outFile
	}
	if every == 1 {
		t.row("  samples", fmt.Sprintf("%d, %s apart; all shown below", n, units.FormatLength(o.StepM, im)))
	} else {
		t.row("  samples", fmt.Sprintf("%d, %s apart; every %s shown below", n, units.FormatLength(o.StepM, im), ordinal(every)))
		t.row("", all)
	}
	t.flush()
	fmt.Fprintln(w)
	t = newTable(w)
	t.row("  distance", "elevation", "lat", "lon")
	for _, i := range shownSamples(n, every) {
		s := o.Samples[i]
		t.row("  "+distance(s.DistanceM, im), units.FormatHeight(s.ElevationM, im), fmt.Sprintf("%.5f", s.Lat), fmt.Sprintf("%.5f", s.Lon))
	}
	t.flush()
}

// shownSamples returns the indices 0, every, 2·every, … of n samples and
// the last one (which replaces a regular one less than every/2 before it).
func shownSamples(n, every int) []int {
	var idx []int
	for i := 0; i < n-1; i += every {
		idx = append(idx, i)
	}
	if k := len(idx) - 1; k > 0 && n-1-idx[k] < every/2 {
		idx = idx[:k]
	}
	return append(idx, n-1)
}

// ordinal writes 2nd, 3rd, 4th, 21st, …
func ordinal(n int) string {
	suffix := "th"
	switch {
	case n%100 >= 11 && n%100 <= 13:
	case n%10 == 1:
		suffix = "st"
	case n%10 == 2:
		suffix = "nd"
	case n%10 == 3:
		suffix = "rd"
	}
	return fmt.Sprint(n) + suffix
}
