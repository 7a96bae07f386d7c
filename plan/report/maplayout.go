package report

import (
	"fmt"
	"math"
	"strconv"

	"github.com/mastlink/mastlink/plan/units"
	"github.com/paulmach/orb"
)

// Map page geometry, pixels.
const (
	mapMarginPx      = 20 // page edge to the map frame, left and right
	mapTitleSizePx   = 20
	mapSubSizePx     = 13
	mapLabelSizePx   = 12
	mapSmallSizePx   = 11
	mapTitleBaseline = 36 // from the top of the page
	mapSubBaseline   = 58
	mapHeaderPx      = 50 // title only; 72 with a subtitle
	mapHeaderSubPx   = 72
	mapFooterPx      = 104
	mapMinHeightPx   = 120 // the map area itself
	mapMaxHeightPx   = 12000
)

// Legend and scale bar geometry in the footer, pixels below the map frame.
const (
	legendTitleBaseline = 24
	legendSwatchTop     = 33
	legendSwatchHeight  = 14
	legendLabelBaseline = 62
	legendMaxSwatchPx   = 64.0
	creditBaseline      = 90
	scaleBarTop         = 36 // the bar's top edge
	scaleBarHeight      = 6
	scaleBarMaxFraction = 0.25 // of the map's width
)

// mapLayout is the geometry of a map page: the projection of the area
// shown onto the map frame, and where the header, legend and scale bar go.
type mapLayout struct {
	b                    Bounds
	widthPx, heightPx    int
	mapX, mapY           int // map frame's top left corner on the page
	mapW, mapH           int
	kx, ky               float64 // pixels per degree of longitude and latitude
	lat0                 float64 // latitude of true scale, degrees
	metresPerPx          float64 // at lat0, both directions
	footerY              int     // top of the footer
	barMetres            float64 // scale bar length in metres
	barPx                int     // its length in pixels
	barX                 int     // its left end on the page
	barUnit              string  // "m", "km", "ft" or "mi"
	barUnitM             float64 // metres per barUnit
	imperial             bool
	hasSubtitle          bool
	anyBelow, anyStretch bool // legend entries beyond the scale's bands
	anyCircle, anyValued bool
}

// layoutMap checks m and computes its page geometry.
func layoutMap(m *Map) (*mapLayout, error) {
	if err := checkMap(m); err != nil {
		return nil, err
	}
	b := m.Bounds
	if b == (Bounds{}) {
		var err error
		if b, err = fitBounds(m); err != nil {
			return nil, err
		}
	}
	l := &mapLayout{b: b, widthPx: m.WidthPx, imperial: m.Imperial, hasSubtitle: m.Subtitle != ""}
	if l.widthPx == 0 {
		l.widthPx = DefaultMapWidthPx
	}
	// Equirectangular with true scale at the middle latitude: as many
	// pixels per metre east-west as north-south there (the cos φ aspect
	// correction, on the ellipsoid).
	l.lat0 = (b.South + b.North) / 2
	latM, lonM := MetresPerDegree(l.lat0)
	l.mapX, l.mapW = mapMarginPx, l.widthPx-2*mapMarginPx
	l.kx = float64(l.mapW) / (b.East - b.West)
	l.ky = l.kx * latM / lonM
	l.metresPerPx = lonM / l.kx
	mapH := (b.North - b.South) * l.ky
	if !(mapH >= mapMinHeightPx && mapH <= mapMaxHeightPx) {
		return nil, fmt.Errorf("%w: the area shown would be %.0f px tall at %d px wide; give bounds closer to square (%d to %d px tall)",
			ErrChartData, mapH, l.widthPx, mapMinHeightPx, mapMaxHeightPx)
	}
	l.mapH = int(math.Round(mapH))
	l.ky = float64(l.mapH) / (b.North - b.South) // whole pixels; < 0.5 px off
	l.mapY = mapHeaderPx
	if l.hasSubtitle {
		l.mapY = mapHeaderSubPx
	}
	l.footerY = l.mapY + l.mapH
	l.heightPx = l.footerY + mapFooterPx
	l.scaleBar()

	for _, t := range m.Tracks {
		for i := 1; i < len(t.Values); i++ {
			if m.Scale.band(math.Min(t.Values[i-1], t.Values[i])) < 0 {
				l.anyBelow = true
			}
		}
	}
	for _, k := range m.Links {
		if m.Scale.band(k.Value) < 0 {
			l.anyBelow = true
		}
	}
	l.anyStretch = len(m.Stretches) > 0
	l.anyCircle = len(m.Circles) > 0
	l.anyValued = m.Overlay != nil || len(m.Links) > 0 || len(m.Tracks) > 0 || len(m.Scale.Levels) > 0
	for _, mk := range m.Markers {
		l.anyValued = l.anyValued || mk.HasValue
	}
	return l, nil
}

// scaleBar picks the scale bar: the longest round length (1, 2 or 5 times
// a power of ten, in km or m, or mi or ft) that fits in a quarter of the
// map's width, drawn right-aligned under the map.
func (l *mapLayout) scaleBar() {
	maxM := scaleBarMaxFraction * float64(l.mapW) * l.metresPerPx
	l.barUnit, l.barUnitM = "m", 1
	if l.imperial {
		l.barUnit, l.barUnitM = "ft", units.MetresPerFoot
		if maxM >= 0.1*units.MetresPerMile {
			l.barUnit, l.barUnitM = "mi", units.MetresPerMile
		}
	} else if maxM >= 1000 {
		l.barUnit, l.barUnitM = "km", 1000
	}
	l.barMetres = roundDown125(maxM/l.barUnitM) * l.barUnitM
	l.barPx = int(math.Round(l.barMetres / l.metresPerPx))
	l.barX = l.mapX + l.mapW - l.barPx - 8
}

// roundDown125 is the largest 1, 2 or 5 times a power of ten not above v
// (v > 0).
func roundDown125(v float64) float64 {
	p := math.Pow(10, math.Floor(math.Log10(v)))
	for _, m := range []float64{5, 2, 1} {
		if m*p <= v*(1+1e-12) {
			return m * p
		}
	}
	return p
}

// barLabel writes a length in the bar's unit.
func (l *mapLayout) barLabel(m float64) string {
	v := m / l.barUnitM
	dec := 0
	for dec < 3 && math.Abs(v*math.Pow(10, float64(dec))-math.Round(v*math.Pow(10, float64(dec)))) > 1e-6 {
		dec++
	}
	return strconv.FormatFloat(v, 'f', dec, 64)
}

// xy is the position of p in the map frame, pixels from its top left
// corner.
func (l *mapLayout) xy(p orb.Point) [2]float64 {
	return [2]float64{(p[0] - l.b.West) * l.kx, (l.b.North - p[1]) * l.ky}
}

// lonLat is the position of the centre of pixel (x, y) of the map frame.
func (l *mapLayout) lonLat(x, y int) (lon, lat float64) {
	return l.b.West + (float64(x)+0.5)/l.kx, l.b.North - (float64(y)+0.5)/l.ky
}
