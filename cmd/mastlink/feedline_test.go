package main

import (
	"math"
	"strings"
	"testing"
)

// TestFeedlineSWR runs the command end to end on a cable whose matched loss
// is exactly 1 or 3 dB, and checks the total against the lossy-line SWR
// formula TL = 10 log10[(a² − Γ²)/(a (1 − Γ²))] (the usual
// transmission-line-handbook formula, from memory; values computed from it).
func TestFeedlineSWR(t *testing.T) {
	cases := []struct {
		cable string
		swr   string
		total float64 // dB
	}{
		{"custom:1dB/100m@146MHz", "1.5", 1.066},
		{"custom:1dB/100m@146MHz", "2", 1.196},
		{"custom:1dB/100m@146MHz", "3", 1.504},
		{"custom:3dB/100m@146MHz", "2", 3.389},
		{"custom:3dB/100m@146MHz", "3", 3.968},
	}
	for _, c := range cases {
		out, stderr, code := runCmd(t, "feedline", "--cable", c.cable, "--length", "100m", "--freq", "146", "--swr", c.swr, "--format", "json")
		if code != 0 {
			t.Fatalf("code %d: %s", code, stderr)
		}
		m := decodeJSON(t, out)
		if got := m["total_loss_db"].(float64); math.Abs(got-c.total) > 0.001 {
			t.Errorf("%s SWR %s: total %.4f dB, want %.3f", c.cable, c.swr, got, c.total)
		}
		for _, k := range []string{"cable", "length_m", "freq_mhz", "matched_loss_db", "swr_loss_db", "connector_loss_db", "total_loss_db", "delivered_fraction"} {
			if _, ok := m[k]; !ok {
				t.Errorf("JSON lacks %q", k)
			}
		}
	}
}

// TestFeedlineConnectors: 0.1 dB per mated pair is common practice at
// VHF/UHF.
func TestFeedlineConnectors(t *testing.T) {
	out, _, code := runCmd(t, "feedline", "--cable", "RG-58", "--length", "0", "--connectors", "3", "--format", "json")
	if code != 0 {
		t.Fatal(code)
	}
	if got := decodeJSON(t, out)["connector_loss_db"].(float64); math.Abs(got-0.3) > 1e-9 {
		t.Errorf("3 connectors = %v dB, want 0.3", got)
	}
}

func TestFeedlineText(t *testing.T) {
	out, _, code := runCmd(t, "feedline", "--cable", "RG-8X", "--length", "15m", "--freq", "146.94", "--swr", "1.5", "--connectors", "2", "--power", "25W")
	if code != 0 {
		t.Fatal(code)
	}
	golden(t, "feedline.txt", out)
	out, _, _ = runCmd(t, "feedline", "--list", "--freq", "446")
	golden(t, "feedline-list.txt", out)
	out, _, _ = runCmd(t, "feedline", "--list", "--format", "csv")
	golden(t, "feedline-list.csv", out)
}

func TestFeedlineErrors(t *testing.T) {
	for _, args := range [][]string{
		{"feedline", "--cable", "RG-59X", "--length", "10m"},
		{"feedline", "--cable", "RG-58"},
		{"feedline", "--cable", "RG-58", "--length", "-3m"},
		{"feedline", "--cable", "RG-58", "--length", "3m", "--swr", "0.5"},
	} {
		_, stderr, code := runCmd(t, args...)
		if code != 2 || stderr == "" {
			t.Errorf("%v: code %d, stderr %q", args, code, stderr)
		}
	}
}

// TestFeedlineOneFigure: one custom loss figure is conductor loss (∝ √f,
// standard physics), so 6.1 dB/100 ft at 146 MHz gives 6.1·√(440/146) =
// 10.59 dB over 100 ft at 440 MHz, and the same figure per 100 m (× 100/30.48)
// gives the same.
func TestFeedlineOneFigure(t *testing.T) {
	want := 6.1 * math.Sqrt(440.0/146)
	for _, cable := range []string{"custom:6.1dB/100ft@146MHz", "custom:20.0131233595800525dB/100m@146MHz", "custom:0.200131233595800525dB/m@146MHz"} {
		out, stderr, code := runCmd(t, "feedline", "--cable", cable, "--length", "100ft", "--freq", "440", "--format", "json")
		if code != 0 {
			t.Fatalf("%s: code %d: %s", cable, code, stderr)
		}
		if got := decodeJSON(t, out)["matched_loss_db"].(float64); math.Abs(got-want) > 1e-6 {
			t.Errorf("%s: %.4f dB over 100 ft at 440 MHz, want %.4f", cable, got, want)
		}
	}
}

// TestFeedlineOddInputs: a very long line prints its loss (no NaN) and
// delivers nothing; an SWR of 100 prints as 100:1; a 75 Ω cable says that
// its junction mismatch is applied (0.35 dB: 2 × −10 log10(1 − 0.2²), the
// transmission-line relations, from memory).
func TestFeedlineOddInputs(t *testing.T) {
	out, stderr, code := runCmd(t, "feedline", "--cable", "RG-58", "--length", "100km", "--freq", "146", "--swr", "100")
	if code != 0 {
		t.Fatalf("code %d: %s", code, stderr)
	}
	for _, bad := range []string{"NaN", "Inf", "e+"} {
		if strings.Contains(out, bad) {
			t.Errorf("output has %q:\n%s", bad, out)
		}
	}
	for _, want := range []string{"SWR 100:1", "none (under a millionth)"} {
		if !strings.Contains(out, want) {
			t.Errorf("output lacks %q:\n%s", want, out)
		}
	}
	out, _, code = runCmd(t, "feedline", "--cable", "RG-58", "--length", "100km", "--freq", "146", "--format", "json")
	if code != 0 || strings.Contains(out, "NaN") {
		t.Errorf("JSON (code %d):\n%s", code, out)
	}
	out, _, _ = runCmd(t, "feedline", "--cable", "RG-59", "--length", "20m", "--freq", "146")
	if !strings.Contains(out, "75 Ω cable in a 50 Ω system (applied)  0.35 dB") {
		t.Errorf("75 Ω cable: mismatch not shown:\n%s", out)
	}
	out, _, _ = runCmd(t, "feedline", "--cable", "RG-59", "--length", "20m", "--freq", "146", "--format", "json")
	m := decodeJSON(t, out)
	if got := m["impedance_mismatch_loss_db"].(float64); math.Abs(got-0.3546) > 1e-4 {
		t.Errorf("impedance_mismatch_loss_db %v", got)
	}
	if strings.Contains(out, "-0,") || strings.Contains(out, "-0\n") {
		t.Errorf("JSON has -0:\n%s", out)
	}
}
