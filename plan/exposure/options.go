package exposure

import (
	"fmt"
	"strconv"
	"strings"

	"github.com/mastlink/mastlink/plan/units"
)

// The keys of Options, as the plan file spells them under a station's
// exposure:; the exposure command's flags are the same words with "-" for
// "_" (--tx-time, --head-height).
const (
	OptMode       = "mode"
	OptDuty       = "duty"
	OptTxTime     = "tx_time"
	OptOn         = "on"
	OptOff        = "off"
	OptStandard   = "standard"
	OptHeadHeight = "head_height"
	OptReflection = "reflection"
)

// OptionKeys lists the keys of Options in the order they are checked.
var OptionKeys = []string{OptMode, OptDuty, OptTxTime, OptOn, OptOff, OptStandard, OptHeadHeight, OptReflection}

// Options are a station's RF-exposure operating habits as text, as a user
// writes them on the command line or in a plan file. An empty field leaves
// the Input it is applied to unchanged. This is the one parser and
// validator of these options: the exposure command and the plan file both
// use it.
type Options struct {
	Mode       string // emission mode (ParseTxMode)
	Duty       string // duty factor replacing the mode's, a ratio in (0, 1]
	TxTime     string // fraction of time on the air, a ratio in (0, 1]
	On, Off    string // a transmit/listen cycle, durations (units.ParseDuration); both or neither
	Standard   string // limit set (ParseStandard)
	HeadHeight string // height of a person's head, a length
	Reflection string // ground-reflection factor: 1, 2.56 or 4 (ParseReflection)
}

// Apply parses and checks o and sets the matching fields of dst. A transmit
// cycle replaces any TxFraction dst has; TxTime and a cycle together are
// refused. Every error is a *units.OptionError naming the key (OptMode, …)
// and wrapping the cause: a *units.QuantityError, or ErrInput; dst is
// then left as it was.
func (o Options) Apply(dst *Input) error {
	in := *dst // changed only when every option is good
	fail := func(key string, err error) error { return &units.OptionError{Option: key, Err: err} }
	failf := func(key, format string, a ...any) error {
		return fail(key, fmt.Errorf("%w: "+format, append([]any{ErrInput}, a...)...))
	}
	if o.Mode != "" {
		m, err := ParseTxMode(o.Mode)
		if err != nil {
			return fail(OptMode, err)
		}
		in.Mode = m
	}
	ratio := func(key, text, rule string, dst *float64) error {
		v, err := units.ParseRatio(text)
		if err != nil {
			return fail(key, err)
		}
		if !(v > 0 && v <= 1) {
			return failf(key, "%s", rule)
		}
		*dst = v
		return nil
	}
	if o.Duty != "" {
		if err := ratio(OptDuty, o.Duty, "give a duty factor above 0 and up to 100%", &in.DutyFactor); err != nil {
			return err
		}
	}
	cycle := o.On != "" || o.Off != ""
	if o.TxTime != "" {
		if cycle {
			return failf(OptTxTime, "give either a fraction of time on the air or an on/off cycle, not both")
		}
		if err := ratio(OptTxTime, o.TxTime, "give a fraction above 0 and up to 100% of the time", &in.TxFraction); err != nil {
			return err
		}
	}
	if cycle {
		switch {
		case o.On == "":
			return failf(OptOn, "on and off go together (a transmit/listen cycle, e.g. 2min on and 2min off)")
		case o.Off == "":
			return failf(OptOff, "on and off go together (a transmit/listen cycle, e.g. 2min on and 2min off)")
		}
		on, err := units.ParseDuration(o.On)
		if err != nil {
			return fail(OptOn, err)
		}
		off, err := units.ParseDuration(o.Off)
		if err != nil {
			return fail(OptOff, err)
		}
		if on <= 0 {
			return failf(OptOn, "the transmit time must be more than 0")
		}
		in.OnTime, in.OffTime, in.TxFraction = on, off, 0
	}
	if o.Standard != "" {
		s, err := ParseStandard(o.Standard)
		if err != nil {
			return fail(OptStandard, err)
		}
		in.Standard = s
	}
	if o.HeadHeight != "" {
		h, err := units.ParseLengthM(o.HeadHeight)
		if err != nil {
			return fail(OptHeadHeight, err)
		}
		in.HeadHeightM = h
	}
	if o.Reflection != "" {
		r, err := ParseReflection(o.Reflection)
		if err != nil {
			return fail(OptReflection, err)
		}
		in.ReflectionFactor = r
	}
	*dst = in
	return nil
}

// ParseReflection parses a ground-reflection factor of FCC OET Bulletin 65
// (ed. 97-01) §2: "1" (ReflectionFreeSpace), "2.56" (ReflectionGround) or
// "4" (ReflectionFull). Anything else gives an error wrapping ErrInput.
func ParseReflection(s string) (float64, error) {
	switch t := strings.TrimSpace(s); t {
	case "1", "2.56", "4":
		return strconv.ParseFloat(t, 64)
	}
	return 0, fmt.Errorf("%w: %q is not 1, 2.56 or 4 (free space, typical ground, full reflection)", ErrInput, s)
}
