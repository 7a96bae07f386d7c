package plan

import (
	"fmt"
	"math"
	"strconv"
	"strings"

	"github.com/mastlink/mastlink/plan/units"
)

// CoverageDirection says which way of the link between a site and a cell a
// coverage map with a budget holds.
type CoverageDirection int

const (
	// CoverageWorse takes, in every cell, the lower of the two ways (the
	// site heard in the cell, the cell heard at the site).
	CoverageWorse CoverageDirection = iota
	// CoverageOut is the site transmitting to a radio in the cell.
	CoverageOut
	// CoverageBack is a radio in the cell transmitting to the site.
	CoverageBack
)

// ParseCoverageDirection reads "worse", "out" or "back" (any case).
func ParseCoverageDirection(s string) (CoverageDirection, error) {
	switch strings.ToLower(strings.TrimSpace(s)) {
	case "worse", "":
		return CoverageWorse, nil
	case "out":
		return CoverageOut, nil
	case "back":
		return CoverageBack, nil
	}
	return 0, fmt.Errorf("%q is not a direction (use out, back or worse)", s)
}

// ParseCoverageMode reads "loss" or "los" (any case).
func ParseCoverageMode(s string) (CoverageMode, error) {
	switch strings.ToLower(strings.TrimSpace(s)) {
	case "loss":
		return CoverageLoss, nil
	case "los":
		return CoverageLOS, nil
	}
	return 0, fmt.Errorf("%q is not a mode (use loss for the link over terrain, los for line of sight)", s)
}

// ParseCoverageValue reads "loss", "received" or "margin" (any case).
func ParseCoverageValue(s string) (CoverageValue, error) {
	switch strings.ToLower(strings.TrimSpace(s)) {
	case "loss":
		return ValuePathLoss, nil
	case "received":
		return ValueReceived, nil
	case "margin":
		return ValueMargin, nil
	}
	return 0, fmt.Errorf("%q is not a value (use loss for path loss in dB, received for the level in dBm, margin in dB)", s)
}

// ParseCoverageLevels reads a comma-separated list of levels, each a plain
// number or a number with the unit the map's value is in (dB for path loss
// and margin, dBm for received level; none for line of sight), strictly
// ascending, at most 12.
func ParseCoverageLevels(s string) ([]float64, error) {
	var out []float64
	for _, f := range strings.Split(s, ",") {
		f = strings.TrimSpace(f)
		if f == "" {
			return nil, fmt.Errorf("%q: empty level; give numbers separated by commas, e.g. 0,10,20", s)
		}
		num := strings.TrimSpace(strings.TrimSuffix(strings.TrimSuffix(f, "dBm"), "dB"))
		v, err := strconv.ParseFloat(num, 64)
		if err != nil || math.IsInf(v, 0) || math.IsNaN(v) {
			return nil, fmt.Errorf("%q is not a level; give a number (in dB, dBm, or 1 for line of sight)", f)
		}
		if len(out) > 0 && !(v > out[len(out)-1]) {
			return nil, fmt.Errorf("levels %g and %g are not ascending; give them from lowest to highest", out[len(out)-1], v)
		}
		out = append(out, v)
	}
	if len(out) > 12 {
		return nil, fmt.Errorf("%d levels; give at most 12", len(out))
	}
	return out, nil
}

// CoverageSpec is a coverage map a plan file asks for around a station
// (`coverage:` under the station). Zero fields take the command's
// defaults.
type CoverageSpec struct {
	RadiusM     float64      // m, > 0
	Mode        CoverageMode // CoverageLoss unless the plan says
	Value       CoverageValue
	HasValue    bool      // Value was given; else margin (loss mode)
	Levels      []float64 // ascending, in the value's unit; nil for the defaults
	ResolutionM float64   // cell size, m; 0 for the elevation data's cells
	Line        int       // line of `coverage:` in the plan file
}

// CoverageBudgets returns the budgets of a coverage map between site (the
// station whose map it is) and cell (the radio in every cell) at freqMHz:
// out (site transmitting, cell receiving), back (cell transmitting, site
// receiving), or both for CoverageWorse; received level and margin then
// take the lower of the two in every cell. Each budget is the link budget
// of Env.Evaluate without the path loss: EIRP = power (dBm) − feedline
// loss (dB) + gain (dBi) at the transmitter; the receiving antenna's gain
// less its feedline loss; the receiver's sensitivity (dBm). Gains are the
// antennas' peak gains (a catalog pattern is not applied cell by cell); a
// handheld's body loss and each end's ITU-R P.2108-1 §3.1 terminal clutter
// loss (Antenna.ClutterLossDB) are taken off as Env.Evaluate does. A direction
// whose transmitter has no power or whose receiver has no sensitivity is
// left out; the error says when none is left, or a feedline's loss cannot
// be worked out at freqMHz.
func CoverageBudgets(site, cell End, freqMHz float64, dir CoverageDirection) ([]CoverageBudget, error) {
	if !(freqMHz > 0) {
		return nil, fmt.Errorf("%w: no frequency given", ErrCoverage)
	}
	var out []CoverageBudget
	for _, way := range []struct {
		tx, rx End
		d      CoverageDirection
	}{{site, cell, CoverageOut}, {cell, site, CoverageBack}} {
		if dir != CoverageWorse && dir != way.d {
			continue
		}
		if way.tx.Radio.PowerW <= 0 || way.rx.Radio.SensitivityDBm == 0 {
			continue
		}
		txFL, err := way.tx.Feedline.Loss(freqMHz)
		if err != nil {
			return nil, fmt.Errorf("%s: feedline: %w", way.tx.Name, err)
		}
		rxFL, err := way.rx.Feedline.Loss(freqMHz)
		if err != nil {
			return nil, fmt.Errorf("%s: feedline: %w", way.rx.Name, err)
		}
		txL, err := way.tx.losses(freqMHz)
		if err != nil {
			return nil, err
		}
		rxL, err := way.rx.losses(freqMHz)
		if err != nil {
			return nil, err
		}
		out = append(out, CoverageBudget{
			EIRPDBm:          EIRPDBm(units.DBmFromW(way.tx.Radio.PowerW), txFL.TotalLossDB, way.tx.Antenna.GainDBi) - txL.bodyDB - txL.clutterDB,
			RxNetGainDB:      way.rx.Antenna.GainDBi - rxFL.TotalLossDB - rxL.bodyDB - rxL.clutterDB,
			RxSensitivityDBm: way.rx.Radio.SensitivityDBm,
		})
	}
	if len(out) == 0 {
		return nil, fmt.Errorf("%w: no direction has a transmitter power and a receiver sensitivity", ErrCoverage)
	}
	return out, nil
}

// CoveragePattern returns the antenna's horizontal pattern for a coverage
// map (CoverageRequest.SitePattern): its gain toward each azimuth relative
// to its peak gain, dB (Antenna.GainTowardDBi at 0° elevation, the catalog
// pattern aimed at BearingDeg). It is nil for an antenna without a
// directional catalog type, and for a directional one given no bearing,
// which a map takes as turned toward every cell.
func (a Antenna) CoveragePattern() func(azimuthDeg float64) float64 {
	if !a.Directional() || !a.Aimed {
		return nil
	}
	return func(azimuthDeg float64) float64 { return a.GainTowardDBi(azimuthDeg, 0) - a.GainDBi }
}
