package main

import (
	"context"
	"fmt"
	"io"

	"github.com/mastlink/mastlink/plan/units"
	"github.com/mastlink/mastlink/propagation"
	"github.com/spf13/cobra"
)

type horizonOptions struct {
	height, toHeight, k string
}

// horizonResult is the JSON of `mastlink horizon`.
type horizonResult struct {
	K           float64 `json:"k"`
	EarthRadius float64 `json:"effective_earth_radius_m"`
	HeightM     float64 `json:"height_m"`
	ToHeightM   float64 `json:"to_height_m"`
	HorizonM    float64 `json:"horizon_m"`
	ToHorizonM  float64 `json:"to_horizon_m"`
	CombinedM   float64 `json:"combined_m"`
}

func newHorizonCmd(g *globals) *cobra.Command {
	o := &horizonOptions{}
	cmd := &cobra.Command{
		Use:   "horizon --height L [--to-height L] [--k K]",
		Short: "Radio horizon of one or two antennas over a smooth earth",
		Long: `Radio horizon over a smooth earth of effective radius k × 6371 km
(ITU-R P.526-16 eq. 21). With --to-height, also the far antenna's horizon and
the longest line-of-sight path between the two.`,
		Example: "  mastlink horizon --height 9m --to-height 20m\n  mastlink horizon --height 30ft --k 1",
		Args:    cobra.NoArgs,
		RunE: func(cmd *cobra.Command, args []string) error {
			return runHorizon(cmd.Context(), g, o, args)
		},
	}
	f := cmd.Flags()
	f.StringVar(&o.height, "height", "", "antenna height above ground [m] (required)")
	f.StringVar(&o.toHeight, "to-height", "0", "far antenna height above ground [m]")
	f.StringVar(&o.k, "k", "4/3", "effective earth-radius factor")
	_ = cmd.MarkFlagRequired("height")
	return cmd
}

func runHorizon(ctx context.Context, g *globals, o *horizonOptions, args []string) error {
	var inputs []string // reads no file
	if _, err := g.checkOut(inputs, "json", "csv", "txt"); err != nil {
		return err
	}
	h, err := quantity("height", o.height, units.ParseLengthM)
	if err != nil {
		return err
	}
	h2, err := quantity("to-height", o.toHeight, units.ParseLengthM)
	if err != nil {
		return err
	}
	k, err := quantity("k", o.k, units.ParseKFactor)
	if err != nil {
		return err
	}
	ae := propagation.EffectiveEarthRadiusKM(k)
	r := horizonResult{
		K: k, EarthRadius: ae * 1000, HeightM: h, ToHeightM: h2,
		HorizonM:   propagation.RadioHorizonKM(h, 0, ae) * 1000,
		ToHorizonM: propagation.RadioHorizonKM(h2, 0, ae) * 1000,
		CombinedM:  propagation.RadioHorizonKM(h, h2, ae) * 1000,
	}
	return g.emitFile(inputs, r, func(w io.Writer) error {
		return writeCSV(w, []string{"k", "height_m", "to_height_m", "horizon_m", "to_horizon_m", "combined_m"},
			[][]string{{f4(r.K), f2(h), f2(h2), f1(r.HorizonM), f1(r.ToHorizonM), f1(r.CombinedM)}})
	}, func(w io.Writer) error {
		im := g.imperial()
		fmt.Fprintf(w, "Radio horizon over a smooth earth (k = %.3f, effective radius %.0f km)\n", k, ae)
		fmt.Fprintf(w, "  antenna at %-10s horizon %s\n", units.FormatHeight(h, im), units.FormatLength(r.HorizonM, im))
		if h2 > 0 {
			fmt.Fprintf(w, "  far antenna at %-6s horizon %s\n", units.FormatHeight(h2, im), units.FormatLength(r.ToHorizonM, im))
			fmt.Fprintf(w, "  the two see each other up to %s apart over flat ground or sea\n", units.FormatLength(r.CombinedM, im))
		}
		_, err := fmt.Fprintln(w, "Hills and buildings shorten this; use `mastlink link` for a path over terrain.")
		return err
	})
}
