package report

import (
	"bytes"
	"errors"
	"image"
	"image/color"
	"image/png"
	"io"
	"math"
	"testing"
)

// decodePNG renders a chart and decodes it again with image/png.
func decodePNG(t *testing.T, d, h []float64, opts ...ProfileOption) image.Image {
	t.Helper()
	var buf bytes.Buffer
	if err := ProfilePNG(&buf, d, h, opts...); err != nil {
		t.Fatal(err)
	}
	img, err := png.Decode(&buf)
	if err != nil {
		t.Fatalf("the chart does not decode as PNG: %v", err)
	}
	return img
}

// luma is a pixel's brightness, 0 to 255 (ITU-R BT.601 weights).
func luma(c color.Color) float64 {
	r, g, b, _ := c.RGBA()
	return (0.299*float64(r) + 0.587*float64(g) + 0.114*float64(b)) / 257
}

// near: within tol of the #rrggbb colour in every channel.
func near(c color.Color, hex string, tol int) bool {
	want := rgb(hex)
	r, g, b, _ := c.RGBA()
	d := func(a uint32, w uint8) bool { return math.Abs(float64(a>>8)-float64(w)) <= float64(tol) }
	return d(r, want.R) && d(g, want.G) && d(b, want.B)
}

// isEarth: the ground fill or outline, or either blended with the
// background at an anti-aliased edge — red well above blue, which no grey,
// text or the blue line of sight has.
func isEarth(c color.Color) bool {
	r, _, b, _ := c.RGBA()
	return int(r>>8)-int(b>>8) > 20
}

// topEarth is the first row from y0 down to y1 (exclusive) with ground in
// column x, or y1 when there is none.
func topEarth(img image.Image, x, y0, y1 int) int {
	for y := y0; y < y1; y++ {
		if isEarth(img.At(x, y)) {
			return y
		}
	}
	return y1
}

// bottomEarth is the last row from y1 (exclusive) up to y0 with ground in
// column x, or y0-1 when there is none.
func bottomEarth(img image.Image, x, y0, y1 int) int {
	for y := y1 - 1; y >= y0; y-- {
		if isEarth(img.At(x, y)) {
			return y
		}
	}
	return y0 - 1
}

// Plot area of a default-size chart, pixels (the margins of layout.go:
// 76 left, 24 right, 48 top, 54 bottom of 800 × 360).
const (
	plotLeft, plotRight = 76, 776
	plotTop, plotBottom = 48, 306
	plotHeight          = plotBottom - plotTop
)

// scanFrom is the first row to look for ground in column x: the plot's top,
// or below the legend box in its columns (box from x = 776 − 190 − 6, at
// most 3 rows of 16 px + 6 px from y = 50).
func scanFrom(x int) int {
	if x >= plotRight-190-6 {
		return 50 + 3*16 + 6 + 1
	}
	return plotTop + 1
}

func TestProfilePNGSize(t *testing.T) {
	d, h := ridge(300, 8_000)
	cases := []struct {
		name string
		opts []ProfileOption
		w, h int
	}{
		{"default", nil, DefaultWidthPx, DefaultHeightPx},
		{"smallest", []ProfileOption{WithSize(320, 200)}, 320, 200},
		{"wide with everything", []ProfileOption{WithSize(1600, 500), WithImperial(), WithAntennas(3, 12), WithEarthBulge(1)}, 1600, 500},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			img := decodePNG(t, d, h, c.opts...)
			b := img.Bounds()
			if b.Min != (image.Point{}) || b.Dx() != c.w || b.Dy() != c.h {
				t.Fatalf("image %v, want %d × %d px from the origin", b, c.w, c.h)
			}
			// Nothing is clipped at the edges: the outermost rows and
			// columns are background.
			for x := 0; x < c.w; x++ {
				for _, y := range []int{0, c.h - 1} {
					if !near(img.At(x, y), colourBackground, 0) {
						t.Fatalf("pixel (%d, %d) on the edge is %v, not background", x, y, img.At(x, y))
					}
				}
			}
			for y := 0; y < c.h; y++ {
				for _, x := range []int{0, c.w - 1} {
					if !near(img.At(x, y), colourBackground, 0) {
						t.Fatalf("pixel (%d, %d) on the edge is %v, not background", x, y, img.At(x, y))
					}
				}
			}
		})
	}
}

// TestProfilePNGGround reads the ground's top edge back from the pixels of
// flat profiles, where the axis range follows by hand from the layout rule
// (6 % padding, 1–2–2.5–5 tick steps, niceTicks) and the plot area from
// the margins.
func TestProfilePNGGround(t *testing.T) {
	cases := []struct {
		name    string
		groundM float64
		opts    []ProfileOption
		// Ground surface, pixels from the top. Hand-derived:
		//  100 m: range 99.4–100.6 m (step 0.2), the middle of the plot;
		//  250 m with a 30 m mast: range 248.2–281.8 m → 240–290 m (step 10), 1/5 up;
		//  0 m: range 0–0.6 m, the ground is the bottom axis (no fill).
		wantY float64
		tolPx float64 // the 1 px edge stroke and anti-aliasing
		fill  bool
	}{
		{"100 m", 100, nil, plotBottom - 0.5*plotHeight, 1.5, true},
		{"250 m with masts", 250, []ProfileOption{WithAntennas(30, 30)}, plotBottom - 0.2*plotHeight, 1.5, true},
		{"sea level", 0, nil, plotBottom, 1.5, false},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			d, h := flat(101, 10_000, c.groundM)
			img := decodePNG(t, d, h, c.opts...)
			// Every plot column away from the axis: ink starts at the
			// ground line, and below it down to the axis lies the ground
			// colour.
			for x := plotLeft + 3; x <= plotRight-3; x++ {
				top := topEarth(img, x, scanFrom(x), plotBottom+3)
				if math.Abs(float64(top)-c.wantY) > c.tolPx {
					t.Fatalf("column %d: ground drawn from row %d, want %.1f", x, top, c.wantY)
				}
				if !c.fill {
					continue
				}
				for y := top + 2; y < plotBottom-1; y++ {
					if !near(img.At(x, y), colourGround, 2) && !(near(img.At(x, y), colourRay, 60)) {
						t.Fatalf("pixel (%d, %d) under the ground line is %v, not ground", x, y, img.At(x, y))
					}
				}
			}
			// No ground outside the plot area.
			for y := plotTop; y < plotBottom-2; y++ {
				for _, x := range []int{plotLeft - 20, plotRight + 10} {
					if near(img.At(x, y), colourGround, 10) {
						t.Fatalf("ground colour at (%d, %d), outside the plot area", x, y)
					}
				}
			}
		})
	}
}

// TestProfilePNGPeak: one high sample makes its pixel column's ground
// reach far above its neighbours', at the column of its distance.
func TestProfilePNGPeak(t *testing.T) {
	cases := []struct {
		name string
		n    int // samples over 10 km; 200 001 are thinned to the plot's columns
	}{
		{"101 samples", 101},
		{"2001 samples", 2001},
		{"200001 samples, thinned", 200_001},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			d, h := flat(c.n, 10_000, 200)
			k := (c.n - 1) * 63 / 100 // the sample at 6.3 km
			h[k] = 800
			img := decodePNG(t, d, h)
			// x = left + 6.3/10 of 700 px; range 164–836 m → 0–1000 m
			// (step 200): 800 m at 4/5 and 200 m at 1/5 of the plot height.
			peakX := plotLeft + 0.63*700
			peakY := plotBottom - 0.8*plotHeight
			groundY := plotBottom - 0.2*plotHeight
			best, bestX := plotBottom, -1
			for x := plotLeft + 3; x <= plotRight-3; x++ {
				if y := topEarth(img, x, scanFrom(x), plotBottom); y < best {
					best, bestX = y, x
				}
			}
			if math.Abs(float64(bestX)+0.5-peakX) > 1.5 {
				t.Errorf("highest ground in column %d, want the peak's column %.1f", bestX, peakX)
			}
			if math.Abs(float64(best)-peakY) > 2 {
				t.Errorf("peak drawn up to row %d, want %.1f", best, peakY)
			}
			for _, dx := range []int{-20, 20} {
				if y := topEarth(img, bestX+dx, scanFrom(bestX+dx), plotBottom); math.Abs(float64(y)-groundY) > 1.5 {
					t.Errorf("column %d beside the peak: ground from row %d, want %.1f", bestX+dx, y, groundY)
				}
			}
		})
	}
}

// TestProfilePNGBulge: on a flat plain the ground and the sea-level line
// under it are raised by the earth bulge, most at mid-path, and the line of
// sight runs straight between the mast tops.
func TestProfilePNGBulge(t *testing.T) {
	const lengthM, groundM, k, txM, rxM = 40_000.0, 100.0, 4.0 / 3, 10.0, 20.0
	d, h := flat(401, lengthM, groundM)
	img := decodePNG(t, d, h, WithAntennas(txM, rxM), WithEarthBulge(k))
	// Highest drawn: the ground mid-path, 123.5 m; lowest 100 m; with 6 %
	// padding 98.6–125.0 m → 95–125 m (step 5).
	const axisLoM, axisHiM = 95.0, 125.0
	y := func(hM float64) float64 { return plotBottom - (hM-axisLoM)/(axisHiM-axisLoM)*plotHeight }
	cases := []struct {
		name  string
		d1M   float64
		tolPx float64 // 1 px outline, anti-aliasing, the dashed line over the floor
	}{
		{"quarter", 10_000, 2},
		{"middle", 20_000, 2},
		{"25 km", 25_000, 2}, // not 30 km, where the line of sight crosses the ground's edge, nor under the legend
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			bulgeM := c.d1M * (lengthM - c.d1M) / (2 * k * 6_371_000) // d1·d2 / (2 k R), R = 6371 km (circle geometry; common practice)
			x := int(plotLeft + c.d1M/lengthM*700)
			if top := topEarth(img, x, scanFrom(x), plotBottom); math.Abs(float64(top)-y(groundM+bulgeM)) > c.tolPx {
				t.Errorf("ground at %.0f km drawn from row %d, want %.1f (bulge %.2f m)", c.d1M/1000, top, y(groundM+bulgeM), bulgeM)
			}
			// The grey dashed sea-level line covers the floor's outline:
			// one more pixel of slack.
			if bot := bottomEarth(img, x, scanFrom(x), plotBottom); math.Abs(float64(bot)-y(axisLoM+bulgeM)) > c.tolPx+1 {
				t.Errorf("curved floor at %.0f km drawn at row %d, want %.1f", c.d1M/1000, bot, y(axisLoM+bulgeM))
			}
			rayM := groundM + txM + (rxM-txM)*c.d1M/lengthM
			ry := int(y(rayM))
			found := false
			for yy := ry - 1; yy <= ry+1; yy++ {
				found = found || near(img.At(x, yy), colourRay, 40)
			}
			if !found {
				t.Errorf("no line of sight at (%d, %d±1) (%.1f m)", x, ry, rayM)
			}
		})
	}
}

// TestProfilePNGText: the title, tick labels and axis titles leave ink
// where the layout puts them.
func TestProfilePNGText(t *testing.T) {
	d, h := ridge(300, 8_000)
	img := decodePNG(t, d, h, WithTitle("Gorsefold trailhead to Corvane Peak"))
	count := func(r image.Rectangle) int {
		n := 0
		for y := r.Min.Y; y < r.Max.Y; y++ {
			for x := r.Min.X; x < r.Max.X; x++ {
				if luma(img.At(x, y)) < 128 {
					n++
				}
			}
		}
		return n
	}
	cases := []struct {
		name string
		r    image.Rectangle
		min  int // dark pixels at least: a few strokes of each glyph
	}{
		{"title", image.Rect(250, 10, 550, 30), 300},
		{"x-axis title", image.Rect(360, 336, 500, 354), 100},
		{"y-axis title", image.Rect(4, 130, 22, 230), 100},
		{"x tick labels", image.Rect(plotLeft-10, plotBottom+8, plotRight+10, plotBottom+22), 50},
		{"y tick labels", image.Rect(20, plotTop-8, plotLeft-6, plotBottom+8), 50},
	}
	for _, c := range cases {
		if n := count(c.r); n < c.min {
			t.Errorf("%s: %d dark pixels in %v, want at least %d", c.name, n, c.r, c.min)
		}
	}
	// Turned 90°: the y-axis title is taller than wide.
	var b image.Rectangle
	for y := 60; y < 300; y++ {
		for x := 0; x < 30; x++ {
			if luma(img.At(x, y)) < 128 {
				b = b.Union(image.Rect(x, y, x+1, y+1))
			}
		}
	}
	if b.Dy() < 3*b.Dx() {
		t.Errorf("y-axis title covers %v: not turned upright", b)
	}
}

func TestDashes(t *testing.T) {
	cases := []struct {
		name     string
		pts      [][2]float64
		on, off  float64
		pieces   int
		onLength float64 // pattern arithmetic
		tol      float64
	}{
		{"27 px straight", [][2]float64{{0, 0}, {27, 0}}, 5, 4, 3, 15, 1e-9},
		{"ends on", [][2]float64{{0, 0}, {30, 0}}, 5, 4, 4, 18, 1e-9},
		{"around a corner", [][2]float64{{0, 0}, {3, 0}, {3, 10}}, 5, 4, 2, 5 + 4, 1e-9},
		{"shorter than a dash", [][2]float64{{0, 0}, {0, 2}}, 5, 4, 1, 2, 1e-9},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			got := dashes(c.pts, c.on, c.off)
			if len(got) != c.pieces {
				t.Fatalf("%d pieces, want %d: %v", len(got), c.pieces, got)
			}
			total := 0.0
			for _, p := range got {
				for i := 1; i < len(p); i++ {
					total += math.Hypot(p[i][0]-p[i-1][0], p[i][1]-p[i-1][1])
				}
			}
			if math.Abs(total-c.onLength) > c.tol {
				t.Errorf("%.3f px on, want %.3f px", total, c.onLength)
			}
		})
	}
}

func TestProfilePNGWriteError(t *testing.T) {
	d, h := flat(10, 1000, 10)
	if err := ProfilePNG(failWriter{}, d, h); !errors.Is(err, errDiskFull) {
		t.Fatalf("error %v, want the writer's", err)
	}
}

func BenchmarkProfilePNG(b *testing.B) {
	d, h := ridge(20_000, 60_000)
	b.ReportAllocs()
	for b.Loop() {
		if err := ProfilePNG(io.Discard, d, h, WithAntennas(2, 20), WithEarthBulge(4.0/3)); err != nil {
			b.Fatal(err)
		}
	}
}
