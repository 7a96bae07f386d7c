package units

// Parsing of quantities as users type them; the syntax is described in
// the package documentation.

import (
	"errors"
	"fmt"
	"math"
	"strconv"
	"strings"
	"time"

	"github.com/paulmach/orb"
)

// Sentinel errors wrapped by every *QuantityError, for errors.Is.
var (
	// ErrSyntax: the text is not a number followed by a unit.
	ErrSyntax = errors.New("invalid quantity syntax")
	// ErrUnit: the number is followed by a unit the kind does not know.
	ErrUnit = errors.New("unknown unit")
	// ErrRange: the value is well formed but meaningless for its kind
	// (a negative length, zero power, a latitude beyond 90°).
	ErrRange = errors.New("quantity out of range")
)

// Kind names what sort of quantity a parser expected; it appears in
// QuantityError and lets callers word their own messages.
type Kind string

// The kinds of quantity this file parses.
const (
	KindLength      Kind = "length"
	KindLengthRange Kind = "length range"
	KindPower       Kind = "power"
	KindFreq        Kind = "frequency"
	KindGain        Kind = "gain"
	KindSensitivity Kind = "sensitivity"
	KindRatio       Kind = "ratio"
	KindLoss        Kind = "loss"
	KindSWR         Kind = "swr"
	KindDuration    Kind = "duration"
	KindPoint       Kind = "point"
)

// QuantityError records a failed parse, in the manner of strconv.NumError:
// the input, the kind expected, a sentinel (ErrSyntax, ErrUnit or ErrRange)
// and a message that says what would fix it. Error() gives
//
//	"12 meters": unknown unit "meters" (use m, km, ft or mi)
//
// without naming a flag or field; the caller prefixes that ("--height: ").
type QuantityError struct {
	Kind   Kind   // what was expected
	Input  string // the text as given
	Err    error  // ErrSyntax, ErrUnit or ErrRange
	Detail string // lowercase explanation following the quoted input
}

// Error returns the quoted input and the explanation.
func (e *QuantityError) Error() string { return strconv.Quote(e.Input) + ": " + e.Detail }

// Unwrap returns the sentinel, so errors.Is(err, ErrUnit) works.
func (e *QuantityError) Unwrap() error { return e.Err }

func qerr(k Kind, input string, sentinel error, format string, args ...any) *QuantityError {
	return &QuantityError{Kind: k, Input: input, Err: sentinel, Detail: fmt.Sprintf(format, args...)}
}

// Exact conversion factors (international yard and pound agreement, 1959).
const (
	MetresPerFoot = 0.3048   // exact
	MetresPerInch = 0.0254   // exact
	MetresPerMile = 1609.344 // exact: 5280 ft

	KilogramsPerPound = 0.45359237 // exact
)

// Upper limits of the range checks.
const (
	// MaxPowerW is the largest transmitter power accepted, 100 kW. It is far
	// above any portable station and mainly catches "MW" typed for "mW".
	MaxPowerW = 100e3
	// MaxDuration is the longest duration accepted (a transmit cycle).
	MaxDuration = 24 * time.Hour
)

// splitNumber splits s into a leading decimal number and the unit after it
// (spaces trimmed). ok is false when s does not start with a number.
func splitNumber(s string) (v float64, unit string, ok bool, rangeErr bool) {
	i := 0
	if i < len(s) && (s[i] == '+' || s[i] == '-') {
		i++
	}
	digits := 0
	for i < len(s) && s[i] >= '0' && s[i] <= '9' {
		i++
		digits++
	}
	if i < len(s) && s[i] == '.' {
		i++
		for i < len(s) && s[i] >= '0' && s[i] <= '9' {
			i++
			digits++
		}
	}
	if digits == 0 {
		return 0, "", false, false
	}
	if i < len(s) && (s[i] == 'e' || s[i] == 'E') {
		j := i + 1
		if j < len(s) && (s[j] == '+' || s[j] == '-') {
			j++
		}
		k := j
		for k < len(s) && s[k] >= '0' && s[k] <= '9' {
			k++
		}
		if k > j {
			i = k
		}
	}
	v, err := strconv.ParseFloat(s[:i], 64)
	if err != nil {
		// Only overflow can get here: the scanner admits valid syntax only.
		return 0, "", true, true
	}
	return v, strings.TrimSpace(s[i:]), true, false
}

// number parses the number and returns it with the unit text, or a syntax
// or range error worded with example for the kind.
func number(k Kind, input, example string) (float64, string, error) {
	s := strings.TrimSpace(input)
	if s == "" {
		return 0, "", qerr(k, input, ErrSyntax, "no %s given (write e.g. %s)", k, example)
	}
	v, unit, ok, overflow := splitNumber(s)
	if !ok {
		return 0, "", qerr(k, input, ErrSyntax, "not a %s (write a number and a unit, e.g. %s)", k, example)
	}
	if overflow {
		return 0, "", qerr(k, input, ErrRange, "number too large for a %s", k)
	}
	if len(unit) > 1 && unit[0] == ',' && unit[1] >= '0' && unit[1] <= '9' {
		return 0, "", qerr(k, input, ErrSyntax, "write a decimal point, not a comma")
	}
	return v, unit, nil
}

// ParseLengthM parses a length and returns metres. Units: m, km, ft, mi,
// also cm and in; a bare number is metres. Conversions are exact
// (1 ft = 0.3048 m, 1 mi = 1609.344 m). Negative lengths are rejected
// (ErrRange): every length mastlink takes (heights above ground, cable
// lengths, spacings, radii) is zero or more.
func ParseLengthM(s string) (float64, error) {
	v, unit, err := number(KindLength, s, "12m or 40ft")
	if err != nil {
		return 0, err
	}
	var f float64
	switch strings.ToLower(unit) {
	case "", "m":
		f = 1
	case "km":
		f = 1000
	case "cm":
		f = 0.01
	case "ft":
		f = MetresPerFoot
	case "in":
		f = MetresPerInch
	case "mi":
		f = MetresPerMile
	default:
		return 0, qerr(KindLength, s, ErrUnit, "unknown unit %q (use m, km, ft or mi)", unit)
	}
	m := v * f
	if math.IsInf(m, 0) {
		return 0, qerr(KindLength, s, ErrRange, "number too large for a length")
	}
	if m < 0 {
		return 0, qerr(KindLength, s, ErrRange, "a length must not be negative")
	}
	return m, nil
}

// ParsePowerW parses a transmitter power and returns watts. Units: W, mW,
// kW, dBm (dB above 1 mW), dBW (dB above 1 W); a bare number is watts. A
// capital M is mega: "5MW" parses as 5 MW and is then rejected as above
// MaxPowerW with a hint to write mW. The power must be more than 0 W and at
// most MaxPowerW (ErrRange).
func ParsePowerW(s string) (float64, error) {
	v, unit, err := number(KindPower, s, "5W or 37dBm")
	if err != nil {
		return 0, err
	}
	var w float64
	mega := false
	switch strings.ToLower(unit) {
	case "", "w":
		w = v
	case "mw":
		if unit[0] == 'M' {
			w, mega = v*1e6, true
		} else {
			w = v * 1e-3
		}
	case "kw":
		w = v * 1e3
	case "dbm":
		w = WFromDBm(v)
	case "dbw":
		w = math.Pow(10, v/10)
	default:
		return 0, qerr(KindPower, s, ErrUnit, "unknown unit %q (use W, mW, kW, dBm or dBW)", unit)
	}
	switch {
	case mega && w > MaxPowerW:
		return 0, qerr(KindPower, s, ErrRange, "megawatts are above %g kW (for milliwatts write mW)", MaxPowerW/1e3)
	case w > MaxPowerW || math.IsInf(w, 0):
		return 0, qerr(KindPower, s, ErrRange, "power above %g kW", MaxPowerW/1e3)
	case !(w > 0):
		return 0, qerr(KindPower, s, ErrRange, "power must be more than 0 W")
	}
	return w, nil
}

// ParseFreqMHz parses a frequency and returns MHz. Units: MHz, GHz, kHz, Hz
// (any case); a bare number is MHz. The frequency must be more than 0 and at
// most 300 GHz (ErrRange); narrower limits of a model are the model's to check.
func ParseFreqMHz(s string) (float64, error) {
	v, unit, err := number(KindFreq, s, "146.52MHz")
	if err != nil {
		return 0, err
	}
	var f float64
	switch strings.ToLower(unit) {
	case "", "mhz":
		f = v
	case "ghz":
		f = v * 1e3
	case "khz":
		f = v * 1e-3
	case "hz":
		f = v * 1e-6
	default:
		return 0, qerr(KindFreq, s, ErrUnit, "unknown unit %q (use MHz, GHz or kHz)", unit)
	}
	if !(f > 0) || f > 300e3 {
		return 0, qerr(KindFreq, s, ErrRange, "frequency must be more than 0 and at most 300 GHz")
	}
	return f, nil
}

// ParseGainDBi parses an antenna gain and returns dBi. Units: dBi, dBd
// (converted with DBiFromDBd, dBi = dBd + 2.15); a bare number is dBi. A
// plain "dB" is rejected as ambiguous. Accepted range −50 to +60 dBi.
func ParseGainDBi(s string) (float64, error) {
	v, unit, err := number(KindGain, s, "6dBi or 3.85dBd")
	if err != nil {
		return 0, err
	}
	var g float64
	switch strings.ToLower(unit) {
	case "", "dbi":
		g = v
	case "dbd":
		g = DBiFromDBd(v)
	case "db":
		return 0, qerr(KindGain, s, ErrUnit, "unit \"dB\" is ambiguous for a gain (use dBi or dBd)")
	default:
		return 0, qerr(KindGain, s, ErrUnit, "unknown unit %q (use dBi or dBd)", unit)
	}
	if g < -50 || g > 60 {
		return 0, qerr(KindGain, s, ErrRange, "gain must be between -50 and 60 dBi")
	}
	return g, nil
}

// ParseSensitivityDBm parses a receiver sensitivity and returns dBm. Units:
// dBm; µV, uV or μV, taken as the potential difference across a 50 Ω input
// and converted with DBmFromMicrovolts (P = V²/R); a bare number is dBm.
// Accepted range −200 to 0 dBm; microvolts must be more than 0.
func ParseSensitivityDBm(s string) (float64, error) {
	v, unit, err := number(KindSensitivity, s, "-120dBm or 0.25uV")
	if err != nil {
		return 0, err
	}
	var d float64
	switch strings.ToLower(unit) {
	case "", "dbm":
		d = v
	case "uv", "µv", "μv": // micro sign U+00B5 and Greek mu U+03BC
		if !(v > 0) {
			return 0, qerr(KindSensitivity, s, ErrRange, "microvolts must be more than 0")
		}
		d = DBmFromMicrovolts(v)
	default:
		return 0, qerr(KindSensitivity, s, ErrUnit, "unknown unit %q (use dBm or uV)", unit)
	}
	if d < -200 || d > 0 {
		return 0, qerr(KindSensitivity, s, ErrRange, "sensitivity must be between -200 and 0 dBm")
	}
	return d, nil
}

// ParseRatio parses a fraction or percentage and returns a fraction from 0
// to 1: "90%" and "0.9" both give 0.9. A bare number above 1 is rejected
// (ErrRange) with a hint to write a percentage, as "90" is ambiguous.
func ParseRatio(s string) (float64, error) {
	v, unit, err := number(KindRatio, s, "90% or 0.9")
	if err != nil {
		return 0, err
	}
	switch unit {
	case "":
		if v > 1 {
			return 0, qerr(KindRatio, s, ErrRange, "a ratio is between 0 and 1 (for a percentage write %s%%)", strconv.FormatFloat(v, 'g', -1, 64))
		}
	case "%":
		v /= 100
	default:
		return 0, qerr(KindRatio, s, ErrUnit, "unknown unit %q (use %% or a fraction such as 0.9)", unit)
	}
	if v < 0 || v > 1 {
		return 0, qerr(KindRatio, s, ErrRange, "a ratio is between 0 and 1 (0%% to 100%%)")
	}
	return v, nil
}

// ParseLossDB parses a loss (or a margin) in dB; a bare number is dB. It
// must be zero or more (ErrRange).
func ParseLossDB(s string) (float64, error) {
	v, unit, err := number(KindLoss, s, "1.2dB")
	if err != nil {
		return 0, err
	}
	if u := strings.ToLower(unit); u != "" && u != "db" {
		return 0, qerr(KindLoss, s, ErrUnit, "unknown unit %q (use dB)", unit)
	}
	if v < 0 {
		return 0, qerr(KindLoss, s, ErrRange, "a loss must not be negative")
	}
	return v, nil
}

// ParseSWR parses a standing-wave ratio, "1.5" or "1.5:1". It must be at
// least 1 (ErrRange); the upper limit is 1000 (an open or short line is
// infinite, but any such value says the same thing).
func ParseSWR(s string) (float64, error) {
	v, unit, err := number(KindSWR, s, "1.5 or 1.5:1")
	if err != nil {
		return 0, err
	}
	if u := strings.ReplaceAll(unit, " ", ""); u != "" && u != ":1" {
		return 0, qerr(KindSWR, s, ErrSyntax, "not an SWR (write e.g. 1.5 or 1.5:1)")
	}
	if v < 1 || v > 1000 {
		return 0, qerr(KindSWR, s, ErrRange, "swr must be between 1 and 1000")
	}
	return v, nil
}

// ParseDuration parses a duration such as a transmit or listen period: units
// s (sec), min and h (hr). "m" is refused (ErrUnit) with a hint: it means
// metres everywhere else, so "2m" is never read as two minutes. A bare
// number is rejected (ErrUnit) because seconds and minutes are both common
// for transmit cycles and guessing wrong changes an exposure figure fivefold
// or more. The duration must be from 0 to MaxDuration (ErrRange).
func ParseDuration(s string) (time.Duration, error) {
	v, unit, err := number(KindDuration, s, "2min or 30s")
	if err != nil {
		return 0, err
	}
	var f time.Duration
	switch strings.ToLower(unit) {
	case "s", "sec":
		f = time.Second
	case "min":
		f = time.Minute
	case "m":
		return 0, qerr(KindDuration, s, ErrUnit, "m is metres; write %smin for minutes (durations take s, min or h)", strconv.FormatFloat(v, 'f', -1, 64))
	case "h", "hr":
		f = time.Hour
	case "":
		return 0, qerr(KindDuration, s, ErrUnit, "give a unit (s, min or h)")
	default:
		return 0, qerr(KindDuration, s, ErrUnit, "unknown unit %q (use s, min or h)", unit)
	}
	if v < 0 || v*float64(f) > float64(MaxDuration) {
		return 0, qerr(KindDuration, s, ErrRange, "duration must be between 0 and 24h")
	}
	return time.Duration(math.Round(v * float64(f))), nil
}

// LengthRange is an inclusive, evenly stepped range of lengths in metres,
// as used for mast-height sweeps.
type LengthRange struct {
	FromM, ToM float64 // metres, FromM <= ToM
	StepM      float64 // metres, > 0; 0 only when FromM == ToM
}

// MaxRangeValues bounds the number of values a LengthRange may hold.
const MaxRangeValues = 10000

// Len returns the number of values in the range.
func (r LengthRange) Len() int {
	if r.StepM <= 0 || r.ToM <= r.FromM {
		return 1
	}
	return int(math.Floor((r.ToM-r.FromM)/r.StepM+1e-9)) + 1
}

// ValuesM returns the lengths of the range in metres, from FromM up to ToM
// (included when the step divides the span, to within 1e-9 of a step).
// Each value is FromM + i·StepM, so rounding does not accumulate.
func (r LengthRange) ValuesM() []float64 {
	n := r.Len()
	out := make([]float64, n)
	for i := range out {
		out[i] = r.FromM + float64(i)*r.StepM
	}
	if n > 1 && math.Abs(out[n-1]-r.ToM) <= 1e-9*r.StepM {
		out[n-1] = r.ToM
	}
	return out
}

// ParseLengthRange parses "A..B step C" (lengths with units, e.g.
// "2m..12m step 1m" or "10ft..40ft step 5ft"), or a single length A (a range
// of one). B must not be below A, C must be more than 0, and the range may
// hold at most MaxRangeValues values (ErrRange).
func ParseLengthRange(s string) (LengthRange, error) {
	const example = "2m..12m step 1m"
	t := strings.TrimSpace(s)
	if t == "" {
		return LengthRange{}, qerr(KindLengthRange, s, ErrSyntax, "no length range given (write e.g. %s)", example)
	}
	part := func(p string) (float64, error) {
		m, err := ParseLengthM(p)
		if err != nil {
			var qe *QuantityError
			errors.As(err, &qe)
			return 0, qerr(KindLengthRange, s, qe.Err, "%s in %q", qe.Detail, strings.TrimSpace(p))
		}
		return m, nil
	}
	from, rest, found := strings.Cut(t, "..")
	if !found {
		m, err := part(t)
		if err != nil {
			return LengthRange{}, err
		}
		return LengthRange{FromM: m, ToM: m}, nil
	}
	i := indexFold(rest, "step")
	if i < 0 {
		return LengthRange{}, qerr(KindLengthRange, s, ErrSyntax, "no step (write e.g. %s)", example)
	}
	to, step := rest[:i], rest[i+len("step"):]
	if strings.TrimSpace(from) == "" || strings.TrimSpace(to) == "" || strings.TrimSpace(step) == "" {
		return LengthRange{}, qerr(KindLengthRange, s, ErrSyntax, "not a length range (write e.g. %s)", example)
	}
	var r LengthRange
	var err error
	if r.FromM, err = part(from); err != nil {
		return LengthRange{}, err
	}
	if r.ToM, err = part(to); err != nil {
		return LengthRange{}, err
	}
	if r.StepM, err = part(step); err != nil {
		return LengthRange{}, err
	}
	switch {
	case r.ToM < r.FromM:
		return LengthRange{}, qerr(KindLengthRange, s, ErrRange, "the range runs backwards (write the smaller length first)")
	case !(r.StepM > 0):
		return LengthRange{}, qerr(KindLengthRange, s, ErrRange, "the step must be more than 0")
	case (r.ToM-r.FromM)/r.StepM >= MaxRangeValues:
		return LengthRange{}, qerr(KindLengthRange, s, ErrRange, "more than %d values (use a larger step)", MaxRangeValues)
	}
	return r, nil
}

// indexFold returns the byte index of the first ASCII-case-insensitive
// match of word (ASCII) in s, or −1. Unlike strings.ToLower it keeps byte
// offsets intact on invalid UTF-8.
func indexFold(s, word string) int {
	for i := 0; i+len(word) <= len(s); i++ {
		if strings.EqualFold(s[i:i+len(word)], word) {
			return i
		}
	}
	return -1
}

// ParsePoint parses "LAT,LON" in decimal degrees on WGS84 (spaces allowed
// around the comma) and returns orb.Point{lon, lat}. Latitude must be within
// −90..90 and longitude within −180..180 (ErrRange). Anything that is not
// two numbers around one comma is ErrSyntax, so a caller can then try the
// text as a waypoint name.
func ParsePoint(s string) (orb.Point, error) {
	const example = "46.1234,7.5678"
	a, b, found := strings.Cut(s, ",")
	if !found || strings.Contains(b, ",") {
		return orb.Point{}, qerr(KindPoint, s, ErrSyntax, "not a point (write LAT,LON in decimal degrees, e.g. %s)", example)
	}
	coord := func(p string) (float64, bool) {
		v, unit, ok, overflow := splitNumber(strings.TrimSpace(p))
		return v, ok && !overflow && unit == ""
	}
	lat, ok1 := coord(a)
	lon, ok2 := coord(b)
	if !ok1 || !ok2 {
		return orb.Point{}, qerr(KindPoint, s, ErrSyntax, "not a point (write LAT,LON in decimal degrees, e.g. %s)", example)
	}
	if lat < -90 || lat > 90 {
		hint := ""
		if lon >= -90 && lon <= 90 {
			hint = "; write LAT,LON, latitude first"
		}
		return orb.Point{}, qerr(KindPoint, s, ErrRange, "latitude %s is outside -90 to 90%s", strconv.FormatFloat(lat, 'g', -1, 64), hint)
	}
	if lon < -180 || lon > 180 {
		return orb.Point{}, qerr(KindPoint, s, ErrRange, "longitude %s is outside -180 to 180", strconv.FormatFloat(lon, 'g', -1, 64))
	}
	return orb.Point{lon, lat}, nil
}

// FormatLength renders a distance in metres for text output: metric
// "12.0 m" below 1 km and "1.50 km" above; imperial "39.4 ft" below 1000 ft
// and "1.25 mi" above.
func FormatLength(m float64, imperial bool) string {
	if imperial {
		ft := m / MetresPerFoot
		if math.Abs(ft) < 1000 {
			return fmt.Sprintf("%.1f ft", ft)
		}
		return fmt.Sprintf("%.2f mi", m/MetresPerMile)
	}
	if math.Abs(m) < 1000 {
		return fmt.Sprintf("%.1f m", m)
	}
	return fmt.Sprintf("%.2f km", m/1000)
}

// FormatHeight renders a height in metres for text output, always in m or
// ft ("12.0 m", "39.4 ft"), however large: elevations and mast heights read
// better without a switch to km or miles.
func FormatHeight(m float64, imperial bool) string {
	if imperial {
		return fmt.Sprintf("%.1f ft", m/MetresPerFoot)
	}
	return fmt.Sprintf("%.1f m", m)
}

// FormatPower renders a power in watts: "500 mW" below 1 W, "5.0 W" up to
// 1 kW, "1.50 kW" above.
func FormatPower(w float64) string {
	switch {
	case math.Abs(w) < 1:
		return fmt.Sprintf("%.0f mW", w*1e3)
	case math.Abs(w) < 1e3:
		return fmt.Sprintf("%.1f W", w)
	}
	return fmt.Sprintf("%.2f kW", w/1e3)
}

// FormatFreq renders a frequency in MHz: "146.520 MHz" below 1 GHz,
// "1.200 GHz" above.
func FormatFreq(mhz float64) string {
	if math.Abs(mhz) < 1000 {
		return fmt.Sprintf("%.3f MHz", mhz)
	}
	return fmt.Sprintf("%.3f GHz", mhz/1000)
}

// KindKFactor is the kind of an effective earth-radius factor.
const KindKFactor Kind = "k-factor"

// ParseKFactor parses an effective earth-radius factor k, the ratio of the
// effective to the true earth radius (ITU-R P.453-14 §2.1; ITU-R P.530-19
// §2.2 gives k = 4/3 as the median without local data): a number such as
// 1.333 or a fraction such as 4/3. It must lie between 0.5 and 10
// (ErrRange), which spans the published sub-refractive and
// super-refractive values of the troposphere without reaching ducting.
func ParseKFactor(s string) (float64, error) {
	const hint = "write e.g. 4/3 or 1.333"
	t := strings.TrimSpace(s)
	var k float64
	if a, b, ok := strings.Cut(t, "/"); ok {
		x, e1 := strconv.ParseFloat(strings.TrimSpace(a), 64)
		y, e2 := strconv.ParseFloat(strings.TrimSpace(b), 64)
		if e1 != nil || e2 != nil || y == 0 {
			return 0, qerr(KindKFactor, s, ErrSyntax, "not a k-factor (%s)", hint)
		}
		k = x / y
	} else {
		x, err := strconv.ParseFloat(t, 64)
		if err != nil {
			return 0, qerr(KindKFactor, s, ErrSyntax, "not a k-factor (%s)", hint)
		}
		k = x
	}
	if !(k >= 0.5 && k <= 10) {
		return 0, qerr(KindKFactor, s, ErrRange, "k-factor %g is outside 0.5 to 10 (4/3 is the usual median)", k)
	}
	return k, nil
}

// OptionError is an error in one option of a group that is parsed together
// from text (a link requirement, a station's RF-exposure habits), so that
// the command line and the plan file share one parser. Option is the key
// as the plan file spells it ("tx_time", "reliability"); a command turns
// it into its flag (--tx-time), the plan parser into the field and line.
type OptionError struct {
	Option string // the option's key, lower case, words joined by "_"
	Err    error  // what is wrong: often a *QuantityError
}

// Error returns "key: what is wrong".
func (e *OptionError) Error() string { return e.Option + ": " + e.Err.Error() }

// Unwrap returns the cause, so errors.Is(err, ErrRange) works.
func (e *OptionError) Unwrap() error { return e.Err }
