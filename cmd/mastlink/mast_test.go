package main

import (
	"encoding/json"
	"fmt"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// TestMastRefusesBadRequirement: mast checks the requirement with the same
// parser as link, route and the plan file, so a reliability of 100 %
// (which would need an infinite margin, ITU-R P.1812-8 eq. 69) is refused
// as bad usage instead of printing "meets +Inf dB".
func TestMastRefusesBadRequirement(t *testing.T) {
	for _, c := range []struct {
		args []string
		want string
	}{
		{[]string{"--reliability", "100%"}, "--reliability: must be above 0% and below 100%"},
		{[]string{"--reliability", "0%"}, "--reliability: must be above 0%"},
		{[]string{"--reliability", "90%", "--sigma", "0dB"}, "--sigma: must be more than 0 dB"},
		{[]string{"--margin", "-3dB"}, "--margin:"},
	} {
		args := append([]string{"mast", "--plan", demoPlanFile}, c.args...)
		out, stderr, code := runCmd(t, args...)
		if code != 2 || !strings.Contains(stderr, c.want) || out != "" {
			t.Errorf("%v: code %d, stdout %q, stderr %q; want code 2 and %q", c.args, code, out, stderr, c.want)
		}
	}
}

// TestMastFlagErrorsNameTheirFlag: an error in a target's flag names that
// flag (it used to be reported as --rx-sens, the flag mast copied it into).
func TestMastFlagErrorsNameTheirFlag(t *testing.T) {
	base := []string{"mast", "--from", "-48.50,-123.90", "--to", "-48.45,-123.95", "--freq", "146.55",
		"--heights", "2m..4m step 1m", "--cables", "RG-58"}
	for _, c := range []struct{ flag, value string }{
		{"--to-sens", "5xyz"}, {"--rx-sens", "5xyz"}, {"--sens", "5xyz"}, {"--to-power", "5 watts"}, {"--to-gain", "3dB"}, {"--to-height", "-2m"},
	} {
		_, stderr, code := runCmd(t, append(base, c.flag, c.value)...)
		lines := strings.Split(strings.TrimSpace(stderr), "\n")
		if code != 2 || !strings.HasPrefix(lines[len(lines)-1], "mastlink: "+c.flag+": ") {
			t.Errorf("%s %s: code %d, stderr %q; want the error to name %s", c.flag, c.value, code, stderr, c.flag)
		}
	}
}

// TestMastSensName: the station's receiver sensitivity is --rx-sens, as in
// route and sites; the old --sens still works, hidden, with a note on
// stderr (never on stdout), and the two together are refused.
func TestMastSensName(t *testing.T) {
	base := []string{"mast", "--from", "-48.50,-123.90", "--to", "-48.45,-123.95", "--freq", "146.55",
		"--heights", "2m", "--cables", "RG-58", "--format", "json"}
	newOut, _, code := runCmd(t, append(base, "--rx-sens", "-110dBm")...)
	if code != 0 {
		t.Fatal(code)
	}
	oldOut, stderr, code := runCmd(t, append(base, "--sens", "-110dBm")...)
	if code != 0 || oldOut != newOut || !strings.Contains(stderr, "--sens is now called --rx-sens") {
		t.Errorf("--sens: code %d, same output %v, stderr %q", code, oldOut == newOut, stderr)
	}
	if _, stderr, code := runCmd(t, append(base, "--sens", "-110dBm", "--rx-sens", "-110dBm")...); code != 2 || !strings.Contains(stderr, "give --rx-sens only") {
		t.Errorf("both: code %d, %q", code, stderr)
	}
	help, _, _ := runCmd(t, "mast", "--help")
	if strings.Contains(help, "--sens ") || !strings.Contains(help, "--rx-sens") {
		t.Errorf("help shows --sens or lacks --rx-sens:\n%s", help)
	}
}

// TestMastStationFeedlineFlags: the station's --swr and --connectors reach
// the swept line (they used to be dropped): four more connector pairs at
// the common 0.1 dB each (common practice) lower every margin by 0.4 dB.
func TestMastStationFeedlineFlags(t *testing.T) {
	base := []string{"mast", "--from", "-48.50,-123.90", "--to", "-48.45,-123.95", "--freq", "146.55",
		"--heights", "2m", "--cables", "RG-58", "--run", "10m", "--format", "json"}
	margin := func(extra ...string) float64 {
		out, stderr, code := runCmd(t, append(base, extra...)...)
		if code != 0 {
			t.Fatalf("%v: code %d: %s", extra, code, stderr)
		}
		var res struct {
			Rows []struct {
				WorstMarginDB float64 `json:"worst_margin_db"`
			} `json:"rows"`
		}
		if err := json.Unmarshal([]byte(out), &res); err != nil || len(res.Rows) != 1 {
			t.Fatalf("%v: %v, %s", extra, err, out)
		}
		return res.Rows[0].WorstMarginDB
	}
	if d := margin() - margin("--connectors", "4"); d < 0.399 || d > 0.401 {
		t.Errorf("4 connector pairs cost %.4f dB, want 0.4", d)
	}
}

// TestMastHelpExamplesRun pastes every example of `mast --help` into the
// command (split as a POSIX shell splits words), so the quoting of the
// --heights ranges is checked.
func TestMastHelpExamplesRun(t *testing.T) {
	cmd := newMastCmd(&globals{})
	joined := strings.ReplaceAll(cmd.Example, "\\\n", " ")
	for _, line := range strings.Split(joined, "\n") {
		words := shellWords(t, strings.TrimSpace(line))
		if len(words) < 2 || words[0] != "mastlink" || words[1] != "mast" {
			t.Fatalf("example %q does not start with mastlink mast", line)
		}
		args := words[1:]
		for i, a := range args {
			if strings.HasPrefix(a, "examples/") {
				args[i] = filepath.Join("..", "..", a)
			}
		}
		if _, err := os.Stat(filepath.Join("..", "..", "examples")); err != nil {
			t.Fatal(err)
		}
		if _, stderr, code := runCmd(t, args...); code != 0 {
			t.Errorf("%s: code %d: %s", line, code, stderr)
		}
	}
}

// shellWords splits s into words as a POSIX shell does for plain words and
// single- or double-quoted strings (no escapes inside quotes, no
// expansions): enough for help examples.
func shellWords(t *testing.T, s string) []string {
	t.Helper()
	var words []string
	var cur strings.Builder
	inWord := false
	var quote rune
	for _, r := range s {
		switch {
		case quote != 0 && r == quote:
			quote = 0
		case quote != 0:
			cur.WriteRune(r)
		case r == '\'' || r == '"':
			quote, inWord = r, true
		case r == ' ' || r == '\t':
			if inWord {
				words = append(words, cur.String())
				cur.Reset()
				inWord = false
			}
		default:
			cur.WriteRune(r)
			inWord = true
		}
	}
	if quote != 0 {
		t.Fatalf("unbalanced quote in %q", s)
	}
	if inWord {
		words = append(words, cur.String())
	}
	return words
}

// TestMastAndSitesCautions: mast and site advice carries the mast cautions
// (power lines, guying as the maker specifies, storms and lightning, local
// rules and permits) in text, in JSON cautions[], and on stderr with CSV
// [common practice].
func TestMastAndSitesCautions(t *testing.T) {
	wants := []string{"power line", "as their maker specifies", "lightning", "permit"}
	for _, args := range [][]string{
		{"mast", "--plan", demoPlanFile},
		{"sites", demoCandidates, "--plan", demoPlanFile},
	} {
		out, stderr, code := runCmd(t, args...)
		if code != 0 {
			t.Fatal(stderr)
		}
		for _, w := range wants {
			if !strings.Contains(out, w) {
				t.Errorf("%s text lacks %q", args[0], w)
			}
		}
		out, _, _ = runCmd(t, append(args, "--format", "json")...)
		c, _ := decodeJSON(t, out)["cautions"].([]any)
		joined := fmt.Sprint(c...)
		for _, w := range wants {
			if !strings.Contains(joined, w) {
				t.Errorf("%s JSON cautions lack %q: %v", args[0], w, c)
			}
		}
		out, stderr, _ = runCmd(t, append(args, "--format", "csv")...)
		for _, w := range wants {
			if !strings.Contains(stderr, w) || strings.Contains(out, w) {
				t.Errorf("%s CSV: %q not on stderr only", args[0], w)
			}
		}
	}
}

// TestMastKeepoutLimitFlag: the demo station (25 W FM, 50 % on the air,
// 2.15 dBi) has a public keep-out of about 1.4 m on masts up to head height
// (FCC OET Bulletin 65 eq. 6 with 47 CFR § 1.1310 Table 1): a 1 m limit
// marks those rows with "!" (explained in a legend line), and the
// recommendation is a mast whose keep-out is within it.
func TestMastKeepoutLimitFlag(t *testing.T) {
	out, stderr, code := runCmd(t, "mast", "--plan", demoPlanFile, "--keepout-limit", "1m", "--format", "json")
	if code != 0 {
		t.Fatal(stderr)
	}
	m := decodeJSON(t, out)
	if m["keepout_limit_m"] != 1.0 {
		t.Errorf("keepout_limit_m %v", m["keepout_limit_m"])
	}
	over := 0
	for _, r := range m["rows"].([]any) {
		row := r.(map[string]any)
		if row["over_keepout_limit"] != (row["keepout_public_m"].(float64) > 1) {
			t.Errorf("row %v", row)
		}
		if row["over_keepout_limit"] == true {
			over++
		}
	}
	if over == 0 {
		t.Error("no row over the 1 m limit")
	}
	if rec, ok := m["recommended"].(map[string]any); !ok || rec["height_m"].(float64) < 3 {
		t.Errorf("recommended %v, want a mast above 3 m (keep-out within 1 m)", m["recommended"])
	}
	out, _, _ = runCmd(t, "mast", "--plan", demoPlanFile, "--keepout-limit", "1m")
	if !strings.Contains(out, "! public RF-exposure keep-out wider than the 1.0 m limit") || !strings.Contains(out, "*!") && !strings.Contains(out, " !") {
		t.Errorf("text lacks the marker or its legend:\n%s", out)
	}
	if _, stderr, code := runCmd(t, "mast", "--plan", demoPlanFile, "--keepout-limit", "0m"); code != 2 || !strings.Contains(stderr, "--keepout-limit") {
		t.Errorf("--keepout-limit 0m: code %d, %s", code, stderr)
	}
}
