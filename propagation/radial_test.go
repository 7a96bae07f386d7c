package propagation

import (
	"math"
	"math/bits"
	"math/rand/v2"
	"sort"
	"testing"
)

// radialFeed feeds p's intermediate points to a fresh Radial and returns it.
func radialFeed(t testing.TB, p Path, prm Params) *Radial {
	t.Helper()
	w, err := NewRadial(prm, true)
	if err != nil {
		t.Fatal(err)
	}
	w.Reset(p.HeightM[0])
	n := len(p.DistKM)
	for i := 1; i < n-1; i++ {
		w.Add(p.DistKM[i]-p.DistKM[0], p.HeightM[i])
	}
	return w
}

// TestRadialValidation checks the incremental method against the ITU-R SG3
// delta-Bullington validation examples ("Validation examples for the delta
// Bullington diffraction prediction method", dbull1 and dbull3, sets A–E;
// expected L from the same table as TestDeltaBullingtonValidation).
func TestRadialValidation(t *testing.T) {
	expected := map[string][5]float64{
		"dbull1.csv": {34.4430, 42.3293, 36.3461, 27.6974, 42.9907},
		"dbull3.csv": {17.6204, 25.1017, 20.2549, 10.1899, 20.7395},
	}
	const tol = 0.005 // dB; the examples suggest 0.1 dB
	for file, want := range expected {
		p := readDBull(t, file)
		n := len(p.DistKM)
		for i, s := range dbullSets {
			w := radialFeed(t, p, dbullParams(s))
			got := w.Loss(p.DistKM[n-1]-p.DistKM[0], p.HeightM[n-1])
			if math.Abs(got.ExcessDB-want[i]) > tol {
				t.Errorf("%s set %s: L = %.4f dB, want %.4f ± %g (ITU-R SG3 validation)", file, s.name, got.ExcessDB, want[i], tol)
			}
		}
	}
}

// roughPath is a random profile of rolling hills, ridges and valleys
// (invented test terrain; the reference is Terrain.Loss on the same path).
func roughPath(rng *rand.Rand, n int, stepKM, smooth float64) Path {
	p := Path{DistKM: make([]float64, n), HeightM: make([]float64, n)}
	a1, a2, a3 := 50+150*rng.Float64(), 20+60*rng.Float64(), 2+10*rng.Float64()
	l1, l2, l3 := 3+10*rng.Float64(), 0.7+2*rng.Float64(), 0.1+0.3*rng.Float64()
	ph := rng.Float64() * 6
	for i := range n {
		d := float64(i) * stepKM
		p.DistKM[i] = d
		p.HeightM[i] = 200 + smooth*(a1*math.Sin(2*math.Pi*d/l1+ph)+a2*math.Sin(2*math.Pi*d/l2)+a3*math.Sin(2*math.Pi*d/l3)+rng.NormFloat64())
	}
	return p
}

// TestRadialMatchesTerrain compares the Radial's loss at every point of
// random profiles, taken as the receiver, with Terrain.Loss on the whole
// profile up to that point: they must agree to rounding, the line-of-sight
// paths (where ν_max is found by branch and bound) included. Low relief and
// high antennas give many line-of-sight receivers.
func TestRadialMatchesTerrain(t *testing.T) {
	rng := rand.New(rand.NewPCG(11, 526))
	var losErr []float64
	worstNLOS := 0.0
	for trial := range 48 {
		n := 300 + rng.IntN(400)
		step := 0.02 + 0.06*rng.Float64()
		p := roughPath(rng, n, step, []float64{1, 0.2, 0.02}[trial%3])
		prm := Params{
			FreqMHz:   []float64{50, 146, 446, 1296}[trial%4],
			TxHeightM: []float64{2, 10, 30, 60}[(trial/3)%4], RxHeightM: []float64{1.5, 5, 12}[(trial/12)%3],
			Polarization: Polarization(trial % 2),
		}
		w, err := NewRadial(prm, true)
		if err != nil {
			t.Fatal(err)
		}
		w.Reset(p.HeightM[0])
		for j := 1; j < n; j++ {
			got := w.Loss(p.DistKM[j], p.HeightM[j])
			ref, err := Terrain{}.Loss(Path{DistKM: p.DistKM[:j+1], HeightM: p.HeightM[:j+1]}, prm)
			if err != nil {
				t.Fatal(err)
			}
			if got.LineOfSight != ref.LineOfSight {
				t.Fatalf("trial %d point %d: line of sight %v, Terrain says %v", trial, j, got.LineOfSight, ref.LineOfSight)
			}
			if v := w.Visible(p.DistKM[j], p.HeightM[j]); v != ref.LineOfSight {
				t.Fatalf("trial %d point %d: Visible %v, Terrain's line of sight %v", trial, j, v, ref.LineOfSight)
			}
			if math.Abs(got.FreeSpaceDB-ref.FreeSpaceDB) > 1e-9 {
				t.Fatalf("trial %d point %d: free space %.9f dB, Terrain %.9f", trial, j, got.FreeSpaceDB, ref.FreeSpaceDB)
			}
			diff := math.Abs(got.ExcessDB - ref.ExcessDB)
			if ref.LineOfSight {
				losErr = append(losErr, diff)
			} else {
				worstNLOS = math.Max(worstNLOS, diff)
			}
			w.Add(p.DistKM[j], p.HeightM[j])
		}
	}
	if worstNLOS > 1e-9 {
		t.Errorf("trans-horizon receivers: worst difference %.3g dB from Terrain.Loss, want rounding only", worstNLOS)
	}
	if len(losErr) < 1000 {
		t.Fatalf("only %d line-of-sight receivers; the test needs more", len(losErr))
	}
	sort.Float64s(losErr)
	q := func(f float64) float64 { return losErr[int(f*float64(len(losErr)-1))] }
	t.Logf("line-of-sight receivers: %d; |Radial − Terrain| median %.3g dB, 99%% %.3g dB, 99.9%% %.3g dB, max %.3g dB",
		len(losErr), q(0.5), q(0.99), q(0.999), q(1))
	if q(1) > 1e-9 {
		t.Errorf("line-of-sight receivers: worst difference %.3g dB from Terrain.Loss, want rounding only", q(1))
	}
}

// TestRadialLineOfSightOnly checks that a Radial made for line of sight
// alone answers Visible like one that keeps everything, on a smooth earth
// where the radio horizon is known: d = √(2 a_e)(√h1 + √h2) (ITU-R
// P.526-16 eq. 21).
func TestRadialLineOfSightOnly(t *testing.T) {
	prm := Params{FreqMHz: 146, TxHeightM: 30, RxHeightM: 2}
	w, err := NewRadial(prm, false)
	if err != nil {
		t.Fatal(err)
	}
	w.Reset(0)
	horizon := RadioHorizonKM(30, 2, EffectiveEarthRadiusKM(DefaultKFactor)) // 28.41 km for k = 4/3
	step := 0.01
	last := 0.0
	for i := 1; i < 4000; i++ {
		d := float64(i) * step
		if w.Visible(d, 0) {
			last = d
		}
		w.Add(d, 0)
	}
	if math.Abs(last-horizon) > 2*step {
		t.Errorf("last visible point %.3f km, radio horizon %.3f km (ITU-R P.526-16 eq. 21)", last, horizon)
	}
}

func TestRadialBadParams(t *testing.T) {
	if _, err := NewRadial(Params{FreqMHz: -1}, true); err == nil {
		t.Error("negative frequency accepted")
	}
}

// BenchmarkRadialLoss is the per-receiver cost of the incremental method
// over a 3000-point radial: one Add and one Loss per point.
func BenchmarkRadialLoss(b *testing.B) {
	rng := rand.New(rand.NewPCG(1, 2))
	p := roughPath(rng, 3000, 0.02, 1)
	w, err := NewRadial(Params{FreqMHz: 146, TxHeightM: 10, RxHeightM: 2}, true)
	if err != nil {
		b.Fatal(err)
	}
	b.ReportAllocs()
	for b.Loop() {
		w.Reset(p.HeightM[0])
		for j := 1; j < len(p.DistKM); j++ {
			w.Loss(p.DistKM[j], p.HeightM[j])
			w.Add(p.DistKM[j], p.HeightM[j])
		}
	}
	b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N*(len(p.DistKM)-1)), "ns/receiver")
}

// TestHorizonLOSMatchesRadial: the running maximum of HorizonLOS.Slope
// answers HorizonLOS.Visible exactly as Radial.Visible does (itself checked
// against Terrain's line of sight, ITU-R P.526-16 eq. 50, in
// TestRadialMatchesTerrain), on seeded random profiles.
func TestHorizonLOSMatchesRadial(t *testing.T) {
	rng := rand.New(rand.NewPCG(5, 8))
	prm := Params{FreqMHz: 146, TxHeightM: 10, RxHeightM: 2}
	w, err := NewRadial(prm, false)
	if err != nil {
		t.Fatal(err)
	}
	visible, hidden := 0, 0
	for trial := range 40 {
		h0 := 300 + 200*rng.Float64()
		hl, err := NewHorizonLOS(prm, h0)
		if err != nil {
			t.Fatal(err)
		}
		w.Reset(h0)
		best := math.Inf(-1)
		for i := 1; i < 800; i++ {
			d := float64(i) * 0.03
			h := h0 + 150*math.Sin(float64(i)/37+float64(trial)) + 40*rng.Float64()
			if got, want := hl.Visible(best, d, h), w.Visible(d, h); got != want {
				t.Fatalf("trial %d point %d: HorizonLOS %v, Radial %v", trial, i, got, want)
			} else if got {
				visible++
			} else {
				hidden++
			}
			w.Add(d, h)
			best = math.Max(best, hl.Slope(d, h))
		}
	}
	if visible == 0 || hidden == 0 {
		t.Errorf("%d visible, %d hidden: the check needs both", visible, hidden)
	}
	if _, err := NewHorizonLOS(Params{FreqMHz: 146, TxHeightM: -1}, 0); err == nil {
		t.Error("negative antenna accepted")
	}
}

// TestRadialSmoothMaxima: the closed-form peaks of Radial.smoothMaxima
// give the same S_tim and S_rim (eqs. 49, 53 on the zero profile of
// eq. 64) as the binary searches of smoothProfileMaxima, and the same ν_max
// (eq. 51) wherever the smooth profile is line of sight, on random
// distances (evenly spaced, and uneven so that the galloping searches start
// from wrong guesses), heights and path lengths.
func TestRadialSmoothMaxima(t *testing.T) {
	rng := rand.New(rand.NewPCG(17, 4))
	w, err := NewRadial(Params{FreqMHz: 146}, true)
	if err != nil {
		t.Fatal(err)
	}
	los := 0
	for trial := range 3000 {
		w.Reset(0)
		n := 1 + rng.IntN(400)
		step := 0.01 + 0.1*rng.Float64()
		x := 0.0
		for i := 1; i <= n; i++ {
			if trial%2 == 0 {
				x = float64(i) * step // evenly spaced, as a coverage radial
			} else {
				x += step * (0.05 + 2*rng.Float64()) // uneven: the searches' guesses are off
			}
			w.Add(x, 0)
		}
		d := x + (0.5+rng.Float64())*step
		hts, hrs := 200*rng.Float64()*rng.Float64(), 50*rng.Float64()*rng.Float64()
		if trial%7 == 0 {
			hts = 0
		}
		st, sr, nu := w.smoothMaxima(d, hts, hrs)
		dist := append(append([]float64(nil), w.dist...), d)
		wst, wsr, wnu := smoothProfileMaxima(dist, 0, d, hts, hrs, w.rp)
		if st != wst || sr != wsr {
			t.Fatalf("trial %d: S_tim %v S_rim %v, binary search %v %v", trial, st, sr, wst, wsr)
		}
		if st < (hrs-hts)/d {
			los++
			if nu != wnu {
				t.Fatalf("trial %d: ν_max %v, binary search %v", trial, nu, wnu)
			}
		}
	}
	if los == 0 {
		t.Error("no line-of-sight case")
	}
}

// TestRadialSmoothEarthLoss: Radial's smooth-earth loss (first-term
// constants of eq. 24's a_em from a^(−1/3) scaling) against
// smoothEarthLossC (ITU-R P.526-16 §3.2 as written, newFirstTerm per
// call) on random paths within and beyond the horizon, both
// polarizations and several frequencies: equal within 1e−9 dB.
func TestRadialSmoothEarthLoss(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 11))
	within, worst := 0, 0.0
	for _, f := range []float64{30, 146, 446, 1300} {
		for _, pol := range []Polarization{Vertical, Horizontal} {
			w, err := NewRadial(Params{FreqMHz: f, Polarization: pol}, true)
			if err != nil {
				t.Fatal(err)
			}
			for range 2000 {
				d := 0.05 + 60*rng.Float64()
				h1, h2 := 300*rng.Float64()*rng.Float64(), 300*rng.Float64()*rng.Float64()
				got := w.smoothEarthLoss(d, h1, h2)
				want := smoothEarthLossC(d, h1, h2, w.rp, &w.ft)
				if d < RadioHorizonKM(h1, h2, w.rp.aeKM) && want > 0 {
					within++
				}
				if diff := math.Abs(got - want); diff > 1e-9 || math.IsNaN(got) != math.IsNaN(want) {
					t.Fatalf("%v MHz %v, d %v km, h %v, %v m: %v dB, smoothEarthLossC %v dB", f, pol, d, h1, h2, got, want)
				} else if diff > worst {
					worst = diff
				}
			}
		}
	}
	if within < 100 {
		t.Errorf("only %d paths within the horizon with a loss", within)
	}
	t.Logf("%d paths with a loss within the horizon; worst difference %.2g dB", within, worst)
}

// TestSearchFrom: the galloping search gives sort.Search's answer from any
// guess, on any monotone predicate.
func TestSearchFrom(t *testing.T) {
	for n := range 40 {
		for ans := 0; ans <= n; ans++ {
			for g := -3; g <= n+3; g++ {
				calls := 0
				got := searchFrom(n, g, func(i int) bool {
					calls++
					if i < 0 || i >= n {
						t.Fatalf("n %d: ok(%d) called out of range", n, i)
					}
					return i >= ans
				})
				if got != ans {
					t.Fatalf("n %d, answer %d, guess %d: got %d", n, ans, g, got)
				}
				if calls > 2*bits.Len(uint(n))+2 {
					t.Errorf("n %d, answer %d, guess %d: %d calls", n, ans, g, calls)
				}
			}
		}
	}
}

// TestRadialCopyFrom: a radial copied after some points and then fed the
// same further points as the original answers exactly as the original,
// and feeding the copy does not change the original.
func TestRadialCopyFrom(t *testing.T) {
	rng := rand.New(rand.NewPCG(5, 6))
	a, err := NewRadial(Params{FreqMHz: 446, TxHeightM: 8, RxHeightM: 1.5}, true)
	if err != nil {
		t.Fatal(err)
	}
	b, _ := NewRadial(Params{FreqMHz: 446, TxHeightM: 8, RxHeightM: 1.5}, true)
	a.Reset(240)
	h := func() float64 { return 200 + 150*rng.Float64() }
	for i := 1; i <= 300; i++ {
		a.Add(float64(i)*0.03, h())
	}
	b.CopyFrom(a)
	before := a.Loss(9.2, 230)
	for i := 301; i <= 320; i++ {
		b.Add(float64(i)*0.03, 900) // a ridge only the copy sees
	}
	if got := a.Loss(9.2, 230); got != before || a.Len() != 300 {
		t.Fatalf("feeding the copy changed the original: %+v, was %+v (%d points)", got, before, a.Len())
	}
	for i := 301; i <= 600; i++ {
		x, y := float64(i)*0.03, h()
		a.Add(x, y)
		if i > 320 {
			b.Add(x, y)
		}
	}
	c, _ := NewRadial(Params{FreqMHz: 446, TxHeightM: 8, RxHeightM: 1.5}, true)
	c.CopyFrom(a)
	for _, d := range []float64{18.1, 18.5, 25} {
		if x, y := a.Loss(d, 210), c.Loss(d, 210); x != y {
			t.Errorf("%g km: copy %+v, original %+v", d, y, x)
		}
		if x, y := a.Loss(d, 210), b.Loss(d, 210); x == y {
			t.Errorf("%g km: the ridge only the copy saw changed nothing (%+v)", d, x)
		}
	}
}
