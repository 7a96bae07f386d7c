package exposure

import (
	"errors"
	"strings"
	"testing"
	"time"

	"github.com/mastlink/mastlink/plan/units"
)

func TestOptionsApply(t *testing.T) {
	// The duty factors are FCC OET Bulletin 65 Supplement B (ed. 97-01)
	// Table 2; the reflection factors OET Bulletin 65 §2 (1, 2.56, 4).
	start := Input{Mode: ModeFM, TxFraction: 0.5, Standard: StandardFCC}
	cases := []struct {
		name string
		o    Options
		want Input
		key  string // option named by the error; "" for success
		msg  string // part of the error text
	}{
		{name: "nothing given keeps the input", o: Options{}, want: start},
		{name: "every option", o: Options{Mode: "SSB", Duty: "40%", TxTime: "0.25", Standard: "icnirp2020", HeadHeight: "1.8m", Reflection: "4"},
			want: Input{Mode: ModeSSB, DutyFactor: 0.4, TxFraction: 0.25, Standard: StandardICNIRP2020, HeadHeightM: 1.8, ReflectionFactor: 4}},
		{name: "a cycle replaces the fraction", o: Options{On: "2min", Off: "30s"},
			want: Input{Mode: ModeFM, Standard: StandardFCC, OnTime: 2 * time.Minute, OffTime: 30 * time.Second}},
		{name: "unknown mode", o: Options{Mode: "am"}, key: OptMode, msg: `unknown mode "am"`},
		{name: "duty of zero after a good mode", o: Options{Mode: "cw", Duty: "0"}, key: OptDuty, msg: "above 0 and up to 100%"},
		{name: "duty not a ratio", o: Options{Duty: "half"}, key: OptDuty, msg: "not a ratio"},
		{name: "tx time above 100 %", o: Options{TxTime: "120%"}, key: OptTxTime, msg: "between 0 and 1"},
		{name: "tx time and cycle", o: Options{TxTime: "50%", On: "1min", Off: "1min"}, key: OptTxTime, msg: "not both"},
		{name: "on without off", o: Options{On: "2min"}, key: OptOff, msg: "go together"},
		{name: "off without on", o: Options{Off: "2min"}, key: OptOn, msg: "go together"},
		{name: "bare duration", o: Options{On: "2", Off: "2min"}, key: OptOn, msg: "give a unit"},
		{name: "zero transmit time", o: Options{On: "0s", Off: "2min"}, key: OptOn, msg: "more than 0"},
		{name: "unknown standard", o: Options{Standard: "osha"}, key: OptStandard, msg: `unknown exposure standard "osha"`},
		{name: "negative head height", o: Options{HeadHeight: "-1m"}, key: OptHeadHeight, msg: "negative"},
		{name: "reflection 3", o: Options{Reflection: "3"}, key: OptReflection, msg: "not 1, 2.56 or 4"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			in := start
			err := c.o.Apply(&in)
			if c.key == "" {
				if err != nil {
					t.Fatal(err)
				}
				if in != c.want {
					t.Errorf("got %+v, want %+v", in, c.want)
				}
				return
			}
			var oe *units.OptionError
			if !errors.As(err, &oe) || oe.Option != c.key {
				t.Fatalf("error %v, want one about %q", err, c.key)
			}
			if !strings.Contains(err.Error(), c.msg) {
				t.Errorf("error %q does not say %q", err, c.msg)
			}
			if in != start {
				t.Errorf("a failed Apply changed the input to %+v", in)
			}
		})
	}
}
