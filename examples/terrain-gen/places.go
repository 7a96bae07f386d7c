package main

import (
	"bytes"
	"encoding/xml"
	"fmt"
	"math"
	"time"
)

// place is a named waypoint. Its position is found on the generated grid
// (the highest sample of a summit, the lowest crest sample of a saddle, ...)
// so the names sit where the terrain says they should; its elevation is the
// bilinear interpolation of the tiles at the written position.
type place struct {
	name, desc, sym string
	latDeg, lonDeg  float64
	eleM            float64
	candidate       bool // also listed in candidates.gpx
}

// trackPoint is one point of the hike.
type trackPoint struct {
	latDeg, lonDeg, eleM float64
	at                   time.Time
}

// Start of the hike: 16:30 UTC is about 08:15 local mean solar time at 124°W.
var hikeStart = time.Date(2026, 5, 16, 16, 30, 0, 0, time.UTC)

const (
	hikeStepM     = 35.0      // target spacing of track points
	earthRadiusM  = 6371008.8 // mean radius, for walking distances only
	posDecimals   = 1e7       // positions are written with 7 decimals (~1 cm)
	shoreMarginM  = 6.0       // the trail keeps this far above the lake surface
	searchStepKm  = 0.01
	floorSearchKm = 2.5
)

// roundPos rounds a coordinate to what the GPX file holds.
func roundPos(deg float64) float64 { return math.Round(deg*posDecimals) / posDecimals }

// at returns the rounded position of a design-frame point and the
// elevation of the tiles there.
func (g grid) at(xKm, yKm float64) (latDeg, lonDeg, eleM float64, err error) {
	lat, lon := latLonDeg(xKm, yKm)
	lat, lon = roundPos(lat), roundPos(lon)
	e, ok := g.sampleM(lat, lon)
	if !ok {
		return 0, 0, 0, fmt.Errorf("no terrain at %.5f,%.5f (x %.2f km, y %.2f km)", lat, lon, xKm, yKm)
	}
	return lat, lon, math.Round(e*10) / 10, nil
}

// heightKm is the tiles' elevation at a design-frame point (0 outside).
func (g grid) heightKm(xKm, yKm float64) float64 {
	lat, lon := latLonDeg(xKm, yKm)
	e, _ := g.sampleM(lat, lon)
	return e
}

// highestNear is the design-frame position of the highest sample within
// radiusKm of (xKm, yKm).
func (g grid) highestNear(xKm, yKm, radiusKm float64) (float64, float64) {
	bx, by, best := xKm, yKm, math.Inf(-1)
	g.eachSample(xKm-radiusKm, xKm+radiusKm, yKm-radiusKm, yKm+radiusKm, func(x, y, h float64) {
		if (x-xKm)*(x-xKm)+(y-yKm)*(y-yKm) <= radiusKm*radiusKm && h > best {
			bx, by, best = x, y, h
		}
	})
	return bx, by
}

// saddleOn finds the lowest point of a crest between x0 and x1: for each
// grid column the highest sample within bandKm of the crest line, then the
// lowest of those.
func (g grid) saddleOn(x0, x1 float64, crestY func(float64) float64, bandKm float64) (float64, float64) {
	type top struct{ x, y, h float64 }
	cols := map[float64]top{}
	g.eachSample(x0, x1, crestY(x0)-3, crestY(x0)+3, func(x, y, h float64) {
		if math.Abs(y-crestY(x)) > bandKm {
			return
		}
		if t, ok := cols[x]; !ok || h > t.h {
			cols[x] = top{x, y, h}
		}
	})
	best := top{h: math.Inf(1)}
	for _, t := range cols {
		if t.h < best.h || (t.h == best.h && t.x < best.x) {
			best = t
		}
	}
	return best.x, best.y
}

// eachSample visits the grid samples inside a design-frame box, west to
// east and north to south.
func (g grid) eachSample(x0, x1, y0, y1 float64, f func(x, y, h float64)) {
	latA, lonA := latLonDeg(x0, y0)
	latB, lonB := latLonDeg(x1, y1)
	for li := int(math.Ceil(latB * samplesPerDeg)); float64(li) >= latA*samplesPerDeg; li-- {
		for lj := int(math.Ceil(lonA * samplesPerDeg)); float64(lj) <= lonB*samplesPerDeg; lj++ {
			lat, lon := float64(li)/samplesPerDeg, float64(lj)/samplesPerDeg
			h, ok := g.sampleM(lat, lon)
			if !ok {
				continue
			}
			x, y := localKm(lat, lon)
			f(x, y, h)
		}
	}
}

// floorY is the lowest point on the north–south line at xKm within
// floor SearchKm of yKm: the valley floor.
func (g grid) floorY(xKm, yKm float64) float64 {
	by, best := yKm, math.Inf(1)
	for y := yKm - floorSearchKm; y <= yKm+floorSearchKm; y += searchStepKm {
		if h := g.heightKm(xKm, y); h < best {
			by, best = y, h
		}
	}
	return by
}

// shoreY walks from yKm in direction dir (+1 north, −1 south) until the
// ground stands shoreMarginM above the lake, then stepsKm further.
func (g grid) shoreY(xKm, yKm, dir, beyondKm float64) float64 {
	y := yKm
	for i := 0; i < 1000 && g.heightKm(xKm, y) < lakeLevelM+shoreMarginM; i++ {
		y += dir * searchStepKm
	}
	return y + dir*beyondKm
}

// sillX is the top of the moraine sill: the highest floor point between x0 and x1.
func (g grid) sillX(x0, x1 float64) (float64, float64) {
	bx, by, best := x0, 0.0, math.Inf(-1)
	for x := x0; x <= x1; x += searchStepKm {
		y := g.floorY(x, mainAxisY(x))
		if h := g.heightKm(x, y); h > best {
			bx, by, best = x, y, h
		}
	}
	return bx, by
}

// features are the design-frame positions the places and the hike use.
type features struct {
	summit, saddle, col, eastTop, knoll, sill [2]float64
}

func (g grid) findFeatures() features {
	var f features
	f.summit[0], f.summit[1] = g.highestNear(summitXKm, northCrestY(summitXKm), 1.5)
	f.saddle[0], f.saddle[1] = g.saddleOn(saddleXKm-1.5, saddleXKm+1.5, southCrestY, 1.2)
	f.col[0], f.col[1] = g.saddleOn(colXKm-1.2, colXKm+1.2, southCrestY, 1.2)
	f.eastTop[0], f.eastTop[1] = g.highestNear(8.0, southCrestY(8.0), 1.2)
	f.knoll[0], f.knoll[1] = g.highestNear(-3.0, coastCrestY(-3.0), 1.5)
	f.sill[0], f.sill[1] = g.sillX(-5.0, -3.0)
	return f
}

// places lists every waypoint of the example, in the order written.
func (g grid) places() ([]place, error) {
	f := g.findFeatures()
	river := func(x float64) [2]float64 { return [2]float64{x, g.floorY(x, mainAxisY(x))} }
	glen := func(x float64) [2]float64 { return [2]float64{x, g.floorY(x, sideAxisY(x))} }
	off := func(p [2]float64, dyKm float64) [2]float64 { return [2]float64{p[0], p[1] + dyKm} }
	hutX := -6.5
	hut := [2]float64{hutX, g.shoreY(hutX, g.floorY(hutX, mainAxisY(hutX)), +1, 0.06)}

	alder, err := g.hiddenTeamSpot(f, glen)
	if err != nil {
		return nil, err
	}

	list := []struct {
		p    place
		at   [2]float64
		cand bool
	}{
		{place{name: "Corvane Peak", sym: "Summit",
			desc: "Highest point of the island, on Corvane Ridge. Repeater site for the exercise; sees down the Ostral valley and over Ondrell Water."},
			f.summit, false},
		{place{name: "Wethermoss Saddle", sym: "Flag",
			desc: "Broad saddle on the Fennick Range between its west and east tops. Command post (Valley Base): sees Corvane Peak across the valley and down into Quillet Glen."},
			f.saddle, false},
		{place{name: "Ostral Flats staging area", sym: "Parking Area",
			desc: "Flat meadow on the north bank of the Ostral River, end of the valley road. Staging area for vehicles and the portable station."},
			off(river(5.0), 0.25), false},
		{place{name: "Team Alder, Quillet Glen", sym: "Pin",
			desc: "Field team on the floor of Quillet Glen, below Wethermoss Saddle. The Fennick Range hides Corvane Peak from here."},
			alder, false},
		{place{name: "Team Birch, upper Ostral", sym: "Pin",
			desc: "Field team on the valley floor above the west end of Ondrell Water."},
			off(river(-12.5), 0.1), false},
		{place{name: "Team Cedar, lower Ostral", sym: "Pin",
			desc: "Field team by the river where the valley opens towards the east coast."},
			off(river(13.0), 0.15), false},
		{place{name: "Ondrell Water hut", sym: "Lodge",
			desc: "Unstaffed hut on the north shore of Ondrell Water, a little above the lake."},
			hut, false},
		{place{name: "Gorsefold trailhead", sym: "Trailhead",
			desc: "Start of the track up the valley to Ondrell Water and over Quillet Col into Quillet Glen."},
			off(river(-2.0), -0.3), false},
		{place{name: "Fennick East Top", sym: "Summit",
			desc: "Candidate site for the portable station: the east top of the Fennick Range, overlooking both valleys."},
			f.eastTop, true},
		{place{name: "Sill Moraine", sym: "Flag",
			desc: "Candidate site for the portable station: top of the moraine that dams Ondrell Water, on the valley floor."},
			f.sill, true},
		{place{name: "Quillet Col", sym: "Flag",
			desc: "Candidate site for the portable station: the hikers' pass over the Fennick Range between Ondrell Water and Quillet Glen."},
			f.col, true},
		{place{name: "Ostral Bend", sym: "Flag",
			desc: "Candidate site for the portable station: a bend of the river on the valley floor, easy to reach by road."},
			river(9.0), true},
		{place{name: "Bracken Knoll", sym: "Summit",
			desc: "Candidate site for the portable station: a knoll on the Quarvel Hills, south of Quillet Glen."},
			f.knoll, true},
	}
	out := make([]place, 0, len(list))
	for _, e := range list {
		p := e.p
		var err error
		p.latDeg, p.lonDeg, p.eleM, err = g.at(e.at[0], e.at[1])
		if err != nil {
			return nil, fmt.Errorf("place %q: %w", p.name, err)
		}
		p.candidate = e.cand
		out = append(out, p)
	}
	return out, nil
}

// Antenna heights above ground used to place Team Alder (m).
const (
	repeaterMastM    = 20
	commandPostMastM = 9
	teamMastM        = 2
	losMarginM       = 5 // clearance or obstruction the placement demands
)

// hiddenTeamSpot places Team Alder on the floor of Quillet Glen below the
// saddle, where the command post sees it and the repeater does not: the
// point for which the smaller of the two margins is largest.
func (g grid) hiddenTeamSpot(f features, glen func(float64) [2]float64) ([2]float64, error) {
	pos := func(p [2]float64) (lat, lon, e float64) {
		lat, lon, e, _ = g.at(p[0], p[1])
		return
	}
	sLat, sLon, sEle := pos(f.summit)
	cLat, cLon, cEle := pos(f.saddle)
	best, bestScore := [2]float64{}, math.Inf(-1)
	for x := f.saddle[0] - 2.5; x <= f.saddle[0]+2.5; x += 0.05 {
		p := glen(x)
		lat, lon, e := pos(p)
		fromCP := g.clearanceM(cLat, cLon, cEle+commandPostMastM, lat, lon, e+teamMastM)
		fromRep := g.clearanceM(sLat, sLon, sEle+repeaterMastM, lat, lon, e+teamMastM)
		if score := math.Min(fromCP, -fromRep); score > bestScore {
			best, bestScore = p, score
		}
	}
	if bestScore < losMarginM {
		return best, fmt.Errorf("no spot in Quillet Glen is seen from the command post and hidden from the repeater (best margin %.1f m)", bestScore)
	}
	return best, nil
}

// clearanceM is the smallest height of the straight ray between two
// antennas (heights in m above sea level) over the ground and the earth
// bulge for k = 4/3 (common practice); negative when the ground cuts it.
func (g grid) clearanceM(lat1, lon1, h1, lat2, lon2, h2 float64) float64 {
	const effRadiusM = 4.0 / 3 * earthRadiusM
	d := haversineM(lat1, lon1, lat2, lon2)
	n := int(d/25) + 2
	worst := math.Inf(1)
	for i := 1; i < n; i++ {
		u := float64(i) / float64(n)
		ground, ok := g.sampleM(lat1+(lat2-lat1)*u, lon1+(lon2-lon1)*u)
		if !ok {
			continue
		}
		d1 := u * d
		ground += d1 * (d - d1) / (2 * effRadiusM)
		worst = math.Min(worst, h1+(h2-h1)*u-ground)
	}
	return worst
}

// hike is the walk from Gorsefold trailhead up the valley, along the south
// shore of Ondrell Water, over Quillet Col and down into Quillet Glen.
func (g grid) hike() ([]trackPoint, error) {
	f := g.findFeatures()
	river := func(x float64) [2]float64 { return [2]float64{x, g.floorY(x, mainAxisY(x))} }
	glen := func(x float64) [2]float64 { return [2]float64{x, g.floorY(x, sideAxisY(x))} }
	off := func(p [2]float64, dyKm float64) [2]float64 { return [2]float64{p[0], p[1] + dyKm} }

	ctrl := [][2]float64{off(river(-2.0), -0.3), off(river(-2.8), -0.3), off(river(-3.5), -0.3), off(f.sill, -0.2)}
	// Along the south shore, keeping above the water.
	lastShore := 0.0
	for x := -4.6; x >= -6.0; x -= 0.2 {
		y := g.shoreY(x, g.floorY(x, mainAxisY(x)), -1, 0.04)
		ctrl = append(ctrl, [2]float64{x, y})
		lastShore = y
	}
	// Up to the col in two legs, then down into the glen and along it.
	ctrl = append(ctrl,
		[2]float64{-6.4, 0.5*(lastShore+f.col[1]) + 0.2},
		f.col,
		[2]float64{-5.6, 0.5*(f.col[1]+sideAxisY(-5.6)) + 0.3},
		glen(-4.9), glen(-4.4))

	var pts []trackPoint
	add := func(x, y float64) error {
		lat, lon, e, err := g.at(x, y)
		if err != nil {
			return fmt.Errorf("hike: %w", err)
		}
		pts = append(pts, trackPoint{latDeg: lat, lonDeg: lon, eleM: e})
		return nil
	}
	if err := add(ctrl[0][0], ctrl[0][1]); err != nil {
		return nil, err
	}
	for i := 1; i < len(ctrl); i++ {
		a, b := ctrl[i-1], ctrl[i]
		la, oa := latLonDeg(a[0], a[1])
		lb, ob := latLonDeg(b[0], b[1])
		n := int(math.Ceil(haversineM(la, oa, lb, ob) / hikeStepM))
		for k := 1; k <= n; k++ {
			u := float64(k) / float64(n)
			if err := add(a[0]+(b[0]-a[0])*u, a[1]+(b[1]-a[1])*u); err != nil {
				return nil, err
			}
		}
	}

	// Times from Tobler's hiking function (W. Tobler 1993):
	// speed km/h = 6 exp(−3.5 |dh/dx + 0.05|).
	t := 0.0 // seconds since the start
	pts[0].at = hikeStart
	for i := 1; i < len(pts); i++ {
		a, b := pts[i-1], pts[i]
		d := haversineM(a.latDeg, a.lonDeg, b.latDeg, b.lonDeg)
		kmh := 6 * math.Exp(-3.5*math.Abs((b.eleM-a.eleM)/d+0.05))
		t += d / (kmh / 3.6)
		pts[i].at = hikeStart.Add(time.Duration(math.Round(t)) * time.Second)
	}
	return pts, nil
}

// haversineM is the great-circle distance on a sphere of earthRadiusM.
func haversineM(lat1, lon1, lat2, lon2 float64) float64 {
	const rad = math.Pi / 180
	dlat, dlon := (lat2-lat1)*rad, (lon2-lon1)*rad
	a := math.Sin(dlat/2)*math.Sin(dlat/2) + math.Cos(lat1*rad)*math.Cos(lat2*rad)*math.Sin(dlon/2)*math.Sin(dlon/2)
	return 2 * earthRadiusM * math.Asin(math.Min(1, math.Sqrt(a)))
}

// --- GPX 1.1 -----------------------------------------------------------------

const gpxHeader = `<?xml version="1.0" encoding="UTF-8"?>
<gpx version="1.1" creator="mastlink examples/terrain-gen" xmlns="http://www.topografix.com/GPX/1/1" xmlns:xsi="http://www.w3.org/2001/XMLSchema-instance" xsi:schemaLocation="http://www.topografix.com/GPX/1/1 http://www.topografix.com/GPX/1/1/gpx.xsd">
`

const inventedNote = "Invented places on an invented island, placed over open ocean (no land exists here). Elevations from the example terrain in ../terrain."

func esc(s string) string {
	var b bytes.Buffer
	_ = xml.EscapeText(&b, []byte(s)) // writing to a bytes.Buffer cannot fail
	return b.String()
}

func writeMetadata(b *bytes.Buffer, name string) {
	fmt.Fprintf(b, "  <metadata>\n    <name>%s</name>\n    <desc>%s</desc>\n  </metadata>\n", esc(name), esc(inventedNote))
}

func writeWpt(b *bytes.Buffer, p place) {
	fmt.Fprintf(b, "  <wpt lat=\"%.7f\" lon=\"%.7f\">\n    <ele>%.1f</ele>\n    <name>%s</name>\n    <desc>%s</desc>\n    <sym>%s</sym>\n  </wpt>\n",
		p.latDeg, p.lonDeg, p.eleM, esc(p.name), esc(p.desc), esc(p.sym))
}

// waypointsGPX writes the places (all, or only the candidates) as GPX 1.1.
func waypointsGPX(title string, ps []place, candidatesOnly bool) []byte {
	var b bytes.Buffer
	b.WriteString(gpxHeader)
	writeMetadata(&b, title)
	for _, p := range ps {
		if !candidatesOnly || p.candidate {
			writeWpt(&b, p)
		}
	}
	b.WriteString("</gpx>\n")
	return b.Bytes()
}

// trackGPX writes the hike as a GPX 1.1 track with elevations and UTC times.
func trackGPX(title string, pts []trackPoint) []byte {
	var b bytes.Buffer
	b.WriteString(gpxHeader)
	writeMetadata(&b, title)
	fmt.Fprintf(&b, "  <trk>\n    <name>%s</name>\n    <trkseg>\n", esc(title))
	for _, p := range pts {
		fmt.Fprintf(&b, "      <trkpt lat=\"%.7f\" lon=\"%.7f\"><ele>%.1f</ele><time>%s</time></trkpt>\n",
			p.latDeg, p.lonDeg, p.eleM, p.at.UTC().Format(time.RFC3339))
	}
	b.WriteString("    </trkseg>\n  </trk>\n</gpx>\n")
	return b.Bytes()
}
