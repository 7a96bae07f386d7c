package terrain

// MaxFillPasses bounds void filling: a void farther than this many samples
// from every valid sample stays NaN (about 9 km at 3″ and 3 km at 1″).
// Guessing terrain farther from any measurement than that would be fiction.
const MaxFillPasses = 100

// FillVoids replaces NaN samples by the mean of their valid 8-neighbours,
// pass after pass from the edge of each void inwards (a plain "onion
// peeling" fill: every pass fills, from the values before the pass, all
// voids touching a valid or already filled sample). It stops after
// MaxFillPasses passes or when a pass fills nothing, and sets t.Filled to
// the samples filled and t.Voids to the NaN samples left. Every filled
// height is a mean of neighbours, so it lies between the lowest and highest
// valid heights bordering its void: filling never invents peaks or pits.
// The work is proportional to the number of voids.
func (t *Tile) FillVoids() {
	t.Filled, t.Voids = 0, 0
	rows, cols := t.Rows, t.Cols
	h := t.H
	if rows < 1 || cols < 1 || len(h) != rows*cols {
		return
	}
	voids := 0
	for _, v := range h {
		if v != v {
			voids++
		}
	}
	if voids == 0 {
		return
	}
	// queued marks voids already placed in a frontier.
	queued := make([]bool, len(h))
	var frontier, next []int32
	for i, v := range h {
		if v != v {
			if _, k := neighbourMean(h, rows, cols, i); k > 0 {
				frontier = append(frontier, int32(i))
				queued[i] = true
			}
		}
	}
	values := make([]float32, 0, len(frontier))
	for pass := 0; pass < MaxFillPasses && len(frontier) > 0; pass++ {
		values = values[:0]
		for _, i := range frontier {
			m, _ := neighbourMean(h, rows, cols, int(i))
			values = append(values, m)
		}
		for m, i := range frontier {
			h[i] = values[m]
		}
		t.Filled += len(frontier)
		next = next[:0]
		for _, i := range frontier {
			r, c := int(i)/cols, int(i)%cols
			for rr := max(r-1, 0); rr <= min(r+1, rows-1); rr++ {
				for cc := max(c-1, 0); cc <= min(c+1, cols-1); cc++ {
					j := rr*cols + cc
					if v := h[j]; v != v && !queued[j] {
						queued[j] = true
						next = append(next, int32(j))
					}
				}
			}
		}
		frontier, next = next, frontier
	}
	t.Voids = voids - t.Filled
}

// neighbourMean returns the mean of the valid (non-NaN) 8-neighbours of
// sample i and how many there are.
func neighbourMean(h []float32, rows, cols, i int) (float32, int) {
	r, c := i/cols, i%cols
	sum, k := 0.0, 0
	for rr := max(r-1, 0); rr <= min(r+1, rows-1); rr++ {
		row := h[rr*cols : rr*cols+cols]
		for cc := max(c-1, 0); cc <= min(c+1, cols-1); cc++ {
			if v := row[cc]; v == v && (rr != r || cc != c) {
				sum += float64(v)
				k++
			}
		}
	}
	if k == 0 {
		return 0, 0
	}
	return float32(sum / float64(k)), k
}
