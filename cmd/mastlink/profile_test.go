package main

import (
	"bytes"
	"encoding/json"
	"encoding/xml"
	"fmt"
	"image"
	"image/png"
	"io"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"github.com/mastlink/mastlink/terrain"
)

// profileJSON is the part of `mastlink profile --format json` the tests read.
type profileJSON struct {
	From, To struct {
		Name       string  `json:"name"`
		Lat        float64 `json:"lat"`
		Lon        float64 `json:"lon"`
		ElevationM float64 `json:"elevation_m"`
	}
	DistanceM      float64  `json:"distance_m"`
	AzimuthDeg     float64  `json:"azimuth_deg"`
	BackAzimuthDeg float64  `json:"back_azimuth_deg"`
	StepM          float64  `json:"step_m"`
	Sources        []string `json:"sources"`
	Samples        []struct {
		DistanceM  float64 `json:"distance_m"`
		Lat        float64 `json:"lat"`
		Lon        float64 `json:"lon"`
		ElevationM float64 `json:"elevation_m"`
	} `json:"samples"`
}

func runProfileJSON(t *testing.T, args ...string) profileJSON {
	t.Helper()
	out, stderr, code := runCmd(t, append([]string{"--format", "json", "profile"}, args...)...)
	if code != 0 {
		t.Fatalf("profile %v: exit %d: %s", args, code, stderr)
	}
	var p profileJSON
	if err := json.Unmarshal([]byte(out), &p); err != nil {
		t.Fatalf("profile JSON: %v\n%s", err, out)
	}
	return p
}

// geodSolve runs GeographicLib's GeodSolve with args, one problem per line
// of input, and returns the numbers of each output line.
func geodSolve(t *testing.T, tool string, input string, args ...string) [][]float64 {
	t.Helper()
	cmd := exec.Command(tool, args...)
	cmd.Stdin = strings.NewReader(input)
	out, err := cmd.Output()
	if err != nil {
		t.Fatalf("GeodSolve %v: %v", args, err)
	}
	var res [][]float64
	for _, line := range strings.Split(strings.TrimSpace(string(out)), "\n") {
		var row []float64
		for _, f := range strings.Fields(line) {
			v, err := strconv.ParseFloat(f, 64)
			if err != nil {
				t.Fatalf("GeodSolve output %q", line)
			}
			row = append(row, v)
		}
		res = append(res, row)
	}
	return res
}

// angleDiff is the difference a−b of two bearings in degrees, in (−180, 180].
func angleDiff(a, b float64) float64 {
	d := math.Mod(a-b, 360)
	if d > 180 {
		d -= 360
	} else if d <= -180 {
		d += 360
	}
	return d
}

// TestProfileGeodSolve checks the length and both bearings against
// GeographicLib 2.1.2 (`GeodSolve -i -p 9`, Karney's algorithm) and every
// sample position against its direct solution (`GeodSolve -p 9`) at the
// sample's distance.
func TestProfileGeodSolve(t *testing.T) {
	tool := needTool(t, "GeodSolve", "geographiclib-tools")
	dem, wpt := []string{"--dem", exampleTerrain}, []string{"--waypoints", examplePoints}
	cases := []struct {
		name    string
		args    []string
		tolM    float64 // length; GeodSolve prints to 1 nm, our solution is Karney's too
		tolDeg  float64 // bearings
		posTolM float64 // sample positions: exact knots and interpolation under 0.05 m (terrain.Profile)
	}{
		{"Wethermoss Saddle to Corvane Peak", append(append(dem, wpt...), "--from", "Wethermoss Saddle", "--to", "Corvane Peak"), 1e-3, 1e-6, 0.05},
		{"across the 124°W seam", append(append(dem, wpt...), "--from", "Team Birch, upper Ostral", "--to", "Corvane Peak"), 1e-3, 1e-6, 0.05},
		{"due east on the equator", []string{"--from", "0,10", "--to", "0,10.5"}, 1e-3, 1e-6, 0.05},
		{"southern mid-latitude, 46 km", []string{"--from", "-48.5,-124.3", "--to", "-48.4,-123.7"}, 1e-3, 1e-6, 0.05},
		{"across the antimeridian", []string{"--from", "-16.8,179.7", "--to", "-17.3,-179.6", "--step", "500m"}, 1e-3, 1e-6, 0.05},
		{"high latitude, 600 km", []string{"--from", "78.2,15.6", "--to", "76.5,40.1", "--step", "2km"}, 1e-3, 1e-6, 0.05},
		{"nearly antipodal", []string{"--from", "0.5,0", "--to", "-0.3,179.4", "--step", "50km"}, 1e-3, 1e-6, 0.05},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			p := runProfileJSON(t, c.args...)
			ref := geodSolve(t, tool, fmt.Sprintf("%.15g %.15g %.15g %.15g\n", p.From.Lat, p.From.Lon, p.To.Lat, p.To.Lon), "-i", "-p", "9")[0]
			azi1, azi2, s12 := ref[0], ref[1], ref[2] // GeographicLib GeodSolve 2.1.2
			if math.Abs(p.DistanceM-s12) > c.tolM {
				t.Errorf("length %.6f m, GeodSolve %.6f m", p.DistanceM, s12)
			}
			if d := angleDiff(p.AzimuthDeg, azi1); math.Abs(d) > c.tolDeg {
				t.Errorf("azimuth %.9f°, GeodSolve %.9f°", p.AzimuthDeg, azi1)
			}
			// GeodSolve's azi2 is the forward bearing at the far end; the
			// bearing back is 180° from it.
			if d := angleDiff(p.BackAzimuthDeg, azi2+180); math.Abs(d) > c.tolDeg {
				t.Errorf("back azimuth %.9f°, GeodSolve azi2 + 180 = %.9f°", p.BackAzimuthDeg, azi2+180)
			}
			if p.AzimuthDeg < 0 || p.AzimuthDeg >= 360 || p.BackAzimuthDeg < 0 || p.BackAzimuthDeg >= 360 {
				t.Errorf("bearings %v, %v not in [0, 360)", p.AzimuthDeg, p.BackAzimuthDeg)
			}

			n := len(p.Samples)
			if n < 2 || p.Samples[0].DistanceM != 0 || math.Abs(p.Samples[n-1].DistanceM-p.DistanceM) > 1e-6 {
				t.Fatalf("%d samples from %v m to %v m", n, p.Samples[0].DistanceM, p.Samples[n-1].DistanceM)
			}
			var in strings.Builder
			for i, s := range p.Samples {
				if i > 0 && math.Abs(s.DistanceM-p.Samples[i-1].DistanceM-p.StepM) > 1e-6 {
					t.Fatalf("sample %d is %.6f m after the one before, step %.6f m", i, s.DistanceM-p.Samples[i-1].DistanceM, p.StepM)
				}
				fmt.Fprintf(&in, "%.15g %.15g %.15g %.15g\n", p.From.Lat, p.From.Lon, azi1, s.DistanceM)
			}
			pos := geodSolve(t, tool, in.String(), "-p", "9")
			worst := 0.0
			for i, s := range p.Samples {
				dLatM := (s.Lat - pos[i][0]) * 111_000 // metres per degree, roughly (common practice)
				dLonM := angleDiff(s.Lon, pos[i][1]) * 111_000 * math.Cos(s.Lat*math.Pi/180)
				worst = math.Max(worst, math.Hypot(dLatM, dLonM))
			}
			t.Logf("worst sample position error against GeodSolve: %.2g m", worst)
			if worst > c.posTolM {
				t.Errorf("a sample is %.4f m from GeodSolve's point at its distance", worst)
			}
		})
	}
}

// TestProfileSeam: a profile across the 124°W meridian, where the tiles
// S49W125 and S49W124 meet, uses both tiles and has no step in the ground
// there: the heights extrapolated to the seam from either side agree, and
// no jump between samples at the seam is larger than those around it.
func TestProfileSeam(t *testing.T) {
	p := runProfileJSON(t, "--dem", exampleTerrain, "--waypoints", examplePoints,
		"--from", "Team Birch, upper Ostral", "--to", "Corvane Peak", "--step", "2m")
	if strings.Join(p.Sources, ",") != "S49W125.hgt.gz,S49W124.hgt.gz" {
		t.Errorf("sources %v, want both tiles in path order", p.Sources)
	}
	k := -1
	for i := 1; i < len(p.Samples); i++ {
		if p.Samples[i-1].Lon < -124 && p.Samples[i].Lon >= -124 {
			k = i
			break
		}
	}
	if k < 3 || k+2 >= len(p.Samples) {
		t.Fatalf("the path does not cross 124°W (k = %d)", k)
	}
	s := p.Samples
	// Linear extrapolation to the seam from the two samples on each side.
	seam := func(a, b int) float64 {
		f := (-124 - s[a].Lon) / (s[b].Lon - s[a].Lon)
		return s[a].ElevationM + f*(s[b].ElevationM-s[a].ElevationM)
	}
	west, east := seam(k-2, k-1), seam(k, k+1)
	// Bilinear ground is continuous with a slope that changes only from
	// cell to cell; over 2 m steps the two extrapolations differ by
	// centimetres (no reference figure: a seam error would be metres).
	t.Logf("seam at sample %d: %.3f m from the west, %.3f m from the east", k, west, east)
	if math.Abs(west-east) > 0.1 {
		t.Errorf("ground at the seam: %.3f m from the west, %.3f m from the east", west, east)
	}
	jump := math.Abs(s[k].ElevationM - s[k-1].ElevationM)
	around := 0.0
	for i := k - 40; i < k+40; i++ {
		if i != k && i > 0 && i < len(s) {
			around = math.Max(around, math.Abs(s[i].ElevationM-s[i-1].ElevationM))
		}
	}
	if jump > 1.5*around+0.01 {
		t.Errorf("step of %.3f m at the seam, at most %.3f m between samples around it", jump, around)
	}
}

// TestProfileCSVRoundTrip: -o F.csv writes every sample, ReadProfileCSV
// reads them back as written, and `mastlink link --profile` accepts the file.
func TestProfileCSVRoundTrip(t *testing.T) {
	dir := t.TempDir()
	file := filepath.Join(dir, "saddle-peak.csv")
	args := []string{"--dem", exampleTerrain, "--waypoints", examplePoints, "--from", "Wethermoss Saddle", "--to", "Corvane Peak"}
	p := runProfileJSON(t, args...)
	_, stderr, code := runCmd(t, append([]string{"-o", file, "profile"}, args...)...)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	if !strings.Contains(stderr, "wrote the profile") {
		t.Errorf("stderr %q does not say where the profile went", stderr)
	}
	pc, err := terrain.ReadProfileCSV(file)
	if err != nil {
		t.Fatal(err)
	}
	if len(pc.DistM) != len(p.Samples) {
		t.Fatalf("%d rows, %d samples", len(pc.DistM), len(p.Samples))
	}
	for i, s := range p.Samples {
		// Written with 2 decimals: within half a centimetre.
		if math.Abs(pc.DistM[i]-s.DistanceM) > 0.005 || math.Abs(pc.ElevM[i]-s.ElevationM) > 0.005 {
			t.Fatalf("row %d: %.3f m, %.3f m; sample %.3f m, %.3f m", i, pc.DistM[i], pc.ElevM[i], s.DistanceM, s.ElevationM)
		}
	}
	data, err := os.ReadFile(file)
	if err != nil {
		t.Fatal(err)
	}
	if !strings.HasPrefix(string(data), "distance_m,lat,lon,elevation_m\n") {
		t.Errorf("header %q", strings.SplitN(string(data), "\n", 2)[0])
	}
	stdout, _, _ := runCmd(t, append([]string{"--format", "csv", "profile"}, args...)...)
	if stdout != string(data) {
		t.Error("--format csv on stdout differs from -o F.csv")
	}
	entries, _ := os.ReadDir(dir)
	if len(entries) != 1 {
		t.Errorf("%d files in the output directory, want only the profile (no temporary files left)", len(entries))
	}

	out, stderr, code := runCmd(t, "--format", "json", "link", "--profile", file, "--freq", "146.52")
	if code != 0 {
		t.Fatalf("link --profile: exit %d: %s", code, stderr)
	}
	if d := decodeJSON(t, out)["distance_m"].(float64); math.Abs(d-p.DistanceM) > 0.01 {
		t.Errorf("link over the written profile: %.3f m, profile %.3f m", d, p.DistanceM)
	}
}

// TestProfileSVG: -o F.svg writes a well-formed SVG chart with labelled axes
// in the chosen units.
func TestProfileSVG(t *testing.T) {
	dir := t.TempDir()
	cases := []struct {
		name   string
		extra  []string
		labels []string
		ray    bool
	}{
		{"metric", nil, []string{"distance (km)", "elevation (m)", "Terrain from Wethermoss Saddle to Corvane Peak"}, false},
		{"imperial with masts", []string{"--units", "imperial", "profile", "--height", "9m", "--to-height", "20m"}, []string{"distance (mi)", "elevation (ft)", "line of sight", "earth curvature, k = 4/3"}, true},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			file := filepath.Join(dir, strings.ReplaceAll(c.name, " ", "-")+".svg")
			args := []string{"--dem", exampleTerrain, "-o", file}
			if c.extra != nil {
				args = append(args, c.extra...)
			} else {
				args = append(args, "profile")
			}
			args = append(args, "--waypoints", examplePoints, "--from", "Wethermoss Saddle", "--to", "Corvane Peak")
			_, stderr, code := runCmd(t, args...)
			if code != 0 {
				t.Fatalf("exit %d: %s", code, stderr)
			}
			data, err := os.ReadFile(file)
			if err != nil {
				t.Fatal(err)
			}
			dec := xml.NewDecoder(bytes.NewReader(data))
			dec.Strict = true
			var texts []string
			root, ray := "", false
			for {
				tok, err := dec.Token()
				if err == io.EOF {
					break
				}
				if err != nil {
					t.Fatalf("not well-formed XML: %v", err)
				}
				switch e := tok.(type) {
				case xml.StartElement:
					if root == "" {
						root = e.Name.Local
					}
					for _, a := range e.Attr {
						ray = ray || (a.Name.Local == "id" && a.Value == "line-of-sight")
					}
				case xml.CharData:
					texts = append(texts, string(e))
				}
			}
			if root != "svg" {
				t.Errorf("root element %q, want svg", root)
			}
			all := strings.Join(texts, "\n")
			for _, l := range c.labels {
				if !strings.Contains(all, l) {
					t.Errorf("chart lacks the text %q", l)
				}
			}
			if ray != c.ray {
				t.Errorf("line of sight drawn: %v, want %v", ray, c.ray)
			}
		})
	}
}

// TestProfilePNG: -o F.png writes a PNG of the chart's size, leaves no
// temporary file, and draws this path's ground: along the path, where one
// sample is clearly higher than another its ground reaches higher in the
// picture.
func TestProfilePNG(t *testing.T) {
	args := []string{"--waypoints", examplePoints, "--from", "Wethermoss Saddle", "--to", "Corvane Peak"}
	p := runProfileJSON(t, append([]string{"--dem", exampleTerrain}, args...)...)
	cases := []struct {
		name  string
		extra []string
	}{
		{"metric", nil},
		{"imperial with masts", []string{"--units", "imperial", "profile", "--height", "9m", "--to-height", "20m"}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			dir := t.TempDir()
			file := filepath.Join(dir, "chart.png")
			cmdArgs := []string{"--dem", exampleTerrain, "-o", file}
			if c.extra != nil {
				cmdArgs = append(cmdArgs, c.extra...)
			} else {
				cmdArgs = append(cmdArgs, "profile")
			}
			_, stderr, code := runCmd(t, append(cmdArgs, args...)...)
			if code != 0 {
				t.Fatalf("exit %d: %s", code, stderr)
			}
			f, err := os.Open(file)
			if err != nil {
				t.Fatal(err)
			}
			defer f.Close()
			img, err := png.Decode(f)
			if err != nil {
				t.Fatalf("not a PNG: %v", err)
			}
			if b := img.Bounds(); b.Dx() != 800 || b.Dy() != 360 { // report.DefaultWidthPx × DefaultHeightPx
				t.Errorf("image %v, want 800 × 360 px", b)
			}
			if entries, _ := os.ReadDir(dir); len(entries) != 1 {
				t.Errorf("%d files in the output directory, want only the chart", len(entries))
			}
			// Plot area 76–776 px across and from 48 px down (the chart's
			// margins); columns left of the legend box only.
			n := len(p.Samples)
			type col struct {
				elevM float64
				topPx int
			}
			var cols []col
			for _, frac := range []float64{0.05, 0.2, 0.35, 0.5, 0.6, 0.7} {
				s := p.Samples[int(frac*float64(n-1))]
				x := 76 + int(s.DistanceM/p.DistanceM*700)
				cols = append(cols, col{s.ElevationM, groundTopPx(img, x, 49, 306)})
			}
			for i := range cols {
				for j := range cols {
					if cols[i].elevM > cols[j].elevM+100 && cols[i].topPx >= cols[j].topPx {
						t.Errorf("ground of %.0f m drawn from row %d, not above ground of %.0f m from row %d",
							cols[i].elevM, cols[i].topPx, cols[j].elevM, cols[j].topPx)
					}
				}
			}
		})
	}
}

// groundTopPx is the first row from y0 to y1 in column x with the chart's
// earth-coloured ground (red well above blue, unlike the greys, the text
// and the blue line of sight), or y1.
func groundTopPx(img image.Image, x, y0, y1 int) int {
	for y := y0; y < y1; y++ {
		r, _, b, _ := img.At(x, y).RGBA()
		if int(r>>8)-int(b>>8) > 20 {
			return y
		}
	}
	return y1
}

// TestProfileJSONFields: the field names scripts rely on (the profile
// command's JSON contract in its help and the README).
func TestProfileJSONFields(t *testing.T) {
	out, _, code := runCmd(t, "--dem", exampleTerrain, "--format", "json", "profile", "--from=-48.5,-123.95", "--to=-48.45,-123.95")
	if code != 0 {
		t.Fatal(code)
	}
	m := decodeJSON(t, out)
	for _, k := range []string{"distance_m", "azimuth_deg", "back_azimuth_deg", "step_m", "sources", "samples", "from", "to", "lowest", "highest"} {
		if _, ok := m[k]; !ok {
			t.Errorf("no %q field", k)
		}
	}
	s := m["samples"].([]any)[0].(map[string]any)
	for _, k := range []string{"distance_m", "lat", "lon", "elevation_m"} {
		if _, ok := s[k]; !ok {
			t.Errorf("no samples[].%s field", k)
		}
	}
	// Due north along a meridian: bearing 0° out, 180° back (geometry).
	if az, back := m["azimuth_deg"].(float64), m["back_azimuth_deg"].(float64); math.Abs(az) > 1e-9 || math.Abs(back-180) > 1e-9 {
		t.Errorf("bearings %v°, %v° due north, want 0° and 180°", az, back)
	}
}

func TestProfileText(t *testing.T) {
	args := []string{"--dem", exampleTerrain, "--waypoints", examplePoints, "profile", "--from", "Wethermoss Saddle", "--to", "Corvane Peak"}
	out, stderr, code := runCmd(t, args...)
	if code != 0 || stderr != "" {
		t.Fatalf("exit %d, stderr %q", code, stderr)
	}
	golden(t, "profile.txt", out)
	out, _, _ = runCmd(t, append([]string{"--units", "imperial"}, args...)...)
	golden(t, "profile-imperial.txt", out)

	// A long path still fits on a screen and says how to get every sample.
	out, _, code = runCmd(t, "--dem", exampleTerrain, "profile", "--from=-48.6,-124.35", "--to=-48.4,-123.65", "--step", "10m")
	if code != 0 {
		t.Fatal(code)
	}
	if n := strings.Count(out, "\n"); n > 40 {
		t.Errorf("%d lines of text output, want at most 40", n)
	}
	if !strings.Contains(out, "--format csv") {
		t.Errorf("text output does not say how to get all samples:\n%s", out)
	}
	lines := strings.Split(strings.TrimSpace(out), "\n")
	if last := lines[len(lines)-1]; !strings.Contains(last, "-48.40000") || !strings.Contains(last, "-123.65000") {
		t.Errorf("the table does not end at the far end: %q", last)
	}
}

// TestProfileNoDEM: without elevation data the ground is 0 m, stderr says
// so once, and no tile is reported missing.
func TestProfileNoDEM(t *testing.T) {
	t.Setenv("MASTLINK_DEM", "")
	out, stderr, code := runCmd(t, "--format", "json", "profile", "--from", "10,10", "--to", "10.2,10.1")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	if strings.Count(stderr, "\n") != 1 || !strings.Contains(stderr, "smooth earth") {
		t.Errorf("stderr %q: want one notice about a smooth earth", stderr)
	}
	p := decodeJSON(t, out)
	for _, s := range p["samples"].([]any) {
		if h := s.(map[string]any)["elevation_m"].(float64); h != 0 {
			t.Fatalf("ground %v m without elevation data", h)
		}
	}
	if src := p["sources"].([]any); len(src) != 0 {
		t.Errorf("sources %v without elevation data", src)
	}
}

// TestProfileOverwrite: -o replaces an existing output file whole.
func TestProfileOverwrite(t *testing.T) {
	file := filepath.Join(t.TempDir(), "p.csv")
	if err := os.WriteFile(file, bytes.Repeat([]byte("old content\n"), 10000), 0o644); err != nil {
		t.Fatal(err)
	}
	_, stderr, code := runCmd(t, "--dem", exampleTerrain, "-o", file, "profile", "--from=-48.5,-123.95", "--to=-48.49,-123.95")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	pc, err := terrain.ReadProfileCSV(file)
	if err != nil {
		t.Fatalf("the rewritten file does not read back: %v", err)
	}
	if len(pc.DistM) < 2 {
		t.Errorf("%d rows", len(pc.DistM))
	}
}
