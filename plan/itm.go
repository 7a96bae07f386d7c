package plan

import (
	"errors"
	"fmt"
	"math"
	"math/bits"
	"strconv"
	"strings"

	"github.com/mastlink/mastlink/plan/units"
	"github.com/mastlink/mastlink/propagation"
)

// The Longley–Rice ITM as the planner uses it: its settings as text (the
// one parser the command line and the plan file share), how a requirement's
// reliability becomes the model's, and the model's intermediate values and
// warnings as a link reports them.

// Keys of the ITM options, as units.OptionError names them (the plan
// file's itm: keys; the command line's flags with "-" for "_").
const (
	ITMOptClimate             = "climate"
	ITMOptRefractivity        = "refractivity"
	ITMOptSurfaceRefractivity = "surface_refractivity"
	ITMOptPermittivity        = "permittivity"
	ITMOptConductivity        = "conductivity"
	ITMOptVariability         = "variability"
	ITMOptTime                = "time"
	ITMOptLocation            = "location"
	ITMOptSituation           = "situation"
	ITMOptConfidence          = "confidence"
)

// ITMOptions are the settings of the Longley–Rice ITM (G. A. Hufford, "The
// ITS Irregular Terrain Model, version 1.2.2: the Algorithm", NTIA/ITS,
// 1995) as text, as the command line (--climate, --refractivity, …) or a
// plan file's itm: section gives them. An empty field leaves the model's
// field as it is (the model's default when it is zero). This is the one
// parser and validator of ITM settings.
//
// The reliability is not here: it is the requirement's (see
// ITMRequirement), so that one reliability is asked for once.
type ITMOptions struct {
	Climate             string // radio climate, 1–7 or a name (propagation.ParseITMClimate)
	Refractivity        string // N0, sea-level surface refractivity, N-units, 250–400
	SurfaceRefractivity string // Ns, surface refractivity, N-units, 150–400 (instead of N0)
	Permittivity        string // relative permittivity of the ground, 1 or more
	Conductivity        string // ground conductivity, S/m (bare, "S/m" or "mS/m"), above 0
	Variability         string // single, accidental, mobile or broadcast (propagation.ParseITMVariability)
	Time                string // fraction of time, above 0 % and below 100 % (units.ParseRatio)
	Location            string // fraction of locations, likewise
	Situation           string // fraction of situations, likewise
	Confidence          string // confidence, with the requirement's reliability, likewise
	// NoLocationVariability and NoSituationVariability remove those
	// spreads (propagation.ITM.LocationEliminated, SituationEliminated).
	NoLocationVariability, NoSituationVariability bool
}

// Given returns the keys of the options that are set, in the order of the
// ITMOpt constants, plus "no_location_variability" and
// "no_situation_variability" for the switches.
func (o ITMOptions) Given() []string {
	var out []string
	for _, kv := range o.texts() {
		if kv.v != "" {
			out = append(out, kv.k)
		}
	}
	if o.NoLocationVariability {
		out = append(out, "no_location_variability")
	}
	if o.NoSituationVariability {
		out = append(out, "no_situation_variability")
	}
	return out
}

type keyValue struct{ k, v string }

func (o ITMOptions) texts() []keyValue {
	return []keyValue{{ITMOptClimate, o.Climate}, {ITMOptRefractivity, o.Refractivity}, {ITMOptSurfaceRefractivity, o.SurfaceRefractivity},
		{ITMOptPermittivity, o.Permittivity}, {ITMOptConductivity, o.Conductivity}, {ITMOptVariability, o.Variability},
		{ITMOptTime, o.Time}, {ITMOptLocation, o.Location}, {ITMOptSituation, o.Situation}, {ITMOptConfidence, o.Confidence}}
}

// Apply parses and checks o and sets the matching fields of m (percentages
// in per cent, as propagation.ITM takes them). Every error is a
// *units.OptionError naming one ITMOpt key; m is then left as it was.
func (o ITMOptions) Apply(m *propagation.ITM) error {
	r := *m
	fail := func(key string, err error) error { return &units.OptionError{Option: key, Err: err} }
	var err error
	if o.Climate != "" {
		if r.Climate, err = propagation.ParseITMClimate(o.Climate); err != nil {
			return fail(ITMOptClimate, trimBadParams(err))
		}
	}
	if o.Refractivity != "" && o.SurfaceRefractivity != "" {
		return fail(ITMOptSurfaceRefractivity, errors.New("give the refractivity as N0 (refractivity) or as Ns (surface refractivity), not both"))
	}
	if o.Refractivity != "" {
		if r.N0, err = parseBare(o.Refractivity, "N0 in N-units, e.g. 301"); err != nil {
			return fail(ITMOptRefractivity, err)
		}
		if !(r.N0 >= 250 && r.N0 <= 400) {
			return fail(ITMOptRefractivity, fmt.Errorf("N0 %g N-units is outside 250–400 (301 is continental temperate)", r.N0))
		}
		r.Ns = 0
	}
	if o.SurfaceRefractivity != "" {
		if r.Ns, err = parseBare(o.SurfaceRefractivity, "Ns in N-units, e.g. 280"); err != nil {
			return fail(ITMOptSurfaceRefractivity, err)
		}
		if !(r.Ns >= 150 && r.Ns <= 400) {
			return fail(ITMOptSurfaceRefractivity, fmt.Errorf("Ns %g N-units is outside 150–400", r.Ns))
		}
		r.N0 = 0
	}
	if o.Permittivity != "" || o.Conductivity != "" {
		if r.Ground == (propagation.Ground{}) {
			r.Ground = propagation.ITMAverageGround
		}
	}
	if o.Permittivity != "" {
		if r.Ground.Permittivity, err = parseBare(o.Permittivity, "a relative permittivity, e.g. 15"); err != nil {
			return fail(ITMOptPermittivity, err)
		}
		if !(r.Ground.Permittivity >= 1) {
			return fail(ITMOptPermittivity, fmt.Errorf("relative permittivity %g must be 1 or more (15 is average ground, 80 sea water)", r.Ground.Permittivity))
		}
	}
	if o.Conductivity != "" {
		if r.Ground.ConductivitySM, err = ParseConductivitySM(o.Conductivity); err != nil {
			return fail(ITMOptConductivity, err)
		}
	}
	if o.Variability != "" {
		if r.Variability, err = propagation.ParseITMVariability(o.Variability); err != nil {
			return fail(ITMOptVariability, trimBadParams(err))
		}
	}
	pcts := []struct {
		key, text string
		dst       *float64
	}{{ITMOptTime, o.Time, &r.TimePct}, {ITMOptLocation, o.Location, &r.LocationPct}, {ITMOptSituation, o.Situation, &r.SituationPct}, {ITMOptConfidence, o.Confidence, &r.ConfidencePct}}
	for _, p := range pcts {
		if p.text == "" {
			continue
		}
		v, err := units.ParseRatio(p.text)
		if err != nil {
			return fail(p.key, err)
		}
		if !(v > 0 && v < 1) {
			return fail(p.key, errors.New("must be above 0% and below 100% (e.g. 90%)"))
		}
		*p.dst = 100 * v
	}
	if o.Confidence != "" && (o.Time != "" || o.Location != "" || o.Situation != "") {
		return fail(ITMOptConfidence, errors.New("give time, location and situation, or a reliability with its confidence, not both"))
	}
	if o.NoLocationVariability {
		r.LocationEliminated = true
	}
	if o.NoSituationVariability {
		r.SituationEliminated = true
	}
	if _, err := r.Resolved(); err != nil { // the checks above cover the ranges; this catches the rest
		key := ITMOptClimate
		if g := o.Given(); len(g) > 0 {
			key = g[0]
		}
		return fail(key, trimBadParams(err))
	}
	*m = r
	return nil
}

// trimBadParams drops the "propagation: bad parameters: " prefix of an
// ErrBadParams error, keeping the rest of its text.
func trimBadParams(err error) error {
	s := err.Error()
	if p := propagation.ErrBadParams.Error() + ": "; strings.HasPrefix(s, p) {
		return errors.New(strings.TrimPrefix(s, p))
	}
	return err
}

// parseBare parses a plain number; example says what is expected.
func parseBare(s, example string) (float64, error) {
	v, err := strconv.ParseFloat(strings.TrimSpace(s), 64)
	if err != nil || math.IsNaN(v) || math.IsInf(v, 0) {
		return 0, fmt.Errorf("%q is not a number (give %s)", s, example)
	}
	return v, nil
}

// ParseConductivitySM parses a ground conductivity in S/m: a bare number
// is S/m; "S/m" and "mS/m" are accepted as units. It must be above 0 and
// at most 100 S/m (sea water is about 5 S/m, ITU-R P.527-6 Figure 1).
func ParseConductivitySM(s string) (float64, error) {
	t := strings.TrimSpace(s)
	scale := 1.0
	switch lt := strings.ToLower(t); {
	case strings.HasSuffix(lt, "ms/m"):
		t, scale = strings.TrimSpace(t[:len(t)-4]), 1e-3
	case strings.HasSuffix(lt, "s/m"):
		t = strings.TrimSpace(t[:len(t)-3])
	}
	v, err := strconv.ParseFloat(t, 64)
	if err != nil || math.IsNaN(v) || math.IsInf(v, 0) {
		return 0, fmt.Errorf("%q is not a conductivity (give S/m, e.g. 0.005 or 5mS/m)", s)
	}
	v *= scale
	if !(v > 0 && v <= 100) {
		return 0, fmt.Errorf("conductivity %g S/m must be above 0 and at most 100 S/m (0.005 is average ground, 5 sea water)", v)
	}
	return v, nil
}

// ITMRequirement makes a requirement and the model agree on variability.
// When m is the Longley–Rice ITM, the model's own variability in time,
// location and situation stands in for the log-normal location
// variability σ of ITU-R P.1812-8 §4.8: a requirement's reliability
// becomes the ITM's (ReliabilityPct, with the model's ConfidencePct), the
// link loss is then the loss not exceeded at that reliability, and
// r.ByModel is set so that NeededMarginDB adds no σ margin on top and no
// σ-based probability is given (each counted once). With the ITM's mode
// of variability "mobile" (the default) the reliability covers time and
// locations together (Hufford 1995, subroutine avar).
//
// For other models m and r are returned unchanged. The error, a
// *units.OptionError with Option "reliability", says when the ITM already
// has time, location and situation percentages of its own.
func ITMRequirement(m propagation.Model, r *Requirement) (propagation.Model, error) {
	itm, ok := m.(propagation.ITM)
	if !ok {
		return m, nil
	}
	r.ByModel = true
	if r.Reliability > 0 {
		if itm.TimePct != 0 || itm.LocationPct != 0 || itm.SituationPct != 0 {
			return m, &units.OptionError{Option: "reliability", Err: errors.New("the ITM's time, location and situation percentages are given: give those or a reliability (with its confidence), not both")}
		}
		itm.ReliabilityPct = 100 * r.Reliability
	}
	return itm, nil
}

// ITMReport is what a link reports of an ITM calculation: the model's
// intermediate values (from the transmitting end "tx" to the receiving
// end "rx") and the settings the loss was computed with. Field names carry
// their units.
type ITMReport struct {
	Mode                   string  `json:"mode"` // "line of sight", "diffraction" or "troposcatter"
	DeltaHM                float64 `json:"delta_h_m"`
	EffectiveHeightTxM     float64 `json:"effective_height_tx_m"`
	EffectiveHeightRxM     float64 `json:"effective_height_rx_m"`
	HorizonDistanceTxM     float64 `json:"horizon_distance_tx_m"`
	HorizonDistanceRxM     float64 `json:"horizon_distance_rx_m"`
	HorizonAngleTxDeg      float64 `json:"horizon_angle_tx_deg"` // above the horizontal
	HorizonAngleRxDeg      float64 `json:"horizon_angle_rx_deg"`
	SurfaceRefractivityN   float64 `json:"surface_refractivity_n"`
	EffectiveEarthRadiusM  float64 `json:"effective_earth_radius_m"`
	ReferenceAttenuationDB float64 `json:"reference_attenuation_db"` // A_ref, the median loss beyond free space
	ClimateMedianDB        float64 `json:"climate_median_db"`        // V_med, the climate's adjustment of the median

	Climate              string   `json:"climate"`
	RefractivityN0       *float64 `json:"refractivity_n0"` // null when Ns was given directly
	Permittivity         float64  `json:"permittivity"`
	ConductivitySPerM    float64  `json:"conductivity_s_per_m"`
	Polarization         string   `json:"polarization"`
	Variability          string   `json:"variability"`
	LocationVariability  bool     `json:"location_variability"`
	SituationVariability bool     `json:"situation_variability"`
	TimePct              *float64 `json:"time_pct,omitempty"`
	LocationPct          *float64 `json:"location_pct,omitempty"`
	SituationPct         *float64 `json:"situation_pct,omitempty"`
	ReliabilityPct       *float64 `json:"reliability_pct,omitempty"`
	ConfidencePct        *float64 `json:"confidence_pct,omitempty"`
}

// newITMReport builds the report of an ITM result t computed with m; when
// swap is true the path was computed from the receiving end, and the
// terminal values are swapped.
func newITMReport(m propagation.ITM, t propagation.ITMTerms, swap bool) *ITMReport {
	s, err := m.Resolved()
	if err != nil { // Loss succeeded with m, so this does not happen
		s = m
	}
	const deg = 180 / math.Pi / 1000 // per milliradian
	r := &ITMReport{
		Mode:                   t.Mode.String(),
		DeltaHM:                t.DeltaHM,
		EffectiveHeightTxM:     t.EffHeightTxM,
		EffectiveHeightRxM:     t.EffHeightRxM,
		HorizonDistanceTxM:     1000 * t.HorizonTxKM,
		HorizonDistanceRxM:     1000 * t.HorizonRxKM,
		HorizonAngleTxDeg:      t.HorizonAngleTxMrad * deg,
		HorizonAngleRxDeg:      t.HorizonAngleRxMrad * deg,
		SurfaceRefractivityN:   t.SurfaceRefractivityN,
		EffectiveEarthRadiusM:  1000 * t.EarthRadiusKM,
		ReferenceAttenuationDB: t.ReferenceDB,
		ClimateMedianDB:        t.ClimateMedianDB,
		Climate:                s.Climate.String(),
		Permittivity:           s.Ground.Permittivity,
		ConductivitySPerM:      s.Ground.ConductivitySM,
		Polarization:           s.Polarization.String(),
		Variability:            s.Variability.String(),
		LocationVariability:    !s.LocationEliminated,
		SituationVariability:   !s.SituationEliminated,
	}
	if swap {
		r.EffectiveHeightTxM, r.EffectiveHeightRxM = r.EffectiveHeightRxM, r.EffectiveHeightTxM
		r.HorizonDistanceTxM, r.HorizonDistanceRxM = r.HorizonDistanceRxM, r.HorizonDistanceTxM
		r.HorizonAngleTxDeg, r.HorizonAngleRxDeg = r.HorizonAngleRxDeg, r.HorizonAngleTxDeg
	}
	ptr := func(v float64) *float64 { return &v }
	if s.N0 != 0 {
		r.RefractivityN0 = ptr(s.N0)
	} else if r.SurfaceRefractivityN == 0 {
		r.SurfaceRefractivityN = s.Ns
	}
	if s.ReliabilityPct != 0 {
		r.ReliabilityPct, r.ConfidencePct = ptr(s.ReliabilityPct), ptr(s.ConfidencePct)
	} else {
		r.TimePct, r.LocationPct, r.SituationPct = ptr(s.TimePct), ptr(s.LocationPct), ptr(s.SituationPct)
	}
	return r
}

// ITMSettings describes the settings of m in one line of plain words,
// defaults included, as ITMReport.Settings does.
func ITMSettings(m propagation.ITM) string {
	return newITMReport(m, propagation.ITMTerms{}, false).Settings()
}

// Settings describes the ITM settings of the report in one line of plain
// words, defaults included, for text output: "continental-temperate
// climate, N0 301 N-units, ground ε 15 σ 0.005 S/m, vertical, mobile
// variability, 50 % of time, 50 % of locations, 50 % of situations".
func (r *ITMReport) Settings() string {
	var b strings.Builder
	fmt.Fprintf(&b, "%s climate, ", r.Climate)
	if r.RefractivityN0 != nil {
		fmt.Fprintf(&b, "N0 %g N-units", *r.RefractivityN0)
	} else {
		fmt.Fprintf(&b, "Ns %g N-units", r.SurfaceRefractivityN)
	}
	fmt.Fprintf(&b, ", ground ε %g σ %g S/m, %s, %s variability", r.Permittivity, r.ConductivitySPerM, r.Polarization, r.Variability)
	if r.ReliabilityPct != nil {
		fmt.Fprintf(&b, ", %g %% reliability, %g %% confidence", *r.ReliabilityPct, *r.ConfidencePct)
	} else {
		fmt.Fprintf(&b, ", %g %% of time, %g %% of locations, %g %% of situations", *r.TimePct, *r.LocationPct, *r.SituationPct)
	}
	if !r.LocationVariability {
		b.WriteString(", no location variability")
	}
	if !r.SituationVariability {
		b.WriteString(", no situation variability")
	}
	return b.String()
}

// itmWarningLines turns the ITM warnings of many paths (one set per path)
// into one line per condition, with the number of paths it arose on.
func itmWarningLines(ws []propagation.ITMWarnings) []string {
	var count [32]int
	seen := false
	for _, w := range ws {
		for w != 0 {
			i := bits.TrailingZeros32(uint32(w))
			count[i]++
			w &^= 1 << i
			seen = true
		}
	}
	if !seen {
		return nil
	}
	var out []string
	for i, n := range count {
		if n == 0 {
			continue
		}
		for _, msg := range propagation.ITMWarnings(1 << i).Messages() {
			out = append(out, fmt.Sprintf("ITM: %s (%d of %d paths)", msg, n, len(ws)))
		}
	}
	return out
}
