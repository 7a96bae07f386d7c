package propagation

import (
	"fmt"
	"math"
	"strconv"
	"strings"
)

// This file holds the Longley–Rice Irregular Terrain Model (ITM) as a
// Model: its parameters, its result terms and the Loss entry point. The
// method is G. A. Hufford, "The ITS Irregular Terrain Model, version 1.2.2:
// the Algorithm" (NTIA/ITS, 1995), point-to-point mode, built on A. G.
// Longley and P. L. Rice, "Prediction of Tropospheric Radio Transmission
// Loss Over Irregular Terrain: A Computer Method – 1968", ESSA Tech. Rep.
// ERL 79-ITS 67 (1968). The preparation of the path is in itm_prep.go, the
// reference attenuation in itm_aref.go and the variability in
// itm_variability.go.

// ITMClimate is the radio climate of the Longley–Rice model (Hufford 1995,
// subroutine avar; NTIA Report 82-100), 1–7. The zero value selects
// ITMContinentalTemperate.
type ITMClimate int

// The seven radio climates, numbered as the model numbers them.
const (
	ITMEquatorial              ITMClimate = 1
	ITMContinentalSubtropical  ITMClimate = 2
	ITMMaritimeSubtropical     ITMClimate = 3
	ITMDesert                  ITMClimate = 4
	ITMContinentalTemperate    ITMClimate = 5
	ITMMaritimeTemperateOnLand ITMClimate = 6
	ITMMaritimeTemperateAtSea  ITMClimate = 7
)

var itmClimateNames = [...]string{
	ITMEquatorial:              "equatorial",
	ITMContinentalSubtropical:  "continental-subtropical",
	ITMMaritimeSubtropical:     "maritime-subtropical",
	ITMDesert:                  "desert",
	ITMContinentalTemperate:    "continental-temperate",
	ITMMaritimeTemperateOnLand: "maritime-temperate-land",
	ITMMaritimeTemperateAtSea:  "maritime-temperate-sea",
}

// String returns the climate's name, such as "continental-temperate".
func (c ITMClimate) String() string {
	if c >= ITMEquatorial && c <= ITMMaritimeTemperateAtSea {
		return itmClimateNames[c]
	}
	return fmt.Sprintf("ITMClimate(%d)", int(c))
}

// ParseITMClimate reads a radio climate given as its number 1–7 or its name
// (as String prints it, case-insensitive; spaces and underscores may stand
// for the hyphens). The error wraps ErrBadParams and lists the climates.
func ParseITMClimate(s string) (ITMClimate, error) {
	t := strings.ToLower(strings.TrimSpace(s))
	if n, err := strconv.Atoi(t); err == nil {
		if n >= int(ITMEquatorial) && n <= int(ITMMaritimeTemperateAtSea) {
			return ITMClimate(n), nil
		}
	} else {
		t = strings.NewReplacer(" ", "-", "_", "-").Replace(t)
		for c := ITMEquatorial; c <= ITMMaritimeTemperateAtSea; c++ {
			if t == itmClimateNames[c] {
				return c, nil
			}
		}
	}
	var known []string
	for c := ITMEquatorial; c <= ITMMaritimeTemperateAtSea; c++ {
		known = append(known, fmt.Sprintf("%d %s", int(c), itmClimateNames[c]))
	}
	return 0, fmt.Errorf("%w: unknown radio climate %q; use one of: %s", ErrBadParams, s, strings.Join(known, ", "))
}

// ITMVariability is the mode of variability of the Longley–Rice model
// (Hufford 1995, subroutine avar; NTIA Report 82-100): how the time,
// location and situation deviates combine into one loss. The zero value is
// ITMMobile.
type ITMVariability int

// The four modes of variability. The numbering is this package's own: the
// zero value is the mode most portable links fit.
const (
	// ITMMobile: reliability covers time and location together (the
	// location deviate follows the time deviate); confidence is situation.
	ITMMobile ITMVariability = iota
	// ITMSingleMessage: one deviate, the confidence, for time, location and
	// situation together.
	ITMSingleMessage
	// ITMAccidental: reliability is time; confidence covers location and
	// situation.
	ITMAccidental
	// ITMBroadcast: time, location and situation each keep their own
	// deviate.
	ITMBroadcast
)

var itmVariabilityNames = [...]string{
	ITMMobile:        "mobile",
	ITMSingleMessage: "single-message",
	ITMAccidental:    "accidental",
	ITMBroadcast:     "broadcast",
}

// String returns the mode's name: "mobile", "single-message", "accidental"
// or "broadcast".
func (v ITMVariability) String() string {
	if v >= ITMMobile && v <= ITMBroadcast {
		return itmVariabilityNames[v]
	}
	return fmt.Sprintf("ITMVariability(%d)", int(v))
}

// ParseITMVariability reads a mode of variability by name (as String prints
// it, case-insensitive; "single" is accepted for "single-message"). The
// error wraps ErrBadParams and lists the modes.
func ParseITMVariability(s string) (ITMVariability, error) {
	t := strings.NewReplacer(" ", "-", "_", "-").Replace(strings.ToLower(strings.TrimSpace(s)))
	if t == "single" {
		return ITMSingleMessage, nil
	}
	for v := ITMMobile; v <= ITMBroadcast; v++ {
		if t == itmVariabilityNames[v] {
			return v, nil
		}
	}
	return 0, fmt.Errorf("%w: unknown mode of variability %q; use one of: %s", ErrBadParams, s, strings.Join(itmVariabilityNames[:], ", "))
}

// ITMPropagationMode is the region of the reference attenuation a path
// falls in (Hufford 1995, subroutine lrprop): line of sight, diffraction or
// troposcatter. The zero value means no result.
type ITMPropagationMode int

// The three modes of propagation.
const (
	ITMLineOfSight  ITMPropagationMode = 1
	ITMDiffraction  ITMPropagationMode = 2
	ITMTroposcatter ITMPropagationMode = 3
)

// String returns "line of sight", "diffraction" or "troposcatter".
func (m ITMPropagationMode) String() string {
	switch m {
	case ITMLineOfSight:
		return "line of sight"
	case ITMDiffraction:
		return "diffraction"
	case ITMTroposcatter:
		return "troposcatter"
	}
	return fmt.Sprintf("ITMPropagationMode(%d)", int(m))
}

// ITMAverageGround is the "average ground" of the Longley–Rice model's
// sample runs and guide: relative permittivity ε = 15, conductivity
// σ = 0.005 S/m (NTIA Report 82-100, G. A. Hufford, A. G. Longley and
// W. A. Kissick, 1982).
var ITMAverageGround = Ground{Permittivity: 15, ConductivitySM: 0.005}

// ITMDefaultN0 is the default minimum monthly mean surface refractivity
// reduced to sea level, 301 N-units: the continental temperate value of
// NTIA Report 82-100 and the model's sample runs.
const ITMDefaultN0 = 301

// ITM is the Longley–Rice Irregular Terrain Model, version 1.2.2, in
// point-to-point mode (G. A. Hufford, "The ITS Irregular Terrain Model,
// version 1.2.2: the Algorithm", NTIA/ITS, 1995), as a Model. It computes
// the basic transmission loss not exceeded for the chosen time, location
// and situation percentages (or reliability and confidence).
//
// The zero value is usable and equals DefaultITM(): continental temperate
// climate, N0 = 301 N-units, average ground (ε 15, σ 0.005 S/m), vertical
// polarization, mobile variability, all percentages 50 % (the median).
//
// From Params, ITM reads FreqMHz (20–20 000 MHz) and the antenna heights
// (0.5–3000 m); its own fields give the polarization, ground and
// atmosphere, so Params.Polarization, Ground and EarthRadiusKM are not
// used: the loss and the clearance fields both use the model's effective
// earth radius (from N_s). The profile must be equally spaced
// (as terrain profiles are); clutter heights are ignored by the loss, which
// the model's terrain irregularity covers, and count only in the clearance.
// Loss does not allocate (see BenchmarkITM3300) and ITM is safe for
// concurrent use.
type ITM struct {
	// Climate is the radio climate; 0 selects ITMContinentalTemperate.
	Climate ITMClimate
	// N0 is the minimum monthly mean surface refractivity reduced to sea
	// level, N-units, 250–400; 0 selects ITMDefaultN0. The surface
	// refractivity is N_s = N0 exp(−h_sys/9460 m) at the mean elevation
	// h_sys of the middle 80 % of the profile.
	N0 float64
	// Ns, when not 0, is the surface refractivity in N-units (150–400)
	// given directly; N0 must then be 0.
	Ns float64
	// Ground holds ε (≥ 1) and σ (> 0 S/m); the zero value selects
	// ITMAverageGround.
	Ground Ground
	// Polarization of the wave; the zero value is Vertical.
	Polarization Polarization
	// Variability is the mode of variability; the zero value is ITMMobile.
	Variability ITMVariability
	// LocationEliminated removes location variability (σ_L = 0), as for a
	// known path; SituationEliminated removes the direct situation
	// variability (σ_S = 0; a residual remains through the combination).
	LocationEliminated, SituationEliminated bool
	// TimePct, LocationPct and SituationPct are the percentages (0–100,
	// exclusive) of time, locations and situations for which the loss is
	// not exceeded; 0 selects 50.
	TimePct, LocationPct, SituationPct float64
	// ReliabilityPct and ConfidencePct, when either is not 0, select the
	// reliability/confidence form instead: time = reliability, location =
	// 50, situation = confidence (0 selects 50). TimePct, LocationPct and
	// SituationPct must then be 0.
	ReliabilityPct, ConfidencePct float64
}

// DefaultITM returns the ITM model with every default written out: the
// same model as the zero value.
func DefaultITM() ITM {
	return ITM{
		Climate:      ITMContinentalTemperate,
		N0:           ITMDefaultN0,
		Ground:       ITMAverageGround,
		Polarization: Vertical,
		Variability:  ITMMobile,
		TimePct:      50,
		LocationPct:  50,
		SituationPct: 50,
	}
}

// Name returns "itm".
func (ITM) Name() string { return "itm" }

// ITMTerms are the intermediate values of one ITM calculation, for output
// and diagnostics. Heights are in metres, distances in km, angles in
// milliradians, losses in dB.
type ITMTerms struct {
	// Mode is the mode of propagation of the path.
	Mode ITMPropagationMode
	// DistanceKM is the path length.
	DistanceKM float64
	// SurfaceRefractivityN is N_s, N-units.
	SurfaceRefractivityN float64
	// EarthRadiusKM is the effective earth radius from N_s.
	EarthRadiusKM float64
	// DeltaHM is the terrain irregularity Δh.
	DeltaHM float64
	// EffHeightTxM and EffHeightRxM are the effective antenna heights.
	EffHeightTxM, EffHeightRxM float64
	// HorizonTxKM and HorizonRxKM are the horizon distances of each
	// terminal; HorizonAngleTxMrad and HorizonAngleRxMrad the horizon
	// elevation angles above the local horizontal (positive up).
	HorizonTxKM, HorizonRxKM               float64
	HorizonAngleTxMrad, HorizonAngleRxMrad float64
	// ReferenceDB is the reference attenuation A_ref, the median loss
	// beyond free space before the climate and variability adjustments.
	ReferenceDB float64
	// ClimateMedianDB is V_med, the climate's adjustment of the median.
	ClimateMedianDB float64
	// Warnings flags inputs outside the ranges the model was tested on.
	Warnings ITMWarnings
}

// ITMWarnings is a set of conditions under which the ITM result is less
// reliable: inputs outside the ranges the model was built and tested on
// (Hufford 1995, the "kwx" conditions), and one advisory of this package
// (ITMWarnRoughTerrain). A warning never stops the calculation.
type ITMWarnings uint32

// The warning conditions.
const (
	ITMWarnTxHeight        ITMWarnings = 1 << iota // TX antenna below 1 m or above 1000 m
	ITMWarnRxHeight                                // RX antenna below 1 m or above 1000 m
	ITMWarnFrequency                               // frequency below 40 MHz or above 10 000 MHz
	ITMWarnLongPath                                // path longer than 1000 km
	ITMWarnVeryLongPath                            // path longer than 2000 km
	ITMWarnSteepPath                               // effective heights differ by more than 0.2 × distance
	ITMWarnShortPath                               // path shorter than 1 km
	ITMWarnTxHorizonAngle                          // TX horizon angle beyond ±0.2 rad
	ITMWarnRxHorizonAngle                          // RX horizon angle beyond ±0.2 rad
	ITMWarnTxHorizonNear                           // TX horizon nearer than 0.1 × smooth-earth horizon
	ITMWarnRxHorizonNear                           // RX horizon nearer than 0.1 × smooth-earth horizon
	ITMWarnTxHorizonFar                            // TX horizon farther than 3 × smooth-earth horizon
	ITMWarnRxHorizonFar                            // RX horizon farther than 3 × smooth-earth horizon
	ITMWarnExtremeQuantile                         // a deviate beyond ±3.1 (percentage below 0.1 % or above 99.9 %)
	ITMWarnRefractivity                            // N_s below 250 N-units
	ITMWarnRoughTerrain                            // Δh above 700 m (this package's advisory)
)

var itmWarningText = [...]string{
	"transmitter antenna height outside 1–1000 m, where the model is less reliable",
	"receiver antenna height outside 1–1000 m, where the model is less reliable",
	"frequency outside 40–10 000 MHz, where the model is less reliable",
	"path longer than 1000 km, where the model is less reliable",
	"path longer than 2000 km, far beyond the model's data",
	"antenna heights differ by more than a fifth of the path length (a very steep path)",
	"path shorter than 1 km, where the model is less reliable",
	"transmitter horizon more than 0.2 rad above or below the horizontal",
	"receiver horizon more than 0.2 rad above or below the horizontal",
	"transmitter horizon nearer than a tenth of its smooth-earth horizon",
	"receiver horizon nearer than a tenth of its smooth-earth horizon",
	"transmitter horizon farther than three times its smooth-earth horizon",
	"receiver horizon farther than three times its smooth-earth horizon",
	"a percentage below 0.1 % or above 99.9 %, beyond the model's data",
	"surface refractivity N_s below 250 N-units, unusual for a real atmosphere",
	"terrain irregularity Δh above 700 m (extremely rugged mountains)",
}

// Messages returns one line of text per warning in the set, in the order
// of the constants; nil when the set is empty.
func (w ITMWarnings) Messages() []string {
	var out []string
	for i, s := range itmWarningText {
		if w&(1<<i) != 0 {
			out = append(out, s)
		}
	}
	return out
}

// String returns the messages joined by "; ", or "none".
func (w ITMWarnings) String() string {
	if w == 0 {
		return "none"
	}
	return strings.Join(w.Messages(), "; ")
}

// itmConfig is an ITM with its defaults applied and checked.
type itmConfig struct {
	climate         ITMClimate
	n0, ns          float64 // ns > 0 when given directly
	eps, sigma      float64
	pol             Polarization
	mode            ITMVariability
	elimLoc, elimSi bool
	time, loc, sit  float64 // percentages
}

// pctOrDefault returns 50 for 0, else v.
func pctOrDefault(v float64) float64 {
	if v == 0 {
		return 50
	}
	return v
}

// resolve applies the defaults to m and checks its fields against the
// ranges of Hufford 1995 (subroutine qlrpfl and its input checks).
func (m ITM) resolve() (itmConfig, error) {
	c := itmConfig{
		climate: m.Climate,
		n0:      m.N0,
		ns:      m.Ns,
		eps:     m.Ground.Permittivity,
		sigma:   m.Ground.ConductivitySM,
		pol:     m.Polarization,
		mode:    m.Variability,
		elimLoc: m.LocationEliminated,
		elimSi:  m.SituationEliminated,
	}
	if c.climate == 0 {
		c.climate = ITMContinentalTemperate
	}
	if c.climate < ITMEquatorial || c.climate > ITMMaritimeTemperateAtSea {
		return c, fmt.Errorf("%w: radio climate %d must be 1–7 (5 is continental temperate)", ErrBadParams, int(m.Climate))
	}
	switch {
	case c.ns != 0 && c.n0 != 0:
		return c, fmt.Errorf("%w: give the surface refractivity as N0 (%g) or as Ns (%g), not both", ErrBadParams, m.N0, m.Ns)
	case c.ns != 0:
		if !(c.ns >= 150 && c.ns <= 400) {
			return c, fmt.Errorf("%w: surface refractivity Ns %g N-units must be 150–400", ErrBadParams, m.Ns)
		}
	default:
		if c.n0 == 0 {
			c.n0 = ITMDefaultN0
		}
		if !(c.n0 >= 250 && c.n0 <= 400) {
			return c, fmt.Errorf("%w: sea-level surface refractivity N0 %g N-units must be 250–400 (301 is typical)", ErrBadParams, m.N0)
		}
	}
	if m.Ground == (Ground{}) {
		c.eps, c.sigma = ITMAverageGround.Permittivity, ITMAverageGround.ConductivitySM
	}
	if !(c.eps >= 1) || math.IsInf(c.eps, 0) {
		return c, fmt.Errorf("%w: ground relative permittivity %g must be 1 or more (15 is average ground)", ErrBadParams, c.eps)
	}
	if !(c.sigma > 0) || math.IsInf(c.sigma, 0) {
		return c, fmt.Errorf("%w: ground conductivity %g S/m must be more than 0 (0.005 is average ground)", ErrBadParams, c.sigma)
	}
	if c.pol != Vertical && c.pol != Horizontal {
		return c, fmt.Errorf("%w: unknown polarization %d; use Vertical or Horizontal", ErrBadParams, int(c.pol))
	}
	if c.mode < ITMMobile || c.mode > ITMBroadcast {
		return c, fmt.Errorf("%w: unknown mode of variability %d; use ITMMobile, ITMSingleMessage, ITMAccidental or ITMBroadcast", ErrBadParams, int(c.mode))
	}
	if m.ReliabilityPct != 0 || m.ConfidencePct != 0 {
		if m.TimePct != 0 || m.LocationPct != 0 || m.SituationPct != 0 {
			return c, fmt.Errorf("%w: give time/location/situation percentages or reliability/confidence, not both", ErrBadParams)
		}
		c.time, c.loc, c.sit = pctOrDefault(m.ReliabilityPct), 50, pctOrDefault(m.ConfidencePct)
		// Confidence is checked before reliability (Hufford 1995 order).
		if !(c.sit > 0 && c.sit < 100) {
			return c, fmt.Errorf("%w: confidence %g %% must be between 0 and 100 (exclusive)", ErrBadParams, m.ConfidencePct)
		}
		if !(c.time > 0 && c.time < 100) {
			return c, fmt.Errorf("%w: reliability %g %% must be between 0 and 100 (exclusive)", ErrBadParams, m.ReliabilityPct)
		}
		return c, nil
	}
	c.time, c.loc, c.sit = pctOrDefault(m.TimePct), pctOrDefault(m.LocationPct), pctOrDefault(m.SituationPct)
	for _, q := range [...]struct {
		name string
		v    float64
	}{{"situation", c.sit}, {"time", c.time}, {"location", c.loc}} {
		if !(q.v > 0 && q.v < 100) {
			return c, fmt.Errorf("%w: %s percentage %g %% must be between 0 and 100 (exclusive)", ErrBadParams, q.name, q.v)
		}
	}
	return c, nil
}

// checkITMParams checks the frequency and antenna heights of prm against
// the model's limits (Hufford 1995: 20–20 000 MHz, 0.5–3000 m) and sets
// the warnings for the narrower ranges the model was tested on.
func checkITMParams(prm Params) (ITMWarnings, error) {
	var w ITMWarnings
	for _, t := range [...]struct {
		name string
		h    float64
		warn ITMWarnings
	}{{"transmitter", prm.TxHeightM, ITMWarnTxHeight}, {"receiver", prm.RxHeightM, ITMWarnRxHeight}} {
		if !(t.h >= 0.5 && t.h <= 3000) {
			return w, fmt.Errorf("%w: %s antenna height %g m is outside the ITM range 0.5–3000 m", ErrBadParams, t.name, t.h)
		}
		if t.h < 1 || t.h > 1000 {
			w |= t.warn
		}
	}
	f := prm.FreqMHz
	if !(f >= 20 && f <= 20000) {
		return w, fmt.Errorf("%w: frequency %g MHz is outside the ITM range 20–20 000 MHz", ErrBadParams, f)
	}
	if f < 40 || f > 10000 {
		w |= ITMWarnFrequency
	}
	return w, nil
}

// Loss returns the ITM basic transmission loss of path p (PathLossDB), the
// model's free-space loss 32.45 + 20 log f + 20 log d (FreeSpaceDB, f in
// MHz, d in km), their difference (ExcessDB) and the intermediate values
// in Result.ITM; LineOfSight, WorstClearanceF1 and ObstacleIndex come from
// the profile as for the other models, with the model's effective earth
// radius. Errors wrap ErrBadParams (a field of m or prm out of range, or a
// refractivity the path's elevation puts out of range) or ErrBadPath (a
// profile that is not equally spaced, has non-finite heights, or a
// geometry where the model is undefined).
func (m ITM) Loss(p Path, prm Params) (Result, error) {
	cfg, err := m.resolve()
	if err != nil {
		return Result{}, err
	}
	warn, err := checkITMParams(prm)
	if err != nil {
		return Result{}, err
	}
	rp, err := prm.resolve()
	if err != nil {
		return Result{}, err
	}
	var ip itmPath
	if err := ip.load(p, prm.TxHeightM, prm.RxHeightM); err != nil {
		return Result{}, err
	}
	ip.warn = warn
	if err := ip.prepare(&cfg, prm.FreqMHz); err != nil {
		return Result{}, err
	}
	rp.aeKM = ip.ae / 1000
	s, err := scanProfile(p, rp)
	if err != nil {
		return Result{}, err
	}
	ar := ip.reference()
	v := ip.variability(&cfg, ar.aref)

	dKM := ip.d / 1000
	r := Result{Model: m.Name()}
	c := s.clearance()
	r.LineOfSight, r.WorstClearanceF1, r.ObstacleIndex = c.LineOfSight, c.WorstF1, c.Index
	r.FreeSpaceDB = itmFreeSpaceDB(prm.FreqMHz, dKM)
	r.ExcessDB = v.av
	r.PathLossDB = r.FreeSpaceDB + r.ExcessDB
	r.ITM = ITMTerms{
		Mode:                 ar.mode,
		DistanceKM:           dKM,
		SurfaceRefractivityN: ip.ns,
		EarthRadiusKM:        ip.ae / 1000,
		DeltaHM:              ip.dh,
		EffHeightTxM:         ip.he[0],
		EffHeightRxM:         ip.he[1],
		HorizonTxKM:          ip.dl[0] / 1000,
		HorizonRxKM:          ip.dl[1] / 1000,
		HorizonAngleTxMrad:   ip.the[0] * 1000,
		HorizonAngleRxMrad:   ip.the[1] * 1000,
		ReferenceDB:          ar.aref,
		ClimateMedianDB:      v.vmed,
		Warnings:             ip.warn | v.warn,
	}
	if !finite(r.PathLossDB) || !finite(r.ITM.ReferenceDB) {
		return Result{}, fmt.Errorf("%w: the ITM is undefined for this geometry (%.4g km path, effective heights %.4g and %.4g m): check the profile and antenna heights", ErrBadPath, dKM, ip.he[0], ip.he[1])
	}
	return r, nil
}

// itmFreeSpaceDB is the free-space loss of the model, 32.45 + 20 log f +
// 20 log d with f in MHz and d in km (Hufford 1995, subroutine lrprop's
// caller; ITU-R P.525-4 eq. 9 with rounded constant).
func itmFreeSpaceDB(fMHz, dKM float64) float64 {
	return 32.45 + 20*math.Log10(fMHz) + 20*math.Log10(dKM)
}
