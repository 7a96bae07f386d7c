package report

import (
	"bytes"
	"encoding/xml"
	"errors"
	"io"
	"math"
	"strconv"
	"strings"
	"testing"
)

// svgDoc is what the tests read back from a chart.
type svgDoc struct {
	texts   map[string]string            // text of elements with an id
	attrs   map[string]map[string]string // attributes of elements with an id
	yTicks  []tickMark                   // y-axis tick labels: value and y position
	xTicks  []tickMark                   // x-axis tick labels: value and x position
	hasElem map[string]bool              // element names seen
}

type tickMark struct{ value, pos float64 }

// parseSVG decodes the whole document strictly (any XML error fails the
// test) and collects ids, texts and tick labels.
func parseSVG(t *testing.T, data []byte) svgDoc {
	t.Helper()
	doc := svgDoc{texts: map[string]string{}, attrs: map[string]map[string]string{}, hasElem: map[string]bool{}}
	dec := xml.NewDecoder(bytes.NewReader(data))
	dec.Strict = true
	var stack []map[string]string
	var inTicks int
	var text strings.Builder
	root := ""
	for {
		tok, err := dec.Token()
		if err == io.EOF {
			break
		}
		if err != nil {
			t.Fatalf("SVG is not well-formed XML: %v\n%s", err, data)
		}
		switch e := tok.(type) {
		case xml.StartElement:
			if root == "" {
				root = e.Name.Local
				if e.Name.Space != "http://www.w3.org/2000/svg" {
					t.Errorf("root element in namespace %q, want the SVG namespace", e.Name.Space)
				}
			}
			doc.hasElem[e.Name.Local] = true
			a := map[string]string{"": e.Name.Local}
			for _, at := range e.Attr {
				a[at.Name.Local] = at.Value
			}
			if a["id"] != "" {
				doc.attrs[a["id"]] = a
			}
			if a["id"] == "tick-labels" {
				inTicks = len(stack) + 1
			}
			stack = append(stack, a)
			text.Reset()
		case xml.CharData:
			text.Write(e)
		case xml.EndElement:
			a := stack[len(stack)-1]
			stack = stack[:len(stack)-1]
			if id := a["id"]; id != "" && a[""] == "text" {
				doc.texts[id] = text.String()
			}
			if inTicks > 0 && a[""] == "text" {
				v, err := strconv.ParseFloat(text.String(), 64)
				if err != nil {
					t.Fatalf("tick label %q is not a number", text.String())
				}
				x, _ := strconv.ParseFloat(a["x"], 64)
				y, _ := strconv.ParseFloat(a["y"], 64)
				if a["text-anchor"] == "end" {
					doc.yTicks = append(doc.yTicks, tickMark{v, y - 4})
				} else {
					doc.xTicks = append(doc.xTicks, tickMark{v, x})
				}
			}
			if inTicks == len(stack)+1 && a["id"] == "tick-labels" {
				inTicks = 0
			}
		}
	}
	if root != "svg" {
		t.Fatalf("root element %q, want svg", root)
	}
	return doc
}

// heightAt converts a y coordinate back to a height in display units with
// the y-axis tick labels.
func (d svgDoc) heightAt(t *testing.T, y float64) float64 {
	t.Helper()
	if len(d.yTicks) < 2 {
		t.Fatalf("fewer than 2 y tick labels")
	}
	a, b := d.yTicks[0], d.yTicks[len(d.yTicks)-1]
	return a.value + (y-a.pos)*(b.value-a.value)/(b.pos-a.pos)
}

// pathPoints reads the coordinates of an SVG path made of M/L commands.
func pathPoints(t *testing.T, d string) [][2]float64 {
	t.Helper()
	var pts [][2]float64
	f := strings.Fields(strings.TrimSuffix(strings.TrimSpace(d), "Z"))
	for i := 0; i+1 < len(f); i += 2 {
		x, err1 := strconv.ParseFloat(strings.TrimLeft(f[i], "ML"), 64)
		y, err2 := strconv.ParseFloat(f[i+1], 64)
		if err1 != nil || err2 != nil {
			t.Fatalf("path element %q %q", f[i], f[i+1])
		}
		pts = append(pts, [2]float64{x, y})
	}
	return pts
}

func flat(n int, lengthM, hM float64) (d, h []float64) {
	d, h = make([]float64, n), make([]float64, n)
	for i := range d {
		d[i] = lengthM * float64(i) / float64(n-1)
		h[i] = hM
	}
	return d, h
}

// ridge is a smooth invented profile: a hill in the middle of a valley.
func ridge(n int, lengthM float64) (d, h []float64) {
	d, h = make([]float64, n), make([]float64, n)
	for i := range d {
		x := float64(i) / float64(n-1)
		d[i] = lengthM * x
		h[i] = 300 + 900*math.Exp(-math.Pow((x-0.55)/0.12, 2)) + 40*math.Sin(17*x)
	}
	return d, h
}

func TestProfileSVGDocument(t *testing.T) {
	d, h := ridge(120, 11_000)
	cases := []struct {
		name         string
		opts         []ProfileOption
		title        string
		xLabel       string
		yLabel       string
		ray, curve   bool
		legendSubstr string
	}{
		{"metric plain", nil, "Terrain profile", "distance (km)", "elevation (m)", false, false, ""},
		{"imperial with title", []ProfileOption{WithImperial(), WithTitle(`Peak & "Saddle" <north>`)}, `Peak & "Saddle" <north>`, "distance (mi)", "elevation (ft)", false, false, ""},
		{"antennas and bulge", []ProfileOption{WithAntennas(2, 20), WithEarthBulge(4.0 / 3)}, "Terrain profile", "distance (km)", "elevation (m)", true, true, "k = 4/3"},
		{"bulge k=1", []ProfileOption{WithEarthBulge(1), WithSize(1200, 500)}, "Terrain profile", "distance (km)", "elevation (m)", false, true, "k = 1.00"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			var buf bytes.Buffer
			if err := ProfileSVG(&buf, d, h, c.opts...); err != nil {
				t.Fatal(err)
			}
			doc := parseSVG(t, buf.Bytes())
			if got := doc.texts["title"]; got != c.title {
				t.Errorf("title %q, want %q", got, c.title)
			}
			if got := doc.texts["x-axis-label"]; got != c.xLabel {
				t.Errorf("x-axis label %q, want %q", got, c.xLabel)
			}
			if got := doc.texts["y-axis-label"]; got != c.yLabel {
				t.Errorf("y-axis label %q, want %q", got, c.yLabel)
			}
			if _, ok := doc.attrs["line-of-sight"]; ok != c.ray {
				t.Errorf("line of sight drawn: %v, want %v", ok, c.ray)
			}
			if _, ok := doc.attrs["earth-curve"]; ok != c.curve {
				t.Errorf("earth curve drawn: %v, want %v", ok, c.curve)
			}
			if c.legendSubstr != "" && !strings.Contains(buf.String(), c.legendSubstr) {
				t.Errorf("legend lacks %q", c.legendSubstr)
			}
			if _, ok := doc.attrs["grid"]; !ok {
				t.Error("no grid")
			}
			// Every ground vertex lies inside the plot area, and the
			// highest sample is drawn highest.
			pts := pathPoints(t, doc.attrs["terrain"]["d"])
			if len(pts) != 2*len(d) {
				t.Fatalf("terrain path has %d vertices, want %d (samples and floor)", len(pts), 2*len(d))
			}
			top := math.Inf(1)
			topAt := -1
			for i, p := range pts[:len(d)] {
				if p[1] < top {
					top, topAt = p[1], i
				}
			}
			hiAt := 0
			for i := range h {
				if h[i] > h[hiAt] {
					hiAt = i
				}
			}
			if !c.curve && topAt != hiAt {
				t.Errorf("highest vertex is sample %d, highest ground is sample %d", topAt, hiAt)
			}
			if len(doc.xTicks) < 3 || len(doc.yTicks) < 3 {
				t.Errorf("%d x and %d y tick labels, want at least 3 each", len(doc.xTicks), len(doc.yTicks))
			}
		})
	}
}

// TestProfileSVGScale reads heights back from the drawn chart through its
// own tick labels: ground, antenna tops and earth bulge.
func TestProfileSVGScale(t *testing.T) {
	cases := []struct {
		name    string
		lengthM float64
		groundM float64
		k       float64
		txM     float64
		rxM     float64
		bulgeM  float64 // at mid-path: d1·d2 / (2 k R) with R = 6371 km (circle geometry; common practice)
		tolM    float64 // SVG coordinates have 0.01 px resolution
	}{
		{"40 km k=4/3", 40_000, 0, 4.0 / 3, 10, 20, 20_000.0 * 20_000 / (2 * 4.0 / 3 * 6_371_000), 0.05},
		{"40 km k=1", 40_000, 0, 1, 10, 20, 20_000.0 * 20_000 / (2 * 6_371_000), 0.05},
		{"12 km k=4/3 on a plateau", 12_000, 850, 4.0 / 3, 3, 30, 6_000.0 * 6_000 / (2 * 4.0 / 3 * 6_371_000), 0.05},
		{"flat earth", 12_000, 100, 0, 10, 20, 0, 0.05},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			d, h := flat(201, c.lengthM, c.groundM)
			opts := []ProfileOption{WithAntennas(c.txM, c.rxM)}
			if c.k > 0 {
				opts = append(opts, WithEarthBulge(c.k))
			}
			var buf bytes.Buffer
			if err := ProfileSVG(&buf, d, h, opts...); err != nil {
				t.Fatal(err)
			}
			doc := parseSVG(t, buf.Bytes())
			los := doc.attrs["line-of-sight"]
			y1, _ := strconv.ParseFloat(los["y1"], 64)
			y2, _ := strconv.ParseFloat(los["y2"], 64)
			if got := doc.heightAt(t, y1); math.Abs(got-(c.groundM+c.txM)) > c.tolM {
				t.Errorf("near antenna top drawn at %.3f m, want %.3f m", got, c.groundM+c.txM)
			}
			if got := doc.heightAt(t, y2); math.Abs(got-(c.groundM+c.rxM)) > c.tolM {
				t.Errorf("far antenna top drawn at %.3f m, want %.3f m", got, c.groundM+c.rxM)
			}
			pts := pathPoints(t, doc.attrs["terrain"]["d"])
			mid := doc.heightAt(t, pts[100][1])
			end := doc.heightAt(t, pts[0][1])
			if math.Abs(end-c.groundM) > c.tolM {
				t.Errorf("ground at the end drawn at %.3f m, want %.3f m", end, c.groundM)
			}
			if got := mid - c.groundM; math.Abs(got-c.bulgeM) > c.tolM {
				t.Errorf("ground at mid-path raised by %.3f m, want the bulge %.3f m", got, c.bulgeM)
			}
			// The x tick labels map back to distances.
			xt := doc.xTicks
			if len(xt) < 2 {
				t.Fatal("no x ticks")
			}
			pxPerKm := (xt[len(xt)-1].pos - xt[0].pos) / (xt[len(xt)-1].value - xt[0].value)
			if got := (pts[200][0] - xt[0].pos) / pxPerKm; math.Abs(got-c.lengthM/1000) > 0.001 {
				t.Errorf("far end drawn at %.4f km, want %.4f km", got, c.lengthM/1000)
			}
		})
	}
}

// TestProfileSVGThinning: a long profile is drawn with at most about four
// vertices per pixel column, and a one-sample spike survives.
func TestProfileSVGThinning(t *testing.T) {
	d, h := flat(200_001, 100_000, 50)
	h[123_457] = 900
	var buf bytes.Buffer
	if err := ProfileSVG(&buf, d, h); err != nil {
		t.Fatal(err)
	}
	doc := parseSVG(t, buf.Bytes())
	pts := pathPoints(t, doc.attrs["terrain"]["d"])
	plotW := DefaultWidthPx - marginLeftPx - marginRightPx
	if len(pts) > 2*(2*plotW+2) {
		t.Errorf("%d vertices for a %d px wide plot", len(pts), plotW)
	}
	top := math.Inf(1)
	for _, p := range pts {
		top = math.Min(top, p[1])
	}
	if got := doc.heightAt(t, top); math.Abs(got-900) > 0.5 {
		t.Errorf("spike drawn at %.2f m, want 900 m", got)
	}
}

func TestProfileSVGErrors(t *testing.T) {
	d, h := flat(10, 1000, 10)
	dec := append([]float64(nil), d...)
	dec[5] = dec[3]
	nan := append([]float64(nil), h...)
	nan[2] = math.NaN()
	cases := []struct {
		name string
		d, h []float64
		opts []ProfileOption
		msg  string
	}{
		{"lengths differ", d, h[:9], nil, "10 distances but 9 heights"},
		{"one sample", d[:1], h[:1], nil, "at least 2 samples"},
		{"NaN height", d, nan, nil, "sample 2 is not a finite number"},
		{"decreasing distance", dec, h, nil, "sample 5"},
		{"no length", make([]float64, 3), h[:3], nil, "no length"},
		{"too small", d, h, []ProfileOption{WithSize(100, 100)}, "size 100 × 100"},
		{"negative mast", d, h, []ProfileOption{WithAntennas(-1, 3)}, "antenna heights"},
		{"bad k", d, h, []ProfileOption{WithEarthBulge(-1)}, "k-factor"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			var buf bytes.Buffer
			err := ProfileSVG(&buf, c.d, c.h, c.opts...)
			if !errors.Is(err, ErrChartData) {
				t.Fatalf("error %v does not wrap ErrChartData", err)
			}
			if !strings.Contains(err.Error(), c.msg) {
				t.Errorf("error %q lacks %q", err, c.msg)
			}
			if buf.Len() != 0 {
				t.Errorf("wrote %d bytes despite the error", buf.Len())
			}
		})
	}
}

type failWriter struct{}

var errDiskFull = errors.New("disk full")

func (failWriter) Write(p []byte) (int, error) { return 0, errDiskFull }

func TestProfileSVGWriteError(t *testing.T) {
	d, h := flat(10, 1000, 10)
	if err := ProfileSVG(failWriter{}, d, h); !errors.Is(err, errDiskFull) {
		t.Fatalf("error %v, want the writer's", err)
	}
}

func TestNiceTicks(t *testing.T) {
	cases := []struct {
		lo, hi   float64
		target   int
		step     float64 // 1, 2, 2.5 or 5 × 10^n (common practice)
		min, max float64
	}{
		{0, 11, 8, 2, 0, 12},
		{0, 1.3, 8, 0.2, 0, 1.4},
		{283, 1720, 6, 250, 250, 1750},
		{-12, 37, 6, 10, -20, 40},
		{0, 100, 4, 25, 0, 100},
	}
	for _, c := range cases {
		tk := niceTicks(c.lo, c.hi, c.target)
		if math.Abs(tk.step-c.step) > 1e-12 || math.Abs(tk.min-c.min) > 1e-9 || math.Abs(tk.max-c.max) > 1e-9 {
			t.Errorf("niceTicks(%g, %g, %d) = step %g over %g..%g, want step %g over %g..%g", c.lo, c.hi, c.target, tk.step, tk.min, tk.max, c.step, c.min, c.max)
		}
	}
	if got := (ticks{step: 0.25}).label(0.5); got != "0.50" {
		t.Errorf("label 0.5 at step 0.25 = %q, want 0.50", got)
	}
}

func BenchmarkProfileSVG(b *testing.B) {
	d, h := ridge(20_000, 60_000)
	b.ReportAllocs()
	for b.Loop() {
		if err := ProfileSVG(io.Discard, d, h, WithAntennas(2, 20), WithEarthBulge(4.0/3)); err != nil {
			b.Fatal(err)
		}
	}
}
