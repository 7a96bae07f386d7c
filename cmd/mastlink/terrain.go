package main

import (
	"fmt"
	"slices"
	"strings"

	"github.com/mastlink/mastlink/terrain"
)

// openTerrain opens the elevation data named by --dem / MASTLINK_DEM (and
// extra paths, e.g. from a plan file). It returns nil when none is given;
// callers then work over a smooth earth and say so.
func (g *globals) openTerrain(extra ...string) (*terrain.Set, error) {
	var paths []string
	for _, p := range strings.Split(g.dem, ",") {
		if p = strings.TrimSpace(p); p != "" {
			paths = append(paths, p)
		}
	}
	paths = append(paths, extra...)
	if len(paths) == 0 {
		return nil, nil
	}
	s, err := terrain.Open(paths...)
	if err != nil {
		return nil, fmt.Errorf("--dem: %w", err)
	}
	if s.Len() == 0 {
		return nil, fmt.Errorf("--dem: no elevation files (.hgt, .hgt.zip, .hgt.gz, .tif) in %s", strings.Join(paths, ", "))
	}
	for _, err := range s.Skipped() {
		fmt.Fprintf(g.stderr, "mastlink: warning: skipped %v\n", err)
	}
	s.SetCacheLimit(int64(g.cacheMB) << 20)
	return s, nil
}

// warnMissing tells once on stderr which SRTM tiles were needed but absent.
func (g *globals) warnMissing(s *terrain.Set) {
	if w := missingWarning(s); w != "" {
		g.warn(w)
	}
}

// missingWarning returns the sentence naming the SRTM tiles that were
// needed but absent, or "" when none were (or no elevation data is in use).
func missingWarning(s *terrain.Set) string {
	if s == nil {
		return ""
	}
	if m := s.Missing(); len(m) > 0 {
		return fmt.Sprintf("no elevation data for %s; the ground there is taken as 0 m (sea level). Add these tiles to --dem.", strings.Join(m, ", "))
	}
	return ""
}

// warn writes each warning on stderr, one line each.
func (g *globals) warn(ws ...string) {
	for _, w := range ws {
		fmt.Fprintf(g.stderr, "mastlink: warning: %s\n", w)
	}
}

// addWarnings appends to list the non-empty strings of add it does not
// hold yet, and never returns nil (JSON then shows []).
func addWarnings(list []string, add ...string) []string {
	if list == nil {
		list = []string{}
	}
	for _, w := range add {
		if w != "" && !slices.Contains(list, w) {
			list = append(list, w)
		}
	}
	return list
}

// noticeSmoothEarth says once on stderr that no elevation data is in use.
func (g *globals) noticeSmoothEarth() {
	fmt.Fprintln(g.stderr, "mastlink: no elevation data given (--dem or MASTLINK_DEM): working over a smooth earth")
}
