package gpx

import (
	"bytes"
	"encoding/xml"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"regexp"
	"sort"
	"strings"
	"time"

	"github.com/paulmach/orb"
	gpxgo "github.com/tkrajina/gpxgo/gpx"
)

// ErrFile is wrapped by every error reading a GPX file.
var ErrFile = errors.New("gpx")

// ErrUnknownWaypoint is wrapped when a name matches no waypoint.
var ErrUnknownWaypoint = errors.New("unknown waypoint")

// Place is a named point from a GPX file: a waypoint, or a point of a track
// or route.
type Place struct {
	Name        string
	Pos         orb.Point // lon, lat in decimal degrees (WGS84)
	ElevM       float64   // elevation from the file in metres; NaN when absent
	Time        time.Time // UTC; zero when absent
	Description string
	Symbol      string
}

// Track is a named sequence of points: a GPX track (its segments joined in
// order) or a GPX route.
type Track struct {
	Name   string
	Points []Place
}

// File is what mastlink uses from a GPX 1.0 or 1.1 file.
type File struct {
	Path      string
	Waypoints []Place
	Tracks    []Track // tracks first, then routes, in file order
}

// Read reads waypoints, tracks and routes from the GPX file at path.
// Times with a zone offset or fractional seconds are normalised to UTC
// before decoding (the GPX 1.1 schema's xsd:dateTime).
func Read(path string) (*File, error) {
	data, err := os.ReadFile(path)
	if err != nil {
		return nil, fmt.Errorf("%w: %w", ErrFile, err)
	}
	f, err := Decode(data, path)
	if err != nil {
		return nil, err
	}
	return f, nil
}

var timeElem = regexp.MustCompile(`<((?:[A-Za-z_][\w.-]*:)?time)>\s*([^<]*?)\s*</((?:[A-Za-z_][\w.-]*:)?time)>`)

// normalizeTimes rewrites every <time> element of a GPX document as UTC in
// the form 2006-01-02T15:04:05Z, the one form gpxgo v1.4.0 reads without
// error or offset loss. Times it cannot read are left alone.
func normalizeTimes(data []byte) []byte {
	return timeElem.ReplaceAllFunc(data, func(m []byte) []byte {
		sub := timeElem.FindSubmatch(m)
		t, err := time.Parse(time.RFC3339Nano, string(sub[2]))
		if err != nil {
			return m
		}
		return []byte("<" + string(sub[1]) + ">" + t.UTC().Format("2006-01-02T15:04:05Z") + "</" + string(sub[3]) + ">")
	})
}

// Decode decodes a GPX document; name is used in error messages.
func Decode(data []byte, name string) (*File, error) {
	if len(bytes.TrimSpace(data)) == 0 {
		return nil, fmt.Errorf("%w: %s: the file is empty (expected a GPX document)", ErrFile, name)
	}
	// Check well-formedness first so the error can name the line.
	dec := xml.NewDecoder(bytes.NewReader(data))
	dec.Strict = true
	dec.CharsetReader = func(label string, input io.Reader) (io.Reader, error) { return input, nil }
	sawGPX := false
	for {
		tok, err := dec.Token()
		if err != nil {
			if errors.Is(err, io.EOF) {
				break
			}
			var se *xml.SyntaxError
			if errors.As(err, &se) {
				return nil, fmt.Errorf("%w: %s:%d: not well-formed XML: %s", ErrFile, name, se.Line, se.Msg)
			}
			return nil, fmt.Errorf("%w: %s: %v", ErrFile, name, err)
		}
		if se, ok := tok.(xml.StartElement); ok && !sawGPX {
			if se.Name.Local != "gpx" {
				return nil, fmt.Errorf("%w: %s: the root element is <%s>, not <gpx>: is this a GPX file?", ErrFile, name, se.Name.Local)
			}
			sawGPX = true
		}
	}
	if !sawGPX {
		return nil, fmt.Errorf("%w: %s: no <gpx> element found", ErrFile, name)
	}
	g, err := gpxgo.ParseBytes(normalizeTimes(data))
	if err != nil {
		return nil, fmt.Errorf("%w: %s: %v", ErrFile, name, err)
	}
	out := &File{Path: name}
	for i, w := range g.Waypoints {
		p, err := placeFrom(&w, name, fmt.Sprintf("waypoint %d", i+1))
		if err != nil {
			return nil, err
		}
		out.Waypoints = append(out.Waypoints, p)
	}
	for ti, t := range g.Tracks {
		tr := Track{Name: t.Name}
		if tr.Name == "" {
			tr.Name = fmt.Sprintf("track %d", ti+1)
		}
		for _, s := range t.Segments {
			for i := range s.Points {
				p, err := placeFrom(&s.Points[i], name, fmt.Sprintf("%s point %d", tr.Name, len(tr.Points)+1))
				if err != nil {
					return nil, err
				}
				tr.Points = append(tr.Points, p)
			}
		}
		out.Tracks = append(out.Tracks, tr)
	}
	for ri, r := range g.Routes {
		tr := Track{Name: r.Name}
		if tr.Name == "" {
			tr.Name = fmt.Sprintf("route %d", ri+1)
		}
		for i := range r.Points {
			p, err := placeFrom(&r.Points[i], name, fmt.Sprintf("%s point %d", tr.Name, i+1))
			if err != nil {
				return nil, err
			}
			tr.Points = append(tr.Points, p)
		}
		out.Tracks = append(out.Tracks, tr)
	}
	return out, nil
}

func placeFrom(w *gpxgo.GPXPoint, file, what string) (Place, error) {
	lat, lon := w.Latitude, w.Longitude
	if !(lat >= -90 && lat <= 90) || !(lon >= -180 && lon <= 180) {
		return Place{}, fmt.Errorf("%w: %s: %s %q: position %g,%g is outside latitude −90…90 / longitude −180…180", ErrFile, file, what, w.Name, lat, lon)
	}
	p := Place{
		Name:        strings.TrimSpace(w.Name),
		Pos:         orb.Point{lon, lat},
		ElevM:       nan(),
		Description: w.Description,
		Symbol:      w.Symbol,
	}
	if w.Elevation.NotNull() {
		p.ElevM = w.Elevation.Value()
	}
	if !w.Timestamp.IsZero() {
		p.Time = w.Timestamp.UTC()
	}
	return p, nil
}

// Lookup finds the waypoint called name, ignoring case and surrounding
// space. An unknown name gives an error wrapping ErrUnknownWaypoint that
// lists the closest names in the file.
func (f *File) Lookup(name string) (Place, error) {
	want := strings.ToLower(strings.TrimSpace(name))
	for _, w := range f.Waypoints {
		if strings.ToLower(w.Name) == want {
			return w, nil
		}
	}
	names := make([]string, len(f.Waypoints))
	for i, w := range f.Waypoints {
		names[i] = w.Name
	}
	if len(names) == 0 {
		return Place{}, fmt.Errorf("%w %q: %s has no waypoints", ErrUnknownWaypoint, name, f.Path)
	}
	return Place{}, fmt.Errorf("%w %q in %s (closest: %s)", ErrUnknownWaypoint, name, f.Path, strings.Join(closest(name, names, 3), ", "))
}

// closest returns up to n of names nearest to s by edit distance,
// case-insensitive, nearest first.
func closest(s string, names []string, n int) []string {
	type cand struct {
		name string
		d    int
	}
	cs := make([]cand, 0, len(names))
	ls := strings.ToLower(s)
	for _, nm := range names {
		d := editDistance(ls, strings.ToLower(nm))
		if strings.Contains(strings.ToLower(nm), ls) || strings.Contains(ls, strings.ToLower(nm)) {
			d /= 2
		}
		cs = append(cs, cand{nm, d})
	}
	sort.SliceStable(cs, func(i, j int) bool { return cs[i].d < cs[j].d })
	var out []string
	for i := 0; i < len(cs) && i < n; i++ {
		out = append(out, fmt.Sprintf("%q", cs[i].name))
	}
	return out
}

// editDistance is the Levenshtein distance between a and b, in runes.
func editDistance(a, b string) int {
	ra, rb := []rune(a), []rune(b)
	prev := make([]int, len(rb)+1)
	cur := make([]int, len(rb)+1)
	for j := range prev {
		prev[j] = j
	}
	for i := 1; i <= len(ra); i++ {
		cur[0] = i
		for j := 1; j <= len(rb); j++ {
			cost := 1
			if ra[i-1] == rb[j-1] {
				cost = 0
			}
			cur[j] = min(prev[j]+1, cur[j-1]+1, prev[j-1]+cost)
		}
		prev, cur = cur, prev
	}
	return prev[len(rb)]
}

func nan() float64 { return math.NaN() }

// Output is a GPX 1.1 document to write: waypoints, tracks and routes.
type Output struct {
	Name      string
	Waypoints []Place
	Tracks    []Track // written as <trk> with one segment each
	Routes    []Track // written as <rte>, e.g. closed keep-out circles
}

// Encode renders out as a GPX 1.1 document. Times are written in UTC
// (xsd:dateTime with a Z suffix); NaN elevations are omitted.
func Encode(out Output) ([]byte, error) {
	g := &gpxgo.GPX{Version: "1.1", Creator: "mastlink", Name: out.Name}
	for _, w := range out.Waypoints {
		g.Waypoints = append(g.Waypoints, gpxPoint(w))
	}
	for _, t := range out.Tracks {
		var seg gpxgo.GPXTrackSegment
		for _, p := range t.Points {
			seg.Points = append(seg.Points, gpxPoint(p))
		}
		g.Tracks = append(g.Tracks, gpxgo.GPXTrack{Name: t.Name, Segments: []gpxgo.GPXTrackSegment{seg}})
	}
	for _, r := range out.Routes {
		rt := gpxgo.GPXRoute{Name: r.Name}
		for _, p := range r.Points {
			rt.Points = append(rt.Points, gpxPoint(p))
		}
		g.Routes = append(g.Routes, rt)
	}
	b, err := gpxgo.ToXml(g, gpxgo.ToXmlParams{Version: "1.1", Indent: true})
	if err != nil {
		return nil, fmt.Errorf("%w: encoding: %v", ErrFile, err)
	}
	return append(b, '\n'), nil
}

func gpxPoint(p Place) gpxgo.GPXPoint {
	w := gpxgo.GPXPoint{
		Point: gpxgo.Point{Latitude: p.Pos.Lat(), Longitude: p.Pos.Lon()},
		Name:  p.Name, Description: p.Description, Symbol: p.Symbol,
	}
	if !math.IsNaN(p.ElevM) {
		w.Elevation = *gpxgo.NewNullableFloat64(p.ElevM)
	}
	if !p.Time.IsZero() {
		w.Timestamp = p.Time.UTC()
	}
	return w
}
