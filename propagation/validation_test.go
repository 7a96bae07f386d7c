package propagation

import (
	"bufio"
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"
)

// validationDir returns testdata/sub, where the published validation
// files sit with a SOURCE note each.
func validationDir(t testing.TB, sub string) string {
	t.Helper()
	dir := filepath.Join("testdata", sub)
	if _, err := os.Stat(filepath.Join(dir, "SOURCE")); err != nil {
		t.Fatalf("validation data %s: %v", dir, err)
	}
	return dir
}

// errValidationFormat is wrapped by the readers of the validation files.
var errValidationFormat = errors.New("validation file format")

// readDBull reads a delta-Bullington validation profile: a header row
// "Distance (km),DEM Height (m AMSL)" then rows of km, m amsl.
func readDBull(t testing.TB, name string) Path {
	t.Helper()
	path := filepath.Join(validationDir(t, "p526-delta-bullington"), name)
	f, err := os.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	p, err := parseDBull(f)
	if err != nil {
		t.Fatalf("%s: %v", path, err)
	}
	return p
}

func parseDBull(r io.Reader) (Path, error) {
	sc := bufio.NewScanner(r)
	var p Path
	line := 0
	for sc.Scan() {
		line++
		text := strings.TrimSpace(sc.Text())
		if line == 1 {
			if !strings.HasPrefix(text, "Distance (km),") || !strings.Contains(text, "Height (m") {
				return p, fmt.Errorf("line 1: %w: header %q, want distance in km and height in m", errValidationFormat, text)
			}
			continue
		}
		if text == "" {
			continue
		}
		f := strings.Split(text, ",")
		if len(f) != 2 {
			return p, fmt.Errorf("line %d: %w: %d fields, want 2", line, errValidationFormat, len(f))
		}
		d, err1 := strconv.ParseFloat(f[0], 64)
		h, err2 := strconv.ParseFloat(f[1], 64)
		if err := errors.Join(err1, err2); err != nil {
			return p, fmt.Errorf("line %d: %w: %v", line, errValidationFormat, err)
		}
		p.DistKM = append(p.DistKM, d)
		p.HeightM = append(p.HeightM, h)
	}
	return p, sc.Err()
}

// sg3Profile is what the tests need from an ITU-R SG3 measurement file.
type sg3Profile struct {
	Path                 Path
	DeltaN               float64 // N-units/km
	FreqMHz              float64
	TxHeightM, RxHeightM float64
}

func readSG3(t testing.TB, name string) sg3Profile {
	t.Helper()
	path := filepath.Join(validationDir(t, "p1812"), name)
	f, err := os.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	p, err := parseSG3(f)
	if err != nil {
		t.Fatalf("%s: %v", path, err)
	}
	return p
}

// parseSG3 reads the ITU-R SG3 measurement-data layout: a header block with
// "Average annual values dN (N-units/km):,45", a profile between
// "{Begin of Profile}" and "{End of Profile}" (a "Number of Points:,n" row,
// then rows km, m amsl, coverage code, cover height m, radio-met code), and
// measurement rows between "{Begin of Measurements}" and "{End of
// Measurements}" (frequency MHz, Tx antenna height m, Tx effective height,
// Rx antenna height m, …). Cover heights become clutter on intermediate
// points only.
func parseSG3(r io.Reader) (sg3Profile, error) {
	var out sg3Profile
	sc := bufio.NewScanner(r)
	line, section, npts := 0, "", -1
	haveDN, haveMeas := false, false
	num := func(s, field string) (float64, error) {
		v, err := strconv.ParseFloat(strings.TrimSpace(s), 64)
		if err != nil {
			return 0, fmt.Errorf("line %d: %s: %w: %v", line, field, errValidationFormat, err)
		}
		return v, nil
	}
	for sc.Scan() {
		line++
		text := strings.TrimSpace(sc.Text())
		f := strings.Split(text, ",")
		switch {
		case text == "{Begin of Profile}":
			section = "profile"
			continue
		case text == "{Begin of Measurements}":
			section = "measurements"
			continue
		case strings.HasPrefix(text, "{End of"):
			section = ""
			continue
		case strings.HasPrefix(text, "Average annual values dN"):
			if len(f) < 2 {
				return out, fmt.Errorf("line %d: dN: %w: no value", line, errValidationFormat)
			}
			v, err := num(f[1], "dN")
			if err != nil {
				return out, err
			}
			out.DeltaN, haveDN = v, true
			continue
		}
		switch section {
		case "profile":
			if strings.HasPrefix(text, "Number of Points:") {
				if len(f) < 2 {
					return out, fmt.Errorf("line %d: number of points: %w: no value", line, errValidationFormat)
				}
				v, err := num(f[1], "number of points")
				if err != nil {
					return out, err
				}
				npts = int(v)
				continue
			}
			if len(f) < 4 {
				return out, fmt.Errorf("line %d: profile row: %w: %d fields, want 5", line, errValidationFormat, len(f))
			}
			d, err := num(f[0], "distance")
			if err != nil {
				return out, err
			}
			h, err := num(f[1], "height")
			if err != nil {
				return out, err
			}
			c, err := num(f[3], "cover height")
			if err != nil {
				return out, err
			}
			out.Path.DistKM = append(out.Path.DistKM, d)
			out.Path.HeightM = append(out.Path.HeightM, h)
			out.Path.ClutterM = append(out.Path.ClutterM, c)
		case "measurements":
			if haveMeas {
				continue // every row repeats the geometry; the rest are time percentages
			}
			if len(f) < 4 {
				return out, fmt.Errorf("line %d: measurement row: %w: %d fields, want at least 4", line, errValidationFormat, len(f))
			}
			var err error
			if out.FreqMHz, err = num(f[0], "frequency"); err != nil {
				return out, err
			}
			if out.TxHeightM, err = num(f[1], "tx antenna height"); err != nil {
				return out, err
			}
			if out.RxHeightM, err = num(f[3], "rx antenna height"); err != nil {
				return out, err
			}
			haveMeas = true
		}
	}
	if err := sc.Err(); err != nil {
		return out, err
	}
	n := len(out.Path.DistKM)
	switch {
	case n < 2:
		return out, fmt.Errorf("%w: %d profile points, want at least 2", errValidationFormat, n)
	case npts >= 0 && npts != n:
		return out, fmt.Errorf("%w: header says %d profile points, found %d", errValidationFormat, npts, n)
	case !haveDN || !haveMeas:
		return out, fmt.Errorf("%w: missing dN or measurement rows", errValidationFormat)
	}
	// Cover heights apply to intermediate points only (ITU-R P.1812-8 §3.2).
	out.Path.ClutterM[0], out.Path.ClutterM[n-1] = 0, 0
	return out, nil
}

// sg3Seed reads testdata/invented_sg3.csv, an invented file in the SG3
// layout (seed for the parser test and the fuzz corpus).
func sg3Seed(t testing.TB) string {
	t.Helper()
	b, err := os.ReadFile(filepath.Join("testdata", "invented_sg3.csv"))
	if err != nil {
		t.Fatal(err)
	}
	return string(b)
}

func TestParseSG3Seed(t *testing.T) {
	seed := sg3Seed(t)
	p, err := parseSG3(strings.NewReader(seed))
	if err != nil {
		t.Fatal(err)
	}
	if len(p.Path.DistKM) != 3 || p.FreqMHz != 150 || p.TxHeightM != 10 || p.RxHeightM != 2 || p.DeltaN != 45 {
		t.Fatalf("parsed %+v", p)
	}
	if p.Path.ClutterM[0] != 0 || p.Path.ClutterM[1] != 15 || p.Path.ClutterM[2] != 0 {
		t.Errorf("clutter %v, want terminals 0 and the middle 15", p.Path.ClutterM)
	}
	if _, err := parseSG3(strings.NewReader(strings.Replace(seed, "0.5,120", "0.5,x", 1))); !errors.Is(err, errValidationFormat) {
		t.Errorf("bad height: err %v, want errValidationFormat", err)
	}
}

func FuzzParseSG3(f *testing.F) {
	f.Add(sg3Seed(f))
	f.Add("{Begin of Profile}\nNumber of Points:,1\n0,1,2,3,4\n{End of Profile}\n")
	f.Fuzz(func(t *testing.T, s string) {
		p, err := parseSG3(strings.NewReader(s))
		if err != nil {
			return
		}
		// Whatever parses must be usable or rejected cleanly by the model.
		prm := Params{FreqMHz: 100, TxHeightM: 10, RxHeightM: 10}
		_, _ = Terrain{}.Loss(p.Path, prm)
	})
}

func FuzzParseDBull(f *testing.F) {
	b, err := os.ReadFile(filepath.Join("testdata", "invented_dbull.csv"))
	if err != nil {
		f.Fatal(err)
	}
	f.Add(string(b))
	f.Fuzz(func(t *testing.T, s string) {
		p, err := parseDBull(strings.NewReader(s))
		if err != nil {
			return
		}
		_, _ = Terrain{}.Loss(p, Params{FreqMHz: 100, TxHeightM: 10, RxHeightM: 10})
	})
}
