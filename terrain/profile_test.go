package terrain

import (
	"bytes"
	"errors"
	"fmt"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"slices"
	"strconv"
	"strings"
	"testing"
)

// htGeodSolveLine returns the points at distances s (metres) along the
// geodesic from (lat1, lon1) with azimuth azi1, from GeographicLib's
// GeodSolve -L (one run, distances on stdin).
func htGeodSolveLine(t testing.TB, lat1, lon1, azi1 float64, s []float64) (lats, lons []float64) {
	t.Helper()
	var in bytes.Buffer
	for _, d := range s {
		fmt.Fprintf(&in, "%.9f\n", d)
	}
	f := func(v float64) string { return strconv.FormatFloat(v, 'g', 17, 64) }
	cmd := exec.Command("GeodSolve", "-p", "9", "-L", f(lat1), f(lon1), f(azi1))
	cmd.Stdin = &in
	out, err := cmd.Output()
	if err != nil {
		t.Fatalf("GeodSolve -L: %v", err)
	}
	for _, line := range strings.Split(strings.TrimSpace(string(out)), "\n") {
		fs := strings.Fields(line)
		if len(fs) != 3 {
			t.Fatalf("GeodSolve output %q", line)
		}
		la, err1 := strconv.ParseFloat(fs[0], 64)
		lo, err2 := strconv.ParseFloat(fs[1], 64)
		if err1 != nil || err2 != nil {
			t.Fatalf("GeodSolve output %q", line)
		}
		lats, lons = append(lats, la), append(lons, lo)
	}
	if len(lats) != len(s) {
		t.Fatalf("GeodSolve gave %d points for %d distances", len(lats), len(s))
	}
	return lats, lons
}

// htGeodSolveInverseAz returns distance (m) and the azimuths at both ends
// (degrees, forward) from GeodSolve -i.
func htGeodSolveInverseAz(t testing.TB, lat1, lon1, lat2, lon2 float64) (s12, azi1, azi2 float64) {
	t.Helper()
	f := func(v float64) string { return strconv.FormatFloat(v, 'g', 17, 64) }
	cmd := exec.Command("GeodSolve", "-i", "-p", "9")
	cmd.Stdin = strings.NewReader(f(lat1) + " " + f(lon1) + " " + f(lat2) + " " + f(lon2) + "\n")
	out, err := cmd.Output()
	if err != nil {
		t.Fatalf("GeodSolve -i: %v", err)
	}
	var v [3]float64
	fs := strings.Fields(string(out))
	if len(fs) != 3 {
		t.Fatalf("GeodSolve output %q", out)
	}
	for i := range v {
		if v[i], err = strconv.ParseFloat(fs[i], 64); err != nil {
			t.Fatal(err)
		}
	}
	return v[2], v[0], v[1]
}

// htAngleDiff returns |a − b| in degrees, modulo 360.
func htAngleDiff(a, b float64) float64 {
	d := math.Mod(math.Abs(a-b), 360)
	return math.Min(d, 360-d)
}

// TestProfileGeometry compares lengths, azimuths and every sample position
// with GeographicLib's GeodSolve (Karney's algorithm, the reference
// implementation).
func TestProfileGeometry(t *testing.T) {
	if _, err := exec.LookPath("GeodSolve"); err != nil {
		htCrosscheckMissing(t, "GeodSolve not found (install Debian geographiclib-tools)")
	}
	empty, _ := Open()
	cases := []struct {
		name                   string
		lat1, lon1, lat2, lon2 float64
		stepM                  float64
		posTolM                float64 // Line.Positions' stated 1e-11° (≈ 1 µm), plus GeodSolve's printed precision
	}{
		{"mid-latitude 100 km", 45.05, 7.05, 45.75, 7.85, 30, 1e-5},
		{"equator eastwards", 0, 10, 0, 10.5, 25, 1e-5},
		{"southern 300 km", -33, -71, -35, -69, 200, 1e-5},
		{"80°N east-west", 80, 5, 80, 8, 20, 1e-5},
		{"across the antimeridian", 10, 179.8, 10.1, -179.9, 30, 1e-5},
		{"close to the pole", 89.7, 0, 89.7, 180, 50, 1e-5},
		{"shorter than a step", 45, 7, 45.0001, 7.0001, 30, 1e-5},
		{"coincident ends", 45, 7, 45, 7, 30, 1e-5},
		{"default step over empty set", 46, 8, 46.3, 8.2, 0, 1e-5},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			var p Profile
			if err := empty.Profile(c.lat1, c.lon1, c.lat2, c.lon2, c.stepM, &p); err != nil {
				t.Fatal(err)
			}
			s12, azi1, azi2 := htGeodSolveInverseAz(t, c.lat1, c.lon1, c.lat2, c.lon2)
			// GeodSolve -p 9 prints nanometres and 1e-9°; Karney's method is
			// good to 15 nm.
			if math.Abs(p.DistanceM-s12) > 1e-6 {
				t.Errorf("DistanceM %.9f; GeodSolve %.9f", p.DistanceM, s12)
			}
			if s12 > 0 && (htAngleDiff(p.AzimuthDeg, azi1) > 1e-7 || htAngleDiff(p.BackAzimuthDeg, azi2+180) > 1e-7) {
				t.Errorf("azimuths %.9f, back %.9f; GeodSolve %.9f, %.9f + 180", p.AzimuthDeg, p.BackAzimuthDeg, azi1, azi2)
			}
			if p.AzimuthDeg < 0 || p.AzimuthDeg >= 360 || p.BackAzimuthDeg < 0 || p.BackAzimuthDeg >= 360 {
				t.Errorf("azimuths %v, %v outside [0, 360)", p.AzimuthDeg, p.BackAzimuthDeg)
			}
			step := c.stepM
			if step == 0 {
				step = NoDEMStepM
			}
			wantN := max(int(math.Ceil(s12/step))+1, 2)
			if p.Len() != wantN || len(p.Lat) != wantN || len(p.ElevM) != wantN {
				t.Fatalf("%d samples; want ⌈%.3f/%v⌉+1 = %d", p.Len(), s12, step, wantN)
			}
			if p.StepM > step || math.Abs(p.StepM*float64(wantN-1)-p.DistanceM) > 1e-6 {
				t.Errorf("step %v m for %d samples over %v m; want equal steps ≤ %v m", p.StepM, wantN, p.DistanceM, step)
			}
			if p.Lat[0] != c.lat1 || p.Lon[0] != normLon(c.lon1) || p.Lat[wantN-1] != c.lat2 || p.Lon[wantN-1] != normLon(c.lon2) {
				t.Errorf("ends %v,%v … %v,%v; want exactly the given points", p.Lat[0], p.Lon[0], p.Lat[wantN-1], p.Lon[wantN-1])
			}
			if p.NoData != wantN || len(p.Sources) != 0 {
				t.Errorf("NoData %d, Sources %v; want every sample without data", p.NoData, p.Sources)
			}
			glat, glon := htGeodSolveLine(t, c.lat1, c.lon1, azi1, p.DistM)
			worst := 0.0
			for i := range glat {
				if i > 0 && math.Abs(p.DistM[i]-p.DistM[i-1]-p.StepM) > 1e-6 {
					t.Fatalf("sample %d at %v m after %v m; want steps of %v m", i, p.DistM[i], p.DistM[i-1], p.StepM)
				}
				latM, lonM := metresPerDegree(glat[i])
				dlon := p.Lon[i] - glon[i]
				dlon -= 360 * math.Round(dlon/360)
				e := math.Hypot((p.Lat[i]-glat[i])*latM, dlon*lonM)
				worst = math.Max(worst, e)
				if p.Lon[i] < -180 || p.Lon[i] >= 180 {
					t.Fatalf("longitude %v outside [−180, 180)", p.Lon[i])
				}
			}
			if worst > c.posTolM {
				t.Errorf("positions up to %.3f m from GeodSolve's; tolerance %.3f m", worst, c.posTolM)
			}
		})
	}
}

// TestProfileHeights runs profiles over the GDAL-written 2×2 mosaic: heights
// equal the bilinear interpolation of gdallocationinfo's samples, sources
// are listed in order, uncovered samples are counted, and a repeated
// profile does not allocate.
func TestProfileHeights(t *testing.T) {
	dir := htMosaic(t)
	set, err := Open(dir)
	if err != nil {
		t.Fatal(err)
	}
	cases := []struct {
		name                   string
		lat1, lon1, lat2, lon2 float64
		sources                []string
		noData                 bool
	}{
		// Crosses 46°N near 7.9°E, before 8°E.
		{"diagonal over three tiles", 45.2, 7.1, 46.9, 8.8, []string{"N45E007.hgt", "N46E007.hgt", "N46E008.hgt"}, false},
		// Between two points on 46°N the geodesic bends north of the
		// parallel, into the northern tiles.
		{"between points on the 46°N seam", 46, 7.1, 46, 8.9, []string{"N46E007.hgt", "N46E008.hgt"}, false},
		{"south of the seam", 45.3, 7.4, 45.2, 8.6, []string{"N45E007.hgt", "N45E008.hgt"}, false},
		{"north to south across the seam", 46.8, 7.6, 45.3, 7.6, []string{"N46E007.hgt", "N45E007.hgt"}, false},
		{"leaving the data", 45.5, 8.5, 45.5, 9.5, []string{"N45E008.hgt"}, true},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			var p Profile
			if err := set.Profile(c.lat1, c.lon1, c.lat2, c.lon2, 0, &p); err != nil {
				t.Fatal(err)
			}
			if !slices.Equal(p.Sources, c.sources) {
				t.Errorf("Sources %v; want %v", p.Sources, c.sources)
			}
			if (p.NoData > 0) != c.noData {
				t.Errorf("NoData %d", p.NoData)
			}
			if sp := set.SpacingM(math.Max(math.Abs(c.lat1), math.Abs(c.lat2))); p.StepM > sp {
				t.Errorf("default step %v m coarser than the DEM spacing %v m", p.StepM, sp)
			}
			want := htGDALBilinear(t, dir, p.Lat, p.Lon)
			checked := 0
			for i, w := range want {
				if math.IsNaN(w) {
					continue
				}
				if math.Abs(p.ElevM[i]-w) > 1e-6 {
					t.Errorf("sample %d (%.7f, %.7f): %.6f m; bilinear of gdallocationinfo samples %.6f m", i, p.Lat[i], p.Lon[i], p.ElevM[i], w)
				}
				checked++
			}
			if checked < p.Len()*8/10-p.NoData {
				t.Errorf("only %d of %d samples checked", checked, p.Len())
			}
			allocs := testing.AllocsPerRun(5, func() {
				set.Profile(c.lat1, c.lon1, c.lat2, c.lon2, 0, &p)
			})
			if allocs != 0 {
				t.Errorf("%v allocations per repeated profile; want 0", allocs)
			}
		})
	}
	if m := set.Missing(); !slices.Equal(m, []string{"N45E009.hgt"}) {
		t.Errorf("Missing %v; want [N45E009.hgt]", m)
	}
}

func TestProfileErrors(t *testing.T) {
	set, _ := Open()
	var p Profile
	cases := []struct {
		name                          string
		lat1, lon1, lat2, lon2, stepM float64
		want                          string
	}{
		{"start latitude", 95, 0, 45, 7, 30, "profile start: latitude"},
		{"end longitude", 45, 7, 45, math.NaN(), 30, "profile end: longitude"},
		{"negative step", 45, 7, 46, 7, -5, "profile step"},
		// 90° of the equator is 10 018 754 m (GeodSolve: 0 0 0 90 →
		// s12 10018754.171395); at 1e−9 m it would need 1e16 samples.
		{"too many samples", 0, 0, 0, 90, 0.5, "would need more than 10000000 samples; use a step of at least 1.002 m"},
		{"tiny step", 0, 0, 0, 90, 1e-9, "a profile of 10018754 m at a 1e-09 m step would need more than 10000000 samples"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			err := set.Profile(c.lat1, c.lon1, c.lat2, c.lon2, c.stepM, &p)
			if err == nil || !strings.Contains(err.Error(), c.want) {
				t.Errorf("error %v; want one containing %q", err, c.want)
			}
			if strings.Contains(c.name, "step") || strings.Contains(c.name, "samples") {
				if !errors.Is(err, ErrTooManySamples) && c.stepM > 0 && c.stepM < 1 {
					t.Errorf("error %v does not wrap ErrTooManySamples", err)
				}
			}
		})
	}
}

// TestProfilePole: at the pole the east–west spacing of a geographic grid
// is 0 (cos 90° = 0); the automatic step stops at MinAutoStepM instead of
// asking for 10^18 samples. The path from 90°N to 89.9°N along a meridian
// is 11 169.398 m (GeodSolve -i -p 6: 90 0 89.9 0 → s12 11169.397841).
func TestProfilePole(t *testing.T) {
	dir := t.TempDir()
	raw := htRaw(HGTSamples3, func(r, c int) int16 { return 100 })
	if err := os.WriteFile(filepath.Join(dir, HGTName(89, 0)), raw, 0o644); err != nil {
		t.Fatal(err)
	}
	set, err := Open(dir)
	if err != nil {
		t.Fatal(err)
	}
	var p Profile
	if err := set.Profile(90, 0, 89.9, 0, 0, &p); err != nil {
		t.Fatal(err)
	}
	if math.Abs(p.DistanceM-11169.397841) > 0.001 || p.Len() != int(math.Ceil(p.DistanceM/MinAutoStepM))+1 {
		t.Errorf("pole profile: %.3f m, %d samples", p.DistanceM, p.Len())
	}
}

// htBenchTile writes a 1″ tile of invented terrain into dir.
func htBenchTile(b *testing.B, dir string, lat, lon int) {
	b.Helper()
	raw := htRaw(HGTSamples1, func(r, c int) int16 {
		return int16(500 + 300*math.Sin(float64(r)/170)*math.Cos(float64(c)/130) + float64(htMix(uint64(r*HGTSamples1+c))%20))
	})
	if err := os.WriteFile(filepath.Join(dir, HGTName(lat, lon)), raw, 0o644); err != nil {
		b.Fatal(err)
	}
}

// BenchmarkTileAt: bilinear heights from a tile in memory.
func BenchmarkTileAt(b *testing.B) {
	dir := b.TempDir()
	htBenchTile(b, dir, 45, 7)
	tile, err := ReadHGT(filepath.Join(dir, "N45E007.hgt"))
	if err != nil {
		b.Fatal(err)
	}
	const n = 4096
	// random: points scattered over the whole 1″ tile (52 MB of samples),
	// so nearly every sample misses the CPU caches: the worst case.
	// path: points 1″ apart along a line, as a profile reads them.
	cases := []struct {
		name       string
		lats, lons []float64
	}{{name: "random"}, {name: "path"}}
	for i := 0; i < n; i++ {
		cases[0].lats = append(cases[0].lats, 45+float64(htMix(uint64(i))%1e6)/1e6)
		cases[0].lons = append(cases[0].lons, 7+float64(htMix(uint64(i+n))%1e6)/1e6)
		cases[1].lats = append(cases[1].lats, 45.2+float64(i)*0.6/3600)
		cases[1].lons = append(cases[1].lons, 7.1+float64(i)*0.8/3600)
	}
	for _, c := range cases {
		b.Run(c.name, func(b *testing.B) {
			b.ReportAllocs()
			sum := 0.0
			for i := 0; b.Loop(); i++ {
				sum += tile.At(c.lats[i&(n-1)], c.lons[i&(n-1)])
			}
			b.ReportMetric(float64(b.N)/b.Elapsed().Seconds()/1e6, "Msamples/s")
			if sum == 0 {
				b.Fatal("no heights")
			}
		})
	}
}

// BenchmarkProfile100km1as: a 100 km profile over a 1″ tile at the default
// step, tile cached, reusing the Profile, with the positions (Profile) and
// without (ProfileHeights).
func BenchmarkProfile100km1as(b *testing.B) {
	for _, c := range []struct {
		name                   string
		lat, lon               int
		lat1, lon1, lat2, lon2 float64
	}{
		// About 3250 samples at the 1″ spacing of 30.7 m near the equator.
		{"equator", 0, 7, 0.1, 7.1, 0.76, 7.71},
		// About 4600 samples: 1″ of longitude is 21.9 m at 45°N.
		{"45N", 45, 7, 45.05, 7.05, 45.75, 7.85},
	} {
		b.Run(c.name, func(b *testing.B) {
			dir := b.TempDir()
			htBenchTile(b, dir, c.lat, c.lon)
			set, err := Open(dir)
			if err != nil {
				b.Fatal(err)
			}
			var p Profile
			if err := set.Profile(c.lat1, c.lon1, c.lat2, c.lon2, 0, &p); err != nil {
				b.Fatal(err)
			}
			if p.DistanceM < 99e3 || p.DistanceM > 101e3 {
				b.Fatalf("path of %v m; want about 100 km", p.DistanceM)
			}
			for _, f := range []struct {
				name string
				fill func(lat1, lon1, lat2, lon2, stepM float64, dst *Profile) error
			}{{"positions", set.Profile}, {"heights", set.ProfileHeights}} {
				b.Run(f.name, func(b *testing.B) {
					b.ReportAllocs()
					for b.Loop() {
						f.fill(c.lat1, c.lon1, c.lat2, c.lon2, 0, &p)
					}
					b.ReportMetric(float64(p.Len()), "samples")
					b.ReportMetric(b.Elapsed().Seconds()*1e9/float64(b.N)/float64(p.Len()), "ns/sample")
				})
			}
		})
	}
}
