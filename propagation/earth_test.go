package propagation

import (
	"math"
	"testing"
)

func TestRadioHorizonKM(t *testing.T) {
	ae := EffectiveEarthRadiusKM(4.0 / 3) // k = 4/3 (ITU-R P.530-19 §2.2)
	cases := []struct {
		name         string
		h1, h2, want float64 // m, m, km
		tol          float64
	}{
		// Computed [calc] from ITU-R P.526-16 eq. 21 with k = 4/3.
		{"2 m", 2, 0, 5.83, 0.005},
		{"10 m", 10, 0, 13.03, 0.005},
		{"30 m", 30, 0, 22.58, 0.005},
		{"100 m", 100, 0, 41.22, 0.005},
		{"2 m and 30 m", 2, 30, 28.41, 0.005},
		{"negative counts as 0", -5, 0, 0, 0},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			if got := RadioHorizonKM(c.h1, c.h2, ae); math.Abs(got-c.want) > c.tol {
				t.Errorf("RadioHorizonKM(%g, %g) = %.4f km, want %.2f ± %g", c.h1, c.h2, got, c.want, c.tol)
			}
		})
	}
}

func TestEarthBulgeM(t *testing.T) {
	ae := EffectiveEarthRadiusKM(DefaultKFactor)
	cases := []struct {
		name         string
		d1, d2, want float64 // km, km, m
		tol          float64
	}{
		// Computed [calc] from the term of ITU-R P.526-16 eq. 49, k = 4/3.
		{"5+5 km", 5, 5, 1.47, 0.005},
		{"10+10 km", 10, 10, 5.89, 0.005},
		{"25+25 km", 25, 25, 36.79, 0.005},
		{"at an end", 0, 30, 0, 0},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			if got := EarthBulgeM(c.d1, c.d2, ae); math.Abs(got-c.want) > c.tol {
				t.Errorf("EarthBulgeM(%g, %g) = %.4f m, want %.2f ± %g", c.d1, c.d2, got, c.want, c.tol)
			}
		})
	}
}

func TestKFactorFromDeltaN(t *testing.T) {
	cases := []struct {
		name    string
		deltaN  float64
		wantAe  float64 // km
		tol     float64
		wantErr bool
	}{
		// ITU-R P.1812-8 eq. 6; ΔN = 45 → a_e = 8930.776786 km (P.1812
		// validation conditions of ITU-R WP 3K).
		{"ΔN 45", 45, 8930.776786, 1e-6, false},
		// k = 157/(157 − 0) = 1: the geometric earth.
		{"ΔN 0", 0, 6371, 1e-9, false},
		{"ducting", 157, 0, 0, true},
		{"NaN", math.NaN(), 0, 0, true},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			k, err := KFactorFromDeltaN(c.deltaN)
			if (err != nil) != c.wantErr {
				t.Fatalf("err = %v, want error %v", err, c.wantErr)
			}
			if err == nil && math.Abs(EffectiveEarthRadiusKM(k)-c.wantAe) > c.tol {
				t.Errorf("a_e = %.6f km, want %.6f", EffectiveEarthRadiusKM(k), c.wantAe)
			}
		})
	}
}
