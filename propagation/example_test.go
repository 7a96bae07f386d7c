package propagation_test

import (
	"fmt"

	"github.com/mastlink/mastlink/propagation"
)

func ExampleFreeSpaceLossDB() {
	// 146 MHz over 10 km (ITU-R P.525).
	fmt.Printf("%.2f dB\n", propagation.FreeSpaceLossDB(10, 146))
	// Output: 95.73 dB
}

func ExampleKnifeEdgeLossDB() {
	// A ridge 20 m above the line between two antennas, halfway along a
	// 10 km path at 146 MHz (ITU-R P.526-16 eqs. 26 and 31).
	nu := propagation.KnifeEdgeNu(20, 5, 5, propagation.WavelengthM(146, 0))
	fmt.Printf("ν = %.3f, J = %.2f dB\n", nu, propagation.KnifeEdgeLossDB(nu))
	// Output: ν = 0.395, J = 9.42 dB
}

func ExampleRadioHorizonKM() {
	// A 10 m mast and a 2 m handheld over a smooth earth with k = 4/3.
	ae := propagation.EffectiveEarthRadiusKM(propagation.DefaultKFactor)
	fmt.Printf("%.1f km\n", propagation.RadioHorizonKM(10, 2, ae))
	// Output: 18.9 km
}

func ExampleTerrain() {
	// An invented 12 km profile with a ridge at 5 km; a 10 m mast and a 2 m
	// handheld at 146 MHz, vertical polarization over land, k = 4/3.
	p := propagation.Path{
		DistKM:  []float64{0, 2, 4, 5, 6, 8, 10, 12},
		HeightM: []float64{420, 430, 470, 505, 460, 400, 390, 385},
	}
	prm := propagation.Params{FreqMHz: 146, TxHeightM: 10, RxHeightM: 2}
	var m propagation.Model = propagation.Terrain{}
	r, err := m.Loss(p, prm)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("%s: free space %.1f dB + excess %.1f dB = %.1f dB\n", r.Model, r.FreeSpaceDB, r.ExcessDB, r.PathLossDB)
	fmt.Printf("line of sight %v, worst clearance %.2f F1 at %g km\n", r.LineOfSight, r.WorstClearanceF1, p.DistKM[r.ObstacleIndex])
	// Output:
	// terrain: free space 97.3 dB + excess 31.2 dB = 128.5 dB
	// line of sight false, worst clearance -1.23 F1 at 5 km
}

func ExampleMarginForReliabilityDB() {
	// Margin over the median for 90 % of locations with σ = 5.5 dB, and the
	// probability that a link with 10 dB of margin works.
	fmt.Printf("%.2f dB\n", propagation.MarginForReliabilityDB(0.90, 5.5))
	fmt.Printf("%.1f %%\n", 100*propagation.LinkProbability(10, 5.5))
	// Output:
	// 7.05 dB
	// 96.5 %
}

func ExampleLossAtFrequencies() {
	// A repeater pair over the invented profile of ExampleTerrain: one
	// reading of the profile serves both frequencies.
	p := propagation.Path{
		DistKM:  []float64{0, 2, 4, 5, 6, 8, 10, 12},
		HeightM: []float64{420, 430, 470, 505, 460, 400, 390, 385},
	}
	prm := propagation.Params{TxHeightM: 10, RxHeightM: 2}
	freqs := []float64{146.97, 146.37}
	out := make([]propagation.Result, len(freqs))
	if err := propagation.LossAtFrequencies(propagation.Terrain{}, p, prm, freqs, out); err != nil {
		fmt.Println(err)
		return
	}
	for k, r := range out {
		fmt.Printf("%.2f MHz: %.1f dB\n", freqs[k], r.PathLossDB)
	}
	// Output:
	// 146.97 MHz: 128.6 dB
	// 146.37 MHz: 128.5 dB
}
