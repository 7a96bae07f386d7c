package units_test

import (
	"fmt"

	"github.com/mastlink/mastlink/plan/units"
)

func ExampleParseLengthM() {
	for _, s := range []string{"12m", "40ft", "1.5 km", "12 meters"} {
		m, err := units.ParseLengthM(s)
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
	dBm, _ := units.ParseSensitivityDBm("0.25uV")
	fmt.Printf("0.25 µV across 50 Ω = %.1f dBm\n", dBm)
	// Output: 0.25 µV across 50 Ω = -119.0 dBm
}

func ExampleParsePowerW() {
	w, _ := units.ParsePowerW("37dBm")
	fmt.Printf("37 dBm = %.2f W\n", w)
	_, err := units.ParsePowerW("5MW")
	fmt.Println(err)
	// Output:
	// 37 dBm = 5.01 W
	// "5MW": megawatts are above 100 kW (for milliwatts write mW)
}

func ExampleParseLengthRange() {
	r, _ := units.ParseLengthRange("10ft..25ft step 5ft")
	for _, m := range r.ValuesM() {
		fmt.Printf("%s = %s\n", units.FormatHeight(m, true), units.FormatHeight(m, false))
	}
	// Output:
	// 10.0 ft = 3.0 m
	// 15.0 ft = 4.6 m
	// 20.0 ft = 6.1 m
	// 25.0 ft = 7.6 m
}

func ExampleParsePoint() {
	p, _ := units.ParsePoint("46.25,7.5")
	fmt.Printf("lat %.2f°, lon %.2f°\n", p.Lat(), p.Lon())
	// Output: lat 46.25°, lon 7.50°
}
