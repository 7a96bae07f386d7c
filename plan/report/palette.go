package report

import (
	"fmt"
	"image/color"
	"math"
	"strconv"
)

// MaxLevels is the most levels a Scale may have: more discrete colours than
// this are no longer told apart reliably on a printed map.
const MaxLevels = 12

// Scale is the key of the values drawn in colour on a map (an overlay
// grid, links, tracks, candidate sites): ascending thresholds, each
// starting a band that runs up to the next one (the last band is open
// above). A value below the first level is drawn as "below" (not coloured
// in an overlay; dashed dark grey on a line).
//
// Each band takes a colour of viridis (van der Walt and Smith, SciPy 2015),
// evenly spaced along it from dark blue-violet for the lowest band to
// yellow for the highest, so the order of the bands reads as the order of
// lightness, also in greyscale and to colour-blind readers.
type Scale struct {
	// Levels are the band thresholds in Unit, strictly ascending, 1 to
	// MaxLevels of them (e.g. margins 0, 10, 20 dB; line of sight 1).
	Levels []float64
	// Name is what the values are ("margin", "received level", "path
	// loss", "line of sight"); Unit their unit ("dB", "dBm"; empty for
	// none). The legend is titled "Name (Unit)".
	Name, Unit string
	// Labels, when given (one per level), name the bands in the legend
	// instead of their thresholds (e.g. "visible").
	Labels []string
}

// check says what is wrong with s.
func (s *Scale) check() error {
	if len(s.Levels) < 1 || len(s.Levels) > MaxLevels {
		return fmt.Errorf("%w: scale has %d levels; give 1 to %d", ErrChartData, len(s.Levels), MaxLevels)
	}
	for i, v := range s.Levels {
		if !finite(v) {
			return fmt.Errorf("%w: scale level %d is %v; give finite numbers", ErrChartData, i+1, v)
		}
		if i > 0 && !(v > s.Levels[i-1]) {
			return fmt.Errorf("%w: scale levels %g and %g are not ascending; give them from lowest to highest", ErrChartData, s.Levels[i-1], v)
		}
	}
	if len(s.Labels) != 0 && len(s.Labels) != len(s.Levels) {
		return fmt.Errorf("%w: scale has %d labels for %d levels; give one per level or none", ErrChartData, len(s.Labels), len(s.Levels))
	}
	return nil
}

// band is the index of the band holding v: the last level at or below v,
// or -1 when v is below the first level or not a number.
func (s *Scale) band(v float64) int {
	if v != v || len(s.Levels) == 0 || v < s.Levels[0] {
		return -1
	}
	i := 0
	for i+1 < len(s.Levels) && v >= s.Levels[i+1] {
		i++
	}
	return i
}

// title is the legend's heading, "Name (Unit)".
func (s *Scale) title() string {
	switch {
	case s.Name == "" && s.Unit == "":
		return "value"
	case s.Unit == "":
		return s.Name
	case s.Name == "":
		return s.Unit
	}
	return s.Name + " (" + s.Unit + ")"
}

// levelText writes a level with the decimals it needs (up to 2).
func levelText(v float64) string {
	for dec := 0; dec < 2; dec++ {
		p := math.Pow(10, float64(dec))
		if math.Abs(v*p-math.Round(v*p)) < 1e-9*p {
			return strconv.FormatFloat(v, 'f', dec, 64)
		}
	}
	return strconv.FormatFloat(v, 'f', 2, 64)
}

// viridisFirst is where the bands start along viridis: its darkest eighth is
// left out, so the lowest band stays readable under labels and over the
// shaded terrain.
const viridisFirst = 0.125

// BandColour returns the colour of band i of a scale of n levels (0 the
// lowest): viridis (van der Walt and Smith, SciPy 2015) sampled evenly from
// 0.125 of its length (the darkest part left out) to its yellow end, a
// single band taking the middle of that range. It panics when i is not in
// 0 … n−1.
func BandColour(i, n int) color.NRGBA {
	if i < 0 || i >= n {
		panic(fmt.Sprintf("report: band %d of %d", i, n))
	}
	t := (1 + viridisFirst) / 2
	if n > 1 {
		t = viridisFirst + (1-viridisFirst)*float64(i)/float64(n-1)
	}
	return viridisAt(t)
}

// viridisAt is viridis at t from 0 to 1, interpolated linearly between the
// 256 entries of the published table.
func viridisAt(t float64) color.NRGBA {
	x := math.Min(math.Max(t, 0), 1) * 255
	i := min(int(x), 254)
	f := x - float64(i)
	ch := func(k int) uint8 {
		return uint8(math.Round(255 * (viridis[i][k]*(1-f) + viridis[i+1][k]*f)))
	}
	return color.NRGBA{ch(0), ch(1), ch(2), 0xff}
}

// lightness is CIE L* of an sRGB colour (IEC 61966-2-1 transfer function,
// D65 luminance Y = 0.2126 R + 0.7152 G + 0.0722 B; CIE 15:2004 L*).
func lightness(c color.NRGBA) float64 {
	lin := func(u uint8) float64 {
		v := float64(u) / 255
		if v <= 0.04045 {
			return v / 12.92
		}
		return math.Pow((v+0.055)/1.055, 2.4)
	}
	y := 0.2126*lin(c.R) + 0.7152*lin(c.G) + 0.0722*lin(c.B)
	if y > 216.0/24389 {
		return 116*math.Cbrt(y) - 16
	}
	return 24389.0 / 27 * y
}
