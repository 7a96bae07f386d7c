package main

import (
	"context"
	"fmt"
	"io"
	"math"
	"strconv"

	"github.com/mastlink/mastlink/plan/exposure"
	"github.com/mastlink/mastlink/plan/feedline"
	"github.com/mastlink/mastlink/plan/gpx"
	"github.com/mastlink/mastlink/plan/units"
	"github.com/paulmach/orb"
	"github.com/paulmach/orb/geojson"
	"github.com/spf13/cobra"
)

type exposureOptions struct {
	power, gain, freq, height string
	habits                    exposure.Options // --mode, --duty, --tx-time, --on, --off, --standard, --head-height, --reflection
	cable, cableLength, swr   string
	connectors                int
	at, distance              string
	points                    pointResolver
}

func newExposureCmd(g *globals) *cobra.Command {
	o := &exposureOptions{}
	cmd := &cobra.Command{
		Use:   "exposure --power P --gain G --freq F [--mode M] [--tx-time R | --on D --off D] [--height L]",
		Short: "RF-exposure compliance distances and keep-out zones around an antenna",
		Long: `How far people must stay from a transmitting antenna to remain within the
RF-exposure limits, for the public (general population, uncontrolled) and for
the operators (occupational, controlled): a far-field prediction with ground
reflection (FCC OET Bulletin 65 and its Supplement B), power averaged over each
tier's window from the mode's duty factor and the worst-case time on the air.
Limits: US 47 CFR § 1.1310 (fcc, the default), ICNIRP 2020 (icnirp2020) or
ICNIRP 1998 (icnirp1998).

With --height, the keep-out radius on the ground around the mast foot: beyond
it no part of a person standing up to --head-height is within the compliance
distance (the whole distance when the antenna is no higher than the head).
Safety distances are printed rounded up. The US exemption from routine
evaluation (47 CFR § 1.1307) is shown only with --standard fcc. With --at and -o keepout.geojson or
keepout.gpx, the keep-out circles for a map or a GPS.

This is an estimate, not a measurement; your licence conditions and local
rules decide.`,
		Example: "  mastlink exposure --power 50W --gain 2.15dBi --freq 146.52 --mode fm --height 3m\n" +
			"  mastlink exposure --power 100W --gain 6dBi --freq 446 --mode ssb --on 2min --off 1min --standard icnirp2020\n" +
			"  mastlink exposure --power 25W --gain 2.15dBi --freq 146.94 --height 9m --at -48.53,-123.61 -o keepout.geojson",
		Args: cobra.NoArgs,
		RunE: func(cmd *cobra.Command, args []string) error {
			return runExposure(cmd.Context(), g, o, args)
		},
	}
	f := cmd.Flags()
	f.StringVar(&o.power, "power", "", "transmitter output, peak envelope power [W] (required)")
	f.StringVar(&o.gain, "gain", "0dBi", "antenna gain [dBi] (dBd accepted)")
	f.StringVar(&o.freq, "freq", "", "transmit frequency [MHz] (required)")
	f.StringVar(&o.habits.Mode, "mode", "fm", "emission: fm, ssb, ssb-processed, cw, digital or carrier (sets the duty factor)")
	f.StringVar(&o.habits.Duty, "duty", "", "duty factor to use instead of the mode's, e.g. 50%")
	f.StringVar(&o.habits.TxTime, "tx-time", "", "fraction of time on the air, e.g. 50% (default: continuously)")
	f.StringVar(&o.habits.On, "on", "", "transmit part of a transmit/listen cycle: s, min or h, e.g. 2min, 30s (m is metres, never minutes)")
	f.StringVar(&o.habits.Off, "off", "", "listen part of the cycle: s, min or h, e.g. 1min")
	f.StringVar(&o.habits.Standard, "standard", "fcc", "limits: fcc, icnirp2020 or icnirp1998")
	f.StringVar(&o.height, "height", "", "antenna height above the ground where people stand [m]")
	f.StringVar(&o.habits.HeadHeight, "head-height", "2m", "height of a person's head [m]")
	f.StringVar(&o.habits.Reflection, "reflection", "2.56", "ground-reflection factor: 1 (none), 2.56 (typical ground) or 4 (full)")
	f.StringVar(&o.cable, "cable", "", "feedline cable (its loss lowers the power at the antenna)")
	f.StringVar(&o.cableLength, "cable-length", "", "feedline length [m]")
	f.StringVar(&o.swr, "swr", "1", "SWR at the antenna")
	f.IntVar(&o.connectors, "connectors", 0, "mated connector pairs in the feedline")
	f.StringVar(&o.distance, "distance", "", "distance of the nearest person from the antenna [m]: says whether the station is exempt from routine evaluation there (US § 1.1307(b)(3)(i)(C))")
	f.StringVar(&o.at, "at", "", "antenna position LAT,LON or waypoint, for -o keepout.geojson/.gpx")
	addWaypointsFlag(cmd, &o.points)
	_ = cmd.MarkFlagRequired("power")
	_ = cmd.MarkFlagRequired("freq")
	cmd.MarkFlagsMutuallyExclusive("tx-time", "on")
	cmd.MarkFlagsMutuallyExclusive("tx-time", "off")
	return cmd
}

func runExposure(ctx context.Context, g *globals, o *exposureOptions, args []string) error {
	in := exposure.Input{}
	var err error
	if in.PowerW, err = quantity("power", o.power, units.ParsePowerW); err != nil {
		return err
	}
	if in.GainDBi, err = quantity("gain", o.gain, units.ParseGainDBi); err != nil {
		return err
	}
	if in.FreqMHz, err = quantity("freq", o.freq, units.ParseFreqMHz); err != nil {
		return err
	}
	if in.FreqMHz < exposure.MinFreqMHz || in.FreqMHz > exposure.MaxFreqMHz {
		return usagef("--freq: %g MHz is outside the 0.3 MHz – 100 GHz range the exposure limits cover", in.FreqMHz)
	}
	if err := o.habits.Apply(&in); err != nil {
		return optionUsage(err)
	}
	if o.height != "" {
		if in.AntennaHeightM, err = quantity("height", o.height, units.ParseLengthM); err != nil {
			return err
		}
	}
	if o.cable != "" {
		c, err := feedline.ResolveCable(o.cable)
		if err != nil {
			return usagef("--cable: %v", err)
		}
		l, err := quantity("cable-length", o.cableLength, units.ParseLengthM)
		if err != nil {
			return err
		}
		swr, err := quantity("swr", o.swr, units.ParseSWR)
		if err != nil {
			return err
		}
		fl := feedline.NewLine(c, l)
		fl.SWR, fl.Connectors = swr, o.connectors
		loss, err := fl.Loss(in.FreqMHz)
		if err != nil {
			return usagef("--cable: %v", err)
		}
		in.FeedlineLossDB = loss.TotalLossDB
	}
	rep, err := exposure.Evaluate(in)
	if err != nil {
		return usagef("%v", err)
	}
	out := exposureOutput{Report: rep}
	if o.distance != "" {
		d, err := quantity("distance", o.distance, units.ParseLengthM)
		if err != nil {
			return err
		}
		// The exemption threshold grows as R², so the station is exempt at
		// every distance from exempt_beyond_m on.
		ex := d >= rep.ExemptBeyondM
		out.DistanceM, out.ExemptAtDistance = &d, &ex
	}
	if g.out != "" {
		if o.at == "" {
			return usagef("-o: the keep-out circles need the antenna position: give --at LAT,LON or a waypoint")
		}
		pos, name, err := o.points.resolve("--at", o.at)
		if err != nil {
			return err
		}
		if err := writeKeepout(g.out, []string{o.points.file}, []keepoutSite{{name: name, pos: pos, rep: rep}}); err != nil {
			return err
		}
		fmt.Fprintf(g.stderr, "mastlink: wrote the keep-out circles to %s\n", g.out)
	}
	if rep.Standard != exposure.StandardFCC && o.distance != "" {
		return usagef("--distance: the exemption from routine evaluation is the US rule 47 CFR § 1.1307(b)(3)(i)(C); use it with --standard fcc, or compare the distance with the %s compliance distances", rep.Standard)
	}
	return g.emit(out, func(w io.Writer) error {
		g.cautionsToStderr(rep.Cautions)
		return writeCSV(w, []string{"standard", "freq_mhz", "eirp_w", "duty_factor", "avg_power_public_w", "avg_power_occupational_w",
			"limit_public_w_m2", "limit_occupational_w_m2", "distance_public_m", "distance_occupational_m", "keepout_public_m", "keepout_occupational_m"},
			[][]string{{string(rep.Standard), f4(rep.FreqMHz), f2(rep.EIRPW), f2(rep.DutyFactor), f2(rep.AvgPowerPublicW), f2(rep.AvgPowerOccupationalW),
				f4(rep.LimitPublicWM2), f4(rep.LimitOccupationalWM2), exact(rep.DistancePublicM), exact(rep.DistanceOccupationalM), exact(rep.KeepoutPublicM), exact(rep.KeepoutOccupationalM)}})
	}, func(w io.Writer) error {
		renderExposureText(w, rep, o.height != "", g.imperial())
		if out.DistanceM != nil {
			verdict := "is exempt from routine evaluation"
			if !*out.ExemptAtDistance {
				verdict = "is NOT exempt from routine evaluation: evaluate the exposure there or keep people farther away"
			}
			fmt.Fprintf(w, "\nFor people %s from the antenna the station %s (US 47 CFR § 1.1307(b)(3)(i)(C)).\n", units.FormatLength(*out.DistanceM, g.imperial()), verdict)
		}
		return nil
	})
}

// exposureOutput is the JSON of `mastlink exposure`.
type exposureOutput struct {
	exposure.Report
	DistanceM        *float64 `json:"distance_m,omitempty"`         // --distance
	ExemptAtDistance *bool    `json:"exempt_at_distance,omitempty"` // exempt from routine evaluation at DistanceM
}

var standardNames = map[exposure.Standard]string{
	exposure.StandardFCC:        "US FCC, 47 CFR § 1.1310",
	exposure.StandardICNIRP2020: "ICNIRP 2020 reference levels",
	exposure.StandardICNIRP1998: "ICNIRP 1998 reference levels",
}

// safeLength renders a safety distance in metres rounded UP to the 0.1 of
// the unit shown (m, or ft in imperial units), never down, and never as
// "-0.0".
func safeLength(m float64, im bool) string {
	ceil1 := func(v float64) float64 { return math.Max(0, math.Ceil(v*10-1e-9)/10) }
	if !(m > 1e-9) {
		m = 0
	}
	if im {
		return fmt.Sprintf("%.1f ft", ceil1(m/units.MetresPerFoot))
	}
	return fmt.Sprintf("%.1f m", ceil1(m))
}

// exact renders a machine-read figure with all its digits (CSV cells of
// safety distances keep the exact value; only display rounding goes up).
func exact(v float64) string {
	if math.Abs(v) < 1e-9 {
		v = 0
	}
	return strconv.FormatFloat(v, 'f', -1, 64)
}

// limitText renders a power-density limit in W/m², and in imperial units
// also in mW/cm² (1 mW/cm² = 10 W/m²), the unit of 47 CFR § 1.1310.
func limitText(wm2 float64, im bool) string {
	if im {
		return fmt.Sprintf("%.2f W/m² (%.3f mW/cm²)", wm2, wm2/10)
	}
	return fmt.Sprintf("%.2f W/m²", wm2)
}

// limitsText names the limits of a report and where they come from.
func limitsText(r exposure.Report) string {
	s := r.LimitsSource + " (public: general population/uncontrolled; operators: occupational/controlled)"
	if r.LimitsFromMemory {
		note := r.LimitsNote
		if note == "" {
			note = "Values from memory, not yet checked against the published table"
		}
		s += ". " + note
	}
	return s
}

// cautionsToStderr writes cautions to stderr, for outputs (CSV) that have
// no room for them on stdout.
func (g *globals) cautionsToStderr(cautions []string) {
	for _, c := range cautions {
		fmt.Fprintf(g.stderr, "mastlink: caution: %s\n", c)
	}
}

// writeCautions writes a "Cautions:" list.
func writeCautions(w io.Writer, cautions []string) {
	fmt.Fprintln(w, "Cautions:")
	for _, c := range cautions {
		fmt.Fprintf(w, "  - %s\n", c)
	}
}

// renderExposureText writes the exposure result for a briefing. Every
// safety distance is rounded up (safeLength), in the table and sentences
// alike.
func renderExposureText(w io.Writer, r exposure.Report, withHeight, im bool) {
	fmt.Fprintf(w, "RF exposure at %s, %s, %s EIRP peak\n", units.FormatFreq(r.FreqMHz), r.Mode, units.FormatPower(r.EIRPW))
	fmt.Fprintf(w, "Limits: %s.\n", limitsText(r))
	fmt.Fprintf(w, "Duty factor %s for %s (%s); time on the air: the worst case in each averaging window, below.\n", percent(r.DutyFactor), r.Mode, r.DutySource)
	fmt.Fprintf(w, "Distances: far field with ground-reflection factor %g (FCC OET Bulletin 65, ed. 97-01, eq. 6).\n", r.ReflectionFactor)
	t := newTable(w)
	t.row("", "public", "operators")
	t.row("  averaging window", minutes(r.AveragingPublicS), minutes(r.AveragingOccupationalS))
	t.row("  worst-case time on the air", percent(r.TxFractionPublic), percent(r.TxFractionOccupational))
	t.row("  average transmitter power", units.FormatPower(r.AvgPowerPublicW), units.FormatPower(r.AvgPowerOccupationalW))
	t.row("  limit", limitText(r.LimitPublicWM2, im), limitText(r.LimitOccupationalWM2, im))
	t.row("  distance from the antenna", safeLength(r.DistancePublicM, im), safeLength(r.DistanceOccupationalM, im))
	if withHeight {
		t.row(fmt.Sprintf("  keep-out from the mast foot (head at %s)", units.FormatHeight(r.HeadHeightM, im)), safeLength(r.KeepoutPublicM, im), safeLength(r.KeepoutOccupationalM, im))
	}
	t.flush()
	fmt.Fprintln(w)
	shown, shownName := r.DistancePublicM, "compliance distance" // the public distance the text asks people to keep
	switch {
	case withHeight && r.KeepoutPublicM == 0:
		fmt.Fprintf(w, "With the antenna %s up, a standing person's head is farther than the %s public compliance distance from it: no keep-out zone is needed on the ground.\n",
			units.FormatHeight(r.AntennaHeightM, im), safeLength(r.DistancePublicM, im))
		shown, shownName = 0, "keep-out"
	case withHeight:
		fmt.Fprintf(w, "Keep the public at least %s from the mast foot while transmitting (operators %s).\n",
			safeLength(r.KeepoutPublicM, im), safeLength(r.KeepoutOccupationalM, im))
		if r.AntennaHeightM <= r.HeadHeightM {
			fmt.Fprintln(w, "The antenna is no higher than a standing person's head, so the keep-out is the whole compliance distance.")
		}
		shown, shownName = r.KeepoutPublicM, "keep-out"
	default:
		fmt.Fprintf(w, "Keep the public at least %s from the antenna while transmitting (operators %s); give --height for the keep-out on the ground.\n",
			safeLength(r.DistancePublicM, im), safeLength(r.DistanceOccupationalM, im))
	}
	if r.DistancePublicM < r.NearFieldM {
		fmt.Fprintf(w, "The distance is inside λ/2π (%s) of the antenna, where the far-field estimate is unreliable.\n", units.FormatLength(r.NearFieldM, im))
	}
	if r.Standard == exposure.StandardFCC && r.ExemptBeyondM > 0 {
		fmt.Fprintf(w, "US 47 CFR § 1.1307(b)(3)(i)(C): with %s ERP averaged, the station is exempt from routine evaluation for people farther than %s from the antenna.\n",
			units.FormatPower(r.ERPW), safeLength(r.ExemptBeyondM, im))
		switch {
		case r.ExemptBeyondM > shown && r.ExemptBeyondM <= r.NearFieldM*(1+1e-9):
			fmt.Fprintf(w, "The exemption distance is longer than the %s %s above because the exemption rule applies only from λ/2π of the antenna outwards.\n",
				safeLength(shown, im), shownName)
		case r.ExemptBeyondM > shown:
			fmt.Fprintf(w, "The exemption distance is longer than the %s %s above because the exemption is a coarse screening rule: its table matches the same limits with full ground reflection (factor 4, not %g) on the greater of ERP and transmitter power. Between the two the station is not exempt and needs an evaluation, which is what these figures are.\n",
				safeLength(shown, im), shownName, r.ReflectionFactor)
		}
	}
	fmt.Fprintln(w)
	writeCautions(w, r.Cautions)
}

// minutes renders an averaging time, with a decimal when it is not whole.
func minutes(s float64) string {
	m := s / 60
	if math.Abs(m-math.Round(m)) < 1e-9 {
		return fmt.Sprintf("%.0f min", m)
	}
	return fmt.Sprintf("%.1f min", m)
}

// keepoutNote goes with every keep-out file, GeoJSON and GPX alike.
const keepoutNote = "keep people out of this zone while transmitting; an estimate, not a measurement"

// keepoutSite is a station whose keep-out circles are written.
type keepoutSite struct {
	name string
	pos  orb.Point
	rep  exposure.Report
}

// writeKeepout writes keep-out circles for both tiers as GeoJSON polygons
// or GPX closed routes, by the extension of path.
func writeKeepout(path string, inputs []string, sites []keepoutSite) error {
	switch extension(path) {
	case "geojson", "json":
		fc, err := keepoutGeoJSON(sites)
		if err != nil {
			return err
		}
		return renderTo(path, inputs, func(w io.Writer) error { return writeJSON(w, fc) })
	case "gpx":
		out := gpx.Output{Name: "RF-exposure keep-out"}
		for _, s := range sites {
			for _, tier := range []struct {
				name string
				r    float64
			}{{"public", s.rep.KeepoutPublicM}, {"operators", s.rep.KeepoutOccupationalM}} {
				if up(tier.r) <= 0 { // nothing to keep out: no ring
					continue
				}
				poly, err := exposure.KeepOutCircle(s.pos, tier.r)
				if err != nil {
					return err
				}
				rt := gpx.Track{Name: fmt.Sprintf("%s keep-out (%s) %s", s.name, tier.name, safeLength(tier.r, false))}
				for _, p := range poly[0] {
					rt.Points = append(rt.Points, gpx.Place{Pos: p, ElevM: math.NaN()})
				}
				out.Routes = append(out.Routes, rt)
			}
			out.Waypoints = append(out.Waypoints, gpx.Place{Name: s.name + " antenna", Pos: s.pos, ElevM: math.NaN(),
				Description: fmt.Sprintf("keep the public %s from the mast foot while transmitting (operators %s); %s",
					safeLength(s.rep.KeepoutPublicM, false), safeLength(s.rep.KeepoutOccupationalM, false), keepoutNote)})
		}
		b, err := gpx.Encode(out)
		if err != nil {
			return err
		}
		return writeFileAtomic(path, b, inputs)
	default:
		return usagef("-o: %q: write keep-out circles to a .geojson or .gpx file", path)
	}
}

func keepoutGeoJSON(sites []keepoutSite) (*geojson.FeatureCollection, error) {
	fc := geojson.NewFeatureCollection()
	for _, s := range sites {
		for _, tier := range []struct {
			name string
			r, d float64
		}{{"public", s.rep.KeepoutPublicM, s.rep.DistancePublicM}, {"occupational", s.rep.KeepoutOccupationalM, s.rep.DistanceOccupationalM}} {
			// A keep-out that rounds up to nothing is the antenna's point,
			// never a ring of no size; rings across the antimeridian are cut
			// in two (RFC 7946 §3.1.9).
			var geom orb.Geometry = s.pos
			if up(tier.r) > 0 {
				poly, err := exposure.KeepOutCircle(s.pos, tier.r)
				if err != nil {
					return nil, err
				}
				geom = splitAntimeridian(poly)
			}
			f := geojson.NewFeature(geom)
			f.Properties["station"] = s.name
			f.Properties["tier"] = tier.name
			f.Properties["keepout_m"] = tier.r // exact; displays round it up
			f.Properties["distance_m"] = tier.d
			f.Properties["standard"] = string(s.rep.Standard)
			f.Properties["freq_mhz"] = s.rep.FreqMHz
			f.Properties["note"] = keepoutNote
			fc.Append(f)
		}
	}
	return fc, nil
}
