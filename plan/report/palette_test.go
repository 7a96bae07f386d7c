package report

import (
	"image/color"
	"math"
	"testing"
)

func TestViridisEnds(t *testing.T) {
	// The end points of viridis as 8-bit sRGB, #440154 and #fde725, and
	// its entry 128 (0.127568, 0.566949, 0.550556 in the table), #21918c:
	// the hex codes usually quoted for viridis (from memory).
	cases := []struct {
		t    float64
		want color.NRGBA
	}{
		{0, color.NRGBA{0x44, 0x01, 0x54, 0xff}},
		{1, color.NRGBA{0xfd, 0xe7, 0x25, 0xff}},
		{128.0 / 255, color.NRGBA{0x21, 0x91, 0x8c, 0xff}},
	}
	for _, c := range cases {
		if got := viridisAt(c.t); got != c.want {
			t.Errorf("viridisAt(%g) = %v, want %v", c.t, got, c.want)
		}
	}
}

func TestBandColoursRiseInLightness(t *testing.T) {
	// Viridis rises monotonically in lightness (van der Walt and Smith,
	// SciPy 2015), so the bands must too: each at least 4 L* units lighter
	// than the one below, enough to tell them apart in greyscale.
	for n := 1; n <= MaxLevels; n++ {
		prev := -1.0
		for i := 0; i < n; i++ {
			l := lightness(BandColour(i, n))
			if n > 1 && i > 0 && l < prev+4 {
				t.Errorf("%d levels: band %d L* %.1f, band %d L* %.1f", n, i-1, prev, i, l)
			}
			prev = l
		}
	}
	// The whole table is monotone in lightness (viridis was designed to be
	// in CAM02-UCS J'; in CIE L* after rounding to 8 bits it may dip by a
	// few hundredths).
	for i := 1; i < 256; i++ {
		if lightness(viridisAt(float64(i)/255)) < lightness(viridisAt(float64(i-1)/255))-0.2 {
			t.Errorf("viridis entry %d is darker than entry %d", i, i-1)
		}
	}
}

func TestScaleBand(t *testing.T) {
	s := Scale{Levels: []float64{0, 10, 20}}
	cases := []struct {
		v    float64
		want int
	}{
		{-0.1, -1}, {0, 0}, {9.99, 0}, {10, 1}, {19.5, 1}, {20, 2}, {95, 2}, {math.NaN(), -1},
	}
	for _, c := range cases {
		if got := s.band(c.v); got != c.want {
			t.Errorf("band(%v) = %d, want %d", c.v, got, c.want)
		}
	}
}

func TestScaleCheck(t *testing.T) {
	cases := []struct {
		name string
		s    Scale
		ok   bool
	}{
		{"one level", Scale{Levels: []float64{1}}, true},
		{"labels", Scale{Levels: []float64{0, 10}, Labels: []string{"weak", "good"}}, true},
		{"none", Scale{}, false},
		{"too many", Scale{Levels: make([]float64, MaxLevels+1)}, false},
		{"not ascending", Scale{Levels: []float64{0, 10, 10}}, false},
		{"NaN", Scale{Levels: []float64{math.NaN()}}, false},
		{"labels short", Scale{Levels: []float64{0, 10}, Labels: []string{"x"}}, false},
	}
	for _, c := range cases {
		if err := c.s.check(); (err == nil) != c.ok {
			t.Errorf("%s: check() = %v", c.name, err)
		}
	}
}
