package feedline

import (
	"errors"
	"math"
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
