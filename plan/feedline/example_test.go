package feedline_test

import (
	"fmt"

	"github.com/mastlink/mastlink/plan/feedline"
)

func ExampleLine_Loss() {
	cable, err := feedline.LookupCable("rg8x")
	if err != nil {
		fmt.Println(err)
		return
	}
	line := feedline.NewLine(cable, 15)
	line.SWR, line.Connectors = 1.5, 2
	loss, _ := line.Loss(146)
	fmt.Printf("%s, %.0f m at %.0f MHz: matched %.2f dB + SWR %.2f dB + connectors %.2f dB = %.2f dB (%.0f%% delivered)\n",
		loss.Cable, loss.LengthM, loss.FreqMHz, loss.MatchedLossDB, loss.SWRLossDB,
		loss.ConnectorLossDB, loss.TotalLossDB, 100*loss.DeliveredFraction)
	// Output: RG-8X, 15 m at 146 MHz: matched 2.23 dB + SWR 0.11 dB + connectors 0.20 dB = 2.55 dB (56% delivered)
}

func ExampleCableList() {
	for _, c := range feedline.CableList(146)[:3] {
		fmt.Printf("%-7s %5.1f dB/100 m at 146 MHz, VF %.2f\n", c.Name, c.LossDBPer100M, c.VelocityFactor)
	}
	// Output:
	// RG-174   33.8 dB/100 m at 146 MHz, VF 0.66
	// RG-58    19.5 dB/100 m at 146 MHz, VF 0.66
	// RG-8X    14.9 dB/100 m at 146 MHz, VF 0.80
}
