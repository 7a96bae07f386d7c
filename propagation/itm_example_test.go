package propagation_test

import (
	"fmt"

	"github.com/mastlink/mastlink/propagation"
)

func ExampleITM() {
	// An invented 12 km profile sampled every 500 m with a ridge near
	// 5 km; a 10 m mast and a 2 m handheld at 146 MHz. The Longley–Rice
	// defaults (continental temperate, N0 301, average ground), and the
	// loss not exceeded at 90 % reliability with 50 % confidence.
	h := []float64{420, 425, 430, 440, 450, 462, 470, 485, 495, 505, 500, 480, 460,
		440, 420, 405, 400, 398, 395, 392, 390, 389, 388, 386, 385}
	p := propagation.Path{DistKM: make([]float64, len(h)), HeightM: h}
	for i := range h {
		p.DistKM[i] = 0.5 * float64(i)
	}
	prm := propagation.Params{FreqMHz: 146, TxHeightM: 10, RxHeightM: 2}
	m := propagation.DefaultITM()
	r, err := m.Loss(p, prm)
	if err != nil {
		fmt.Println(err)
		return
	}
	t := r.ITM
	fmt.Printf("%s median: free space %.1f dB + excess %.1f dB = %.1f dB (%v)\n", r.Model, r.FreeSpaceDB, r.ExcessDB, r.PathLossDB, t.Mode)
	fmt.Printf("N_s %.1f, Δh %.1f m, effective heights %.1f / %.1f m, horizons %.2f / %.2f km\n",
		t.SurfaceRefractivityN, t.DeltaHM, t.EffHeightTxM, t.EffHeightRxM, t.HorizonTxKM, t.HorizonRxKM)

	m.TimePct, m.LocationPct, m.SituationPct = 0, 0, 0
	m.ReliabilityPct, m.ConfidencePct = 90, 50
	r90, err := m.Loss(p, prm)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("90 %% reliability: %.1f dB; warnings: %v\n", r90.PathLossDB, r90.ITM.Warnings)
	// Output:
	// itm median: free space 97.3 dB + excess 29.4 dB = 126.7 dB (line of sight)
	// N_s 287.4, Δh 227.4 m, effective heights 17.4 / 18.6 m, horizons 4.50 / 7.00 km
	// 90 % reliability: 138.9 dB; warnings: none
}
