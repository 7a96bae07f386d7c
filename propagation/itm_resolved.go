package propagation

// Resolved returns m with every default written out and checked as Loss
// applies them (G. A. Hufford, "The ITS Irregular Terrain Model, version
// 1.2.2: the Algorithm", NTIA/ITS, 1995, input ranges): climate, ground,
// polarization and mode set; N0 set unless Ns was given; the percentages
// in the form m gave them (TimePct, LocationPct and SituationPct, or
// ReliabilityPct and ConfidencePct), 0 replaced by 50. It lets callers
// report the settings a result was computed with. The error wraps
// ErrBadParams, as Loss's would.
func (m ITM) Resolved() (ITM, error) {
	c, err := m.resolve()
	if err != nil {
		return ITM{}, err
	}
	out := ITM{
		Climate:             c.climate,
		N0:                  c.n0,
		Ns:                  c.ns,
		Ground:              Ground{Permittivity: c.eps, ConductivitySM: c.sigma},
		Polarization:        c.pol,
		Variability:         c.mode,
		LocationEliminated:  c.elimLoc,
		SituationEliminated: c.elimSi,
	}
	if c.ns != 0 {
		out.N0 = 0
	}
	if m.ReliabilityPct != 0 || m.ConfidencePct != 0 {
		out.ReliabilityPct, out.ConfidencePct = c.time, c.sit
	} else {
		out.TimePct, out.LocationPct, out.SituationPct = c.time, c.loc, c.sit
	}
	return out, nil
}
