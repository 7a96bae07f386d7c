package propagation

// Terminal clutter loss: ITU-R P.2108-1 (09/2021), Annex 1, §3.1, the
// height-gain terminal correction model.

import (
	"errors"
	"fmt"
	"math"
	"strings"
)

// ErrUnknownClutterClass is wrapped by ParseClutterClass when a name is not a
// clutter class.
var ErrUnknownClutterClass = errors.New("propagation: unknown clutter class")

// ClutterClass is a terminal clutter class of ITU-R P.2108-1 §3.1.1 (Table
// 3): the surroundings of an antenna that stands below the local clutter.
// The zero value, NoClutter, applies no correction.
type ClutterClass int

const (
	// NoClutter applies no terminal clutter correction (the antenna stands
	// in the open, or the clutter is already in the profile).
	NoClutter ClutterClass = iota
	// WaterSea is water or sea: representative height 10 m, eq. (2b).
	WaterSea
	// OpenRural is open or rural land: representative height 10 m, eq. (2b).
	OpenRural
	// Suburban: representative height 10 m, eq. (2a).
	Suburban
	// Urban: representative height 15 m, eq. (2a) (Table 3 gives urban
	// and trees/forest one row).
	Urban
	// TreesForest is trees or forest: representative height 15 m, eq. (2a).
	TreesForest
	// DenseUrban: representative height 20 m, eq. (2a).
	DenseUrban
)

// clutterClasses is ITU-R P.2108-1 Table 3: representative clutter height R
// in metres and which equation applies (diffraction eq. 2a, or height gain
// eq. 2b), with the class's name.
var clutterClasses = [...]struct {
	name    string
	heightM float64
	diffrac bool // eq. (2a); otherwise eq. (2b)
}{
	NoClutter:   {"none", 0, false},
	WaterSea:    {"water", 10, false},
	OpenRural:   {"open", 10, false},
	Suburban:    {"suburban", 10, true},
	Urban:       {"urban", 15, true},
	TreesForest: {"forest", 15, true},
	DenseUrban:  {"dense-urban", 20, true},
}

// clutterAliases are further names ParseClutterClass accepts.
var clutterAliases = map[string]ClutterClass{
	"sea":        WaterSea,
	"water-sea":  WaterSea,
	"rural":      OpenRural,
	"open-rural": OpenRural,
	"trees":      TreesForest,
	"woods":      TreesForest,
	"dense":      DenseUrban,
}

func (c ClutterClass) valid() bool { return c >= 0 && int(c) < len(clutterClasses) }

// String returns the class's name: "none", "water", "open", "suburban",
// "urban", "forest" or "dense-urban".
func (c ClutterClass) String() string {
	if !c.valid() {
		return fmt.Sprintf("ClutterClass(%d)", int(c))
	}
	return clutterClasses[c].name
}

// HeightM returns the class's representative clutter height R in metres,
// the default of ITU-R P.2108-1 §3.1.1 Table 3 for use where no local figure
// is known: 10 m for water/sea, open/rural and suburban, 15 m for urban and
// trees/forest, 20 m for dense urban; 0 for NoClutter.
func (c ClutterClass) HeightM() float64 {
	if !c.valid() {
		return 0
	}
	return clutterClasses[c].heightM
}

// ClutterClassNames returns the names of the clutter classes in the order of
// ITU-R P.2108-1 Table 3, "none" first.
func ClutterClassNames() []string {
	names := make([]string, len(clutterClasses))
	for i, c := range clutterClasses {
		names[i] = c.name
	}
	return names
}

// ParseClutterClass reads a clutter class by name: one of ClutterClassNames,
// or "sea", "water-sea", "rural", "open-rural", "trees", "woods", "dense".
// Case, surrounding spaces and the choice of space, '-', '_' or '/' between
// words do not matter. Anything else gives an error wrapping
// ErrUnknownClutterClass that lists the names.
func ParseClutterClass(s string) (ClutterClass, error) {
	key := strings.ToLower(strings.TrimSpace(s))
	key = strings.NewReplacer(" ", "-", "_", "-", "/", "-").Replace(key)
	for i, c := range clutterClasses {
		if c.name == key {
			return ClutterClass(i), nil
		}
	}
	if c, ok := clutterAliases[key]; ok {
		return c, nil
	}
	return NoClutter, fmt.Errorf("%w %q (known: %s)", ErrUnknownClutterClass, s, strings.Join(ClutterClassNames(), ", "))
}

// DefaultStreetWidthM is the street width w_s of ITU-R P.2108-1 §3.1.1,
// 27 m, for use where no local figure is known.
const DefaultStreetWidthM = 27

// Frequency range of the height-gain terminal correction model, ITU-R
// P.2108-1 §3.1: 0.03 to 3 GHz.
const (
	ClutterMinFreqMHz = 30
	ClutterMaxFreqMHz = 3000
)

// TerminalClutterLoss returns the median additional loss A_h in dB
// (positive) of a terminal whose antenna stands heightM metres above ground
// in a clutter class, at freqMHz, by the height-gain terminal correction
// model of ITU-R P.2108-1 (09/2021) §3.1 with the class's representative
// clutter height (Table 3) and the default street width of 27 m. See
// TerminalClutterLossAt for the equations.
//
// The loss adds to a basic transmission loss computed with the terminal
// raised to the top of the clutter (P.2108-1 §3.1); callers that keep the
// antenna at its real height in the path calculation count part of the
// clutter twice, which errs on the side of caution.
func TerminalClutterLoss(c ClutterClass, freqMHz, heightM float64) (float64, error) {
	return TerminalClutterLossAt(c, freqMHz, heightM, c.HeightM(), DefaultStreetWidthM)
}

// TerminalClutterLossAt is TerminalClutterLoss with a local representative
// clutter height clutterHeightM (m) and street width streetWidthM (m) in
// place of the defaults. ITU-R P.2108-1 (09/2021) §3.1, with f in GHz and h,
// R, w_s in metres:
//
//	A_h = 0                          for h ≥ R
//	A_h = J(ν) − 6.03                 (2a) suburban, urban, trees/forest, dense urban
//	A_h = −K_h2 · log10(h/R)          (2b) water/sea, open/rural
//	ν = K_ν · √(h_dif · θ_clut)       (2c)
//	h_dif = R − h                     (2d)
//	θ_clut = arctan(h_dif / w_s), degrees (2e)
//	K_h2 = 21.8 + 6.2 · log10(f)      (2f)
//	K_ν = 0.342 · √f                  (2g)
//
// with J(ν) = 6.9 + 20 log10(√((ν − 0.1)² + 1) + ν − 0.1), the knife-edge
// approximation of ITU-R P.526 (eq. 31 of P.526-16; KnifeEdgeLossDB).
//
// NoClutter gives 0 for any input. For a clutter class the frequency must be
// within 30–3000 MHz (the recommendation's 0.03–3 GHz), the antenna height
// and the street width finite and above 0, and the clutter height finite and
// above 0; otherwise the error wraps ErrBadParams.
func TerminalClutterLossAt(c ClutterClass, freqMHz, heightM, clutterHeightM, streetWidthM float64) (float64, error) {
	switch {
	case c == NoClutter:
		return 0, nil
	case !c.valid():
		return 0, fmt.Errorf("%w: clutter class %d is not one of ITU-R P.2108-1 Table 3", ErrBadParams, int(c))
	case !(freqMHz >= ClutterMinFreqMHz && freqMHz <= ClutterMaxFreqMHz):
		return 0, fmt.Errorf("%w: frequency %g MHz is outside the %d–%d MHz of the ITU-R P.2108-1 §3.1 terminal clutter model",
			ErrBadParams, freqMHz, ClutterMinFreqMHz, ClutterMaxFreqMHz)
	case !(heightM > 0) || math.IsInf(heightM, 0):
		return 0, fmt.Errorf("%w: antenna height %g m above ground must be over 0 for terminal clutter loss", ErrBadParams, heightM)
	case !(clutterHeightM > 0) || math.IsInf(clutterHeightM, 0):
		return 0, fmt.Errorf("%w: representative clutter height %g m must be over 0", ErrBadParams, clutterHeightM)
	case !(streetWidthM > 0) || math.IsInf(streetWidthM, 0):
		return 0, fmt.Errorf("%w: street width %g m must be over 0", ErrBadParams, streetWidthM)
	}
	if heightM >= clutterHeightM {
		return 0, nil
	}
	fGHz := freqMHz / 1000
	if !clutterClasses[c].diffrac {
		kh2 := 21.8 + 6.2*math.Log10(fGHz)                    // (2f)
		return -kh2 * math.Log10(heightM/clutterHeightM), nil // (2b)
	}
	hdif := clutterHeightM - heightM                         // (2d)
	thetaDeg := math.Atan(hdif/streetWidthM) * 180 / math.Pi // (2e)
	knu := 0.342 * math.Sqrt(fGHz)                           // (2g)
	nu := knu * math.Sqrt(hdif*thetaDeg)                     // (2c)
	return KnifeEdgeLossDB(nu) - 6.03, nil                   // (2a)
}
