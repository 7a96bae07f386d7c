package propagation

import (
	"errors"
	"math"
	"testing"
)

func TestFresnelRadius(t *testing.T) {
	// Computed [calc]: 146 MHz, 5 + 5 km → 71.97 m (ITU-R P.526-16
	// eq. 3), 71.65 m exact from λ (eq. 2, n = 1).
	if got := FresnelRadiusM(5, 5, 146); math.Abs(got-71.97) > 0.005 {
		t.Errorf("FresnelRadiusM = %.4f m, want 71.97", got)
	}
	if got := FresnelRadiusWavelengthM(5, 5, WavelengthM(146, 0)); math.Abs(got-71.65) > 0.005 {
		t.Errorf("FresnelRadiusWavelengthM = %.4f m, want 71.65", got)
	}
}

func flatPath(n int, lengthKM float64) Path {
	p := Path{DistKM: make([]float64, n), HeightM: make([]float64, n)}
	for i := range p.DistKM {
		p.DistKM[i] = lengthKM * float64(i) / float64(n-1)
	}
	return p
}

func TestClearanceFlatHighAntennas(t *testing.T) {
	// 10 km over flat ground with 100 m antennas at 146 MHz, k = 4/3: the
	// ray is level at 100 m, the bulge mid-path is 1.47 m and R1 there is
	// 71.65 m (computed from λ), so the worst clearance is (100 − 1.47)/71.65
	// = 1.375 F1, at the middle point.
	p := flatPath(101, 10)
	prm := Params{FreqMHz: 146, TxHeightM: 100, RxHeightM: 100}
	c, err := PathClearance(p, prm)
	if err != nil {
		t.Fatal(err)
	}
	ae := EffectiveEarthRadiusKM(DefaultKFactor)
	want := (100 - 500*5*5/ae) / math.Sqrt(299792458/146e6*2500)
	if !c.LineOfSight || c.Index != 50 || math.Abs(c.WorstF1-want) > 1e-9 || c.WorstF1 <= 1 {
		t.Errorf("clearance %+v, want line of sight, index 50, %.4f F1 (> 1)", c, want)
	}
	// The terrain model adds nothing to free space on such a path.
	r, err := Terrain{}.Loss(p, prm)
	if err != nil {
		t.Fatal(err)
	}
	if r.ExcessDB != 0 || r.PathLossDB != r.FreeSpaceDB {
		t.Errorf("excess %v dB, path %v, free space %v; want 0 excess", r.ExcessDB, r.PathLossDB, r.FreeSpaceDB)
	}
	if math.Abs(r.FreeSpaceDB-FreeSpaceLossDB(10, 146)) > 1e-9 {
		t.Errorf("free space %v dB, want %v over the path length", r.FreeSpaceDB, FreeSpaceLossDB(10, 146))
	}
}

func TestClearanceLowAntennasBeyondHorizon(t *testing.T) {
	// 40 km over flat ground with 2 m antennas: horizon 2 × 5.83 km
	// (computed, ITU-R P.526-16 eq. 49 term), so the bulge cuts the ray.
	c, err := PathClearance(flatPath(401, 40), Params{FreqMHz: 146, TxHeightM: 2, RxHeightM: 2})
	if err != nil {
		t.Fatal(err)
	}
	if c.LineOfSight || c.WorstF1 >= 0 {
		t.Errorf("clearance %+v, want obstructed", c)
	}
}

func TestClearanceTwoPoints(t *testing.T) {
	c, err := PathClearance(Path{DistKM: []float64{0, 5}, HeightM: []float64{10, 20}}, Params{FreqMHz: 146})
	if err != nil {
		t.Fatal(err)
	}
	if !c.LineOfSight || c.Index != -1 || !math.IsInf(c.WorstF1, 1) {
		t.Errorf("clearance %+v, want LOS, index −1, +Inf", c)
	}
}

func TestPathErrors(t *testing.T) {
	good := Params{FreqMHz: 146, TxHeightM: 10, RxHeightM: 10}
	cases := []struct {
		name string
		p    Path
		prm  Params
		want error
	}{
		{"one point", Path{DistKM: []float64{0}, HeightM: []float64{0}}, good, ErrBadPath},
		{"length mismatch", Path{DistKM: []float64{0, 1}, HeightM: []float64{0}}, good, ErrBadPath},
		{"clutter mismatch", Path{DistKM: []float64{0, 1}, HeightM: []float64{0, 0}, ClutterM: []float64{0}}, good, ErrBadPath},
		{"not increasing", Path{DistKM: []float64{0, 2, 2, 3}, HeightM: []float64{0, 0, 0, 0}}, good, ErrBadPath},
		{"NaN height", Path{DistKM: []float64{0, 1, 2}, HeightM: []float64{0, math.NaN(), 0}}, good, ErrBadPath},
		{"negative clutter", Path{DistKM: []float64{0, 1, 2}, HeightM: []float64{0, 0, 0}, ClutterM: []float64{0, -1, 0}}, good, ErrBadPath},
		{"zero length", Path{DistKM: []float64{1, 1}, HeightM: []float64{0, 0}}, good, ErrBadPath},
		{"no frequency", flatPath(3, 1), Params{}, ErrBadParams},
		{"negative antenna", flatPath(3, 1), Params{FreqMHz: 146, TxHeightM: -1}, ErrBadParams},
		{"bad polarization", flatPath(3, 1), Params{FreqMHz: 146, Polarization: 7}, ErrBadParams},
		{"negative radius", flatPath(3, 1), Params{FreqMHz: 146, EarthRadiusKM: -1}, ErrBadParams},
		{"bad ground", flatPath(3, 1), Params{FreqMHz: 146, Ground: Ground{Permittivity: -3}}, ErrBadParams},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			for _, m := range []Model{FreeSpace{}, Terrain{}} {
				if _, err := m.Loss(c.p, c.prm); !errors.Is(err, c.want) {
					t.Errorf("%s: err = %v, want %v", m.Name(), err, c.want)
				}
			}
		})
	}
}
