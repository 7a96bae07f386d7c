package main

import (
	"fmt"
	"strings"

	"github.com/mastlink/mastlink/terrain"
)

// terrainSource is elevation data given somewhere other than --dem (a plan
// file's terrain: line): its paths, and how errors about them start
// ("plan.yaml:4: terrain").
type terrainSource struct {
	paths []string
	where string
}

// openTerrain opens the elevation data named by --dem / MASTLINK_DEM and
// by extra (e.g. a plan file's terrain: line). It returns nil when none is
// given; callers then work over a smooth earth and say so. An error names
// --dem when the --dem paths are at fault, else extra's place.
func (g *globals) openTerrain(extra ...terrainSource) (*terrain.Set, error) {
	dem := g.demPaths()
	paths := append([]string(nil), dem...)
	where := "--dem"
	for _, x := range extra {
		if len(x.paths) > 0 {
			paths = append(paths, x.paths...)
			where = x.where
		}
	}
	if len(paths) == 0 {
		return nil, nil
	}
	if len(dem) > 0 && len(paths) > len(dem) {
		// Open --dem alone first, so a bad --dem is blamed on --dem.
		s, err := terrain.Open(dem...)
		if err != nil {
			return nil, fmt.Errorf("--dem: %w", err)
		}
		if s.Len() == 0 {
			return nil, fmt.Errorf("--dem: no elevation files (.hgt, .hgt.zip, .hgt.gz, .tif) in %s", strings.Join(dem, ", "))
		}
	}
	s, err := terrain.Open(paths...)
	if err != nil {
		return nil, fmt.Errorf("%s: %w", where, err)
	}
	if s.Len() == 0 {
		return nil, fmt.Errorf("%s: no elevation files (.hgt, .hgt.zip, .hgt.gz, .tif) in %s", where, strings.Join(paths, ", "))
	}
	for _, err := range s.Skipped() {
		fmt.Fprintf(g.stderr, "mastlink: warning: skipped %v\n", err)
	}
	s.SetCacheLimit(int64(g.cacheMB) << 20)
	return s, nil
}

// warnMissing tells once on stderr which SRTM tiles were needed but absent.
func (g *globals) warnMissing(s *terrain.Set) {
	if s == nil {
		return
	}
	if m := s.Missing(); len(m) > 0 {
		fmt.Fprintf(g.stderr, "mastlink: warning: no elevation data for %s; the ground there is taken as 0 m (sea level). Add these tiles to --dem.\n", strings.Join(m, ", "))
	}
}

// noticeSmoothEarth says once on stderr that no elevation data is in use.
func (g *globals) noticeSmoothEarth() {
	fmt.Fprintln(g.stderr, "mastlink: no elevation data given (--dem or MASTLINK_DEM): working over a smooth earth")
}
