package antenna_test

import (
	"errors"
	"fmt"

	"github.com/mastlink/mastlink/plan/antenna"
)

func ExampleLookup() {
	a, err := antenna.Lookup("yagi-3el-2m")
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("%s: %.1f dBi, %g° × %g°, F/B %g dB, %s, %g–%g MHz\n",
		a.Name, a.GainDBi, a.HBeamwidthDeg, a.VBeamwidthDeg, a.FrontToBackDB, a.Polarization, a.MinMHz, a.MaxMHz)

	_, err = antenna.Lookup("yagi-9el-2m")
	fmt.Println(errors.Is(err, antenna.ErrUnknownAntenna))
	// Output:
	// yagi-3el-2m: 7.5 dBi, 100° × 60°, F/B 15 dB, vertical, 144–148 MHz
	// true
}

func ExampleAntenna_GainTowardDBi() {
	// A 5-element 2 m Yagi aimed at 045° (true north); the far end lies at
	// 060°, level with it, then behind it at 225°.
	a, _ := antenna.Lookup("yagi-5el-2m")
	fmt.Printf("toward 060°: %.2f dBi\n", a.GainTowardDBi(60, 0, 45))
	fmt.Printf("toward 225°: %.2f dBi\n", a.GainTowardDBi(225, 0, 45))

	// A dipole is the same all round; 20° above the horizon it is down a little.
	d, _ := antenna.Lookup("dipole")
	fmt.Printf("dipole at 20° elevation: %.2f dBi\n", d.GainTowardDBi(0, 20, 0))
	// Output:
	// toward 060°: 8.98 dBi
	// toward 225°: -8.50 dBi
	// dipole at 20° elevation: 1.41 dBi
}

func ExampleTrim() {
	// A 2 m vertical resonates at 139.35 MHz and should resonate at 146 MHz;
	// its two elements are 468 mm and 458 mm long.
	r, err := antenna.Trim(139.35, 146, []float64{0.468, 0.458})
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("ratio %.4f\n", r.Ratio)
	for _, l := range r.Lengths {
		fmt.Printf("%.1f mm → %.1f mm (cut %.1f mm)\n", l.NowM*1000, l.NewM*1000, l.CutM*1000)
	}
	// Output:
	// ratio 0.9545
	// 468.0 mm → 446.7 mm (cut 21.3 mm)
	// 458.0 mm → 437.1 mm (cut 20.9 mm)
}

func ExampleQuarterWaveM() {
	// Starting lengths for a 2 m ground plane at 146 MHz: a wire radiator,
	// and a quarter-wave stub of solid-dielectric coax.
	w, _ := antenna.QuarterWaveM(146, antenna.VelocityFactorWire)
	c, _ := antenna.QuarterWaveM(146, antenna.VelocityFactorSolidCoax)
	fmt.Printf("wire %.3f m, coax %.3f m\n", w, c)
	// Output:
	// wire 0.488 m, coax 0.339 m
}

func ExampleCarry_BodyLossDB() {
	for _, s := range []string{"face", "belt"} {
		c, _ := antenna.ParseCarry(s)
		fmt.Printf("%s: %g dB\n", c, c.BodyLossDB())
	}
	// Output:
	// face: 3 dB
	// belt: 12 dB
}
