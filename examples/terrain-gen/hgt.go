package main

import (
	"bytes"
	"compress/gzip"
	"encoding/binary"
	"fmt"
	"math"
	"runtime"
	"sync"
)

// SRTM HGT layout (NASA SRTM Topography documentation, 2003): raw big-endian int16, row-major from
// the north edge, west to east; 1201×1201 samples for 3″, on whole-degree
// grid lines, so a tile's edges are shared with its neighbours.
const (
	samplesPerDeg = 1200 // 3″ spacing
	tileSamples   = samplesPerDeg + 1
	voidSample    = -32768 // SRTM void
)

// tileID names a 1°×1° tile by its south-west corner in whole degrees.
type tileID struct{ latS, lonW int }

// The two tiles of the example, sharing the meridian 124°W.
var exampleTiles = []tileID{{-49, -125}, {-49, -124}}

// name is the SRTM file stem, e.g. S49W124.
func (t tileID) name() string {
	ns, ew := 'N', 'E'
	lat, lon := t.latS, t.lonW
	if lat < 0 {
		ns, lat = 'S', -lat
	}
	if lon < 0 {
		ew, lon = 'W', -lon
	}
	return fmt.Sprintf("%c%02d%c%03d", ns, lat, ew, lon)
}

// samplePos is the position of a sample. Positions come from global integer
// grid indices, so a sample on an edge shared by two tiles has bit-identical
// coordinates, and therefore an identical height, in both.
func (t tileID) samplePos(row, col int) (latDeg, lonDeg float64) {
	latIdx := (t.latS+1)*samplesPerDeg - row
	lonIdx := t.lonW*samplesPerDeg + col
	return float64(latIdx) / samplesPerDeg, float64(lonIdx) / samplesPerDeg
}

// voidCell is a sample deliberately left void.
type voidCell struct {
	tile     tileID
	row, col int
}

// A handful of voids in the far south-west corner of S49W125, over open sea,
// so readers' void handling is exercised away from everything else.
var exampleVoids = []voidCell{
	{exampleTiles[0], 1186, 9}, {exampleTiles[0], 1186, 10},
	{exampleTiles[0], 1187, 9}, {exampleTiles[0], 1187, 10}, {exampleTiles[0], 1187, 11},
	{exampleTiles[0], 1188, 10},
	{exampleTiles[0], 1191, 15},
	{exampleTiles[0], 1183, 18},
}

// generateTile evaluates the landscape on every sample of a tile, rounds
// to whole metres and applies the voids.
func generateTile(t tileID) []int16 {
	h := make([]int16, tileSamples*tileSamples)
	rows := make(chan int)
	var wg sync.WaitGroup
	for w := 0; w < runtime.NumCPU(); w++ {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for r := range rows {
				for c := 0; c < tileSamples; c++ {
					lat, lon := t.samplePos(r, c)
					h[r*tileSamples+c] = toInt16(heightM(lat, lon))
				}
			}
		}()
	}
	for r := 0; r < tileSamples; r++ {
		rows <- r
	}
	close(rows)
	wg.Wait()
	for _, v := range exampleVoids {
		if v.tile == t {
			h[v.row*tileSamples+v.col] = voidSample
		}
	}
	return h
}

func toInt16(m float64) int16 {
	m = math.Round(m)
	if m > math.MaxInt16 {
		return math.MaxInt16
	}
	if m < math.MinInt16+1 {
		return math.MinInt16 + 1
	}
	return int16(m)
}

// encodeHGT lays the samples out as an HGT file.
func encodeHGT(h []int16) []byte {
	b := make([]byte, 2*len(h))
	for i, v := range h {
		binary.BigEndian.PutUint16(b[2*i:], uint16(v))
	}
	return b
}

// gzipDeterministic compresses with an empty header (no name, no time), so
// the same input always gives the same bytes.
func gzipDeterministic(b []byte) ([]byte, error) {
	var buf bytes.Buffer
	zw, err := gzip.NewWriterLevel(&buf, gzip.BestCompression)
	if err != nil {
		return nil, err
	}
	if _, err := zw.Write(b); err != nil {
		return nil, err
	}
	if err := zw.Close(); err != nil {
		return nil, err
	}
	return buf.Bytes(), nil
}

// grid holds the generated tiles for sampling while the GPX files are made.
type grid map[tileID][]int16

// sampleM is the bilinear interpolation of the four samples around a
// position, as a reader of the tiles computes it; ok is false outside the
// tiles or next to a void.
func (g grid) sampleM(latDeg, lonDeg float64) (float64, bool) {
	t := tileID{int(math.Floor(latDeg)), int(math.Floor(lonDeg))}
	h, ok := g[t]
	if !ok {
		return 0, false
	}
	fr := (float64(t.latS+1) - latDeg) * samplesPerDeg
	fc := (lonDeg - float64(t.lonW)) * samplesPerDeg
	r0, c0 := int(math.Floor(fr)), int(math.Floor(fc))
	if r0 >= tileSamples-1 {
		r0 = tileSamples - 2
	}
	if c0 >= tileSamples-1 {
		c0 = tileSamples - 2
	}
	dr, dc := fr-float64(r0), fc-float64(c0)
	at := func(r, c int) float64 { return float64(h[r*tileSamples+c]) }
	for _, v := range [4]float64{at(r0, c0), at(r0, c0+1), at(r0+1, c0), at(r0+1, c0+1)} {
		if v == voidSample {
			return 0, false
		}
	}
	top := at(r0, c0)*(1-dc) + at(r0, c0+1)*dc
	bot := at(r0+1, c0)*(1-dc) + at(r0+1, c0+1)*dc
	return top*(1-dr) + bot*dr, true
}
