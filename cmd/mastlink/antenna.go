package main

import (
	"context"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"

	"github.com/mastlink/mastlink/plan/antenna"
	"github.com/mastlink/mastlink/plan/units"
	"github.com/spf13/cobra"
)

type antennaOptions struct {
	list bool
}

func newAntennaCmd(g *globals) *cobra.Command {
	o := &antennaOptions{}
	cmd := &cobra.Command{
		Use:   "antenna --list | antenna trim … | antenna start …",
		Short: "The antenna catalog, trimming a resonant element, and starting lengths",
		Long: `--list shows the antenna catalog that --antenna and plan files take: peak
gain, half-power beamwidths, front-to-back ratio, band, and where the figures
come from (published, or typical of common practice).

"antenna trim" applies the trimming rule to an antenna that resonates off
frequency; "antenna start" gives quarter- and half-wave lengths to cut
before trimming.`,
		Example: "  mastlink antenna --list\n" +
			"  mastlink antenna trim --resonance 139.35MHz --want 146MHz --length 468mm --length 458mm\n" +
			"  mastlink antenna start --freq 146 --velocity-factor wire",
		Args: cobra.NoArgs,
		RunE: func(cmd *cobra.Command, args []string) error {
			return runAntenna(cmd.Context(), g, o, args)
		},
	}
	cmd.Flags().BoolVar(&o.list, "list", false, "list the antenna catalog")
	cmd.AddCommand(newAntennaTrimCmd(g), newAntennaStartCmd(g))
	return cmd
}

// antennaListItem is one catalog entry in `antenna --list`.
type antennaListItem struct {
	Name          string  `json:"name"`
	Description   string  `json:"description"`
	GainDBi       float64 `json:"gain_dbi"`
	HBeamwidthDeg float64 `json:"h_beamwidth_deg"` // 360: omnidirectional in azimuth
	VBeamwidthDeg float64 `json:"v_beamwidth_deg"`
	FrontToBackDB float64 `json:"front_to_back_db"`
	Directional   bool    `json:"directional"`
	Polarization  string  `json:"polarization"`
	Band          string  `json:"band"`
	MinMHz        float64 `json:"min_mhz"`
	MaxMHz        float64 `json:"max_mhz"`
	Handheld      bool    `json:"handheld"`
	Typical       bool    `json:"typical"`
	Source        string  `json:"source"`
}

func runAntenna(ctx context.Context, g *globals, o *antennaOptions, args []string) error {
	if !o.list {
		return usagef("give --list, or a sub-command: trim, start (see mastlink antenna --help)")
	}
	var items []antennaListItem
	for _, a := range antenna.Catalog() {
		items = append(items, antennaListItem{Name: a.Name, Description: a.Description, GainDBi: a.GainDBi,
			HBeamwidthDeg: a.HBeamwidthDeg, VBeamwidthDeg: a.VBeamwidthDeg, FrontToBackDB: a.FrontToBackDB,
			Directional: a.Directional(), Polarization: a.Polarization.String(), Band: a.Band, MinMHz: a.MinMHz, MaxMHz: a.MaxMHz,
			Handheld: a.Handheld, Typical: a.Typical(), Source: a.Source})
	}
	res := struct {
		Antennas []antennaListItem `json:"antennas"`
	}{items}
	return g.emit(res, func(w io.Writer) error {
		rows := make([][]string, len(items))
		for i, a := range items {
			rows[i] = []string{a.Name, a.Description, f2(a.GainDBi), f1(a.HBeamwidthDeg), f1(a.VBeamwidthDeg), f1(a.FrontToBackDB),
				a.Band, f1(a.MinMHz), f1(a.MaxMHz), fmt.Sprint(a.Handheld), fmt.Sprint(a.Typical), a.Source}
		}
		return writeCSV(w, []string{"name", "description", "gain_dbi", "h_beamwidth_deg", "v_beamwidth_deg", "front_to_back_db",
			"band", "min_mhz", "max_mhz", "handheld", "typical", "source"}, rows)
	}, func(w io.Writer) error {
		fmt.Fprintln(w, "Antenna catalog (gain at the peak; beamwidths at the half-power points)")
		t := newTable(w)
		t.row("  name", "gain", "horizontal", "vertical", "front/back", "band", "figures", "description")
		for _, a := range items {
			h, fb := "omni", "—"
			if a.Directional {
				h, fb = fmt.Sprintf("%.0f°", a.HBeamwidthDeg), fmt.Sprintf("%.0f dB", a.FrontToBackDB)
			}
			src := "published"
			if a.Typical {
				src = "typical"
			}
			t.row("  "+a.Name, fmt.Sprintf("%.2f dBi", a.GainDBi), h, fmt.Sprintf("%.0f°", a.VBeamwidthDeg), fb, a.Band, src, a.Description)
		}
		if err := t.flush(); err != nil {
			return err
		}
		fmt.Fprintln(w, "\n\"typical\" figures are common practice, not measured for your antenna; the JSON and CSV output")
		fmt.Fprintln(w, "give each entry's source. Handheld antennas add a body loss (--body-loss; face, typical, by default).")
		return nil
	})
}

type antennaTrimOptions struct {
	resonance, want string
	lengths         []string
}

func newAntennaTrimCmd(g *globals) *cobra.Command {
	o := &antennaTrimOptions{}
	cmd := &cobra.Command{
		Use:   "trim --resonance F --want F --length L [--length L…]",
		Short: "New element lengths for an antenna that resonates off frequency",
		Long: `The trimming rule for resonant elements (common practice): an element's
length is inversely proportional to its resonant frequency, so every element
is multiplied by the measured over the wanted resonant frequency. It holds
for corrections of a few percent; cut a little long, measure again, and trim
the rest.`,
		Example: "  mastlink antenna trim --resonance 139.35MHz --want 146MHz --length 468mm --length 458mm",
		Args:    cobra.NoArgs,
		RunE: func(cmd *cobra.Command, args []string) error {
			return runAntennaTrim(cmd.Context(), g, o, args)
		},
	}
	f := cmd.Flags()
	f.StringVar(&o.resonance, "resonance", "", "measured resonant frequency [MHz] (lowest SWR)")
	f.StringVar(&o.want, "want", "", "wanted resonant frequency [MHz]")
	f.StringArrayVar(&o.lengths, "length", nil, "an element's length now [m] (mm, cm, in accepted); repeat for each element")
	return cmd
}

// trimOutput is the JSON of `antenna trim`.
type trimOutput struct {
	ResonanceMHz float64          `json:"resonance_mhz"`
	WantMHz      float64          `json:"want_mhz"`
	Ratio        float64          `json:"ratio"`
	Lengths      []trimLengthJSON `json:"lengths"`
	Caution      string           `json:"caution"`
}

type trimLengthJSON struct {
	NowM float64 `json:"now_m"`
	NewM float64 `json:"new_m"`
	CutM float64 `json:"cut_m"` // negative: lengthen
}

// trimCaution goes with every trim.
const trimCaution = "The rule holds for small corrections, and the mounting (mast, clamps, nearby metal, the feedline) " +
	"moves the resonance: cut each element a little longer than the figure, measure again where and as the antenna " +
	"will be used, and trim the rest. A cut cannot be undone."

func runAntennaTrim(ctx context.Context, g *globals, o *antennaTrimOptions, args []string) error {
	if o.resonance == "" || o.want == "" || len(o.lengths) == 0 {
		return usagef("give --resonance, --want and at least one --length")
	}
	res, err := quantity("resonance", o.resonance, units.ParseFreqMHz)
	if err != nil {
		return err
	}
	want, err := quantity("want", o.want, units.ParseFreqMHz)
	if err != nil {
		return err
	}
	var ls []float64
	for _, l := range o.lengths {
		v, err := quantity("length", l, parseElementLengthM)
		if err != nil {
			return err
		}
		ls = append(ls, v)
	}
	r, err := antenna.Trim(res, want, ls)
	if err != nil {
		return usagef("%v", err)
	}
	out := trimOutput{ResonanceMHz: res, WantMHz: want, Ratio: r.Ratio, Caution: trimCaution}
	for _, l := range r.Lengths {
		out.Lengths = append(out.Lengths, trimLengthJSON{NowM: l.NowM, NewM: l.NewM, CutM: l.CutM})
	}
	return g.emit(out, func(w io.Writer) error {
		rows := make([][]string, len(out.Lengths))
		for i, l := range out.Lengths {
			rows[i] = []string{fmt.Sprint(i + 1), fmt.Sprintf("%.4f", l.NowM), fmt.Sprintf("%.4f", l.NewM), fmt.Sprintf("%.4f", l.CutM), fmt.Sprintf("%.4f", r.Ratio)}
		}
		return writeCSV(w, []string{"element", "now_m", "new_m", "cut_m", "ratio"}, rows)
	}, func(w io.Writer) error {
		fmt.Fprintf(w, "Resonant at %s, wanted at %s: every element × %.4f\n", units.FormatFreq(res), units.FormatFreq(want), r.Ratio)
		t := newTable(w)
		t.row("  element", "now", "new", "change")
		for i, l := range out.Lengths {
			change := fmt.Sprintf("cut %.1f mm", l.CutM*1000)
			if l.CutM < 0 {
				change = fmt.Sprintf("lengthen %.1f mm", -l.CutM*1000)
			}
			t.row(fmt.Sprintf("  %d", i+1), fmt.Sprintf("%.1f mm", l.NowM*1000), fmt.Sprintf("%.1f mm", l.NewM*1000), change)
		}
		if err := t.flush(); err != nil {
			return err
		}
		fmt.Fprintln(w, "\n"+trimCaution)
		return nil
	})
}

type antennaStartOptions struct {
	freq, vf string
}

func newAntennaStartCmd(g *globals) *cobra.Command {
	o := &antennaStartOptions{}
	cmd := &cobra.Command{
		Use:   "start --freq F [--velocity-factor wire|coax-solid|coax-foam|0.xx]",
		Short: "Starting lengths of quarter- and half-wave elements, to cut long and trim",
		Long: `Quarter- and half-wave lengths at a frequency: the free-space wavelength
times the velocity factor (wire or rod elements 0.95, the shortening of the
half-wave rule 468/f ft; coax with solid polyethylene 0.66; foamed 0.80;
or the cable's own figure). They are starting points: the mounting changes
the resonance, so cut long and trim (see antenna trim).`,
		Example: "  mastlink antenna start --freq 146 --velocity-factor wire",
		Args:    cobra.NoArgs,
		RunE: func(cmd *cobra.Command, args []string) error {
			return runAntennaStart(cmd.Context(), g, o, args)
		},
	}
	f := cmd.Flags()
	f.StringVar(&o.freq, "freq", "", "frequency [MHz] (required)")
	f.StringVar(&o.vf, "velocity-factor", "wire", "wire, coax-solid, coax-foam, or a number over 0 and at most 1")
	_ = cmd.MarkFlagRequired("freq")
	return cmd
}

// startOutput is the JSON of `antenna start`.
type startOutput struct {
	FreqMHz        float64 `json:"freq_mhz"`
	VelocityFactor float64 `json:"velocity_factor"`
	QuarterWaveM   float64 `json:"quarter_wave_m"`
	HalfWaveM      float64 `json:"half_wave_m"`
	Caution        string  `json:"caution"`
}

func runAntennaStart(ctx context.Context, g *globals, o *antennaStartOptions, args []string) error {
	freq, err := quantity("freq", o.freq, units.ParseFreqMHz)
	if err != nil {
		return err
	}
	vf, err := antenna.ParseVelocityFactor(o.vf)
	if err != nil {
		return usagef("--velocity-factor: %v", err)
	}
	q, err := antenna.QuarterWaveM(freq, vf)
	if err != nil {
		return usagef("%v", err)
	}
	h, err := antenna.HalfWaveM(freq, vf)
	if err != nil {
		return usagef("%v", err)
	}
	out := startOutput{FreqMHz: freq, VelocityFactor: vf, QuarterWaveM: q, HalfWaveM: h, Caution: antenna.StartingLengthCaution}
	return g.emit(out, func(w io.Writer) error {
		return writeCSV(w, []string{"freq_mhz", "velocity_factor", "quarter_wave_m", "half_wave_m"},
			[][]string{{f4(freq), fmt.Sprintf("%.3f", vf), fmt.Sprintf("%.4f", q), fmt.Sprintf("%.4f", h)}})
	}, func(w io.Writer) error {
		im := g.imperial()
		fmt.Fprintf(w, "Starting lengths at %s, velocity factor %.3g\n", units.FormatFreq(freq), vf)
		t := newTable(w)
		t.row("  quarter wave", startLength(q, im))
		t.row("  half wave", startLength(h, im))
		if err := t.flush(); err != nil {
			return err
		}
		fmt.Fprintln(w, "\n"+antenna.StartingLengthCaution)
		return nil
	})
}

func startLength(m float64, im bool) string {
	if im {
		return fmt.Sprintf("%.2f in", m/units.MetresPerFoot*12)
	}
	return fmt.Sprintf("%.1f mm", m*1000)
}

// parseElementLengthM reads an element length: mm, cm and in (inches) as
// well as the lengths units.ParseLengthM takes; metres.
func parseElementLengthM(s string) (float64, error) {
	t := strings.TrimSpace(s)
	for _, u := range []struct {
		suffix string
		m      float64
	}{{"mm", 0.001}, {"cm", 0.01}, {"in", 0.0254}} { // 1 in = 25.4 mm exactly
		if num, ok := strings.CutSuffix(t, u.suffix); ok {
			v, err := strconv.ParseFloat(strings.TrimSpace(num), 64)
			if err != nil || !(v > 0) || math.IsInf(v, 0) {
				return 0, fmt.Errorf("%q: give a length above 0, e.g. 468mm", s)
			}
			return v * u.m, nil
		}
	}
	return units.ParseLengthM(s)
}
