package report

import (
	"bytes"
	"errors"
	"flag"
	"os"
	"path/filepath"
	"regexp"
	"strings"
	"testing"
	"time"

	"github.com/mastlink/mastlink/internal/pagecheck"
)

var update = flag.Bool("update", false, "rewrite the golden files under testdata/")

// outline is the page's structure (pagecheck.Outline).
func outline(t *testing.T, page []byte) string {
	t.Helper()
	o, err := pagecheck.Outline(page)
	if err != nil {
		t.Fatal(err)
	}
	return o
}

// TestBriefingGolden compares the structure of the sample briefing with
// testdata/briefing-outline.golden (regenerate with -update), and checks
// the same data give the same bytes.
func TestBriefingGolden(t *testing.T) {
	cases := []struct {
		name     string
		imperial bool
		golden   string
	}{
		{"metric", false, "briefing-outline.golden"},
		{"imperial", true, "briefing-outline-imperial.golden"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			d := sampleBriefing()
			d.Imperial = c.imperial
			var a, b bytes.Buffer
			if err := Briefing(&a, d); err != nil {
				t.Fatal(err)
			}
			if err := Briefing(&b, sampleBriefing2(c.imperial)); err != nil {
				t.Fatal(err)
			}
			if !bytes.Equal(a.Bytes(), b.Bytes()) {
				t.Error("the same data gave different bytes")
			}
			got := outline(t, a.Bytes())
			path := filepath.Join("testdata", c.golden)
			if *update {
				if err := os.WriteFile(path, []byte(got), 0o644); err != nil {
					t.Fatal(err)
				}
			}
			want, err := os.ReadFile(path)
			if err != nil {
				t.Fatalf("%v (run go test -update to create it)", err)
			}
			if got != string(want) {
				t.Errorf("outline differs from %s (go test -update rewrites it):\n%s", path, got)
			}
		})
	}
}

func sampleBriefing2(imperial bool) BriefingData {
	d := sampleBriefing()
	d.Imperial = imperial
	return d
}

// TestBriefingContent checks what the page says: sections in briefing
// order, escaped names, units, keep-outs rounded up, times in the zone.
func TestBriefingContent(t *testing.T) {
	cases := []struct {
		name     string
		imperial bool
		want     []string // in this order
		absent   []string
	}{
		{"metric", false, []string{
			`id="requirement"`, `id="map"`, `id="links"`, `id="mast"`, `id="profiles"`, `id="routes"`, `id="exposure"`, `id="cautions"`, `id="inputs"`,
		}, nil},
		{"order of a station's rows", false, []string{
			"Saturday 17 May 2025, 07:30 CET", // 06:30 UTC in UTC+1
			"Ridge team &lt;B &amp; C&gt; (optional)",
			// 2.2100000001 m rounds up to 2.3 m, 0.98 m to 1.0 m (safety distances rounded up).
			`<td class="num keep">2.3</td><td class="num keep">1.0</td>`,
		}, []string{"Ridge team <B"}},
		{"imperial", true, []string{
			"Distance (mi)", "8.83", // 14.2 km = 8.8236 mi
			// 2.2100000001 m = 7.2507 ft rounds up to 8 ft; 0.98 m = 3.215 ft to 4 ft.
			`<td class="num keep">8</td><td class="num keep">4</td>`,
		}, []string{"Distance (km)"}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			var buf bytes.Buffer
			if err := Briefing(&buf, sampleBriefing2(c.imperial)); err != nil {
				t.Fatal(err)
			}
			s := buf.String()
			at := 0
			for _, w := range c.want {
				i := strings.Index(s[at:], w)
				if i < 0 {
					t.Fatalf("%q missing, or not after the one before", w)
				}
				at += i + len(w)
			}
			for _, a := range c.absent {
				if strings.Contains(s, a) {
					t.Errorf("page holds %q", a)
				}
			}
		})
	}
}

// TestBriefingOffline: no resource is fetched from anywhere: no http(s)
// URL in src, href or CSS url(), no @import, no script; the map is a data:
// URI. The SVG namespace name is an identifier, not a fetch.
func TestBriefingOffline(t *testing.T) {
	var buf bytes.Buffer
	if err := Briefing(&buf, sampleBriefing()); err != nil {
		t.Fatal(err)
	}
	s := buf.String()
	refs := regexp.MustCompile(`(?i)(src|href|srcset|action|data)\s*=\s*["']?\s*(https?:)?//|url\(\s*["']?\s*(https?:)?//|@import|<script|<link|<iframe|<object|<embed`)
	if m := refs.FindString(s); m != "" {
		t.Errorf("page refers to something outside itself: %q", m)
	}
	for _, m := range regexp.MustCompile(`(?i)(?:src|href)\s*=\s*"([^"]*)"`).FindAllStringSubmatch(s, -1) {
		if u := m[1]; !strings.HasPrefix(u, "data:image/png;base64,") && !strings.HasPrefix(u, "#") {
			t.Errorf("reference %q is neither a data: URI nor a link within the page", u[:min(len(u), 40)])
		}
	}
	if n := strings.Count(s, "http"); n != strings.Count(s, `xmlns="http://www.w3.org/2000/svg"`) {
		t.Errorf("%d occurrences of http, but only the SVG namespace may appear", n)
	}
}

func TestBriefingBadInput(t *testing.T) {
	cases := []struct {
		name string
		edit func(*BriefingData)
		msg  string
	}{
		{"no title", func(d *BriefingData) { d.Title = "  " }, "Title is empty"},
		{"no date", func(d *BriefingData) { d.Date = time.Time{} }, "Date is not set"},
		{"no stations", func(d *BriefingData) { d.Stations = nil }, "Stations is empty"},
		{"no cautions", func(d *BriefingData) { d.Cautions = nil }, "Cautions is empty"},
		{"no k", func(d *BriefingData) { d.Inputs.K = 0 }, "Inputs.K is 0"},
		{"unnamed station", func(d *BriefingData) { d.Stations[1].Name = "" }, "Stations[1].Name is empty"},
		{"unnamed target", func(d *BriefingData) { d.Stations[0].Links[2].Target = "" }, "Stations[0] (Command post).Links[2].Target is empty"},
		{"map not PNG", func(d *BriefingData) { d.Map.PNG = []byte("GIF89a") }, "Map.PNG is not a PNG image"},
		{"map without alt", func(d *BriefingData) { d.Map.Alt = "" }, "Map.Alt is empty"},
		{"empty sweep", func(d *BriefingData) { d.Mast.Rows = nil }, "Mast.Rows is empty"},
		{"negative keep-out", func(d *BriefingData) { d.Exposure[0].KeepoutPublicM = -1 }, "Exposure[0] (Command post)"},
		{"bad profile", func(d *BriefingData) { d.Profiles[1].ElevM = d.Profiles[1].ElevM[:3] }, "Profiles[1] (Corvane relay to Pine Knob repeater)"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			d := sampleBriefing()
			c.edit(&d)
			var buf bytes.Buffer
			err := Briefing(&buf, d)
			if !errors.Is(err, ErrBriefingData) {
				t.Fatalf("error %v does not wrap ErrBriefingData", err)
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

func TestBriefingWriteError(t *testing.T) {
	if err := Briefing(failWriter{}, sampleBriefing()); !errors.Is(err, errDiskFull) {
		t.Fatalf("error %v, want the writer's", err)
	}
}

func TestRoundUp(t *testing.T) {
	cases := []struct{ v, step, want float64 }{
		{2.21, 0.1, 2.3}, {2.2, 0.1, 2.2}, {0.01, 0.1, 0.1}, {7.0001, 1, 8}, {7, 1, 7},
	}
	for _, c := range cases {
		if got := roundUp(c.v, c.step); got < c.want-1e-12 || got > c.want+1e-12 {
			t.Errorf("roundUp(%v, %v) = %v, want %v (never down: safety distances)", c.v, c.step, got, c.want)
		}
	}
}
