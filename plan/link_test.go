package plan

import (
	"bytes"
	"encoding/binary"
	"math"
	"os"
	"path/filepath"
	"testing"

	"github.com/mastlink/mastlink/plan/feedline"
	"github.com/mastlink/mastlink/plan/units"
	"github.com/mastlink/mastlink/propagation"
	"github.com/mastlink/mastlink/terrain"
	"github.com/paulmach/orb"
)

// writeHGT writes a 3″ SRTM tile (1201×1201 big-endian int16, rows from the
// north edge; NASA SRTM Topography documentation, 2003) whose height at (row, col) is h(row, col).
func writeHGT(t testing.TB, dir, name string, h func(row, col int) int16) string {
	t.Helper()
	const n = 1201
	var buf bytes.Buffer
	buf.Grow(n * n * 2)
	for r := 0; r < n; r++ {
		for c := 0; c < n; c++ {
			_ = binary.Write(&buf, binary.BigEndian, h(r, c))
		}
	}
	path := filepath.Join(dir, name)
	if err := os.WriteFile(path, buf.Bytes(), 0o644); err != nil {
		t.Fatal(err)
	}
	return path
}

// TestKnifeEdgeRidge builds a DEM of flat ground at sea level with one sharp
// ridge 300 m high along the meridian 10.15°E, and a 0.1° path along the
// equator across it (a geodesic that stays on the equator), with antennas
// 150 m above ground at both ends. The loss must agree with the single
// knife-edge construction of ITU-R P.526-16: ν from eq. 26 with the ridge's
// height above the ray including the earth bulge (the term of eq. 49),
// J(ν) from eq. 31, and the delta-Bullington correction of eq. 57; the
// smooth-earth terms (eqs. 64–66) vanish for such high antennas.
func TestKnifeEdgeRidge(t *testing.T) {
	dir := t.TempDir()
	writeHGT(t, dir, "N00E010.hgt", func(row, col int) int16 {
		if col == 180 { // 10 + 180/1200 = 10.15°E
			return 300
		}
		return 0
	})
	ts, err := terrain.Open(dir)
	if err != nil {
		t.Fatal(err)
	}
	a, b := orb.Point{10.1, 0}, orb.Point{10.2, 0}
	// Distance along the equator: a·Δλ exactly (WGS84 a = 6 378 137 m).
	d := 6378137 * 0.1 * math.Pi / 180
	env := Env{Terrain: ts, Polarization: propagation.Horizontal, StepM: d/120 + 1e-6}
	var g Geometry
	if err := env.Measure(a, b, &g); err != nil {
		t.Fatal(err)
	}
	if math.Abs(g.Profile.DistanceM-d) > 0.01 {
		t.Fatalf("path length %.3f m, want %.3f", g.Profile.DistanceM, d)
	}
	if n := len(g.Profile.ElevM); n != 121 || math.Abs(g.Profile.ElevM[60]-300) > 1e-6 {
		t.Fatalf("profile: %d samples, middle %.3f m", n, g.Profile.ElevM[60])
	}
	const f = 146.0
	res, err := env.PathLoss(&g, 150, 150, f)
	if err != nil {
		t.Fatal(err)
	}
	lambda := 299792458 / (f * 1e6)
	d1 := d / 2 / 1000                                              // km
	ae := 6371 * 4.0 / 3                                            // ITU-R P.530-19 §2.2, k = 4/3
	bulge := 500 * d1 * d1 / ae                                     // m, ITU-R P.526-16 eq. 49 term
	h := 300 + bulge - 150                                          // ridge above the ray, m
	nu := h * math.Sqrt(2/lambda*(2/(d1*1000)))                     // ITU-R P.526-16 eq. 26
	j := 6.9 + 20*math.Log10(math.Sqrt((nu-0.1)*(nu-0.1)+1)+nu-0.1) // eq. 31
	want := j + (1-math.Exp(-j/6))*(10+0.02*d/1000)                 // eq. 57
	if math.Abs(res.ExcessDB-want) > 0.05 {
		t.Errorf("excess loss %.3f dB, knife-edge construction %.3f dB (ν %.3f, J %.3f)", res.ExcessDB, want, nu, j)
	}
	if res.LineOfSight || res.ObstacleIndex != 60 {
		t.Errorf("line of sight %v, obstacle at %d; want blocked at 60", res.LineOfSight, res.ObstacleIndex)
	}
}

// TestEvaluateBudget checks the budget arithmetic of one link against the
// link-budget definitions (EIRP = P − line + G; received = EIRP − path + G −
// line; margin = received − sensitivity) and the free-space loss of ITU-R
// P.525 (20 log(4πd/λ)) over the geodesic length.
func TestEvaluateBudget(t *testing.T) {
	rg8x, err := feedline.LookupCable("RG-8X")
	if err != nil {
		t.Fatal(err)
	}
	tx := End{Name: "a", Pos: orb.Point{10, 45}, Radio: Radio{PowerW: 25}, Antenna: Antenna{GainDBi: 2.15, HeightM: 9}, Feedline: feedline.NewLine(rg8x, 20)}
	rx := End{Name: "b", Pos: orb.Point{10.1, 45.05}, Radio: Radio{SensitivityDBm: units.DBmFromMicrovolts(0.25)}, Antenna: Antenna{GainDBi: 6, HeightM: 20}}
	env := Env{Model: nil, SigmaDB: 5.5}
	var g Geometry
	if err := env.Measure(tx.Pos, rx.Pos, &g); err != nil {
		t.Fatal(err)
	}
	r, err := env.Evaluate(&g, tx, rx, 146.94, true)
	if err != nil {
		t.Fatal(err)
	}
	fl, _ := tx.Feedline.Loss(146.94)
	if math.Abs(r.TxFeedlineLossDB-fl.TotalLossDB) > 1e-9 || r.RxFeedlineLossDB != 0 {
		t.Errorf("feedline losses %v / %v", r.TxFeedlineLossDB, r.RxFeedlineLossDB)
	}
	wantEIRP := 10*math.Log10(25000) - fl.TotalLossDB + 2.15
	if math.Abs(r.EIRPDBm-wantEIRP) > 1e-9 {
		t.Errorf("EIRP %v, want %v", r.EIRPDBm, wantEIRP)
	}
	lambda := 299792458 / 146.94e6
	fs := 20 * math.Log10(4*math.Pi*r.DistanceM/lambda) // ITU-R P.525
	if math.Abs(r.FreeSpaceLossDB-fs) > 1e-6 {
		t.Errorf("free space %v, want %v", r.FreeSpaceLossDB, fs)
	}
	if math.Abs(r.PathLossDB-(r.FreeSpaceLossDB+r.ExcessLossDB)) > 1e-9 {
		t.Errorf("path loss is not free space + excess")
	}
	if got := wantEIRP - r.PathLossDB + 6; math.Abs(r.RxPowerDBm-got) > 1e-9 {
		t.Errorf("received %v, want %v", r.RxPowerDBm, got)
	}
	if math.Abs(r.MarginDB-(r.RxPowerDBm-r.RxSensitivityDBm)) > 1e-9 {
		t.Errorf("margin")
	}
	// Reciprocity: the same geometry evaluated from the other end gives the
	// same path loss with the heights swapped.
	back, err := env.Evaluate(&g, rx, tx, 146.94, false)
	if err != nil {
		t.Fatal(err)
	}
	if math.Abs(back.PathLossDB-r.PathLossDB) > 1e-9 {
		t.Errorf("path loss differs by direction: %v vs %v", back.PathLossDB, r.PathLossDB)
	}
	if math.Abs(math.Mod(back.AzimuthDeg-r.AzimuthDeg-180+540, 360)-180) > 0.2 {
		t.Errorf("back azimuth %v vs %v", back.AzimuthDeg, r.AzimuthDeg)
	}
	if r.Probability == nil || *r.Probability <= 0 || *r.Probability > 1 {
		t.Errorf("probability %v", r.Probability)
	}
}
