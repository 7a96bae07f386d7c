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
	stepKM := g.stepM / 1000
	var noData atomic.Bool
	total := nRad + g.rows
	doneBefore := 0
	prog := func(done, _ int) {
		if progress != nil {
			progress(doneBefore+done, total)
		}
	}

	// Per-sample constants shared by every radial (they share the step):
	// eq. 49's slope (h − bulge·d² − h_ts)/d as (h − c_m)·(1/d_m), one
	// multiply instead of a division per sample.
	sampC, sampInv := make([]float64, n), make([]float64, n)
	for m := 1; m < n; m++ {
		dm := float64(m) * stepKM
		sampC[m] = hl.Bulge*dm*dm + hl.HtsM
		sampInv[m] = 1 / dm
	}

	// Pass 1, level by level from the coarsest.
	for t := g.levels; t >= 0; t-- {
		// start: the first sample a radial of this level computes.
		start := 1
		if t < g.levels {
			start = max(int(g.radiusM/float64(int(1)<<(t+1))/g.stepM)-2, 1)
		}
		stride := 1 << t
		var ks []int // radials of this level, grouped by block of 16
		for k := 0; k < nRad; k += stride {
			if t == g.levels || bits.TrailingZeros(uint(k)) == t {
				ks = append(ks, k)
			}
		}
		per := max(1, 16/stride) // radials of the level in one block
		jobs := (len(ks) + per - 1) / per
		err := coverageParallel(ctx, jobs, prog, func(ws *coverageWorker, j int) error {
			if ws.sp == nil {
				ws.sp = ts.NewSampler()
			}
			cnt := n - start
			if cap(ws.lats) < cnt {
				ws.lats, ws.lons, ws.hgts = make([]float64, cnt), make([]float64, cnt), make([]float64, cnt)
			}
			lats, lons, hgts := ws.lats[:cnt], ws.lons[:cnt], ws.hgts[:cnt]
			for _, k := range ks[j*per : min((j+1)*per, len(ks))] {
				ws.sp.NoData = 0
				azi := 360 * float64(k) / float64(nRad)
				if err := ws.sp.RadialFrom(g.siteLat, g.siteLon, azi, float64(start)*g.stepM, g.stepM, lats, lons, hgts); err != nil {
					return err
				}
				if ws.sp.NoData > 0 {
					noData.Store(true)
				}
				table[at(k, 0)] = float32(math.Inf(-1)) // no intermediate point yet
				best := math.Inf(-1)
				if t < g.levels {
					best = float64(table[at(k-stride, start-1)])
				}
				base := at(k, 0)
				cs, inv := sampC[start:start+len(hgts)], sampInv[start:start+len(hgts)]
				for i, h := range hgts {
					m := start + i
					if v := (h - cs[i]) * inv[i]; v > best { // hl.Slope
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
		doneBefore += len(ks)
	}

	// Pass 2: the cells, row by row.
	var cells, covered atomic.Int64
	perRad := float64(nRad) / (2 * math.Pi)
	invStep := 1 / g.stepM
	r2 := g.radiusM * g.radiusM
	var thresholds [losMaxLevels + 1]float64 // R/2^(j+1): level j serves d in [R/2^(j+1), R/2^j)
	for j := range thresholds {
		thresholds[j] = g.radiusM / float64(int(1)<<(j+1))
	}
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
			j := 0
			for j < g.levels && d < thresholds[j] {
				j++
			}
			k := 0
			if d > 0 {
				p := azimuthRad(e, north) * perRad / float64(int(1)<<j)
				k = int(math.Round(p)) << j
				if k < 0 {
					k += nRad
				}
				if k >= nRad {
					k -= nRad
				}
			}
			m := min(max(int(math.Ceil(d*invStep-0.5))-1, 0), n-2)
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
