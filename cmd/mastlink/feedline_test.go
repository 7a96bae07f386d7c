package main

import (
	"math"
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
