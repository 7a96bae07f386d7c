package plan

import (
	"bytes"
	"context"
	"encoding/json"
	"fmt"
	"math"
	"path/filepath"
	"runtime"
	"testing"

	"github.com/mastlink/mastlink/plan/feedline"
	"github.com/mastlink/mastlink/plan/gpx"
	"github.com/mastlink/mastlink/plan/units"
	"github.com/paulmach/orb"
)

// demoSites ranks the example candidates with the example plan.
func demoSites(t testing.TB, p *Plan, env *Env, mast *MastSweep) *SitesResult {
	t.Helper()
	g, err := gpx.Read(filepath.Join("..", "examples", "valley", "candidates.gpx"))
	if err != nil {
		t.Fatal(err)
	}
	st, err := p.StationNamed("")
	if err != nil {
		t.Fatal(err)
	}
	r, err := env.RankSites(context.Background(), SitesRequest{Candidates: g.Waypoints, Station: st.End, Targets: p.ReachTargets(st.Name), NeededMarginDB: p.Require.NeededMarginDB(), Mast: mast}, nil)
	if err != nil {
		t.Fatal(err)
	}
	return r
}

// TestRankSitesAgreesWithPlan checks every candidate against the plan's
// own evaluation of a station set up there: the worst margin and the
// targets reached as EvaluatePlan's links give them, and the lowest mast
// as Env.SweepMast recommends it.
func TestRankSitesAgreesWithPlan(t *testing.T) {
	p, env := demoPlan(t)
	r := demoSites(t, p, env, p.Mast)
	if len(r.Sites) != 5 {
		t.Fatalf("%d sites, want the 5 candidates", len(r.Sites))
	}
	st, _ := p.StationNamed("")
	targets := p.ReachTargets(st.Name)
	need := p.Require.NeededMarginDB()
	for i, s := range r.Sites {
		if s.Rank != i+1 {
			t.Errorf("site %d has rank %d", i, s.Rank)
		}
		if i > 0 {
			prev := r.Sites[i-1]
			if prev.WorstMarginDB < s.WorstMarginDB || (prev.WorstMarginDB == s.WorstMarginDB && prev.Reachable < s.Reachable) {
				t.Errorf("%s ranked above %s", prev.Name, s.Name)
			}
		}
		moved := st
		moved.Pos = orb.Point{s.Lon, s.Lat}
		worst, reached, of := math.Inf(1), 0, 0
		for _, tg := range targets {
			var g Geometry
			if err := env.Measure(moved.Pos, tg.Pos, &g); err != nil {
				t.Fatal(err)
			}
			links, err := env.targetLinks(&g, moved.End, tg, need)
			if err != nil {
				t.Fatal(err)
			}
			if tg.Optional {
				continue
			}
			of++
			if *links[0].MeetsRequirement && *links[1].MeetsRequirement {
				reached++
			}
			worst = math.Min(worst, math.Min(links[0].MarginDB, links[1].MarginDB))
		}
		// Same arithmetic on the same profiles: agreement to rounding.
		if math.Abs(worst-s.WorstMarginDB) > 1e-9 || reached != s.Reachable || of != s.Of {
			t.Errorf("%s: worst %.6f dB, %d of %d; Evaluate gives %.6f dB, %d of %d", s.Name, s.WorstMarginDB, s.Reachable, s.Of, worst, reached, of)
		}
		sw, err := env.SweepMast(moved, targets, p.Mast, p.Require)
		if err != nil {
			t.Fatal(err)
		}
		switch {
		case sw.Recommended == nil && s.MastM != nil:
			t.Errorf("%s: mast %.1f m, but the sweep finds none", s.Name, *s.MastM)
		case sw.Recommended != nil && (s.MastM == nil || *s.MastM != sw.Recommended.HeightM || s.Cable != sw.Recommended.Cable):
			t.Errorf("%s: mast %v %q, the sweep recommends %.1f m %s", s.Name, s.MastM, s.Cable, sw.Recommended.HeightM, sw.Recommended.Cable)
		}
	}
}

// TestRankSitesOwnHeight checks that without a sweep the mast is the
// station's own height exactly when the site meets the requirement.
func TestRankSitesOwnHeight(t *testing.T) {
	p, env := demoPlan(t)
	r := demoSites(t, p, env, nil)
	st, _ := p.StationNamed("")
	met := 0
	for _, s := range r.Sites {
		ok := s.WorstMarginDB >= r.NeededMarginDB
		if ok != (s.MastM != nil) || (ok && *s.MastM != st.Antenna.HeightM) || s.Cable != "" {
			t.Errorf("%s: worst %.1f dB, mast %v %q", s.Name, s.WorstMarginDB, s.MastM, s.Cable)
		}
		if ok {
			met++
		}
	}
	if met == 0 || met == len(r.Sites) {
		t.Errorf("%d of %d sites meet the requirement: the demo should tell them apart", met, len(r.Sites))
	}
}

// TestRankSitesDeterministic checks that the ranking does not depend on
// the number of cores.
func TestRankSitesDeterministic(t *testing.T) {
	p, env := demoPlan(t)
	var out [2][]byte
	for i, procs := range []int{1, 2} {
		old := runtime.GOMAXPROCS(procs)
		r := demoSites(t, p, env, p.Mast)
		runtime.GOMAXPROCS(old)
		out[i], _ = json.Marshal(r)
	}
	if !bytes.Equal(out[0], out[1]) {
		t.Error("site rankings differ between GOMAXPROCS 1 and 2")
	}
}

// TestPlanRoutesAndSites checks that the example plan's routes and sites
// sections are evaluated with its handheld and its first station.
func TestPlanRoutesAndSites(t *testing.T) {
	p, env := demoPlan(t)
	if p.Defaults.Radio.PowerW != 5 || p.Defaults.Antenna.HeightM != 1.5 {
		t.Fatalf("plan defaults %+v", p.Defaults)
	}
	routes, err := EvaluatePlanRoutes(context.Background(), p, env, nil)
	if err != nil {
		t.Fatal(err)
	}
	if len(routes) != 1 || routes[0].Walker != HandheldName || len(routes[0].Targets) != len(p.Targets)+len(p.Stations) {
		t.Fatalf("routes: %d, walker %q", len(routes), routes[0].Walker)
	}
	sites, err := EvaluatePlanSites(context.Background(), p, env, nil)
	if err != nil {
		t.Fatal(err)
	}
	if sites == nil || sites.Station != p.Stations[0].Name || len(sites.Sites) != 5 {
		t.Fatalf("sites: %+v", sites)
	}
	if _, err := p.StationNamed("nobody"); err == nil {
		t.Error("an unknown station was accepted")
	}
}

// ExampleEnv_RankSites ranks two candidate hills on a smooth earth for a
// station (6 m antenna) reaching a team 4 km and 8 km away, with
// masts of 2 to 12 m.
func ExampleEnv_RankSites() {
	station := End{Name: "base", Radio: Radio{PowerW: 25, SensitivityDBm: units.DBmFromMicrovolts(0.25)}, Antenna: Antenna{GainDBi: 2.15, HeightM: 6}}
	team := Target{End: End{Name: "team", Pos: orb.Point{7.1, 45}, Radio: Radio{PowerW: 5, SensitivityDBm: units.DBmFromMicrovolts(0.25)}, Antenna: Antenna{HeightM: 1.5}},
		Kind: Simplex, FreqMHz: 146.55}
	cands := []gpx.Place{{Name: "near", Pos: orb.Point{7.05, 45}}, {Name: "far", Pos: orb.Point{7, 45}}}
	heights, _ := units.ParseLengthRange("2m..12m step 2m")
	rg58, _ := feedline.LookupCable("RG-58")
	env := &Env{} // smooth earth; vertical polarization over land (the zero values)
	r, err := env.RankSites(context.Background(), SitesRequest{Candidates: cands, Station: station, Targets: []Target{team}, NeededMarginDB: 20,
		Mast: &MastSweep{Heights: heights, Cables: []feedline.Cable{rg58}, RunM: 5}}, nil)
	if err != nil {
		fmt.Println(err)
		return
	}
	for _, s := range r.Sites {
		mast := "none"
		if s.MastM != nil {
			mast = fmt.Sprintf("%.0f m", *s.MastM)
		}
		fmt.Printf("%d. %s: worst margin %.1f dB, mast %s\n", s.Rank, s.Name, s.WorstMarginDB, mast)
	}
	// Output:
	// 1. near: worst margin 35.1 dB, mast 2 m
	// 2. far: worst margin 22.3 dB, mast 6 m
}
