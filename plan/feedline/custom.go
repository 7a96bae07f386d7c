package feedline

import (
	"fmt"
	"strings"

	"github.com/mastlink/mastlink/plan/units"
)

// ResolveCable turns a cable named on the command line or in a plan file
// into a Cable: a catalog name ("RG-8X", "rg8x"), or a cable of the user's
// own given by its matched loss at one or two frequencies,
//
//	custom:6.1dB/100ft@146MHz
//	custom:20dB/100m@146MHz,38dB/100m@440MHz
//
// (loss per 100 ft, per 100 m, per m or any length with its unit;
// frequencies with units as units.ParseFreqMHz takes them). One figure is
// conductor loss, A ∝ √f, whatever the unit it is written in; two fit the
// two-term model (see CustomCable). Unknown names wrap ErrUnknownCable.
func ResolveCable(spec string) (Cable, error) {
	s := strings.TrimSpace(spec)
	rest, ok := cutPrefixFold(s, "custom:")
	if !ok {
		return LookupCable(s)
	}
	var pts []LossPoint
	for _, part := range strings.Split(rest, ",") {
		p, err := parseLossPoint(strings.TrimSpace(part))
		if err != nil {
			return Cable{}, fmt.Errorf("%q: %w", spec, err)
		}
		pts = append(pts, p)
	}
	if len(pts) > 2 {
		return Cable{}, fmt.Errorf("%q: give the loss at one or two frequencies", spec)
	}
	return CustomCable("custom", pts...)
}

func cutPrefixFold(s, prefix string) (string, bool) {
	if len(s) >= len(prefix) && strings.EqualFold(s[:len(prefix)], prefix) {
		return s[len(prefix):], true
	}
	return s, false
}

// unitGiven reports whether a length ends in a unit (letters), so that a
// bare "/100" is refused rather than taken as metres.
func unitGiven(s string) bool {
	s = strings.TrimSpace(s)
	if s == "" {
		return false
	}
	c := s[len(s)-1]
	return (c >= 'a' && c <= 'z') || (c >= 'A' && c <= 'Z')
}

// parseLossPoint parses "6.1dB/100ft@146MHz", "20dB/100m@146MHz" or
// "0.2dB/m@146MHz": a loss per any length with its unit.
func parseLossPoint(s string) (LossPoint, error) {
	const want = "write e.g. custom:6.1dB/100ft@146MHz or custom:20dB/100m@146MHz,38dB/100m@440MHz"
	loss, freq, ok := strings.Cut(s, "@")
	if !ok {
		return LossPoint{}, fmt.Errorf("no frequency after the loss (%s)", want)
	}
	num, per, ok := strings.Cut(loss, "/")
	if !ok {
		return LossPoint{}, fmt.Errorf("the loss needs a length it is per, /100ft or /100m (%s)", want)
	}
	db, err := units.ParseLossDB(strings.TrimSpace(num))
	if err != nil {
		return LossPoint{}, err
	}
	if !(db > 0) {
		return LossPoint{}, fmt.Errorf("a cable loss must be more than 0 dB")
	}
	// The length the loss is per: "100ft", "100m", "m", "ft", "km", …
	perS := strings.TrimSpace(per)
	if perS != "" && (perS[0] < '0' || perS[0] > '9') && perS[0] != '.' {
		perS = "1" + perS
	}
	perM, err := units.ParseLengthM(perS)
	if err != nil || !(perM > 0) || !unitGiven(perS) {
		return LossPoint{}, fmt.Errorf("loss per %q: use /100ft, /100m or /m (%s)", per, want)
	}
	perFt := db / perM * MetresPer100Ft
	f, err := units.ParseFreqMHz(strings.TrimSpace(freq))
	if err != nil {
		return LossPoint{}, err
	}
	return LossPoint{FreqMHz: f, DBPer100Ft: perFt, Source: "user"}, nil
}
