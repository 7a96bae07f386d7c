package plan

import (
	"fmt"
	"math"
	"sort"
	"time"

	"github.com/mastlink/mastlink/plan/gpx"
	"github.com/mastlink/mastlink/terrain"
)

// trackLine is a GPX track as a chain of WGS84 geodesics between its
// points, measured once, so that positions at any distance along it are
// cheap to find.
type trackLine struct {
	points []gpx.Place
	cumM   []float64 // distance along the track at each point, metres
	aziDeg []float64 // azimuth at point i towards point i+1, degrees
}

// newTrackLine measures tr along the geodesics between its points
// (Karney's inverse solution, terrain.Inverse). It needs at least two
// distinct points.
func newTrackLine(tr gpx.Track) (*trackLine, error) {
	if len(tr.Points) < 2 {
		return nil, fmt.Errorf("track %q has %d point(s): a route needs at least two", tr.Name, len(tr.Points))
	}
	t := &trackLine{points: tr.Points, cumM: make([]float64, len(tr.Points)), aziDeg: make([]float64, len(tr.Points))}
	for i := 1; i < len(tr.Points); i++ {
		a, b := tr.Points[i-1].Pos, tr.Points[i].Pos
		d, azi, _ := terrain.Inverse(a.Lat(), a.Lon(), b.Lat(), b.Lon())
		if math.IsNaN(d) {
			return nil, fmt.Errorf("track %q point %d: position %g,%g is not valid", tr.Name, i+1, b.Lat(), b.Lon())
		}
		t.cumM[i] = t.cumM[i-1] + d
		t.aziDeg[i-1] = azi
	}
	if t.lengthM() == 0 {
		return nil, fmt.Errorf("track %q has no length: all its points are at one place", tr.Name)
	}
	return t, nil
}

// lengthM is the length of the track in metres.
func (t *trackLine) lengthM() float64 { return t.cumM[len(t.cumM)-1] }

// at returns the position (degrees) and the time (UTC, zero when the track
// has no times there) at distM metres along the track, clamped to its ends.
// Positions between two track points follow the geodesic between them
// (terrain.Direct); times are interpolated linearly in distance.
func (t *trackLine) at(distM float64) (lat, lon float64, tm time.Time) {
	n := len(t.points)
	if distM <= 0 {
		p := t.points[0]
		return p.Pos.Lat(), p.Pos.Lon(), p.Time
	}
	if distM >= t.lengthM() {
		p := t.points[n-1]
		return p.Pos.Lat(), p.Pos.Lon(), p.Time
	}
	// The segment j with cumM[j] ≤ distM < cumM[j+1] (so of positive length).
	j := sort.SearchFloat64s(t.cumM, distM)
	if j == n || t.cumM[j] > distM {
		j--
	}
	for j+1 < n-1 && t.cumM[j+1] <= distM {
		j++
	}
	a, b := t.points[j], t.points[j+1]
	into := distM - t.cumM[j]
	lat, lon, _ = terrain.Direct(a.Pos.Lat(), a.Pos.Lon(), t.aziDeg[j], into)
	if !a.Time.IsZero() && !b.Time.IsZero() {
		f := into / (t.cumM[j+1] - t.cumM[j])
		tm = a.Time.Add(time.Duration(f * float64(b.Time.Sub(a.Time)))).UTC()
	}
	return lat, lon, tm
}

// sampleDistancesM returns how many samples a track of lengthM metres gets
// at spacingM metres: one at 0, one every spacingM, and one at the end.
func sampleCount(lengthM, spacingM float64) int {
	return int(math.Ceil(lengthM/spacingM-1e-9)) + 1
}

// sampleDistanceM is the distance along the track of sample k of n.
func sampleDistanceM(k, n int, lengthM, spacingM float64) float64 {
	if k == n-1 {
		return lengthM
	}
	return float64(k) * spacingM
}
