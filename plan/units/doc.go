// Package units parses and converts the quantities of the radio trade, as
// users type them on the command line and in the plan file: lengths,
// powers, frequencies, gains, sensitivities, ratios, losses, SWR,
// durations, length ranges, the effective earth-radius factor and points
// (LAT,LON in decimal degrees on WGS84, returned as orb.Point{lon, lat}).
// It also holds the decibel arithmetic every other package shares: dBm and
// watts, microvolts across a 50 Ω receiver input, dBi and dBd, S-meter
// readings, and the text formatting of lengths, heights, powers and
// frequencies.
//
// Representation: every parser returns a plain float64 in one fixed unit,
// and the unit is part of the function name (ParseLengthM returns metres,
// ParsePowerW watts, ParseFreqMHz megahertz). The rest of mastlink carries
// the same unit suffixes on its fields (HeightM, FreqMHz, LossDB), so values
// pass through without conversion and a reader always sees the unit at the
// call site. The exceptions are durations (time.Duration), length ranges
// (LengthRange, metres) and points (orb.Point, lon/lat degrees).
//
// Syntax: a decimal number (optional sign, optional fraction, optional
// exponent such as 1e3), optional spaces, then a unit. A bare number takes
// the kind's default unit. Units match case-insensitively, except where the
// case is the only thing telling two units apart: for power a capital M is
// mega (MW, megawatt) and a small m is milli (mW). Megawatts are accepted by
// the syntax and then rejected by the range check (at most 100 kW), with a
// hint to write mW. Surrounding spaces are ignored. Decimal commas ("1,5m"),
// thousands separators, NaN and infinities are not accepted.
//
// Every parse error is a *QuantityError wrapping ErrSyntax, ErrUnit or
// ErrRange; it quotes the input but names no flag or field, which the
// caller prefixes. The package imports nothing else of mastlink and never
// prints.
package units
