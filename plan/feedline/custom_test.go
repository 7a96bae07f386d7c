package feedline

import (
	"errors"
	"fmt"
	"math"
	"strings"
	"testing"
)

func TestResolveCable(t *testing.T) {
	c, err := ResolveCable("rg8x")
	if err != nil || c.Name != "RG-8X" {
		t.Fatalf("ResolveCable(rg8x) = %v, %v", c.Name, err)
	}
	// One figure: the conductor term alone reproduces it at its frequency.
	c, err = ResolveCable("custom:20dB/100m@146MHz")
	if err != nil {
		t.Fatal(err)
	}
	if got := c.LossDBPer100M(146); math.Abs(got-20) > 1e-9 {
		t.Errorf("custom loss at 146 MHz = %v dB/100 m, want 20", got)
	}
	// Two figures in dB/100 ft are fitted by the two-term model.
	c, err = ResolveCable("custom: 5.63dB/100ft@146MHz, 11.75dB/100ft@440MHz")
	if err != nil {
		t.Fatal(err)
	}
	if got := c.LossDBPer100Ft(440); math.Abs(got-11.75) > 0.01 {
		t.Errorf("custom loss at 440 MHz = %v dB/100 ft, want 11.75", got)
	}
	for _, bad := range []string{"RG-59X", "custom:", "custom:5dB@146MHz", "custom:5dB/100yd@146MHz", "custom:5dB/100m", "custom:-1dB/100m@146MHz"} {
		if _, err := ResolveCable(bad); err == nil {
			t.Errorf("ResolveCable(%q) accepted", bad)
		}
	}
	if _, err := ResolveCable("RG-59X"); !errors.Is(err, ErrUnknownCable) {
		t.Errorf("unknown cable error does not wrap ErrUnknownCable: %v", err)
	}
}

// TestCustomOneFigureUnits: one loss figure is conductor (skin-effect) loss,
// which grows as √f (standard transmission-line physics), whatever the unit
// the figure is written in. 6.1 dB/100 ft is 20.013 dB/100 m (× 100/30.48,
// exact) and 0.20013 dB/m; each must give 6.1·√(440/146) dB over 100 ft at
// 440 MHz.
func TestCustomOneFigureUnits(t *testing.T) {
	want := 6.1 * math.Sqrt(440.0/146)
	per100m := 6.1 * 100 / 30.48
	cases := []string{
		"custom:6.1dB/100ft@146MHz",
		fmt.Sprintf("custom:%.17gdB/100m@146MHz", per100m),
		"custom:20.01dB/100m@146MHz",
		fmt.Sprintf("custom:%.17gdB/m@146MHz", per100m/100),
		"custom:6.1dB/100ft@146000kHz",
		"custom:6.1dB/100ft@0.146GHz",
	}
	for _, spec := range cases {
		c, err := ResolveCable(spec)
		if err != nil {
			t.Fatalf("%s: %v", spec, err)
		}
		if c.K2 != 0 {
			t.Errorf("%s: K2 = %g, want 0 (one figure is conductor loss only)", spec, c.K2)
		}
		got := c.MatchedLossDB(30.48, 440)
		tol := 1e-9
		if strings.Contains(spec, "20.01dB") { // the figure rounded to 4 digits
			tol = 2e-3
		}
		if math.Abs(got-want) > tol {
			t.Errorf("%s: 100 ft at 440 MHz = %.6f dB, want 6.1·√(440/146) = %.6f dB", spec, got, want)
		}
	}
	// Figures at one frequency only cannot separate the two terms either.
	c, err := CustomCable("twice", LossPoint{FreqMHz: 146, DBPer100Ft: 6}, LossPoint{FreqMHz: 146, DBPer100Ft: 6.2})
	if err != nil || c.K2 != 0 || math.Abs(c.LossDBPer100Ft(146)-6.1) > 0.01 {
		t.Errorf("two figures at one frequency: %+v, %v", c, err)
	}
}
