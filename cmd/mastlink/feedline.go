package main

import (
	"context"
	"fmt"
	"io"
	"strconv"

	"github.com/mastlink/mastlink/plan/feedline"
	"github.com/mastlink/mastlink/plan/units"
	"github.com/spf13/cobra"
)

type feedlineOptions struct {
	cable, length, freq, swr, connLoss, power string
	connectors                                int
	list                                      bool
}

// feedlineResult is the JSON of `mastlink feedline`: the contract fields of
// feedline.Loss plus the SWR seen at the radio.
type feedlineResult struct {
	feedline.Loss
	SWRAtAntenna    float64 `json:"swr_at_antenna"`
	SWRAtRadio      float64 `json:"swr_at_radio"`
	MismatchLossDB  float64 `json:"mismatch_loss_db"`
	VelocityFactor  float64 `json:"velocity_factor"`
	MassKg          float64 `json:"mass_kg"`
	PowerInW        float64 `json:"power_in_w,omitempty"`
	PowerAtAntennaW float64 `json:"power_at_antenna_w,omitempty"`
}

func newFeedlineCmd(g *globals) *cobra.Command {
	o := &feedlineOptions{}
	cmd := &cobra.Command{
		Use:   "feedline --cable C --length L --freq F [--swr S] [--connectors N]",
		Short: "Coax loss for a cable, length and frequency, or the cable catalog",
		Long: `Loss of the line between radio and antenna: the cable's matched loss (a
two-term model fitted to published figures), the extra loss from SWR on a
lossy line, and connector losses. --list shows the catalog.

A cable not in the catalog can be described by its loss at one or two
frequencies: --cable custom:6.1dB/100ft@146MHz or
--cable custom:20dB/100m@146MHz,38dB/100m@440MHz.`,
		Example: "  mastlink feedline --cable RG-8X --length 15m --freq 146.94 --swr 1.5 --connectors 2\n  mastlink feedline --list --freq 446",
		Args:    cobra.NoArgs,
		RunE: func(cmd *cobra.Command, args []string) error {
			return runFeedline(cmd.Context(), g, o, args)
		},
	}
	f := cmd.Flags()
	f.StringVar(&o.cable, "cable", "", "cable name from the catalog (see --list) or custom:LOSS/100ft@FREQ")
	f.StringVar(&o.length, "length", "", "cable length [m]")
	f.StringVar(&o.freq, "freq", "146", "frequency [MHz]")
	f.StringVar(&o.swr, "swr", "1", "SWR at the antenna")
	f.IntVar(&o.connectors, "connectors", 0, "mated connector pairs in the line")
	f.StringVar(&o.connLoss, "connector-loss", "0.1dB", "loss per mated connector pair [dB] (0.1 dB is common practice at VHF/UHF)")
	f.StringVar(&o.power, "power", "", "radio output [W]; shows the power that reaches the antenna")
	f.BoolVar(&o.list, "list", false, "list the cable catalog with its loss at --freq")
	return cmd
}

func runFeedline(ctx context.Context, g *globals, o *feedlineOptions, args []string) error {
	var inputs []string // reads no file
	if _, err := g.checkOut(inputs, "json", "csv", "txt"); err != nil {
		return err
	}
	freq, err := quantity("freq", o.freq, units.ParseFreqMHz)
	if err != nil {
		return err
	}
	if o.list {
		return renderCableList(g, freq)
	}
	if o.cable == "" || o.length == "" {
		return usagef("--cable and --length are needed (or --list for the catalog)")
	}
	c, err := feedline.ResolveCable(o.cable)
	if err != nil {
		return usagef("--cable: %v", err)
	}
	length, err := quantity("length", o.length, units.ParseLengthM)
	if err != nil {
		return err
	}
	swr, err := quantity("swr", o.swr, units.ParseSWR)
	if err != nil {
		return err
	}
	cl, err := quantity("connector-loss", o.connLoss, units.ParseLossDB)
	if err != nil {
		return err
	}
	if o.connectors < 0 {
		return usagef("--connectors: give 0 or more")
	}
	fl := feedline.NewLine(c, length)
	fl.SWR, fl.Connectors, fl.ConnectorLossDB = swr, o.connectors, cl
	loss, err := fl.Loss(freq)
	if err != nil {
		return usagef("%v", err)
	}
	r := feedlineResult{
		Loss:           loss,
		SWRAtAntenna:   swr,
		SWRAtRadio:     feedline.InputSWR(loss.MatchedLossDB, swr),
		MismatchLossDB: feedline.MismatchLossDB(feedline.InputSWR(loss.MatchedLossDB, swr)),
		VelocityFactor: c.VelocityFactor,
		MassKg:         c.MassKgPerM * length,
	}
	if o.power != "" {
		p, err := quantity("power", o.power, units.ParsePowerW)
		if err != nil {
			return err
		}
		r.PowerInW, r.PowerAtAntennaW = p, p*loss.DeliveredFraction
	}
	err = g.emitFile(inputs, r, func(w io.Writer) error {
		return writeCSV(w,
			[]string{"cable", "length_m", "freq_mhz", "matched_loss_db", "swr_loss_db", "connector_loss_db", "total_loss_db", "delivered_fraction"},
			[][]string{{loss.Cable, f2(length), f4(freq), f2(loss.MatchedLossDB), f2(loss.SWRLossDB), f2(loss.ConnectorLossDB), f2(loss.TotalLossDB), f4(loss.DeliveredFraction)}})
	}, func(w io.Writer) error { return renderFeedlineText(w, r, c, o.connectors, g.imperial()) })
	if err != nil {
		return err
	}
	if lo, hi := c.FittedRangeMHz(); freq < lo*0.8 || freq > hi*1.25 {
		fmt.Fprintf(g.stderr, "mastlink: note: %s's published loss figures span %.0f–%.0f MHz; at %.0f MHz the figure is extrapolated\n", c.Name, lo, hi, freq)
	}
	return nil
}

func renderCableList(g *globals, freq float64) error {
	items := feedline.CableList(freq)
	res := struct {
		FreqMHz float64                  `json:"freq_mhz"`
		Cables  []feedline.CableListItem `json:"cables"`
	}{freq, items}
	return g.emitFile(nil, res, func(w io.Writer) error {
		rows := make([][]string, len(items))
		for i, c := range items {
			rows[i] = []string{c.Name, c.Description, f2(c.LossDBPer100M), f2(c.VelocityFactor), strconv.FormatFloat(c.MassKgPerM, 'f', 3, 64)}
		}
		return writeCSV(w, []string{"name", "description", "loss_db_per_100m", "velocity_factor", "mass_kg_per_m"}, rows)
	}, func(w io.Writer) error {
		im := g.imperial()
		per, perUnit, massUnit := 100.0, "dB/100 m", "kg/m"
		if im {
			per, perUnit, massUnit = 100*units.MetresPerFoot, "dB/100 ft", "lb/100 ft"
		}
		fmt.Fprintf(w, "Cable catalog, matched loss at %s\n", units.FormatFreq(freq))
		t := newTable(w)
		t.row("  cable", perUnit, "velocity", massUnit, "description")
		for _, c := range items {
			mass := c.MassKgPerM
			if im {
				mass = c.MassKgPerM / units.KilogramsPerPound * 100 * units.MetresPerFoot
			}
			t.row("  "+c.Name, fmt.Sprintf("%.2f", c.LossDBPer100M*per/100), fmt.Sprintf("%.2f", c.VelocityFactor), fmt.Sprintf("%.3g", mass), c.Description)
		}
		return t.flush()
	})
}

// renderFeedlineText writes one line's losses.
func renderFeedlineText(w io.Writer, r feedlineResult, c feedline.Cable, connectors int, im bool) error {
	loss := r.Loss
	fmt.Fprintf(w, "%s, %s at %s\n", c.Name, units.FormatLength(loss.LengthM, im), units.FormatFreq(loss.FreqMHz))
	t := newTable(w)
	t.row("  matched cable loss", fmt.Sprintf("%.2f dB", loss.MatchedLossDB))
	t.row(fmt.Sprintf("  extra loss from SWR %.2g:1", r.SWRAtAntenna), fmt.Sprintf("%.2f dB", loss.SWRLossDB))
	t.row(fmt.Sprintf("  connectors (%d pairs)", connectors), fmt.Sprintf("%.2f dB", loss.ConnectorLossDB))
	t.row("  total line loss", fmt.Sprintf("%.2f dB", loss.TotalLossDB))
	t.row("  reaches the antenna", percent(loss.DeliveredFraction))
	if r.SWRAtAntenna > 1 {
		t.row("  SWR seen at the radio", fmt.Sprintf("%.2f:1", r.SWRAtRadio))
	}
	if r.PowerInW > 0 {
		t.row(fmt.Sprintf("  of %s from the radio", units.FormatPower(r.PowerInW)), units.FormatPower(r.PowerAtAntennaW)+" at the antenna")
	}
	if r.MassKg > 0 {
		t.row("  cable mass (typical)", fmt.Sprintf("%.1f kg", r.MassKg))
	}
	return t.flush()
}
