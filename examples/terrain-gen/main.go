// Command terrain-gen makes the invented landscape of mastlink's examples:
// two gzipped 3″ SRTM HGT tiles (S49W125 and S49W124) of an island that does
// not exist, placed over open ocean in the far South Pacific, and the GPX
// files of places and a hike on it, with elevations taken from those tiles.
//
// Usage, from the repository root:
//
//	go run ./examples/terrain-gen          # rewrite examples/terrain and examples/valley
//	go run ./examples/terrain-gen -check   # regenerate into a temporary directory and compare
//
// The output is deterministic: fixed noise seeds, no randomness, and gzip
// streams without a file name or time stamp.
package main

import (
	"bytes"
	"errors"
	"flag"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"sort"
)

func main() {
	os.Exit(run(os.Args[1:], os.Stderr))
}

// run is the command; it returns the exit status (0 ok, 1 failure or
// difference found, 2 bad usage).
func run(args []string, stderr io.Writer) int {
	fs := flag.NewFlagSet("terrain-gen", flag.ContinueOnError)
	fs.SetOutput(stderr)
	out := fs.String("out", "", "directory for the gzipped HGT tiles (default: examples/terrain under the module root)")
	gpxDir := fs.String("gpx", "", "directory for the GPX files (default: examples/valley under the module root)")
	check := fs.Bool("check", false, "regenerate into a temporary directory and compare byte for byte with the files in -out and -gpx; exit 1 if any differ")
	if err := fs.Parse(args); err != nil {
		if errors.Is(err, flag.ErrHelp) {
			return 0
		}
		return 2
	}
	if fs.NArg() > 0 {
		fmt.Fprintf(stderr, "terrain-gen: unexpected argument %q (flags only: -out DIR, -gpx DIR, -check)\n", fs.Arg(0))
		return 2
	}
	if *out == "" || *gpxDir == "" {
		root, err := moduleRoot()
		if err != nil {
			fmt.Fprintf(stderr, "terrain-gen: %v\n", err)
			return 1
		}
		if *out == "" {
			*out = filepath.Join(root, "examples", "terrain")
		}
		if *gpxDir == "" {
			*gpxDir = filepath.Join(root, "examples", "valley")
		}
	}

	if !*check {
		if err := generate(*out, *gpxDir); err != nil {
			fmt.Fprintf(stderr, "terrain-gen: %v\n", err)
			return 1
		}
		return 0
	}

	tmp, err := os.MkdirTemp("", "terrain-gen-check-")
	if err != nil {
		fmt.Fprintf(stderr, "terrain-gen: %v\n", err)
		return 1
	}
	defer os.RemoveAll(tmp)
	tTiles, tGPX := filepath.Join(tmp, "terrain"), filepath.Join(tmp, "valley")
	if err := generate(tTiles, tGPX); err != nil {
		fmt.Fprintf(stderr, "terrain-gen: %v\n", err)
		return 1
	}
	diffs, err := compareDirs(tTiles, *out)
	if err == nil {
		var d2 []string
		d2, err = compareDirs(tGPX, *gpxDir)
		diffs = append(diffs, d2...)
	}
	if err != nil {
		fmt.Fprintf(stderr, "terrain-gen: %v\n", err)
		return 1
	}
	for _, d := range diffs {
		fmt.Fprintf(stderr, "terrain-gen: %s\n", d)
	}
	if len(diffs) > 0 {
		fmt.Fprintln(stderr, "terrain-gen: the committed files differ from the generator's output; run `go run ./examples/terrain-gen` and commit the result")
		return 1
	}
	return 0
}

// outputs builds every output file in memory: tile files and GPX files by name.
func outputs() (tiles, gpx map[string][]byte, err error) {
	g := grid{}
	tiles = map[string][]byte{}
	for _, t := range exampleTiles {
		h := generateTile(t)
		g[t] = h
		z, err := gzipDeterministic(encodeHGT(h))
		if err != nil {
			return nil, nil, fmt.Errorf("compress %s: %w", t.name(), err)
		}
		tiles[t.name()+".hgt.gz"] = z
	}
	ps, err := g.places()
	if err != nil {
		return nil, nil, err
	}
	trk, err := g.hike()
	if err != nil {
		return nil, nil, err
	}
	gpx = map[string][]byte{
		"points.gpx":     waypointsGPX("Ostral valley exercise: places", ps, false),
		"candidates.gpx": waypointsGPX("Ostral valley exercise: candidate sites for the portable station", ps, true),
		"hike.gpx":       trackGPX("Gorsefold trailhead to Quillet Glen over Quillet Col", trk),
	}
	return tiles, gpx, nil
}

// generate writes the tiles into tilesDir and the GPX files into gpxDir.
func generate(tilesDir, gpxDir string) error {
	tiles, gpx, err := outputs()
	if err != nil {
		return err
	}
	if err := writeAll(tilesDir, tiles); err != nil {
		return err
	}
	return writeAll(gpxDir, gpx)
}

func writeAll(dir string, files map[string][]byte) error {
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return fmt.Errorf("create output directory: %w", err)
	}
	for _, name := range sortedKeys(files) {
		if err := os.WriteFile(filepath.Join(dir, name), files[name], 0o644); err != nil {
			return fmt.Errorf("write %s: %w", name, err)
		}
	}
	return nil
}

// compareDirs compares every file of the fresh directory with the file of
// the same name in the committed one; it lists the differences.
func compareDirs(fresh, committed string) ([]string, error) {
	entries, err := os.ReadDir(fresh)
	if err != nil {
		return nil, err
	}
	var diffs []string
	for _, e := range entries {
		want, err := os.ReadFile(filepath.Join(fresh, e.Name()))
		if err != nil {
			return nil, err
		}
		path := filepath.Join(committed, e.Name())
		got, err := os.ReadFile(path)
		switch {
		case errors.Is(err, os.ErrNotExist):
			diffs = append(diffs, fmt.Sprintf("%s: missing", path))
		case err != nil:
			return nil, err
		case !bytes.Equal(got, want):
			diffs = append(diffs, fmt.Sprintf("%s: differs from the generator's output (%d bytes, expected %d)", path, len(got), len(want)))
		}
	}
	return diffs, nil
}

func sortedKeys(m map[string][]byte) []string {
	keys := make([]string, 0, len(m))
	for k := range m {
		keys = append(keys, k)
	}
	sort.Strings(keys)
	return keys
}

// moduleRoot walks up from the working directory to the directory holding go.mod.
func moduleRoot() (string, error) {
	dir, err := os.Getwd()
	if err != nil {
		return "", err
	}
	for {
		if _, err := os.Stat(filepath.Join(dir, "go.mod")); err == nil {
			return dir, nil
		}
		parent := filepath.Dir(dir)
		if parent == dir {
			return "", errors.New("no go.mod above the working directory; run from inside the mastlink module or give -out and -gpx")
		}
		dir = parent
	}
}
