package terrain

import (
	"bytes"
	"errors"
	"math/rand/v2"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// TestImplausibleHeightsRefused: a right-sized HGT file of random numbers
// decodes as a grid but holds heights no terrain has (the lowest dry land,
// the Dead Sea shore, is about −430 m and the highest summit 8849 m: general
// geography), so it is refused as corrupt, naming the file; heights just
// inside the bounds and voids are accepted.
func TestImplausibleHeightsRefused(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 2))
	tests := []struct {
		name string
		f    func(r, c int) int16
		ok   bool
	}{
		{"random bytes", func(int, int) int16 { return int16(rng.Uint32()) }, false},
		{"one sample 9001 m", func(r, c int) int16 {
			if r == 600 && c == 17 {
				return 9001
			}
			return 100
		}, false},
		{"one sample -501 m", func(r, c int) int16 {
			if r == 3 && c == 1200 {
				return -501
			}
			return 100
		}, false},
		{"bounds and voids", func(r, c int) int16 {
			switch {
			case r == 0 && c == 0:
				return MaxPlausibleM
			case r == 1 && c == 1:
				return MinPlausibleM
			case r == 2 && c == 2:
				return HGTVoid
			}
			return 100
		}, true},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			raw := htRaw(HGTSamples3, tc.f)
			_, err := DecodeHGT(bytes.NewReader(raw), "N45E007.hgt", int64(len(raw)))
			if tc.ok {
				if err != nil {
					t.Fatalf("DecodeHGT: %v", err)
				}
				return
			}
			if !errors.Is(err, ErrImplausibleHeight) || !errors.Is(err, ErrHGT) || !strings.Contains(err.Error(), "N45E007.hgt") {
				t.Fatalf("error %v; want ErrHGT and ErrImplausibleHeight naming N45E007.hgt", err)
			}
		})
	}

	// Through a tile set the first height asked for fails, naming the file.
	dir := t.TempDir()
	raw := htRaw(HGTSamples3, func(int, int) int16 { return int16(rng.Uint32()) })
	if err := os.WriteFile(filepath.Join(dir, "N45E007.hgt"), raw, 0o644); err != nil {
		t.Fatal(err)
	}
	set, err := Open(dir)
	if err != nil {
		t.Fatal(err)
	}
	if _, _, err := set.Elevation(45.5, 7.5); !errors.Is(err, ErrImplausibleHeight) || !strings.Contains(err.Error(), "N45E007.hgt") {
		t.Errorf("Elevation over a corrupt tile: %v; want ErrImplausibleHeight naming the file", err)
	}
}

// TestSkippedFilesListed: every file in a DEM directory that is not used is
// listed with its reason, except hidden files and GIS side files.
func TestSkippedFilesListed(t *testing.T) {
	dir := t.TempDir()
	good := htRaw(HGTSamples3, func(int, int) int16 { return 100 })
	files := map[string][]byte{
		"N45E007.hgt":         good,
		"tile.hgt":            good,           // no position in the name
		"N45E008.dt2":         []byte("x"),    // another format
		"N45E007.hgt.aux.xml": []byte("<x/>"), // GDAL side file: quiet
		".DS_Store":           []byte("x"),    // hidden: quiet
		"README.txt":          []byte("x"),    // text: quiet
	}
	for n, b := range files {
		if err := os.WriteFile(filepath.Join(dir, n), b, 0o644); err != nil {
			t.Fatal(err)
		}
	}
	set, err := Open(dir)
	if err != nil {
		t.Fatal(err)
	}
	var got []string
	for _, e := range set.Skipped() {
		got = append(got, e.Error())
	}
	joined := strings.Join(got, "\n")
	if len(got) != 2 || !strings.Contains(joined, "tile.hgt") || !strings.Contains(joined, "rename it") ||
		!strings.Contains(joined, "N45E008.dt2") || !strings.Contains(joined, "not an elevation file") {
		t.Errorf("Skipped() =\n%s\nwant tile.hgt (no position) and N45E008.dt2 (not an elevation file) only", joined)
	}
	if set.Len() != 1 {
		t.Errorf("Len() = %d; want 1", set.Len())
	}
}
