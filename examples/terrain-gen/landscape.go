package main

import "math"

// The landscape is one continuous function of position, heightM(lat, lon).
// Every sample of every tile is that function evaluated on the 3″ grid, so
// samples on a whole-degree line shared by two tiles are identical in both.
//
// Features are laid out in a local design frame: x km east and y km north of
// frameLatDeg, frameLonDeg, with a fixed equirectangular scale. The frame is a
// drawing aid only; nothing in mastlink relies on it.

const (
	frameLatDeg = -48.5  // design frame origin, degrees (invented landscape over open ocean)
	frameLonDeg = -124.0 // on the seam between tiles S49W125 and S49W124
	kmPerDegLat = 111.2  // approximate, design frame only
	kmPerDegLon = 73.7   // ≈ 111.3 km × cos 48.5°, design frame only

	lakeLevelM = 412.0 // surface of Ondrell Water, metres above sea level

	// Seeds of the noise fields; fixed so the output never changes.
	seedRough uint64 = 0x6d61737431 // "mast1"
	seedCoast uint64 = 0x636f617374 // "coast"
	seedWarpX uint64 = 0x7761727078 // "warpx"
	seedWarpY uint64 = 0x7761727079 // "warpy"
	seedGully uint64 = 0x67756c6c79 // "gully"
)

// localKm converts a position to the design frame (x km east, y km north).
func localKm(latDeg, lonDeg float64) (xKm, yKm float64) {
	return (lonDeg - frameLonDeg) * kmPerDegLon, (latDeg - frameLatDeg) * kmPerDegLat
}

// latLonDeg converts a design-frame position to latitude and longitude.
func latLonDeg(xKm, yKm float64) (latDeg, lonDeg float64) {
	return frameLatDeg + yKm/kmPerDegLat, frameLonDeg + xKm/kmPerDegLon
}

// heightM is the landscape: metres above sea level at a position (0 = sea).
func heightM(latDeg, lonDeg float64) float64 {
	x, y := localKm(latDeg, lonDeg)
	return heightLocal(x, y)
}

// table is a smooth curve through (x km, value) points, constant beyond its ends.
type table [][2]float64

func (t table) at(x float64) float64 {
	n := len(t)
	if x <= t[0][0] {
		return t[0][1]
	}
	if x >= t[n-1][0] {
		return t[n-1][1]
	}
	i := 1
	for x > t[i][0] {
		i++
	}
	// Catmull–Rom between t[i-1] and t[i], so slopes have no kinks.
	a, b := t[i-1], t[i]
	u := (x - a[0]) / (b[0] - a[0])
	h := b[0] - a[0]
	m0 := t.slope(i-1) * h
	m1 := t.slope(i) * h
	u2, u3 := u*u, u*u*u
	return (2*u3-3*u2+1)*a[1] + (u3-2*u2+u)*m0 + (-2*u3+3*u2)*b[1] + (u3-u2)*m1
}

// slope is the finite-difference slope at vertex i (m per km).
func (t table) slope(i int) float64 {
	lo, hi := i-1, i+1
	if lo < 0 {
		lo = 0
	}
	if hi > len(t)-1 {
		hi = len(t) - 1
	}
	return (t[hi][1] - t[lo][1]) / (t[hi][0] - t[lo][0])
}

// Floors and crest heights along the island (x km → m).
var (
	// Ostral River: a low divide in the west, the lake basin behind a
	// moraine sill, then a gentle fall to the east coast.
	mainFloor = table{{-30, 300}, {-25, 520}, {-19, 760}, {-15, 540}, {-13, 470},
		{-11.5, 440}, {-10, 400}, {-7.5, 382}, {-5.2, 396}, {-4.3, 436}, {-3.6, 432},
		{-2.5, 398}, {0, 370}, {3, 335}, {6, 300}, {10, 260}, {14, 222}, {18, 185},
		{22, 120}, {26, 40}}
	// Quillet Glen, the side valley south of the Fennick Range.
	sideFloor = table{{-30, 600}, {-15, 930}, {-12, 900}, {-9, 780}, {-6, 640},
		{-3, 560}, {0, 500}, {4, 430}, {8, 360}, {12, 260}, {16, 150}, {22, 40}}
	// Corvane Ridge, north of the main valley.
	northCrest = table{{-26, 700}, {-20, 950}, {-14, 1150}, {-8, 1250}, {-3, 1300},
		{1, 1320}, {6, 1280}, {11, 1180}, {16, 1000}, {21, 760}, {26, 500}}
	// Fennick Range, between the main valley and Quillet Glen (dips added below).
	southCrest = table{{-26, 750}, {-20, 1050}, {-14, 1250}, {-8, 1300}, {-2, 1360},
		{2.5, 1330}, {8, 1340}, {13, 1180}, {18, 950}, {24, 600}}
	// Quarvel Hills, along the south coast.
	coastCrest = table{{-26, 400}, {-18, 650}, {-10, 800}, {-2, 780}, {6, 720},
		{12, 600}, {18, 420}, {24, 250}}
)

// Named features in the design frame (km).
const (
	summitXKm    = 3.5  // Corvane Peak, on Corvane Ridge
	summitRiseM  = 400  // added to the ridge crest
	saddleXKm    = 2.5  // Wethermoss Saddle, on the Fennick Range
	saddleDipM   = 320  // taken from the crest
	colXKm       = -6.2 // Quillet Col, the hikers' pass
	colDipM      = 360
	lakeWestXKm  = -11.5 // the lake fills the basin between these x
	lakeEastXKm  = -4.3
	lakeHalfYKm  = 3.0 // and within this distance of the valley axis
	sideHeadXKm  = -9.5
	islandRxKm   = 25.0 // island outline (ellipse) half-axes and centre
	islandRyKm   = 17.0
	islandCyKm   = -3.0
	coastFullR   = 0.82 // land at full height inside this ellipse radius
	coastSeaR    = 1.0  // sea outside it (before the coastline wobble)
	coastWobble  = 0.04
	mainHalfWKm  = 0.4 // half-width of the flat main valley floor
	sideHalfWKm  = 0.25
	outerDecayKm = 4.0
)

// mainAxisY is the Ostral River's line (y km at x km).
func mainAxisY(x float64) float64 {
	return 0.9*math.Sin(x/6.5+0.4) - 0.2*math.Sin(x/2.9)
}

// Crest and side-valley lines, relative to nothing: absolute y km at x km.
func northCrestY(x float64) float64 { return mainAxisY(x) + 5.0 + 0.4*math.Sin(x/4.3) }
func southCrestY(x float64) float64 { return mainAxisY(x) - 5.0 + 0.4*math.Sin(x/5.1+1) }
func coastCrestY(x float64) float64 { return mainAxisY(x) - 13.0 + 0.5*math.Sin(x/7.7+2) }
func sideAxisY(x float64) float64   { return mainAxisY(x) - 9.3 + 0.5*math.Sin(x/3.1) }

// mainHalfWidth widens the valley floor where the lake lies.
func mainHalfWidth(x float64) float64 {
	u := (x + 7.4) / 2.2
	return mainHalfWKm + 1.2*math.Exp(-u*u)
}

// southCrestM is the Fennick Range crest with its saddle and col.
func southCrestM(x float64) float64 {
	us := (x - saddleXKm) / 1.2
	uc := (x - colXKm) / 1.0
	return southCrest.at(x) - saddleDipM*math.Exp(-us*us) - colDipM*math.Exp(-uc*uc)
}

// valleyShape rises from 0 on the floor to 1 on the crest: a U-shaped
// (glacial) cross-section, concave upwards so floors are seen from crests.
func valleyShape(t float64) float64 {
	if t <= 0 {
		return 0
	}
	if t >= 1 {
		return 1
	}
	return t * math.Sqrt(t)
}

// across interpolates from a valley floor (at the axis) to a crest.
func across(floorM, crestM, distKm, halfWKm, crestDistKm float64) float64 {
	return floorM + (crestM-floorM)*valleyShape((distKm-halfWKm)/(crestDistKm-halfWKm))
}

// heightLocal is the landscape in the design frame: metres above sea level.
func heightLocal(x, y float64) float64 {
	ex, ey := x/islandRxKm, (y-islandCyKm)/islandRyKm
	r := math.Sqrt(ex*ex + ey*ey)
	if r >= coastSeaR+coastWobble {
		return 0 // open sea; the coastline wobble cannot reach this far
	}
	r += coastWobble * fbm(x, y, seedCoast, 5, 4.0)

	// Bend every feature a little, so no line is ruler-straight.
	x0, y0 := x, y
	x += 0.9 * fbm(x0, y0, seedWarpX, 4, 7.0)
	y += 0.6 * fbm(x0, y0, seedWarpY, 4, 7.0)

	yv := mainAxisY(x)
	yN, yS, yC, ys := northCrestY(x), southCrestY(x), coastCrestY(x), sideAxisY(x)
	cN, cS, cC := northCrest.at(x), southCrestM(x), coastCrest.at(x)

	var h, base float64 // base: the floor the roughness is measured from
	switch {
	case y >= yN: // north slopes of Corvane Ridge, down to the coast
		h = cN * decay((y-yN)/outerDecayKm)
	case y >= yv: // main valley, north side
		base = mainFloor.at(x)
		h = across(base, cN, y-yv, mainHalfWidth(x), yN-yv)
	case y >= yS: // main valley, south side
		base = mainFloor.at(x)
		h = across(base, cS, yv-y, mainHalfWidth(x), yv-yS)
	case y >= ys: // Quillet Glen, north side
		base = sideFloor.at(x)
		h = across(base, cS, y-ys, sideHalfWKm, yS-ys)
	case y >= yC: // Quillet Glen, south side
		base = sideFloor.at(x)
		h = across(base, cC, ys-y, sideHalfWKm, ys-yC)
	default: // south slopes of the Quarvel Hills
		h = cC * decay((yC-y)/outerDecayKm)
	}
	if x < sideHeadXKm && y < yS && y > yC {
		// close the head of Quillet Glen: blend towards a col-less upland
		// (the weight vanishes on both crests, keeping h continuous)
		f := math.Min(1, (sideHeadXKm-x)/3)
		w := math.Sin(math.Pi * (y - yC) / (yS - yC))
		mid := 0.5 * (cS + cC)
		h += (math.Max(h, mid) - h) * f * f * w
	}

	// Corvane Peak: a steep-sided summit on the ridge crest.
	dx, dy := x-summitXKm, y-northCrestY(summitXKm)
	rs := math.Sqrt(dx*dx + dy*dy)
	h += summitRiseM * math.Exp(-rs/0.6)

	// Roughness: small on valley floors, larger on slopes and ridges, and
	// calmer on the summit dome and the saddle, where the repeater and the
	// command post stand. Gullies follow the zero lines of a noise field;
	// they cut the slopes but never the floors.
	sx, sy := x-saddleXKm, y-southCrestY(saddleXKm)
	calm := (1 - 0.6*math.Exp(-rs*rs)) * (1 - 0.7*math.Exp(-(sx*sx+sy*sy)/1.5))
	relief := math.Max(0, h-base)
	g := 1 - math.Abs(fbm(x, y, seedGully, 3, 1.6))/0.6
	if g > 0 {
		h -= 0.07 * relief * calm * g * g * g
	}
	h += (5 + 0.3*relief) * calm * fbm(x, y, seedRough, 7, 5.0)

	// Fade into the sea at the coast.
	if r > coastFullR {
		m := smoothstep((coastSeaR - r) / (coastSeaR - coastFullR))
		h = h*m - 40*(1-m)
	}
	if h < 0 {
		h = 0
	}

	// Ondrell Water: the basin behind the moraine sill is filled to a flat
	// surface. The sill and the basin sides stand above the surface, so the
	// fill never meets lower ground at the edge of this box.
	if x > lakeWestXKm && x < lakeEastXKm && math.Abs(y-yv) < lakeHalfYKm && h < lakeLevelM {
		h = lakeLevelM
	}
	return h
}

func decay(t float64) float64 { return 1 / (1 + t*t) }

func smoothstep(t float64) float64 {
	switch {
	case t <= 0:
		return 0
	case t >= 1:
		return 1
	}
	return t * t * (3 - 2*t)
}

// --- noise -----------------------------------------------------------------

// hash2 mixes lattice coordinates and a seed (splitmix64 finaliser).
func hash2(ix, iy int64, seed uint64) uint64 {
	z := uint64(ix)*0x9E3779B97F4A7C15 ^ uint64(iy)*0xC2B2AE3D27D4EB4F ^ seed
	z ^= z >> 30
	z *= 0xBF58476D1CE4E5B9
	z ^= z >> 27
	z *= 0x94D049BB133111EB
	z ^= z >> 31
	return z
}

const invSqrt2 = 0.7071067811865476

var gradients = [8][2]float64{
	{1, 0}, {-1, 0}, {0, 1}, {0, -1},
	{invSqrt2, invSqrt2}, {-invSqrt2, invSqrt2}, {invSqrt2, -invSqrt2}, {-invSqrt2, -invSqrt2},
}

// gradientNoise is 2-D gradient noise on the unit lattice, in about [-0.71, 0.71].
func gradientNoise(x, y float64, seed uint64) float64 {
	x0, y0 := math.Floor(x), math.Floor(y)
	ix, iy := int64(x0), int64(y0)
	fx, fy := x-x0, y-y0
	dot := func(i, j int64, dx, dy float64) float64 {
		g := gradients[hash2(ix+i, iy+j, seed)&7]
		return g[0]*dx + g[1]*dy
	}
	n00 := dot(0, 0, fx, fy)
	n10 := dot(1, 0, fx-1, fy)
	n01 := dot(0, 1, fx, fy-1)
	n11 := dot(1, 1, fx-1, fy-1)
	u, v := fade(fx), fade(fy)
	a := n00 + (n10-n00)*u
	b := n01 + (n11-n01)*u
	return a + (b-a)*v
}

func fade(t float64) float64 { return t * t * t * (t*(t*6-15) + 10) }

// Each octave is turned by a fixed angle so the lattice does not show.
const (
	octaveCos = 0.8775825618903728 // cos 0.5
	octaveSin = 0.479425538604203  // sin 0.5
)

// fbm sums octaves of gradient noise, the coarsest with wavelength
// baseKm; the result lies within [-1, 1].
func fbm(x, y float64, seed uint64, octaves int, baseKm float64) float64 {
	sum, amp, norm := 0.0, 1.0, 0.0
	f := 1 / baseKm
	for o := 0; o < octaves; o++ {
		sum += amp * gradientNoise(x*f+17.3*float64(o), y*f-9.1*float64(o), seed+uint64(o)*0x9E37)
		norm += amp
		amp *= 0.5
		f *= 2
		x, y = x*octaveCos-y*octaveSin, x*octaveSin+y*octaveCos
	}
	return 1.4 * sum / norm
}
