package report

import (
	"math"

	"github.com/paulmach/orb"
	"github.com/paulmach/orb/geojson"
)

// LevelAreas returns the areas of g (values in s's units) at or above each
// level of s as a GeoJSON FeatureCollection (RFC 7946): one Feature per
// level, in the order of the levels, whose geometry is the MultiPolygon of
// the cells with a value ≥ the level (cells without data are outside), and
// whose properties are
//
//	"level": the threshold (number), "unit": s.Unit, "quantity": s.Name,
//	"label": e.g. "margin ≥ 10 dB", "cells": how many cells are inside.
//
// A level that no cell reaches gives a Feature with an empty MultiPolygon.
//
// The polygons are the exact union of the cells taken as squares in
// longitude and latitude (each cell's edges on the grid lines), traced
// along the cell edges: no smoothing, so their area in square degrees is
// the number of cells times a cell's size. Rings are closed, exteriors wind
// counter-clockwise and holes clockwise (RFC 7946 §3.1.6), and no ring
// touches itself: where areas meet only at a corner they are separate
// polygons, and a hole that meets its exterior at a corner stays a hole
// (the OGC Simple Features rules, ISO 19125-1, §6.1.11). Collinear points
// are left out. Coordinates are longitude, latitude in degrees.
func LevelAreas(g Grid, s Scale) (*geojson.FeatureCollection, error) {
	if err := g.check("grid"); err != nil {
		return nil, err
	}
	if err := s.check(); err != nil {
		return nil, err
	}
	fc := geojson.NewFeatureCollection()
	for _, level := range s.Levels {
		mp, cells := levelArea(&g, level)
		f := geojson.NewFeature(mp)
		f.Properties["level"] = level
		f.Properties["unit"] = s.Unit
		f.Properties["quantity"] = s.Name
		f.Properties["label"] = areaLabel(&s, level)
		f.Properties["cells"] = cells
		fc.Append(f)
	}
	return fc, nil
}

// areaLabel is "margin ≥ 10 dB".
func areaLabel(s *Scale, level float64) string {
	out := "≥ " + levelText(level)
	if s.Name != "" {
		out = s.Name + " " + out
	}
	if s.Unit != "" {
		out += " " + s.Unit
	}
	return out
}

// Directions of a cell edge on the grid of corners (x east, y north).
const (
	dirE = 1 << iota
	dirN
	dirW
	dirS
)

// dirStep is the step of each direction; leftOf the direction a quarter
// turn to its left.
var (
	dirStep = [dirS + 1][2]int{dirE: {1, 0}, dirN: {0, 1}, dirW: {-1, 0}, dirS: {0, -1}}
	leftOf  = [dirS + 1]uint8{dirE: dirN, dirN: dirW, dirW: dirS, dirS: dirE}
)

// levelArea traces the union of the cells of g at or above level.
//
// Corners are numbered x = 0 … W from the west and y = 0 … H from the
// south. Every edge between a cell inside and one outside (or the grid's
// edge) is directed so that the inside is on its left; then the edges
// leaving each corner are followed into closed walks. A corner where two
// inside cells meet only diagonally has two edges out: the walk turns left
// there, and whenever it comes back to a corner it has already passed in
// the same walk, the loop since then is cut off as a ring of its own, so
// no ring touches itself. A ring winding counter-clockwise bounds an area
// (an exterior), one winding clockwise a hole; each hole goes to the
// smallest exterior around the cell on its left.
func levelArea(g *Grid, level float64) (orb.MultiPolygon, int) {
	w, h := g.Width, g.Height
	in := func(c, r int) bool {
		if c < 0 || r < 0 || c >= w || r >= h {
			return false
		}
		v := g.Values[r*w+c]
		return g.valid(v) && float64(v) >= level
	}
	stride := w + 1
	out := make([]uint8, stride*(h+1)) // edges leaving each corner
	cells := 0
	for r := 0; r < h; r++ {
		yb := h - r - 1 // the cell's south edge
		for c := 0; c < w; c++ {
			if !in(c, r) {
				continue
			}
			cells++
			if !in(c, r+1) {
				out[yb*stride+c] |= dirE
			}
			if !in(c+1, r) {
				out[yb*stride+c+1] |= dirN
			}
			if !in(c, r-1) {
				out[(yb+1)*stride+c+1] |= dirW
			}
			if !in(c-1, r) {
				out[(yb+1)*stride+c] |= dirS
			}
		}
	}
	if cells == 0 {
		return orb.MultiPolygon{}, 0
	}

	var shells, holes [][]int32 // rings of corner indices, not closed
	onWalk := map[int32]int{}   // corners with edges left, passed in this walk
	var walk []int32
	for start := range out {
		if out[start] == 0 {
			continue
		}
		clear(onWalk)
		walk = append(walk[:0], int32(start))
		onWalk[int32(start)] = 0
		cur := int32(start)
		var came uint8
		for {
			d := nextDir(out[cur], came)
			out[cur] &^= d
			st := dirStep[d]
			next := cur + int32(st[0]) + int32(st[1])*int32(stride)
			came = d
			if j, ok := onWalk[next]; ok {
				ring := append([]int32(nil), walk[j:]...)
				for _, v := range walk[j+1:] {
					delete(onWalk, v)
				}
				walk = walk[:j+1]
				ring = simplify(ring, stride)
				if ringArea2(ring, stride) > 0 {
					shells = append(shells, ring)
				} else {
					holes = append(holes, ring)
				}
				if j == 0 && out[next] == 0 {
					break
				}
				cur = next
				continue
			}
			if out[next]&(out[next]-1) != 0 { // two edges out: may come back
				onWalk[next] = len(walk)
			}
			walk = append(walk, next)
			cur = next
		}
	}

	polys := make(orb.MultiPolygon, len(shells))
	boxes := make([][4]int, len(shells))
	areas := make([]int, len(shells))
	dLon, dLat := g.cellDeg()
	toRing := func(ring []int32) orb.Ring {
		out := make(orb.Ring, 0, len(ring)+1)
		for _, v := range append(ring, ring[0]) {
			x, y := int(v)%stride, int(v)/stride
			out = append(out, orb.Point{g.Bounds.West + float64(x)*dLon, g.Bounds.South + float64(y)*dLat})
		}
		return out
	}
	for i, s := range shells {
		polys[i] = orb.Polygon{toRing(s)}
		b := [4]int{math.MaxInt, math.MaxInt, -1, -1}
		for _, v := range s {
			x, y := int(v)%stride, int(v)/stride
			b = [4]int{min(b[0], x), min(b[1], y), max(b[2], x), max(b[3], y)}
		}
		boxes[i], areas[i] = b, ringArea2(s, stride)
	}
	for _, hole := range holes {
		// The centre of the inside cell left of the hole's first edge,
		// doubled to stay on integers: it is inside exactly the exteriors
		// around the hole's polygon, of which that polygon's is the
		// smallest.
		a, b := hole[0], hole[1%len(hole)]
		ax, ay, bx, by := int(a)%stride, int(a)/stride, int(b)%stride, int(b)/stride
		dx, dy := sign(bx-ax), sign(by-ay)
		px, py := 2*ax+dx-dy, 2*ay+dy+dx // a step along the edge and one to its left, halved
		best := -1
		for i, s := range shells {
			bb := boxes[i]
			if px <= 2*bb[0] || px >= 2*bb[2] || py <= 2*bb[1] || py >= 2*bb[3] {
				continue
			}
			if (best < 0 || areas[i] < areas[best]) && insideRing(s, stride, px, py) {
				best = i
			}
		}
		if best >= 0 { // always, for a hole traced from a grid
			polys[best] = append(polys[best], toRing(hole))
		}
	}
	return polys, cells
}

// nextDir picks the edge to leave a corner by, having come in along came
// (0 at the start): the only one, or where there are two, the one turning
// left.
func nextDir(bits, came uint8) uint8 {
	if bits&(bits-1) == 0 {
		return bits
	}
	left := leftOf[came]
	if bits&left != 0 {
		return left
	}
	return bits & -bits
}

func sign(v int) int {
	switch {
	case v > 0:
		return 1
	case v < 0:
		return -1
	}
	return 0
}

// simplify drops the corners of a ring where it goes straight on.
func simplify(ring []int32, stride int) []int32 {
	n := len(ring)
	out := ring[:0:0]
	for i := range ring {
		p, c, q := ring[(i+n-1)%n], ring[i], ring[(i+1)%n]
		px, py, cx, cy, qx, qy := int(p)%stride, int(p)/stride, int(c)%stride, int(c)/stride, int(q)%stride, int(q)/stride
		if (px == cx && cx == qx) || (py == cy && cy == qy) {
			continue
		}
		out = append(out, c)
	}
	return out
}

// ringArea2 is twice the signed area of a ring of corners, in cells:
// positive when it winds counter-clockwise (the shoelace formula).
func ringArea2(ring []int32, stride int) int {
	a := 0
	for i := range ring {
		p, q := ring[i], ring[(i+1)%len(ring)]
		a += (int(p)%stride)*(int(q)/stride) - (int(q)%stride)*(int(p)/stride)
	}
	return a
}

// insideRing reports whether the point (px/2, py/2), on no grid line, is
// inside the ring: the count of its edges crossed by a ray to the east is
// odd (the crossing-number test; only north-south edges can be crossed).
func insideRing(ring []int32, stride, px, py int) bool {
	inside := false
	for i := range ring {
		p, q := ring[i], ring[(i+1)%len(ring)]
		x, y0, y1 := int(p)%stride, int(p)/stride, int(q)/stride
		if x != int(q)%stride || 2*x < px {
			continue
		}
		if (2*y0 < py) != (2*y1 < py) {
			inside = !inside
		}
	}
	return inside
}
