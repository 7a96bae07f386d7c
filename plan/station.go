package plan

// The ends of a link: a station the team sets up, a target it must reach,
// and the kit at each.

import (
	"github.com/mastlink/mastlink/plan/exposure"
	"github.com/mastlink/mastlink/plan/feedline"
	"github.com/paulmach/orb"
)

// Radio is a transceiver's transmitter power and receiver sensitivity.
type Radio struct {
	PowerW         float64 // transmitter output, W
	SensitivityDBm float64 // receiver sensitivity (e.g. 12 dB SINAD), dBm
}

// Antenna is an antenna's gain toward the horizon and its height above the
// ground at its foot.
type Antenna struct {
	GainDBi float64 // dBi
	HeightM float64 // metres above ground
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
