package plan

import "github.com/paulmach/orb"

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

// Feedline is the line between radio and antenna.
type Feedline struct {
	Cable      string  // catalog name; "" means no line (0 dB)
	LengthM    float64 // metres
	Connectors int     // mated connector pairs
	SWR        float64 // SWR at the antenna; 0 or 1 means matched
}

// End is one end of a link: a named position with its kit.
type End struct {
	Name     string
	Pos      orb.Point // lon, lat, degrees WGS84
	Radio    Radio
	Antenna  Antenna
	Feedline Feedline
}
