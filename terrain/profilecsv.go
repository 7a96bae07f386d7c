package terrain

import (
	"encoding/csv"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"strconv"
	"strings"
)

// ErrProfileCSV is wrapped by every error reading a profile CSV file.
var ErrProfileCSV = errors.New("profile csv")

// ProfileCSV is a terrain profile read from a CSV file.
type ProfileCSV struct {
	DistM    []float64 // metres from the first row
	ElevM    []float64 // ground height, metres above sea level
	ClutterM []float64 // clutter height added to intermediate points, metres; nil when the file has none
}

// ReadProfileCSV reads a terrain profile from a CSV file whose header row
// names its columns with their units: distance_m or distance_km,
// elevation_m, and optionally clutter_m (the layout of `mastlink profile
// -o F.csv`; other columns such as lat and lon are ignored). The first row
// is the transmitting end's ground, the last the far end's; distances must
// increase.
func ReadProfileCSV(path string) (*ProfileCSV, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, fmt.Errorf("%w: %w", ErrProfileCSV, err)
	}
	defer f.Close()
	return DecodeProfileCSV(f, path)
}

// DecodeProfileCSV reads a profile CSV from r; name is used in errors.
func DecodeProfileCSV(r io.Reader, name string) (*ProfileCSV, error) {
	cr := csv.NewReader(r)
	cr.FieldsPerRecord = -1
	cr.TrimLeadingSpace = true
	cr.Comment = '#'
	header, err := cr.Read()
	if err == io.EOF {
		return nil, fmt.Errorf("%w: %s: the file is empty (expected a header row such as distance_m,elevation_m)", ErrProfileCSV, name)
	}
	if err != nil {
		return nil, csvErr(name, err)
	}
	dcol, ecol, ccol := -1, -1, -1
	dscale := 1.0
	for i, h := range header {
		switch strings.ToLower(strings.TrimSpace(strings.TrimPrefix(h, "\ufeff"))) {
		case "distance_m":
			dcol, dscale = i, 1
		case "distance_km":
			dcol, dscale = i, 1000
		case "elevation_m":
			ecol = i
		case "clutter_m":
			ccol = i
		}
	}
	if dcol < 0 || ecol < 0 {
		return nil, fmt.Errorf("%w: %s:1: the header needs distance_m (or distance_km) and elevation_m columns, found %q", ErrProfileCSV, name, strings.Join(header, ","))
	}
	p := &ProfileCSV{}
	if ccol >= 0 {
		p.ClutterM = []float64{}
	}
	for {
		rec, err := cr.Read()
		if err == io.EOF {
			break
		}
		if err != nil {
			return nil, csvErr(name, err)
		}
		line, _ := cr.FieldPos(0)
		num := func(col int, what string) (float64, error) {
			if col >= len(rec) {
				return 0, fmt.Errorf("%w: %s:%d: %s: missing value", ErrProfileCSV, name, line, what)
			}
			s := strings.TrimSpace(rec[col])
			v, err := strconv.ParseFloat(s, 64)
			if err != nil || math.IsNaN(v) || math.IsInf(v, 0) {
				return 0, fmt.Errorf("%w: %s:%d: %s: %q is not a number", ErrProfileCSV, name, line, what, s)
			}
			return v, nil
		}
		d, err := num(dcol, header[dcol])
		if err != nil {
			return nil, err
		}
		d *= dscale
		h, err := num(ecol, "elevation_m")
		if err != nil {
			return nil, err
		}
		if h < -500 || h > 9000 {
			return nil, fmt.Errorf("%w: %s:%d: elevation_m: %g m is not a ground height on earth", ErrProfileCSV, name, line, h)
		}
		if n := len(p.DistM); n > 0 && !(d > p.DistM[n-1]) {
			return nil, fmt.Errorf("%w: %s:%d: %s: distances must increase from row to row", ErrProfileCSV, name, line, header[dcol])
		}
		if len(p.DistM) == 0 && d < 0 {
			return nil, fmt.Errorf("%w: %s:%d: %s: a distance cannot be negative", ErrProfileCSV, name, line, header[dcol])
		}
		p.DistM = append(p.DistM, d)
		p.ElevM = append(p.ElevM, h)
		if ccol >= 0 {
			c := 0.0
			if ccol < len(rec) && strings.TrimSpace(rec[ccol]) != "" {
				if c, err = num(ccol, "clutter_m"); err != nil {
					return nil, err
				}
				if c < 0 {
					return nil, fmt.Errorf("%w: %s:%d: clutter_m: a clutter height cannot be negative", ErrProfileCSV, name, line)
				}
			}
			p.ClutterM = append(p.ClutterM, c)
		}
	}
	if len(p.DistM) < 2 {
		return nil, fmt.Errorf("%w: %s: a profile needs at least two rows (the two ends)", ErrProfileCSV, name)
	}
	// Distances are measured from the first row.
	if d0 := p.DistM[0]; d0 != 0 {
		for i := range p.DistM {
			p.DistM[i] -= d0
		}
	}
	return p, nil
}

func csvErr(name string, err error) error {
	var pe *csv.ParseError
	if errors.As(err, &pe) {
		return fmt.Errorf("%w: %s:%d: %v", ErrProfileCSV, name, pe.Line, pe.Err)
	}
	return fmt.Errorf("%w: %s: %v", ErrProfileCSV, name, err)
}

// profileCSVHeader is the header row WriteProfileCSV writes.
var profileCSVHeader = []string{"distance_m", "lat", "lon", "elevation_m"}

// WriteProfileCSV writes a terrain profile as CSV (RFC 4180) with the header
// distance_m,lat,lon,elevation_m and one row per sample: distance along the
// path and ground height in metres with 2 decimals, latitude and longitude
// in decimal degrees (WGS84) with 7 decimals (about 1 cm). ReadProfileCSV
// reads it back (`mastlink link --profile`). The four slices must have the
// same length, at least 2, and finite values; otherwise nothing is written
// and the error wraps ErrProfileCSV.
func WriteProfileCSV(w io.Writer, distM, lat, lon, elevM []float64) error {
	n := len(distM)
	if len(lat) != n || len(lon) != n || len(elevM) != n {
		return fmt.Errorf("%w: %d distances, %d latitudes, %d longitudes and %d heights: give one of each per sample", ErrProfileCSV, n, len(lat), len(lon), len(elevM))
	}
	if n < 2 {
		return fmt.Errorf("%w: a profile needs at least two samples (the two ends), got %d", ErrProfileCSV, n)
	}
	rows := make([][]string, n)
	for i := range distM {
		for _, v := range []float64{distM[i], lat[i], lon[i], elevM[i]} {
			if math.IsNaN(v) || math.IsInf(v, 0) {
				return fmt.Errorf("%w: sample %d has a value that is not a finite number", ErrProfileCSV, i)
			}
		}
		rows[i] = []string{
			strconv.FormatFloat(distM[i], 'f', 2, 64),
			strconv.FormatFloat(lat[i], 'f', 7, 64),
			strconv.FormatFloat(lon[i], 'f', 7, 64),
			strconv.FormatFloat(elevM[i], 'f', 2, 64),
		}
	}
	cw := csv.NewWriter(w)
	if err := cw.Write(profileCSVHeader); err != nil {
		return err
	}
	if err := cw.WriteAll(rows); err != nil {
		return err
	}
	return cw.Error()
}
