package plan

import (
	"fmt"
	"slices"
	"strconv"

	"github.com/mastlink/mastlink/propagation"
)

// FrequencyWarnings returns the sentences a link at freqMHz between the
// ends should carry, each once: the frequency outside the band the Env's
// model is meant for (propagation.FrequencyRange: ITU-R P.526
// delta-Bullington from about 30 MHz), outside the span of an end's
// cable's loss figures (feedline.Cable.RangeWarning), and a cable that is
// not 50 Ω, whose junction mismatch loss is included
// (feedline.Cable.MismatchWarning). None of them stops the evaluation.
func (e *Env) FrequencyWarnings(freqMHz float64, ends ...End) []string {
	var out []string
	m := e.model()
	if lo, hi, ok := propagation.FrequencyRange(m); ok && (freqMHz < lo || freqMHz > hi) {
		out = appendNew(out, fmt.Sprintf("%s MHz is outside %s–%s MHz, the band the %s model is meant for: %s; treat its path loss with caution",
			mhz(freqMHz), mhz(lo), mhz(hi), m.Name(), propagation.ModelDescription(m.Name())))
	}
	for _, end := range ends {
		c := end.Feedline.Cable
		if c.Name == "" || end.Feedline.LengthM == 0 {
			continue
		}
		if w := c.RangeWarning(freqMHz); w != "" {
			out = appendNew(out, end.Name+": "+w)
		}
		if w := c.MismatchWarning(); w != "" {
			out = appendNew(out, end.Name+": "+w)
		}
	}
	return out
}

// legWarnings collects FrequencyWarnings over every direction between near
// and each target.
func (e *Env) legWarnings(near End, targets []Target) []string {
	out := []string{}
	for _, t := range targets {
		for _, d := range t.directions() {
			out = appendNew(out, e.FrequencyWarnings(d.freqMHz, near, t.End)...)
		}
	}
	return out
}

// appendNew appends the strings of add that list does not hold yet.
func appendNew(list []string, add ...string) []string {
	for _, s := range add {
		if !slices.Contains(list, s) {
			list = append(list, s)
		}
	}
	return list
}

// mhz formats a frequency in MHz without trailing zeros.
func mhz(f float64) string { return strconv.FormatFloat(f, 'f', -1, 64) }
