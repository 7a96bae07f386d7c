package plan

import (
	"context"
	"math"
	"testing"

	"github.com/mastlink/mastlink/terrain"
	"github.com/paulmach/orb"
)

// demoRelay is the example plan's relay between Team Birch and Team Cedar,
// who cannot hear each other (invented terrain).
func demoRelay(t testing.TB, mutate func(*RelayRequest)) (*Env, RelayRequest, *RelayResult) {
	t.Helper()
	p, env := demoPlan(t)
	a, err := p.Party("Team Birch")
	if err != nil {
		t.Fatal(err)
	}
	b, err := p.Party("team cedar")
	if err != nil {
		t.Fatal(err)
	}
	req := RelayRequest{A: a, B: b, Relay: p.Defaults, FreqAMHz: p.FreqMHz, FreqBMHz: p.FreqMHz,
		HeightsM: []float64{2}, RadiusM: 14000, NeededMarginDB: p.Require.NeededMarginDB(), Spots: 4}
	req.Relay.Name = "relay"
	if mutate != nil {
		mutate(&req)
	}
	res, err := env.FindRelay(context.Background(), req, nil)
	if err != nil {
		t.Fatal(err)
	}
	return env, req, res
}

// linkMargins recomputes a spot's two links with Env.Evaluate, the `link`
// computation, both ways each.
func linkMargins(t testing.TB, env *Env, req RelayRequest, s RelaySpot) (toA, toB float64) {
	t.Helper()
	relay := req.Relay
	relay.Pos, relay.Antenna.HeightM = orb.Point{s.Lon, s.Lat}, s.HeightM
	out := [2]float64{}
	for i, p := range []End{req.A, req.B} {
		f := req.FreqAMHz
		if i == 1 {
			f = req.FreqBMHz
		}
		var g Geometry
		if err := env.Measure(p.Pos, relay.Pos, &g); err != nil { // measured from the party this time
			t.Fatal(err)
		}
		up, err := env.Evaluate(&g, p, relay, f, true)
		if err != nil {
			t.Fatal(err)
		}
		down, err := env.Evaluate(&g, relay, p, f, false)
		if err != nil {
			t.Fatal(err)
		}
		out[i] = math.Min(up.MarginDB, down.MarginDB)
	}
	return out[0], out[1]
}

// TestRelayBestSpotMeetsWithLink: the parties cannot work each other
// directly; where any cell meets the requirement on the maps, the best
// spot's two links recomputed with the link computation (profiles measured
// from the parties, the other way round from the search) meet it both
// ways, and agree with the spot's reported margins. Spots are distinct
// (at least 500 m apart) and ranked by worst margin.
func TestRelayBestSpotMeetsWithLink(t *testing.T) {
	env, req, res := demoRelay(t, nil)
	if res.DirectMarginDB >= 0 {
		t.Fatalf("direct margin %+.1f dB: the demo parties should not hear each other", res.DirectMarginDB)
	}
	if res.CellsMeeting == 0 || len(res.Spots) == 0 {
		t.Fatalf("no cell meets %.1f dB (%d cells)", res.NeededMarginDB, res.Cells)
	}
	best := res.Spots[0]
	a, b := linkMargins(t, env, req, best)
	if !(a >= req.NeededMarginDB && b >= req.NeededMarginDB) || !res.MeetsRequirement {
		t.Errorf("best spot: link gives %+.2f dB to A, %+.2f dB to B; need %.1f (meets %v)", a, b, req.NeededMarginDB, res.MeetsRequirement)
	}
	// Reciprocal profiles: the same margins within the profile's sampling.
	if math.Abs(a-best.MarginToADB) > 0.5 || math.Abs(b-best.MarginToBDB) > 0.5 {
		t.Errorf("best spot: reported %+.2f/%+.2f dB, link %+.2f/%+.2f dB", best.MarginToADB, best.MarginToBDB, a, b)
	}
	// The map's figure of the cell is near the link's (the radial engine's
	// accuracy, TestCoverageLossAgainstLink: 98 % within 1 dB).
	if math.Abs(best.MapWorstMarginDB-best.WorstMarginDB) > 3 {
		t.Errorf("map %+.2f dB vs link %+.2f dB at the best spot", best.MapWorstMarginDB, best.WorstMarginDB)
	}
	for i, s := range res.Spots {
		if s.Rank != i+1 || s.WorstMarginDB != math.Min(s.MarginToADB, s.MarginToBDB) {
			t.Errorf("spot %d: %+v", i, s)
		}
		if i > 0 && math.Floor(s.WorstMarginDB) > math.Floor(res.Spots[i-1].WorstMarginDB) {
			t.Errorf("spot %d (%+.2f dB) ranked below %+.2f dB", i+1, s.WorstMarginDB, res.Spots[i-1].WorstMarginDB)
		}
		for _, o := range res.Spots[:i] {
			if d, _, _ := terrain.Inverse(s.Lat, s.Lon, o.Lat, o.Lon); d < DefaultRelaySeparationM {
				t.Errorf("spots %d and %d only %.0f m apart", o.Rank, s.Rank, d)
			}
		}
		if s.DistanceToAM > req.RadiusM+200 || s.DistanceToBM > req.RadiusM+200 {
			t.Errorf("spot %d is %.0f/%.0f m from the parties, beyond the radius", s.Rank, s.DistanceToAM, s.DistanceToBM)
		}
	}
}

// TestRelayNoSpotMeets: with a requirement nothing can meet, the answer
// says so and still gives the best there is.
func TestRelayNoSpotMeets(t *testing.T) {
	_, _, res := demoRelay(t, func(r *RelayRequest) { r.NeededMarginDB = 200 })
	if res.MeetsRequirement || res.CellsMeeting != 0 {
		t.Errorf("meets %v with %d cells at 200 dB", res.MeetsRequirement, res.CellsMeeting)
	}
	if len(res.Spots) == 0 {
		t.Fatal("no spots: want the best there is")
	}
	for _, s := range res.Spots[1:] {
		if math.Floor(s.WorstMarginDB) > math.Floor(res.Spots[0].WorstMarginDB) {
			t.Errorf("spot %d (%+.1f dB) better than the first (%+.1f dB)", s.Rank, s.WorstMarginDB, res.Spots[0].WorstMarginDB)
		}
	}
}

// TestRelayCrossBand: each side on its own frequency; the spot's link to
// B is the link computation's at B's frequency, not at A's (they differ by
// more than a decibel over these paths: free space alone is
// 20·log10(446/146.55) = 9.7 dB more at 446 MHz, ITU-R P.525-4 eq. 4,
// less what the larger Fresnel zone at 146.55 MHz loses to the terrain).
func TestRelayCrossBand(t *testing.T) {
	env, req, res := demoRelay(t, func(r *RelayRequest) { r.FreqBMHz = 446 })
	if res.FreqBMHz != 446 || len(res.Spots) == 0 {
		t.Fatalf("%+v", res)
	}
	s := res.Spots[0]
	a, b := linkMargins(t, env, req, s)
	if math.Abs(a-s.MarginToADB) > 0.5 || math.Abs(b-s.MarginToBDB) > 0.5 {
		t.Errorf("cross-band: reported %+.2f/%+.2f, link %+.2f/%+.2f", s.MarginToADB, s.MarginToBDB, a, b)
	}
	same := req
	same.FreqBMHz = req.FreqAMHz
	_, b2 := linkMargins(t, env, same, s)
	if math.Abs(b2-s.MarginToBDB) < 1 {
		t.Errorf("to B at 146.55 MHz %+.1f dB, reported at 446 MHz %+.1f dB: want the 446 MHz figure", b2, s.MarginToBDB)
	}
}

// TestRelayRefusesBadRequests names what is wrong.
func TestRelayRefusesBadRequests(t *testing.T) {
	p, env := demoPlan(t)
	a, _ := p.Party("Team Birch")
	b, _ := p.Party("Team Cedar")
	base := RelayRequest{A: a, B: b, Relay: p.Defaults, FreqAMHz: 146.55, FreqBMHz: 146.55, RadiusM: 14000}
	for name, mut := range map[string]func(*RelayRequest){
		"no radio":     func(r *RelayRequest) { r.Relay.Radio = Radio{} },
		"no frequency": func(r *RelayRequest) { r.FreqBMHz = 0 },
		"zero height":  func(r *RelayRequest) { r.HeightsM = []float64{0} },
		"radius short": func(r *RelayRequest) { r.RadiusM = 5000 },
	} {
		r := base
		mut(&r)
		if _, err := env.FindRelay(context.Background(), r, nil); err == nil {
			t.Errorf("%s: no error", name)
		}
	}
	if _, err := p.Party("Nowhere Tarn"); err == nil {
		t.Error("unknown party: no error")
	}
	if e, err := p.Party("-48.5,-124.0"); err != nil || e.Radio != p.Defaults.Radio {
		t.Errorf("LAT,LON party: %v %+v", err, e)
	}
}

// TestRoadDistances: the chamfer distance from a straight road is within
// 8 % (plus half a cell for where the road crosses its cell) of the exact
// distance from the cell's centre to the line (G. Borgefors 1986 gives the
// 3 × 3 chamfer's largest error as about 8 %; from memory).
func TestRoadDistances(t *testing.T) {
	g := &RelayGrid{Rows: 200, Cols: 300, West: 7.0, North: 45.2, DLatDeg: 1.0 / 1200, DLonDeg: 1.0 / 1200}
	g.Values = make([]float32, g.Rows*g.Cols)
	// A road from the west edge to the east edge, rising to the north-east.
	road := orb.LineString{{7.0, 45.1}, {7.25, 45.15}}
	d := roadDistances(g, []orb.LineString{road})
	nM, eM := metresPerDegreeWGS84(45.2 - 100.0/1200)
	cell := math.Hypot(g.DLatDeg*nM, g.DLonDeg*eM)
	ax, ay := road[0].Lon()*eM, road[0].Lat()*nM
	bx, by := road[1].Lon()*eM, road[1].Lat()*nM
	for i := 0; i < len(d); i += 97 {
		lat, lon := g.centre(i)
		px, py := lon*eM, lat*nM
		tt := math.Max(0, math.Min(1, ((px-ax)*(bx-ax)+(py-ay)*(by-ay))/((bx-ax)*(bx-ax)+(by-ay)*(by-ay))))
		exact := math.Hypot(px-(ax+tt*(bx-ax)), py-(ay+tt*(by-ay)))
		if math.Abs(d[i]-exact) > 0.08*exact+cell {
			t.Fatalf("cell %d: chamfer %.0f m, exact %.0f m", i, d[i], exact)
		}
	}
}

// TestRelayRanking: margins in whole dB first, then the nearer road, then
// the lower mast.
func TestRelayRanking(t *testing.T) {
	a := relayCell{index: 5, margin: 12.9, height: 6, road: 900}
	b := relayCell{index: 6, margin: 12.1, height: 6, road: 100}
	c := relayCell{index: 7, margin: 12.5, height: 2, road: 100}
	d := relayCell{index: 8, margin: 13.0, height: 8, road: 5000}
	if !b.before(&a) || !c.before(&b) || !d.before(&c) || a.before(&b) {
		t.Error("ranking: want d (13 dB), then c (12 dB, road 100 m, 2 m), b (12 dB, road 100 m, 6 m), a (12 dB, road 900 m)")
	}
	a.road, b.road = math.NaN(), math.NaN()
	if !a.before(&b) {
		t.Error("without roads, the exact margin decides")
	}
}
