package propagation

// FrequencyRanger is implemented by a Model whose published method is meant
// for a limited band of frequencies. Callers warn when asked for a
// frequency outside it; the model still computes.
type FrequencyRanger interface {
	// FrequencyRangeMHz returns the lowest and highest frequency, MHz, the
	// method is meant for.
	FrequencyRangeMHz() (loMHz, hiMHz float64)
}

// FrequencyRangeMHz returns 30–6000 MHz. The delta-Bullington diffraction
// of ITU-R P.526-16 §4.5 is applied to terrain paths by ITU-R P.1812-8,
// whose scope is 30 MHz to 6 GHz (from memory). Below about 30 MHz ground
// wave (ITU-R P.368) and the ionosphere carry signals this method does not
// model; above 6 GHz atmospheric gases and rain, not modelled here, begin
// to matter.
func (Terrain) FrequencyRangeMHz() (loMHz, hiMHz float64) { return 30, 6000 }

// FrequencyRange returns the band m is meant for and true, or false when m
// states none (free space holds at any frequency).
func FrequencyRange(m Model) (loMHz, hiMHz float64, ok bool) {
	r, ok := m.(FrequencyRanger)
	if !ok {
		return 0, 0, false
	}
	lo, hi := r.FrequencyRangeMHz()
	return lo, hi, true
}

// FrequencyRangeMHz returns 20–20 000 MHz, the range of the Longley–Rice
// ITM (G. A. Hufford, "The ITS Irregular Terrain Model, version 1.2.2: the
// Algorithm", NTIA/ITS, 1995); Loss refuses frequencies outside it.
func (ITM) FrequencyRangeMHz() (loMHz, hiMHz float64) { return 20, 20000 }
