package plan

// The relay search: where to put a relay so that two parties who cannot
// hear each other both reach it.

import (
	"context"
	"errors"
	"fmt"
	"math"
	"sort"
	"strings"

	"github.com/mastlink/mastlink/plan/gpx"
	"github.com/mastlink/mastlink/plan/units"
	"github.com/mastlink/mastlink/terrain"
	"github.com/paulmach/orb"
)

// ErrRelay is wrapped by every error about an unusable relay request.
var ErrRelay = errors.New("relay")

// Defaults of a relay search.
const (
	DefaultRelaySpots       = 5
	DefaultRelaySeparationM = 500
	minRelayRadiusM         = 2000
)

// RelayRequest asks where a relay reaches two parties.
type RelayRequest struct {
	A, B End // the two parties, with their kit
	// FreqAMHz and FreqBMHz are the frequencies of the relay's links to A
	// and to B: the same for a simplex relay, different for a cross-band
	// one. Each link is checked both ways on its frequency.
	FreqAMHz, FreqBMHz float64
	// Relay is the relay's kit (its Pos is ignored); the relay has the
	// same kit on both sides.
	Relay End
	// HeightsM are the relay antenna heights above ground to try, lowest
	// first; none means Relay.Antenna.HeightM.
	HeightsM []float64
	// RadiusM is the search radius around each party in metres: spots lie
	// within it of both. 0 means the distance between them (at least
	// 2 km).
	RadiusM        float64
	NeededMarginDB float64 // margin each direction of both links must meet, dB
	// Roads are tracks a relay could be driven or carried along (GPX
	// tracks and routes); nearer is better among spots of the same margin.
	Roads []orb.LineString
	// Spots is how many spots to return (DefaultRelaySpots when 0);
	// SeparationM how far apart they must be (DefaultRelaySeparationM
	// when 0), so that they are distinct places, not neighbouring cells.
	Spots       int
	SeparationM float64
	MaxCells    int // per coverage map; 0 means DefaultMaxCoverageCells
}

// RelaySpot is one place for the relay. Its margins are those of
// Env.Evaluate (the `link` computation, over the full profile) at the
// spot, with the relay antenna HeightM above the ground; MapWorstMarginDB
// is what the coverage maps gave the cell.
type RelaySpot struct {
	Rank             int      `json:"rank"`
	Lat              float64  `json:"lat"`
	Lon              float64  `json:"lon"`
	ElevationM       float64  `json:"elevation_m"` // ground, metres above sea level
	HeightM          float64  `json:"height_m"`    // relay antenna above ground
	MarginToADB      float64  `json:"margin_to_a_db"`
	MarginToBDB      float64  `json:"margin_to_b_db"`
	WorstMarginDB    float64  `json:"worst_margin_db"`
	MapWorstMarginDB float64  `json:"map_worst_margin_db"`
	DistanceToAM     float64  `json:"distance_to_a_m"`
	DistanceToBM     float64  `json:"distance_to_b_m"`
	RoadDistanceM    *float64 `json:"road_distance_m"` // null without roads
	MeetsRequirement bool     `json:"meets_requirement"`
}

// RelayGrid is the combined map of the search: in each cell the worst of
// the margins to A and to B (dB) at the lowest height tried that meets the
// requirement there, or the best of them where none does; CoverageNoData
// outside the search area. Row-major from the north row, pixel-is-area.
type RelayGrid struct {
	Values           []float32
	Rows, Cols       int
	West, North      float64 // degrees: outer corner of the north-west cell
	DLatDeg, DLonDeg float64
}

// RelayResult is the outcome of a relay search.
type RelayResult struct {
	A              string    `json:"a"`
	B              string    `json:"b"`
	DistanceM      float64   `json:"distance_m"` // between A and B
	FreqAMHz       float64   `json:"freq_a_mhz"`
	FreqBMHz       float64   `json:"freq_b_mhz"`
	HeightsM       []float64 `json:"heights_m"`
	RadiusM        float64   `json:"radius_m"`
	NeededMarginDB float64   `json:"needed_margin_db"`
	// DirectMarginDB is the worst margin of A and B talking directly on
	// FreqAMHz, both ways (the reason for a relay when it is short).
	DirectMarginDB float64 `json:"direct_margin_db"`
	Cells          int     `json:"cells"`         // searched: within the radius of both
	CellsMeeting   int     `json:"cells_meeting"` // of them, meeting the requirement on the maps
	// MeetsRequirement says the best spot meets the requirement on both
	// links in both directions; when false, Spots are the best there are.
	MeetsRequirement bool        `json:"meets_requirement"`
	Spots            []RelaySpot `json:"spots"`
	Warnings         []string    `json:"warnings,omitempty"`
	Grid             *RelayGrid  `json:"-"`
}

// FindRelay searches the terrain around and between two parties for the
// spots from which a relay reaches both.
//
// Method: a coverage map (CoverageMap, the radial engine: ITU-R P.526-16
// §4.5 delta-Bullington over terrain plus free space) is computed from
// each party with the relay's antenna height as the height in every cell,
// and the margins of both directions of that party's link (paths are
// reciprocal, so a map from the party gives the link to a relay in every
// cell). The two maps are combined cell by cell, keeping the worse of the
// two margins, for each height tried; each cell takes the lowest height
// meeting the requirement, else its best. Cells are ranked by worst margin
// in whole dB (differences below a decibel are within the model's
// accuracy), then distance from the nearest road (a two-pass chamfer
// distance over the grid, within about 8 % of the straight-line distance;
// roads outside the grid are not seen), then antenna height, then the
// exact margin; spots are picked greedily down that order at least
// SeparationM apart (non-maximum suppression). The best 4 × Spots such
// spots (8 × Spots when the Env's model is not delta-Bullington, e.g. the
// Longley–Rice ITM: the maps stay delta-Bullington's, see CoverageByCell)
// are recomputed with Env.Evaluate (the full profile and the Env's model,
// the antennas' patterns toward each path) and ranked again on those
// figures, so that the spots' margins are those `link` gives.
//
// Gains on the maps are the antennas' peak gains (a directional antenna
// aimed at the other end); body and clutter losses are included. The
// result's Grid is the combined map. progress, when not nil, counts the
// maps' radials.
func (e *Env) FindRelay(ctx context.Context, req RelayRequest, progress Progress) (*RelayResult, error) {
	if req.Relay.Radio.PowerW <= 0 || req.Relay.Radio.SensitivityDBm == 0 {
		return nil, fmt.Errorf("%w: the relay's radio needs a power and a sensitivity (the plan's defaults: radio)", ErrRelay)
	}
	for _, p := range []End{req.A, req.B} {
		if p.Radio.PowerW <= 0 || p.Radio.SensitivityDBm == 0 {
			return nil, fmt.Errorf("%w: %s: the radio needs a power and a sensitivity", ErrRelay, p.Name)
		}
	}
	if !(req.FreqAMHz > 0) || !(req.FreqBMHz > 0) {
		return nil, fmt.Errorf("%w: give the frequencies of both links", ErrRelay)
	}
	heights := req.HeightsM
	if len(heights) == 0 {
		heights = []float64{req.Relay.Antenna.HeightM}
	}
	for _, h := range heights {
		if !(h > 0) || math.IsInf(h, 0) {
			return nil, fmt.Errorf("%w: relay antenna height %g m must be above 0", ErrRelay, h)
		}
	}
	spots := req.Spots
	if spots <= 0 {
		spots = DefaultRelaySpots
	}
	sep := req.SeparationM
	if sep <= 0 {
		sep = DefaultRelaySeparationM
	}
	dAB, _, _ := terrain.Inverse(req.A.Pos.Lat(), req.A.Pos.Lon(), req.B.Pos.Lat(), req.B.Pos.Lon())
	radius := req.RadiusM
	if radius == 0 {
		radius = math.Max(dAB, minRelayRadiusM)
	}
	if !(radius > 0) || math.IsInf(radius, 0) {
		return nil, fmt.Errorf("%w: radius %g m must be positive", ErrRelay, radius)
	}
	if 2*radius < dAB {
		return nil, fmt.Errorf("%w: the parties are %.0f m apart; a %.0f m radius around each does not meet in the middle (give at least %.0f m)", ErrRelay, dAB, radius, math.Ceil(dAB/2))
	}
	res := &RelayResult{A: req.A.Name, B: req.B.Name, DistanceM: dAB, FreqAMHz: req.FreqAMHz, FreqBMHz: req.FreqBMHz,
		HeightsM: heights, RadiusM: radius, NeededMarginDB: req.NeededMarginDB}

	// Direct: A and B on A's frequency, both ways.
	var g Geometry
	if err := e.Measure(req.A.Pos, req.B.Pos, &g); err != nil {
		return nil, err
	}
	ab, err := e.Evaluate(&g, req.A, req.B, req.FreqAMHz, true)
	if err != nil {
		return nil, err
	}
	ba, err := e.Evaluate(&g, req.B, req.A, req.FreqAMHz, false)
	if err != nil {
		return nil, err
	}
	res.DirectMarginDB = math.Min(ab.MarginDB, ba.MarginDB)

	total := 2 * len(heights)
	done := 0
	var grid *RelayGrid
	var best []float32 // per cell: the chosen worst margin
	var hIdx []uint8   // per cell: the chosen height's index
	for hi, h := range heights {
		relay := req.Relay
		relay.Antenna.HeightM = h
		var maps [2]*CoverageResult
		for pi, party := range []End{req.A, req.B} {
			f := req.FreqAMHz
			if pi == 1 {
				f = req.FreqBMHz
			}
			cr, err := e.relayCoverage(party, relay, f, radius, req.NeededMarginDB, req.MaxCells)
			if err != nil {
				return nil, err
			}
			var prog func(d, t int)
			if progress != nil {
				base := done
				prog = func(d, t int) { progress(base*1000+d*1000/max(t, 1), total*1000) }
			}
			m, err := CoverageMap(ctx, e.terrainSet(), cr, prog)
			if err != nil {
				return nil, fmt.Errorf("%s: %w", party.Name, err)
			}
			done++
			maps[pi] = m
			for _, w := range m.Warnings {
				if !containsString(res.Warnings, w) {
					res.Warnings = append(res.Warnings, w)
				}
			}
		}
		a, b := maps[0], maps[1]
		if grid == nil {
			grid = &RelayGrid{Rows: a.Rows, Cols: a.Cols, West: a.West, North: a.North, DLatDeg: a.DLatDeg, DLonDeg: a.DLonDeg,
				Values: make([]float32, a.Rows*a.Cols)}
			best = grid.Values
			hIdx = make([]uint8, len(best))
			for i := range best {
				best[i] = CoverageNoData
			}
		}
		for r := 0; r < a.Rows; r++ {
			lat := a.North - (float64(r)+0.5)*a.DLatDeg
			rb := int(math.Floor((b.North - lat) / b.DLatDeg))
			for c := 0; c < a.Cols; c++ {
				i := r*a.Cols + c
				va := a.Values[i]
				if va == CoverageNoData || rb < 0 || rb >= b.Rows {
					continue
				}
				lon := a.West + (float64(c)+0.5)*a.DLonDeg
				cb := int(math.Floor((lon - b.West) / b.DLonDeg))
				if cb < 0 || cb >= b.Cols {
					continue
				}
				vb := b.Values[rb*b.Cols+cb]
				if vb == CoverageNoData {
					continue
				}
				w := min(va, vb)
				switch {
				case best[i] == CoverageNoData:
					best[i], hIdx[i] = w, uint8(hi)
				case float64(best[i]) >= req.NeededMarginDB:
					// a lower height already meets it
				case w > best[i]:
					best[i], hIdx[i] = w, uint8(hi)
				}
			}
		}
	}
	res.Grid = grid

	cands := make([]relayCell, 0, 1024)
	var road []float64
	if len(req.Roads) > 0 {
		road = roadDistances(grid, req.Roads)
	}
	for i, v := range best {
		if v == CoverageNoData {
			continue
		}
		res.Cells++
		if float64(v) >= req.NeededMarginDB {
			res.CellsMeeting++
		}
		c := relayCell{index: i, margin: float64(v), height: heights[hIdx[i]], road: math.NaN()}
		if road != nil {
			c.road = road[i]
		}
		cands = append(cands, c)
	}
	if len(cands) == 0 {
		return nil, fmt.Errorf("%w: no cell lies within %.0f m of both parties", ErrRelay, radius)
	}
	sort.Slice(cands, func(x, y int) bool { return cands[x].before(&cands[y]) })
	recheck := 4 * spots
	if CoverageByCell(e.Model) {
		// The maps are delta-Bullington's, the final ranking the Env's
		// model's: recheck more candidates.
		recheck = 8 * spots
	}
	picked := pickApart(grid, cands, recheck, sep)

	// Recompute the picked cells with the link computation and rank again.
	checked := make([]relayCell, 0, len(picked))
	out := make([]RelaySpot, 0, len(picked))
	for _, c := range picked {
		if err := ctx.Err(); err != nil {
			return nil, err
		}
		lat, lon := grid.centre(c.index)
		relay := req.Relay
		relay.Name, relay.Pos, relay.Antenna.HeightM = "relay", orb.Point{lon, lat}, c.height
		s := RelaySpot{Lat: lat, Lon: lon, HeightM: c.height, MapWorstMarginDB: c.margin}
		for pi, party := range []End{req.A, req.B} {
			f := req.FreqAMHz
			if pi == 1 {
				f = req.FreqBMHz
			}
			if err := e.Measure(relay.Pos, party.Pos, &g); err != nil {
				return nil, err
			}
			out1, err := e.Evaluate(&g, relay, party, f, true)
			if err != nil {
				return nil, err
			}
			back, err := e.Evaluate(&g, party, relay, f, false)
			if err != nil {
				return nil, err
			}
			m := math.Min(out1.MarginDB, back.MarginDB)
			if pi == 0 {
				s.MarginToADB, s.DistanceToAM = m, g.Profile.DistanceM
			} else {
				s.MarginToBDB, s.DistanceToBM = m, g.Profile.DistanceM
			}
			s.ElevationM = g.Profile.ElevM[0]
		}
		s.WorstMarginDB = math.Min(s.MarginToADB, s.MarginToBDB)
		s.MeetsRequirement = s.WorstMarginDB >= req.NeededMarginDB
		if road != nil {
			d := road[c.index]
			s.RoadDistanceM = &d
		}
		c.margin = s.WorstMarginDB
		checked = append(checked, c)
		out = append(out, s)
	}
	order := make([]int, len(out))
	for i := range order {
		order[i] = i
	}
	sort.SliceStable(order, func(x, y int) bool { return checked[order[x]].before(&checked[order[y]]) })
	for k, i := range order {
		if k == spots {
			break
		}
		s := out[i]
		s.Rank = k + 1
		res.Spots = append(res.Spots, s)
	}
	res.MeetsRequirement = len(res.Spots) > 0 && res.Spots[0].MeetsRequirement
	return res, nil
}

// relayCoverage is the coverage request from party to a relay in every
// cell at freqMHz: both directions (CoverageBudgets), margins.
func (e *Env) relayCoverage(party, relay End, freqMHz, radiusM, needDB float64, maxCells int) (CoverageRequest, error) {
	budgets, err := CoverageBudgets(party, relay, freqMHz, CoverageWorse)
	if err != nil {
		return CoverageRequest{}, err
	}
	return CoverageRequest{
		Site: party.Pos, SiteHeightM: party.Antenna.HeightM, TargetHeightM: relay.Antenna.HeightM,
		RadiusM: radiusM, FreqMHz: freqMHz, K: e.K, Polarization: e.Polarization, Ground: e.Ground,
		Mode: CoverageLoss, Value: ValueMargin, NeededMarginDB: needDB, MaxCells: maxCells,
		Budgets: budgets,
	}, nil
}

// relayCell is a candidate cell with its ranking keys.
type relayCell struct {
	index  int
	margin float64 // worst margin, dB
	height float64 // relay antenna height, m
	road   float64 // distance from the nearest road, m; NaN without roads
}

// before is the ranking: worst margin in whole dB (higher first), then
// road distance (nearer first), then height (lower first), then the exact
// margin, then the cell's index (north-west first), so the order is total.
func (c *relayCell) before(d *relayCell) bool {
	if a, b := math.Floor(c.margin), math.Floor(d.margin); a != b {
		return a > b
	}
	if !math.IsNaN(c.road) && !math.IsNaN(d.road) && c.road != d.road {
		return c.road < d.road
	}
	if c.height != d.height {
		return c.height < d.height
	}
	if c.margin != d.margin {
		return c.margin > d.margin
	}
	return c.index < d.index
}

// centre returns the latitude and longitude of cell i's centre, degrees.
func (g *RelayGrid) centre(i int) (lat, lon float64) {
	r, c := i/g.Cols, i%g.Cols
	return g.North - (float64(r)+0.5)*g.DLatDeg, g.West + (float64(c)+0.5)*g.DLonDeg
}

// pickApart walks cands in order and keeps up to n cells, each at least
// sepM metres (geodesic) from every one kept before: non-maximum
// suppression, so the spots are distinct places.
func pickApart(g *RelayGrid, cands []relayCell, n int, sepM float64) []relayCell {
	var out []relayCell
	var at [][2]float64
	for _, c := range cands {
		lat, lon := g.centre(c.index)
		ok := true
		for _, p := range at {
			if d, _, _ := terrain.Inverse(lat, lon, p[0], p[1]); d < sepM {
				ok = false
				break
			}
		}
		if ok {
			out = append(out, c)
			at = append(at, [2]float64{lat, lon})
			if len(out) == n {
				break
			}
		}
	}
	return out
}

// roadDistances returns, for every cell of g, the distance in metres from
// its centre to the nearest road cell: roads are drawn into the grid
// (sampled every quarter cell) and a two-pass chamfer distance transform
// with the cell's metric sizes (3 × 3 neighbourhood; G. Borgefors,
// "Distance transformations in digital images", Computer Vision, Graphics
// and Image Processing 34, 1986; from memory) spreads the distance, within
// about 8 % of the straight-line distance. Cells are sized at the grid's
// middle latitude.
func roadDistances(g *RelayGrid, roads []orb.LineString) []float64 {
	n := g.Rows * g.Cols
	d := make([]float64, n)
	for i := range d {
		d[i] = math.Inf(1)
	}
	midLat := g.North - float64(g.Rows)*g.DLatDeg/2
	nM, eM := metresPerDegreeWGS84(midLat)
	dy, dx := g.DLatDeg*nM, g.DLonDeg*eM
	dd := math.Hypot(dx, dy)
	mark := func(lat, lon float64) {
		r := int(math.Floor((g.North - lat) / g.DLatDeg))
		c := int(math.Floor((lon - g.West) / g.DLonDeg))
		if r >= 0 && r < g.Rows && c >= 0 && c < g.Cols {
			d[r*g.Cols+c] = 0
		}
	}
	for _, ls := range roads {
		for k := 0; k+1 < len(ls); k++ {
			a, b := ls[k], ls[k+1]
			segM := math.Hypot((b.Lat()-a.Lat())*nM, (b.Lon()-a.Lon())*eM)
			steps := int(math.Ceil(segM/(math.Min(dx, dy)/4))) + 1
			for s := 0; s <= steps; s++ {
				t := float64(s) / float64(steps)
				mark(a.Lat()+t*(b.Lat()-a.Lat()), a.Lon()+t*(b.Lon()-a.Lon()))
			}
		}
		if len(ls) == 1 {
			mark(ls[0].Lat(), ls[0].Lon())
		}
	}
	rows, cols := g.Rows, g.Cols
	relax := func(i, j int, w float64) {
		if v := d[j] + w; v < d[i] {
			d[i] = v
		}
	}
	for r := 0; r < rows; r++ {
		for c := 0; c < cols; c++ {
			i := r*cols + c
			if c > 0 {
				relax(i, i-1, dx)
			}
			if r > 0 {
				relax(i, i-cols, dy)
				if c > 0 {
					relax(i, i-cols-1, dd)
				}
				if c < cols-1 {
					relax(i, i-cols+1, dd)
				}
			}
		}
	}
	for r := rows - 1; r >= 0; r-- {
		for c := cols - 1; c >= 0; c-- {
			i := r*cols + c
			if c < cols-1 {
				relax(i, i+1, dx)
			}
			if r < rows-1 {
				relax(i, i+cols, dy)
				if c < cols-1 {
					relax(i, i+cols+1, dd)
				}
				if c > 0 {
					relax(i, i+cols-1, dd)
				}
			}
		}
	}
	return d
}

func containsString(list []string, s string) bool {
	for _, v := range list {
		if v == s {
			return true
		}
	}
	return false
}

// Party returns the end called name for a relay search: a station or a
// target of the plan (its kit), else a waypoint of the plan's waypoints
// file or LAT,LON with the plan's defaults as kit. Names ignore case and
// surrounding space.
func (p *Plan) Party(name string) (End, error) {
	want := strings.TrimSpace(name)
	for _, s := range p.Stations {
		if strings.EqualFold(s.Name, want) {
			return s.End, nil
		}
	}
	for _, t := range p.Targets {
		if strings.EqualFold(t.Name, want) {
			return t.End, nil
		}
	}
	e := p.Defaults
	if pt, err := units.ParsePoint(want); err == nil {
		e.Name, e.Pos = fmt.Sprintf("%.5f,%.5f", pt.Lat(), pt.Lon()), pt
		return e, nil
	} else if !errors.Is(err, units.ErrSyntax) {
		return End{}, err
	}
	if p.Waypoints == nil {
		return End{}, fmt.Errorf("%q is not a station or target of the plan, nor LAT,LON (the plan names no waypoints file)", name)
	}
	w, err := p.Waypoints.Lookup(want)
	if err != nil {
		return End{}, fmt.Errorf("%q is not a station or target of the plan: %w", name, err)
	}
	e.Name, e.Pos = w.Name, w.Pos
	return e, nil
}

// ReadRoads reads the tracks and routes of GPX files as lines for
// RelayRequest.Roads.
func ReadRoads(files []string) ([]orb.LineString, error) {
	var out []orb.LineString
	for _, f := range files {
		g, err := gpx.Read(f)
		if err != nil {
			return nil, err
		}
		if len(g.Tracks) == 0 {
			return nil, fmt.Errorf("%s has no track or route to take as a road", f)
		}
		for _, t := range g.Tracks {
			ls := make(orb.LineString, len(t.Points))
			for i, pt := range t.Points {
				ls[i] = pt.Pos
			}
			out = append(out, ls)
		}
	}
	return out, nil
}
