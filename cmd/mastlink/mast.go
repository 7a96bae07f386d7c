package main

import (
	"fmt"
	"io"
	"sort"
	"strings"

	"github.com/mastlink/mastlink/plan"
)

// renderMastText writes a sweep as a grid: mast heights down, cables across,
// the worst margin in each cell, marked where it meets the requirement.
func renderMastText(w io.Writer, m *plan.MastResult, im bool) {
	fmt.Fprintf(w, "Mast and cable for %s (cable = mast height + %s run + %s slack; worst margin over every required link, * meets %.1f dB)\n",
		m.Station, plan.FormatLength(m.RunM, im), plan.FormatLength(m.SlackM, im), m.NeededMarginDB)
	var cables []string
	seen := map[string]bool{}
	heights := []float64{}
	hseen := map[float64]bool{}
	cell := map[string]plan.MastRow{}
	for _, r := range m.Rows {
		if !seen[r.Cable] {
			seen[r.Cable] = true
			cables = append(cables, r.Cable)
		}
		if !hseen[r.HeightM] {
			hseen[r.HeightM] = true
			heights = append(heights, r.HeightM)
		}
		cell[fmt.Sprintf("%g|%s", r.HeightM, r.Cable)] = r
	}
	sort.Float64s(heights)
	t := newTable(w)
	t.row(append([]string{"  mast"}, cables...)...)
	for _, h := range heights {
		row := []string{"  " + plan.FormatHeight(h, im)}
		for _, c := range cables {
			r := cell[fmt.Sprintf("%g|%s", h, c)]
			mark := " "
			if r.MeetsRequirement {
				mark = "*"
			}
			row = append(row, fmt.Sprintf("%+.1f dB%s", r.WorstMarginDB, mark))
		}
		t.row(row...)
	}
	t.flush()
	switch {
	case m.Recommended != nil:
		r := m.Recommended
		fmt.Fprintf(w, "Recommended: a %s mast with %s %s (%.1f kg of cable).\n\n", plan.FormatHeight(r.HeightM, im), plan.FormatLength(r.CableLengthM, im), r.Cable, r.CableMassKg)
	case m.Closest != nil:
		c := m.Closest
		fmt.Fprintf(w, "Nothing in the sweep meets the requirement. Closest: %s mast with %s, worst margin %+.1f dB on %s (%.1f dB short).\n\n",
			plan.FormatHeight(c.HeightM, im), c.Cable, c.WorstMarginDB, c.WorstLink, m.NeededMarginDB-c.WorstMarginDB)
	}
	fmt.Fprintln(w, strings.TrimSpace(`Raise masts only where a falling mast cannot reach a power line; guy them against wind
and do not raise them in storms.`))
	fmt.Fprintln(w)
}
