package propagation

import (
	"fmt"
	"math"
	"testing"
)

// reversed returns p run from the receiver end.
func reversed(p Path) Path {
	n := len(p.DistKM)
	q := Path{DistKM: make([]float64, n), HeightM: make([]float64, n)}
	for i := range q.DistKM {
		q.DistKM[i] = p.DistKM[n-1] - p.DistKM[n-1-i]
		q.HeightM[i] = p.HeightM[n-1-i]
	}
	return q
}

// onGrid reports whether x is within 1e−6 of a whole number.
func onGrid(x float64) bool { return math.Abs(x-math.Round(x)) < 1e-6 }

// itmWindowsOnGrid reports whether an end of one of the model's fit
// windows falls on a profile point. The window indices are taken by floor
// at the start and ceiling at the end (Hufford 1995, zlsq1), so there the
// last bit of a distance decides which point is included, and the run
// from the other end may include another point: the model itself is not
// reciprocal there. Horizon distances are whole spacings, so a window end
// at 0.9 d_L falls on a point whenever the horizon is a multiple of ten
// points away.
func itmWindowsOnGrid(ip *itmPath) bool {
	u := func(x float64) float64 { return x / ip.dx }
	d, dl := ip.d, ip.dlsrch
	xa := math.Min(15*ip.h[0], 0.1*dl[0])
	xb := d - math.Min(15*ip.h[1], 0.1*dl[1])
	if onGrid(u(xa)) || onGrid(u(xb)) {
		return true
	}
	return dl[0]+dl[1] <= 1.5*d && (onGrid(u(0.9*dl[0])) || onGrid(u(d-0.9*dl[1])))
}

func TestITMReciprocity(t *testing.T) {
	// Reciprocity of the median (the model treats the two terminals
	// alike): equal antenna heights, the profile reversed, give the same
	// loss wherever the model is symmetric (see itmWindowsOnGrid).
	paths := append(readPFLs(t), readQKPFL(t), read3500(t), rollingPath(3300, 33), rollingPath(801, 17))
	checked := 0
	for i, p := range paths {
		for _, f := range []float64{41.5, 146, 450, 2400} {
			for _, h := range []float64{3, 30} {
				prm := Params{FreqMHz: f, TxHeightM: h, RxHeightM: h}
				if ip, _ := itmPrepared(t, ITM{}, p, prm); itmWindowsOnGrid(&ip) {
					continue
				}
				checked++
				a, errA := ITM{}.Loss(p, prm)
				b, errB := ITM{}.Loss(reversed(p), prm)
				if errA != nil || errB != nil {
					t.Fatal(errA, errB)
				}
				if !near(a.PathLossDB, b.PathLossDB, 1e-6) || a.ITM.Mode != b.ITM.Mode {
					t.Errorf("path %d, %g MHz, %g m: %.9f dB (%v) forward, %.9f dB (%v) reversed",
						i, f, h, a.PathLossDB, a.ITM.Mode, b.PathLossDB, b.ITM.Mode)
				}
			}
		}
	}
	if checked < 50 {
		t.Errorf("only %d of %d cases checked", checked, 8*len(paths))
	}
}

func TestITMMonotoneInReliability(t *testing.T) {
	// Loss not exceeded for a larger share of time (reliability) or of
	// situations (confidence) is never smaller (definition of the
	// quantiles), in every mode and climate.
	paths := append(readPFLs(t), readQKPFL(t))
	prm := Params{FreqMHz: 450, TxHeightM: 10, RxHeightM: 3}
	pcts := []float64{0.5, 1, 5, 10, 20, 35, 50, 65, 80, 90, 95, 99, 99.5}
	for i, p := range paths {
		for c := ITMEquatorial; c <= ITMMaritimeTemperateAtSea; c++ {
			for v := ITMMobile; v <= ITMBroadcast; v++ {
				for _, conf := range []float64{10, 50, 90} {
					prev := math.Inf(-1)
					for _, rel := range pcts {
						r, err := ITM{Climate: c, Variability: v, ReliabilityPct: rel, ConfidencePct: conf}.Loss(p, prm)
						if err != nil {
							t.Fatal(err)
						}
						if r.PathLossDB < prev-1e-9 {
							t.Errorf("path %d, %v, %v, confidence %g: %.3f dB at reliability %g %% < %.3f dB before",
								i, c, v, conf, r.PathLossDB, rel, prev)
						}
						prev = r.PathLossDB
					}
				}
				prev := math.Inf(-1)
				for _, conf := range pcts {
					r, err := ITM{Climate: c, Variability: v, ReliabilityPct: 50, ConfidencePct: conf}.Loss(p, prm)
					if err != nil {
						t.Fatal(err)
					}
					if r.PathLossDB < prev-1e-9 {
						t.Errorf("path %d, %v, %v: %.3f dB at confidence %g %% < %.3f dB before", i, c, v, r.PathLossDB, conf, prev)
					}
					prev = r.PathLossDB
				}
			}
		}
	}
}

func TestITMFreeSpaceOnShortClearPaths(t *testing.T) {
	// Over flat ground, closer than half the distance d_0 = 0.04 f h_1 h_2
	// (m; f in MHz) where the model's two-ray region begins (Hufford 1995,
	// lrprop), the path is well clear of the first Fresnel zone and the
	// median loss is free space (ITU-R P.525-4) within 0.05 dB.
	n := 0
	for _, dKM := range []float64{0.3, 0.5, 1, 2, 5} {
		for _, h := range []float64{10, 30, 100} {
			for _, f := range []float64{146, 450, 1300} {
				if dKM*1000 >= 0.5*0.04*f*h*h {
					continue
				}
				p := flatPath(201, dKM)
				for i := range p.HeightM {
					p.HeightM[i] = 250
				}
				r, err := ITM{}.Loss(p, Params{FreqMHz: f, TxHeightM: h, RxHeightM: h})
				if err != nil {
					t.Fatal(err)
				}
				n++
				if !near(r.PathLossDB, FreeSpaceLossDB(dKM, f), 0.05) || !r.LineOfSight || r.ITM.Mode != ITMLineOfSight {
					t.Errorf("%g km, %g m, %g MHz: %.3f dB, free space %.3f dB, %v", dKM, h, f, r.PathLossDB, FreeSpaceLossDB(dKM, f), r.ITM.Mode)
				}
			}
		}
	}
	if n < 20 {
		t.Fatalf("only %d cases checked", n)
	}
}

func TestITMZeroValueIsDefault(t *testing.T) {
	p := rollingPath(401, 40)
	prm := Params{FreqMHz: 146, TxHeightM: 10, RxHeightM: 2}
	a, errA := ITM{}.Loss(p, prm)
	b, errB := DefaultITM().Loss(p, prm)
	if errA != nil || errB != nil || a != b {
		t.Errorf("zero value %+v (%v), DefaultITM %+v (%v)", a, errA, b, errB)
	}
	var m Model = ITM{}
	if m.Name() != "itm" {
		t.Errorf("Name() = %q", m.Name())
	}
	// The result carries the geometry fields like the other models.
	tr, _ := Terrain{}.Loss(p, prm)
	if a.ObstacleIndex != tr.ObstacleIndex || a.LineOfSight != tr.LineOfSight || !near(a.WorstClearanceF1, tr.WorstClearanceF1, 0.05) {
		t.Errorf("clearance %v/%v/%v; terrain model %v/%v/%v", a.LineOfSight, a.WorstClearanceF1, a.ObstacleIndex, tr.LineOfSight, tr.WorstClearanceF1, tr.ObstacleIndex)
	}
	if !near(a.PathLossDB, a.FreeSpaceDB+a.ExcessDB, 1e-9) {
		t.Errorf("path loss %v ≠ free space %v + excess %v", a.PathLossDB, a.FreeSpaceDB, a.ExcessDB)
	}
}

func TestITMVariabilitySwitches(t *testing.T) {
	// With location variability eliminated σ_L = 0, so in broadcast mode
	// (its own location deviate) the location percentage no longer
	// matters; with it, 90 % of locations costs more than 50 % (Hufford
	// 1995, avar).
	p := rollingPath(401, 40)
	prm := Params{FreqMHz: 450, TxHeightM: 10, RxHeightM: 2}
	loss := func(m ITM) float64 {
		r, err := m.Loss(p, prm)
		if err != nil {
			t.Fatal(err)
		}
		return r.PathLossDB
	}
	if a, b := loss(ITM{Variability: ITMBroadcast, LocationEliminated: true, LocationPct: 90}), loss(ITM{Variability: ITMBroadcast, LocationEliminated: true}); a != b {
		t.Errorf("location eliminated: %g at 90 %%, %g at 50 %%", a, b)
	}
	if a, b := loss(ITM{Variability: ITMBroadcast, LocationPct: 90}), loss(ITM{Variability: ITMBroadcast}); !(a > b+1) {
		t.Errorf("location variability: %g at 90 %%, %g at 50 %%", a, b)
	}
	// Eliminating situation variability narrows the spread at 90 %
	// confidence but leaves a residual (the combination formula).
	full := loss(ITM{Variability: ITMAccidental, ConfidencePct: 90, ReliabilityPct: 50})
	elim := loss(ITM{Variability: ITMAccidental, SituationEliminated: true, LocationEliminated: true, ConfidencePct: 90, ReliabilityPct: 50})
	med := loss(ITM{Variability: ITMAccidental})
	if !(full > elim && elim > med) {
		t.Errorf("confidence 90 %%: %g full, %g eliminated, median %g", full, elim, med)
	}
	// Every climate gives a finite result.
	for c := ITMEquatorial; c <= ITMMaritimeTemperateAtSea; c++ {
		if l := loss(ITM{Climate: c, TimePct: 90}); !finite(l) {
			t.Errorf("%v: %g", c, l)
		}
	}
}

func TestITMLossDoesNotAllocate(t *testing.T) {
	p := rollingPath(3300, 33)
	prm := Params{FreqMHz: 146, TxHeightM: 10, RxHeightM: 2}
	var m Model = ITM{}
	if a := testing.AllocsPerRun(20, func() { _, _ = m.Loss(p, prm) }); a != 0 {
		t.Errorf("%v allocations per Loss, want 0", a)
	}
}

func BenchmarkITM3300(b *testing.B) {
	p := rollingPath(3300, 33)
	prm := Params{FreqMHz: 146, TxHeightM: 10, RxHeightM: 2}
	var m Model = DefaultITM()
	b.ReportAllocs()
	for b.Loop() {
		if _, err := m.Loss(p, prm); err != nil {
			b.Fatal(err)
		}
	}
}

// FuzzITM feeds the model profiles, frequencies, heights and settings from
// arbitrary inputs: it must never panic; input outside the model's ranges
// must be refused; a result without error must be finite throughout.
func FuzzITM(f *testing.F) {
	f.Add([]byte{10, 200, 30, 40, 250, 3, 7}, 146.0, 10.0, 2.0, 20.0, uint8(5), uint8(0), 301.0, 50.0, 50.0, 50.0, uint8(0))
	f.Add([]byte{0, 0}, 20.0, 0.5, 0.5, 0.01, uint8(0), uint8(3), 0.0, 0.0, 0.0, 0.0, uint8(1))
	f.Add([]byte{255, 0, 255, 0, 255}, 20000.0, 3000.0, 3000.0, 2500.0, uint8(7), uint8(2), 400.0, 99.99, 0.01, 1.0, uint8(2))
	f.Fuzz(func(t *testing.T, hs []byte, freqMHz, txM, rxM, lengthKM float64, climate, mode uint8, n0, tm, loc, sit float64, flags uint8) {
		if len(hs) < 2 || len(hs) > 5000 || !(lengthKM > 0 && lengthKM <= 5000) {
			return
		}
		p := Path{DistKM: make([]float64, len(hs)), HeightM: make([]float64, len(hs))}
		for i, h := range hs {
			p.DistKM[i] = lengthKM * float64(i) / float64(len(hs)-1)
			p.HeightM[i] = 20*float64(h) - 200 // −200 to 4900 m
		}
		m := ITM{Climate: ITMClimate(climate), Variability: ITMVariability(mode), N0: n0,
			LocationEliminated: flags&1 != 0, SituationEliminated: flags&2 != 0,
			Polarization: Polarization(flags >> 2 & 1)}
		if flags&8 != 0 {
			m.ReliabilityPct, m.ConfidencePct = tm, sit
		} else {
			m.TimePct, m.LocationPct, m.SituationPct = tm, loc, sit
		}
		r, err := m.Loss(p, Params{FreqMHz: freqMHz, TxHeightM: txM, RxHeightM: rxM})
		pct := func(v float64) bool { return v == 0 || (v > 0 && v < 100) }
		valid := freqMHz >= 20 && freqMHz <= 20000 && txM >= 0.5 && txM <= 3000 && rxM >= 0.5 && rxM <= 3000 &&
			climate <= 7 && mode <= 3 && (n0 == 0 || (n0 >= 250 && n0 <= 400)) && pct(tm) && pct(sit) &&
			(flags&8 != 0 || pct(loc))
		if !valid && err == nil {
			t.Fatalf("invalid input accepted: %+v, %g MHz, %g/%g m", m, freqMHz, txM, rxM)
		}
		if err != nil {
			return
		}
		vals := []float64{r.FreeSpaceDB, r.ExcessDB, r.PathLossDB, r.ITM.DistanceKM, r.ITM.SurfaceRefractivityN,
			r.ITM.EarthRadiusKM, r.ITM.DeltaHM, r.ITM.EffHeightTxM, r.ITM.EffHeightRxM, r.ITM.HorizonTxKM,
			r.ITM.HorizonRxKM, r.ITM.HorizonAngleTxMrad, r.ITM.HorizonAngleRxMrad, r.ITM.ReferenceDB, r.ITM.ClimateMedianDB}
		for i, v := range vals {
			if !finite(v) {
				t.Fatalf("value %d is %v in %+v", i, v, r.ITM)
			}
		}
		if r.ITM.ReferenceDB < 0 || r.ITM.Mode < ITMLineOfSight || r.ITM.Mode > ITMTroposcatter || math.IsNaN(r.WorstClearanceF1) {
			t.Fatalf("bad result %+v", r)
		}
		_ = fmt.Sprint(r.ITM.Warnings)
	})
}
