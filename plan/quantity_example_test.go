package plan_test

import (
	"fmt"

	"github.com/mastlink/mastlink/plan"
)

func ExampleParseLengthM() {
	for _, s := range []string{"12m", "40ft", "1.5 km", "12 meters"} {
		m, err := plan.ParseLengthM(s)
		if err != nil {
			fmt.Println("--height:", err)
			continue
		}
		fmt.Printf("%s = %.3f m\n", s, m)
	}
	// Output:
	// 12m = 12.000 m
	// 40ft = 12.192 m
	// 1.5 km = 1500.000 m
	// --height: "12 meters": unknown unit "meters" (use m, km, ft or mi)
}

func ExampleParseSensitivityDBm() {
	dBm, _ := plan.ParseSensitivityDBm("0.25uV")
	fmt.Printf("0.25 µV across 50 Ω = %.1f dBm\n", dBm)
	// Output: 0.25 µV across 50 Ω = -119.0 dBm
}

func ExampleParsePowerW() {
	w, _ := plan.ParsePowerW("37dBm")
	fmt.Printf("37 dBm = %.2f W\n", w)
	_, err := plan.ParsePowerW("5MW")
	fmt.Println(err)
	// Output:
	// 37 dBm = 5.01 W
	// "5MW": megawatts are above 100 kW (for milliwatts write mW)
}

func ExampleParseLengthRange() {
	r, _ := plan.ParseLengthRange("10ft..25ft step 5ft")
	for _, m := range r.ValuesM() {
		fmt.Printf("%s = %s\n", plan.FormatHeight(m, true), plan.FormatHeight(m, false))
	}
	// Output:
	// 10.0 ft = 3.0 m
	// 15.0 ft = 4.6 m
	// 20.0 ft = 6.1 m
	// 25.0 ft = 7.6 m
}

func ExampleParsePoint() {
	p, _ := plan.ParsePoint("46.25,7.5")
	fmt.Printf("lat %.2f°, lon %.2f°\n", p.Lat(), p.Lon())
	// Output: lat 46.25°, lon 7.50°
}

func ExampleFeedline_Loss() {
	cable, err := plan.LookupCable("rg8x")
	if err != nil {
		fmt.Println(err)
		return
	}
	line := plan.NewFeedline(cable, 15)
	line.SWR, line.Connectors = 1.5, 2
	loss, _ := line.Loss(146)
	fmt.Printf("%s, %.0f m at %.0f MHz: matched %.2f dB + SWR %.2f dB + connectors %.2f dB = %.2f dB (%.0f%% delivered)\n",
		loss.Cable, loss.LengthM, loss.FreqMHz, loss.MatchedLossDB, loss.SWRLossDB,
		loss.ConnectorLossDB, loss.TotalLossDB, 100*loss.DeliveredFraction)
	// Output: RG-8X, 15 m at 146 MHz: matched 2.23 dB + SWR 0.11 dB + connectors 0.20 dB = 2.55 dB (56% delivered)
}

func ExampleCableList() {
	for _, c := range plan.CableList(146)[:3] {
		fmt.Printf("%-7s %5.1f dB/100 m at 146 MHz, VF %.2f\n", c.Name, c.LossDBPer100M, c.VelocityFactor)
	}
	// Output:
	// RG-174   33.8 dB/100 m at 146 MHz, VF 0.66
	// RG-58    19.5 dB/100 m at 146 MHz, VF 0.66
	// RG-8X    14.9 dB/100 m at 146 MHz, VF 0.80
}

func ExampleLinkBudget_Levels() {
	b := plan.LinkBudget{
		TxPowerDBm:       plan.DBmFromW(5),
		TxFeedlineLossDB: 1.5,
		TxGainDBi:        2.15,
		PathLossDB:       120,
		RxGainDBi:        6,
		RxFeedlineLossDB: 2,
		RxSensitivityDBm: plan.DBmFromMicrovolts(0.25),
	}
	l := b.Levels()
	fmt.Printf("EIRP %.1f dBm, received %.1f dBm (%s), margin %.1f dB\n",
		l.EIRPDBm, l.RxPowerDBm, plan.SMeter(l.RxPowerDBm), l.MarginDB)
	// Output: EIRP 37.6 dBm, received -78.4 dBm (S9+15dB), margin 40.7 dB
}

func ExampleThermalNoiseDBm() {
	fmt.Printf("12.5 kHz channel, 6 dB noise figure: %.1f dBm\n", plan.ThermalNoiseDBm(12.5e3, 6))
	// Output: 12.5 kHz channel, 6 dB noise figure: -127.0 dBm
}
