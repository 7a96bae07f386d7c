package antenna

import (
	"math"
	"testing"
)

// halfPowerDB is 10·log10(1/2), the level of the half-power points.
var halfPowerDB = 10 * math.Log10(0.5)

// The pattern model against the catalog's own figures, for every entry and
// several bearings: boresight gives the catalog gain, the half-power points
// sit at ±beamwidth/2 within 0.5 dB of 3 dB down, and straight behind a
// directional antenna the gain is the catalog gain less the front-to-back
// ratio.
func TestPatternMatchesCatalogFigures(t *testing.T) {
	bearings := []float64{0, 37.5, 180, 271, 359.9}
	for _, a := range Catalog() {
		for _, b := range bearings {
			a, b := a, b
			t.Run(a.Name, func(t *testing.T) {
				if got := a.GainTowardDBi(b, 0, b); math.Abs(got-a.GainDBi) > 1e-9 {
					t.Errorf("bearing %g°: boresight gain %.4f dBi, catalog %.2f dBi", b, got, a.GainDBi)
				}
				for _, s := range []float64{-1, 1} {
					el := s * a.VBeamwidthDeg / 2
					if got := a.GainTowardDBi(b, el, b) - a.GainDBi; math.Abs(got-halfPowerDB) > 0.5 {
						t.Errorf("bearing %g°, elevation %+.1f°: %.2f dB relative, want %.2f ± 0.5", b, el, got, halfPowerDB)
					}
				}
				if !a.Directional() {
					return
				}
				for _, s := range []float64{-1, 1} {
					az := b + s*a.HBeamwidthDeg/2
					if got := a.GainTowardDBi(az, 0, b) - a.GainDBi; math.Abs(got-halfPowerDB) > 0.5 {
						t.Errorf("bearing %g°, azimuth %.1f°: %.2f dB relative, want %.2f ± 0.5", b, az, got, halfPowerDB)
					}
				}
				behind := a.GainTowardDBi(b+180, 0, b)
				if want := a.GainDBi - a.FrontToBackDB; math.Abs(behind-want) > 1e-9 {
					t.Errorf("bearing %g°: behind %.3f dBi, want gain − F/B = %.3f dBi", b, behind, want)
				}
			})
		}
	}
}

// A Yagi aimed at the far end and one aimed away from it differ by the
// front-to-back ratio, whichever way the far end lies.
func TestYagiAimedAtAndAway(t *testing.T) {
	tests := []struct {
		name       string
		toFarEnd   float64 // azimuth of the far end, degrees
		wantDiffDB float64 // catalog front-to-back, dB
	}{
		{"yagi-3el-2m", 63.2, 15},
		{"yagi-5el-2m", 301, 18},
		{"yagi-3el-70cm", 180, 15},
		{"yagi-5el-70cm", 0, 18},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			a, err := Lookup(tt.name)
			if err != nil {
				t.Fatal(err)
			}
			at := a.GainTowardDBi(tt.toFarEnd, 0, tt.toFarEnd)
			away := a.GainTowardDBi(tt.toFarEnd, 0, tt.toFarEnd+180)
			if d := at - away; math.Abs(d-tt.wantDiffDB) > 0.5 {
				t.Errorf("aimed at − aimed away = %.2f dB, want %.1f dB ± 0.5", d, tt.wantDiffDB)
			}
		})
	}
}

// The model never gives more than the peak gain, is symmetric about the
// boresight, never falls below its floor, and an omnidirectional antenna's
// gain does not depend on azimuth or bearing.
func TestPatternShape(t *testing.T) {
	for _, a := range Catalog() {
		t.Run(a.Name, func(t *testing.T) {
			floor := a.GainDBi - OmniFloorDB
			if a.Directional() {
				floor = a.GainDBi - a.FrontToBackDB
			}
			for az := -180.0; az <= 180; az += 7.5 {
				for el := -90.0; el <= 90; el += 5 {
					g := a.GainTowardDBi(az, el, 0)
					if g > a.GainDBi+1e-9 || g < floor-1e-9 {
						t.Fatalf("az %g°, el %g°: %.3f dBi outside [%.2f, %.2f]", az, el, g, floor, a.GainDBi)
					}
					if m := a.GainTowardDBi(-az, -el, 0); math.Abs(m-g) > 1e-9 {
						t.Fatalf("az %g°, el %g°: %.4f dBi but its mirror gives %.4f dBi", az, el, g, m)
					}
					if !a.Directional() {
						if o := a.GainTowardDBi(az+123, el, 77); math.Abs(o-g) > 1e-9 {
							t.Fatalf("omnidirectional gain depends on azimuth: %.4f vs %.4f dBi", g, o)
						}
					}
				}
			}
			// Straight up: the elevation lobe's null, held at the floor.
			if up := a.GainTowardDBi(0, 90, 0); math.Abs(up-floor) > 1e-9 {
				t.Errorf("straight up %.3f dBi, want the floor %.3f dBi", up, floor)
			}
			if a.GainTowardDBi(0, 120, 0) != a.GainTowardDBi(0, 90, 0) {
				t.Error("elevation beyond 90° is not taken as 90°")
			}
		})
	}
}

func TestPatternNaN(t *testing.T) {
	y, _ := Lookup("yagi-3el-2m")
	d, _ := Lookup("dipole")
	if !math.IsNaN(y.GainTowardDBi(math.NaN(), 0, 0)) {
		t.Error("directional: NaN azimuth should give NaN")
	}
	if !math.IsNaN(d.GainTowardDBi(0, math.NaN(), 0)) {
		t.Error("NaN elevation should give NaN")
	}
	if g := d.GainTowardDBi(math.NaN(), 0, math.NaN()); g != d.GainDBi {
		t.Errorf("omnidirectional with NaN azimuth and bearing: %g dBi, want %g (they are ignored)", g, d.GainDBi)
	}
}

func TestAzimuthOffsetDeg(t *testing.T) {
	tests := []struct{ az, bearing, want float64 }{
		{10, 0, 10},
		{350, 10, -20},
		{10, 350, 20},
		{180, 0, 180},
		{0, 180, 180},
		{-180, 0, 180},
		{720 + 45, 0, 45},
		{0, 90, -90},
	}
	for _, tt := range tests {
		if got := AzimuthOffsetDeg(tt.az, tt.bearing); math.Abs(got-tt.want) > 1e-9 {
			t.Errorf("AzimuthOffsetDeg(%g, %g) = %g, want %g", tt.az, tt.bearing, got, tt.want)
		}
	}
}

// cosExponent: the cosⁿ lobe is half power at half the beamwidth. Check
// values computed by hand from n = ln 0.5 / ln cos(bw/2): bw 90° → cos 45° =
// 1/√2, n = 2 exactly; bw 120° → cos 60° = 1/2, n = 1 exactly.
func TestCosExponent(t *testing.T) {
	tests := []struct{ bw, want float64 }{{90, 2}, {120, 1}}
	for _, tt := range tests {
		if got := cosExponent(tt.bw); math.Abs(got-tt.want) > 1e-12 {
			t.Errorf("cosExponent(%g) = %.15g, want %g", tt.bw, got, tt.want)
		}
	}
}

func BenchmarkGainToward(b *testing.B) {
	b.ReportAllocs()
	a, _ := Lookup("yagi-5el-2m")
	s := 0.0
	for i := 0; i < b.N; i++ {
		s += a.GainTowardDBi(float64(i%360), 2, 45)
	}
	_ = s
}
