package main

import (
	"math"
	"testing"
)

// TestHorizon checks the radio horizon against the check values of ITU-R
// P.526-16 eq. 21 with k = 4/3 (d ≈ 4.12 √h km, computed from the
// published formula).
func TestHorizon(t *testing.T) {
	cases := []struct {
		h, h2    string
		combined float64 // km
	}{
		{"2m", "0", 5.83}, // ITU-R P.526-16 eq. 21, k = 4/3
		{"10m", "0", 13.03},
		{"30m", "0", 22.58},
		{"100m", "0", 41.22},
		{"2m", "30m", 28.41},
		{"32.8084ft", "0", 13.03}, // 10 m in feet
	}
	for _, c := range cases {
		out, stderr, code := runCmd(t, "horizon", "--height", c.h, "--to-height", c.h2, "--format", "json")
		if code != 0 {
			t.Fatalf("%s: code %d: %s", c.h, code, stderr)
		}
		m := decodeJSON(t, out)
		got := m["combined_m"].(float64) / 1000
		if math.Abs(got-c.combined) > 0.006 {
			t.Errorf("horizon %s + %s = %.3f km, want %.2f km", c.h, c.h2, got, c.combined)
		}
	}
}

func TestHorizonText(t *testing.T) {
	out, _, code := runCmd(t, "horizon", "--height", "9m", "--to-height", "20m")
	if code != 0 {
		t.Fatal(code)
	}
	golden(t, "horizon.txt", out)
	out, _, _ = runCmd(t, "--units", "imperial", "horizon", "--height", "30ft")
	golden(t, "horizon-imperial.txt", out)
}
