package main

import (
	"image/png"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// TestProfileChartFreqSize: --freq draws the first Fresnel zone and its 0.6
// part and names the governing obstacle; --size sets the picture's size.
func TestProfileChartFreqSize(t *testing.T) {
	dir := t.TempDir()
	path := []string{"--waypoints", examplePoints, "--from", "Wethermoss Saddle", "--to", "Corvane Peak"}
	svg := filepath.Join(dir, "zone.svg")
	_, stderr, code := runCmd(t, append([]string{"--dem", exampleTerrain, "-o", svg, "profile", "--height", "9m", "--to-height", "20m", "--freq", "146.55MHz"}, path...)...)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	data, err := os.ReadFile(svg)
	if err != nil {
		t.Fatal(err)
	}
	for _, want := range []string{"first Fresnel zone, 146.55 MHz", "0.6 of the first zone", "obstacle at", "F1"} {
		if !strings.Contains(string(data), want) {
			t.Errorf("chart lacks %q", want)
		}
	}
	// Without masts, --freq puts both antennas on the ground.
	svg0 := filepath.Join(dir, "ground.svg")
	if _, stderr, code := runCmd(t, append([]string{"--dem", exampleTerrain, "-o", svg0, "profile", "--freq", "446"}, path...)...); code != 0 {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	if data, _ := os.ReadFile(svg0); !strings.Contains(string(data), "first Fresnel zone, 446 MHz") {
		t.Error("chart without masts lacks the zone")
	}

	pngFile := filepath.Join(dir, "big.png")
	if _, stderr, code := runCmd(t, append([]string{"--dem", exampleTerrain, "-o", pngFile, "profile", "--height", "9m", "--freq", "146.55", "--size", "1000x420"}, path...)...); code != 0 {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	f, err := os.Open(pngFile)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	cfg, err := png.DecodeConfig(f)
	if err != nil {
		t.Fatal(err)
	}
	if cfg.Width != 1000 || cfg.Height != 420 {
		t.Errorf("picture %d × %d, want 1000 × 420", cfg.Width, cfg.Height)
	}
}

// TestProfileChartFlagErrors: each bad use is one line naming the flag,
// exit code 2, and no file.
func TestProfileChartFlagErrors(t *testing.T) {
	dir := t.TempDir()
	cases := []struct {
		name string
		args []string
		want string
	}{
		{"freq without a chart", []string{"profile", "--freq", "146"}, "--freq draws on a chart"},
		{"freq with csv", []string{"-o", filepath.Join(dir, "p.csv"), "profile", "--freq", "146"}, "--freq draws on a chart"},
		{"size without a chart", []string{"profile", "--size", "900x400"}, "--size draws on a chart"},
		{"freq too low", []string{"-o", filepath.Join(dir, "p.svg"), "profile", "--freq", "0.5MHz"}, "--freq: 0.5MHz: give 1 MHz to 100 GHz"},
		{"freq not a frequency", []string{"-o", filepath.Join(dir, "p.svg"), "profile", "--freq", "2m"}, "--freq:"},
		{"size too small", []string{"-o", filepath.Join(dir, "p.png"), "profile", "--size", "300x200"}, `--size: "300x200": give WIDTHxHEIGHT`},
		{"size not a size", []string{"-o", filepath.Join(dir, "p.png"), "profile", "--size", "wide"}, `--size: "wide"`},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			_, stderr, code := runCmd(t, append(c.args, "--from", "1,1", "--to", "1.1,1")...)
			if code != 2 || !strings.Contains(stderr, c.want) || strings.Count(strings.TrimSpace(stderr), "\n") != 0 {
				t.Errorf("exit %d, stderr %q; want 2 and one line with %q", code, stderr, c.want)
			}
		})
	}
	if entries, _ := os.ReadDir(dir); len(entries) != 0 {
		t.Errorf("%d files written, want none", len(entries))
	}
}
