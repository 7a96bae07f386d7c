package propagation

import (
	"fmt"
	"math"
	"math/rand/v2"
	"testing"
)

// scanProfilePlain is scanProfile as a plain reading of ITU-R P.526-16
// §4.5 (eqs. 49–61): one pass for the checks and the terrain sums of eqs.
// 58, 59 and 61a, one for the obstruction slopes of eqs. 61b, 61c (when
// eq. 62 uses them), one for the maxima of eqs. 49, 51 and 53, each value
// by the same expression as scanProfile. It is what the one-pass scan with
// its skipped divisions is checked against, bit for bit.
func scanProfilePlain(p Path, rp params) (profileScan, error) {
	if err := checkPath(p); err != nil {
		return profileScan{}, err
	}
	n := len(p.DistKM)
	dist, hgt, clut := p.DistKM[:n], p.HeightM[:n], p.ClutterM
	s := profileScan{
		n: n, d0: dist[0], iMax: -1,
		stim: math.Inf(-1), srim: math.Inf(-1), nuMax: math.Inf(-1),
		hobs: math.Inf(-1), aobt: math.Inf(-1), aobr: math.Inf(-1),
	}
	s.dKM = dist[n-1] - dist[0]
	if !finite(dist[0]) || !finite(s.dKM) || !(s.dKM > 0) {
		return s, fmt.Errorf("%w: path length %g km from distances %g to %g km must be positive", ErrBadPath, s.dKM, dist[0], dist[n-1])
	}
	if !finite(hgt[0]) || !finite(hgt[n-1]) {
		return s, fmt.Errorf("%w: terminal terrain heights %g and %g m must be numbers", ErrBadPath, hgt[0], hgt[n-1])
	}
	d := s.dKM
	s.htsM = hgt[0] + rp.txM
	s.hrsM = hgt[n-1] + rp.rxM
	hts, hrs := s.htsM, s.hrsM
	s.str = (hrs - hts) / d
	slope := s.str
	bulge := 500 / rp.aeKM
	kNu := 0.002 * d / rp.wavelengthM
	var v1, v2 float64
	hobs := math.Inf(-1)
	dp, hp := 0.0, hgt[0]
	for i := 1; i < n; i++ {
		di := dist[i] - s.d0
		hi := hgt[i]
		if !(di > dp) {
			return s, fmt.Errorf("%w: distance %g km at point %d does not increase from %g km at point %d", ErrBadPath, dist[i], i, dist[i-1], i-1)
		}
		if hi-hi != 0 {
			return s, fmt.Errorf("%w: terrain height %g m at point %d is not a number; fill voids before computing loss", ErrBadPath, hi, i)
		}
		dd := di - dp
		v1 += dd * (hi + hp)
		v2 += dd * (hi*(2*di+dp) + hp*(di+2*dp))
		dp, hp = di, hi
		if hob := hi - hts - slope*di; hob > hobs && i < n-1 {
			hobs = hob
		}
	}
	if clut != nil {
		for i, c := range clut[1 : n-1] {
			if !(c >= 0) || c-c != 0 {
				return s, fmt.Errorf("%w: clutter height %g m at point %d must be zero or more", ErrBadPath, c, i+1)
			}
		}
	}
	s.v1, s.v2, s.hobs = v1, v2, hobs
	aobt, aobr := s.aobt, s.aobr
	if hobs > 0 {
		for i := 1; i < n-1; i++ {
			di := dist[i] - s.d0
			ddi := d - di
			hob := (hgt[i] - hts - slope*di) / (di * ddi)
			if a := hob * ddi; a > aobt {
				aobt = a
			}
			if a := hob * di; a > aobr {
				aobr = a
			}
		}
	}
	stim, srim, iMax := s.stim, s.srim, s.iMax
	qMax := math.Inf(-1)
	for i := 1; i < n-1; i++ {
		di := dist[i] - s.d0
		ddi := d - di
		r := 1 / (di * ddi)
		g := hgt[i] + bulge*di*ddi
		if clut != nil {
			g += clut[i]
		}
		if v := (g - hts) * ddi * r; v > stim {
			stim = v
		}
		if v := (g - hrs) * di * r; v > srim {
			srim = v
		}
		if e := g - hts - slope*di; e*math.Abs(e)*r > qMax {
			qMax, iMax = e*math.Abs(e)*r, i
		}
	}
	nuMax := math.Inf(-1)
	if iMax >= 0 {
		nuMax = math.Copysign(math.Sqrt(kNu*math.Abs(qMax)), qMax)
	}
	s.stim, s.srim, s.nuMax, s.iMax = stim, srim, nuMax, iMax
	s.aobt, s.aobr = aobt, aobr
	return s, nil
}

// sameScan reports whether two scans agree to the last bit.
func sameScan(a, b profileScan) bool {
	fa := []float64{a.d0, a.dKM, a.htsM, a.hrsM, a.stim, a.srim, a.str, a.nuMax, a.v1, a.v2, a.hobs, a.aobt, a.aobr}
	fb := []float64{b.d0, b.dKM, b.htsM, b.hrsM, b.stim, b.srim, b.str, b.nuMax, b.v1, b.v2, b.hobs, b.aobt, b.aobr}
	for i := range fa {
		if math.Float64bits(fa[i]) != math.Float64bits(fb[i]) {
			return false
		}
	}
	return a.n == b.n && a.iMax == b.iMax
}

// TestScanProfileAgainstPlain checks the one-pass scan against the plain
// three-pass reading of ITU-R P.526-16 §4.5 (scanProfilePlain) bit for bit:
// on the ITU-R SG3 validation profiles (delta-Bullington examples and the
// P.1812 measurement paths with clutter), and on random profiles of every
// kind that tests the skipping: rough, smooth, flat (ties everywhere),
// terrain exactly on the antenna line, a profile of zeros, unequal spacing,
// a first distance other than 0, clutter, and bad paths (same error).
func TestScanProfileAgainstPlain(t *testing.T) {
	type tcase struct {
		name string
		p    Path
	}
	var cases []tcase
	for _, f := range []string{"dbull1.csv", "dbull2.csv", "dbull3.csv", "dbull4.csv"} {
		cases = append(cases, tcase{f, readDBull(t, f)})
	}
	for _, f := range []string{"b2iseac_rural_land_10km.csv", "b2iseac_rural_land_1km.csv", "rburg_rural_noclutter.csv"} {
		cases = append(cases, tcase{f, readSG3(t, f).Path})
	}
	rng := rand.New(rand.NewPCG(1, 2))
	for k := range 400 {
		n := 2 + rng.IntN(1500)
		if k%7 == 0 {
			n = 2 + rng.IntN(5)
		}
		p := Path{DistKM: make([]float64, n), HeightM: make([]float64, n)}
		lengthKM := 0.05 + rng.Float64()*60
		d0 := 0.0
		if k%5 == 1 {
			d0 = rng.Float64() * 100
		}
		base := rng.Float64() * 1000
		for i := range n {
			d := lengthKM * float64(i) / float64(n-1)
			if k%3 == 2 && i > 0 && i < n-1 { // unequal spacing
				d += (rng.Float64() - 0.5) * lengthKM / float64(n-1) * 0.9
			}
			p.DistKM[i] = d0 + d
			switch k % 6 {
			case 0: // rough
				p.HeightM[i] = base + 300*math.Sin(d/3) + 40*rng.Float64()
			case 1: // smooth hill
				p.HeightM[i] = base + 200*math.Sin(math.Pi*d/lengthKM)
			case 2: // flat: ties
				p.HeightM[i] = base
			case 3: // whole metres, many ties
				p.HeightM[i] = math.Round(base + 50*rng.Float64())
			case 4: // zeros
				p.HeightM[i] = 0
			case 5: // a valley
				p.HeightM[i] = base - 300*math.Sin(math.Pi*d/lengthKM)
			}
		}
		if k%4 == 3 {
			p.ClutterM = make([]float64, n)
			for i := 1; i < n-1; i++ {
				p.ClutterM[i] = float64(rng.IntN(3)) * 10
			}
		}
		cases = append(cases, tcase{fmt.Sprintf("random %d", k), p})
	}
	// Near-ties at the rounding level: heights that put every point at the
	// same elevation angle from the transmitter (eq. 49), from the receiver
	// (eq. 53), or at the same ν (eq. 51), up to a last-bit jitter, with
	// the bulge of a 4/3 earth (8494.67 km) taken out. The running maxima
	// then move by rounding only, where a skipped point would show.
	const aeKM, txM, rxM = 8494.67, 10.0, 10.0
	bulge := 500 / aeKM
	for k := range 60 {
		n := 50 + rng.IntN(800)
		lengthKM := 1 + rng.Float64()*40
		p := Path{DistKM: make([]float64, n), HeightM: make([]float64, n)}
		h0, h1 := 100.0, 100+rng.Float64()*50
		for i := range n {
			p.DistKM[i] = lengthKM * float64(i) / float64(n-1)
		}
		p.HeightM[0], p.HeightM[n-1] = h0, h1
		hts, hrs := h0+txM, h1+rxM
		slope := (hrs - hts) / lengthKM
		for i := 1; i < n-1; i++ {
			di := p.DistKM[i]
			ddi := lengthKM - di
			var g float64
			switch k % 3 {
			case 0:
				g = hts + 0.7*di
			case 1:
				g = hrs + 0.7*ddi
			case 2:
				g = hts + slope*di + math.Sqrt(0.3*di*ddi)
			}
			h := g - bulge*di*ddi
			p.HeightM[i] = h * (1 + float64(rng.IntN(5)-2)*0x1p-52)
		}
		cases = append(cases, tcase{fmt.Sprintf("near-tie %d", k), p})
	}
	// Terrain exactly on the antenna line (heights 0 at both antennas).
	line := Path{DistKM: []float64{0, 1, 2, 3, 4}, HeightM: []float64{0, 10, 20, 30, 40}}
	cases = append(cases, tcase{"on the line", line})
	// Bad paths.
	cases = append(cases,
		tcase{"repeated distance", Path{DistKM: []float64{0, 1, 1, 2}, HeightM: []float64{0, 0, 0, 0}}},
		tcase{"NaN height", Path{DistKM: []float64{0, 1, 2, 3}, HeightM: []float64{0, math.NaN(), 0, 0}}},
		tcase{"NaN height and bad clutter", Path{DistKM: []float64{0, 1, 2, 3}, HeightM: []float64{0, 0, math.NaN(), 0}, ClutterM: []float64{0, -1, 0, 0}}},
		tcase{"bad clutter", Path{DistKM: []float64{0, 1, 2, 3}, HeightM: []float64{0, 0, 0, 0}, ClutterM: []float64{0, 0, math.Inf(1), 0}}},
		tcase{"last distance", Path{DistKM: []float64{0, 1, 2, 1.5}, HeightM: []float64{0, 0, 0, 0}}},
	)
	for _, c := range cases {
		for _, prm := range []Params{
			{FreqMHz: 146, TxHeightM: 1.5, RxHeightM: 1.5},
			{FreqMHz: 146, TxHeightM: txM, RxHeightM: rxM, EarthRadiusKM: aeKM},
			{FreqMHz: 446, TxHeightM: 20, RxHeightM: 0},
			{FreqMHz: 50, TxHeightM: 0, RxHeightM: 70, EarthRadiusKM: 6371},
		} {
			rp, err := prm.resolve()
			if err != nil {
				t.Fatal(err)
			}
			got, gerr := scanProfile(c.p, rp)
			want, werr := scanProfilePlain(c.p, rp)
			if fmt.Sprint(gerr) != fmt.Sprint(werr) {
				t.Fatalf("%s: error %v, want %v", c.name, gerr, werr)
			}
			if werr == nil && !sameScan(got, want) {
				t.Errorf("%s, %+v:\n got %+v\nwant %+v", c.name, prm, got, want)
			}
		}
	}
}
