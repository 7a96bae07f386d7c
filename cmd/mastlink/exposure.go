package main

import (
	"context"
	"fmt"
	"io"
	"math"
	"strings"

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

With --height, the keep-out radius on the ground around the mast foot for a
person whose head is at --head-height. With --at and -o keepout.geojson or
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
	return g.emit(out, func(w io.Writer) error {
		return writeCSV(w, []string{"standard", "freq_mhz", "eirp_w", "duty_factor", "avg_power_public_w", "avg_power_occupational_w",
			"limit_public_w_m2", "limit_occupational_w_m2", "distance_public_m", "distance_occupational_m", "keepout_public_m", "keepout_occupational_m"},
			[][]string{{string(rep.Standard), f4(rep.FreqMHz), f2(rep.EIRPW), f2(rep.DutyFactor), f2(rep.AvgPowerPublicW), f2(rep.AvgPowerOccupationalW),
				f4(rep.LimitPublicWM2), f4(rep.LimitOccupationalWM2), f2(rep.DistancePublicM), f2(rep.DistanceOccupationalM), f2(rep.KeepoutPublicM), f2(rep.KeepoutOccupationalM)}})
	}, func(w io.Writer) error {
		renderExposureText(w, rep, o.height != "", g.imperial())
		if out.DistanceM != nil {
			verdict := "is exempt from routine evaluation"
			if !*out.ExemptAtDistance {
				verdict = "is NOT exempt from routine evaluation: evaluate the exposure there or keep people farther away"
			}
			fmt.Fprintf(w, "\nFor people %s from the antenna the station %s (§ 1.1307(b)(3)(i)(C)).\n", units.FormatLength(*out.DistanceM, g.imperial()), verdict)
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

// renderExposureText writes the exposure result for a briefing.
func renderExposureText(w io.Writer, r exposure.Report, withHeight, im bool) {
	fmt.Fprintf(w, "RF exposure at %s, %s, %s EIRP peak (limits: %s)\n", units.FormatFreq(r.FreqMHz), r.Mode, units.FormatPower(r.EIRPW), standardNames[r.Standard])
	t := newTable(w)
	t.row("", "public", "operators")
	t.row("  averaging window", fmt.Sprintf("%.0f min", r.AveragingPublicS/60), fmt.Sprintf("%.0f min", r.AveragingOccupationalS/60))
	t.row("  worst-case time on the air", percent(r.TxFractionPublic), percent(r.TxFractionOccupational))
	t.row("  average transmitter power", units.FormatPower(r.AvgPowerPublicW), units.FormatPower(r.AvgPowerOccupationalW))
	t.row("  limit", fmt.Sprintf("%.2f W/m²", r.LimitPublicWM2), fmt.Sprintf("%.2f W/m²", r.LimitOccupationalWM2))
	t.row("  distance from the antenna", units.FormatLength(up(r.DistancePublicM), im), units.FormatLength(up(r.DistanceOccupationalM), im))
	if withHeight {
		t.row(fmt.Sprintf("  keep-out from the mast foot (head at %s)", units.FormatHeight(r.HeadHeightM, im)), units.FormatLength(up(r.KeepoutPublicM), im), units.FormatLength(up(r.KeepoutOccupationalM), im))
	}
	t.flush()
	fmt.Fprintln(w)
	switch {
	case withHeight && r.KeepoutPublicM == 0:
		fmt.Fprintf(w, "With the antenna %s up, a standing person's head is farther than %s from it: no keep-out zone is needed on the ground.\n",
			units.FormatHeight(r.AntennaHeightM, im), units.FormatLength(r.DistancePublicM, im))
	case withHeight:
		fmt.Fprintf(w, "Keep the public at least %s from the mast foot while transmitting (operators %s).\n",
			units.FormatLength(up(r.KeepoutPublicM), im), units.FormatLength(up(r.KeepoutOccupationalM), im))
	default:
		fmt.Fprintf(w, "Keep the public at least %s from the antenna while transmitting (operators %s); give --height for the keep-out on the ground.\n",
			units.FormatLength(up(r.DistancePublicM), im), units.FormatLength(up(r.DistanceOccupationalM), im))
	}
	if r.DistancePublicM < r.NearFieldM {
		fmt.Fprintf(w, "The distance is inside λ/2π (%s) of the antenna, where the far-field estimate is unreliable.\n", units.FormatLength(r.NearFieldM, im))
	}
	fmt.Fprintf(w, "Under US 47 CFR § 1.1307(b)(3)(i)(C) (ERP %s averaged) the station is exempt from routine evaluation for people farther than %s.\n",
		units.FormatPower(r.ERPW), units.FormatLength(r.ExemptBeyondM, im))
	fmt.Fprintln(w, "\nCautions:")
	for _, c := range r.Cautions {
		fmt.Fprintf(w, "  - %s\n", c)
	}
}

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
				if tier.r <= 0 {
					continue
				}
				poly, err := exposure.KeepOutCircle(s.pos, tier.r)
				if err != nil {
					return err
				}
				rt := gpx.Track{Name: fmt.Sprintf("%s keep-out (%s) %.1f m", s.name, tier.name, up(tier.r))}
				for _, p := range poly[0] {
					rt.Points = append(rt.Points, gpx.Place{Pos: p, ElevM: math.NaN()})
				}
				out.Routes = append(out.Routes, rt)
			}
			out.Waypoints = append(out.Waypoints, gpx.Place{Name: s.name + " antenna", Pos: s.pos, ElevM: math.NaN(),
				Description: fmt.Sprintf("keep the public %.1f m away while transmitting", up(s.rep.KeepoutPublicM))})
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
			var geom orb.Geometry = s.pos
			if tier.r > 0 {
				poly, err := exposure.KeepOutCircle(s.pos, tier.r)
				if err != nil {
					return nil, err
				}
				geom = poly
			}
			f := geojson.NewFeature(geom)
			f.Properties["station"] = s.name
			f.Properties["tier"] = tier.name
			f.Properties["keepout_m"] = round2(tier.r)
			f.Properties["distance_m"] = round2(tier.d)
			f.Properties["standard"] = string(s.rep.Standard)
			f.Properties["freq_mhz"] = s.rep.FreqMHz
			f.Properties["note"] = strings.TrimSpace("keep people out of this zone while transmitting; an estimate, not a measurement")
			fc.Append(f)
		}
	}
	return fc, nil
}
