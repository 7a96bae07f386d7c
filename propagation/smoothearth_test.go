package propagation

import (
	"math"
	"testing"
)

// refFirstTerm writes out the first term of the residue series as
// ITU-R P.526-16 §3.1.1 gives it (eqs. 11a, 12a, 14a, 15a,
// 16, 17, 18, 13), independently of the package code: the loss is
// −(F(X) + G(Y1) + G(Y2)) in dB; d km, h m, f MHz, a_e km.
func refFirstTerm(d, h1, h2, f, ae, eps, sigma float64, vertical bool) float64 {
	kh := 0.36 * math.Pow(ae*f, -1.0/3) * math.Pow(math.Pow(eps-1, 2)+math.Pow(18000*sigma/f, 2), -0.25)
	k := kh
	if vertical {
		k = kh * math.Pow(eps*eps+math.Pow(18000*sigma/f, 2), 0.5)
	}
	beta := (1 + 1.6*math.Pow(k, 2) + 0.67*math.Pow(k, 4)) / (1 + 4.5*math.Pow(k, 2) + 1.53*math.Pow(k, 4))
	x := 2.188 * beta * math.Pow(f, 1.0/3) * math.Pow(ae, -2.0/3) * d
	y := func(h float64) float64 { return 9.575e-3 * beta * math.Pow(f, 2.0/3) * math.Pow(ae, -1.0/3) * h }
	var fx float64
	if x >= 1.6 {
		fx = 11 + 10*math.Log10(x) - 17.6*x
	} else {
		fx = -20*math.Log10(x) - 5.6488*math.Pow(x, 1.425)
	}
	g := func(y float64) float64 {
		b := beta * y
		var v float64
		if b > 2 {
			v = 17.6*math.Pow(b-1.1, 0.5) - 5*math.Log10(b-1.1) - 8
		} else {
			v = 20 * math.Log10(b+0.1*b*b*b)
		}
		return math.Max(v, 2+20*math.Log10(k))
	}
	return -(fx + g(y(h1)) + g(y(h2)))
}

func TestSmoothEarthBeyondHorizon(t *testing.T) {
	cases := []struct {
		name      string
		d, h1, h2 float64
		f, ae     float64
		pol       Polarization
		g         Ground
		tol       float64
	}{
		{"land H 150 MHz 60 km", 60, 10, 20, 150, 8500, Horizontal, Land, 1e-9},
		{"land V 50 MHz 80 km", 80, 2, 30, 50, 8494.67, Vertical, Land, 1e-9},
		{"sea V 150 MHz 60 km", 60, 2, 2, 150, 8500, Vertical, Sea, 1e-9},
		{"sea H 446 MHz 100 km", 100, 30, 5, 446, 8930.78, Horizontal, Sea, 1e-9},
		{"land H 1000 MHz X < 1.6", 30, 3, 3, 1000, 8500, Horizontal, Land, 1e-9},
		{"long path 70/5 m", 83.07993853, 70, 5, 150, 8500, Horizontal, Land, 1e-9},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			if d := RadioHorizonKM(c.h1, c.h2, c.ae); c.d < d {
				t.Fatalf("case is inside the horizon (%.2f km)", d)
			}
			got, err := SmoothEarthLossDB(c.d, c.h1, c.h2, Params{FreqMHz: c.f, EarthRadiusKM: c.ae, Polarization: c.pol, Ground: c.g})
			if err != nil {
				t.Fatal(err)
			}
			want := refFirstTerm(c.d, c.h1, c.h2, c.f, c.ae, c.g.Permittivity, c.g.ConductivitySM, c.pol == Vertical)
			if math.Abs(got-want) > c.tol {
				t.Errorf("loss %.6f dB, want %.6f", got, want)
			}
		})
	}
}

func TestSmoothEarthContinuousAtHorizon(t *testing.T) {
	// ITU-R P.526-16 §3.2: at d_los the interpolated loss (eq. 25, h → 0,
	// a_em → a_e) meets the first-term loss; no step either side.
	cases := []struct {
		name   string
		h1, h2 float64
		f      float64
		pol    Polarization
		g      Ground
	}{
		{"land H 10/30 m 150 MHz", 10, 30, 150, Horizontal, Land},
		{"land V 2/2 m 446 MHz", 2, 2, 446, Vertical, Land},
		{"sea V 5/50 m 50 MHz", 5, 50, 50, Vertical, Sea},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			prm := Params{FreqMHz: c.f, Polarization: c.pol, Ground: c.g}
			dlos := RadioHorizonKM(c.h1, c.h2, EffectiveEarthRadiusKM(DefaultKFactor))
			in, _ := SmoothEarthLossDB(dlos*(1-1e-9), c.h1, c.h2, prm)
			out, _ := SmoothEarthLossDB(dlos*(1+1e-9), c.h1, c.h2, prm)
			if math.Abs(in-out) > 1e-3 {
				t.Errorf("loss just inside %.5f dB, just beyond %.5f dB at d_los %.3f km", in, out, dlos)
			}
			// Loss never falls with distance from 0.3 to 2 d_los.
			prev := -1.0
			for d := 0.3 * dlos; d <= 2*dlos; d += dlos / 200 {
				l, _ := SmoothEarthLossDB(d, c.h1, c.h2, prm)
				if l < prev-1e-9 {
					t.Fatalf("loss falls from %.4f to %.4f dB at %.3f km", prev, l, d)
				}
				prev = l
			}
		})
	}
}

func TestSmoothEarthWithinClearance(t *testing.T) {
	// 5 km between 50 m masts at 146 MHz: clearance far above h_req
	// (eq. 23), no loss.
	l, err := SmoothEarthLossDB(5, 50, 50, Params{FreqMHz: 146})
	if err != nil || l != 0 {
		t.Errorf("loss %v dB, err %v; want 0", l, err)
	}
}

func TestSmoothEarthPolarizationGround(t *testing.T) {
	// ITU-R P.526-16 §3.1.1 [from memory]: β ≈ 1 (ground constants hardly
	// matter) for horizontal polarization at all frequencies and for
	// vertical above 20 MHz over land or 300 MHz over sea; below that,
	// vertical polarization over sea keeps a surface wave that low antennas
	// ride, so it loses far less than horizontal.
	loss := func(f, h float64, pol Polarization, g Ground) float64 {
		l, err := SmoothEarthLossDB(60, h, h, Params{FreqMHz: f, Polarization: pol, Ground: g})
		if err != nil {
			t.Fatal(err)
		}
		return l
	}
	cases := []struct {
		name          string
		f, h          float64
		minDiff, maxD float64 // range of L_H − L_V over sea, dB
	}{
		{"sea 50 MHz 2 m", 50, 2, 20, math.Inf(1)},
		{"sea 150 MHz 2 m", 150, 2, 10, math.Inf(1)},
		{"sea 446 MHz 30 m", 446, 30, -0.1, 0.1},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			lh, lv := loss(c.f, c.h, Horizontal, Sea), loss(c.f, c.h, Vertical, Sea)
			if d := lh - lv; d < c.minDiff || d > c.maxD {
				t.Errorf("L_H %.3f − L_V %.3f = %.3f dB, want in [%g, %g]", lh, lv, d, c.minDiff, c.maxD)
			}
		})
	}
	// Horizontal: land and sea nearly alike.
	if lLand, lSea := loss(150, 10, Horizontal, Land), loss(150, 10, Horizontal, Sea); math.Abs(lLand-lSea) > 0.05 {
		t.Errorf("horizontal land %.3f vs sea %.3f dB, want within 0.05", lLand, lSea)
	}
	// Vertical over land above 20 MHz: close to horizontal at 446 MHz.
	if lh, lv := loss(446, 10, Horizontal, Land), loss(446, 10, Vertical, Land); math.Abs(lh-lv) > 0.1 {
		t.Errorf("land 446 MHz: L_H %.3f vs L_V %.3f dB, want within 0.1", lh, lv)
	}
}

func TestSmoothEarthAntennaOnSurface(t *testing.T) {
	// One antenna on the surface (h1 = 0) within the other's horizon: the
	// ray grazes the earth at that end, so eq. 25 tends to A_h, the
	// first-term loss for a_em (eq. 24) — finite and positive, never NaN.
	// Found by FuzzTerrainLoss.
	prm := Params{FreqMHz: 30}
	for _, d := range []float64{0.01, 0.1, 1, 5} {
		l, err := SmoothEarthLossDB(d, 0, 13, prm)
		if err != nil || math.IsNaN(l) || l < 0 {
			t.Errorf("%g km: loss %v, err %v; want finite, ≥ 0", d, l, err)
		}
		// Continuity: raising the antenna by a millimetre changes little.
		l2, _ := SmoothEarthLossDB(d, 0.001, 13, prm)
		if math.Abs(l-l2) > 0.5 {
			t.Errorf("%g km: loss %.3f dB at 0 m but %.3f dB at 1 mm", d, l, l2)
		}
	}
}
