package plan

import (
	"context"
	"math"
	"testing"

	"github.com/mastlink/mastlink/plan/exposure"
	"github.com/mastlink/mastlink/plan/feedline"
	"github.com/mastlink/mastlink/plan/units"
	"github.com/mastlink/mastlink/terrain"
	"github.com/paulmach/orb"
)

// TestSweepProperties checks properties any sound sweep has, over flat
// ground (a synthetic tile at 120 m everywhere): a higher mast never loses
// Fresnel clearance nor raises the path loss, and more cable never lowers
// the feedline loss, so margins at one height fall as the cable grows.
func TestSweepProperties(t *testing.T) {
	dir := t.TempDir()
	writeHGT(t, dir, "N45E007.hgt", func(row, col int) int16 { return 120 })
	ts, err := terrain.Open(dir)
	if err != nil {
		t.Fatal(err)
	}
	env := &Env{Terrain: ts}
	st := Station{End: End{Name: "s", Pos: orb.Point{7.1, 45.1}, Radio: Radio{PowerW: 25, SensitivityDBm: -119}, Antenna: Antenna{GainDBi: 2.15}}}
	tg := Target{End: End{Name: "t", Pos: orb.Point{7.35, 45.3}, Radio: Radio{PowerW: 5, SensitivityDBm: -119}, Antenna: Antenna{HeightM: 1.5}}, FreqMHz: 146.55}
	var g Geometry
	if err := env.Measure(st.Pos, tg.Pos, &g); err != nil {
		t.Fatal(err)
	}
	prevClear, prevLoss := math.Inf(-1), math.Inf(1)
	for h := 1.0; h <= 30; h += 0.5 {
		r, err := env.PathLoss(&g, h, 1.5, 146.55)
		if err != nil {
			t.Fatal(err)
		}
		if r.WorstClearanceF1 < prevClear-1e-9 {
			t.Errorf("clearance fell from %.4f to %.4f raising the mast to %.1f m", prevClear, r.WorstClearanceF1, h)
		}
		if r.PathLossDB > prevLoss+1e-9 {
			t.Errorf("path loss rose from %.4f to %.4f dB raising the mast to %.1f m", prevLoss, r.PathLossDB, h)
		}
		prevClear, prevLoss = r.WorstClearanceF1, r.PathLossDB
	}
	for _, c := range feedline.Cables() {
		for _, f := range []float64{50, 146, 440, 900} {
			prev := -1.0
			for l := 0.0; l <= 100; l += 2.5 {
				fl := feedline.NewLine(c, l)
				fl.SWR = 1.5
				loss, err := fl.Loss(f)
				if err != nil {
					t.Fatal(err)
				}
				if loss.TotalLossDB < prev {
					t.Errorf("%s at %g MHz: %g m loses %.4f dB, less than a shorter cable (%.4f)", c.Name, f, l, loss.TotalLossDB, prev)
				}
				prev = loss.TotalLossDB
			}
		}
	}
	rg58, _ := feedline.LookupCable("RG-58")
	rg213, _ := feedline.LookupCable("RG-213")
	m := &MastSweep{Heights: units.LengthRange{FromM: 2, ToM: 12, StepM: 2}, Cables: []feedline.Cable{rg58, rg213}, RunM: 10, SlackM: 1}
	res, err := env.SweepMast(st, []Target{tg}, m, Requirement{MarginDB: 10})
	if err != nil {
		t.Fatal(err)
	}
	for _, r := range res.Rows {
		if r.CableLengthM != r.HeightM+11 {
			t.Errorf("cable length %v for a %v m mast", r.CableLengthM, r.HeightM)
		}
	}
	// The thicker cable loses less, so at each height its margin is higher.
	for i := 0; i+1 < len(res.Rows); i += 2 {
		if res.Rows[i+1].WorstMarginDB <= res.Rows[i].WorstMarginDB {
			t.Errorf("at %v m RG-213 (%.2f dB) is not better than RG-58 (%.2f dB)", res.Rows[i].HeightM, res.Rows[i+1].WorstMarginDB, res.Rows[i].WorstMarginDB)
		}
	}
	if res.Recommended != nil {
		for _, r := range res.Rows {
			if r.MeetsRequirement && r.HeightM < res.Recommended.HeightM {
				t.Errorf("a lower mast (%v m) meets the requirement but %v m was recommended", r.HeightM, res.Recommended.HeightM)
			}
		}
	}
}

// exposurePlan is a 50 W FM station with a 2.15 dBi antenna on a 6 m mast,
// transmitting continuously, 2 km from a handheld over a smooth earth, so
// every mast of the sweep (2–8 m) reaches it and the lowest is recommended.
func exposurePlan(limitM float64) *Plan {
	rg213, _ := feedline.LookupCable("RG-213")
	st := Station{End: End{Name: "base", Pos: orb.Point{7.1, 45.1}, Radio: Radio{PowerW: 50, SensitivityDBm: -119},
		Antenna: Antenna{GainDBi: 2.15, HeightM: 6}, Feedline: feedline.NewLine(rg213, 17)}}
	st.Exposure = exposure.Input{Mode: exposure.ModeFM}
	tg := Target{End: End{Name: "t", Pos: orb.Point{7.1, 45.118}, Radio: Radio{PowerW: 5, SensitivityDBm: -119}, Antenna: Antenna{HeightM: 1.5}}, FreqMHz: 146}
	return &Plan{FreqMHz: 146, K: 4.0 / 3, Stations: []Station{st}, Targets: []Target{tg}, Require: Requirement{MarginDB: 10},
		Mast: &MastSweep{Heights: units.LengthRange{FromM: 2, ToM: 8, StepM: 1}, Cables: []feedline.Cable{rg213}, RunM: 10, SlackM: 1, KeepoutLimitM: limitM}}
}

// TestPlanExposureAtRecommendation: the station as planned (6 m) needs no
// public keep-out, but the sweep recommends a 2 m mast, where the antenna is
// at head height and the keep-out is the whole compliance distance (the
// geometry of a standing person; FCC OET Bulletin 65 eq. 6 distance). The
// plan must report both.
func TestPlanExposureAtRecommendation(t *testing.T) {
	res, err := EvaluatePlan(context.Background(), exposurePlan(0), &Env{K: 4.0 / 3}, nil)
	if err != nil {
		t.Fatal(err)
	}
	if res.Mast.Recommended == nil || res.Mast.Recommended.HeightM != 2 {
		t.Fatalf("recommended %+v, want a 2 m mast", res.Mast.Recommended)
	}
	if len(res.Exposure) != 2 {
		t.Fatalf("exposure entries %d, want the planned and the recommended configuration", len(res.Exposure))
	}
	planned, rec := res.Exposure[0], res.Exposure[1]
	if planned.Configuration != ConfigPlanned || planned.AntennaHeightM != 6 || planned.KeepoutPublicM != 0 {
		t.Errorf("planned: %s at %g m, keep-out %g m; want planned, 6 m, none", planned.Configuration, planned.AntennaHeightM, planned.KeepoutPublicM)
	}
	if rec.Configuration != ConfigRecommended || rec.AntennaHeightM != 2 || rec.CableLengthM != 13 {
		t.Errorf("recommended: %s at %g m with %g m of cable; want recommended, 2 m, 13 m", rec.Configuration, rec.AntennaHeightM, rec.CableLengthM)
	}
	// 2 m is head height: keep-out = compliance distance, about 2.7 m after
	// the cable's loss (2.89 m without it) [calc].
	if rec.KeepoutPublicM != rec.DistancePublicM || rec.KeepoutPublicM < 2.5 || rec.KeepoutPublicM > 2.9 {
		t.Errorf("recommended keep-out %g m, distance %g m", rec.KeepoutPublicM, rec.DistancePublicM)
	}
	if len(res.Mast.Cautions) == 0 || len(res.Cautions) == 0 {
		t.Error("mast or plan cautions missing")
	}
}

// TestMastKeepoutLimit: with 2 m of clear space around the mast foot, the
// rows whose public keep-out exceeds it are marked and the recommendation
// is the lowest mast within it (geometry: √(R² − (h − 2 m)²)).
func TestMastKeepoutLimit(t *testing.T) {
	res, err := EvaluatePlan(context.Background(), exposurePlan(2), &Env{K: 4.0 / 3}, nil)
	if err != nil {
		t.Fatal(err)
	}
	m := res.Mast
	if m.KeepoutLimitM != 2 {
		t.Errorf("limit %g m", m.KeepoutLimitM)
	}
	marked := 0
	for _, r := range m.Rows {
		if r.OverKeepoutLimit != (r.KeepoutPublicM > 2) {
			t.Errorf("%g m: keep-out %g m, marked %v", r.HeightM, r.KeepoutPublicM, r.OverKeepoutLimit)
		}
		if r.OverKeepoutLimit {
			marked++
		}
	}
	if marked == 0 {
		t.Fatal("no row over the limit; the test needs some")
	}
	rec := m.Recommended
	if rec == nil {
		t.Fatal("nothing recommended")
	}
	for _, r := range m.Rows {
		if r.HeightM == rec.HeightM && r.Cable == rec.Cable && r.OverKeepoutLimit {
			t.Errorf("recommended a %g m mast whose keep-out %g m exceeds the limit", r.HeightM, r.KeepoutPublicM)
		}
		if r.MeetsRequirement && !r.OverKeepoutLimit && r.HeightM < rec.HeightM {
			t.Errorf("a lower mast (%g m) is within the limit but %g m was recommended", r.HeightM, rec.HeightM)
		}
	}
	if rec.HeightM <= 2 {
		t.Errorf("recommended %g m, where the keep-out is the whole compliance distance", rec.HeightM)
	}
}
