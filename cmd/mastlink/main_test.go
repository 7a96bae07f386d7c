package main

import (
	"bytes"
	"context"
	"encoding/json"
	"flag"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

var update = flag.Bool("update", false, "rewrite the golden files under testdata/")

// runCmd runs mastlink with args and returns stdout, stderr and the exit code.
func runCmd(t *testing.T, args ...string) (string, string, int) {
	t.Helper()
	var out, errb bytes.Buffer
	code := run(context.Background(), args, strings.NewReader(""), &out, &errb)
	return out.String(), errb.String(), code
}

// golden compares got with testdata/NAME, or rewrites it with -update.
func golden(t *testing.T, name, got string) {
	t.Helper()
	path := filepath.Join("testdata", name)
	if *update {
		if err := os.MkdirAll(filepath.Dir(path), 0o755); err != nil {
			t.Fatal(err)
		}
		if err := os.WriteFile(path, []byte(got), 0o644); err != nil {
			t.Fatal(err)
		}
		return
	}
	want, err := os.ReadFile(path)
	if err != nil {
		t.Fatalf("%v (run go test ./cmd/mastlink -update to create it)", err)
	}
	if string(want) != got {
		t.Errorf("output differs from %s (rerun with -update if the change is intended)\n--- got ---\n%s\n--- want ---\n%s", path, got, want)
	}
}

// decodeJSON decodes the JSON output of a command into a map.
func decodeJSON(t *testing.T, s string) map[string]any {
	t.Helper()
	var m map[string]any
	if err := json.Unmarshal([]byte(s), &m); err != nil {
		t.Fatalf("output is not JSON: %v\n%s", err, s)
	}
	return m
}

func TestExitCodes(t *testing.T) {
	cases := []struct {
		name string
		args []string
		code int
		msg  string
	}{
		{"unknown command", []string{"nosuch"}, 2, "unknown command"},
		{"bad format", []string{"--format", "xml", "version"}, 2, `--format: "xml" is not a format`},
		{"bad units", []string{"--units", "furlongs", "version"}, 2, "--units"},
		{"bad quantity", []string{"horizon", "--height", "12 meters"}, 2, `--height: "12 meters": unknown unit "meters" (use m, km, ft or mi)`},
		{"missing flag", []string{"horizon"}, 2, `"height" not set`},
		{"bad k", []string{"horizon", "--height", "2m", "--k", "zero"}, 2, "--k:"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			_, stderr, code := runCmd(t, c.args...)
			if code != c.code {
				t.Errorf("exit code %d, want %d (stderr %q)", code, c.code, stderr)
			}
			if !strings.Contains(stderr, c.msg) {
				t.Errorf("stderr %q does not contain %q", stderr, c.msg)
			}
			if n := strings.Count(strings.TrimSpace(stderr), "\n"); n != 0 {
				t.Errorf("error is not one line: %q", stderr)
			}
		})
	}
}

func TestVersion(t *testing.T) {
	out, _, code := runCmd(t, "version")
	if code != 0 || !strings.HasPrefix(out, "mastlink ") {
		t.Fatalf("version: %q, code %d", out, code)
	}
}

// goldenJSON compares JSON output with testdata/NAME structurally, numbers
// within a relative 1e-6 (last-digit floating-point differences between
// builds are not regressions), or rewrites it with -update.
func goldenJSON(t *testing.T, name, got string) {
	t.Helper()
	path := filepath.Join("testdata", name)
	if *update {
		golden(t, name, got)
		return
	}
	want, err := os.ReadFile(path)
	if err != nil {
		t.Fatalf("%v (run go test ./cmd/mastlink -update to create it)", err)
	}
	var a, b any
	if err := json.Unmarshal([]byte(got), &a); err != nil {
		t.Fatalf("output is not JSON: %v", err)
	}
	if err := json.Unmarshal(want, &b); err != nil {
		t.Fatalf("%s is not JSON: %v", path, err)
	}
	if diff := jsonDiff("$", a, b); diff != "" {
		t.Errorf("output differs from %s at %s (rerun with -update if the change is intended)", path, diff)
	}
}

func jsonDiff(at string, a, b any) string {
	switch x := a.(type) {
	case map[string]any:
		y, ok := b.(map[string]any)
		if !ok || len(x) != len(y) {
			return at + " (fields differ)"
		}
		for k, v := range x {
			w, ok := y[k]
			if !ok {
				return at + "." + k + " (not in the golden file)"
			}
			if d := jsonDiff(at+"."+k, v, w); d != "" {
				return d
			}
		}
	case []any:
		y, ok := b.([]any)
		if !ok || len(x) != len(y) {
			return at + " (lengths differ)"
		}
		for i := range x {
			if d := jsonDiff(fmt.Sprintf("%s[%d]", at, i), x[i], y[i]); d != "" {
				return d
			}
		}
	case float64:
		y, ok := b.(float64)
		if !ok || math.Abs(x-y) > 1e-6*math.Max(1, math.Abs(y)) {
			return fmt.Sprintf("%s (%v, golden %v)", at, a, b)
		}
	default:
		if a != b {
			return fmt.Sprintf("%s (%v, golden %v)", at, a, b)
		}
	}
	return ""
}

func TestNegativePoints(t *testing.T) {
	cases := []struct{ in, want []string }{
		{[]string{"elevation", "-48.5,-123.9"}, []string{"elevation", "--", "-48.5,-123.9"}},
		{[]string{"elevation", "-48.5,-123.9", "-48.4,-123.8", "--format", "json"}, []string{"elevation", "--format", "json", "--", "-48.5,-123.9", "-48.4,-123.8"}},
		{[]string{"link", "--from", "-48.5,-123.9", "--to", "1,2"}, []string{"link", "--from", "-48.5,-123.9", "--to", "1,2"}},
		{[]string{"elevation", "--", "-48.5,-123.9"}, []string{"elevation", "--", "-48.5,-123.9"}},
		{[]string{"horizon", "--height", "-5m"}, []string{"horizon", "--height", "-5m"}},
	}
	for _, c := range cases {
		if got := negativePoints(c.in); strings.Join(got, " ") != strings.Join(c.want, " ") {
			t.Errorf("negativePoints(%q) = %q, want %q", c.in, got, c.want)
		}
	}
	out, stderr, code := runCmd(t, "--dem", "../../examples/terrain", "elevation", "-48.5,-123.95", "-48.4466667,-123.9491667", "--format", "csv")
	if code != 0 || strings.Count(out, "\n") != 3 {
		t.Errorf("code %d, %q %q", code, out, stderr)
	}
}
