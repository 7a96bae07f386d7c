package terrain_test

import (
	"fmt"

	"github.com/mastlink/mastlink/terrain"
)

// The length of a path and the bearings to point an antenna along it.
func ExampleInverse() {
	distM, azi1Deg, azi2Deg := terrain.Inverse(45.5, 7.5, 45.6, 7.9)
	fmt.Printf("distance %.3f m\n", distM)
	fmt.Printf("azimuth at start %.6f° (clockwise from north)\n", azi1Deg)
	fmt.Printf("azimuth on arrival %.6f°, back azimuth %.6f°\n", azi2Deg, azi2Deg-180)
	// Output:
	// distance 33153.924 m
	// azimuth at start 70.270692° (clockwise from north)
	// azimuth on arrival 70.556237°, back azimuth -109.443763°
}

// Where 20 km on a bearing of 45° ends up.
func ExampleDirect() {
	lat, lon, aziDeg := terrain.Direct(45.5, 7.5, 45, 20000)
	fmt.Printf("end point %.6f°N %.6f°E, heading %.4f°\n", lat, lon, aziDeg)
	// Output:
	// end point 45.627099°N 7.681351°E, heading 45.1295°
}

// Sample points along a path every quarter of its length, as a terrain
// profile does at the DEM's resolution. (The points agree with
// GeographicLib GeodSolve 2.1.2 run from the start point with the same
// azimuth and distances.)
func ExampleInverseLine() {
	line, distM := terrain.InverseLine(45.5, 7.5, 45.6, 7.9)
	for i := range 5 {
		d := distM * float64(i) / 4
		lat, lon := line.Position(d)
		fmt.Printf("%.3f m: %.6f° %.6f°\n", d, lat, lon)
	}
	// Output:
	// 0.000 m: 45.500000° 7.500000°
	// 8288.481 m: 45.525131° 7.599867°
	// 16576.962 m: 45.550175° 7.699823°
	// 24865.443 m: 45.575132° 7.799867°
	// 33153.924 m: 45.600000° 7.900000°
}
