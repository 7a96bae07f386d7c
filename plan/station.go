package plan

// The ends of a link: a station the team sets up, a target it must reach,
// and the kit at each.

import (
	"github.com/mastlink/mastlink/plan/antenna"
	"github.com/mastlink/mastlink/plan/exposure"
	"github.com/mastlink/mastlink/plan/feedline"
	"github.com/mastlink/mastlink/propagation"
	"github.com/paulmach/orb"
)

// Radio is a transceiver's transmitter power and receiver sensitivity.
type Radio struct {
	PowerW         float64 // transmitter output, W
	SensitivityDBm float64 // receiver sensitivity (e.g. 12 dB SINAD), dBm
}

// Antenna is an antenna as it stands at one end of a link: its peak gain,
// its height above the ground at its foot, the catalog type whose pattern
// shapes the gain toward each path, where a directional one is aimed, and
// the losses of its surroundings (an operator's body, terminal clutter).
// The zero value is an isotropic antenna of 0 dBi at ground level in the
// open. See AntennaOptions for the one parser of these fields.
type Antenna struct {
	GainDBi float64 // peak gain, dBi (the catalog's unless overridden)
	HeightM float64 // metres above ground

	// Type is the catalog entry whose pattern gives the gain toward a
	// path (antenna.Antenna.RelativeDB added to GainDBi); nil means the
	// same GainDBi in every direction, as a bare gain figure.
	Type *antenna.Antenna
	// BearingDeg is where a directional Type is aimed, degrees clockwise
	// from true north; used only when Aimed.
	BearingDeg float64
	// Aimed says BearingDeg was given. A directional antenna that is not
	// aimed is taken as pointed at the far end of each link.
	Aimed bool
	// BodyLossDB is the loss of an operator's body next to a handheld's
	// antenna, dB (positive); BodyLoss says how it was chosen ("face,
	// typical", "belt, typical", "given"; "" for none).
	BodyLossDB float64
	BodyLoss   string
	// Clutter is the terminal clutter class around the antenna (ITU-R
	// P.2108-1 §3.1); propagation.NoClutter adds nothing.
	Clutter propagation.ClutterClass
}

// End is one end of a link: a named position with its kit.
type End struct {
	Name     string
	Pos      orb.Point // lon, lat, degrees WGS84
	Radio    Radio
	Antenna  Antenna
	Feedline feedline.Line
}

// Station is a place the team sets up: its kit and exposure habits.
type Station struct {
	End
	// Exposure holds the station's operating habits for the RF-exposure
	// evaluation (mode, time on the air, standard, head height, ground
	// reflection); power, gain, feedline, frequency and height are filled
	// in from the station when it is evaluated.
	Exposure exposure.Input
	// Coverage is the coverage map the plan asks for around the station
	// (nil when none).
	Coverage *CoverageSpec
}

// TargetKind says how a target's links are checked.
type TargetKind int

// Kinds of target.
const (
	// Simplex targets talk and listen on one frequency; checked both ways.
	Simplex TargetKind = iota
	// Repeater targets listen on one frequency and transmit on another:
	// talk-in is checked on ListenMHz with the station transmitting,
	// talk-out on TransmitMHz with the repeater transmitting.
	Repeater
)

// Target is a place the stations must reach.
type Target struct {
	End
	Kind        TargetKind
	FreqMHz     float64 // simplex frequency
	ListenMHz   float64 // repeater input (the station transmits here)
	TransmitMHz float64 // repeater output (the station listens here)
	Optional    bool    // reported but not part of the requirement
}
