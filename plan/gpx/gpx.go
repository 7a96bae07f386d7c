package gpx

import (
	"bufio"
	"bytes"
	"encoding/xml"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"sort"
	"strconv"
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
	route  bool // read from an <rte>
}

// File is what mastlink uses from a GPX 1.0 or 1.1 file.
type File struct {
	Path      string
	Waypoints []Place
	Tracks    []Track // tracks first, then routes, in file order
}

// Read reads waypoints, tracks and routes from the GPX file at path,
// streaming: the file is decoded token by token (encoding/xml) and never
// held in memory whole, so memory grows with the points kept (about 100
// bytes each), not with the file's size. See Decode for what is read.
func Read(path string) (*File, error) {
	fh, err := os.Open(path)
	if err != nil {
		return nil, &fileError{err.Error()}
	}
	defer fh.Close()
	return decodeStream(bufio.NewReaderSize(fh, 64<<10), path)
}

// Decode decodes a GPX 1.0 or 1.1 document; name is used in error
// messages. It reads waypoints (<wpt>: lat, lon, ele, time, name, desc,
// sym), tracks (<trk>: name, and the <trkpt> of every <trkseg> in order)
// and routes (<rte>: name, <rtept>), and skips everything else (metadata,
// extensions). Times (xsd:dateTime, GPX 1.1 schema) are read with their
// zone offset and fractional seconds and kept in UTC; a time without a
// zone is taken as UTC. Errors wrap ErrFile and name the file, the line
// and the point: hike.gpx:123: trkpt 45: lat "abc" is not a number.
func Decode(data []byte, name string) (*File, error) {
	return decodeStream(bytes.NewReader(data), name)
}

// fileError is an error reading a GPX file, in its own words, wrapping
// ErrFile.
type fileError struct{ msg string }

func (e *fileError) Error() string { return e.msg }
func (e *fileError) Unwrap() error { return ErrFile }

// gpxDecoder walks a GPX document token by token.
type gpxDecoder struct {
	dec  *xml.Decoder
	name string
	buf  []byte // text of the element being read, reused
}

// errorf returns a fileError naming the file and the decoder's line.
func (d *gpxDecoder) errorf(format string, args ...any) error {
	line, _ := d.dec.InputPos()
	return &fileError{fmt.Sprintf("%s:%d: ", d.name, line) + fmt.Sprintf(format, args...)}
}

// token returns the next token, turning syntax errors into one line
// naming the file and line.
func (d *gpxDecoder) token() (xml.Token, error) {
	tok, err := d.dec.Token()
	if err != nil {
		var se *xml.SyntaxError
		switch {
		case errors.Is(err, io.EOF):
			return nil, io.EOF
		case errors.As(err, &se):
			return nil, &fileError{fmt.Sprintf("%s:%d: not well-formed XML: %s", d.name, se.Line, se.Msg)}
		}
		return nil, d.errorf("%v", err)
	}
	return tok, nil
}

// text returns the character data of the element just started, up to its
// end, skipping any elements inside it.
func (d *gpxDecoder) text() (string, error) {
	d.buf = d.buf[:0]
	depth := 0
	for {
		tok, err := d.token()
		if err != nil {
			if errors.Is(err, io.EOF) {
				return "", d.errorf("the document ends inside an element")
			}
			return "", err
		}
		switch t := tok.(type) {
		case xml.CharData:
			if depth == 0 {
				d.buf = append(d.buf, t...)
			}
		case xml.StartElement:
			depth++
		case xml.EndElement:
			if depth == 0 {
				return string(bytes.TrimSpace(d.buf)), nil
			}
			depth--
		}
	}
}

// skip skips the rest of the element just started.
func (d *gpxDecoder) skip() error {
	if err := d.dec.Skip(); err != nil {
		var se *xml.SyntaxError
		if errors.As(err, &se) {
			return &fileError{fmt.Sprintf("%s:%d: not well-formed XML: %s", d.name, se.Line, se.Msg)}
		}
		if errors.Is(err, io.EOF) || errors.Is(err, io.ErrUnexpectedEOF) {
			return d.errorf("the document ends inside an element")
		}
		return d.errorf("%v", err)
	}
	return nil
}

func decodeStream(r io.Reader, name string) (*File, error) {
	dec := xml.NewDecoder(r)
	dec.Strict = true
	dec.CharsetReader = func(label string, input io.Reader) (io.Reader, error) { return input, nil }
	d := &gpxDecoder{dec: dec, name: name}
	out := &File{Path: name}
	sawGPX, sawAny := false, false
	depth := 0 // inside <gpx>: 1
	nTrk, nRte := 0, 0
	for {
		tok, err := d.token()
		if errors.Is(err, io.EOF) {
			break
		}
		if err != nil {
			return nil, err
		}
		switch t := tok.(type) {
		case xml.CharData:
			if len(bytes.TrimSpace(t)) > 0 {
				sawAny = true
			}
		case xml.EndElement:
			depth--
		case xml.StartElement:
			sawAny = true
			if !sawGPX {
				if t.Name.Local != "gpx" {
					return nil, &fileError{fmt.Sprintf("%s: the root element is <%s>, not <gpx>: is this a GPX file?", name, t.Name.Local)}
				}
				sawGPX = true
				depth = 1
				continue
			}
			if depth != 1 {
				// A second root element: the XML decoder refuses it in
				// strict mode; anything deeper was consumed below.
				if err := d.skip(); err != nil {
					return nil, err
				}
				continue
			}
			switch t.Name.Local {
			case "wpt":
				p, err := d.point(t, fmt.Sprintf("wpt %d", len(out.Waypoints)+1))
				if err != nil {
					return nil, err
				}
				out.Waypoints = append(out.Waypoints, p)
			case "trk":
				nTrk++
				tr, err := d.track(fmt.Sprintf("track %d", nTrk), "trkpt")
				if err != nil {
					return nil, err
				}
				out.Tracks = append(out.Tracks, tr)
			case "rte":
				nRte++
				tr, err := d.track(fmt.Sprintf("route %d", nRte), "rtept")
				if err != nil {
					return nil, err
				}
				out.Tracks = append(out.Tracks, tr)
			default:
				if err := d.skip(); err != nil {
					return nil, err
				}
			}
		default:
			sawAny = true
		}
	}
	if !sawGPX {
		if !sawAny {
			return nil, &fileError{fmt.Sprintf("%s: the file is empty (expected a GPX document)", name)}
		}
		return nil, &fileError{fmt.Sprintf("%s: no <gpx> element found", name)}
	}
	// Tracks first, then routes, each in file order.
	sort.SliceStable(out.Tracks, func(i, j int) bool { return !out.Tracks[i].route && out.Tracks[j].route })
	return out, nil
}

// track reads a <trk> (points in <trkseg> elements) or an <rte> (points
// directly inside) just started; ptName is "trkpt" or "rtept".
func (d *gpxDecoder) track(defaultName, ptName string) (Track, error) {
	tr := Track{route: ptName == "rtept"}
	depth := 0
	for {
		tok, err := d.token()
		if err != nil {
			if errors.Is(err, io.EOF) {
				return Track{}, d.errorf("the document ends inside a track")
			}
			return Track{}, err
		}
		switch t := tok.(type) {
		case xml.EndElement:
			if depth == 0 {
				if tr.Name == "" {
					tr.Name = defaultName
				}
				return tr, nil
			}
			depth--
		case xml.StartElement:
			switch {
			case depth == 0 && t.Name.Local == "name":
				if tr.Name, err = d.text(); err != nil {
					return Track{}, err
				}
			case depth == 0 && t.Name.Local == "trkseg" && ptName == "trkpt":
				depth++
			case t.Name.Local == ptName && (depth == 1 || ptName == "rtept" && depth == 0):
				p, err := d.point(t, fmt.Sprintf("%s %d", ptName, len(tr.Points)+1))
				if err != nil {
					return Track{}, err
				}
				tr.Points = append(tr.Points, p)
			default:
				if err := d.skip(); err != nil {
					return Track{}, err
				}
			}
		}
	}
}

// point reads a <wpt>, <trkpt> or <rtept> just started; what names it in
// errors ("trkpt 45").
func (d *gpxDecoder) point(se xml.StartElement, what string) (Place, error) {
	var lat, lon float64
	var haveLat, haveLon bool
	for _, a := range se.Attr {
		var dst *float64
		switch a.Name.Local {
		case "lat":
			dst, haveLat = &lat, true
		case "lon":
			dst, haveLon = &lon, true
		default:
			continue
		}
		v, err := strconv.ParseFloat(strings.TrimSpace(a.Value), 64)
		if err != nil {
			return Place{}, d.errorf("%s: %s %q is not a number", what, a.Name.Local, clip(a.Value))
		}
		*dst = v
	}
	switch {
	case !haveLat:
		return Place{}, d.errorf("%s: no lat attribute (write e.g. lat=\"-48.5\" lon=\"-123.9\")", what)
	case !haveLon:
		return Place{}, d.errorf("%s: no lon attribute (write e.g. lat=\"-48.5\" lon=\"-123.9\")", what)
	case !(lat >= -90 && lat <= 90) || !(lon >= -180 && lon <= 180):
		return Place{}, d.errorf("%s: position %g,%g is outside latitude −90…90 / longitude −180…180", what, lat, lon)
	}
	p := Place{Pos: orb.Point{lon, lat}, ElevM: nan()}
	for {
		tok, err := d.token()
		if err != nil {
			if errors.Is(err, io.EOF) {
				return Place{}, d.errorf("%s: the document ends inside it", what)
			}
			return Place{}, err
		}
		switch t := tok.(type) {
		case xml.EndElement:
			return p, nil
		case xml.StartElement:
			field := t.Name.Local
			switch field {
			case "ele", "time", "name", "desc", "sym":
			default:
				if err := d.skip(); err != nil {
					return Place{}, err
				}
				continue
			}
			v, err := d.text()
			if err != nil {
				return Place{}, err
			}
			switch field {
			case "ele":
				if v == "" {
					continue
				}
				e, err := strconv.ParseFloat(v, 64)
				if err != nil || math.IsNaN(e) || math.IsInf(e, 0) {
					return Place{}, d.errorf("%s: ele %q is not a number of metres", what, clip(v))
				}
				p.ElevM = e
			case "time":
				if v == "" {
					continue
				}
				tm, err := parseTime(v)
				if err != nil {
					return Place{}, d.errorf("%s: time %q is not a date and time (write e.g. 2026-05-16T09:00:00Z)", what, clip(v))
				}
				p.Time = tm
			case "name":
				p.Name = v
			case "desc":
				p.Description = v
			case "sym":
				p.Symbol = v
			}
		}
	}
}

// parseTime reads an xsd:dateTime (GPX 1.1 schema) into UTC: with a zone
// offset or Z, with or without fractional seconds; without a zone it is
// taken as UTC.
func parseTime(s string) (time.Time, error) {
	for _, layout := range []string{time.RFC3339Nano, "2006-01-02T15:04:05.999999999"} {
		if t, err := time.Parse(layout, s); err == nil {
			return t.UTC(), nil
		}
	}
	return time.Time{}, errors.New("not a dateTime")
}

// clip shortens echoed input to 40 characters.
func clip(s string) string {
	if r := []rune(s); len(r) > 40 {
		return string(r[:40]) + "…"
	}
	return s
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

// Encode renders out as a GPX 1.1 document, the same bytes for the same
// Output. Times are written in UTC (xsd:dateTime with a Z suffix), and only
// where a Place has one (no time of writing is added); elevations are
// rounded to 0.1 m and NaN ones omitted. Waypoints with the same name at
// the same position are written once, their descriptions joined with
// "; ".
func Encode(out Output) ([]byte, error) {
	g := &gpxgo.GPX{Version: "1.1", Creator: "mastlink", Name: out.Name}
	for _, w := range uniqueWaypoints(out.Waypoints) {
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
	if !math.IsNaN(p.ElevM) && !math.IsInf(p.ElevM, 0) {
		w.Elevation = *gpxgo.NewNullableFloat64(math.Round(p.ElevM*10) / 10)
	}
	if !p.Time.IsZero() {
		w.Timestamp = p.Time.UTC()
	}
	return w
}

// uniqueWaypoints returns ws with later waypoints of the same name and
// position merged into the first: descriptions not yet present are joined
// with "; ".
func uniqueWaypoints(ws []Place) []Place {
	out := make([]Place, 0, len(ws))
	for _, w := range ws {
		dup := false
		for i := range out {
			if out[i].Name == w.Name && out[i].Pos == w.Pos {
				if w.Description != "" && !strings.Contains(out[i].Description, w.Description) {
					if out[i].Description != "" {
						out[i].Description += "; "
					}
					out[i].Description += w.Description
				}
				dup = true
				break
			}
		}
		if !dup {
			out = append(out, w)
		}
	}
	return out
}
