package plan

import (
	"math"
	"testing"

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
