package main

import (
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// TestOutEverywhere: -o is honoured by link, feedline and horizon (the
// format from the extension, the same bytes as --format gives on stdout),
// refused with exit 2 and one line where the extension is unknown, where it
// would replace an input, and by commands that write no file.
func TestOutEverywhere(t *testing.T) {
	dir := t.TempDir()
	commands := map[string][]string{
		"link": {"link", "--dem", demoTerrain, "--waypoints", demoPoints, "--from", "Gorsefold trailhead", "--to", "Corvane Peak", "--freq", "147.78",
			"--to-gain", "6dBi", "--to-height", "20m", "--rx-sens", "-122dBm"},
		"feedline": {"feedline", "--cable", "RG-8X", "--length", "15m", "--freq", "146.94", "--swr", "1.5", "--connectors", "2"},
		"horizon":  {"horizon", "--height", "9m", "--to-height", "20m"},
	}
	for name, args := range commands {
		for _, c := range []struct{ ext, format string }{{"json", "json"}, {"csv", "csv"}, {"txt", "text"}} {
			t.Run(name+" ."+c.ext, func(t *testing.T) {
				path := filepath.Join(dir, name+"."+c.ext)
				want, _, code := runCmd(t, append(args, "--format", c.format)...)
				if code != 0 {
					t.Fatalf("code %d", code)
				}
				_, stderr, code := runCmd(t, append(args, "-o", path)...)
				got, err := os.ReadFile(path)
				if code != 0 || err != nil {
					t.Fatalf("code %d, %v: %s", code, err, stderr)
				}
				if string(got) != want {
					t.Errorf("%s differs from --format %s:\n%s\nwant\n%s", path, c.format, got, want)
				}
				if !strings.Contains(stderr, "wrote "+path) {
					t.Errorf("stderr %q does not say where it wrote", stderr)
				}
			})
		}
		t.Run(name+" bad extension", func(t *testing.T) {
			path := filepath.Join(dir, name+".kml")
			_, stderr, code := runCmd(t, append(args, "-o", path)...)
			if code != 2 || !strings.Contains(stderr, ".json, .csv, .txt") || strings.Count(stderr, "\n") != 1 {
				t.Errorf("code %d, stderr %q", code, stderr)
			}
			if _, err := os.Stat(path); err == nil {
				t.Errorf("%s written", path)
			}
		})
	}
	// Over an input: the waypoints file of link.
	before, _ := os.ReadFile(demoPoints)
	points := filepath.Join(dir, "points.gpx")
	if err := os.WriteFile(points, before, 0o644); err != nil {
		t.Fatal(err)
	}
	cp := filepath.Join(dir, "points.json")
	if err := os.Symlink(points, cp); err != nil {
		t.Fatal(err)
	}
	args := append([]string{}, commands["link"]...)
	args[4] = points
	if _, stderr, code := runCmd(t, append(args, "-o", cp)...); code != 2 || !strings.Contains(stderr, "input") {
		t.Errorf("over an input: code %d, %q", code, stderr)
	}
	if after, _ := os.ReadFile(points); string(after) != string(before) {
		t.Errorf("the waypoints file was changed")
	}
	for _, cmd := range [][]string{{"version"}, {"elevation", "10,10"}} {
		_, stderr, code := runCmd(t, append(cmd, "-o", filepath.Join(dir, "x.txt"))...)
		if code != 2 || !strings.Contains(stderr, "-o: mastlink "+cmd[0]+" writes no file") {
			t.Errorf("%s -o: code %d, %q", cmd[0], code, stderr)
		}
	}
}

// smallPlan writes a plan without terrain into dir, its waypoints in
// waypointsName (copied from the demo), and returns its path.
func smallPlan(t *testing.T, dir, waypointsName string) string {
	t.Helper()
	pts, err := os.ReadFile(demoPoints)
	if err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(filepath.Join(dir, waypointsName), pts, 0o644); err != nil {
		t.Fatal(err)
	}
	doc := "name: small\nfrequency: 146.55MHz\nwaypoints: " + waypointsName + "\n" +
		"defaults: {radio: {power: 5W, sensitivity: 0.25uV}}\n" +
		"stations: [{name: base, at: Ostral Bend, antenna: {height: 6m}}]\n" +
		"targets: [{name: peak, at: Corvane Peak}]\n"
	path := filepath.Join(dir, "plan.yaml")
	if err := os.WriteFile(path, []byte(doc), 0o644); err != nil {
		t.Fatal(err)
	}
	return path
}

// TestPlanOutChecksFirst: plan -o DIR checks every name against the
// plan's inputs before it writes anything (it used to write two files and
// then refuse the third), and no temporary file name reaches a message.
func TestPlanOutChecksFirst(t *testing.T) {
	dir := t.TempDir()
	p := smallPlan(t, dir, "plan.gpx") // plan -o writes a plan.gpx too
	_, stderr, code := runCmd(t, "plan", p, "-o", dir)
	if code != 2 || !strings.Contains(stderr, "plan.gpx") || !strings.Contains(stderr, "input") {
		t.Errorf("code %d, stderr %q", code, stderr)
	}
	for _, name := range []string{"links.geojson", "keepout.geojson", "links.csv"} {
		if _, err := os.Stat(filepath.Join(dir, name)); err == nil {
			t.Errorf("%s written before the refusal", name)
		}
	}
	// A directory in the way of an output file.
	out := filepath.Join(dir, "out")
	if err := os.MkdirAll(filepath.Join(out, "links.csv"), 0o755); err != nil {
		t.Fatal(err)
	}
	_, stderr, code = runCmd(t, "plan", p, "-o", out)
	if code == 0 || strings.Contains(stderr, ".tmp-") || !strings.Contains(stderr, "links.csv") {
		t.Errorf("code %d, stderr %q", code, stderr)
	}
	if _, err := os.Stat(filepath.Join(out, "links.geojson")); err == nil {
		t.Errorf("links.geojson written before the refusal")
	}
}

// TestWriteFileAtomicErrors: a failed write names the file asked for and
// the cause, never the temporary file.
func TestWriteFileAtomicErrors(t *testing.T) {
	path := filepath.Join(t.TempDir(), "no", "such", "dir", "x.csv")
	err := writeFileAtomic(path, []byte("a\n"), nil)
	if err == nil || strings.Contains(err.Error(), ".tmp-") || !strings.Contains(err.Error(), "writing "+path+": ") {
		t.Errorf("error %v", err)
	}
}

// TestPlanTerrainSource: with --dem the briefing names the --dem paths
// (it used to say "from ;"), and a bad --dem is blamed on --dem, not on
// the plan's terrain: line.
func TestPlanTerrainSource(t *testing.T) {
	dir := t.TempDir()
	p := smallPlan(t, dir, "points.gpx")
	out, stderr, code := runCmd(t, "plan", p, "--dem", demoTerrain)
	if code != 0 {
		t.Fatalf("code %d: %s", code, stderr)
	}
	if !strings.Contains(out, "elevation file(s) from "+demoTerrain+" (--dem)") {
		t.Errorf("terrain line: %q", firstLineWith(out, "Terrain:"))
	}
	bad := filepath.Join(dir, "nowhere")
	_, stderr, code = runCmd(t, "plan", p, "--dem", bad)
	if code == 0 || !strings.HasPrefix(stderr, "mastlink: --dem: ") || strings.Contains(stderr, "terrain") && strings.Contains(stderr, "plan.yaml") {
		t.Errorf("code %d, stderr %q", code, stderr)
	}
	// The plan's own terrain: line still blamed when it is at fault, and a
	// good --dem beside it is not.
	_, stderr, code = runCmd(t, "plan", demoPlan, "--dem", bad)
	if code == 0 || !strings.HasPrefix(stderr, "mastlink: --dem: ") {
		t.Errorf("bad --dem beside the plan's terrain: code %d, %q", code, stderr)
	}
}

func firstLineWith(s, prefix string) string {
	for _, l := range strings.Split(s, "\n") {
		if strings.HasPrefix(l, prefix) {
			return l
		}
	}
	return ""
}

// TestPlanDefaultMarginStated: a plan without require: says the default it
// judges by.
func TestPlanDefaultMarginStated(t *testing.T) {
	p := smallPlan(t, t.TempDir(), "points.gpx")
	out, stderr, code := runCmd(t, "plan", p)
	if code != 0 {
		t.Fatalf("code %d: %s", code, stderr)
	}
	if l := firstLineWith(out, "Requirement:"); !strings.HasPrefix(l, "Requirement: 10.0 dB of margin (default") {
		t.Errorf("requirement line %q", l)
	}
}

// TestHelpAndNames: the help says what each flag takes, in plain words.
func TestHelpAndNames(t *testing.T) {
	help := func(args ...string) string {
		out, _, code := runCmd(t, append(args, "--help")...)
		if code != 0 {
			t.Fatalf("%v --help: code %d", args, code)
		}
		return out
	}
	link := help("link")
	if strings.Contains(link, "--cable mastlink") || !strings.Contains(link, "--cable string") {
		t.Errorf("link --cable placeholder:\n%s", firstLineWith(link, "      --cable"))
	}
	if !strings.Contains(help("mast"), "--cables string") {
		t.Errorf("mast --cables placeholder")
	}
	if !strings.Contains(help("plan"), "-o, --out DIR") || !strings.Contains(link, "-o, --out FILE") {
		t.Errorf("-o help: plan takes a directory, link a file")
	}
	for _, cmd := range []string{"route", "sites"} {
		h := help(cmd)
		if strings.Contains(h, "see the help above") || !strings.Contains(h, "--station string") {
			t.Errorf("%s --station does not state its default", cmd)
		}
		for _, f := range []string{"--to-power", "--to-gain", "--to-height", "--to-sens"} {
			if !strings.Contains(h, f) {
				t.Errorf("%s lacks %s", cmd, f)
			}
		}
	}
	route := help("route")
	for _, l := range []string{firstLineWith(route, "      --step"), firstLineWith(route, "      --spacing")} {
		if !strings.Contains(l, "--step") || !strings.Contains(l, "--spacing") {
			t.Errorf("--step and --spacing are not explained side by side: %q", l)
		}
	}
	exp := help("exposure")
	if strings.Contains(exp, "2m (minutes)") || strings.Contains(exp, "--on 2m ") {
		t.Errorf("exposure help still takes m as minutes")
	}
	_, stderr, code := runCmd(t, "exposure", "--power", "50W", "--gain", "2.15dBi", "--freq", "146", "--on", "2m", "--off", "1min")
	if code != 2 || !strings.Contains(stderr, "--on") || !strings.Contains(stderr, "2min") {
		t.Errorf("--on 2m: code %d, %q", code, stderr)
	}
	for typo, want := range map[string]string{"plna": "did you mean plan?", "sties": "did you mean sites?", "feedlien": "did you mean feedline?"} {
		_, stderr, code := runCmd(t, typo)
		if code != 2 || !strings.Contains(stderr, want) || strings.Count(stderr, "\n") != 1 {
			t.Errorf("%s: code %d, %q", typo, code, stderr)
		}
	}
}
