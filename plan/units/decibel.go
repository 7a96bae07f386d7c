package units

// Decibel arithmetic of the radio trade: dBm and watts, microvolts across a
// 50 Ω receiver input, dBi and dBd, and S-meter readings.

import (
	"fmt"
	"math"
)

// DipoleGainDBi is the gain of a half-wave dipole over an isotropic
// radiator, 2.15 dB (numeric gain 1.64), the reference of dBd figures
// (FCC OET Bulletin 65, ed. 97-01).
const DipoleGainDBi = 2.15

// DBiFromDBd converts a gain referred to a half-wave dipole (dBd) to one
// referred to an isotropic radiator (dBi): dBi = dBd + 2.15 (OET Bulletin 65).
func DBiFromDBd(dBd float64) float64 { return dBd + DipoleGainDBi }

// DBmFromW converts watts to dBm, 10 log10(P / 1 mW). Zero gives −Inf,
// a negative power NaN.
func DBmFromW(w float64) float64 { return 10*math.Log10(w) + 30 }

// WFromDBm converts dBm to watts, 1 mW · 10^(dBm/10).
func WFromDBm(dBm float64) float64 { return math.Pow(10, (dBm-30)/10) }

// ReceiverInputOhms is the input resistance that microvolt figures of
// receiver sensitivity refer to, 50 Ω.
const ReceiverInputOhms = 50

// microvoltRefDBm is the level of 1 µV across ReceiverInputOhms:
// P = V²/R = (1e-6 V)² / 50 Ω = 2e-14 W = −106.9897 dBm.
var microvoltRefDBm = DBmFromW(1e-12 / ReceiverInputOhms)

// DBmFromMicrovolts converts a voltage across a 50 Ω receiver input (the
// potential difference, "pd") in µV to dBm, from P = V²/R:
// dBm = 20 log10(µV) − 106.99. Zero gives −Inf.
func DBmFromMicrovolts(uV float64) float64 { return 20*math.Log10(uV) + microvoltRefDBm }

// MicrovoltsFromDBm converts dBm to the voltage across a 50 Ω input in µV,
// the inverse of DBmFromMicrovolts.
func MicrovoltsFromDBm(dBm float64) float64 { return math.Pow(10, (dBm-microvoltRefDBm)/20) }

// S-meter calibration, IARU Region 1 Technical Recommendation R.1
// (Brighton 1981, amended Torremolinos 1990; as given in the IARU Region 1
// HF Managers' Handbook v9, 2018, §4.1.3): S9 is an available power of
// −73 dBm (50 µV across 50 Ω) on the bands below 30 MHz and −93 dBm (5 µV)
// above 30 MHz; one S-unit is 6 dB.
const (
	S9HFDBm        = -73.0
	S9VHFDBm       = -93.0
	SUnitDB        = 6.0
	SMeterHFMaxMHz = 30.0 // the HF calibration applies below this frequency
)

// S9DBm returns the S9 level in dBm at freqMHz by IARU Region 1 R.1:
// −73 dBm below 30 MHz, −93 dBm from 30 MHz up.
func S9DBm(freqMHz float64) float64 {
	if freqMHz < SMeterHFMaxMHz {
		return S9HFDBm
	}
	return S9VHFDBm
}

// SMeter renders a received level in dBm at freqMHz as an S-meter reading
// by IARU Region 1 R.1 (S9DBm: −73 dBm below 30 MHz, −93 dBm above; 6 dB
// per unit). Below S9 the reading is the highest S-unit the level reaches
// (above 30 MHz "S7" from −105 dBm up to just below −99 dBm); from S9 up it
// is "S9" or "S9+NdB" with N rounded to whole dB; below S1 (S9 − 48 dB) it
// is "below S1". NaN gives "".
func SMeter(dBm, freqMHz float64) string {
	s9 := S9DBm(freqMHz)
	s1 := s9 - 8*SUnitDB
	switch {
	case math.IsNaN(dBm):
		return ""
	case dBm < s1:
		return "below S1"
	case dBm < s9:
		return fmt.Sprintf("S%d", 1+int(math.Floor((dBm-s1)/SUnitDB)))
	}
	over := math.Round(dBm - s9)
	if over == 0 {
		return "S9"
	}
	return fmt.Sprintf("S9+%gdB", over)
}
