package main

import (
	"bytes"
	"context"
	"fmt"
	"io"
	"math"
	"strings"

	"github.com/mastlink/mastlink/plan"
	"github.com/mastlink/mastlink/plan/gpx"
	"github.com/mastlink/mastlink/plan/report"
	"github.com/mastlink/mastlink/plan/units"
	"github.com/mastlink/mastlink/propagation"
	"github.com/paulmach/orb"
	"github.com/spf13/cobra"
)

type relayOptions struct {
	planFile, between, and      string
	height, radius, separation  string
	freq, freqA, freqB, relayAt string
	spots                       int
	relay                       endFlags // the relay's antenna (--antenna, --gain, --bearing, --body-loss, --clutter)
}

func newRelayCmd(g *globals) *cobra.Command {
	o := &relayOptions{}
	cmd := &cobra.Command{
		Use:   "relay --plan FILE --between A --and B [--height L] [--radius L]",
		Short: "Where to put a relay so that two parties who cannot hear each other both reach it",
		Long: `Searches the terrain around and between two parties for the spots from
which a relay reaches both with the plan's margin, in both directions of
both links. The parties are stations or targets of the plan (with their
kit), waypoints of the plan's waypoints file or LAT,LON (with the plan's
defaults as kit); the relay carries the plan's defaults, with --height
(one height, or a range such as '2m..10m step 2m': each spot then takes the
lowest that works) and the antenna flags.

A coverage map is computed from each party (the radial engine of
coverage), the two combined cell by cell (the worse margin), and the
cells ranked by worst margin in whole dB, then distance from a road (the
plan's roads:, GPX tracks), then antenna height; spots are kept at least
--separation apart. The best candidates are recomputed with the link
computation over the full profile, and those are the margins shown.

Cross-band relays: --freq-a and --freq-b give each side its own
frequency (default: --freq, else the plan's). Without --between and --and
the plan's first relays: entry is used.`,
		Example: "  mastlink relay --plan examples/valley/plan.yaml --between \"Team Alder\" --and \"Team Birch\" --height 4m\n" +
			"  mastlink relay --plan examples/valley/plan.yaml -o relay.gpx\n" +
			"  mastlink relay --plan examples/valley/plan.yaml --between \"Team Alder\" --and \"Ostral Bend\" \\\n" +
			"    --freq-a 146.55 --freq-b 446.1 --height '2m..8m step 2m' -o relay.png",
		Args: cobra.NoArgs,
		RunE: func(cmd *cobra.Command, args []string) error {
			return runRelay(cmd.Context(), g, o, args)
		},
	}
	f := cmd.Flags()
	f.StringVar(&o.planFile, "plan", "", "plan file (YAML): parties, kit, requirement, terrain (required)")
	f.StringVar(&o.between, "between", "", "first party: a station or target of the plan, a waypoint, or LAT,LON")
	f.StringVar(&o.and, "and", "", "second party")
	f.StringVar(&o.height, "height", "", "relay antenna height above ground [m], or a range '2m..10m step 2m' (default: the plan's relays: entry, else its defaults)")
	f.StringVar(&o.radius, "radius", "", "search within this distance of each party [m] (default: the distance between them)")
	f.StringVar(&o.freq, "freq", "", "frequency of both links [MHz] (default: the plan's)")
	f.StringVar(&o.freqA, "freq-a", "", "frequency of the link to the first party [MHz] (cross-band)")
	f.StringVar(&o.freqB, "freq-b", "", "frequency of the link to the second party [MHz] (cross-band)")
	f.IntVar(&o.spots, "spots", plan.DefaultRelaySpots, "how many spots to list")
	f.StringVar(&o.separation, "separation", "500m", "least distance between two spots listed [m]")
	f.StringVar(&o.relay.gain, "gain", "", "relay antenna gain [dBi] (default: the plan's defaults; with --antenna, overrides the catalog's)")
	addAntennaFlags(cmd, &o.relay, "", "relay ")
	_ = cmd.MarkFlagRequired("plan")
	return cmd
}

// relayOutput is the JSON of `mastlink relay`.
type relayOutput struct {
	*plan.RelayResult
	Antenna string `json:"relay_antenna,omitempty"`
	// Model is the plan's model, with which the spots are rechecked and
	// ranked; SearchModel the model of the maps the search ranks cells on.
	Model       string   `json:"model"`
	SearchModel string   `json:"search_model"`
	Notes       []string `json:"notes"`
}

// newRelayOutput is the answer of a relay search with its notes.
func newRelayOutput(res *plan.RelayResult, req plan.RelayRequest, env *plan.Env) relayOutput {
	m := env.Model
	if m == nil {
		m = propagation.Terrain{}
	}
	return relayOutput{RelayResult: res, Antenna: req.Relay.Antenna.Name(), Model: m.Name(), SearchModel: propagation.Terrain{}.Name(),
		Notes: relayNotes(res, req, m)}
}

// relayRequest is the search a relays: entry (or --between/--and) asks
// for: the parties, the relay with the plan's defaults as kit, heights,
// radius and the plan's requirement; frequencies are left to the caller.
// names are where the two parties were given, for errors.
func relayRequest(p *plan.Plan, spec plan.RelaySpec, names [2]string) (plan.RelayRequest, error) {
	a, err := p.Party(spec.Between)
	if err != nil {
		return plan.RelayRequest{}, usagef("%s: %v", names[0], err)
	}
	b, err := p.Party(spec.And)
	if err != nil {
		return plan.RelayRequest{}, usagef("%s: %v", names[1], err)
	}
	req := plan.RelayRequest{A: a, B: b, Relay: p.Defaults, HeightsM: spec.HeightsM, RadiusM: spec.RadiusM,
		NeededMarginDB: p.Require.NeededMarginDB()}
	req.Relay.Name = "relay"
	return req, nil
}

func runRelay(ctx context.Context, g *globals, o *relayOptions, args []string) error {
	var outKind string
	var err error
	if g.out != "" {
		if outKind, err = outputKind(g.out, "gpx", "png", "json"); err != nil {
			return err
		}
	}
	if o.spots < 1 || o.spots > 100 {
		return usagef("--spots: give 1 to 100")
	}
	p, env, err := loadPlan(g, o.planFile)
	if err != nil {
		return err
	}
	inputs := append([]string(nil), p.InputFiles...)
	if g.out != "" {
		if err := checkNotInput("--out", g.out, inputs); err != nil {
			return err
		}
	}
	spec := plan.RelaySpec{Between: o.between, And: o.and}
	if o.between == "" && o.and == "" {
		if len(p.Relays) == 0 {
			return usagef("--between and --and: name the two parties (the plan has no relays: entry)")
		}
		spec = p.Relays[0]
	} else if o.between == "" || o.and == "" {
		return usagef("--between and --and go together: name both parties")
	}
	names := [2]string{"--between", "--and"}
	if o.between == "" {
		names = [2]string{fmt.Sprintf("%s:%d: relays[0].between", p.Path, spec.Line), fmt.Sprintf("%s:%d: relays[0].and", p.Path, spec.Line)}
	}
	req, err := relayRequest(p, spec, names)
	if err != nil {
		return err
	}
	req.Spots = o.spots
	if err := o.relay.antennaOptions().Apply(&req.Relay.Antenna); err != nil {
		return o.relay.antennaUsage(err)
	}
	if o.height != "" {
		if req.HeightsM, err = plan.ParseRelayHeights(o.height); err != nil {
			return usagef("--height: %v", err)
		}
	}
	if o.radius != "" {
		if req.RadiusM, err = quantity("radius", o.radius, units.ParseLengthM); err != nil {
			return err
		}
		if req.RadiusM <= 0 {
			return usagef("--radius: give a distance above 0 m")
		}
	}
	if req.SeparationM, err = quantity("separation", o.separation, units.ParseLengthM); err != nil {
		return err
	}
	freq := p.FreqMHz
	if o.freq != "" {
		if freq, err = quantity("freq", o.freq, units.ParseFreqMHz); err != nil {
			return err
		}
	}
	req.FreqAMHz, req.FreqBMHz = firstPositive(spec.FreqAMHz, freq), firstPositive(spec.FreqBMHz, freq)
	if o.freqA != "" {
		if req.FreqAMHz, err = quantity("freq-a", o.freqA, units.ParseFreqMHz); err != nil {
			return err
		}
	}
	if o.freqB != "" {
		if req.FreqBMHz, err = quantity("freq-b", o.freqB, units.ParseFreqMHz); err != nil {
			return err
		}
	}
	if req.FreqAMHz <= 0 || req.FreqBMHz <= 0 {
		return usagef("--freq: give the frequency of the links (the plan has none)")
	}
	if len(p.Roads) > 0 {
		if req.Roads, err = plan.ReadRoads(p.Roads); err != nil {
			return fmt.Errorf("%s: roads: %w", o.planFile, err)
		}
	}
	bar := newProgress(g, "coverage maps (thousandths)")
	res, err := env.FindRelay(ctx, req, bar.update)
	bar.done()
	if err != nil {
		return err
	}
	g.warnMissing(env.Terrain)
	out := newRelayOutput(res, req, env)
	if outKind != "" {
		if err := writeRelayFile(g, outKind, inputs, out, req, env); err != nil {
			return err
		}
		g.wrote()
	}
	return g.emit(out, func(w io.Writer) error { return writeRelayCSV(w, res) },
		func(w io.Writer) error { renderRelayText(w, out, req, g.imperial()); return nil })
}

func firstPositive(v ...float64) float64 {
	for _, x := range v {
		if x > 0 {
			return x
		}
	}
	return 0
}

// relayNotes are the lines every relay answer carries.
func relayNotes(res *plan.RelayResult, req plan.RelayRequest, model propagation.Model) []string {
	var out []string
	for _, p := range []plan.End{req.A, req.B, req.Relay} {
		if p.Antenna.Directional() {
			out = append(out, fmt.Sprintf("%s: the %s is taken as aimed at the other end of each link", p.Name, p.Antenna.Name()))
		}
	}
	if plan.CoverageByCell(model) {
		out = append(out, fmt.Sprintf("The search ranks cells on maps of the radial engine (ITU-R P.526-16 delta-Bullington); the %d best candidates are then rechecked and ranked again with the plan's model (%s), and those are the margins shown; the map's margins are delta-Bullington's.",
			8*max(req.Spots, 1), propagation.ModelDescription(model.Name())))
	} else {
		out = append(out, "The spots' margins are the link computation's over the full profile (both directions of both links); the map's are the coverage engine's, within about 1 dB of them.")
	}
	out = append(out,
		"Check access, land and safety at a spot before sending anyone; a relay on a mast needs the usual mast cautions (power lines, guys, weather).")
	return out
}

func writeRelayCSV(w io.Writer, res *plan.RelayResult) error {
	rows := make([][]string, len(res.Spots))
	for i, s := range res.Spots {
		road := ""
		if s.RoadDistanceM != nil {
			road = f1(*s.RoadDistanceM)
		}
		rows[i] = []string{fmt.Sprint(s.Rank), deg(s.Lat), deg(s.Lon), f1(s.ElevationM), f1(s.HeightM), f2(s.MarginToADB), f2(s.MarginToBDB),
			f2(s.WorstMarginDB), f2(s.MapWorstMarginDB), f1(s.DistanceToAM), f1(s.DistanceToBM), road, fmt.Sprint(s.MeetsRequirement)}
	}
	return writeCSV(w, []string{"rank", "lat", "lon", "elevation_m", "height_m", "margin_to_a_db", "margin_to_b_db", "worst_margin_db",
		"map_worst_margin_db", "distance_to_a_m", "distance_to_b_m", "road_distance_m", "meets_requirement"}, rows)
}

func renderRelayText(w io.Writer, o relayOutput, req plan.RelayRequest, im bool) {
	r := o.RelayResult
	fmt.Fprintf(w, "Relay between %s and %s, %s apart\n", r.A, r.B, units.FormatLength(r.DistanceM, im))
	direct := "they cannot hear each other"
	if r.DirectMarginDB >= r.NeededMarginDB {
		direct = "they can already work each other directly"
	} else if r.DirectMarginDB >= 0 {
		direct = "below the requirement"
	}
	fmt.Fprintf(w, "  direct at %s: worst margin %+.1f dB (%s)\n", units.FormatFreq(r.FreqAMHz), r.DirectMarginDB, direct)
	band := "simplex relay"
	if r.FreqAMHz != r.FreqBMHz {
		band = "cross-band relay"
	}
	fmt.Fprintf(w, "  %s: %s to %s, %s to %s\n", band, units.FormatFreq(r.FreqAMHz), r.A, units.FormatFreq(r.FreqBMHz), r.B)
	hs := make([]string, len(r.HeightsM))
	for i, h := range r.HeightsM {
		hs[i] = units.FormatHeight(h, im)
	}
	ant := fmt.Sprintf("%.2f dBi", req.Relay.Antenna.GainDBi)
	if n := req.Relay.Antenna.Name(); n != "" {
		ant = n + ", " + ant
	}
	fmt.Fprintf(w, "  relay: %s, antenna %s at %s\n", units.FormatPower(req.Relay.Radio.PowerW), ant, strings.Join(hs, ", "))
	fmt.Fprintf(w, "  searched %d cells within %s of both; %d meet %.1f dB on the maps\n\n", r.Cells, units.FormatLength(r.RadiusM, im), r.CellsMeeting, r.NeededMarginDB)
	t := newTable(w)
	head := []string{"  rank", "position", "ground", "mast", "to " + r.A, "to " + r.B, "worst"}
	roads := len(r.Spots) > 0 && r.Spots[0].RoadDistanceM != nil
	if roads {
		head = append(head, "from a road")
	}
	t.row(head...)
	for _, s := range r.Spots {
		mark := " "
		if s.MeetsRequirement {
			mark = "*"
		}
		row := []string{fmt.Sprintf("  %d", s.Rank), fmt.Sprintf("%.5f,%.5f", s.Lat, s.Lon), units.FormatHeight(s.ElevationM, im), units.FormatHeight(s.HeightM, im),
			db(s.MarginToADB), db(s.MarginToBDB), db(s.WorstMarginDB) + mark}
		if roads {
			row = append(row, units.FormatLength(*s.RoadDistanceM, im))
		}
		t.row(row...)
	}
	t.flush()
	fmt.Fprintln(w)
	switch {
	case r.MeetsRequirement:
		fmt.Fprintf(w, "The best spot meets the requirement (* = %.1f dB or more on both links, both ways).\n", r.NeededMarginDB)
	case len(r.Spots) > 0:
		s := r.Spots[0]
		fmt.Fprintf(w, "No spot meets the requirement of %.1f dB; the best there is falls %.1f dB short (worst %+.1f dB). Try a taller relay mast (--height), a better antenna, or a larger --radius.\n",
			r.NeededMarginDB, r.NeededMarginDB-s.WorstMarginDB, s.WorstMarginDB)
	}
	for _, wmsg := range r.Warnings {
		fmt.Fprintln(w, "Warning: "+wmsg+".")
	}
	for _, n := range o.Notes {
		fmt.Fprintln(w, "Note: "+strings.TrimSuffix(n, ".")+".")
	}
}

// writeRelayFile writes -o: GPX waypoints of the spots and parties, a PNG
// map of the combined margin with the spots, or the JSON.
func writeRelayFile(g *globals, kind string, inputs []string, o relayOutput, req plan.RelayRequest, env *plan.Env) error {
	r := o.RelayResult
	switch kind {
	case "json":
		return renderTo(g.out, inputs, func(w io.Writer) error { return writeJSON(w, o) })
	case "gpx":
		out := gpx.Output{Name: fmt.Sprintf("Relay between %s and %s", r.A, r.B)}
		for _, s := range r.Spots {
			out.Waypoints = append(out.Waypoints, gpx.Place{Name: fmt.Sprintf("Relay %d", s.Rank), Pos: orb.Point{s.Lon, s.Lat}, ElevM: s.ElevationM, Symbol: "Flag",
				Description: fmt.Sprintf("relay antenna %.1f m above ground: margin %+.1f dB to %s, %+.1f dB to %s (worst %+.1f dB; %.1f dB needed)",
					s.HeightM, s.MarginToADB, r.A, s.MarginToBDB, r.B, s.WorstMarginDB, r.NeededMarginDB)})
		}
		for _, p := range []plan.End{req.A, req.B} {
			out.Waypoints = append(out.Waypoints, gpx.Place{Name: p.Name, Pos: p.Pos, ElevM: math.NaN(), Symbol: "Waypoint", Description: "party to be relayed"})
		}
		b, err := gpx.Encode(out)
		if err != nil {
			return err
		}
		return writeFileAtomic(g.out, b, inputs)
	}
	m := relayMap(o, req, env, g.imperial())
	var buf bytes.Buffer
	if err := report.MapPNG(&buf, m); err != nil {
		return err
	}
	return writeFileAtomic(g.out, buf.Bytes(), inputs)
}

// relayMap is the map of a relay search: the combined worst margin over a
// shaded relief, the parties and the ranked spots.
func relayMap(o relayOutput, req plan.RelayRequest, env *plan.Env, im bool) report.Map {
	r := o.RelayResult
	gr := r.Grid
	b := report.Bounds{West: gr.West, North: gr.North, East: gr.West + float64(gr.Cols)*gr.DLonDeg, South: gr.North - float64(gr.Rows)*gr.DLatDeg}
	over := report.Grid{Width: gr.Cols, Height: gr.Rows, Bounds: b, Values: gr.Values, NoData: plan.CoverageNoData, HasNoData: true}
	m := report.Map{
		Title:    fmt.Sprintf("Relay spots between %s and %s", r.A, r.B),
		Subtitle: fmt.Sprintf("worst margin of both links, %s / %s", units.FormatFreq(r.FreqAMHz), units.FormatFreq(r.FreqBMHz)),
		Imperial: im,
		Overlay:  &over,
		Scale:    report.Scale{Levels: relayLevels(r.NeededMarginDB), Name: "worst margin", Unit: "dB"},
	}
	if env.Terrain != nil {
		sp := env.Terrain.NewSampler()
		dem := report.Grid{Width: gr.Cols, Height: gr.Rows, Bounds: b, Values: make([]float32, len(gr.Values)), NoData: plan.CoverageNoData, HasNoData: true}
		for i := range dem.Values {
			lat := gr.North - (float64(i/gr.Cols)+0.5)*gr.DLatDeg
			lon := gr.West + (float64(i%gr.Cols)+0.5)*gr.DLonDeg
			h, err := sp.Height(lat, lon)
			if err != nil || math.IsNaN(h) {
				dem.Values[i] = plan.CoverageNoData
				continue
			}
			dem.Values[i] = float32(h)
		}
		m.Terrain = &dem
	}
	for _, p := range []plan.End{req.A, req.B} {
		m.Markers = append(m.Markers, report.Marker{At: p.Pos, Label: p.Name, Kind: report.MarkerTarget})
	}
	for _, s := range r.Spots {
		m.Markers = append(m.Markers, report.Marker{At: orb.Point{s.Lon, s.Lat}, Label: fmt.Sprintf("%+.1f dB", s.WorstMarginDB),
			Kind: report.MarkerCandidate, Rank: s.Rank, Value: s.WorstMarginDB, HasValue: true})
	}
	for _, road := range req.Roads {
		if len(road) < 2 {
			continue
		}
		vals := make([]float64, len(road))
		for i := range vals {
			vals[i] = math.NaN()
		}
		m.Tracks = append(m.Tracks, report.Track{Points: road, Values: vals})
	}
	return m
}

// relayLevels are the map's bands: below, at and above the margin needed.
func relayLevels(needDB float64) []float64 {
	if needDB <= 0 {
		return []float64{0, 10, 20}
	}
	return []float64{0, needDB, needDB + 10}
}
