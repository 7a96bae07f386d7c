package plan

import (
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
