package plan

import (
	"context"
	"math"
	"math/bits"
	"sync/atomic"

	"github.com/mastlink/mastlink/propagation"
	"github.com/mastlink/mastlink/terrain"
)

// losMaxLevels bounds the radial levels of a line-of-sight map: the
// coarsest level has 1/64 of the radials and serves the cells within
// 1/64 of the radius.
const losMaxLevels = 6

// coverageLOS fills res.Values with line of sight (1 visible, 0 hidden,
// CoverageNoData outside the radius) in two passes, neither of which
// needs a list of cells per radial:
//
//  1. Radials. Radial k is sampled every step along its geodesic and the
//     running maximum of the slope (ITU-R P.526-16 eq. 49, tangent-plane
//     frame; propagation.HorizonLOS) after each sample is stored, a float32
//     per radial and sample, in 16 × 16 blocks (so that both passes read
//     and write whole cache lines). Radials come in levels, as the cells
//     they must reach: radial k with t trailing zero bits (t < levels) is
//     needed only beyond R/2^(t+1), where the radials of the coarser levels
//     stand more than a cell apart; it starts there, from the running
//     maximum of the coarser radial k − 2^t beside it (at most half a cell
//     away, as the cells are from their own radial), and samples only the
//     rest. About a third of the samples of one full-length radial per
//     azimuth step.
//  2. Cells, row by row: the cell's distance and azimuth (mid-latitude
//     plane, as for loss; the azimuth from a polynomial arctangent within
//     2e−8 rad, a thousandth of the radial spacing), the level of its
//     distance, the nearest radial of that level, the number m of samples
//     more than half a step short of the cell, and eq. 50 against the
//     stored maximum after m samples with the cell's own ground and
//     distance.
//
// Progress counts radials, then rows: total radials + rows.
func (g *coverageGrid) coverageLOS(ctx context.Context, ts *terrain.Set, prm propagation.Params, h0 float64, res *CoverageResult, progress func(done, total int)) error {
	hl, err := propagation.NewHorizonLOS(prm, h0)
	if err != nil {
		return err
	}
	nRad, n := g.radials, g.samples
	kb, mb := (nRad+15)/16, (n+15)/16
	table := make([]float32, kb*mb*256)
	at := func(k, m int) int { return ((m>>4)*kb+(k>>4))<<8 | (m&15)<<4 | (k & 15) }
	var noData atomic.Bool
	total := nRad + g.rows

	// Each radial's own step: the DEM spacing in its direction (a row or a
	// column crossed per sample, whichever comes first), never shorter
	// than g.stepM, so the table's n samples cover every radial.
	stepOf, invStepOf := make([]float64, nRad), make([]float64, nRad)
	for k := range nRad {
		stepOf[k] = g.radialStep(2 * math.Pi * float64(k) / float64(nRad))
		invStepOf[k] = 1 / stepOf[k]
	}
	// samplesOf returns radial k's samples (the site included) and the first
	// one a radial of level t computes.
	samplesOf := func(k, t int) (nk, start int) {
		return min(int(g.radiusM*invStepOf[k])+3, n), g.start(t, invStepOf[k])
	}
	// eq. 49's slope (h − bulge·d_m² − h_ts)/d_m with d_m = m·s as
	// (h − h_ts − bulge·s²·m²)·(1/s)·(1/m): m² and 1/m shared by every
	// radial, a multiply instead of a division per sample.
	sq, inv := make([]float64, n), make([]float64, n)
	for m := 1; m < n; m++ {
		sq[m], inv[m] = float64(m)*float64(m), 1/float64(m)
	}

	// Pass 1, in units of 2^levels neighbouring radials (each unit's own
	// coarsest radial first, then its finer ones, every parent before its
	// children), so that the table's lines stay in cache while all 16
	// radials of a block write them.
	unit := 1 << g.levels
	order := make([]int, 0, unit) // offsets within a unit, coarsest level first
	for t := g.levels; t >= 0; t-- {
		for o := range unit {
			if (o == 0 && t == g.levels) || (o != 0 && bits.TrailingZeros(uint(o)) == t) {
				order = append(order, o)
			}
		}
	}
	err = coverageParallel(ctx, nRad/unit, func(done, _ int) {
		if progress != nil {
			progress(done*unit, total)
		}
	}, func(ws *coverageWorker, u int) error {
		if ws.sp == nil {
			ws.sp = ts.NewSampler()
		}
		if cap(ws.lats) < n {
			ws.lats, ws.lons, ws.hgts = make([]float64, n), make([]float64, n), make([]float64, n)
		}
		for _, o := range order {
			k := u*unit + o
			t := g.levels
			if o != 0 {
				t = bits.TrailingZeros(uint(o))
			}
			nk, start := samplesOf(k, t)
			lats, lons, hgts := ws.lats[:nk-start], ws.lons[:nk-start], ws.hgts[:nk-start]
			ws.sp.NoData = 0
			azi := 360 * float64(k) / float64(nRad)
			step := stepOf[k]
			if err := ws.sp.RadialFrom(g.siteLat, g.siteLon, azi, float64(start)*step, step, lats, lons, hgts); err != nil {
				return err
			}
			if ws.sp.NoData > 0 {
				noData.Store(true)
			}
			table[at(k, 0)] = float32(math.Inf(-1)) // no intermediate point yet
			best := math.Inf(-1)
			if t < g.levels {
				// The parent's running maximum over its samples short of
				// this radial's first one.
				p := k - 1<<t
				if jp := int(float64(start-1) * step * invStepOf[p]); jp > 0 {
					best = float64(table[at(p, jp)])
				}
			}
			base := at(k, 0)
			bs2 := hl.Bulge * step * step * 1e-6 // bulge·s², s in km
			invS := 1000 / step
			hts := hl.HtsM
			sqs, invs := sq[start:start+len(hgts)], inv[start:start+len(hgts)]
			for i, h := range hgts {
				m := start + i
				if v := (h - hts - bs2*sqs[i]) * invS * invs[i]; v > best { // hl.Slope
					best = v
				}
				table[base+(m>>4)*kb<<8|(m&15)<<4] = float32(best)
			}
		}
		return nil
	})
	if err != nil {
		return err
	}
	prog := func(done, _ int) {
		if progress != nil {
			progress(nRad+done, total)
		}
	}

	// Pass 2: the cells, row by row.
	var cells, covered atomic.Int64
	r2 := g.radiusM * g.radiusM
	err = coverageParallel(ctx, g.rows, prog, func(ws *coverageWorker, r int) error {
		if ws.sp == nil {
			ws.sp = ts.NewSampler()
		}
		ws.sp.NoData = 0
		row := res.Values[r*g.cols : (r+1)*g.cols]
		north := (g.rowLat[r] - g.siteLat) * g.rowN[r]
		eScale := g.rowE[r]
		var nc, nv int64
		cLo, cHi := g.span(north, eScale, r2) // the columns within the radius
		// The cells' own ground first, row-wise into the row itself (each
		// cell's height is read back just before its answer replaces it).
		if err := ws.sp.Row(g.rowLat[r], g.lon0, g.dLon, row, cLo, cHi); err != nil {
			return err
		}
		for c := range row[:cLo] {
			row[c] = CoverageNoData
		}
		for c := cHi; c < len(row); c++ {
			row[c] = CoverageNoData
		}
		for c := cLo; c < cHi; c++ {
			lon := g.lon0 + float64(c)*g.dLon
			dLon := lon - g.siteLon
			if dLon > 180 {
				dLon -= 360
			} else if dLon < -180 {
				dLon += 360
			}
			e := dLon * eScale
			d2 := e*e + north*north
			if d2 > r2 {
				row[c] = CoverageNoData
				continue
			}
			nc++
			d := math.Sqrt(d2)
			k := g.radialAt(e, north, d)
			m := min(max(int(math.Ceil(d*invStepOf[k]-0.5))-1, 0), int(g.radiusM*invStepOf[k])+1)
			hc := float64(row[c])
			dKM := math.Max(d, 1) / 1000 // a cell at the site counts as 1 m away
			if hl.Visible(float64(table[at(k, m)]), dKM, hc) {
				row[c] = 1
				nv++
			} else {
				row[c] = 0
			}
		}
		cells.Add(nc)
		covered.Add(nv)
		if ws.sp.NoData > 0 {
			noData.Store(true)
		}
		return nil
	})
	if err != nil {
		return err
	}
	res.Cells, res.Covered = int(cells.Load()), int(covered.Load())
	res.SmoothEarth = noData.Load()
	return nil
}

// azimuthRad returns atan2(e, n) in radians (clockwise from north,
// −π..π) for (e, n) ≠ (0, 0), within 2e−8 rad: octant reduction, then
// atan t = π/4 + atan((t − 1)/(t + 1)) above tan(π/8), and the Taylor
// series of atan to t¹⁵ on |t| ≤ tan(π/8) (next term below 0.4143¹⁷/17 =
// 1.8e−8; common practice).
func azimuthRad(e, n float64) float64 {
	ae, an := math.Abs(e), math.Abs(n)
	swap := ae > an
	t := ae / an
	if swap {
		t = an / ae
	}
	off := 0.0
	if t > 0.41421356237309503 {
		t = (t - 1) / (t + 1)
		off = math.Pi / 4
	}
	t2 := t * t
	a := off + t*(1+t2*(-1.0/3+t2*(1.0/5+t2*(-1.0/7+t2*(1.0/9+t2*(-1.0/11+t2*(1.0/13+t2*(-1.0/15))))))))
	if swap {
		a = math.Pi/2 - a
	}
	if n < 0 {
		a = math.Pi - a
	}
	if e < 0 {
		a = -a
	}
	return a
}
