package main

import (
	"strconv"
	"strings"

	"github.com/mastlink/mastlink/plan/report"
	"github.com/mastlink/mastlink/plan/units"
)

// profileChartFlags reads profile's --freq and --size, which only a chart
// (-o F.svg or F.png) uses. A Fresnel zone is drawn about the line of sight,
// so --freq needs the antennas; without --height or --to-height it puts
// both at 0 m above the ground, with the earth bulge of --k.
func profileChartFlags(o *profileOptions, out string, antennas bool) ([]report.ProfileOption, error) {
	var opts []report.ProfileOption
	chart := extension(out) == "svg" || extension(out) == "png"
	if (o.freq != "" || o.size != "") && !chart {
		flag := "--freq"
		if o.freq == "" {
			flag = "--size"
		}
		return nil, usagef("%s draws on a chart; give -o FILE.svg or -o FILE.png", flag)
	}
	if o.freq != "" {
		f, err := quantity("freq", o.freq, units.ParseFreqMHz)
		if err != nil {
			return nil, err
		}
		if !(f >= 1 && f <= 100_000) {
			return nil, usagef("--freq: %s: give 1 MHz to 100 GHz", o.freq)
		}
		if !antennas {
			k, err := quantity("k", o.k, units.ParseKFactor)
			if err != nil {
				return nil, err
			}
			opts = append(opts, report.WithAntennas(0, 0), report.WithEarthBulge(k))
		}
		opts = append(opts, report.WithFrequency(f))
	}
	if o.size != "" {
		w, h, ok := parseSize(o.size)
		if !ok || w < 320 || h < 200 || w > 10000 || h > 10000 {
			return nil, usagef("--size: %q: give WIDTHxHEIGHT in pixels, from 320x200 to 10000x10000 (e.g. 1200x500)", o.size)
		}
		opts = append(opts, report.WithSize(w, h))
	}
	return opts, nil
}

// parseSize reads "1200x500" (or 1200×500).
func parseSize(s string) (w, h int, ok bool) {
	s = strings.ReplaceAll(strings.ToLower(strings.TrimSpace(s)), "×", "x")
	a, b, found := strings.Cut(s, "x")
	if !found {
		return 0, 0, false
	}
	w, err1 := strconv.Atoi(strings.TrimSpace(a))
	h, err2 := strconv.Atoi(strings.TrimSpace(b))
	return w, h, err1 == nil && err2 == nil
}
