package main

import (
	"math"

	"github.com/paulmach/orb"
)

// splitAntimeridian cuts a line or a polygon that crosses the antimeridian
// (longitude ±180°) in two, so that no part's coordinates jump across it,
// as RFC 7946 §3.1.9 asks: a LineString becomes a MultiLineString, a
// single-ring Polygon a MultiPolygon. Longitudes of the result lie in
// [−180, 180]; the crossing latitude is interpolated linearly in longitude
// (the parts are short: a link's two ends, a route's points, a keep-out
// circle). Other geometries, and those that do not cross, come back as
// they are (longitudes above 180 or below −180 wrapped).
func splitAntimeridian(g orb.Geometry) orb.Geometry {
	switch v := g.(type) {
	case orb.LineString:
		parts := splitLine(v)
		if len(parts) == 1 {
			return parts[0]
		}
		return parts
	case orb.MultiLineString:
		var out orb.MultiLineString
		for _, l := range v {
			out = append(out, splitLine(l)...)
		}
		return out
	case orb.Polygon:
		if len(v) != 1 {
			return v
		}
		parts := splitRing(v[0])
		if len(parts) == 1 {
			return orb.Polygon{parts[0]}
		}
		var out orb.MultiPolygon
		for _, r := range parts {
			out = append(out, orb.Polygon{r})
		}
		return out
	}
	return g
}

// wrapLon brings a longitude into [−180, 180).
func wrapLon(lon float64) float64 {
	if lon >= -180 && lon < 180 {
		return lon
	}
	return math.Mod(math.Mod(lon+180, 360)+360, 360) - 180
}

// splitLine cuts l wherever a segment's longitudes differ by more than
// 180° (the short way round crosses the antimeridian).
func splitLine(l orb.LineString) orb.MultiLineString {
	if len(l) == 0 {
		return orb.MultiLineString{l}
	}
	var out orb.MultiLineString
	cur := orb.LineString{{wrapLon(l[0][0]), l[0][1]}}
	for i := 1; i < len(l); i++ {
		a := cur[len(cur)-1]
		b := orb.Point{wrapLon(l[i][0]), l[i][1]}
		d := b[0] - a[0]
		if math.Abs(d) > 180 {
			// Unwrap b next to a, find where the segment meets ±180.
			edge := 180.0
			bu := b[0] - 360
			if d < 0 { // eastward across +180
				bu = b[0] + 360
			} else {
				edge = -180
			}
			t := (edge - a[0]) / (bu - a[0])
			lat := a[1] + t*(b[1]-a[1])
			cur = append(cur, orb.Point{edge, lat})
			out = append(out, cur)
			cur = orb.LineString{{-edge, lat}}
		}
		cur = append(cur, b)
	}
	return append(out, cur)
}

// splitRing cuts a closed ring that crosses the antimeridian into the part
// east of it and the part west of it, each closed.
func splitRing(r orb.Ring) []orb.Ring {
	if len(r) < 4 {
		return []orb.Ring{r}
	}
	// Unwrap the longitudes along the ring.
	u := make(orb.Ring, len(r))
	u[0] = orb.Point{wrapLon(r[0][0]), r[0][1]}
	crosses := false
	for i := 1; i < len(r); i++ {
		lon := wrapLon(r[i][0])
		for lon-u[i-1][0] > 180 {
			lon -= 360
		}
		for lon-u[i-1][0] < -180 {
			lon += 360
		}
		u[i] = orb.Point{lon, r[i][1]}
		if u[i][0] > 180 || u[i][0] < -180 {
			crosses = true
		}
	}
	if !crosses {
		return []orb.Ring{u}
	}
	// The ring lies across +180 (or −180): clip it at the line and shift
	// the far part by 360°.
	edge := 180.0
	for _, p := range u {
		if p[0] < -180 {
			edge = -180
			break
		}
	}
	near := clipRing(u, edge, edge > 0)   // the side within [−180, 180]
	far := clipRing(u, edge, !(edge > 0)) // the side beyond it
	for i := range far {
		far[i][0] -= math.Copysign(360, edge)
	}
	var out []orb.Ring
	for _, part := range []orb.Ring{near, far} {
		if len(part) >= 4 {
			out = append(out, part)
		}
	}
	return out
}

// clipRing keeps the part of the closed ring u on one side of the meridian
// at lon (west of it when west, else east), Sutherland–Hodgman against one
// line; the result is closed.
func clipRing(u orb.Ring, lon float64, west bool) orb.Ring {
	inside := func(p orb.Point) bool {
		if west {
			return p[0] <= lon
		}
		return p[0] >= lon
	}
	cross := func(a, b orb.Point) orb.Point {
		t := (lon - a[0]) / (b[0] - a[0])
		return orb.Point{lon, a[1] + t*(b[1]-a[1])}
	}
	var out orb.Ring
	n := len(u) - 1 // the last vertex repeats the first
	for i := 0; i < n; i++ {
		a, b := u[i], u[(i+1)%n]
		switch {
		case inside(a) && inside(b):
			out = append(out, b)
		case inside(a):
			out = append(out, cross(a, b))
		case inside(b):
			out = append(out, cross(a, b), b)
		}
	}
	if len(out) > 0 {
		out = append(out, out[0])
	}
	return out
}
