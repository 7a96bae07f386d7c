package propagation_test

import (
	"fmt"

	"github.com/mastlink/mastlink/propagation"
)

func ExampleTerminalClutterLoss() {
	// A handheld at 1.5 m in a forest, on 2 m and on 70 cm (ITU-R P.2108-1
	// §3.1, representative clutter height 15 m, street width 27 m).
	for _, f := range []float64{146, 446} {
		l, err := propagation.TerminalClutterLoss(propagation.TreesForest, f, 1.5)
		if err != nil {
			fmt.Println(err)
			return
		}
		fmt.Printf("%g MHz: %.1f dB\n", f, l)
	}
	// Output:
	// 146 MHz: 14.8 dB
	// 446 MHz: 19.5 dB
}

func ExampleParseClutterClass() {
	c, err := propagation.ParseClutterClass("dense urban")
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("%s: representative clutter height %g m\n", c, c.HeightM())
	// Output: dense-urban: representative clutter height 20 m
}
