package report

import (
	"fmt"
	"image/png"
	"io"
	"math"

	"github.com/paulmach/orb"
)

// MarkerKind says how a marker is drawn: each kind has its own shape, so
// they stay apart in greyscale.
type MarkerKind int

const (
	// MarkerStation is a station of the plan: a dark disc.
	MarkerStation MarkerKind = iota
	// MarkerSite is the site the map is about (the mast of a coverage map):
	// a large dark triangle.
	MarkerSite
	// MarkerTarget is a party to be reached (a repeater, a far station): a
	// white square with a dark edge.
	MarkerTarget
	// MarkerCandidate is a candidate site: a disc with its rank number,
	// filled with its value's band colour when it has one.
	MarkerCandidate
	// MarkerSpot is a spot to call from (on a route): a small dark diamond.
	MarkerSpot
)

// Marker is a labelled point on a map.
type Marker struct {
	At    orb.Point // lon, lat in degrees (WGS84)
	Label string    // drawn beside the symbol; may be empty
	Kind  MarkerKind
	// Rank is a candidate site's rank, 1 for the best, drawn in its disc
	// (0 draws none).
	Rank int
	// Value, when HasValue is set, is the marker's value in the map's
	// Scale units (a candidate's worst margin, dB); it colours a candidate's
	// disc.
	Value    float64
	HasValue bool
}

// Link is a radio path drawn as a straight line between its ends (on the
// map's projection; fine for the tens of kilometres of a VHF/UHF link),
// coloured by Value in the map's Scale.
type Link struct {
	From, To orb.Point // lon, lat in degrees
	// Value is the link's value in Scale units (its worst margin over the
	// two directions, dB); below the lowest level it is drawn dashed dark
	// grey.
	Value float64
	// Label is written at the middle of the line (e.g. "+12.4 dB").
	Label string
}

// Track is a route drawn segment by segment: the segment from point i to
// point i+1 takes the band of the lower of Values[i] and Values[i+1] (the
// worst margin along it); a segment with an end without value (NaN) or
// below the lowest level is drawn dashed dark grey.
type Track struct {
	Points []orb.Point // lon, lat in degrees; at least 2
	Values []float64   // one per point, Scale units (worst margin, dB)
	Label  string      // written near the track's start; may be empty
}

// Stretch is a part of a track to point out, such as a dead stretch where
// no party is heard: drawn as a broad dark band under the track, with a
// bar across each end.
type Stretch struct {
	Line  []orb.Point // lon, lat in degrees; at least 2
	Label string      // written at the middle (e.g. "no contact 1.2 km")
}

// Circle is a circle on the ground, such as an RF-exposure keep-out
// distance around a mast: the points RadiusM metres from Centre along
// geodesics on WGS84 (Karney's direct solution, terrain.Direct), drawn to
// scale with a dashed edge and a light fill. A circle smaller than a few
// pixels still shows its edge as a small ring.
type Circle struct {
	Centre  orb.Point // lon, lat in degrees
	RadiusM float64   // metres, more than 0
	Label   string
}

// Map is everything a map shows. Only Markers, Links, Tracks, Stretches,
// Circles, Terrain or Overlay need be given; the rest has defaults. Inputs
// are read, never changed.
type Map struct {
	// Title is the heading printed above the map; Subtitle a second,
	// smaller line (frequency, heights, date …). Either may be empty.
	Title, Subtitle string
	// Bounds is the area shown. When it is zero the map fits the overlay
	// and every marker, line and circle, with a margin, widened so the
	// map is not much wider than tall or taller than wide.
	Bounds Bounds
	// WidthPx is the width of the whole image in pixels, 480 to 8000
	// (DefaultMapWidthPx when 0); the height follows from the area shown.
	WidthPx int
	// Imperial labels the scale bar in miles and feet instead of
	// kilometres and metres.
	Imperial bool
	// Terrain is a grid of ground heights in metres for the shaded-relief
	// base (Hillshade); nil draws a plain paper-coloured base. Only the part
	// under the map is shaded.
	Terrain *Grid
	// Overlay is a grid of values in Scale units drawn over the terrain,
	// each cell in its band's colour, OverlayOpacity opaque; cells without
	// data or below the lowest level are not coloured.
	Overlay *Grid
	// OverlayOpacity is 0 to 1 (DefaultOverlayOpacity when 0).
	OverlayOpacity float64
	// Scale colours the overlay, links, tracks and candidates, and is drawn
	// as the legend. It must have levels when any of those has values.
	Scale Scale
	// Features, drawn in this order over the overlay: circles, stretches,
	// tracks, links, markers; then the labels, placed so they do not hide
	// one another where there is room.
	Circles   []Circle
	Stretches []Stretch
	Tracks    []Track
	Links     []Link
	Markers   []Marker
	// Credit is a line of small print under the legend (data sources,
	// date); the map adds how it was drawn.
	Credit string
}

// Defaults of a map.
const (
	DefaultMapWidthPx     = 1200
	DefaultOverlayOpacity = 0.6
)

// MapPNG draws m as a PNG image: a title, the map (equirectangular, true to
// scale in both directions at the middle latitude of the area shown) over
// a shaded relief of the terrain lit from the north-west (Hillshade), the
// overlay, circles, tracks, links and labelled markers, a north arrow, and
// under it the legend of the scale and a scale bar. The same map gives the
// same bytes.
//
// On bad data (bounds, grids, a scale missing where values are drawn, a
// track with a value count different from its point count, a circle of no
// radius) the error wraps ErrChartData and nothing is written. Write errors
// from w are returned as they are.
func MapPNG(w io.Writer, m Map) error {
	l, err := layoutMap(&m)
	if err != nil {
		return err
	}
	img, err := l.draw(&m)
	if err != nil {
		return err
	}
	return png.Encode(w, img)
}

// checkMap says what is wrong with m.
func checkMap(m *Map) error {
	if m.WidthPx != 0 && (m.WidthPx < 480 || m.WidthPx > 8000) {
		return fmt.Errorf("%w: map width %d px: give 480 to 8000", ErrChartData, m.WidthPx)
	}
	if !(m.OverlayOpacity >= 0 && m.OverlayOpacity <= 1) {
		return fmt.Errorf("%w: overlay opacity %v: give 0 to 1", ErrChartData, m.OverlayOpacity)
	}
	if m.Bounds != (Bounds{}) {
		if err := m.Bounds.check("map"); err != nil {
			return err
		}
	}
	if m.Terrain != nil {
		if err := m.Terrain.check("terrain"); err != nil {
			return err
		}
	}
	valued := m.Overlay != nil || len(m.Links) > 0 || len(m.Tracks) > 0
	for _, mk := range m.Markers {
		valued = valued || mk.HasValue
		if err := checkPoint(mk.At, "marker "+quote(mk.Label)); err != nil {
			return err
		}
	}
	if m.Overlay != nil {
		if err := m.Overlay.check("overlay"); err != nil {
			return err
		}
	}
	if valued || len(m.Scale.Levels) > 0 {
		if err := m.Scale.check(); err != nil {
			return err
		}
	}
	for i, c := range m.Circles {
		if !(c.RadiusM > 0) || !finite(c.RadiusM) {
			return fmt.Errorf("%w: circle %d %s: radius %v m; give more than 0", ErrChartData, i+1, quote(c.Label), c.RadiusM)
		}
		if err := checkPoint(c.Centre, "circle "+quote(c.Label)); err != nil {
			return err
		}
	}
	for i, s := range m.Stretches {
		if err := checkLine(s.Line, fmt.Sprintf("stretch %d", i+1)); err != nil {
			return err
		}
	}
	for i, t := range m.Tracks {
		if err := checkLine(t.Points, fmt.Sprintf("track %d", i+1)); err != nil {
			return err
		}
		if len(t.Values) != len(t.Points) {
			return fmt.Errorf("%w: track %d has %d values for %d points; give one per point (NaN where unknown)", ErrChartData, i+1, len(t.Values), len(t.Points))
		}
	}
	for i, k := range m.Links {
		if err := checkLine([]orb.Point{k.From, k.To}, fmt.Sprintf("link %d", i+1)); err != nil {
			return err
		}
	}
	return nil
}

func quote(s string) string { return fmt.Sprintf("%q", s) }

func checkPoint(p orb.Point, what string) error {
	if !finite(p[0]) || !finite(p[1]) || math.Abs(p[1]) > 90 || math.Abs(p[0]) > 180 {
		return fmt.Errorf("%w: %s at (%v, %v): give longitude -180 to 180 and latitude -90 to 90", ErrChartData, what, p[0], p[1])
	}
	return nil
}

func checkLine(pts []orb.Point, what string) error {
	if len(pts) < 2 {
		return fmt.Errorf("%w: %s has %d points; give at least 2", ErrChartData, what, len(pts))
	}
	for _, p := range pts {
		if err := checkPoint(p, what); err != nil {
			return err
		}
	}
	return nil
}

// fitBounds is the area a map shows when its Bounds are not given.
func fitBounds(m *Map) (Bounds, error) {
	b := Bounds{West: math.Inf(1), South: math.Inf(1), East: math.Inf(-1), North: math.Inf(-1)}
	add := func(p orb.Point) {
		b.West, b.East = math.Min(b.West, p[0]), math.Max(b.East, p[0])
		b.South, b.North = math.Min(b.South, p[1]), math.Max(b.North, p[1])
	}
	if m.Overlay != nil {
		add(orb.Point{m.Overlay.Bounds.West, m.Overlay.Bounds.South})
		add(orb.Point{m.Overlay.Bounds.East, m.Overlay.Bounds.North})
	}
	for _, mk := range m.Markers {
		add(mk.At)
	}
	for _, k := range m.Links {
		add(k.From)
		add(k.To)
	}
	for _, t := range m.Tracks {
		for _, p := range t.Points {
			add(p)
		}
	}
	for _, s := range m.Stretches {
		for _, p := range s.Line {
			add(p)
		}
	}
	for _, c := range m.Circles {
		latM, lonM := MetresPerDegree(c.Centre[1])
		dLat, dLon := c.RadiusM/latM, c.RadiusM/math.Max(lonM, 1)
		add(orb.Point{c.Centre[0] - dLon, c.Centre[1] - dLat})
		add(orb.Point{c.Centre[0] + dLon, c.Centre[1] + dLat})
	}
	if math.IsInf(b.West, 1) {
		if m.Terrain == nil {
			return b, fmt.Errorf("%w: the map has nothing to show: give bounds, terrain, an overlay or features", ErrChartData)
		}
		return m.Terrain.Bounds, nil
	}
	// At least 1 km across, a margin of 12 % each side (none with an
	// overlay, whose edge is the natural frame), then the shorter side
	// widened to at least 0.6 of the longer.
	mid := (b.South + b.North) / 2
	latM, lonM := MetresPerDegree(mid)
	wM, hM := (b.East-b.West)*lonM, (b.North-b.South)*latM
	pad := 0.12
	if m.Overlay != nil {
		pad = 0
	}
	wM, hM = math.Max(wM*(1+2*pad), 1000), math.Max(hM*(1+2*pad), 1000)
	wM, hM = math.Max(wM, 0.6*hM), math.Max(hM, 0.6*wM)
	cx, cy := (b.West+b.East)/2, mid
	out := Bounds{West: cx - wM/2/lonM, East: cx + wM/2/lonM, South: cy - hM/2/latM, North: cy + hM/2/latM}
	out.South, out.North = math.Max(out.South, -89.9), math.Min(out.North, 89.9)
	out.West, out.East = math.Max(out.West, -180), math.Min(out.East, 180)
	return out, out.check("map")
}
