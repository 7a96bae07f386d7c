package units

import (
	"bufio"
	"errors"
	"math"
	"os"
	"strconv"
	"strings"
	"testing"
	"time"

	"github.com/paulmach/orb"
)

// parseCase is one row of a quantity-parsing table: the input, the expected
// value with its tolerance, or the exact error message and sentinel.
type parseCase struct {
	name string
	in   string
	want float64 // in the parser's unit
	tol  float64 // absolute
	err  error   // sentinel expected, nil for success
	msg  string  // exact Error() text when err != nil
}

func runParseTable(t *testing.T, kind Kind, parse func(string) (float64, error), cases []parseCase) {
	t.Helper()
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			got, err := parse(c.in)
			if c.err == nil {
				if err != nil {
					t.Fatalf("%q: unexpected error: %v", c.in, err)
				}
				if math.Abs(got-c.want) > c.tol {
					t.Fatalf("%q = %.12g, want %.12g ± %g", c.in, got, c.want, c.tol)
				}
				return
			}
			checkQuantityErr(t, err, kind, c.in, c.err, c.msg)
		})
	}
}

func checkQuantityErr(t *testing.T, err error, kind Kind, in string, sentinel error, msg string) {
	t.Helper()
	if err == nil {
		t.Fatalf("%q: no error, want %v", in, sentinel)
	}
	if !errors.Is(err, sentinel) {
		t.Errorf("%q: error %v does not wrap %v", in, err, sentinel)
	}
	var qe *QuantityError
	if !errors.As(err, &qe) {
		t.Fatalf("%q: error %T is not *QuantityError", in, err)
	}
	if qe.Kind != kind || qe.Input != in {
		t.Errorf("%q: kind %q input %q, want %q %q", in, qe.Kind, qe.Input, kind, in)
	}
	if msg != "" && err.Error() != msg {
		t.Errorf("%q: message\n got %s\nwant %s", in, err.Error(), msg)
	}
}

func TestParseLengthM(t *testing.T) {
	runParseTable(t, KindLength, ParseLengthM, []parseCase{
		{name: "metres", in: "12m", want: 12, tol: 0},
		{name: "bare number is metres", in: "12", want: 12, tol: 0},
		{name: "space before unit", in: " 12 m ", want: 12, tol: 0},
		{name: "feet", in: "40ft", want: 12.192, tol: 1e-12},            // 40 × 0.3048 m, international foot (1959), exact
		{name: "feet upper case", in: "40FT", want: 12.192, tol: 1e-12}, // same
		{name: "kilometres", in: "1.5km", want: 1500, tol: 1e-9},
		{name: "miles", in: "3mi", want: 4828.032, tol: 1e-9},  // 3 × 1609.344 m, international mile, exact
		{name: "inches", in: "18in", want: 0.4572, tol: 1e-12}, // 18 × 0.0254 m, exact
		{name: "centimetres", in: "250cm", want: 2.5, tol: 1e-12},
		{name: "exponent", in: "1e3m", want: 1000, tol: 0},
		{name: "leading point", in: ".5m", want: 0.5, tol: 0},
		{name: "zero", in: "0", want: 0, tol: 0},
		{name: "unknown unit", in: "12 meters", err: ErrUnit,
			msg: `"12 meters": unknown unit "meters" (use m, km, ft or mi)`},
		{name: "negative", in: "-3m", err: ErrRange, msg: `"-3m": a length must not be negative`},
		{name: "empty", in: "", err: ErrSyntax, msg: `"": no length given (write e.g. 12m or 40ft)`},
		{name: "no number", in: "abc", err: ErrSyntax,
			msg: `"abc": not a length (write a number and a unit, e.g. 12m or 40ft)`},
		{name: "decimal comma", in: "1,5m", err: ErrSyntax, msg: `"1,5m": write a decimal point, not a comma`},
		{name: "overflow", in: "1e999m", err: ErrRange, msg: `"1e999m": number too large for a length`},
		{name: "NaN", in: "NaN", err: ErrSyntax},
		{name: "infinity", in: "Inf", err: ErrSyntax},
		{name: "unit only", in: "m", err: ErrSyntax},
	})
}

func TestParsePowerW(t *testing.T) {
	runParseTable(t, KindPower, ParsePowerW, []parseCase{
		{name: "watts", in: "5W", want: 5, tol: 0},
		{name: "bare number is watts", in: "25", want: 25, tol: 0},
		{name: "milliwatts", in: "500mW", want: 0.5, tol: 1e-15},
		{name: "milliwatts lower case", in: "500mw", want: 0.5, tol: 1e-15},
		{name: "kilowatt", in: "1kW", want: 1000, tol: 0},
		{name: "kilowatt upper case", in: "1.5 KW", want: 1500, tol: 0},
		{name: "dBm", in: "37dBm", want: 5.011872336, tol: 1e-9},   // 10^(0.7) W [calc: dBm = 10 log10(P/1 mW)]
		{name: "dBm 30 is 1 W", in: "30 dBm", want: 1, tol: 1e-12}, // definition of dBm
		{name: "dBW", in: "10dBW", want: 10, tol: 1e-12},           // definition of dBW
		{name: "megawatt rejected", in: "5MW", err: ErrRange,
			msg: `"5MW": megawatts are above 100 kW (for milliwatts write mW)`},
		{name: "zero", in: "0W", err: ErrRange, msg: `"0W": power must be more than 0 W`},
		{name: "negative", in: "-5W", err: ErrRange},
		{name: "too large", in: "200kW", err: ErrRange, msg: `"200kW": power above 100 kW`},
		{name: "unknown unit", in: "5 watts", err: ErrUnit,
			msg: `"5 watts": unknown unit "watts" (use W, mW, kW, dBm or dBW)`},
		{name: "dBm overflow", in: "1e300dBm", err: ErrRange},
	})
}

func TestParseFreqMHz(t *testing.T) {
	runParseTable(t, KindFreq, ParseFreqMHz, []parseCase{
		{name: "MHz", in: "146.52MHz", want: 146.52, tol: 0},
		{name: "bare number is MHz", in: "446.1", want: 446.1, tol: 0},
		{name: "lower case", in: "146.52 mhz", want: 146.52, tol: 0},
		{name: "GHz", in: "1.2GHz", want: 1200, tol: 1e-9},
		{name: "kHz", in: "7100kHz", want: 7.1, tol: 1e-12},
		{name: "Hz", in: "50000000Hz", want: 50, tol: 1e-9},
		{name: "zero", in: "0", err: ErrRange, msg: `"0": frequency must be more than 0 and at most 300 GHz`},
		{name: "too high", in: "400GHz", err: ErrRange},
		{name: "unknown unit", in: "146 mc", err: ErrUnit, msg: `"146 mc": unknown unit "mc" (use MHz, GHz or kHz)`},
	})
}

func TestParseGainDBi(t *testing.T) {
	runParseTable(t, KindGain, ParseGainDBi, []parseCase{
		{name: "dBi", in: "6dBi", want: 6, tol: 0},
		{name: "bare number is dBi", in: "2.15", want: 2.15, tol: 0},
		{name: "dBd", in: "3.85dBd", want: 6.0, tol: 1e-12}, // dBi = dBd + 2.15, OET Bulletin 65
		{name: "negative gain", in: "-3 dBi", want: -3, tol: 0},
		{name: "plain dB ambiguous", in: "6dB", err: ErrUnit,
			msg: `"6dB": unit "dB" is ambiguous for a gain (use dBi or dBd)`},
		{name: "out of range", in: "99dBi", err: ErrRange, msg: `"99dBi": gain must be between -50 and 60 dBi`},
	})
}

func TestParseSensitivityDBm(t *testing.T) {
	runParseTable(t, KindSensitivity, ParseSensitivityDBm, []parseCase{
		{name: "dBm", in: "-120dBm", want: -120, tol: 0},
		{name: "bare number is dBm", in: "-122", want: -122, tol: 0},
		{name: "uV", in: "0.25uV", want: -119.0, tol: 0.05},         // computed, P = V²/R, 50 Ω
		{name: "micro sign", in: "0.25µV", want: -119.0, tol: 0.05}, // same, U+00B5
		{name: "greek mu", in: "0.25μV", want: -119.0, tol: 0.05},   // same, U+03BC
		{name: "1 uV", in: "1 uV", want: -107.0, tol: 0.05},         // computed, P = V²/R
		{name: "zero microvolts", in: "0uV", err: ErrRange, msg: `"0uV": microvolts must be more than 0`},
		{name: "positive dBm", in: "10dBm", err: ErrRange, msg: `"10dBm": sensitivity must be between -200 and 0 dBm`},
		{name: "unknown unit", in: "-120dBu", err: ErrUnit, msg: `"-120dBu": unknown unit "dBu" (use dBm or uV)`},
	})
}

func TestParseRatio(t *testing.T) {
	runParseTable(t, KindRatio, ParseRatio, []parseCase{
		{name: "percent", in: "90%", want: 0.9, tol: 1e-15},
		{name: "fraction", in: "0.9", want: 0.9, tol: 0},
		{name: "percent with space", in: "50 %", want: 0.5, tol: 0},
		{name: "one", in: "1", want: 1, tol: 0},
		{name: "bare percentage", in: "90", err: ErrRange,
			msg: `"90": a ratio is between 0 and 1 (for a percentage write 90%)`},
		{name: "over 100 percent", in: "150%", err: ErrRange, msg: `"150%": a ratio is between 0 and 1 (0% to 100%)`},
		{name: "negative", in: "-0.1", err: ErrRange},
		{name: "unknown unit", in: "9 pct", err: ErrUnit},
	})
}

func TestParseLossDB(t *testing.T) {
	runParseTable(t, KindLoss, ParseLossDB, []parseCase{
		{name: "dB", in: "1.2dB", want: 1.2, tol: 0},
		{name: "bare", in: "3", want: 3, tol: 0},
		{name: "negative", in: "-1dB", err: ErrRange, msg: `"-1dB": a loss must not be negative`},
		{name: "unknown unit", in: "1 dBm", err: ErrUnit, msg: `"1 dBm": unknown unit "dBm" (use dB)`},
	})
}

func TestParseKFactor(t *testing.T) {
	// 4/3 is the median k of ITU-R P.530-19 §2.2; the other values are
	// plain arithmetic.
	runParseTable(t, KindKFactor, ParseKFactor, []parseCase{
		{name: "fraction", in: "4/3", want: 4.0 / 3.0, tol: 1e-15},
		{name: "spaced fraction", in: " 4 / 3 ", want: 4.0 / 3.0, tol: 1e-15},
		{name: "decimal", in: "1.333", want: 1.333, tol: 0},
		{name: "validation a_e 8500 km", in: "8500/6371", want: 8500.0 / 6371, tol: 1e-15},
		{name: "lower end", in: "0.5", want: 0.5, tol: 0},
		{name: "too small", in: "0.4", err: ErrRange, msg: `"0.4": k-factor 0.4 is outside 0.5 to 10 (4/3 is the usual median)`},
		{name: "zero denominator", in: "4/0", err: ErrSyntax, msg: `"4/0": not a k-factor (write e.g. 4/3 or 1.333)`},
		{name: "word", in: "flat", err: ErrSyntax, msg: `"flat": not a k-factor (write e.g. 4/3 or 1.333)`},
		{name: "NaN", in: "NaN", err: ErrRange},
	})
}

func TestParseSWR(t *testing.T) {
	runParseTable(t, KindSWR, ParseSWR, []parseCase{
		{name: "plain", in: "1.5", want: 1.5, tol: 0},
		{name: "ratio form", in: "1.5:1", want: 1.5, tol: 0},
		{name: "ratio form spaced", in: "2 : 1", want: 2, tol: 0},
		{name: "below one", in: "0.8", err: ErrRange, msg: `"0.8": swr must be between 1 and 1000`},
		{name: "garbage", in: "1.5:2", err: ErrSyntax, msg: `"1.5:2": not an SWR (write e.g. 1.5 or 1.5:1)`},
	})
}

func TestParseDuration(t *testing.T) {
	cases := []struct {
		name string
		in   string
		want time.Duration
		err  error
		msg  string
	}{
		// "m" is metres in every other quantity: as a duration it is
		// refused with the unit to use, never taken as minutes.
		{name: "m is metres", in: "2m", err: ErrUnit, msg: `"2m": m is metres; write 2min for minutes (durations take s, min or h)`},
		{name: "m with a fraction", in: "1.5 m", err: ErrUnit, msg: `"1.5 m": m is metres; write 1.5min for minutes (durations take s, min or h)`},
		{name: "min", in: "2min", want: 2 * time.Minute},
		{name: "seconds", in: "30s", want: 30 * time.Second},
		{name: "fraction", in: "1.5 min", want: 90 * time.Second},
		{name: "hour", in: "1h", want: time.Hour},
		{name: "bare number", in: "5", err: ErrUnit, msg: `"5": give a unit (s, min or h)`},
		{name: "unknown unit", in: "5 days", err: ErrUnit, msg: `"5 days": unknown unit "days" (use s, min or h)`},
		{name: "too long", in: "25h", err: ErrRange, msg: `"25h": duration must be between 0 and 24h`},
		{name: "negative", in: "-1s", err: ErrRange},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			got, err := ParseDuration(c.in)
			if c.err == nil {
				if err != nil || got != c.want {
					t.Fatalf("%q = %v, %v; want %v", c.in, got, err, c.want)
				}
				return
			}
			checkQuantityErr(t, err, KindDuration, c.in, c.err, c.msg)
		})
	}
}

func TestParseLengthRange(t *testing.T) {
	cases := []struct {
		name string
		in   string
		want []float64 // metres
		tol  float64
		err  error
		msg  string
	}{
		{name: "metres", in: "2m..12m step 1m", want: []float64{2, 3, 4, 5, 6, 7, 8, 9, 10, 11, 12}},
		{name: "bare", in: "2..4 step 0.5", want: []float64{2, 2.5, 3, 3.5, 4}},
		{name: "feet", in: "10ft..40ft step 10ft", want: []float64{3.048, 6.096, 9.144, 12.192}, tol: 1e-12}, // × 0.3048 exact
		{name: "step not dividing", in: "2m..5m step 2m", want: []float64{2, 4}},
		{name: "tenths", in: "0..1 STEP 0.1", want: []float64{0, .1, .2, .3, .4, .5, .6, .7, .8, .9, 1}, tol: 1e-15},
		{name: "single", in: "9m", want: []float64{9}},
		{name: "backwards", in: "12m..2m step 1m", err: ErrRange,
			msg: `"12m..2m step 1m": the range runs backwards (write the smaller length first)`},
		{name: "no step", in: "2m..12m", err: ErrSyntax, msg: `"2m..12m": no step (write e.g. 2m..12m step 1m)`},
		{name: "zero step", in: "2m..12m step 0m", err: ErrRange, msg: `"2m..12m step 0m": the step must be more than 0`},
		{name: "bad unit", in: "2m..12x step 1m", err: ErrUnit,
			msg: `"2m..12x step 1m": unknown unit "x" (use m, km, ft or mi) in "12x"`},
		{name: "too many", in: "0..100km step 1m", err: ErrRange,
			msg: `"0..100km step 1m": more than 10000 values (use a larger step)`},
		{name: "empty part", in: "..12m step 1m", err: ErrSyntax},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			r, err := ParseLengthRange(c.in)
			if c.err != nil {
				checkQuantityErr(t, err, KindLengthRange, c.in, c.err, c.msg)
				return
			}
			if err != nil {
				t.Fatalf("%q: %v", c.in, err)
			}
			got := r.ValuesM()
			if len(got) != len(c.want) || r.Len() != len(c.want) {
				t.Fatalf("%q: %v (Len %d), want %v", c.in, got, r.Len(), c.want)
			}
			for i := range got {
				if math.Abs(got[i]-c.want[i]) > c.tol {
					t.Errorf("%q[%d] = %.17g, want %.17g", c.in, i, got[i], c.want[i])
				}
			}
		})
	}
}

func TestParsePoint(t *testing.T) {
	cases := []struct {
		name string
		in   string
		want orb.Point
		err  error
		msg  string
	}{
		{name: "plain", in: "46.25,7.5", want: orb.Point{7.5, 46.25}},
		{name: "spaces", in: " -33.9 , 151.2 ", want: orb.Point{151.2, -33.9}},
		{name: "limits", in: "90,-180", want: orb.Point{-180, 90}},
		{name: "lat out of range, swapped", in: "95,7", err: ErrRange,
			msg: `"95,7": latitude 95 is outside -90 to 90; write LAT,LON, latitude first`},
		{name: "lat out of range", in: "95,170", err: ErrRange, msg: `"95,170": latitude 95 is outside -90 to 90`},
		{name: "lon out of range", in: "45,181", err: ErrRange, msg: `"45,181": longitude 181 is outside -180 to 180`},
		{name: "waypoint name", in: "Lookout Saddle", err: ErrSyntax,
			msg: `"Lookout Saddle": not a point (write LAT,LON in decimal degrees, e.g. 46.1234,7.5678)`},
		{name: "three numbers", in: "1,2,3", err: ErrSyntax},
		{name: "units", in: "46N,7E", err: ErrSyntax},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			got, err := ParsePoint(c.in)
			if c.err != nil {
				checkQuantityErr(t, err, KindPoint, c.in, c.err, c.msg)
				return
			}
			if err != nil || got != c.want {
				t.Fatalf("%q = %v, %v; want %v", c.in, got, err, c.want)
			}
		})
	}
}

func TestFormat(t *testing.T) {
	cases := []struct {
		name, got, want string
	}{
		{"metres", FormatLength(12, false), "12.0 m"},
		{"feet", FormatLength(12, true), "39.4 ft"}, // 12 / 0.3048 = 39.37 ft
		{"kilometres", FormatLength(1500, false), "1.50 km"},
		{"miles", FormatLength(4828.032, true), "3.00 mi"}, // 3 × 1609.344 m
		{"height stays in metres", FormatHeight(2500, false), "2500.0 m"},
		{"height in feet", FormatHeight(304.8, true), "1000.0 ft"},
		{"milliwatts", FormatPower(0.5), "500 mW"},
		{"watts", FormatPower(5), "5.0 W"},
		{"kilowatts", FormatPower(1500), "1.50 kW"},
		{"MHz", FormatFreq(146.52), "146.520 MHz"},
		{"GHz", FormatFreq(1200), "1.200 GHz"},
	}
	for _, c := range cases {
		if c.got != c.want {
			t.Errorf("%s: got %q, want %q", c.name, c.got, c.want)
		}
	}
}

// quantitySeeds reads testdata/quantity-seeds.txt: lines "kind<TAB>input",
// '#' starts a comment.
func quantitySeeds(f *testing.F, kind string) {
	f.Helper()
	file, err := os.Open("testdata/quantity-seeds.txt")
	if err != nil {
		f.Fatalf("seed corpus: %v", err)
	}
	defer file.Close()
	sc := bufio.NewScanner(file)
	n := 0
	for sc.Scan() {
		line := sc.Text()
		if line == "" || strings.HasPrefix(line, "#") {
			continue
		}
		k, in, ok := strings.Cut(line, "\t")
		if ok && (k == kind || k == "any") {
			f.Add(in)
			n++
		}
	}
	if n == 0 {
		f.Fatalf("no seeds for %s", kind)
	}
}

// checkFuzzErr checks the shape of a parse error found while fuzzing.
func checkFuzzErr(t *testing.T, in string, err error) {
	t.Helper()
	var qe *QuantityError
	if !errors.As(err, &qe) {
		t.Fatalf("%q: error %T is not *QuantityError", in, err)
	}
	if !errors.Is(err, ErrSyntax) && !errors.Is(err, ErrUnit) && !errors.Is(err, ErrRange) {
		t.Fatalf("%q: error %v wraps no sentinel", in, err)
	}
	if qe.Input != in || qe.Detail == "" {
		t.Fatalf("%q: malformed error %#v", in, qe)
	}
}

func fuzzFloat(f *testing.F, kind string, parse func(string) (float64, error), unit string) {
	quantitySeeds(f, kind)
	f.Fuzz(func(t *testing.T, in string) {
		v, err := parse(in)
		if err != nil {
			checkFuzzErr(t, in, err)
			return
		}
		if math.IsNaN(v) || math.IsInf(v, 0) {
			t.Fatalf("%q gave %v", in, v)
		}
		// Round trip: the value printed in the parser's own unit parses back.
		s := strconv.FormatFloat(v, 'g', -1, 64) + unit
		w, err := parse(s)
		if err != nil {
			t.Fatalf("%q = %v; reparse %q: %v", in, v, s, err)
		}
		if w != v {
			t.Fatalf("%q = %v; reparse %q = %v", in, v, s, w)
		}
	})
}

func FuzzParseLengthM(f *testing.F)        { fuzzFloat(f, "length", ParseLengthM, "m") }
func FuzzParsePowerW(f *testing.F)         { fuzzFloat(f, "power", ParsePowerW, "W") }
func FuzzParseFreqMHz(f *testing.F)        { fuzzFloat(f, "freq", ParseFreqMHz, "MHz") }
func FuzzParseGainDBi(f *testing.F)        { fuzzFloat(f, "gain", ParseGainDBi, "dBi") }
func FuzzParseSensitivityDBm(f *testing.F) { fuzzFloat(f, "sensitivity", ParseSensitivityDBm, "dBm") }
func FuzzParseRatio(f *testing.F)          { fuzzFloat(f, "ratio", ParseRatio, "") }
func FuzzParseLossDB(f *testing.F)         { fuzzFloat(f, "loss", ParseLossDB, "dB") }
func FuzzParseSWR(f *testing.F)            { fuzzFloat(f, "swr", ParseSWR, ":1") }
func FuzzParseKFactor(f *testing.F)        { fuzzFloat(f, "k", ParseKFactor, "") }

func FuzzParseDuration(f *testing.F) {
	quantitySeeds(f, "duration")
	f.Fuzz(func(t *testing.T, in string) {
		d, err := ParseDuration(in)
		if err != nil {
			checkFuzzErr(t, in, err)
			return
		}
		if d < 0 || d > MaxDuration {
			t.Fatalf("%q gave %v", in, d)
		}
		s := strconv.FormatInt(int64(d/time.Millisecond), 10) + "e-3s"
		if d%time.Millisecond != 0 {
			return // sub-millisecond values need not print exactly this way
		}
		e, err := ParseDuration(s)
		if err != nil || e != d {
			t.Fatalf("%q = %v; reparse %q = %v, %v", in, d, s, e, err)
		}
	})
}

func FuzzParseLengthRange(f *testing.F) {
	quantitySeeds(f, "range")
	f.Fuzz(func(t *testing.T, in string) {
		r, err := ParseLengthRange(in)
		if err != nil {
			checkFuzzErr(t, in, err)
			return
		}
		vals := r.ValuesM()
		if len(vals) == 0 || len(vals) > MaxRangeValues+1 {
			t.Fatalf("%q: %d values", in, len(vals))
		}
		if vals[0] != r.FromM || vals[len(vals)-1] > r.ToM {
			t.Fatalf("%q: values %v outside %v", in, vals, r)
		}
		if r.StepM > 0 {
			g := func(x float64) string { return strconv.FormatFloat(x, 'g', -1, 64) }
			s := g(r.FromM) + "m.." + g(r.ToM) + "m step " + g(r.StepM) + "m"
			r2, err := ParseLengthRange(s)
			if err != nil || r2 != r {
				t.Fatalf("%q = %+v; reparse %q = %+v, %v", in, r, s, r2, err)
			}
		}
	})
}

func FuzzParsePoint(f *testing.F) {
	quantitySeeds(f, "point")
	f.Fuzz(func(t *testing.T, in string) {
		p, err := ParsePoint(in)
		if err != nil {
			checkFuzzErr(t, in, err)
			return
		}
		if p.Lat() < -90 || p.Lat() > 90 || p.Lon() < -180 || p.Lon() > 180 {
			t.Fatalf("%q gave %v", in, p)
		}
		g := func(x float64) string { return strconv.FormatFloat(x, 'g', -1, 64) }
		s := g(p.Lat()) + "," + g(p.Lon())
		q, err := ParsePoint(s)
		if err != nil || q != p {
			t.Fatalf("%q = %v; reparse %q = %v, %v", in, p, s, q, err)
		}
	})
}

func BenchmarkParseLengthM(b *testing.B) {
	b.ReportAllocs()
	for b.Loop() {
		if _, err := ParseLengthM("40 ft"); err != nil {
			b.Fatal(err)
		}
	}
}
