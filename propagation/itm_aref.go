package propagation

import (
	"math"
	"math/cmplx"
)

// Reference attenuation of the Longley–Rice ITM: G. A. Hufford, "The ITS
// Irregular Terrain Model, version 1.2.2: the Algorithm" (NTIA/ITS, 1995),
// subroutines lrprop, adiff, alos, ascat, h0f, ahd and fht; the methods
// are those of A. G. Longley and P. L. Rice, ESSA Tech. Rep. ERL 79-ITS 67
// (1968).

// itmDeltaH returns Δh(s) = Δh (1 − 0.8 exp(−s/50 km)), the terrain
// irregularity seen over distance s (m) (Hufford 1995, as used in
// subroutines adiff and alos).
func itmDeltaH(dh, s float64) float64 { return dh * (1 - 0.8*math.Exp(-s/50e3)) }

// itmSigmaH returns σ_h(δ) = 0.78 δ exp(−0.5 δ^¼), the rms deviation of the
// terrain within the first Fresnel zone for irregularity δ (m) (Hufford
// 1995).
func itmSigmaH(delta float64) float64 {
	return 0.78 * delta * math.Exp(-0.5*math.Sqrt(math.Sqrt(delta)))
}

// itmKnifeEdge returns the knife-edge attenuation (dB) for v = ν²/2, the
// approximation of Hufford 1995, function aknfe: 6.02 + 9.11 √v − 1.27 v
// below 5.76, else 12.953 + 10 log v.
func itmKnifeEdge(v float64) float64 {
	if v < 5.76 {
		return 6.02 + 9.11*math.Sqrt(v) - 1.27*v
	}
	return 12.953 + 10*math.Log10(v)
}

// itmHeightGain returns the height-gain function F(x, K) (dB) of the
// three-radii smooth-earth method (Hufford 1995, function fht). The logarithms
// are natural.
func itmHeightGain(x, pk float64) float64 {
	if x < 200 {
		w := -math.Log(pk)
		if pk < 1e-5 || x*w*w*w > 5495 {
			f := -117.0
			if x > 1 {
				f += 17.372 * math.Log(x)
			}
			return f
		}
		return 2.5e-5*x*x/pk - 8.686*w - 15
	}
	f := 0.05751*x - 4.343*math.Log(x)
	if x < 2000 {
		w := 0.0134 * x * math.Exp(-0.005*x)
		f = (1-w)*f + w*(17.372*math.Log(x)-117)
	}
	return f
}

// itmFTheta returns F(θd) (dB), the attenuation function of forward
// scatter for the product x = θ d in m (Hufford 1995, function ahd).
func itmFTheta(x float64) float64 {
	switch {
	case x <= 10e3:
		return 133.4 + 0.332e-3*x - 10*math.Log10(x)
	case x <= 70e3:
		return 104.6 + 0.212e-3*x - 2.5*math.Log10(x)
	}
	return 71.8 + 0.157e-3*x + 5*math.Log10(x)
}

// itmH01 returns the frequency-gain curve H_m(r) (dB) for integer m = 1–5
// (Hufford 1995, function h0f).
func itmH01(r float64, m int) float64 {
	a := [5]float64{25, 80, 177, 395, 705}
	b := [5]float64{24, 45, 68, 80, 105}
	return 10 * math.Log10(1+a[m-1]/(r*r*r*r)+b[m-1]/(r*r))
}

// itmH0 returns H(r, η) (dB), interpolating the H_m curves in η clamped to
// [1, 5] (Hufford 1995, function h0f).
func itmH0(r, eta float64) float64 {
	eta = minR(maxR(eta, 1), 5)
	nu := int(eta)
	phi := eta - float64(nu)
	q := itmH01(r, nu)
	if phi != 0 {
		q = (1-phi)*q + phi*itmH01(r, nu+1)
	}
	return q
}

// itmRef is the reference attenuation of a path and the lines it is built
// from, for tests and diagnostics.
type itmRef struct {
	aref     float64 // A_ref, dB, ≥ 0
	mode     ITMPropagationMode
	md, ad0  float64 // diffraction line: slope dB/m, intercept dB
	ms, as0  float64 // scatter line (beyond line of sight)
	dx       float64 // distance where the scatter line takes over, m
	k1, k2   float64 // line-of-sight fit A_o + k1 s + k2 ln s
	ao       float64
	computed bool
}

// itmDiffraction holds the distance-independent terms of the diffraction
// attenuation A_d(s) (Hufford 1995, subroutine adiff, first call).
type itmDiffraction struct {
	ip       *itmPath
	afo      float64 // clutter term A_fo, dB
	qk       float64 // 1/|Z_g|
	wa       float64 // f^(1/3)
	xht, aht float64 // x_1 + x_2 and F(x_1, K_1) + F(x_2, K_2) + 20
	q0       float64 // √(1 + (h_e1 h_e2 − h_1 h_2)/(h_1 h_2 + 10))
}

// newItmDiffraction computes the distance-independent diffraction terms.
func newItmDiffraction(ip *itmPath) itmDiffraction {
	dg := itmDiffraction{ip: ip}
	h := ip.h
	dg.q0 = math.Sqrt(1 + (ip.he[0]*ip.he[1]-h[0]*h[1])/(h[0]*h[1]+10))
	dg.afo = minR(15, 5*math.Log10(1+1e-5*h[0]*h[1]*ip.f*itmSigmaH(itmDeltaH(ip.dh, ip.dlsa))))
	dg.qk = 1 / cmplx.Abs(ip.zg)
	dg.wa = math.Cbrt(ip.f)
	dg.aht = 20
	for j := range 2 {
		a := 0.5 * ip.dl[j] * ip.dl[j] / ip.he[j]
		wd := math.Cbrt(4.0 / 3.0 * 6370e3 / a) // C_j
		pk := 0.017778 * wd * dg.qk / dg.wa     // K_j
		x := (1.607 - pk) * wd * wd * dg.wa * ip.dl[j] / 1000
		dg.xht += x
		dg.aht += itmHeightGain(x, pk)
	}
	return dg
}

// at returns A_d(s) (dB), the diffraction attenuation at distance s (m):
// a blend of double knife-edge and three-radii smooth-earth diffraction
// weighted by the terrain roughness, plus the clutter term (Hufford 1995,
// subroutine adiff).
func (dg *itmDiffraction) at(s float64) float64 {
	ip := dg.ip
	th := ip.tha + s/ip.ae // θ_nlos(s) = s/a_e − θ_los
	ds := s - ip.dla
	// Double knife edge.
	q := 0.0795775 * ip.k * th * th * ds
	ak := itmKnifeEdge(q*ip.dl[0]/(ds+ip.dl[0])) + itmKnifeEdge(q*ip.dl[1]/(ds+ip.dl[1]))
	// Three-radii smooth earth.
	a := ds / th
	wd := math.Cbrt(4.0 / 3.0 * 6370e3 / a)
	pk := 0.017778 * wd * dg.qk / dg.wa
	x := (1.607-pk)*wd*wd*dg.wa*ds/1000 + dg.xht
	ar := 0.05751*x - 10*math.Log10(x) - dg.aht
	// Roughness weight.
	qw := (dg.q0 + (ip.dla+ip.ae*ip.tha)/s) * minR(ip.k*itmDeltaH(ip.dh, s), 6283.2)
	w := 25.1 / (25.1 + math.Sqrt(qw))
	return w*ar + (1-w)*ak + dg.afo
}

// lineOfSight returns A_los(s) (dB) at distance s (m) inside the horizon:
// the two-ray loss over ground of roughness σ_h blended with the extended
// diffraction line (Hufford 1995, subroutine alos).
func (ip *itmPath) lineOfSight(s, md, ad0 float64) float64 {
	hs := ip.he[0] + ip.he[1]
	sps := hs / math.Sqrt(s*s+hs*hs) // sin ψ
	spsc := complex(sps, 0)
	re := (spsc - ip.zg) / (spsc + ip.zg)
	re *= complex(math.Exp(-minR(10, ip.k*itmSigmaH(itmDeltaH(ip.dh, s))*sps)), 0)
	if q := real(re)*real(re) + imag(re)*imag(re); q < 0.25 || q < sps {
		re *= complex(math.Sqrt(sps/q), 0)
	}
	delta := 2 * ip.k * ip.he[0] * ip.he[1] / s
	if delta > math.Pi/2 {
		delta = math.Pi - (math.Pi/2)*(math.Pi/2)/delta
	}
	sum := complex(math.Cos(delta), -math.Sin(delta)) + re
	at := -10 * math.Log10(real(sum)*real(sum)+imag(sum)*imag(sum))
	w := 1 / (1 + ip.f*ip.dh/maxR(10e3, ip.dlsa))
	return w*at + (1-w)*(md*s+ad0)
}

// itmScatter evaluates the forward-scatter attenuation with the memory of
// the frequency-gain term H_0 the model keeps between the two distances it
// is called at (Hufford 1995, subroutine ascat).
type itmScatter struct {
	ip    *itmPath
	hPrev float64 // remembered H_0, < 0 for none
}

// at returns A_scat(s) (dB) at distance s (m), or 1001 when the scatter
// angle is too small for the method (both r_j < 0.2) (Hufford 1995,
// subroutine ascat).
func (sc *itmScatter) at(s float64) float64 {
	ip := sc.ip
	var h0 float64
	if sc.hPrev > 15 {
		h0 = sc.hPrev
	} else {
		th := ip.the[0] + ip.the[1] + s/ip.ae
		r1 := 2 * ip.k * th * ip.he[0]
		r2 := 2 * ip.k * th * ip.he[1]
		if r1 < 0.2 && r2 < 0.2 {
			return 1001
		}
		ad := ip.dl[0] - ip.dl[1]
		rr := ip.he[1] / ip.he[0]
		if ad < 0 {
			ad = -ad
			rr = 1 / rr
		}
		ss := (s - ad) / (s + ad)
		q := minR(maxR(0.1, rr/ss), 10)
		ss = maxR(0.1, ss)
		hh := (s - ad) * (s + ad) * th * 0.25 / s
		ns := ip.ns
		z6 := minR(1.7, hh/8000)
		z6 *= z6 * z6
		z6 *= z6
		etas := hh / 1755.6 * (1 + (0.031-ns*2.32e-3+ns*ns*5.67e-6)*math.Exp(-z6))
		h00 := 0.5 * (itmH0(r1, etas) + itmH0(r2, etas))
		dh0 := minR(h00, 6*(0.6-math.Log10(maxR(etas, 1)))*math.Log10(ss)*math.Log10(q))
		h0 = maxR(h00+dh0, 0)
		if etas < 1 {
			const sq2 = math.Sqrt2
			h0 = etas*h0 + (1-etas)*10*math.Log10((1+sq2/r1)*(1+sq2/r1)*(1+sq2/r2)*(1+sq2/r2)*(r1+r2)/(r1+r2+2*sq2))
		}
		if h0 > 15 && sc.hPrev >= 0 {
			h0 = sc.hPrev
		}
	}
	sc.hPrev = h0
	th := ip.tha + s/ip.ae // θ′ = s/a_e − θ_los
	return itmFTheta(th*s) + 10*math.Log10(ip.f*th*th*th*th) - 0.1*(ip.ns-301)*math.Exp(-th*s/40e3) + h0
}

// reference returns the reference attenuation at the path length and the
// lines it comes from: the diffraction line through A_d at two distances
// beyond the horizon; inside the smooth-earth horizon a fitted
// line-of-sight curve A_o + k_1 s + k_2 ln s that joins it at d_sML;
// beyond, diffraction or, past the distance d_x where it becomes the
// smaller, the forward-scatter line (Hufford 1995, subroutine lrprop). A_ref is never below 0.
func (ip *itmPath) reference() itmRef {
	var r itmRef
	dg := newItmDiffraction(ip)
	d3 := maxR(ip.dlsa, ip.dla+5*ip.xae)
	d4 := d3 + 10*ip.xae
	a3, a4 := dg.at(d3), dg.at(d4)
	r.md = (a4 - a3) / (d4 - d3)
	r.ad0 = a3 - r.md*d3
	d := ip.d
	if d < ip.dlsa {
		r.mode = ITMLineOfSight
		ip.lineOfSightFit(&r)
		r.aref = r.ao + r.k1*d + r.k2*math.Log(d)
	} else {
		sc := itmScatter{ip: ip, hPrev: -1}
		d5 := ip.dla + 200e3
		d6 := ip.dla + 400e3
		a6 := sc.at(d6)
		a5 := sc.at(d5)
		if a5 < 1000 {
			r.ms = (a6 - a5) / 200e3
			r.dx = maxR(maxR(ip.dlsa, ip.dla+ip.xae*math.Log(ip.f)*1.088), (a5-r.ad0-r.ms*d5)/(r.md-r.ms))
			r.as0 = (r.md-r.ms)*r.dx + r.ad0
		} else {
			r.ms, r.as0, r.dx = r.md, r.ad0, 10e6
		}
		if d > r.dx {
			r.mode = ITMTroposcatter
			r.aref = r.ms*d + r.as0
		} else {
			r.mode = ITMDiffraction
			r.aref = r.md*d + r.ad0
		}
	}
	r.aref = maxR(r.aref, 0)
	r.computed = true
	return r
}

// lineOfSightFit fits A_o + k_1 s + k_2 ln s through A_los at two distances
// d_0, d_1 inside the horizon and the diffraction line at d_sML, with the
// model's fall-backs when the fit would be non-physical (Hufford 1995,
// subroutine lrprop).
func (ip *itmPath) lineOfSightFit(r *itmRef) {
	md, ad0 := r.md, r.ad0
	dlsa := ip.dlsa
	aml := md*dlsa + ad0
	d0 := 0.04 * ip.f * ip.he[0] * ip.he[1]
	var d1 float64
	if ad0 >= 0 {
		d0 = minR(d0, 0.5*ip.dla)
		d1 = d0 + 0.25*(ip.dla-d0)
	} else {
		d1 = maxR(-ad0/md, 0.25*ip.dla)
	}
	a1 := ip.lineOfSight(d1, md, ad0)
	fitted := false
	var k1, k2 float64
	if d0 < d1 {
		a0 := ip.lineOfSight(d0, md, ad0)
		q := math.Log(dlsa / d0)
		k2 = maxR(0, ((dlsa-d0)*(a1-a0)-(d1-d0)*(aml-a0))/((dlsa-d0)*math.Log(d1/d0)-(d1-d0)*q))
		fitted = ad0 > 0 || k2 > 0
		if fitted {
			k1 = (aml - a0 - k2*q) / (dlsa - d0)
			if k1 < 0 {
				k1 = 0
				k2 = dim(aml, a0) / q
				if k2 == 0 {
					k1 = md
				}
			}
		}
	}
	if !fitted {
		k1 = dim(aml, a1) / (dlsa - d1)
		k2 = 0
		if k1 == 0 {
			k1 = md
		}
	}
	r.k1, r.k2 = k1, k2
	r.ao = aml - k1*dlsa - k2*math.Log(dlsa)
}
