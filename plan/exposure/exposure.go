package exposure

import (
	"errors"
	"fmt"
	"math"
	"strings"
	"time"

	"github.com/mastlink/mastlink/propagation"
	"github.com/mastlink/mastlink/terrain"
	"github.com/paulmach/orb"
)

// ErrInput is wrapped by every error about an invalid input to the
// RF-exposure functions (bad power, frequency out of range, unknown mode or
// standard, bad reflection factor, bad transmit fraction or cycle).
var ErrInput = errors.New("invalid exposure input")

// Frequency range, in MHz, over which the exposure functions are defined:
// 0.3 MHz to 100 GHz, the span of 47 CFR § 1.1310(e)(1) Table 1.
const (
	MinFreqMHz = 0.3
	MaxFreqMHz = 100000.0
)

// Ground-reflection factors F for the far-field power density
// S = F·EIRP/(4πR²) of FCC OET Bulletin 65 (ed. 97-01), §2.
const (
	// ReflectionFreeSpace (F = 1) assumes no reflected wave.
	ReflectionFreeSpace = 1.0
	// ReflectionGround (F = 2.56) is the EPA field factor 1.6 squared for a
	// reflection off the ground; OET Bulletin 65 eq. (6). The default.
	ReflectionGround = 2.56
	// ReflectionFull (F = 4) assumes the reflected field adds fully in phase
	// (field doubled); OET Bulletin 65 eq. (5) and § 1.1307(b)(3)(i)(C).
	ReflectionFull = 4.0
)

// DefaultHeadHeightM is the height in metres of a person's head above the
// ground used for keep-out radii when none is given [practice].
const DefaultHeadHeightM = 2.0

// dipoleGainFactor is the power gain of a half-wave dipole over an isotropic
// radiator, 2.15 dBi, as 47 CFR § 1.1307(b)(3)(i)(C) rounds it: EIRP = 1.64 ERP.
const dipoleGainFactor = 1.64

// exposureFreeSpaceImpedanceOhm is the impedance of free space μ0·c in ohms
// (CODATA 2018), used to turn ICNIRP field-strength reference levels into a
// plane-wave equivalent power density S = E²/Z0 = Z0·H².
const exposureFreeSpaceImpedanceOhm = 376.730313668

// Standard names a set of exposure limits.
type Standard string

// The exposure standards known to Evaluate and LimitFor.
const (
	// StandardFCC is the US limit for maximum permissible exposure,
	// 47 CFR § 1.1310(e)(1) Table 1: occupational/controlled averaged over
	// 6 minutes, general population/uncontrolled over 30 minutes.
	StandardFCC Standard = "fcc"
	// StandardICNIRP2020 is the ICNIRP 2020 guidelines (Health Physics
	// 118(5):483–524), Table 5 whole-body reference levels averaged over
	// 30 minutes. The values are from memory: neither the published table
	// nor a faithful copy of it has been read yet (only secondary
	// copies, which agree), for either tier; TierSource and LimitsNote say
	// so for the output.
	StandardICNIRP2020 Standard = "icnirp2020"
	// StandardICNIRP1998 is the ICNIRP 1998 guidelines (Health Physics
	// 74(4):494–522), Table 6 (occupational) and Table 7 (general public)
	// reference levels, averaged over 6 minutes (68/f^1.05 minutes above
	// 10 GHz, f in GHz). The general-public values and the averaging times
	// agree with the public reference levels of Council Recommendation
	// 1999/519/EC, Annex III, which are taken from ICNIRP 1998 (read as
	// reproduced in French Décret n° 2002-775, annex § 2.2 A); the occupational Table 6 has been checked only in part
	// (see icnirp1998OccupationalBands), so the occupational tier stays
	// marked from memory; TierSource and LimitsNote say so for the output.
	StandardICNIRP1998 Standard = "icnirp1998"
)

var exposureStandards = []Standard{StandardFCC, StandardICNIRP2020, StandardICNIRP1998}

// StandardSource returns the published table a standard's limits come from
// and whether any of the values in this package (either tier) is from
// memory, not yet checked against that table or a faithful copy of it
// (true for both ICNIRP sets: ICNIRP 2020 Table 5 is unread for both tiers;
// of ICNIRP 1998, Table 7 (public) is checked, Table 6 (occupational) only
// in part). TierSource tells the tiers apart. An unknown standard gives an
// empty source.
func StandardSource(std Standard) (source string, fromMemory bool) {
	switch std {
	case StandardFCC, "":
		return "US 47 CFR § 1.1310(e)(1) Table 1", false
	case StandardICNIRP2020:
		return "ICNIRP 2020 guidelines (Health Physics 118(5):483–524), Table 5, whole body, 30 min average", true
	case StandardICNIRP1998:
		return "ICNIRP 1998 guidelines (Health Physics 74(4):494–522), Tables 6 and 7", true
	}
	return "", false
}

// TierSource returns the published table behind one tier's limits of a
// standard and whether the values in this package for that tier are from
// memory, not yet checked against the table or a faithful copy of it:
//
//   - StandardFCC: 47 CFR § 1.1310(e)(1) Table 1, (A) occupational/controlled
//     and (B) general population/uncontrolled; checked.
//   - StandardICNIRP2020: Table 5, both tiers from memory.
//   - StandardICNIRP1998: Table 7 (general public) checked against the
//     public reference levels of Council Recommendation 1999/519/EC,
//     Annex III, which are taken from it; Table 6 (occupational) from
//     memory, checked only in part (see icnirp1998OccupationalBands).
//
// An unknown standard or tier gives an empty source.
func TierSource(std Standard, tier Tier) (source string, fromMemory bool) {
	occ := tier == TierOccupational
	if !occ && tier != TierPublic {
		return "", false
	}
	switch std {
	case StandardFCC, "":
		if occ {
			return "US 47 CFR § 1.1310(e)(1) Table 1 (A), occupational/controlled", false
		}
		return "US 47 CFR § 1.1310(e)(1) Table 1 (B), general population/uncontrolled", false
	case StandardICNIRP2020:
		if occ {
			return "ICNIRP 2020 guidelines (Health Physics 118(5):483–524), Table 5, occupational, whole body, 30 min average", true
		}
		return "ICNIRP 2020 guidelines (Health Physics 118(5):483–524), Table 5, general public, whole body, 30 min average", true
	case StandardICNIRP1998:
		if occ {
			return "ICNIRP 1998 guidelines (Health Physics 74(4):494–522), Table 6, occupational", true
		}
		return "ICNIRP 1998 guidelines (Health Physics 74(4):494–522), Table 7, general public", false
	}
	return "", false
}

// LimitsNote returns, for the output, one sentence (capitalised, without
// the final full stop) saying which of a standard's limits are from memory
// (TierSource) and which are checked, or "" when none is from memory
// (StandardFCC) or the standard is unknown.
func LimitsNote(std Standard) string {
	_, pubMem := TierSource(std, TierPublic)
	_, occMem := TierSource(std, TierOccupational)
	switch {
	case std == StandardICNIRP2020 && pubMem && occMem:
		return "Both tiers of ICNIRP 2020 Table 5, public and operators, are from memory: neither the published table nor a verbatim copy of it has been checked"
	case std == StandardICNIRP1998 && occMem && !pubMem:
		return "The operators' limits, ICNIRP 1998 Table 6 (occupational), are from memory, checked only in part; the public limits, Table 7, are checked against the reference levels of Council Recommendation 1999/519/EC, Annex III, which are taken from that table"
	case pubMem || occMem:
		return "Some of these limits are from memory, not yet checked against the published table"
	}
	return ""
}

// ParseStandard returns the standard named by s ("fcc",
// "icnirp2020", "icnirp1998"; case and surrounding spaces ignored). An empty
// string gives StandardFCC. Unknown names give an error wrapping
// ErrInput that lists the known names.
func ParseStandard(s string) (Standard, error) {
	name := strings.ToLower(strings.TrimSpace(s))
	if name == "" {
		return StandardFCC, nil
	}
	for _, std := range exposureStandards {
		if name == string(std) {
			return std, nil
		}
	}
	return "", fmt.Errorf("%w: unknown exposure standard %q (known: fcc, icnirp2020, icnirp1998)", ErrInput, s)
}

// Tier is the population an exposure limit protects.
type Tier int

const (
	// TierPublic is the general population / uncontrolled tier.
	TierPublic Tier = iota
	// TierOccupational is the occupational / controlled tier: people aware
	// of the exposure and able to control it.
	TierOccupational
)

// String returns "public" or "occupational".
func (t Tier) String() string {
	switch t {
	case TierPublic:
		return "public"
	case TierOccupational:
		return "occupational"
	}
	return fmt.Sprintf("Tier(%d)", int(t))
}

// Limit is a whole-body power-density limit and the time over which
// exposure is averaged against it.
type Limit struct {
	// PowerDensityWM2 is the limit (or plane-wave equivalent of the
	// field-strength reference level) in W/m².
	PowerDensityWM2 float64
	// Averaging is the averaging time of the limit.
	Averaging time.Duration
}

// exposureBand is one frequency band of a limit table: [loMHz, hiMHz), the
// last band of a table also including hiMHz. limitWM2 gives the power
// density in W/m² at f MHz.
type exposureBand struct {
	loMHz, hiMHz float64
	limitWM2     func(f float64) float64
}

// fccMWcm2 converts a 47 CFR § 1.1310 limit in mW/cm² to W/m²
// (1 mW/cm² = 10 W/m²).
func fccMWcm2(mWcm2 float64) float64 { return 10 * mWcm2 }

// planeWaveWM2 is the plane-wave equivalent power density in W/m² of field
// reference levels eV/m and hA/m: the stricter of E²/Z0 and Z0·H², which
// are equal in the far field.
func planeWaveWM2(eVm, hAm float64) float64 {
	return math.Min(eVm*eVm/exposureFreeSpaceImpedanceOhm, exposureFreeSpaceImpedanceOhm*hAm*hAm)
}

// 47 CFR § 1.1310(e)(1) Table 1, (A) limits for occupational/controlled
// exposure, averaged over 6 minutes. f in MHz, S in mW/cm².
var fccOccupationalBands = []exposureBand{
	{0.3, 3.0, func(float64) float64 { return fccMWcm2(100) }},
	{3.0, 30, func(f float64) float64 { return fccMWcm2(900 / (f * f)) }},
	{30, 300, func(float64) float64 { return fccMWcm2(1.0) }},
	{300, 1500, func(f float64) float64 { return fccMWcm2(f / 300) }},
	{1500, 100000, func(float64) float64 { return fccMWcm2(5) }},
}

// 47 CFR § 1.1310(e)(1) Table 1, (B) limits for general
// population/uncontrolled exposure, averaged over 30 minutes.
var fccPublicBands = []exposureBand{
	{0.3, 1.34, func(float64) float64 { return fccMWcm2(100) }},
	{1.34, 30, func(f float64) float64 { return fccMWcm2(180 / (f * f)) }},
	{30, 300, func(float64) float64 { return fccMWcm2(0.2) }},
	{300, 1500, func(f float64) float64 { return fccMWcm2(f / 1500) }},
	{1500, 100000, func(float64) float64 { return fccMWcm2(1.0) }},
}

// ICNIRP 2020 Table 5, whole-body reference levels averaged over 30 min,
// occupational [from memory, not yet checked against the published table
// or a faithful copy of it; the local-exposure levels of Table 6 are not
// used]. Below 30 MHz the table gives only
// incident field strengths (E = 660/f^0.7 V/m, H = 4.9/f A/m); their
// plane-wave equivalent is used.
var icnirp2020OccupationalBands = []exposureBand{
	{0.3, 30, func(f float64) float64 { return planeWaveWM2(660/math.Pow(f, 0.7), 4.9/f) }},
	{30, 400, func(float64) float64 { return 10 }},
	{400, 2000, func(f float64) float64 { return f / 40 }},
	{2000, 100000, func(float64) float64 { return 50 }}, // table runs to 300 GHz
}

// ICNIRP 2020 Table 5, general public [from memory, not yet checked against
// the published table or a faithful copy of it]. Below
// 30 MHz: E = 300/f^0.7 V/m, H = 2.2/f A/m, plane-wave equivalent used.
var icnirp2020PublicBands = []exposureBand{
	{0.3, 30, func(f float64) float64 { return planeWaveWM2(300/math.Pow(f, 0.7), 2.2/f) }},
	{30, 400, func(float64) float64 { return 2 }},
	{400, 2000, func(f float64) float64 { return f / 200 }},
	{2000, 100000, func(float64) float64 { return 10 }},
}

// ICNIRP 1998 Table 6, occupational reference levels [from memory, checked
// only in part: the E-field levels 610 V/m (0.065–1 MHz), 610/f V/m
// (1–10 MHz) and 61 V/m with 10 W/m² (10–400 MHz) agree with a copy of the
// table read in secondary material, and 3·10⁻³·f^½ V/m (f in Hz, i.e.
// 3·f^½ with f in MHz, 400 MHz–2 GHz) and 50 W/m² above 2 GHz agree with
// the action values of Directive 2013/35/EU Annex III, which keep them; the
// H-field levels 1.6/f A/m and the S column for 400–2000 MHz (f/40) have
// not been read]. Below 10 MHz the table gives field strengths only (0.065–1 MHz:
// 610 V/m, 1.6/f A/m; 1–10 MHz: 610/f V/m, 1.6/f A/m); their plane-wave
// equivalent is used.
var icnirp1998OccupationalBands = []exposureBand{
	{0.3, 1, func(f float64) float64 { return planeWaveWM2(610, 1.6/f) }},
	{1, 10, func(f float64) float64 { return planeWaveWM2(610/f, 1.6/f) }},
	{10, 400, func(float64) float64 { return 10 }},
	{400, 2000, func(f float64) float64 { return f / 40 }},
	{2000, 100000, func(float64) float64 { return 50 }},
}

// ICNIRP 1998 Table 7, general public reference levels. Every band used
// here (0.15–1 MHz: 87 V/m, 0.73/f A/m; 1–10 MHz: 87/f^½ V/m, 0.73/f A/m;
// 10–400 MHz: 28 V/m, 0.073 A/m, 2 W/m²; 400–2000 MHz: 1.375·f^½ V/m,
// 0.0037·f^½ A/m, f/200 W/m²; 2–300 GHz: 61 V/m, 0.16 A/m, 10 W/m²) was
// checked against the public reference levels of Council Recommendation
// 1999/519/EC, Annex III, which are taken from this table, read as
// reproduced in French Décret n° 2002-775 of 3 May 2002, annex § 2.2 A
// (not against the journal's page itself). Below 10 MHz the plane-wave equivalent is used.
var icnirp1998PublicBands = []exposureBand{
	{0.3, 1, func(f float64) float64 { return planeWaveWM2(87, 0.73/f) }},
	{1, 10, func(f float64) float64 { return planeWaveWM2(87/math.Sqrt(f), 0.73/f) }},
	{10, 400, func(float64) float64 { return 2 }},
	{400, 2000, func(f float64) float64 { return f / 200 }},
	{2000, 100000, func(float64) float64 { return 10 }},
}

// checkExposureFreq returns an error wrapping ErrInput unless
// freqMHz lies in [MinFreqMHz, MaxFreqMHz].
func checkExposureFreq(freqMHz float64) error {
	if math.IsNaN(freqMHz) || freqMHz < MinFreqMHz || freqMHz > MaxFreqMHz {
		return fmt.Errorf("%w: frequency %g MHz is outside 0.3–100000 MHz; give a frequency between 0.3 MHz and 100 GHz", ErrInput, freqMHz)
	}
	return nil
}

// lookupBand returns the limit of the band of table holding freqMHz, which
// the caller has checked to lie within the table.
func lookupBand(table []exposureBand, freqMHz float64) float64 {
	for i, b := range table {
		if freqMHz >= b.loMHz && (freqMHz < b.hiMHz || i == len(table)-1) {
			return b.limitWM2(freqMHz)
		}
	}
	return math.NaN() // not reached for a checked frequency
}

// icnirp1998Averaging is the ICNIRP 1998 averaging time: 6 minutes up to
// 10 GHz, 68/f^1.05 minutes above (f in GHz); checked against notes 2 and 3
// of the reference levels of Council Recommendation 1999/519/EC, Annex III
// (as reproduced in French Décret n° 2002-775, annex § 2.2 A).
func icnirp1998Averaging(freqMHz float64) time.Duration {
	if freqMHz <= 10000 {
		return 6 * time.Minute
	}
	minutes := 68 / math.Pow(freqMHz/1000, 1.05)
	return time.Duration(minutes * float64(time.Minute))
}

// LimitFor returns the whole-body power-density limit in W/m² and
// its averaging time for the standard, tier and frequency freqMHz (MHz,
// 0.3–100000):
//
//   - StandardFCC: 47 CFR § 1.1310(e)(1) Table 1; occupational/controlled
//     averaged over 6 min, general population/uncontrolled over 30 min.
//   - StandardICNIRP2020: ICNIRP 2020 Table 5, both tiers over 30 min
//     [from memory, not yet checked against the table]; below 30 MHz the plane-wave equivalent of the
//     incident E and H reference levels (the stricter of E²/Z0 and Z0·H²).
//   - StandardICNIRP1998: ICNIRP 1998 Tables 6 and 7, over 6 min (68/f^1.05
//     min above 10 GHz) [Table 7 and the averaging times checked against the
//     reference levels of Council Recommendation 1999/519/EC, Annex III,
//     taken from it; Table 6 from memory, checked in part]; below 10 MHz the plane-wave
//     equivalent of the E and H reference levels.
//
// The standard's name is read as by ParseStandard ("" is
// StandardFCC). A frequency outside the range, an unknown standard or tier
// gives an error wrapping ErrInput.
func LimitFor(std Standard, tier Tier, freqMHz float64) (Limit, error) {
	std, err := ParseStandard(string(std))
	if err != nil {
		return Limit{}, err
	}
	if err := checkExposureFreq(freqMHz); err != nil {
		return Limit{}, err
	}
	if tier != TierPublic && tier != TierOccupational {
		return Limit{}, fmt.Errorf("%w: unknown exposure tier %d; use TierPublic or TierOccupational", ErrInput, int(tier))
	}
	occ := tier == TierOccupational
	switch std {
	case StandardFCC:
		if occ {
			return Limit{lookupBand(fccOccupationalBands, freqMHz), 6 * time.Minute}, nil
		}
		return Limit{lookupBand(fccPublicBands, freqMHz), 30 * time.Minute}, nil
	case StandardICNIRP2020:
		if occ {
			return Limit{lookupBand(icnirp2020OccupationalBands, freqMHz), 30 * time.Minute}, nil
		}
		return Limit{lookupBand(icnirp2020PublicBands, freqMHz), 30 * time.Minute}, nil
	case StandardICNIRP1998:
		if occ {
			return Limit{lookupBand(icnirp1998OccupationalBands, freqMHz), icnirp1998Averaging(freqMHz)}, nil
		}
		return Limit{lookupBand(icnirp1998PublicBands, freqMHz), icnirp1998Averaging(freqMHz)}, nil
	}
	return Limit{}, fmt.Errorf("%w: unknown exposure standard %q", ErrInput, std) // not reached
}

// TxMode is an emission mode, which sets the duty factor of the transmitted
// power (FCC OET Bulletin 65 Supplement B, ed. 97-01, Table 2).
type TxMode string

// The modes known to TxMode.DutyFactor.
const (
	ModeFM           TxMode = "fm"            // FM voice, 100 %
	ModeSSB          TxMode = "ssb"           // conversational SSB, 20 %
	ModeSSBProcessed TxMode = "ssb-processed" // SSB with heavy speech processing, 50 % (typical, conservative; see DutySource)
	ModeCW           TxMode = "cw"            // conversational CW, 40 %
	ModeDigital      TxMode = "digital"       // FSK, RTTY, AFSK over SSB, 100 %
	ModeCarrier      TxMode = "carrier"       // unmodulated carrier, 100 %
)

// txModeDuty is OET Bulletin 65 Supplement B (ed. 97-01) Table 2, except
// ssb-processed: the published table has not been read for it, and
// secondary copies of the table disagree (40 % in some, 50 % in others), so
// 50 %, the higher, is used and marked typical (see DutySource).
var txModeDuty = []struct {
	mode TxMode
	duty float64
}{
	{ModeFM, 1.0},
	{ModeSSB, 0.2},
	{ModeSSBProcessed, 0.5},
	{ModeCW, 0.4},
	{ModeDigital, 1.0},
	{ModeCarrier, 1.0},
}

// ParseTxMode returns the mode named by s (fm, ssb, ssb-processed, cw,
// digital, carrier; case and surrounding spaces ignored). An empty string
// gives ModeCarrier, the worst case. Unknown names give an error wrapping
// ErrInput that lists the known modes.
func ParseTxMode(s string) (TxMode, error) {
	name := TxMode(strings.ToLower(strings.TrimSpace(s)))
	if name == "" {
		return ModeCarrier, nil
	}
	for _, m := range txModeDuty {
		if name == m.mode {
			return m.mode, nil
		}
	}
	return "", fmt.Errorf("%w: unknown mode %q (known: fm, ssb, ssb-processed, cw, digital, carrier); or give a duty factor", ErrInput, s)
}

// DutyFactor returns the fraction (0–1) of the peak envelope power that the
// mode radiates on average while transmitting, from FCC OET Bulletin 65
// Supplement B (ed. 97-01) Table 2. An unknown mode gives an error wrapping
// ErrInput.
func (m TxMode) DutyFactor() (float64, error) {
	parsed, err := ParseTxMode(string(m))
	if err != nil {
		return 0, err
	}
	for _, d := range txModeDuty {
		if d.mode == parsed {
			return d.duty, nil
		}
	}
	return 0, fmt.Errorf("%w: unknown mode %q", ErrInput, m) // not reached
}

// DutySource returns where the mode's duty factor comes from, for the
// output: FCC OET Bulletin 65 Supplement B (ed. 97-01) Table 2 for fm, ssb,
// cw, digital and carrier; for ssb-processed, a typical figure (50 %,
// conservative) not checked against that table, whose secondary copies give
// 40 % or 50 %.
func (m TxMode) DutySource() string {
	if m == ModeSSBProcessed {
		return "typical figure for heavily processed speech, the higher of the 40 % and 50 % that copies of FCC OET Bulletin 65 Supplement B Table 2 give; not checked against the published table"
	}
	return "FCC OET Bulletin 65 Supplement B (ed. 97-01), Table 2"
}

// WorstCaseOnAirFraction returns the largest fraction of any window of
// length window that a periodic transmit/listen cycle — on for on, then off
// for off, repeating — spends transmitting, over every placement of the
// window on the cycle. This is the worst-case on-air fraction FCC OET
// Bulletin 65 Supplement B asks for within an averaging period.
//
// With period P = on + off and window = n·P + r (0 ≤ r < P), any n whole
// periods hold n·on of transmission wherever they start, and the remaining
// r hold at most min(r, on), reached by starting the window at the start of
// a transmission; so the result is (n·on + min(r, on)) / window, computed
// exactly in integer nanoseconds.
//
// on must be positive, off non-negative (0 is continuous transmission) and
// window positive; otherwise the error wraps ErrInput.
func WorstCaseOnAirFraction(on, off, window time.Duration) (float64, error) {
	switch {
	case on <= 0:
		return 0, fmt.Errorf("%w: transmit time %v must be greater than 0 in a transmit/listen cycle", ErrInput, on)
	case off < 0:
		return 0, fmt.Errorf("%w: listen time %v is negative; give 0 or more", ErrInput, off)
	case window <= 0:
		return 0, fmt.Errorf("%w: averaging window %v must be greater than 0", ErrInput, window)
	case on > math.MaxInt64-off:
		return 0, fmt.Errorf("%w: transmit/listen cycle %v + %v is too long", ErrInput, on, off)
	}
	period := on + off
	n := window / period
	r := window % period
	onTime := n*on + min(r, on)
	return float64(onTime) / float64(window), nil
}

// ComplianceDistanceM returns the distance in metres at which the far-field
// power density of an antenna radiating eirpAvgW (W, time-averaged EIRP)
// falls to limitWM2 (W/m², > 0) with ground-reflection factor reflection
// (1, 2.56 or 4): R = √(F·EIRP/(4π·S_limit)), OET Bulletin 65 (ed. 97-01)
// eq. (6) solved for R. Zero power gives 0.
func ComplianceDistanceM(eirpAvgW, limitWM2, reflection float64) float64 {
	return math.Sqrt(reflection * eirpAvgW / (4 * math.Pi * limitWM2))
}

// KeepOutRadiusM returns the horizontal distance in metres from the foot of
// a mast beyond which no part of a standing person — any point from the
// ground up to the head at headHeightM — is closer than complianceM (m) to
// an antenna at antennaHeightM above the ground [geometry]:
//
//   - antenna at or below head height: some part of the body is level with
//     the antenna, so the keep-out is the whole compliance distance R;
//   - antenna above head height: the head is the nearest point, and the
//     keep-out is √(R² − (h_a − h_p)²), or 0 when R ≤ h_a − h_p.
//
// Results within 1e-9 m of 0 are returned as exactly 0.
func KeepOutRadiusM(complianceM, antennaHeightM, headHeightM float64) float64 {
	if !(complianceM > 0) {
		return 0
	}
	dh := antennaHeightM - headHeightM
	if dh <= 0 {
		return complianceM
	}
	if complianceM <= dh {
		return 0
	}
	// (R − Δh)(R + Δh) avoids the cancellation of R² − Δh² near R = Δh.
	return clean(math.Sqrt((complianceM - dh) * (complianceM + dh)))
}

// clean returns v with magnitudes below 1e-9 (rounding residue, far below
// any distance or power that matters) set to exactly +0, so that no output
// shows "-0" or "2.2e-16".
func clean(v float64) float64 {
	if math.Abs(v) < 1e-9 {
		return 0
	}
	return v
}

// NearFieldBoundaryM returns λ/2π in metres at freqMHz (MHz, > 0), the
// distance within which reactive near fields dominate and the far-field
// formulas of OET Bulletin 65 lose their meaning; it is also the smallest
// distance at which 47 CFR § 1.1307(b)(3)(i)(C) applies.
func NearFieldBoundaryM(freqMHz float64) float64 {
	return propagation.WavelengthM(freqMHz, propagation.SpeedOfLightMS) / (2 * math.Pi)
}

// ERPFromEIRPW returns the effective radiated power in W (relative to a
// half-wave dipole) of an EIRP in W: ERP = EIRP/1.64, i.e. 2.15 dB less,
// as 47 CFR § 1.1307(b)(3)(i)(C) defines it.
func ERPFromEIRPW(eirpW float64) float64 { return eirpW / dipoleGainFactor }

// exemptionBand is one row of the § 1.1307(b)(3)(i)(C) table: threshold
// ERP = coef · R² · f^fexp for f in [loMHz, hiMHz).
type exemptionBand struct {
	loMHz, hiMHz float64
	coef, fexp   float64
}

// 47 CFR § 1.1307(b)(3)(i)(C) table (R in m, f in MHz, ERP in W):
// 0.3–1.34: 1920 R²; 1.34–30: 3450 R²/f²; 30–300: 3.83 R²;
// 300–1500: 0.0128 R² f; 1500–100000: 19.2 R².
var exemptionBands = []exemptionBand{
	{0.3, 1.34, 1920, 0},
	{1.34, 30, 3450, -2},
	{30, 300, 3.83, 0},
	{300, 1500, 0.0128, 1},
	{1500, 100000, 19.2, 0},
}

// exemptionCoefficient returns k(f) with threshold ERP = k(f)·R².
func exemptionCoefficient(freqMHz float64) float64 {
	for i, b := range exemptionBands {
		if freqMHz >= b.loMHz && (freqMHz < b.hiMHz || i == len(exemptionBands)-1) {
			return b.coef * math.Pow(freqMHz, b.fexp)
		}
	}
	return math.NaN() // not reached for a checked frequency
}

// ExemptionThresholdERPW returns the threshold ERP in watts of 47 CFR
// § 1.1307(b)(3)(i)(C) at freqMHz (0.3–100000 MHz) for a person at
// distanceM metres from the antenna: a source whose available maximum
// time-averaged power or ERP, whichever is greater, does not exceed it is
// exempt from routine evaluation. The rule applies only from λ/2π
// (NearFieldBoundaryM) outwards; a smaller distance, or a frequency out of
// range, gives an error wrapping ErrInput.
func ExemptionThresholdERPW(freqMHz, distanceM float64) (float64, error) {
	if err := checkExposureFreq(freqMHz); err != nil {
		return 0, err
	}
	nf := NearFieldBoundaryM(freqMHz)
	if math.IsNaN(distanceM) || math.IsInf(distanceM, 0) || distanceM < nf {
		return 0, fmt.Errorf("%w: distance %g m is inside λ/2π = %.3g m at %g MHz, where § 1.1307(b)(3)(i)(C) does not apply; give a distance of at least %.3g m", ErrInput, distanceM, nf, freqMHz, nf)
	}
	return exemptionCoefficient(freqMHz) * distanceM * distanceM, nil
}

// ExemptBeyondM returns the smallest distance in metres at which a source
// of erpW watts (the greater of its time-averaged ERP and available power)
// at freqMHz is exempt under 47 CFR § 1.1307(b)(3)(i)(C): the table formula
// solved for R, R = √(ERP/k(f)), but never less than λ/2π, where the rule
// begins to apply. A negative power or a frequency out of range gives an
// error wrapping ErrInput.
func ExemptBeyondM(freqMHz, erpW float64) (float64, error) {
	if err := checkExposureFreq(freqMHz); err != nil {
		return 0, err
	}
	if math.IsNaN(erpW) || math.IsInf(erpW, 0) || erpW < 0 {
		return 0, fmt.Errorf("%w: ERP %g W must be 0 W or more and finite", ErrInput, erpW)
	}
	return math.Max(math.Sqrt(erpW/exemptionCoefficient(freqMHz)), NearFieldBoundaryM(freqMHz)), nil
}

// rfCautions are the RF-exposure cautions; see Cautions.
var rfCautions = []string{
	"These distances are far-field estimates (FCC OET Bulletin 65): conservative at the distances shown, but unreliable within about λ/2π of the antenna, where near fields dominate.",
	"This is a calculated estimate, not a measurement. Where people may come close to the antenna, have the site measured or evaluated by a qualified person.",
	"The operator's regulatory obligations and local rules decide what is required and permitted; this estimate does not replace them.",
	"Keep people, and yourself, out of the keep-out zone while transmitting; do not touch or stand beside the antenna while it is on the air.",
}

// mastCautions are the cautions for putting up masts; see MastCautions.
var mastCautions = []string{
	"Keep masts and antennas well clear of power lines: a falling mast or antenna must not be able to reach one. Contact with a power line can kill.",
	"Guy and ballast masts against wind as their maker specifies, and lower them when strong wind is forecast; check local rules and permits before putting one up.",
	"Do not raise, work on or climb masts or antennas in storms or when lightning is possible.",
}

// Cautions returns the cautions to show with every RF-exposure
// result (a new slice each call): the limits of a far-field estimate, that
// it is not a measurement, that the operator's obligations and local rules
// decide, keeping people out of the zone, and then MastCautions.
func Cautions() []string {
	out := append([]string(nil), rfCautions...)
	return append(out, mastCautions...)
}

// MastCautions returns the cautions to show with every mast or site advice
// (a new slice each call): power lines within a falling mast's reach,
// guying and ballast as the maker specifies, wind, storms and lightning,
// and local rules and permits [common practice].
func MastCautions() []string {
	return append([]string(nil), mastCautions...)
}

// Input describes one transmitting station for Evaluate.
// Zero values of the optional fields take the defaults stated.
type Input struct {
	// PowerW is the transmitter's peak envelope power output in W (> 0).
	PowerW float64
	// GainDBi is the antenna gain in dBi in the direction of interest
	// (usually its maximum).
	GainDBi float64
	// FeedlineLossDB is the whole loss in dB (≥ 0) between the transmitter
	// and the antenna: cable, mismatch and connectors.
	FeedlineLossDB float64
	// FreqMHz is the transmit frequency in MHz, 0.3–100000.
	FreqMHz float64
	// Mode is the emission mode; "" means ModeCarrier (100 %, the worst case).
	Mode TxMode
	// DutyFactor, when not 0, replaces the mode's duty factor; (0, 1].
	DutyFactor float64
	// TxFraction is the fraction of time on the air, (0, 1], taken as the
	// same in every averaging window. 0 means not given: OnTime/OffTime are
	// used if set, else continuous transmission (1).
	TxFraction float64
	// OnTime and OffTime describe a repeating transmit/listen cycle starting
	// with transmission (OnTime > 0, OffTime ≥ 0); the worst-case on-air
	// fraction of each averaging window is used (WorstCaseOnAirFraction).
	// Give either TxFraction or a cycle, not both.
	OnTime, OffTime time.Duration
	// Standard is the limit set; "" means StandardFCC.
	Standard Standard
	// ReflectionFactor is the ground-reflection factor F: 1, 2.56 or 4;
	// 0 means ReflectionGround (2.56).
	ReflectionFactor float64
	// AntennaHeightM is the height in metres (≥ 0) of the antenna's centre
	// above the ground where people stand.
	AntennaHeightM float64
	// HeadHeightM is the height in metres (> 0) of a person's head above the
	// ground; 0 means DefaultHeadHeightM (2 m).
	HeadHeightM float64
}

// Report is the result of Evaluate. Its JSON field names are those
// `mastlink exposure --format json` promises scripts, plus the exemption
// and detail fields; all values are SI.
type Report struct {
	// Standard is the limit set used.
	Standard Standard `json:"standard"`
	// LimitsSource names the published table of the limits
	// (StandardSource). LimitsFromMemory is true when any limit used in
	// this report (either tier) is from memory and not yet checked against
	// it; LimitsFromMemoryPublic and LimitsFromMemoryOccupational say it
	// per tier (TierSource), and LimitsNote says it in a sentence for the
	// output ("" when nothing is from memory).
	LimitsSource                 string `json:"limits_source"`
	LimitsFromMemory             bool   `json:"limits_from_memory"`
	LimitsFromMemoryPublic       bool   `json:"limits_from_memory_public"`
	LimitsFromMemoryOccupational bool   `json:"limits_from_memory_occupational"`
	LimitsNote                   string `json:"limits_note,omitempty"`
	// Mode is the emission mode used.
	Mode TxMode `json:"mode"`
	// FreqMHz is the transmit frequency in MHz.
	FreqMHz float64 `json:"freq_mhz"`
	// EIRPW is the peak EIRP in W: power × gain ÷ feedline loss.
	EIRPW float64 `json:"eirp_w"`
	// DutyFactor is the mode's duty factor, or the override, 0–1.
	DutyFactor float64 `json:"duty_factor"`
	// DutySource says where DutyFactor comes from (TxMode.DutySource, or
	// "given" for an override).
	DutySource string `json:"duty_factor_source"`
	// TxFractionPublic and TxFractionOccupational are the worst-case on-air
	// fractions (0–1) in each tier's averaging window.
	TxFractionPublic       float64 `json:"tx_fraction_public"`
	TxFractionOccupational float64 `json:"tx_fraction_occupational"`
	// AveragingPublicS and AveragingOccupationalS are the tiers' averaging
	// times in seconds.
	AveragingPublicS       float64 `json:"averaging_public_s"`
	AveragingOccupationalS float64 `json:"averaging_occupational_s"`
	// AvgPowerPublicW and AvgPowerOccupationalW are the transmitter's
	// time-averaged output power in W over each tier's window: peak power ×
	// duty factor × worst-case on-air fraction (OET Bulletin 65 Supplement B).
	AvgPowerPublicW       float64 `json:"avg_power_public_w"`
	AvgPowerOccupationalW float64 `json:"avg_power_occupational_w"`
	// LimitPublicWM2 and LimitOccupationalWM2 are the power-density limits
	// in W/m² (LimitFor).
	LimitPublicWM2       float64 `json:"limit_public_w_m2"`
	LimitOccupationalWM2 float64 `json:"limit_occupational_w_m2"`
	// ReflectionFactor is the ground-reflection factor F used.
	ReflectionFactor float64 `json:"reflection_factor"`
	// DistancePublicM and DistanceOccupationalM are the compliance distances
	// in metres from the antenna (ComplianceDistanceM).
	DistancePublicM       float64 `json:"distance_public_m"`
	DistanceOccupationalM float64 `json:"distance_occupational_m"`
	// AntennaHeightM and HeadHeightM are the heights in metres used for the
	// keep-out radii.
	AntennaHeightM float64 `json:"antenna_height_m"`
	HeadHeightM    float64 `json:"head_height_m"`
	// KeepoutPublicM and KeepoutOccupationalM are horizontal radii in metres
	// around the mast foot beyond which no part of a standing person is
	// inside the compliance distance (KeepOutRadiusM): the whole distance
	// when the antenna is at or below head height, 0 when it is high enough.
	KeepoutPublicM       float64 `json:"keepout_public_m"`
	KeepoutOccupationalM float64 `json:"keepout_occupational_m"`
	// NearFieldM is λ/2π in metres; distances below it are unreliable.
	NearFieldM float64 `json:"near_field_m"`
	// ERPW is the ERP in W averaged over the US general-population window
	// (30 min), EIRP/1.64; only with StandardFCC (0, left out, otherwise).
	ERPW float64 `json:"erp_w,omitempty"`
	// ExemptBeyondM is the distance in metres beyond which the station is
	// exempt from routine evaluation under US 47 CFR § 1.1307(b)(3)(i)(C),
	// testing the greater of ERPW and the transmitter's time-averaged power.
	// A US rule: only with StandardFCC (0, left out of JSON, otherwise).
	ExemptBeyondM float64 `json:"exempt_beyond_m,omitempty"`
	// Cautions are Cautions, always present.
	Cautions []string `json:"cautions"`
}

// checkFinite returns an error wrapping ErrInput when v is NaN or
// infinite.
func checkFinite(field string, v float64) error {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return fmt.Errorf("%w: %s is %g; give a finite number", ErrInput, field, v)
	}
	return nil
}

// exposureOnAir returns a function giving the worst-case on-air fraction in
// an averaging window of the given length, from the input's TxFraction or
// transmit/listen cycle.
func exposureOnAir(in Input) (func(window time.Duration) (float64, error), error) {
	cycle := in.OnTime != 0 || in.OffTime != 0
	switch {
	case math.IsNaN(in.TxFraction) || in.TxFraction < 0 || in.TxFraction > 1:
		return nil, fmt.Errorf("%w: transmit fraction %g is outside (0, 1]; give e.g. 0.5 for 50 %% of the time", ErrInput, in.TxFraction)
	case in.TxFraction > 0 && cycle:
		return nil, fmt.Errorf("%w: give either a transmit fraction or a transmit/listen cycle, not both", ErrInput)
	case in.TxFraction > 0:
		return func(time.Duration) (float64, error) { return in.TxFraction, nil }, nil
	case !cycle:
		return func(time.Duration) (float64, error) { return 1, nil }, nil
	}
	if in.OnTime < 0 || in.OffTime < 0 {
		return nil, fmt.Errorf("%w: transmit/listen times %v on, %v off must not be negative", ErrInput, in.OnTime, in.OffTime)
	}
	if _, err := WorstCaseOnAirFraction(in.OnTime, in.OffTime, time.Minute); err != nil {
		return nil, err
	}
	return func(window time.Duration) (float64, error) {
		return WorstCaseOnAirFraction(in.OnTime, in.OffTime, window)
	}, nil
}

// Evaluate estimates the RF exposure around one transmitting
// station:
//
//   - peak EIRP = PowerW · 10^((GainDBi − FeedlineLossDB)/10);
//   - for each tier, the averaging window of the standard (LimitFor),
//     the worst-case on-air fraction in it, and the time-averaged power =
//     peak power × duty factor × on-air fraction (OET Bulletin 65
//     Supplement B, ed. 97-01);
//   - the compliance distance R = √(F·EIRP_avg/(4π·S_limit)) (OET Bulletin
//     65 eq. 6) and the keep-out radius around the mast foot;
//   - λ/2π and, with the US limits only, the time-averaged ERP and the
//     distance beyond which the station is exempt from routine evaluation
//     under 47 CFR § 1.1307(b)(3)(i)(C);
//   - the cautions of Cautions.
//
// Every invalid input gives one error wrapping ErrInput that names
// the input and what would fix it.
func Evaluate(in Input) (Report, error) {
	var rep Report
	for _, f := range []struct {
		name string
		v    float64
	}{
		{"power", in.PowerW}, {"antenna gain", in.GainDBi}, {"feedline loss", in.FeedlineLossDB},
		{"frequency", in.FreqMHz}, {"duty factor", in.DutyFactor}, {"transmit fraction", in.TxFraction},
		{"reflection factor", in.ReflectionFactor}, {"antenna height", in.AntennaHeightM}, {"head height", in.HeadHeightM},
	} {
		if err := checkFinite(f.name, f.v); err != nil {
			return rep, err
		}
	}
	if in.PowerW <= 0 {
		return rep, fmt.Errorf("%w: power %g W must be greater than 0 W; give the transmitter's peak output power", ErrInput, in.PowerW)
	}
	if in.FeedlineLossDB < 0 {
		return rep, fmt.Errorf("%w: feedline loss %g dB is negative; give the loss as 0 dB or more", ErrInput, in.FeedlineLossDB)
	}
	if err := checkExposureFreq(in.FreqMHz); err != nil {
		return rep, err
	}
	mode, err := ParseTxMode(string(in.Mode))
	if err != nil {
		return rep, err
	}
	duty, err := mode.DutyFactor()
	if err != nil {
		return rep, err
	}
	dutySource := mode.DutySource()
	if in.DutyFactor != 0 {
		dutySource = "given"
		if in.DutyFactor < 0 || in.DutyFactor > 1 {
			return rep, fmt.Errorf("%w: duty factor %g is outside (0, 1]; give e.g. 0.4 for 40 %%", ErrInput, in.DutyFactor)
		}
		duty = in.DutyFactor
	}
	onAir, err := exposureOnAir(in)
	if err != nil {
		return rep, err
	}
	std, err := ParseStandard(string(in.Standard))
	if err != nil {
		return rep, err
	}
	refl := in.ReflectionFactor
	switch refl {
	case 0:
		refl = ReflectionGround
	case ReflectionFreeSpace, ReflectionGround, ReflectionFull:
	default:
		return rep, fmt.Errorf("%w: reflection factor %g is not one of 1 (free space), 2.56 (ground, default) or 4 (full reflection)", ErrInput, in.ReflectionFactor)
	}
	if in.AntennaHeightM < 0 {
		return rep, fmt.Errorf("%w: antenna height %g m is negative; give the height above the ground in metres", ErrInput, in.AntennaHeightM)
	}
	head := in.HeadHeightM
	switch {
	case head < 0:
		return rep, fmt.Errorf("%w: head height %g m is negative; give it in metres above the ground (default 2 m)", ErrInput, head)
	case head == 0:
		head = DefaultHeadHeightM
	}

	eirp := in.PowerW * math.Pow(10, (in.GainDBi-in.FeedlineLossDB)/10)
	if math.IsInf(eirp, 0) {
		return rep, fmt.Errorf("%w: EIRP of %g W at %g dBi overflows; check the power and the gain", ErrInput, in.PowerW, in.GainDBi)
	}
	// tier evaluates one tier: averaging window, on-air fraction, average
	// transmitter power, limit, compliance distance and keep-out radius.
	type tierResult struct {
		limit                    Limit
		fraction, avgW, distM, k float64
	}
	tier := func(t Tier) (tierResult, error) {
		lim, err := LimitFor(std, t, in.FreqMHz)
		if err != nil {
			return tierResult{}, err
		}
		frac, err := onAir(lim.Averaging)
		if err != nil {
			return tierResult{}, err
		}
		avg := in.PowerW * duty * frac
		dist := ComplianceDistanceM(eirp*duty*frac, lim.PowerDensityWM2, refl)
		return tierResult{lim, frac, avg, dist, KeepOutRadiusM(dist, in.AntennaHeightM, head)}, nil
	}
	pub, err := tier(TierPublic)
	if err != nil {
		return rep, err
	}
	occ, err := tier(TierOccupational)
	if err != nil {
		return rep, err
	}

	// The US exemption (a US rule, so only with the US limits) averages
	// over the general-population window of § 1.1310 (30 min).
	var erp, exemptM float64
	if std == StandardFCC {
		usFrac, err := onAir(30 * time.Minute)
		if err != nil {
			return rep, err
		}
		erp = ERPFromEIRPW(eirp * duty * usFrac)
		exemptPower := math.Max(erp, in.PowerW*duty*usFrac)
		if exemptM, err = ExemptBeyondM(in.FreqMHz, exemptPower); err != nil {
			return rep, err
		}
	}
	source, _ := StandardSource(std)
	_, pubMem := TierSource(std, TierPublic)
	_, occMem := TierSource(std, TierOccupational)

	rep = Report{
		Standard:                     std,
		LimitsSource:                 source,
		LimitsFromMemory:             pubMem || occMem,
		LimitsFromMemoryPublic:       pubMem,
		LimitsFromMemoryOccupational: occMem,
		LimitsNote:                   LimitsNote(std),
		Mode:                         mode,
		FreqMHz:                      in.FreqMHz,
		EIRPW:                        eirp,
		DutyFactor:                   duty,
		DutySource:                   dutySource,
		TxFractionPublic:             pub.fraction,
		TxFractionOccupational:       occ.fraction,
		AveragingPublicS:             pub.limit.Averaging.Seconds(),
		AveragingOccupationalS:       occ.limit.Averaging.Seconds(),
		AvgPowerPublicW:              pub.avgW,
		AvgPowerOccupationalW:        occ.avgW,
		LimitPublicWM2:               pub.limit.PowerDensityWM2,
		LimitOccupationalWM2:         occ.limit.PowerDensityWM2,
		ReflectionFactor:             refl,
		DistancePublicM:              clean(pub.distM),
		DistanceOccupationalM:        clean(occ.distM),
		AntennaHeightM:               in.AntennaHeightM,
		HeadHeightM:                  head,
		KeepoutPublicM:               clean(pub.k),
		KeepoutOccupationalM:         clean(occ.k),
		NearFieldM:                   NearFieldBoundaryM(in.FreqMHz),
		ERPW:                         clean(erp),
		ExemptBeyondM:                clean(exemptM),
		Cautions:                     Cautions(),
	}
	return rep, nil
}

// KeepOutCircleVertices is the number of distinct vertices of the ring
// returned by KeepOutCircle (one every 5° of bearing).
const KeepOutCircleVertices = 72

// keepOutCircleMaxRadiusM bounds KeepOutCircle's radius, in metres: far
// beyond any keep-out zone, so a larger radius is a mistake.
const keepOutCircleMaxRadiusM = 10000.0

// KeepOutCircle returns a polygon approximating the circle of radius
// radiusM metres (0 < r ≤ 10 km) on the WGS84 ellipsoid around center
// (lon, lat in degrees, |lat| ≤ 89°): one ring of KeepOutCircleVertices
// vertices at bearings 0°, 355°, 350°, … (counter-clockwise, as RFC 7946
// §3.1.6 asks of an exterior ring), closed by repeating the first vertex.
// Each vertex is the end of the geodesic of length radiusM leaving the
// centre at its bearing (the direct problem by Karney's algorithm,
// terrain.Direct), so it lies exactly radiusM from the centre.
// A radius of 0 gives a nil polygon (nothing to keep out); a negative or
// too-large radius or an invalid centre gives an error wrapping
// ErrInput.
func KeepOutCircle(center orb.Point, radiusM float64) (orb.Polygon, error) {
	lon, lat := center[0], center[1]
	switch {
	case math.IsNaN(lon) || lon < -180 || lon > 180 || math.IsNaN(lat) || math.Abs(lat) > 89:
		return nil, fmt.Errorf("%w: keep-out centre (lon %g, lat %g) must have longitude in [-180, 180] and latitude within 89° of the equator", ErrInput, lon, lat)
	case math.IsNaN(radiusM) || radiusM < 0 || radiusM > keepOutCircleMaxRadiusM:
		return nil, fmt.Errorf("%w: keep-out radius %g m is outside 0–10000 m", ErrInput, radiusM)
	case radiusM == 0:
		return nil, nil
	}
	ring := make(orb.Ring, 0, KeepOutCircleVertices+1)
	for i := range KeepOutCircleVertices {
		// Counter-clockwise (RFC 7946 §3.1.6): bearings decrease from north.
		bearing := -float64(i) * 360 / KeepOutCircleVertices
		la, lo, _ := terrain.Direct(lat, lon, bearing, radiusM) // Karney's geodesic on WGS84
		ring = append(ring, orb.Point{lo, la})
	}
	ring = append(ring, ring[0])
	return orb.Polygon{ring}, nil
}
