package propagation

import (
	"errors"
	"fmt"
	"math"
	"strings"
	"testing"
)

func TestModelByName(t *testing.T) {
	cases := []struct {
		name, want string
		err        error
	}{
		{"terrain", "terrain", nil},
		{" Free-Space ", "free-space", nil},
		{"ITM", "itm", nil},
		{"okumura", "", ErrUnknownModel},
		{"", "", ErrUnknownModel},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			m, err := ModelByName(c.name)
			if !errors.Is(err, c.err) {
				t.Fatalf("err = %v, want %v", err, c.err)
			}
			if err == nil && m.Name() != c.want {
				t.Errorf("Name() = %q, want %q", m.Name(), c.want)
			}
		})
	}
}

// TestModelRegistry lists the registry: every model is found by its own
// name, has a description naming its published method, and appears once.
// A model added to the registry shows up here and in ModelNames, with no
// other edit.
func TestModelRegistry(t *testing.T) {
	want := []string{"terrain", "free-space", "itm"}
	names := ModelNames()
	if len(names) < len(want) {
		t.Fatalf("ModelNames() = %v, want at least %v", names, want)
	}
	for i, n := range want {
		if names[i] != n {
			t.Errorf("ModelNames()[%d] = %q, want %q", i, names[i], n)
		}
	}
	seen := map[string]bool{}
	for _, r := range Models() {
		name := r.Model.Name()
		if seen[name] {
			t.Errorf("model %q registered twice", name)
		}
		seen[name] = true
		m, err := ModelByName(strings.ToUpper(name))
		if err != nil || m.Name() != name {
			t.Errorf("ModelByName(%q) = %v, %v", name, m, err)
		}
		if d := ModelDescription(name); d == "" || d != r.Description {
			t.Errorf("ModelDescription(%q) = %q, want %q", name, d, r.Description)
		}
	}
	if d := ModelDescription("no such model"); d != "" {
		t.Errorf("ModelDescription of an unknown name = %q, want empty", d)
	}
	if _, err := ModelByName("no such model"); err == nil || !strings.Contains(err.Error(), strings.Join(names, ", ")) {
		t.Errorf("unknown model error %v does not list %v", err, names)
	}
}

func TestModelsAgreeOnGeometry(t *testing.T) {
	// Both models report the same free-space loss and clearance; only the
	// excess differs. 146 MHz over the rolling profile.
	p := rollingPath(400, 20)
	prm := Params{FreqMHz: 146, TxHeightM: 10, RxHeightM: 2}
	fs, err := FreeSpace{}.Loss(p, prm)
	if err != nil {
		t.Fatal(err)
	}
	tr, err := Terrain{}.Loss(p, prm)
	if err != nil {
		t.Fatal(err)
	}
	if fs.FreeSpaceDB != tr.FreeSpaceDB || fs.WorstClearanceF1 != tr.WorstClearanceF1 ||
		fs.ObstacleIndex != tr.ObstacleIndex || fs.LineOfSight != tr.LineOfSight {
		t.Errorf("geometry differs: free-space %+v, terrain %+v", fs, tr)
	}
	if fs.ExcessDB != 0 || fs.PathLossDB != fs.FreeSpaceDB {
		t.Errorf("free-space model: excess %v, path %v, free space %v", fs.ExcessDB, fs.PathLossDB, fs.FreeSpaceDB)
	}
	if tr.ExcessDB <= 0 || math.Abs(tr.PathLossDB-(tr.FreeSpaceDB+tr.ExcessDB)) > 1e-12 {
		t.Errorf("terrain model: excess %v, path %v, free space %v", tr.ExcessDB, tr.PathLossDB, tr.FreeSpaceDB)
	}
	// ITU-R P.525 over the path length.
	if want := FreeSpaceLossDB(20, 146); math.Abs(fs.FreeSpaceDB-want) > 1e-9 {
		t.Errorf("free space %v dB, want %v", fs.FreeSpaceDB, want)
	}
}

func TestTerrainSmoothEarthReduction(t *testing.T) {
	// Over a profile of zero heights the smooth surface is the sea-level
	// sphere, L_ba = L_bs, and delta-Bullington reduces to the §3.2
	// smooth-earth loss (eq. 66) — the no-DEM fallback.
	p := flatPath(601, 60)
	prm := Params{FreqMHz: 146, TxHeightM: 10, RxHeightM: 10, Polarization: Vertical, Ground: Sea}
	r, err := Terrain{}.Loss(p, prm)
	if err != nil {
		t.Fatal(err)
	}
	want, _ := SmoothEarthLossDB(60, 10, 10, prm)
	if math.Abs(r.ExcessDB-want) > 1e-9 || math.Abs(r.Bullington.LbaDB-r.Bullington.LbsDB) > 1e-9 {
		t.Errorf("excess %v dB (L_ba %v, L_bs %v), want smooth-earth %v", r.ExcessDB, r.Bullington.LbaDB, r.Bullington.LbsDB, want)
	}
}

func TestTerrainLossDoesNotAllocate(t *testing.T) {
	p := rollingPath(3300, 33)
	prm := Params{FreqMHz: 146, TxHeightM: 10, RxHeightM: 2}
	var m Model = Terrain{}
	if a := testing.AllocsPerRun(20, func() { _, _ = m.Loss(p, prm) }); a != 0 {
		t.Errorf("Terrain.Loss allocates %v times per call, want 0", a)
	}
}

// rollingPath is a synthetic rolling profile (invented terrain): two ridges
// systems over a 300 m plain, with 10 m of clutter on a wooded stretch.
func rollingPath(n int, lengthKM float64) Path {
	p := Path{DistKM: make([]float64, n), HeightM: make([]float64, n), ClutterM: make([]float64, n)}
	for i := range p.DistKM {
		d := lengthKM * float64(i) / float64(n-1)
		p.DistKM[i] = d
		p.HeightM[i] = 300 + 80*math.Sin(2*math.Pi*d/7.3) + 25*math.Sin(2*math.Pi*d/1.1+0.4)
		if d > lengthKM/3 && d < lengthKM/2 {
			p.ClutterM[i] = 10
		}
	}
	return p
}

func BenchmarkTerrainLoss3300(b *testing.B) {
	p := rollingPath(3300, 33)
	prm := Params{FreqMHz: 146, TxHeightM: 10, RxHeightM: 2}
	var m Model = Terrain{}
	b.ReportAllocs()
	for b.Loop() {
		if _, err := m.Loss(p, prm); err != nil {
			b.Fatal(err)
		}
	}
}

func BenchmarkFreeSpaceModel3300(b *testing.B) {
	p := rollingPath(3300, 33)
	prm := Params{FreqMHz: 146, TxHeightM: 10, RxHeightM: 2}
	var m Model = FreeSpace{}
	b.ReportAllocs()
	for b.Loop() {
		if _, err := m.Loss(p, prm); err != nil {
			b.Fatal(err)
		}
	}
}

// FuzzTerrainLoss feeds the model profiles built from arbitrary bytes
// within physical ranges: it must never panic, and must return finite,
// non-negative losses for valid input.
func FuzzTerrainLoss(f *testing.F) {
	f.Add([]byte{10, 200, 30, 40, 250, 3, 7}, 146.0, 10.0, 2.0, 20.0)
	f.Add([]byte{0, 0, 0}, 30.0, 0.0, 0.0, 0.1)
	f.Fuzz(func(t *testing.T, hs []byte, freqMHz, txM, rxM, lengthKM float64) {
		if len(hs) < 2 || !(freqMHz >= 30 && freqMHz <= 20000) || !(txM >= 0 && txM <= 3000) ||
			!(rxM >= 0 && rxM <= 3000) || !(lengthKM >= 0.01 && lengthKM <= 500) {
			return
		}
		p := Path{DistKM: make([]float64, len(hs)), HeightM: make([]float64, len(hs))}
		for i, h := range hs {
			p.DistKM[i] = lengthKM * float64(i) / float64(len(hs)-1)
			p.HeightM[i] = 20 * float64(h) // 0–5100 m
		}
		r, err := Terrain{}.Loss(p, Params{FreqMHz: freqMHz, TxHeightM: txM, RxHeightM: rxM})
		if err != nil {
			t.Fatalf("valid input rejected: %v", err)
		}
		for _, v := range []float64{r.FreeSpaceDB, r.ExcessDB, r.PathLossDB, r.Bullington.LbaDB, r.Bullington.LbsDB, r.Bullington.LsphDB} {
			if math.IsNaN(v) || math.IsInf(v, 0) || (v < 0 && v != r.FreeSpaceDB && v != r.PathLossDB) {
				t.Fatalf("loss term %v in %+v", v, r)
			}
		}
	})
}

// TestFrequencyRange: the terrain model is meant for 30 MHz–6 GHz (the
// scope of ITU-R P.1812-8, which applies P.526 delta-Bullington; from
// memory); free space states no band.
func TestFrequencyRange(t *testing.T) {
	if lo, hi, ok := FrequencyRange(Terrain{}); !ok || lo != 30 || hi != 6000 {
		t.Errorf("terrain: %v–%v MHz, %v", lo, hi, ok)
	}
	if lo, hi, ok := FrequencyRange(ITM{}); !ok || lo != 20 || hi != 20000 { // Hufford 1995
		t.Errorf("itm: %v–%v MHz, %v", lo, hi, ok)
	}
	if _, _, ok := FrequencyRange(FreeSpace{}); ok {
		t.Error("free space states a band")
	}
}

// TestLossAtFrequencies checks that one path at several frequencies gives,
// field for field and to the last bit, what one Loss call per frequency
// gives, for every registered model (Terrain and FreeSpace scan the
// profile once; the others fall back to Loss), on rough and smooth
// profiles, with clutter and with a repeater pair and a channel list; and
// that a bad frequency or a wrong result count is an error.
func TestLossAtFrequencies(t *testing.T) {
	paths := map[string]Path{
		"rolling 3300": rollingPath(3300, 33),
		"rolling 40":   rollingPath(40, 2.5),
		"two points":   {DistKM: []float64{0, 4}, HeightM: []float64{100, 300}},
	}
	rough := Path{DistKM: make([]float64, 700), HeightM: make([]float64, 700)}
	for i := range rough.DistKM {
		d := 15 * float64(i) / 699
		rough.DistKM[i] = d
		u := uint32(i) * 2654435761 // Knuth's multiplicative hash: deterministic noise
		rough.HeightM[i] = 600 + 350*math.Sin(d/7) + 150*math.Sin(d/1.3) + float64(u>>24)/255*20
	}
	paths["rough 700"] = rough
	freqSets := [][]float64{{147.18, 147.78}, {146.55}, {50.2, 145.5, 433.5, 1296.2}, {}}
	for _, reg := range Models() {
		for name, p := range paths {
			for _, fs := range freqSets {
				prm := Params{TxHeightM: 1.5, RxHeightM: 20, Polarization: Vertical}
				got := make([]Result, len(fs))
				if err := LossAtFrequencies(reg.Model, p, prm, fs, got); err != nil {
					t.Fatalf("%s, %s, %v: %v", reg.Model.Name(), name, fs, err)
				}
				for k, f := range fs {
					prm.FreqMHz = f
					want, err := reg.Model.Loss(p, prm)
					if err != nil {
						t.Fatal(err)
					}
					if g, w := fmt.Sprintf("%+v", got[k]), fmt.Sprintf("%+v", want); g != w {
						t.Errorf("%s, %s at %g MHz:\n got %s\nwant %s", reg.Model.Name(), name, f, g, w)
					}
				}
			}
		}
		p := paths["rolling 40"]
		if err := LossAtFrequencies(reg.Model, p, Params{TxHeightM: 2, RxHeightM: 2}, []float64{146, 0}, make([]Result, 2)); !errors.Is(err, ErrBadParams) {
			t.Errorf("%s: a 0 MHz frequency gave %v, want ErrBadParams", reg.Model.Name(), err)
		}
		if err := LossAtFrequencies(reg.Model, p, Params{TxHeightM: 2, RxHeightM: 2}, []float64{146, 440}, make([]Result, 1)); !errors.Is(err, ErrBadParams) {
			t.Errorf("%s: one result for two frequencies gave %v, want ErrBadParams", reg.Model.Name(), err)
		}
	}
}

// BenchmarkTerrainLossRouteLike is what a route asks of the model: 256
// different invented rough profiles of 680 points over 14.8 km (hills and
// hashed noise of up to 20 m, so branch predictors cannot learn one
// profile), a 1.5 m handheld and a 20 m mast at 146 MHz, taken in turn.
func BenchmarkTerrainLossRouteLike(b *testing.B) {
	const n, lengthKM = 680, 14.8
	paths := make([]Path, 256)
	for k := range paths {
		p := Path{DistKM: make([]float64, n), HeightM: make([]float64, n)}
		for i := range n {
			d := lengthKM * float64(i) / (n - 1)
			u := (uint32(i) + uint32(k)*7919) * 2654435761 // Knuth's multiplicative hash
			p.DistKM[i] = d
			p.HeightM[i] = 600 + 350*math.Sin(d/7+float64(k)) + 150*math.Sin(d/1.3) + 60*math.Sin(d/0.45) + float64(u>>24)/255*20
		}
		paths[k] = p
	}
	prm := Params{FreqMHz: 146, TxHeightM: 1.5, RxHeightM: 20}
	var m Model = Terrain{}
	b.ReportAllocs()
	i := 0
	for b.Loop() {
		if _, err := m.Loss(paths[i&255], prm); err != nil {
			b.Fatal(err)
		}
		i++
	}
	b.ReportMetric(b.Elapsed().Seconds()*1e9/float64(b.N)/n, "ns/point")
}
