package report

import (
	"math"
	"testing"
)

func TestMetresPerDegree(t *testing.T) {
	// Reference: GeographicLib GeodSolve 2.1.2 (Debian), geodesic distances
	// over ±0.0005° about the latitude, along the meridian and the parallel
	// (`GeodSolve -i -p 6`), divided by 0.001°.
	cases := []struct {
		lat, latM, lonM float64
	}{
		{0, 110574.276, 111319.491},
		{45, 111131.777, 78846.835},
		{60, 111412.287, 55800.002},
	}
	for _, c := range cases {
		latM, lonM := MetresPerDegree(c.lat)
		if math.Abs(latM-c.latM) > 0.01 || math.Abs(lonM-c.lonM) > 0.01 {
			t.Errorf("MetresPerDegree(%g) = %.3f, %.3f m; want %.3f, %.3f m (GeodSolve)", c.lat, latM, lonM, c.latM, c.lonM)
		}
	}
}
