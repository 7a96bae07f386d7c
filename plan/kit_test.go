package plan

import (
	"errors"
	"math"
	"strconv"
	"strings"
	"testing"

	"github.com/mastlink/mastlink/plan/antenna"
	"github.com/mastlink/mastlink/plan/feedline"
	"github.com/mastlink/mastlink/plan/units"
	"github.com/mastlink/mastlink/propagation"
	"github.com/mastlink/mastlink/terrain"
	"github.com/paulmach/orb"
)

// flatEnv is flat ground at 120 m (a synthetic 3″ tile) and two ends
// about 20 km apart on it.
func flatEnv(t testing.TB) (*Env, End, End) {
	t.Helper()
	dir := t.TempDir()
	writeHGT(t, dir, "N45E007.hgt", func(row, col int) int16 { return 120 })
	ts, err := terrain.Open(dir)
	if err != nil {
		t.Fatal(err)
	}
	a := End{Name: "a", Pos: orb.Point{7.1, 45.1}, Radio: Radio{PowerW: 25, SensitivityDBm: -119}, Antenna: Antenna{GainDBi: 0, HeightM: 10}}
	b := End{Name: "b", Pos: orb.Point{7.35, 45.2}, Radio: Radio{PowerW: 5, SensitivityDBm: -119}, Antenna: Antenna{GainDBi: 0, HeightM: 10}}
	return &Env{Terrain: ts}, a, b
}

func withOptions(t testing.TB, a Antenna, o AntennaOptions) Antenna {
	t.Helper()
	if err := o.Apply(&a); err != nil {
		t.Fatal(err)
	}
	return a
}

// TestYagiAimedAtAndAwayInLink: a Yagi aimed at the far end and aimed
// directly away differ, in the link budget, by its front-to-back ratio
// within 0.5 dB (the path leaves within a fraction of a degree of the
// horizontal, where the cosⁿ elevation lobe is within 0.01 dB of its peak).
// The catalog's front-to-back ratio is typical (common practice, from
// memory); the check is that the link uses the pattern toward the path.
func TestYagiAimedAtAndAwayInLink(t *testing.T) {
	env, a, b := flatEnv(t)
	var g Geometry
	if err := env.Measure(a.Pos, b.Pos, &g); err != nil {
		t.Fatal(err)
	}
	for _, name := range []string{"yagi-3el-2m", "yagi-5el-2m"} {
		yagi, err := antenna.Lookup(name)
		if err != nil {
			t.Fatal(err)
		}
		for _, txEnd := range []bool{true, false} { // the Yagi transmitting, then receiving
			margin := func(bearing float64) (float64, LinkResult) {
				y := a
				y.Antenna = withOptions(t, a.Antenna, AntennaOptions{Type: name, Bearing: strconv.FormatFloat(bearing, 'f', -1, 64)})
				tx, rx, at := y, b, true
				if !txEnd {
					tx, rx, at = b, y, false
				}
				r, err := env.Evaluate(&g, tx, rx, 146.55, at)
				if err != nil {
					t.Fatal(err)
				}
				return r.MarginDB, r
			}
			az := g.Profile.AzimuthDeg
			at, r := margin(az)
			away, _ := margin(math.Mod(az+180, 360))
			if d := at - away; math.Abs(d-yagi.FrontToBackDB) > 0.5 {
				t.Errorf("%s (tx %v): aimed at %.2f dB, away %.2f dB: difference %.2f dB, want the front-to-back %.1f dB ± 0.5", name, txEnd, at, away, d, yagi.FrontToBackDB)
			}
			g0 := r.TxGainTowardPathDBi
			if !txEnd {
				g0 = r.RxGainTowardPathDBi
			}
			if math.Abs(g0-yagi.GainDBi) > 0.05 {
				t.Errorf("%s aimed at the far end: gain toward the path %.3f dBi, want about its peak %.1f dBi", name, g0, yagi.GainDBi)
			}
		}
	}
}

// TestDirectionalWithoutBearingAimsAtFarEnd: no bearing means aimed at the
// far end, and the result says so.
func TestDirectionalWithoutBearingAimsAtFarEnd(t *testing.T) {
	env, a, b := flatEnv(t)
	var g Geometry
	if err := env.Measure(a.Pos, b.Pos, &g); err != nil {
		t.Fatal(err)
	}
	a.Antenna = withOptions(t, a.Antenna, AntennaOptions{Type: "yagi-3el-2m"})
	r, err := env.Evaluate(&g, a, b, 146.55, true)
	if err != nil {
		t.Fatal(err)
	}
	if r.TxBearingDeg == nil || math.Abs(*r.TxBearingDeg-r.AzimuthDeg) > 1e-9 {
		t.Errorf("bearing %v, want the path's azimuth %.2f", r.TxBearingDeg, r.AzimuthDeg)
	}
	if len(r.Notes) != 1 || !strings.Contains(r.Notes[0], "aimed at the far end") {
		t.Errorf("notes %q, want one saying the Yagi is aimed at the far end", r.Notes)
	}
	// Out of band: a 2 m Yagi at 446 MHz is noted.
	r, err = env.Evaluate(&g, a, b, 446, true)
	if err != nil {
		t.Fatal(err)
	}
	if len(r.Notes) != 2 || !strings.Contains(r.Notes[0], "not made for 446") {
		t.Errorf("notes %q, want the band warning first", r.Notes)
	}
}

// p2108 is ITU-R P.2108-1 (09/2021) §3.1 eqs. (2a)–(2g), written out here
// independently of the package, with J(ν) from ITU-R P.526-16 eq. 31.
func p2108(diffraction bool, fGHz, h, r, ws float64) float64 {
	if h >= r {
		return 0
	}
	if !diffraction {
		return -(21.8 + 6.2*math.Log10(fGHz)) * math.Log10(h/r) // (2b), (2f)
	}
	hdif := r - h                                         // (2d)
	theta := math.Atan(hdif/ws) * 180 / math.Pi           // (2e), degrees
	nu := 0.342 * math.Sqrt(fGHz) * math.Sqrt(hdif*theta) // (2g), (2c)
	j := 6.9 + 20*math.Log10(math.Sqrt((nu-0.1)*(nu-0.1)+1)+nu-0.1)
	return j - 6.03 // (2a)
}

// TestClutterInLinkAgainstP2108: a terminal in each clutter class of ITU-R
// P.2108-1 Table 3 (representative heights 10, 10, 10, 15, 15, 20 m;
// street width 27 m), antenna at 1.5 m, at 146 and 446 MHz: the link's
// clutter loss at that end equals the recommendation's equations, the
// margin falls by exactly that much, and an antenna above the clutter
// (25 m) has none.
func TestClutterInLinkAgainstP2108(t *testing.T) {
	env, a, b := flatEnv(t)
	var g Geometry
	if err := env.Measure(a.Pos, b.Pos, &g); err != nil {
		t.Fatal(err)
	}
	classes := []struct {
		name    string
		r       float64
		diffrac bool
	}{ // ITU-R P.2108-1 Table 3
		{"water", 10, false}, {"open", 10, false}, {"suburban", 10, true},
		{"urban", 15, true}, {"forest", 15, true}, {"dense-urban", 20, true},
	}
	for _, f := range []float64{146, 446} {
		a.Antenna.HeightM = 1.5
		for _, c := range classes {
			for _, h := range []float64{1.5, 25} {
				rx := b
				rx.Antenna.HeightM = h
				open, err := env.Evaluate(&g, a, rx, f, true)
				if err != nil {
					t.Fatal(err)
				}
				rx.Antenna = withOptions(t, rx.Antenna, AntennaOptions{Clutter: c.name})
				r, err := env.Evaluate(&g, a, rx, f, true)
				if err != nil {
					t.Fatal(err)
				}
				want := p2108(c.diffrac, f/1000, h, c.r, 27)
				if math.Abs(r.RxClutterLossDB-want) > 1e-9 || r.TxClutterLossDB != 0 || r.ClutterLossDB != r.RxClutterLossDB {
					t.Errorf("%s at %g MHz, %g m: clutter %.4f dB (tx %.4f, total %.4f), P.2108-1 gives %.4f dB",
						c.name, f, h, r.RxClutterLossDB, r.TxClutterLossDB, r.ClutterLossDB, want)
				}
				if d := open.MarginDB - r.MarginDB; math.Abs(d-want) > 1e-9 {
					t.Errorf("%s at %g MHz, %g m: margin fell %.4f dB, want %.4f", c.name, f, h, d, want)
				}
				if h == 25 && want != 0 {
					t.Errorf("%s: antenna at 25 m is above the clutter, loss %.3f", c.name, want)
				}
				if h == 1.5 && !(want > 0) {
					t.Errorf("%s at 1.5 m: no loss", c.name)
				}
			}
		}
	}
}

// TestBodyLossDefaults: a handheld antenna type takes the typical loss at
// the face (antenna.BodyLossFaceDB, marked typical), other types none;
// belt and a figure in dB override; the loss comes off the EIRP.
func TestBodyLossDefaults(t *testing.T) {
	cases := []struct {
		o     AntennaOptions
		loss  float64
		label string
	}{
		{AntennaOptions{Type: "handheld-whip"}, antenna.BodyLossFaceDB, "face, typical"},
		{AntennaOptions{Type: "handheld-stub", BodyLoss: "belt"}, antenna.BodyLossBeltDB, "belt, typical"},
		{AntennaOptions{Type: "handheld-whip", BodyLoss: "none"}, 0, "none"},
		{AntennaOptions{Type: "handheld-whip", BodyLoss: "4.5dB"}, 4.5, "given"},
		{AntennaOptions{Type: "dipole"}, 0, ""},
		{AntennaOptions{}, 0, ""},
		{AntennaOptions{BodyLoss: "face"}, antenna.BodyLossFaceDB, "face, typical"},
	}
	env, a, b := flatEnv(t)
	var g Geometry
	if err := env.Measure(a.Pos, b.Pos, &g); err != nil {
		t.Fatal(err)
	}
	plain, err := env.Evaluate(&g, a, b, 146.55, true)
	if err != nil {
		t.Fatal(err)
	}
	for _, c := range cases {
		x := withOptions(t, Antenna{HeightM: 10}, c.o)
		if x.BodyLossDB != c.loss || x.BodyLoss != c.label {
			t.Errorf("%+v: body loss %g dB %q, want %g dB %q", c.o, x.BodyLossDB, x.BodyLoss, c.loss, c.label)
		}
		tx := a
		tx.Antenna = x
		tx.Antenna.GainDBi = 0 // only the body loss differs from plain
		tx.Antenna.Type = nil
		r, err := env.Evaluate(&g, tx, b, 146.55, true)
		if err != nil {
			t.Fatal(err)
		}
		if d := plain.EIRPDBm - r.EIRPDBm; math.Abs(d-c.loss) > 1e-9 || r.TxBodyLossDB != c.loss {
			t.Errorf("%+v: EIRP fell %.3f dB, want %.3f", c.o, d, c.loss)
		}
	}
	// Replacing a handheld type by a mast antenna drops the typical default.
	x := withOptions(t, withOptions(t, Antenna{}, AntennaOptions{Type: "handheld-whip"}), AntennaOptions{Type: "ground-plane"})
	if x.BodyLossDB != 0 {
		t.Errorf("handheld then ground plane: body loss %g dB, want 0", x.BodyLossDB)
	}
}

// TestAntennaOptionsGainOverride: the type sets the catalog gain, a given
// gain overrides it and keeps the pattern.
func TestAntennaOptionsGainOverride(t *testing.T) {
	x := withOptions(t, Antenna{}, AntennaOptions{Type: "collinear-2"})
	if x.GainDBi != 4.5 || x.Type == nil || x.Type.Name != "collinear-2" {
		t.Errorf("collinear-2: %+v", x)
	}
	x = withOptions(t, Antenna{}, AntennaOptions{Type: "yagi-3el-2m", Gain: "6dBi", Bearing: "270"})
	if x.GainDBi != 6 || !x.Aimed || x.BearingDeg != 270 {
		t.Errorf("override: %+v", x)
	}
	// Behind, the pattern still takes the front-to-back off the given gain.
	if g := x.GainTowardDBi(90, 0); math.Abs(g-(6-15)) > 1e-9 {
		t.Errorf("behind: %.3f dBi, want %.1f", g, 6.0-15)
	}
}

func TestAntennaOptionsErrors(t *testing.T) {
	cases := []struct {
		o   AntennaOptions
		key string
	}{
		{AntennaOptions{Type: "yagi-11el"}, OptAntennaType},
		{AntennaOptions{Bearing: "north"}, OptBearing},
		{AntennaOptions{Bearing: "361"}, OptBearing},
		{AntennaOptions{Bearing: "-5"}, OptBearing},
		{AntennaOptions{Gain: "lots"}, OptGain},
		{AntennaOptions{Height: "tall"}, OptHeight},
		{AntennaOptions{BodyLoss: "pocket"}, OptBodyLoss},
		{AntennaOptions{Clutter: "jungle"}, OptClutter},
	}
	for _, c := range cases {
		before := Antenna{GainDBi: 1, HeightM: 2}
		a := before
		err := c.o.Apply(&a)
		var oe *units.OptionError
		if !errors.As(err, &oe) || oe.Option != c.key {
			t.Errorf("%+v: error %v, want an OptionError for %q", c.o, err, c.key)
		}
		if a != before {
			t.Errorf("%+v: changed the antenna on error", c.o)
		}
	}
}

func TestParseBearingDeg(t *testing.T) {
	for in, want := range map[string]float64{"0": 0, "95": 95, " 359.5 ": 359.5, "360": 0, "45deg": 45, "120°": 120} {
		got, err := ParseBearingDeg(in)
		if err != nil || got != want {
			t.Errorf("%q: %v, %v; want %v", in, got, err, want)
		}
	}
}

func FuzzAntennaOptions(f *testing.F) {
	for _, s := range []string{"yagi-3el-2m", "95", "face", "forest", "4dB", "", "360deg", "NaN"} {
		f.Add(s, s, s)
	}
	f.Fuzz(func(t *testing.T, typ, bearing, other string) {
		var a Antenna
		o := AntennaOptions{Type: typ, Bearing: bearing, Gain: other, Height: other, BodyLoss: other, Clutter: other}
		if err := o.Apply(&a); err != nil {
			return
		}
		if a.Aimed && !(a.BearingDeg >= 0 && a.BearingDeg < 360) {
			t.Errorf("bearing %q gave %g", bearing, a.BearingDeg)
		}
		if math.IsNaN(a.BodyLossDB) {
			t.Errorf("body loss NaN from %q", other)
		}
	})
}

func FuzzParseRelayHeights(f *testing.F) {
	for _, s := range []string{"6m", "2m..10m step 2m", "1..1 step 1", "", "0m..300m step 1m"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		hs, err := ParseRelayHeights(s)
		if err != nil {
			return
		}
		if len(hs) == 0 || len(hs) > 255 {
			t.Errorf("%q: %d heights", s, len(hs))
		}
	})
}

// TestPathElevations: on a smooth earth the path leaves each end at
// (h_other − h_own)/d − d/(2 a_e) radians (ITU-R P.452-17 Annex 1,
// Attachment 2, §5.1.1, θ_td); a ridge above that line raises the angle to
// its horizon.
func TestPathElevations(t *testing.T) {
	ae := propagation.EffectiveEarthRadiusKM(4.0 / 3)
	p := propagation.Path{DistKM: []float64{0, 5, 10}, HeightM: []float64{100, 100, 300}}
	from, to, err := pathElevationsDeg(p, 10, 20, ae)
	if err != nil {
		t.Fatal(err)
	}
	wantFrom := ((320.0-110)/10000 - 10/(2*ae)) * 180 / math.Pi
	wantTo := ((110.0-320)/10000 - 10/(2*ae)) * 180 / math.Pi
	if math.Abs(from-wantFrom) > 1e-12 || math.Abs(to-wantTo) > 1e-12 {
		t.Errorf("smooth: %.6f°, %.6f°; want %.6f°, %.6f°", from, to, wantFrom, wantTo)
	}
	p.HeightM[1] = 400 // a ridge in the middle, above both antennas
	from, to, _ = pathElevationsDeg(p, 10, 20, ae)
	wantFrom = ((400.0-110)/5000 - 5/(2*ae)) * 180 / math.Pi
	wantTo = ((400.0-320)/5000 - 5/(2*ae)) * 180 / math.Pi
	if math.Abs(from-wantFrom) > 1e-12 || math.Abs(to-wantTo) > 1e-12 {
		t.Errorf("ridge: %.6f°, %.6f°; want %.6f°, %.6f°", from, to, wantFrom, wantTo)
	}
}

// TestMastSweepAntennas: a sweep over antennas adds a dimension; with a
// requirement only the higher-gain antenna meets at the lowest mast, the
// recommendation names it, and rows match a sweep of that antenna alone.
func TestMastSweepAntennas(t *testing.T) {
	env, a, b := flatEnv(t)
	st := Station{End: a}
	tg := Target{End: b, FreqMHz: 146.55}
	gp, _ := antenna.Lookup("ground-plane")
	col, _ := antenna.Lookup("collinear-4")
	rng, err := units.ParseLengthRange("4m..8m step 2m")
	if err != nil {
		t.Fatal(err)
	}
	cable, err := feedline.ResolveCable("RG-8X")
	if err != nil {
		t.Fatal(err)
	}
	m := &MastSweep{Heights: rng, Cables: []feedline.Cable{cable}, Antennas: []antenna.Antenna{gp, col}}
	res, err := env.SweepMast(st, []Target{tg}, m, Requirement{MarginDB: 0})
	if err != nil {
		t.Fatal(err)
	}
	if len(res.Rows) != 3*2 {
		t.Fatalf("%d rows, want 3 heights × 2 antennas", len(res.Rows))
	}
	for i := 0; i < len(res.Rows); i += 2 {
		g, c := res.Rows[i], res.Rows[i+1]
		if g.Antenna != "ground-plane" || c.Antenna != "collinear-4" || g.HeightM != c.HeightM {
			t.Fatalf("rows %d, %d: %+v %+v", i, i+1, g, c)
		}
		// Same path, 7.5 − 1.8 dB more gain at the station both ways; the
		// path leaves within a degree of horizontal, where the collinear's
		// 19° lobe loses under 0.1 dB.
		if d := c.WorstMarginDB - g.WorstMarginDB; math.Abs(d-(col.GainDBi-gp.GainDBi)) > 0.1 {
			t.Errorf("at %g m: collinear − ground plane %.3f dB, want about %.1f", g.HeightM, d, col.GainDBi-gp.GainDBi)
		}
	}
	// Ask for a margin between the two at 4 m: only the collinear meets.
	need := (res.Rows[0].WorstMarginDB + res.Rows[1].WorstMarginDB) / 2
	res, err = env.SweepMast(st, []Target{tg}, m, Requirement{MarginDB: need})
	if err != nil {
		t.Fatal(err)
	}
	if res.Recommended == nil || res.Recommended.HeightM != 4 || res.Recommended.Antenna != "collinear-4" {
		t.Errorf("recommended %+v, want the collinear-4 at 4 m", res.Recommended)
	}
}
