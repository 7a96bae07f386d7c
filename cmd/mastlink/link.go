package main

import (
	"context"
	"errors"
	"fmt"
	"io"
	"math"

	"github.com/mastlink/mastlink/plan"
	"github.com/mastlink/mastlink/plan/units"
	"github.com/mastlink/mastlink/propagation"
	"github.com/mastlink/mastlink/terrain"
	"github.com/spf13/cobra"
)

type linkOptions struct {
	from, to, freq string
	tx, rx         endFlags
	envFlags
	req     plan.RequirementOptions // --margin, --reliability, --sigma
	profile string
	points  pointResolver
}

func newLinkCmd(g *globals) *cobra.Command {
	o := &linkOptions{}
	cmd := &cobra.Command{
		Use:   "link --from P --to P --freq F [station and far-end flags]",
		Short: "Link budget between two points over terrain",
		Long: `The link budget from a transmitting station (--from) to a receiving one
(--to): path loss over the terrain between them (ITU-R P.526-16
delta-Bullington diffraction over the profile along the WGS84 geodesic, or
free space), feedline and antenna figures at both ends, the received level,
and the margin over the receiver's sensitivity.

Points are LAT,LON in decimal degrees or waypoint names from --waypoints.
Elevation data comes from --dem or MASTLINK_DEM; without it the path is a
smooth earth. --profile takes the terrain from a CSV file instead.

` + itmHelp,
		Example: "  mastlink link --dem examples/terrain --waypoints examples/valley/points.gpx \\\n" +
			"    --from \"Gorsefold trailhead\" --to \"Corvane Peak\" --freq 147.78 --power 5W --height 1.5m \\\n" +
			"    --to-gain 6dBi --to-height 20m --rx-sens -122dBm",
		Args: cobra.NoArgs,
		RunE: func(cmd *cobra.Command, args []string) error {
			return runLink(cmd.Context(), g, o, args)
		},
	}
	f := cmd.Flags()
	f.StringVar(&o.from, "from", "", "transmitting end: LAT,LON or waypoint")
	f.StringVar(&o.to, "to", "", "receiving end: LAT,LON or waypoint")
	f.StringVar(&o.freq, "freq", "", "frequency [MHz] (required)")
	addKitFlags(cmd, &o.tx, "", "transmitting ", true)
	addKitFlags(cmd, &o.rx, "to-", "receiving ", false)
	addSensFlag(cmd, &o.rx, "rx-sens", "receiver sensitivity [dBm] (µV across 50 Ω accepted)")
	f.StringVar(&o.req.Sigma, "sigma", "5.5dB", "location variability σ [dB] for the probability of working")
	f.StringVar(&o.req.Reliability, "reliability", "", "wanted fraction of locations, e.g. 90%: gives the margin needed")
	f.StringVar(&o.req.Margin, "margin", "", "wanted fade margin [dB]")
	f.StringVar(&o.profile, "profile", "", "terrain profile CSV (distance_m or distance_km, elevation_m, optional clutter_m) instead of elevation data")
	addEnvFlags(cmd, &o.envFlags)
	addWaypointsFlag(cmd, &o.points)
	_ = cmd.MarkFlagRequired("freq")
	return cmd
}

// linkOutput is the JSON of `mastlink link`.
type linkOutput struct {
	plan.LinkResult
	FromLat float64 `json:"from_lat"`
	FromLon float64 `json:"from_lon"`
	ToLat   float64 `json:"to_lat"`
	ToLon   float64 `json:"to_lon"`
	SigmaDB float64 `json:"sigma_db"`
	SMeter  string  `json:"s_meter"` // IARU Region 1 R.1 at the link's frequency
	// Warnings are also written to stderr: missing elevation data, the
	// model's warnings (Longley–Rice ITM), a frequency outside the model's
	// band or a cable's fitted range, a 75 Ω cable.
	Warnings []string `json:"warnings"`
}

func runLink(ctx context.Context, g *globals, o *linkOptions, args []string) error {
	inputs := []string{o.points.file, o.profile}
	if _, err := g.checkOut(inputs, "json", "csv", "txt"); err != nil {
		return err
	}
	freq, err := quantity("freq", o.freq, units.ParseFreqMHz)
	if err != nil {
		return err
	}
	env, err := o.envFlags.env()
	if err != nil {
		return err
	}
	var req plan.Requirement
	if err := o.req.Apply(&req); err != nil {
		return optionUsage(err)
	}
	env.SigmaDB = req.SigmaDB
	if err := o.envFlags.itm.requirement(env, &req); err != nil {
		return err
	}
	var geo *plan.Geometry
	out := linkOutput{SigmaDB: env.SigmaDB}
	fromName, toName := "transmitter", "receiver"
	if o.profile != "" {
		pc, err := terrain.ReadProfileCSV(o.profile)
		if err != nil {
			return fmt.Errorf("--profile: %w", err)
		}
		if geo, err = plan.GeometryFromPath(pc.DistM, pc.ElevM, pc.ClutterM); err != nil {
			return fmt.Errorf("--profile: %w", err)
		}
	} else {
		if o.from == "" || o.to == "" {
			return usagef("--from and --to are needed (or --profile FILE.csv)")
		}
		from, fn, err := o.points.resolve("--from", o.from)
		if err != nil {
			return err
		}
		to, tn, err := o.points.resolve("--to", o.to)
		if err != nil {
			return err
		}
		fromName, toName = fn, tn
		out.FromLat, out.FromLon, out.ToLat, out.ToLon = from.Lat(), from.Lon(), to.Lat(), to.Lon()
		if env.Terrain, err = g.openTerrain(); err != nil {
			return err
		}
		if env.Terrain == nil {
			g.noticeSmoothEarth()
		}
		geo = &plan.Geometry{}
		if err := env.Measure(from, to, geo); err != nil {
			if errors.Is(err, terrain.ErrTooManySamples) {
				return usagef("--step: %v", err)
			}
			return err
		}
		if env.StepM > geo.Profile.DistanceM && geo.Profile.DistanceM >= plan.SamePlaceM {
			return usagef("--step %s is longer than the path (%s): give a shorter step, or leave it out for the elevation data's spacing",
				units.FormatLength(env.StepM, g.imperial()), units.FormatLength(geo.Profile.DistanceM, g.imperial()))
		}
		out.Warnings = addWarnings(out.Warnings, missingWarning(env.Terrain))
	}
	tx, err := o.tx.end(fromName)
	if err != nil {
		return err
	}
	rx, err := o.rx.end(toName)
	if err != nil {
		return err
	}
	r, err := env.Evaluate(geo, tx, rx, freq, true)
	if errors.Is(err, plan.ErrSamePlace) {
		return usagef("--from and --to are the same place (%s apart): a link needs two places", units.FormatLength(geo.Profile.DistanceM, g.imperial()))
	}
	if err != nil {
		return err
	}
	if o.req.Margin != "" || o.req.Reliability != "" {
		need := req.NeededMarginDB()
		ok := r.MarginDB >= need
		r.NeededMarginDB, r.MeetsRequirement = &need, &ok
	}
	out.LinkResult = r
	out.SMeter = units.SMeter(r.RxPowerDBm, r.FreqMHz)
	out.Warnings = addWarnings(out.Warnings, r.Warnings...)
	out.Warnings = addWarnings(out.Warnings, env.FrequencyWarnings(freq, tx, rx)...)
	g.warn(out.Warnings)
	return g.emitFile(inputs, out, func(w io.Writer) error { return writeCSV(w, linkCSVHeader, [][]string{linkCSVRow(r)}) },
		func(w io.Writer) error { renderLinkText(w, out, tx, rx, g.imperial()); return nil })
}

var linkCSVHeader = []string{"from", "to", "direction", "freq_mhz", "distance_m", "azimuth_deg", "model", "free_space_loss_db", "excess_loss_db", "path_loss_db",
	"tx_feedline_loss_db", "rx_feedline_loss_db", "eirp_dbm", "rx_power_dbm", "rx_sensitivity_dbm", "margin_db", "line_of_sight", "worst_clearance_f1", "probability", "meets_requirement"}

func linkCSVRow(r plan.LinkResult) []string {
	opt := func(p *float64, f func(float64) string) string {
		if p == nil {
			return ""
		}
		return f(*p)
	}
	meets := ""
	if r.MeetsRequirement != nil {
		meets = fmt.Sprint(*r.MeetsRequirement)
	}
	return []string{r.From, r.To, r.Direction, f4(r.FreqMHz), f1(r.DistanceM), f2(r.AzimuthDeg), r.Model, f2(r.FreeSpaceLossDB), f2(r.ExcessLossDB), f2(r.PathLossDB),
		f2(r.TxFeedlineLossDB), f2(r.RxFeedlineLossDB), f2(r.EIRPDBm), f2(r.RxPowerDBm), f2(r.RxSensitivityDBm), f2(r.MarginDB), fmt.Sprint(r.LineOfSight),
		opt(r.WorstClearanceF1, f2), opt(r.Probability, f4), meets}
}

// renderLinkText writes one link budget in plain trade words.
func renderLinkText(w io.Writer, o linkOutput, tx, rx plan.End, im bool) {
	r := o.LinkResult
	fmt.Fprintf(w, "%s → %s at %s\n", r.From, r.To, units.FormatFreq(r.FreqMHz))
	fmt.Fprintf(w, "  distance %s, bearing %.1f° true\n", units.FormatLength(r.DistanceM, im), r.AzimuthDeg)
	terr := "elevation data"
	switch r.Terrain {
	case "smooth earth":
		terr = "a smooth earth (no elevation data for this path)"
	case "profile file":
		terr = "the profile file"
	}
	fmt.Fprintf(w, "  ground from %s; ground %s at the transmitter, %s at the receiver\n", terr, units.FormatHeight(r.TxGroundM, im), units.FormatHeight(r.RxGroundM, im))
	if r.ITM != nil {
		fmt.Fprintf(w, "  model: %s\n", propagation.ModelDescription(r.Model))
		fmt.Fprintf(w, "  ITM settings: %s\n", r.ITM.Settings())
		itmText(w, r.ITM)
	} else {
		fmt.Fprintf(w, "  model: %s\n", propagation.ModelDescription(r.Model))
	}
	fmt.Fprintf(w, "  path: %s\n\n", pathSummary(r, im))
	t := newTable(w)
	t.row("  transmitter power", units.FormatPower(math.Pow(10, (r.TxPowerDBm-30)/10)), dbm(r.TxPowerDBm))
	t.row("  transmit feedline"+lineName(tx), "", db(-r.TxFeedlineLossDB))
	t.row("  transmit antenna gain"+antennaName(tx.Antenna, r.TxBearingDeg), towardText(r.TxAntenna, r.TxGainDBi, r.TxElevationDeg), dbi(r.TxGainTowardPathDBi))
	if r.TxBodyLossDB != 0 {
		t.row("  body loss at the transmitter", "("+tx.Antenna.BodyLoss+")", db(-r.TxBodyLossDB))
	}
	t.row("  EIRP", "", dbm(r.EIRPDBm))
	t.row("  free-space loss", "", db(-r.FreeSpaceLossDB))
	if r.ITM != nil {
		t.row("  loss beyond free space (ITM, "+r.ITM.Mode+")", "", db(-r.ExcessLossDB))
	} else {
		t.row("  terrain (diffraction) loss", "", db(-r.ExcessLossDB))
	}
	if r.TxClutterLossDB != 0 {
		t.row("  clutter at the transmitter", "("+tx.Antenna.Clutter.String()+", ITU-R P.2108)", db(-r.TxClutterLossDB))
	}
	if r.RxClutterLossDB != 0 {
		t.row("  clutter at the receiver", "("+rx.Antenna.Clutter.String()+", ITU-R P.2108)", db(-r.RxClutterLossDB))
	}
	t.row("  receive antenna gain"+antennaName(rx.Antenna, r.RxBearingDeg), towardText(r.RxAntenna, r.RxGainDBi, r.RxElevationDeg), dbi(r.RxGainTowardPathDBi))
	if r.RxBodyLossDB != 0 {
		t.row("  body loss at the receiver", "("+rx.Antenna.BodyLoss+")", db(-r.RxBodyLossDB))
	}
	t.row("  receive feedline"+lineName(rx), "", db(-r.RxFeedlineLossDB))
	t.row("  received level", units.SMeter(r.RxPowerDBm, r.FreqMHz), dbm(r.RxPowerDBm))
	t.row("  receiver sensitivity", fmt.Sprintf("%.2f µV", units.MicrovoltsFromDBm(r.RxSensitivityDBm)), dbm(r.RxSensitivityDBm))
	t.row("  margin", "", db(r.MarginDB))
	if r.Probability != nil {
		t.row(fmt.Sprintf("  chance of working here (σ %.1f dB)", o.SigmaDB), "", probability(*r.Probability))
	}
	t.flush()
	fmt.Fprintln(w)
	fmt.Fprintln(w, verdict(r))
	for _, n := range r.Notes {
		fmt.Fprintln(w, "Note: "+n+".")
	}
}

// antennaName is " (type, aimed at B° true)" for an end with a catalog
// antenna, "" without.
func antennaName(a plan.Antenna, bearing *float64) string {
	if a.Type == nil {
		return ""
	}
	if bearing != nil {
		return fmt.Sprintf(" (%s, aimed %.0f° true)", a.Type.Name, *bearing)
	}
	return " (" + a.Type.Name + ")"
}

// towardText says what the pattern did to a catalog antenna's gain toward
// the path: its peak and the path's elevation angle.
func towardText(name string, peakDBi, elevationDeg float64) string {
	if name == "" {
		return ""
	}
	return fmt.Sprintf("peak %.1f dBi, path at %+.1f°", peakDBi, elevationDeg)
}

func lineName(e plan.End) string {
	if e.Feedline.Cable.Name == "" {
		return " (none given)"
	}
	return fmt.Sprintf(" (%s, %.1f m)", e.Feedline.Cable.Name, e.Feedline.LengthM)
}

func pathSummary(r plan.LinkResult, im bool) string {
	s := "line of sight"
	if !r.LineOfSight {
		s = "blocked: no line of sight"
	}
	if r.WorstClearanceF1 != nil && r.Obstacle != nil {
		c := *r.WorstClearanceF1
		where := fmt.Sprintf("%s from the transmitter (ground %s)", units.FormatLength(r.Obstacle.DistanceM, im), units.FormatHeight(r.Obstacle.ElevationM, im))
		switch {
		case c >= 1:
			s += fmt.Sprintf(", first Fresnel zone clear (worst %.2f of it, %s)", c, where)
		case c >= 0.6:
			s += fmt.Sprintf(", Fresnel zone %.0f%% clear at the tightest point, %s", c*100, where)
		case c >= 0:
			s += fmt.Sprintf(", Fresnel zone only %.0f%% clear at %s (0.6 is the usual minimum)", c*100, where)
		default:
			s += fmt.Sprintf("; the worst obstacle is %s", where)
		}
	}
	return s
}

func verdict(r plan.LinkResult) string {
	switch {
	case r.MeetsRequirement != nil && *r.MeetsRequirement:
		return fmt.Sprintf("Meets the requirement: %.1f dB of margin, %.1f dB needed.", r.MarginDB, *r.NeededMarginDB)
	case r.MeetsRequirement != nil:
		return fmt.Sprintf("Falls short of the requirement: %.1f dB of margin, %.1f dB needed.", r.MarginDB, *r.NeededMarginDB)
	case r.MarginDB >= 10:
		return fmt.Sprintf("Should work: %.1f dB above the receiver's sensitivity.", r.MarginDB)
	case r.MarginDB >= 0:
		return fmt.Sprintf("Marginal: only %.1f dB above the receiver's sensitivity; expect dropouts as you move.", r.MarginDB)
	default:
		return fmt.Sprintf("Not expected to work: %.1f dB below the receiver's sensitivity.", -r.MarginDB)
	}
}
