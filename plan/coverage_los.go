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
// CoverageNoData outside the radius) without a list of cells per radial
// and without a table of every radial:
//
//  1. Ground. Row by row, every cell within the radius gets its own ground
//     height (terrain.Sampler.Row), stored in the map until its answer
//     replaces it; the cells are counted.
//  2. Units of 2^levels neighbouring radials, on every core. Each radial of
//     the unit is sampled along its geodesic at the DEM spacing in its own
//     direction (coverageGrid.radialStep) and the running maximum of the
//     slope (ITU-R P.526-16 eq. 49, tangent-plane frame;
//     propagation.HorizonLOS) after each sample is kept, a float32 per
//     sample in the worker's table of the unit (a few hundred kB, so it
//     stays in cache). Radials come in levels, as the cells they must
//     reach: radial k with t trailing zero bits (t < levels) is needed only
//     beyond R/2^(t+1), where the coarser radials stand more than a cell
//     apart; it starts there, from the running maximum of the coarser
//     radial k − 2^t beside it (at most half a cell away, as the cells are
//     from their own radial), and samples only the rest.
//     Then the unit answers its cells (coverageGrid.unitCells: those whose
//     nearest radial of their distance's level is one of the unit's, found
//     band by band in the wedges of azimuths the unit serves): eq. 50
//     against the running maximum after the m samples more than half a
//     step short of the cell, with the cell's own ground and distance.
//
// Progress counts rows, then radials: total rows + radials.
func (g *coverageGrid) coverageLOS(ctx context.Context, ts *terrain.Set, prm propagation.Params, h0 float64, res *CoverageResult, progress func(done, total int)) error {
	hl, err := propagation.NewHorizonLOS(prm, h0)
	if err != nil {
		return err
	}
	nRad, n := g.radials, g.samples
	total := g.rows + nRad

	// Pass 1: the cells' ground.
	noDataGround, nCells, err := g.fillGround(ctx, ts, res.Values, func(done, _ int) {
		if progress != nil {
			progress(done, total)
		}
	})
	if err != nil {
		return err
	}
	var noData atomic.Bool
	noData.Store(noDataGround)

	// Each radial's own step: the DEM spacing in its direction (a row or a
	// column crossed per sample, whichever comes first), never shorter
	// than g.stepM, so n samples cover every radial.
	stepOf, invStepOf := make([]float64, nRad), make([]float64, nRad)
	for k := range nRad {
		stepOf[k] = g.radialStep(2 * math.Pi * float64(k) / float64(nRad))
		invStepOf[k] = 1 / stepOf[k]
	}
	// eq. 49's slope (h − bulge·d_m² − h_ts)/d_m with d_m = m·s as
	// (h − h_ts − bulge·s²·m²)·(1/s)·(1/m): m² and 1/m shared by every
	// radial, a multiply instead of a division per sample.
	sq, inv := make([]float64, n), make([]float64, n)
	for m := 1; m < n; m++ {
		sq[m], inv[m] = float64(m)*float64(m), 1/float64(m)
	}
	unit := 1 << g.levels
	order := make([]int, 0, unit) // offsets within a unit, coarsest level first
	for t := g.levels; t >= 0; t-- {
		for o := range unit {
			if (o == 0 && t == g.levels) || (o != 0 && bits.TrailingZeros(uint(o)) == t) {
				order = append(order, o)
			}
		}
	}

	// Pass 2: units of radials, then their cells.
	var covered, answered atomic.Int64
	err = coverageParallel(ctx, nRad/unit, func(done, _ int) {
		if progress != nil {
			progress(g.rows+done*unit, total)
		}
	}, func(ws *coverageWorker, u int) error {
		if ws.sp == nil {
			ws.sp = ts.NewSampler()
		}
		if cap(ws.hgts) < n {
			ws.hgts = make([]float64, n)
		}
		if len(ws.horizon) < unit*n {
			ws.horizon = make([]float32, unit*n)
		}
		tab := ws.horizon[:unit*n]
		k0 := u * unit
		for _, o := range order {
			k := k0 + o
			t := g.levels
			if o != 0 {
				t = bits.TrailingZeros(uint(o))
			}
			nk, start := min(int(g.radiusM*invStepOf[k])+3, n), g.start(t, invStepOf[k])
			hgts := ws.hgts[:nk-start]
			ws.sp.NoData = 0
			step := stepOf[k]
			if err := ws.sp.RadialHeightsFrom(g.siteLat, g.siteLon, 360*float64(k)/float64(nRad), float64(start)*step, step, hgts); err != nil {
				return err
			}
			if ws.sp.NoData > 0 {
				noData.Store(true)
			}
			row := tab[o*n : (o+1)*n]
			row[0] = float32(math.Inf(-1)) // no intermediate point yet
			best := math.Inf(-1)
			if t < g.levels {
				// The parent's running maximum over its samples short of
				// this radial's first one.
				p := k - 1<<t
				if jp := int(float64(start-1) * step * invStepOf[p]); jp > 0 {
					best = float64(tab[(p-k0)*n+jp])
				}
			}
			bs2 := hl.Bulge * step * step * 1e-6 // bulge·s², s in km
			invS := 1000 / step
			hts := hl.HtsM
			out := row[start : start+len(hgts)]
			sqs, invs := sq[start:start+len(hgts)], inv[start:start+len(hgts)]
			for i, h := range hgts {
				if v := (h - hts - bs2*sqs[i]) * invS * invs[i]; v > best { // hl.Slope
					best = v
				}
				out[i] = float32(best)
			}
		}
		// The unit's cells.
		g.unitCells(ws, k0, unit, res.Values, false)
		answered.Add(int64(len(ws.found)))
		nv := 0
		for i, cell := range ws.found {
			o, d := int(ws.foundOff[i]), ws.foundD[i]
			inv := invStepOf[k0+o]
			m := min(max(int(math.Ceil(d*inv-0.5))-1, 0), int(g.radiusM*inv)+1)
			dKM := max(d, 1) / 1000 // a cell at the site counts as 1 m away
			if hl.Visible(float64(tab[o*n+m]), dKM, float64(ws.foundH[i])) {
				res.Values[cell] = 1
				nv++
			} else {
				res.Values[cell] = 0
			}
		}
		covered.Add(int64(nv))
		return nil
	})
	if err != nil {
		return err
	}
	if err := g.checkAnswered(int(answered.Load()), nCells); err != nil {
		return err
	}
	res.Cells, res.Covered = nCells, int(covered.Load())
	res.SmoothEarth = noData.Load()
	return nil
}

// azimuthRad returns atan2(e, n) in radians (clockwise from north,
// −π..π) for (e, n) ≠ (0, 0), within 1e−8 rad: octant reduction to
// t = min/max in [0, 1] (one division), then atan t from an odd polynomial
// of degree 17, fitted for this package by least squares at 400 Chebyshev
// nodes on [0, 1] (worst error 6.2e−9 rad on a grid of 200 001 points;
// TestAzimuthRad checks it against math.Atan2).
func azimuthRad(e, n float64) float64 {
	ae, an := math.Abs(e), math.Abs(n)
	swap := ae > an
	t := min(ae, an) / max(ae, an)
	u := t * t
	a := t * (0.9999999100840571 + u*(-0.33332681417228444+u*(0.1998687658886843+u*(-0.14166489375016364+
		u*(0.10514540957741626+u*(-0.0726162773626744+u*(0.04004685891432431+u*(-0.014542801529465986+u*0.002488011638552867))))))))
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
