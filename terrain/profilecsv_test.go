package terrain

import (
	"errors"
	"strings"
	"testing"
)

func TestDecodeProfileCSV(t *testing.T) {
	in := "# surveyed\ndistance_km,elevation_m,clutter_m,lat\n1.0,100,0,1\n1.5,120,10,1\n3.0,90,,1\n"
	p, err := DecodeProfileCSV(strings.NewReader(in), "p.csv")
	if err != nil {
		t.Fatal(err)
	}
	wantD := []float64{0, 500, 2000}
	for i, d := range wantD {
		if p.DistM[i] != d {
			t.Errorf("DistM[%d] = %v, want %v", i, p.DistM[i], d)
		}
	}
	if p.ElevM[1] != 120 || p.ClutterM[1] != 10 || p.ClutterM[2] != 0 {
		t.Errorf("got %+v", p)
	}
}

func TestDecodeProfileCSVErrors(t *testing.T) {
	cases := []struct{ name, in, want string }{
		{"empty", "", "the file is empty"},
		{"no columns", "d,h\n1,2\n", "p.csv:1: the header needs distance_m"},
		{"not a number", "distance_m,elevation_m\n0,1\n10,x\n", `p.csv:3: elevation_m: "x" is not a number`},
		{"decreasing", "distance_m,elevation_m\n0,1\n10,2\n5,3\n", "p.csv:4: distance_m: distances must increase"},
		{"one row", "distance_m,elevation_m\n0,1\n", "at least two rows"},
		{"missing value", "distance_m,elevation_m\n0,1\n10\n", "p.csv:3: elevation_m: missing value"},
		{"absurd height", "distance_m,elevation_m\n0,1\n10,99999\n", "not a ground height"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			_, err := DecodeProfileCSV(strings.NewReader(c.in), "p.csv")
			if err == nil || !errors.Is(err, ErrProfileCSV) || !strings.Contains(err.Error(), c.want) {
				t.Fatalf("err = %v, want %q", err, c.want)
			}
		})
	}
}

func FuzzDecodeProfileCSV(f *testing.F) {
	f.Add("distance_m,elevation_m\n0,10\n100,20\n")
	f.Add("distance_km,elevation_m,clutter_m\n0,10,0\n0.1,20,5\n0.2,5,\n")
	f.Add("\ufeffdistance_m;elevation_m\n")
	f.Fuzz(func(t *testing.T, in string) {
		p, err := DecodeProfileCSV(strings.NewReader(in), "fuzz.csv")
		if err != nil {
			if !errors.Is(err, ErrProfileCSV) {
				t.Fatalf("error does not wrap ErrProfileCSV: %v", err)
			}
			return
		}
		if len(p.DistM) < 2 || p.DistM[0] != 0 {
			t.Fatalf("accepted a bad profile: %+v", p)
		}
		for i := 1; i < len(p.DistM); i++ {
			if !(p.DistM[i] > p.DistM[i-1]) {
				t.Fatalf("distances not increasing: %v", p.DistM)
			}
		}
	})
}

// TestWriteProfileCSVRoundTrip writes a profile and reads it back with
// DecodeProfileCSV: distances and heights survive to the 1 cm written.
func TestWriteProfileCSVRoundTrip(t *testing.T) {
	cases := []struct {
		name  string
		distM []float64
		elevM []float64
		tolM  float64 // 2 decimals written: half a centimetre
	}{
		{"two samples", []float64{0, 1234.5678}, []float64{12.345, -3.2}, 0.005},
		{"valley", []float64{0, 92.61, 185.22, 277.83, 370.44}, []float64{1729.04, 1650.5, 1201.26, 880, 1011.01}, 0.005},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			lat := make([]float64, len(c.distM))
			lon := make([]float64, len(c.distM))
			for i := range lat {
				lat[i], lon[i] = -48.5+float64(i)*1e-3, -123.95
			}
			var buf strings.Builder
			if err := WriteProfileCSV(&buf, c.distM, lat, lon, c.elevM); err != nil {
				t.Fatal(err)
			}
			if !strings.HasPrefix(buf.String(), "distance_m,lat,lon,elevation_m\n") {
				t.Errorf("header: %q", strings.SplitN(buf.String(), "\n", 2)[0])
			}
			p, err := DecodeProfileCSV(strings.NewReader(buf.String()), "out.csv")
			if err != nil {
				t.Fatal(err)
			}
			if len(p.DistM) != len(c.distM) {
				t.Fatalf("%d rows read back, want %d", len(p.DistM), len(c.distM))
			}
			for i := range c.distM {
				if d := p.DistM[i] - c.distM[i]; d > c.tolM || d < -c.tolM {
					t.Errorf("row %d: distance %v m, want %v m", i, p.DistM[i], c.distM[i])
				}
				if d := p.ElevM[i] - c.elevM[i]; d > c.tolM || d < -c.tolM {
					t.Errorf("row %d: elevation %v m, want %v m", i, p.ElevM[i], c.elevM[i])
				}
			}
		})
	}
	var buf strings.Builder
	if err := WriteProfileCSV(&buf, []float64{0, 1}, []float64{0}, []float64{0, 0}, []float64{0, 0}); !errors.Is(err, ErrProfileCSV) {
		t.Errorf("mismatched lengths: error %v, want ErrProfileCSV", err)
	}
	if err := WriteProfileCSV(&buf, []float64{0}, []float64{0}, []float64{0}, []float64{0}); !errors.Is(err, ErrProfileCSV) {
		t.Errorf("one sample: error %v, want ErrProfileCSV", err)
	}
	if buf.Len() != 0 {
		t.Errorf("wrote %q despite errors", buf.String())
	}
}
