package antenna

import (
	"errors"
	"math"
	"strings"
	"testing"
)

// The kinds of antenna the catalog must hold.
var requiredNames = []string{
	"handheld-stub", "handheld-whip", "dipole", "ground-plane", "end-fed-half-wave",
	"five-eighths-vertical", "collinear-2", "collinear-4",
	"yagi-3el-2m", "yagi-5el-2m", "yagi-3el-70cm", "yagi-5el-70cm",
}

func TestCatalogHoldsRequiredAntennas(t *testing.T) {
	for _, name := range requiredNames {
		t.Run(name, func(t *testing.T) {
			if _, err := Lookup(name); err != nil {
				t.Fatal(err)
			}
		})
	}
}

// Every figure has its source beside it: published (naming the document) or
// typical (common practice), and the shape of the entry is one the pattern
// model can use.
func TestCatalogFiguresAreSourcedAndSane(t *testing.T) {
	seen := map[string]bool{}
	for _, a := range Catalog() {
		t.Run(a.Name, func(t *testing.T) {
			if seen[a.Name] {
				t.Fatalf("name %q appears twice", a.Name)
			}
			seen[a.Name] = true
			if a.Name != strings.ToLower(a.Name) || strings.ContainsAny(a.Name, " \t/") {
				t.Errorf("name %q: want lower case, no spaces or slashes", a.Name)
			}
			if a.Description == "" || a.Band == "" {
				t.Errorf("description %q, band %q: both wanted", a.Description, a.Band)
			}
			switch {
			case strings.HasPrefix(a.Source, "published:"):
				if a.Typical() {
					t.Error("published entry reports Typical")
				}
			case strings.HasPrefix(a.Source, "typical:"):
				if !a.Typical() {
					t.Error("typical entry does not report Typical")
				}
				if !strings.Contains(a.Source, "common practice") {
					t.Errorf("typical source %q should say common practice", a.Source)
				}
			default:
				t.Errorf("source %q: want \"published: …\" or \"typical: …\"", a.Source)
			}
			if math.IsNaN(a.GainDBi) || a.GainDBi < -20 || a.GainDBi > 20 {
				t.Errorf("gain %g dBi is not a plausible VHF/UHF figure", a.GainDBi)
			}
			if !(a.VBeamwidthDeg > 0 && a.VBeamwidthDeg < 180) {
				t.Errorf("vertical beamwidth %g° outside (0°, 180°)", a.VBeamwidthDeg)
			}
			if a.Directional() {
				if !(a.HBeamwidthDeg > 0 && a.HBeamwidthDeg < 180) {
					t.Errorf("horizontal beamwidth %g° outside (0°, 180°)", a.HBeamwidthDeg)
				}
				if !(a.FrontToBackDB > 0) {
					t.Errorf("directional antenna with front-to-back %g dB", a.FrontToBackDB)
				}
			} else {
				if a.HBeamwidthDeg != OmniBeamwidthDeg {
					t.Errorf("horizontal beamwidth %g°: want %d° or under 180°", a.HBeamwidthDeg, OmniBeamwidthDeg)
				}
				if a.FrontToBackDB != 0 {
					t.Errorf("omnidirectional antenna with front-to-back %g dB", a.FrontToBackDB)
				}
			}
			if !(a.MinMHz > 0 && a.MinMHz < a.MaxMHz) {
				t.Errorf("frequency range %g–%g MHz", a.MinMHz, a.MaxMHz)
			}
			if !a.Covers(a.MinMHz) || !a.Covers(a.MaxMHz) || a.Covers(a.MaxMHz+1) {
				t.Errorf("Covers disagrees with %g–%g MHz", a.MinMHz, a.MaxMHz)
			}
			if a.Handheld != strings.HasPrefix(a.Name, "handheld-") {
				t.Errorf("handheld %v does not match the name", a.Handheld)
			}
		})
	}
}

// The half-wave dipole's published figures, checked against its far-field
// pattern F(θ) = cos(π/2·cos θ)/sin θ (the thin half-wave dipole with a
// sinusoidal current; C. A. Balanis, Antenna Theory, 3rd ed., eq. 4-84, from
// memory): directivity 1.64 = 2.15 dBi (FCC OET Bulletin 65, ed. 97-01) and
// a half-power beamwidth of 78° (Balanis §4.6, from memory). Both are
// computed here from the pattern.
func TestDipoleFiguresAgainstItsPattern(t *testing.T) {
	a, err := Lookup("dipole")
	if err != nil {
		t.Fatal(err)
	}
	power := func(theta float64) float64 { // θ from the dipole's axis
		s := math.Sin(theta)
		if s < 1e-12 {
			return 0
		}
		f := math.Cos(math.Pi/2*math.Cos(theta)) / s
		return f * f
	}
	// D = 2 / ∫₀^π F² sin θ dθ (peak of F² is 1 at θ = 90°), by Simpson.
	const n = 20000
	h := math.Pi / n
	sum := 0.0
	for i := 0; i <= n; i++ {
		w := 2.0
		switch {
		case i == 0 || i == n:
			w = 1
		case i%2 == 1:
			w = 4
		}
		th := float64(i) * h
		sum += w * power(th) * math.Sin(th)
	}
	d := 2 / (sum * h / 3)
	if got := 10 * math.Log10(d); math.Abs(got-a.GainDBi) > 0.01 {
		t.Errorf("directivity from the pattern %.4f dBi, catalog gain %.2f dBi", got, a.GainDBi)
	}
	// Half-power point: F²(θ) = 1/2 between 0° and 90°, by bisection.
	lo, hi := 0.01, math.Pi/2
	for i := 0; i < 100; i++ {
		mid := (lo + hi) / 2
		if power(mid) < 0.5 {
			lo = mid
		} else {
			hi = mid
		}
	}
	hpbw := 2 * (90 - lo*180/math.Pi)
	if math.Abs(hpbw-a.VBeamwidthDeg) > 0.5 {
		t.Errorf("half-power beamwidth from the pattern %.2f°, catalog %.1f°", hpbw, a.VBeamwidthDeg)
	}
}

// Gains and beamwidths of the typical entries hang together: no antenna has
// more gain than its beamwidths allow. Directivity from half-power
// beamwidths (C. A. Balanis, Antenna Theory, 3rd ed., §2.7, from memory):
// omnidirectional D ≈ 101/(HPBW − 0.0027·HPBW²) (McDonald), directional
// D ≈ 32 400/(θE·θH) (degrees). Losses make gain less than directivity, so
// the gain may fall below (by at most 1.5 dB for fixed antennas; anything
// for handhelds) but exceed it only by the approximations' slack, 0.5 dB.
func TestCatalogGainAgreesWithBeamwidths(t *testing.T) {
	for _, a := range Catalog() {
		t.Run(a.Name, func(t *testing.T) {
			var d float64
			if a.Directional() {
				d = 32400 / (a.HBeamwidthDeg * a.VBeamwidthDeg)
			} else {
				b := a.VBeamwidthDeg
				d = 101 / (b - 0.0027*b*b)
			}
			dDBi := 10 * math.Log10(d)
			if a.GainDBi > dDBi+0.5 {
				t.Errorf("gain %.2f dBi exceeds the directivity %.2f dBi its beamwidths allow", a.GainDBi, dDBi)
			}
			if !a.Handheld && a.GainDBi < dDBi-1.5 {
				t.Errorf("gain %.2f dBi is far below the directivity %.2f dBi of its beamwidths", a.GainDBi, dDBi)
			}
		})
	}
}

func TestLookup(t *testing.T) {
	tests := []struct {
		in, want string
		ok       bool
	}{
		{"dipole", "dipole", true},
		{"  Yagi-3El-2m ", "yagi-3el-2m", true},
		{"COLLINEAR-4", "collinear-4", true},
		{"yagi-4el-2m", "", false},
		{"", "", false},
		{"rubber duck", "", false},
	}
	for _, tt := range tests {
		t.Run(tt.in, func(t *testing.T) {
			a, err := Lookup(tt.in)
			if !tt.ok {
				if !errors.Is(err, ErrUnknownAntenna) {
					t.Fatalf("err %v, want ErrUnknownAntenna", err)
				}
				for _, n := range requiredNames {
					if !strings.Contains(err.Error(), n) {
						t.Errorf("error %q does not list %q", err, n)
					}
				}
				return
			}
			if err != nil || a.Name != tt.want {
				t.Fatalf("got %q, %v; want %q", a.Name, err, tt.want)
			}
		})
	}
}

func TestCatalogIsACopy(t *testing.T) {
	c := Catalog()
	c[0].GainDBi = 99
	a, _ := Lookup(c[0].Name)
	if a.GainDBi == 99 {
		t.Fatal("changing Catalog()'s result changed the catalog")
	}
}

func FuzzLookup(f *testing.F) {
	for _, s := range append(requiredNames, "", " ", "YAGI-5EL-70CM", "dipole\x00", "ü") {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, name string) {
		a, err := Lookup(name)
		if err != nil {
			if !errors.Is(err, ErrUnknownAntenna) {
				t.Fatalf("error %v does not wrap ErrUnknownAntenna", err)
			}
			if a != (Antenna{}) {
				t.Fatalf("error with a non-zero antenna %+v", a)
			}
			return
		}
		if a.Name != strings.ToLower(strings.TrimSpace(name)) {
			t.Fatalf("Lookup(%q) = %q", name, a.Name)
		}
	})
}
