package propagation

import (
	"bufio"
	"errors"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"
)

// itmData is the folder of the ITM reference files (see testdata/itm/SOURCE).
var itmData = filepath.Join("testdata", "itm")

// parsePFL reads a profile in the model's PFL form: number of intervals n,
// spacing Δx in m, then n+1 elevations in m. It returns a Path with
// distances i·Δx in km.
func parsePFL(fields []string) (Path, error) {
	if len(fields) < 4 {
		return Path{}, errors.New("PFL needs n, Δx and at least two elevations")
	}
	nf, err := strconv.ParseFloat(strings.TrimSpace(fields[0]), 64)
	if err != nil {
		return Path{}, err
	}
	dx, err := strconv.ParseFloat(strings.TrimSpace(fields[1]), 64)
	if err != nil {
		return Path{}, err
	}
	n := int(nf)
	if n < 1 || len(fields) < n+3 || !(dx > 0) {
		return Path{}, errors.New("PFL: bad interval count or spacing")
	}
	p := Path{DistKM: make([]float64, n+1), HeightM: make([]float64, n+1)}
	for i := 0; i <= n; i++ {
		z, err := strconv.ParseFloat(strings.TrimSpace(fields[i+2]), 64)
		if err != nil {
			return Path{}, err
		}
		p.DistKM[i] = float64(i) * dx / 1000
		p.HeightM[i] = z
	}
	return p, nil
}

// readPFLs reads pfls.csv: one PFL profile per line.
func readPFLs(t testing.TB) []Path {
	t.Helper()
	f, err := os.Open(filepath.Join(itmData, "pfls.csv"))
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	var out []Path
	sc := bufio.NewScanner(f)
	sc.Buffer(make([]byte, 1<<20), 1<<20)
	for sc.Scan() {
		if strings.TrimSpace(sc.Text()) == "" {
			continue
		}
		p, err := parsePFL(strings.Split(sc.Text(), ","))
		if err != nil {
			t.Fatalf("pfls.csv line %d: %v", len(out)+1, err)
		}
		out = append(out, p)
	}
	if err := sc.Err(); err != nil {
		t.Fatal(err)
	}
	return out
}

// itmCase is one row of p2p-inputs.csv as an ITM and Params.
type itmCase struct {
	m   ITM
	prm Params
}

// itmFromCode sets the variability fields of m from the model's numeric
// mode code (0–3 single message, accidental, mobile, broadcast; +10
// location eliminated; +20 situation eliminated), as the reference files
// give it.
func itmFromCode(m *ITM, code int) {
	if code >= 20 {
		code -= 20
		m.SituationEliminated = true
	}
	if code >= 10 {
		code -= 10
		m.LocationEliminated = true
	}
	m.Variability = [...]ITMVariability{ITMSingleMessage, ITMAccidental, ITMMobile, ITMBroadcast}[code]
}

// readP2PInputs reads p2p-inputs.csv.
func readP2PInputs(t testing.TB) []itmCase {
	t.Helper()
	b, err := os.ReadFile(filepath.Join(itmData, "p2p-inputs.csv"))
	if err != nil {
		t.Fatal(err)
	}
	var out []itmCase
	for i, line := range strings.Split(strings.TrimSpace(string(b)), "\n")[1:] {
		f := strings.Split(strings.TrimSpace(line), ",")
		if len(f) != 13 {
			t.Fatalf("p2p-inputs.csv row %d: %d fields", i+1, len(f))
		}
		v := make([]float64, len(f))
		for j, s := range f {
			if v[j], err = strconv.ParseFloat(s, 64); err != nil {
				t.Fatalf("p2p-inputs.csv row %d: %v", i+1, err)
			}
		}
		m := ITM{
			Ground:       Ground{Permittivity: v[3], ConductivitySM: v[4]},
			N0:           v[5],
			Polarization: map[float64]Polarization{0: Horizontal, 1: Vertical}[v[7]],
			Climate:      ITMClimate(v[8]),
			TimePct:      v[9],
			LocationPct:  v[10],
			SituationPct: v[11],
		}
		itmFromCode(&m, int(v[12]))
		out = append(out, itmCase{m: m, prm: Params{FreqMHz: v[6], TxHeightM: v[1], RxHeightM: v[2]}})
	}
	return out
}

func TestITMReferenceP2P(t *testing.T) {
	paths := readPFLs(t)
	cases := readP2PInputs(t)
	if len(paths) != 5 || len(cases) != 5 {
		t.Fatalf("%d profiles, %d cases; want 5 each", len(paths), len(cases))
	}
	for i := range cases {
		r, err := cases[i].m.Loss(paths[i], cases[i].prm)
		if err != nil {
			t.Fatalf("case %d: %v", i+1, err)
		}
		t.Logf("case %d: A %.4f fs %.4f aref %.4f mode %v ns %.3f dh %.3f he %.3f %.3f dl %.1f %.1f th %.4f %.4f warn %v", i+1, r.PathLossDB, r.FreeSpaceDB, r.ITM.ReferenceDB, r.ITM.Mode,
			r.ITM.SurfaceRefractivityN, r.ITM.DeltaHM, r.ITM.EffHeightTxM, r.ITM.EffHeightRxM, r.ITM.HorizonTxKM*1000, r.ITM.HorizonRxKM*1000, r.ITM.HorizonAngleTxMrad, r.ITM.HorizonAngleRxMrad, r.ITM.Warnings)
	}
	_ = math.Abs
}
