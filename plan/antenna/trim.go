package antenna

// Resonant elements: starting lengths to cut, and the trimming rule.

import (
	"errors"
	"fmt"
	"math"
	"strconv"
	"strings"
)

// ErrElementInput is wrapped by every error about unusable input to Trim,
// ElementLengthM and ParseVelocityFactor.
var ErrElementInput = errors.New("bad element input")

// SpeedOfLightMPerS is the speed of light in vacuum, m/s (exact, SI).
const SpeedOfLightMPerS = 299_792_458

// Velocity factors for starting lengths of resonant elements (fraction of
// the free-space wavelength).
const (
	// VelocityFactorWire is the shortening of a thin wire or rod element
	// against the free-space wavelength (end effect): 0.95, the factor in the
	// half-wave rule 468/f ft (f in MHz) of the amateur handbooks, which is
	// 0.952 of a free-space half wave (common practice).
	VelocityFactorWire = 0.95
	// VelocityFactorSolidCoax is the velocity factor of coax with a solid
	// polyethylene dielectric such as RG-58 and RG-213: 0.66 (published:
	// ARRL General Class License Manual, Table 6-1), for elements and stubs
	// made of coax.
	VelocityFactorSolidCoax = 0.66
	// VelocityFactorFoamCoax is a typical velocity factor of coax with a
	// foamed polyethylene dielectric: 0.80 (typical: 0.78–0.82 by maker; use
	// the cable's own figure where known).
	VelocityFactorFoamCoax = 0.80
)

// StartingLengthCaution goes with every starting length: the lengths are
// points to start from, never final.
const StartingLengthCaution = "Starting lengths are starting points: cut long, then trim. " +
	"The mounting (mast, clamps, nearby metal, the angle of the radials), the feedline and the element's " +
	"thickness all move the resonant frequency, so measure the antenna where and as it will be used " +
	"and trim a little at a time."

// ElementLengthM returns the physical length in metres of an element
// wavelengths long (0.25 for a quarter wave, 0.5 for a half wave) at freqMHz,
// for a velocity factor in (0, 1]: wavelengths × c/f × velocityFactor, with c
// the speed of light in vacuum. It is a starting length to trim (see
// StartingLengthCaution). Frequencies and wavelengths must be finite and
// positive.
func ElementLengthM(freqMHz, wavelengths, velocityFactor float64) (float64, error) {
	switch {
	case !(freqMHz > 0) || math.IsInf(freqMHz, 0):
		return 0, fmt.Errorf("%w: frequency %g MHz must be positive", ErrElementInput, freqMHz)
	case !(wavelengths > 0) || math.IsInf(wavelengths, 0):
		return 0, fmt.Errorf("%w: element of %g wavelengths must be positive", ErrElementInput, wavelengths)
	case !(velocityFactor > 0 && velocityFactor <= 1):
		return 0, fmt.Errorf("%w: velocity factor %g must be over 0 and at most 1", ErrElementInput, velocityFactor)
	}
	return wavelengths * SpeedOfLightMPerS / (freqMHz * 1e6) * velocityFactor, nil
}

// QuarterWaveM returns the starting length in metres of a quarter-wave
// element at freqMHz for a velocity factor (see ElementLengthM).
func QuarterWaveM(freqMHz, velocityFactor float64) (float64, error) {
	return ElementLengthM(freqMHz, 0.25, velocityFactor)
}

// HalfWaveM returns the starting length in metres of a half-wave element at
// freqMHz for a velocity factor (see ElementLengthM).
func HalfWaveM(freqMHz, velocityFactor float64) (float64, error) {
	return ElementLengthM(freqMHz, 0.5, velocityFactor)
}

// ParseVelocityFactor reads a velocity factor: a number in (0, 1], or one of
// the names "wire" (VelocityFactorWire), "coax" or "coax-solid"
// (VelocityFactorSolidCoax) and "coax-foam" (VelocityFactorFoamCoax). Case
// and surrounding spaces do not matter.
func ParseVelocityFactor(s string) (float64, error) {
	t := strings.ToLower(strings.TrimSpace(s))
	switch t {
	case "wire":
		return VelocityFactorWire, nil
	case "coax", "coax-solid":
		return VelocityFactorSolidCoax, nil
	case "coax-foam":
		return VelocityFactorFoamCoax, nil
	}
	v, err := strconv.ParseFloat(t, 64)
	if err != nil || !(v > 0 && v <= 1) {
		return 0, fmt.Errorf("%w: velocity factor %q: want a number over 0 and at most 1, or wire, coax-solid, coax-foam", ErrElementInput, s)
	}
	return v, nil
}

// TrimmedLength is one element's length before and after trimming, in
// metres. CutM is NowM − NewM: what to cut off, or, when negative, what to
// add.
type TrimmedLength struct {
	NowM float64 // length now, m
	NewM float64 // length for the wanted resonance, m
	CutM float64 // NowM − NewM, m; negative means lengthen
}

// TrimResult is the outcome of Trim.
type TrimResult struct {
	// Ratio is measured over wanted resonant frequency, the factor every
	// length is multiplied by.
	Ratio   float64
	Lengths []TrimmedLength // one per element, in the order given
}

// Trim applies the trimming rule for resonant elements (common practice):
// a resonant element's length is inversely proportional to its resonant
// frequency, so an antenna that resonates at measuredMHz is brought to
// wantedMHz by multiplying each element's length by measuredMHz/wantedMHz.
// Lengths are in metres, frequencies in MHz, all finite and positive.
//
// The rule holds for small corrections (a few percent); after a large one,
// measure again before the last cut. Leave each element a little longer
// than the figure and measure again: a cut cannot be undone.
func Trim(measuredMHz, wantedMHz float64, lengthsM []float64) (TrimResult, error) {
	switch {
	case !(measuredMHz > 0) || math.IsInf(measuredMHz, 0):
		return TrimResult{}, fmt.Errorf("%w: measured resonance %g MHz must be positive", ErrElementInput, measuredMHz)
	case !(wantedMHz > 0) || math.IsInf(wantedMHz, 0):
		return TrimResult{}, fmt.Errorf("%w: wanted resonance %g MHz must be positive", ErrElementInput, wantedMHz)
	case len(lengthsM) == 0:
		return TrimResult{}, fmt.Errorf("%w: no element lengths to trim", ErrElementInput)
	}
	r := TrimResult{Ratio: measuredMHz / wantedMHz, Lengths: make([]TrimmedLength, len(lengthsM))}
	for i, l := range lengthsM {
		if !(l > 0) || math.IsInf(l, 0) {
			return TrimResult{}, fmt.Errorf("%w: element %d: length %g m must be positive", ErrElementInput, i+1, l)
		}
		n := l * r.Ratio
		r.Lengths[i] = TrimmedLength{NowM: l, NewM: n, CutM: l - n}
	}
	return r, nil
}
