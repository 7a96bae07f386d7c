package main

import (
	"bytes"
	"image"
	"image/color"
	"image/png"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"

	"github.com/mastlink/mastlink/internal/pagecheck"
	"github.com/mastlink/mastlink/plan"
	"github.com/mastlink/mastlink/plan/exposure"
	"github.com/mastlink/mastlink/plan/report"
)

// demoPlanCopy writes the demo plan into dir as name, with its files
// given by absolute paths, after edit; it returns the copy's path.
func demoPlanCopy(t *testing.T, dir, name string, edit func(string) string) string {
	t.Helper()
	b, err := os.ReadFile(demoPlan)
	if err != nil {
		t.Fatal(err)
	}
	valley, _ := filepath.Abs(filepath.Dir(demoPlan))
	s := string(b)
	for _, r := range [][2]string{
		{"terrain: ../terrain", "terrain: " + filepath.Join(valley, "..", "terrain")},
		{"waypoints: points.gpx", "waypoints: " + filepath.Join(valley, "points.gpx")},
		{"routes: [hike.gpx]", "routes: [" + filepath.Join(valley, "hike.gpx") + "]"},
		{"sites: [candidates.gpx]", "sites: [" + filepath.Join(valley, "candidates.gpx") + "]"},
	} {
		if !strings.Contains(s, r[0]) {
			t.Fatalf("demo plan lacks %q", r[0])
		}
		s = strings.Replace(s, r[0], r[1], 1)
	}
	if edit != nil {
		s = edit(s)
	}
	path := filepath.Join(dir, name)
	if err := os.WriteFile(path, []byte(s), 0o644); err != nil {
		t.Fatal(err)
	}
	return path
}

// Map page geometry of report.MapPNG with a subtitle (plan/report
// maplayout.go): 20 px page margins left and right, a 72 px header, a
// 104 px footer under the map frame.
const mapSidePx, mapHeaderPx, mapFooterPx = 20, 72, 104

// TestPlanMapPNG: plan -o writes plan-map.png, the same bytes every run:
// not blank (the relief has many tones), a dark station disc at Valley
// Base, a white target square at each target, the legend's margin bands
// (viridis) under the map.
func TestPlanMapPNG(t *testing.T) {
	dir := t.TempDir()
	var pngs [2][]byte
	for i := range pngs {
		out := filepath.Join(dir, "run"+string(rune('a'+i)))
		if _, stderr, code := runCmd(t, "plan", demoPlan, "-o", out); code != 0 {
			t.Fatalf("exit %d: %s", code, stderr)
		} else if !strings.Contains(stderr, "plan-map.png") {
			t.Errorf("stderr does not tell of the map: %q", stderr)
		}
		b, err := os.ReadFile(filepath.Join(out, planMapFile))
		if err != nil {
			t.Fatal(err)
		}
		pngs[i] = b
	}
	if !bytes.Equal(pngs[0], pngs[1]) {
		t.Error("two runs drew different bytes")
	}
	img, err := png.Decode(bytes.NewReader(pngs[0]))
	if err != nil {
		t.Fatal(err)
	}
	// Where things are: the bounds the command chose, on the frame.
	g := &globals{stderr: &bytes.Buffer{}}
	p, env, err := loadPlan(g, demoPlan)
	if err != nil {
		t.Fatal(err)
	}
	res, err := plan.EvaluatePlan(t.Context(), p, env, nil)
	if err != nil {
		t.Fatal(err)
	}
	if err := addPlanRoutesAndSites(t.Context(), g, p, env, res); err != nil {
		t.Fatal(err)
	}
	pm, err := newPlanMap(p, env, res, false, 0)
	if err != nil {
		t.Fatal(err)
	}
	b := img.Bounds()
	mapW, mapH := b.Dx()-2*mapSidePx, b.Dy()-mapHeaderPx-mapFooterPx
	at := func(lon, lat float64) (int, int) {
		return mapSidePx + int((lon-pm.bounds.West)/(pm.bounds.East-pm.bounds.West)*float64(mapW)),
			mapHeaderPx + int((pm.bounds.North-lat)/(pm.bounds.North-pm.bounds.South)*float64(mapH))
	}
	// near: a pixel within 6 px of (x, y) has the colour, within tol per
	// channel (the markers are about 13 px across).
	near := func(x, y int, want color.Color, tol int) bool {
		wr, wg, wb, _ := want.RGBA()
		for dy := -6; dy <= 6; dy++ {
			for dx := -6; dx <= 6; dx++ {
				r, g, bl, _ := img.At(x+dx, y+dy).RGBA()
				if abs(int(r>>8)-int(wr>>8)) <= tol && abs(int(g>>8)-int(wg>>8)) <= tol && abs(int(bl>>8)-int(wb>>8)) <= tol {
					return true
				}
			}
		}
		return false
	}
	st := p.Stations[0]
	if x, y := at(st.Pos.Lon(), st.Pos.Lat()); !near(x, y, color.RGBA{0x1c, 0x1c, 0x1c, 0xff}, 24) {
		t.Errorf("no dark station disc at Valley Base (%d, %d): %v", x, y, img.At(x, y))
	}
	for _, tg := range p.Targets {
		if x, y := at(tg.Pos.Lon(), tg.Pos.Lat()); !near(x, y, color.White, 8) || !near(x, y, color.RGBA{0x1c, 0x1c, 0x1c, 0xff}, 40) {
			t.Errorf("no white square with a dark edge at %s (%d, %d)", tg.Name, x, y)
		}
	}
	// Not blank: the relief alone gives many grey levels in the frame.
	tones := map[uint8]bool{}
	for y := mapHeaderPx + 5; y < mapHeaderPx+mapH-5; y += 3 {
		for x := mapSidePx + 5; x < mapSidePx+mapW-5; x += 3 {
			r, _, _, _ := img.At(x, y).RGBA()
			tones[uint8(r>>8)] = true
		}
	}
	if len(tones) < 40 {
		t.Errorf("only %d tones in the map: blank or flat", len(tones))
	}
	// The legend: every band of the margin scale (0, 10, 20, 30 dB) in the
	// footer.
	n := len(marginLevels(res.NeededMarginDB))
	for i := range n {
		c := report.BandColour(i, n)
		if !findColour(img, image.Rect(0, mapHeaderPx+mapH, b.Dx(), b.Dy()), c) {
			t.Errorf("legend lacks band %d colour %v", i, c)
		}
	}
}

func abs(v int) int {
	if v < 0 {
		return -v
	}
	return v
}

func findColour(img image.Image, r image.Rectangle, c color.NRGBA) bool {
	for y := r.Min.Y; y < r.Max.Y; y++ {
		for x := r.Min.X; x < r.Max.X; x++ {
			if got := color.NRGBAModel.Convert(img.At(x, y)).(color.NRGBA); got == c {
				return true
			}
		}
	}
	return false
}

// TestPlanKeepoutRoundedUp: keep-out radii on the map are rounded up as
// printed (a safety distance is never shown shorter; common practice).
func TestPlanKeepoutRoundedUp(t *testing.T) {
	for _, c := range []struct {
		m        float64
		imperial bool
		want     string
	}{{2.21, false, "2.3 m"}, {2.2, false, "2.2 m"}, {0.01, false, "0.1 m"}, {2.21, true, "8 ft"}, {3.048, true, "10 ft"}} {
		if got := keepoutText(c.m, c.imperial); got != c.want {
			t.Errorf("%v m (imperial %v): %q, want %q", c.m, c.imperial, got, c.want)
		}
		if r := keepoutRadiusM(c.m, c.imperial); r < c.m {
			t.Errorf("%v m: radius %v m drawn smaller", c.m, r)
		}
	}
}

// TestPlanBriefingDemo: the demo's briefing has the sections, tables and
// names of testdata/briefing-demo-outline.golden (go test -update rewrites
// it), the same bytes every run, nothing from outside the page, and its
// lengths in the --units asked for.
func TestPlanBriefingDemo(t *testing.T) {
	dir := t.TempDir()
	var pages [2][]byte
	for i := range pages {
		file := filepath.Join(dir, "card"+string(rune('a'+i))+".html")
		out, stderr, code := runCmd(t, "plan", demoPlan, "--briefing", file)
		if code != 0 {
			t.Fatalf("exit %d: %s", code, stderr)
		}
		if !strings.Contains(out, "Ostral valley search exercise") || !strings.Contains(stderr, "wrote the briefing to "+file) {
			t.Errorf("stdout or stderr lack the plan or the briefing: %q", stderr)
		}
		b, err := os.ReadFile(file)
		if err != nil {
			t.Fatal(err)
		}
		pages[i] = b
	}
	if !bytes.Equal(pages[0], pages[1]) {
		t.Error("two runs wrote different bytes")
	}
	page := pages[0]
	got, err := pagecheck.Outline(page)
	if err != nil {
		t.Fatal(err)
	}
	golden(t, "briefing-demo-outline.golden", got)
	if refs := pagecheck.Outside(page); len(refs) > 0 {
		t.Errorf("the page refers outside itself: %q", refs)
	}
	s := string(page)
	for _, want := range []string{
		`id="requirement"`, `id="map"`, `id="links"`, `id="mast"`, `id="profiles"`, `id="routes"`, `id="exposure"`, `id="cautions"`, `id="inputs"`,
		"Ostral valley and Quillet Glen (invented)",
		`<time datetime="2025-06-14T07:30:00-08:00">Saturday 14 June 2025, 07:30 UTC−08</time>`,
		"Valley Base", "Corvane Peak repeater", "Team Alder", "at Ostral Bend", "foam-0.405in",
		"Valley Base to Team Alder", "first Fresnel zone, 146.55 MHz", "Gorsefold trailhead to Quillet Glen over Quillet Col",
		"S49W124.hgt.gz", "k = 4/3", "data:image/png;base64,",
	} {
		if !strings.Contains(s, want) {
			t.Errorf("briefing lacks %q", want)
		}
	}
	for _, c := range exposure.Cautions() {
		if !strings.Contains(s, strings.ReplaceAll(c, "'", "&#39;")) {
			t.Errorf("briefing lacks the caution %q", c)
		}
	}
	// Imperial: the tables say mi and ft.
	file := filepath.Join(dir, "imperial.html")
	if _, stderr, code := runCmd(t, "--units", "imperial", "plan", demoPlan, "--briefing", file); code != 0 {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	b, _ := os.ReadFile(file)
	for _, want := range []string{"Distance (mi)", "Height (ft)"} {
		if !strings.Contains(string(b), want) {
			t.Errorf("imperial briefing lacks %q", want)
		}
	}
}

// TestPlanBriefingInBrowser opens the demo's briefing in headless
// chromium (pagecheck.InBrowser): no console error or failed load, a
// screenshot with ink, 1 to 4 pages on A4 and US Letter whose text holds
// the plan's name and every caution.
func TestPlanBriefingInBrowser(t *testing.T) {
	if testing.Short() {
		t.Skip("starts a browser")
	}
	file := filepath.Join(t.TempDir(), "card.html")
	if _, stderr, code := runCmd(t, "plan", demoPlan, "--briefing", file); code != 0 {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	want := append([]string{"Ostral valley search exercise", "CAUTIONS"}, exposure.Cautions()...)
	pagecheck.InBrowser(t, file, append(want, briefingCautions...))
}

// TestPlanBriefingFromPlanFile: briefing: in the plan file, relative to
// it; without date: the page is dated the day the plan file was last
// changed, in the plan's time zone.
func TestPlanBriefingFromPlanFile(t *testing.T) {
	dir := t.TempDir()
	path := demoPlanCopy(t, dir, "plan.yaml", func(s string) string {
		s = strings.Replace(s, "date: 2025-06-14 07:30", "briefing: card.html", 1)
		return strings.Replace(s, "timezone: Etc/GMT+8", "timezone: Europe/Oslo", 1)
	})
	// 23:30 UTC on 1 March 2024 is already 2 March in Oslo (UTC+1 in
	// winter; IANA tzdata).
	mod := time.Date(2024, 3, 1, 23, 30, 0, 0, time.UTC)
	if err := os.Chtimes(path, mod, mod); err != nil {
		t.Fatal(err)
	}
	if _, stderr, code := runCmd(t, "plan", path); code != 0 {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	b, err := os.ReadFile(filepath.Join(dir, "card.html"))
	if err != nil {
		t.Fatal(err)
	}
	for _, want := range []string{`<time datetime="2024-03-02">Saturday 2 March 2024</time>`, "the day the plan file was last changed"} {
		if !strings.Contains(string(b), want) {
			t.Errorf("briefing lacks %q", want)
		}
	}
}

// TestPlanBriefingBadInput: an output over an input, a missing or
// unwritable folder, a file that is not HTML: one clear line naming the
// flag or the plan's field, a non-zero exit, nothing written (not even
// the plan's stdout) and no temporary file left.
func TestPlanBriefingBadInput(t *testing.T) {
	dir := t.TempDir()
	asHTML := demoPlanCopy(t, dir, "plan.html", nil) // a plan file may have any name
	locked := filepath.Join(dir, "locked")
	if err := os.Mkdir(locked, 0o555); err != nil {
		t.Fatal(err)
	}
	folder := filepath.Join(dir, "out.html")
	if err := os.Mkdir(folder, 0o755); err != nil {
		t.Fatal(err)
	}
	inPlan := demoPlanCopy(t, dir, "entry.yaml", func(s string) string {
		return strings.Replace(s, "date: 2025-06-14 07:30", "briefing: nowhere/card.html", 1)
	})
	cases := []struct {
		name string
		args []string
		code int
		want string
		root bool // root writes anywhere: the case cannot fail as root
	}{
		{"over the plan file", []string{"plan", asHTML, "--briefing", asHTML}, 2, "--briefing: " + asHTML + " is an input of this run", false},
		{"not html", []string{"plan", demoPlan, "--briefing", filepath.Join(dir, "card.pdf")}, 2, "--briefing: " + filepath.Join(dir, "card.pdf") + ": the briefing is an HTML page", false},
		{"missing folder", []string{"plan", demoPlan, "--briefing", filepath.Join(dir, "no", "card.html")}, 2, "the folder " + filepath.Join(dir, "no") + " does not exist", false},
		{"a folder", []string{"plan", demoPlan, "--briefing", folder}, 2, "--briefing: " + folder + " is a folder", false},
		{"unwritable folder", []string{"plan", demoPlan, "--briefing", filepath.Join(locked, "card.html")}, 2, "cannot write in " + locked, true},
		{"plan entry, missing folder", []string{"plan", inPlan}, 1, inPlan + ":6: briefing: " + filepath.Join(dir, "nowhere", "card.html") + ": the folder", false},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			if c.root && os.Geteuid() == 0 {
				t.Skip("running as root, which may write in any folder")
			}
			out, stderr, code := runCmd(t, c.args...)
			if code != c.code || !strings.Contains(stderr, c.want) || strings.Count(strings.TrimSpace(stderr), "\n") != 0 {
				t.Errorf("exit %d, stderr %q; want %d and one line with %q", code, stderr, c.code, c.want)
			}
			if out != "" {
				t.Errorf("stdout %q, want nothing", out)
			}
		})
	}
	entries, _ := os.ReadDir(dir)
	var names []string
	for _, e := range entries {
		names = append(names, e.Name())
	}
	if strings.Join(names, " ") != "entry.yaml locked out.html plan.html" {
		t.Errorf("files in the folder: %v, want only the inputs", names)
	}
	for _, d := range []string{locked, folder} {
		if left, _ := os.ReadDir(d); len(left) != 0 {
			t.Errorf("%d files left in %s", len(left), d)
		}
	}
}
