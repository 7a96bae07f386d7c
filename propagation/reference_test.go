package propagation

import (
	"math"
	"math/rand/v2"
	"testing"
)

// refDeltaBullington is a plain restatement of ITU-R P.526-16 §4.5
// (eqs. 49–66, step by step), with a loop per maximum
// and a square root per point, kept deliberately naive so that the
// optimised DeltaBullington (single pass, no per-point square root, binary
// search over the smooth profile) can be checked against it.
func refDeltaBullington(dist, h, clutter []float64, hts, hrs, ae, lambda float64, rp params) (lba, lbs, lsph, l float64) {
	n := len(dist)
	d := dist[n-1]
	ce := 1 / ae
	bull := func(hh []float64, hts, hrs float64) float64 {
		stim := math.Inf(-1)
		for i := 1; i < n-1; i++ {
			stim = math.Max(stim, (hh[i]+500*ce*dist[i]*(d-dist[i])-hts)/dist[i]) // eq. 49
		}
		str := (hrs - hts) / d // eq. 50
		var luc float64
		if stim < str {
			numax := math.Inf(-1)
			for i := 1; i < n-1; i++ { // eq. 51
				numax = math.Max(numax, (hh[i]+500*ce*dist[i]*(d-dist[i])-(hts*(d-dist[i])+hrs*dist[i])/d)*
					math.Sqrt(0.002*d/(lambda*dist[i]*(d-dist[i]))))
			}
			luc = KnifeEdgeLossDB(numax) // eq. 52
		} else {
			srim := math.Inf(-1)
			for i := 1; i < n-1; i++ {
				srim = math.Max(srim, (hh[i]+500*ce*dist[i]*(d-dist[i])-hrs)/(d-dist[i])) // eq. 53
			}
			db := (hrs - hts + srim*d) / (stim + srim)                                             // eq. 54
			nub := (hts + stim*db - (hts*(d-db)+hrs*db)/d) * math.Sqrt(0.002*d/(lambda*db*(d-db))) // eq. 55
			luc = KnifeEdgeLossDB(nub)                                                             // eq. 56
		}
		return luc + (1-math.Exp(-luc/6))*(10+0.02*d) // eq. 57
	}
	g := make([]float64, n)
	for i := range g {
		g[i] = h[i]
		if i > 0 && i < n-1 {
			g[i] += clutter[i]
		}
	}
	lba = bull(g, hts, hrs)
	var v1, v2 float64
	for i := 1; i < n; i++ { // eqs. 58, 59
		v1 += (dist[i] - dist[i-1]) * (h[i] + h[i-1])
		v2 += (dist[i] - dist[i-1]) * (h[i]*(2*dist[i]+dist[i-1]) + h[i-1]*(dist[i]+2*dist[i-1]))
	}
	hstip := (2*v1*d - v2) / (d * d) // eq. 60a
	hsrip := (v2 - v1*d) / (d * d)   // eq. 60b
	hobs, aobt, aobr := math.Inf(-1), math.Inf(-1), math.Inf(-1)
	for i := 1; i < n-1; i++ { // eq. 61
		hobi := h[i] - (hts*(d-dist[i])+hrs*dist[i])/d
		hobs = math.Max(hobs, hobi)
		aobt = math.Max(aobt, hobi/dist[i])
		aobr = math.Max(aobr, hobi/(d-dist[i]))
	}
	hstp, hsrp := hstip, hsrip
	if hobs > 0 { // eq. 62
		hstp = hstip - hobs*aobt/(aobt+aobr)
		hsrp = hsrip - hobs*aobr/(aobt+aobr)
	}
	hst := math.Min(hstp, h[0])   // eq. 63
	hsr := math.Min(hsrp, h[n-1]) // eq. 63
	zero := make([]float64, n)
	lbs = bull(zero, hts-hst, hrs-hsr)                 // eq. 64
	lsph = smoothEarthLoss(d, hts-hst, hrs-hsr, rp)    // eq. 65
	return lba, lbs, lsph, lba + math.Max(lsph-lbs, 0) // eq. 66
}

func TestDeltaBullingtonMatchesPlainRestatement(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 2)) // seeded: reproducible
	var los, beyond, lbsZero, lbsPos, sphPos int
	for k := 0; k < 300; k++ {
		n := 3 + rng.IntN(400)
		lengthKM := 0.5 + rng.Float64()*120
		p := Path{DistKM: make([]float64, n), HeightM: make([]float64, n), ClutterM: make([]float64, n)}
		base := rng.Float64() * 800
		amp := rng.Float64() * 300
		gentle := k%2 == 0 // half the cases: gentle terrain, high masts, shorter paths
		if gentle {
			amp = rng.Float64() * 20
			lengthKM = 0.5 + rng.Float64()*30
		}
		wl := 0.5 + rng.Float64()*20
		x := 0.0
		for i := range p.DistKM {
			if i > 0 {
				x += 0.2 + rng.Float64() // uneven spacing
			}
			p.DistKM[i] = x
		}
		for i := range p.DistKM {
			p.DistKM[i] *= lengthKM / x
			p.HeightM[i] = base + amp*math.Sin(2*math.Pi*p.DistKM[i]/wl+float64(k)) + amp/10*rng.Float64()
			if rng.IntN(3) == 0 {
				p.ClutterM[i] = 20 * rng.Float64()
			}
		}
		prm := Params{
			FreqMHz:       30 + rng.Float64()*3000,
			TxHeightM:     rng.Float64() * 100,
			RxHeightM:     rng.Float64() * 30,
			EarthRadiusKM: 6371 * (1 + rng.Float64()),
			Polarization:  Polarization(rng.IntN(2)),
		}
		if gentle {
			prm.TxHeightM *= 3
			prm.RxHeightM *= 3
		}
		if rng.IntN(2) == 0 {
			prm.Ground = Sea
		}
		rp, err := prm.resolve()
		if err != nil {
			t.Fatal(err)
		}
		got, err := DeltaBullington(p, prm)
		if err != nil {
			t.Fatal(err)
		}
		lba, lbs, lsph, l := refDeltaBullington(p.DistKM, p.HeightM, p.ClutterM,
			p.HeightM[0]+prm.TxHeightM, p.HeightM[n-1]+prm.RxHeightM, rp.aeKM, rp.wavelengthM, rp)
		const tol = 1e-7
		if math.Abs(got.LbaDB-lba) > tol || math.Abs(got.LbsDB-lbs) > tol ||
			math.Abs(got.LsphDB-lsph) > tol || math.Abs(got.LossDB-l) > tol {
			t.Fatalf("case %d (n %d, %.1f km, %+v): got L_ba %.9f L_bs %.9f L_sph %.9f L %.9f; plain %.9f %.9f %.9f %.9f",
				k, n, lengthKM, prm, got.LbaDB, got.LbsDB, got.LsphDB, got.LossDB, lba, lbs, lsph, l)
		}
		// Clearance by definition: (ray − terrain − clutter − bulge)/R1.
		c, err := PathClearance(p, prm)
		if err != nil {
			t.Fatal(err)
		}
		worst, at := math.Inf(1), -1
		hts, hrs := p.HeightM[0]+prm.TxHeightM, p.HeightM[n-1]+prm.RxHeightM
		d := p.DistKM[n-1]
		for i := 1; i < n-1; i++ {
			di := p.DistKM[i]
			ray := hts + (hrs-hts)*di/d
			obst := p.HeightM[i] + p.ClutterM[i] + EarthBulgeM(di, d-di, rp.aeKM)
			if f := (ray - obst) / FresnelRadiusWavelengthM(di, d-di, rp.wavelengthM); f < worst {
				worst, at = f, i
			}
		}
		if math.Abs(c.WorstF1-worst) > 1e-9*math.Max(1, math.Abs(worst)) || c.Index != at || c.LineOfSight != got.LineOfSight {
			t.Fatalf("case %d: clearance %+v, by definition %.12g at %d (LOS %v)", k, c, worst, at, got.LineOfSight)
		}
		if got.LineOfSight {
			los++
		} else {
			beyond++
		}
		if got.LbsDB == 0 {
			lbsZero++
		} else {
			lbsPos++
		}
		if got.LsphDB > 0 {
			sphPos++
		}
	}
	t.Logf("cases: %d line of sight, %d obstructed; L_bs zero %d, positive %d; L_sph positive %d", los, beyond, lbsZero, lbsPos, sphPos)
	if los < 10 || beyond < 10 || lbsZero < 10 || lbsPos < 10 || sphPos < 10 {
		t.Error("the random cases do not exercise every branch; widen the generator")
	}
}
