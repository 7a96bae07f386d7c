package main

import (
	"fmt"
	"io"
	"sort"
	"strings"

	"github.com/mastlink/mastlink/plan"
	"github.com/mastlink/mastlink/propagation"
	"github.com/spf13/cobra"
)

// itmFlags are the Longley–Rice ITM settings of every command that takes
// --model (they join through addEnvFlags). They are parsed by
// plan.ITMOptions, the parser the plan file's itm: section uses too.
type itmFlags struct {
	plan.ITMOptions
	changed func(flag string) bool // whether a flag of the command was given
}

// itmFlagNames are the flags of the ITM group, for refusing them where
// they do not apply.
var itmFlagNames = []string{"climate", "refractivity", "surface-refractivity", "permittivity", "conductivity", "variability",
	"no-location-variability", "no-situation-variability", "time", "location", "situation", "confidence"}

// itmHelp is the paragraph of a command's help about --model itm.
const itmHelp = `With --model itm the loss is the Longley–Rice Irregular Terrain Model
(ITM 1.2.2, point to point): a statistical model of the median loss over
the path's terrain irregularity Δh, with its spread in time, location and
situation. Defaults: continental temperate climate, N0 301 N-units,
average ground (ε 15, σ 0.005 S/m), vertical polarization, mobile
variability, 50 % (the median). --reliability then becomes the ITM's
reliability (time and locations together in mobile variability) with
--confidence, and the margin is the margin at that reliability: no σ
margin or σ-based chance of working is added on top (--sigma is refused),
so location variability is counted once. --k and --ground do not apply
(the ITM takes the curvature from the refractivity, the ground from
--permittivity and --conductivity).`

func addITMFlags(cmd *cobra.Command, o *itmFlags) {
	f := cmd.Flags()
	o.changed = f.Changed
	f.StringVar(&o.Climate, "climate", "", "with --model itm: radio climate, 1–7 or equatorial, continental-subtropical, maritime-subtropical, desert, continental-temperate, maritime-temperate-land, maritime-temperate-sea (default continental-temperate)")
	f.StringVar(&o.Refractivity, "refractivity", "", "with --model itm: sea-level surface refractivity N0 [N-units] (default 301); the surface value follows from the profile's elevation")
	f.StringVar(&o.SurfaceRefractivity, "surface-refractivity", "", "with --model itm: surface refractivity Ns [N-units], instead of --refractivity")
	f.StringVar(&o.Permittivity, "permittivity", "", "with --model itm: relative permittivity of the ground (default 15, average ground)")
	f.StringVar(&o.Conductivity, "conductivity", "", "with --model itm: ground conductivity [S/m] (default 0.005, average ground)")
	f.StringVar(&o.Variability, "variability", "", "with --model itm: mode of variability: single, accidental, mobile or broadcast (default mobile)")
	f.BoolVar(&o.NoLocationVariability, "no-location-variability", false, "with --model itm: no location variability (a known, measured path)")
	f.BoolVar(&o.NoSituationVariability, "no-situation-variability", false, "with --model itm: no direct situation variability")
	f.StringVar(&o.Time, "time", "", "with --model itm: fraction of time the loss is not exceeded, e.g. 90% (default 50%; instead of --reliability)")
	f.StringVar(&o.Location, "location", "", "with --model itm: fraction of locations, e.g. 90% (default 50%; instead of --reliability)")
	f.StringVar(&o.Situation, "situation", "", "with --model itm: fraction of situations, e.g. 50% (default 50%; instead of --confidence)")
	f.StringVar(&o.Confidence, "confidence", "", "with --model itm: confidence for --reliability, e.g. 90% (default 50%)")
}

// model returns the model to use: m unchanged unless it is the ITM, which
// gets the polarization pol and the ITM flags. ITM flags without --model
// itm, and --k or --ground with it, are refused with a line naming the
// flag.
func (o *itmFlags) model(m propagation.Model, pol propagation.Polarization) (propagation.Model, error) {
	itm, ok := m.(propagation.ITM)
	if !ok {
		for _, name := range itmFlagNames {
			if o.changed(name) {
				return nil, usagef("--%s is a Longley–Rice ITM setting: add --model itm, or drop it (the model is %s)", name, m.Name())
			}
		}
		return m, nil
	}
	if o.changed("k") {
		return nil, usagef("--k: not used with --model itm: the ITM takes the earth's curvature from --refractivity (N0, default 301)")
	}
	if o.changed("ground") {
		return nil, usagef("--ground: not used with --model itm: give --permittivity and --conductivity (default 15 and 0.005 S/m; sea water 80 and 5)")
	}
	itm.Polarization = pol
	if err := o.Apply(&itm); err != nil {
		return nil, optionUsage(err)
	}
	return itm, nil
}

// requirement makes the requirement req and the model of env agree
// (plan.ITMRequirement): with the ITM, --reliability becomes the model's
// reliability, no σ is added and no σ-based probability given; --sigma is
// then refused.
func (o *itmFlags) requirement(env *plan.Env, req *plan.Requirement) error {
	if _, ok := env.Model.(propagation.ITM); ok && o.changed("sigma") {
		return usagef("--sigma: not used with --model itm: the ITM gives the location variability itself (--reliability becomes its reliability)")
	}
	m, err := plan.ITMRequirement(env.Model, req)
	if err != nil {
		return optionUsage(err)
	}
	env.Model = m
	if req.ByModel {
		env.SigmaDB = 0
	}
	return nil
}

// modelLine describes the model of a result in one line for text output:
// its registered description and, for the ITM, its settings.
func modelLine(m propagation.Model) string {
	d := propagation.ModelDescription(m.Name())
	if itm, ok := m.(propagation.ITM); ok {
		d += "; " + plan.ITMSettings(itm)
	}
	return d
}

// itmText writes the ITM's intermediate values of a link in one line.
func itmText(w io.Writer, r *plan.ITMReport) {
	fmt.Fprintf(w, "  ITM: %s; Δh %.0f m, effective heights %.1f m and %.1f m, horizons %.1f km and %.1f km (%.2f° and %.2f°), Ns %.1f N-units, A_ref %.1f dB\n",
		r.Mode, r.DeltaHM, r.EffectiveHeightTxM, r.EffectiveHeightRxM, r.HorizonDistanceTxM/1000, r.HorizonDistanceRxM/1000,
		r.HorizonAngleTxDeg, r.HorizonAngleRxDeg, r.SurfaceRefractivityN, r.ReferenceAttenuationDB)
}

// warn writes warnings to stderr, one line each.
func (g *globals) warn(ws []string) {
	for _, w := range ws {
		fmt.Fprintf(g.stderr, "mastlink: warning: %s\n", w)
	}
}

// linkModelWarnings gathers the model warnings of many links into one
// line per warning, with the number of links it arose on, sorted.
func linkModelWarnings(links []plan.LinkResult) []string {
	count := map[string]int{}
	for _, l := range links {
		for _, w := range l.Warnings {
			count[w]++
		}
	}
	out := make([]string, 0, len(count))
	for w, n := range count {
		out = append(out, fmt.Sprintf("%s (%d of %d links)", w, n, len(links)))
	}
	sort.Strings(out)
	return out
}

// itmRequirementText is how the plan text states a requirement whose
// reliability is the ITM's.
func itmRequirementText(r plan.Requirement) string {
	if r.Reliability > 0 {
		return fmt.Sprintf("%.1f dB of margin at the ITM's %s reliability on every required link", r.MarginDB, strings.TrimSuffix(fmt.Sprintf("%.1f", 100*r.Reliability), ".0")+"%")
	}
	return fmt.Sprintf("%.1f dB of margin on every required link (ITM at its own percentages)", r.MarginDB)
}
