package propagation

import (
	"errors"
	"fmt"
	"math"
)

// ErrBadPath is wrapped by every error about an unusable Path.
var ErrBadPath = errors.New("propagation: bad path")

// ErrBadParams is wrapped by every error about unusable Params.
var ErrBadParams = errors.New("propagation: bad parameters")

// Polarization is the polarization of the radio wave, which matters for
// diffraction over a smooth earth (ITU-R P.526-16 §3.1.1, eqs. 11–12).
// The zero value is Vertical, the usual polarization of VHF/UHF mobile and
// portable radio.
type Polarization int

const (
	// Vertical polarization.
	Vertical Polarization = iota
	// Horizontal polarization.
	Horizontal
)

// String returns "vertical" or "horizontal".
func (p Polarization) String() string {
	switch p {
	case Vertical:
		return "vertical"
	case Horizontal:
		return "horizontal"
	}
	return fmt.Sprintf("Polarization(%d)", int(p))
}

// Ground holds the electrical constants of the earth's surface for
// smooth-earth diffraction: relative permittivity ε (dimensionless) and
// conductivity σ in S/m.
type Ground struct {
	Permittivity   float64 // relative permittivity ε, dimensionless, > 0
	ConductivitySM float64 // conductivity σ, S/m, ≥ 0
}

// Land and Sea are the ground constants ITU-R P.1812-8 §4.3.3 prescribes for
// the spherical-earth part of delta-Bullington diffraction: land ε = 22,
// σ = 0.003 S/m; sea ε = 80, σ = 5 S/m.
var (
	Land = Ground{Permittivity: 22, ConductivitySM: 0.003}
	Sea  = Ground{Permittivity: 80, ConductivitySM: 5}
)

// Path is a terrain profile between a transmitter and a receiver.
//
// DistKM holds distances in km from the transmitter's ground point,
// strictly increasing; the first point is the transmitter's ground and the
// last the receiver's, so the path length is DistKM[n−1] − DistKM[0]
// (normally DistKM[0] = 0). HeightM holds terrain heights in metres above
// mean sea level at the same points. ClutterM is optional (nil, or the same
// length): heights in metres of ground cover (trees, buildings) added to the
// terrain at intermediate points only, never at the two terminals (the
// convention of ITU-R P.1812-8 §3.2). A Path needs at least two points.
type Path struct {
	DistKM   []float64
	HeightM  []float64
	ClutterM []float64
}

// Params are the radio and atmosphere parameters of a path-loss calculation.
// Zero values of EarthRadiusKM, Ground and SpeedOfLight select defaults.
type Params struct {
	// FreqMHz is the frequency in MHz, > 0. The diffraction methods of
	// ITU-R P.526-16 apply above about 30 MHz.
	FreqMHz float64
	// TxHeightM and RxHeightM are the antenna heights in metres above the
	// ground at each end of the path (≥ 0).
	TxHeightM, RxHeightM float64
	// EarthRadiusKM is the effective earth radius in km; 0 selects
	// k = 4/3, 8494.67 km (see EffectiveEarthRadiusKM, KFactorFromDeltaN).
	EarthRadiusKM float64
	// Polarization of the wave; the zero value is Vertical.
	Polarization Polarization
	// Ground constants for smooth-earth diffraction; the zero value selects
	// Land.
	Ground Ground
	// SpeedOfLight in m/s used for the wavelength; 0 selects SpeedOfLightMS.
	// Validation sets fix their own (3e8 or 2.998e8).
	SpeedOfLight float64
}

// params is Params with defaults applied and the wavelength derived.
type params struct {
	freqMHz      float64
	txM, rxM     float64
	aeKM         float64
	pol          Polarization
	ground       Ground
	wavelengthM  float64
	speedOfLight float64
}

func finite(x float64) bool { return !math.IsNaN(x) && !math.IsInf(x, 0) }

// resolve validates prm and applies the defaults.
func (prm Params) resolve() (params, error) {
	rp := params{
		freqMHz:      prm.FreqMHz,
		txM:          prm.TxHeightM,
		rxM:          prm.RxHeightM,
		aeKM:         prm.EarthRadiusKM,
		pol:          prm.Polarization,
		ground:       prm.Ground,
		speedOfLight: prm.SpeedOfLight,
	}
	if !finite(rp.freqMHz) || rp.freqMHz <= 0 {
		return rp, fmt.Errorf("%w: frequency %g MHz must be a positive number", ErrBadParams, prm.FreqMHz)
	}
	if !finite(rp.txM) || rp.txM < 0 {
		return rp, fmt.Errorf("%w: transmitter antenna height %g m must be zero or more above ground", ErrBadParams, prm.TxHeightM)
	}
	if !finite(rp.rxM) || rp.rxM < 0 {
		return rp, fmt.Errorf("%w: receiver antenna height %g m must be zero or more above ground", ErrBadParams, prm.RxHeightM)
	}
	if rp.aeKM == 0 {
		rp.aeKM = EffectiveEarthRadiusKM(DefaultKFactor)
	}
	if !finite(rp.aeKM) || rp.aeKM < 0 {
		return rp, fmt.Errorf("%w: effective earth radius %g km must be positive (or 0 for k = 4/3)", ErrBadParams, prm.EarthRadiusKM)
	}
	if rp.pol != Vertical && rp.pol != Horizontal {
		return rp, fmt.Errorf("%w: unknown polarization %d; use Vertical or Horizontal", ErrBadParams, int(rp.pol))
	}
	if rp.ground == (Ground{}) {
		rp.ground = Land
	}
	if !finite(rp.ground.Permittivity) || rp.ground.Permittivity <= 0 ||
		!finite(rp.ground.ConductivitySM) || rp.ground.ConductivitySM < 0 {
		return rp, fmt.Errorf("%w: ground permittivity %g must be positive and conductivity %g S/m zero or more; use Land or Sea", ErrBadParams, rp.ground.Permittivity, rp.ground.ConductivitySM)
	}
	if rp.speedOfLight == 0 {
		rp.speedOfLight = SpeedOfLightMS
	}
	if !finite(rp.speedOfLight) || rp.speedOfLight < 0 {
		return rp, fmt.Errorf("%w: speed of light %g m/s must be positive (or 0 for 299792458)", ErrBadParams, prm.SpeedOfLight)
	}
	rp.wavelengthM = WavelengthM(rp.freqMHz, rp.speedOfLight)
	return rp, nil
}

// checkPath validates the shape of p; the values are checked while scanning.
func checkPath(p Path) error {
	n := len(p.DistKM)
	if n < 2 {
		return fmt.Errorf("%w: a profile needs at least 2 points (transmitter and receiver ground), got %d", ErrBadPath, n)
	}
	if len(p.HeightM) != n {
		return fmt.Errorf("%w: %d distances but %d heights; give one height per distance", ErrBadPath, n, len(p.HeightM))
	}
	if p.ClutterM != nil && len(p.ClutterM) != n {
		return fmt.Errorf("%w: %d distances but %d clutter heights; give one per distance or none", ErrBadPath, n, len(p.ClutterM))
	}
	return nil
}
