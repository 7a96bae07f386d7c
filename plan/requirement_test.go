package plan

import (
	"errors"
	"math"
	"strings"
	"testing"

	"github.com/mastlink/mastlink/plan/units"
)

func TestRequirementOptions(t *testing.T) {
	start := Requirement{SigmaDB: DefaultSigmaDB}
	cases := []struct {
		name string
		o    RequirementOptions
		want Requirement
		key  string // option the error names; "" for success
		msg  string
	}{
		{name: "nothing given", want: start},
		{name: "all three", o: RequirementOptions{Margin: "10dB", Reliability: "90%", Sigma: "8dB"}, want: Requirement{MarginDB: 10, Reliability: 0.9, SigmaDB: 8}},
		{name: "reliability with the default sigma", o: RequirementOptions{Reliability: "0.95"}, want: Requirement{Reliability: 0.95, SigmaDB: DefaultSigmaDB}},
		{name: "sigma 0 without a reliability", o: RequirementOptions{Sigma: "0"}, want: Requirement{}},
		{name: "reliability 100 %", o: RequirementOptions{Reliability: "100%"}, key: "reliability", msg: "below 100%"},
		{name: "reliability 0", o: RequirementOptions{Reliability: "0"}, key: "reliability", msg: "above 0%"},
		{name: "reliability 90", o: RequirementOptions{Reliability: "90"}, key: "reliability", msg: "write 90%"},
		{name: "negative margin", o: RequirementOptions{Margin: "-3dB"}, key: "margin", msg: "must not be negative"},
		{name: "sigma 0 with a reliability", o: RequirementOptions{Reliability: "90%", Sigma: "0dB"}, key: "sigma", msg: "more than 0 dB"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			r := start
			err := c.o.Apply(&r)
			if c.key == "" {
				if err != nil || r != c.want {
					t.Fatalf("got %+v, %v; want %+v", r, err, c.want)
				}
				return
			}
			var oe *units.OptionError
			if !errors.As(err, &oe) || oe.Option != c.key || !strings.Contains(err.Error(), c.msg) {
				t.Fatalf("error %v, want one about %s saying %q", err, c.key, c.msg)
			}
			if r != start {
				t.Errorf("a failed Apply changed the requirement to %+v", r)
			}
		})
	}
	// The margin the 90 % ask needs with σ 8 dB: σ·Φ⁻¹(0.9) = 8 × 1.2816 =
	// 10.25 dB (ITU-R P.1812-8 eq. 69), above the 10 dB asked.
	r := Requirement{}
	if err := (RequirementOptions{Margin: "10dB", Reliability: "90%", Sigma: "8dB"}).Apply(&r); err != nil {
		t.Fatal(err)
	}
	if got := r.NeededMarginDB(); math.Abs(got-10.25) > 0.01 {
		t.Errorf("needed margin %.3f dB, want 10.25", got)
	}
}
