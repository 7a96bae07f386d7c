package main

import (
	"math"
	"os"
	"path/filepath"
	"testing"

	"github.com/mastlink/mastlink/plan/exposure"
	"github.com/paulmach/orb"
	"github.com/paulmach/orb/geojson"
	"github.com/paulmach/orb/planar"
)

// noJump fails when consecutive positions of a line are more than 180° of
// longitude apart or outside [−180, 180] (RFC 7946 §3.1.9: cut at the
// antimeridian instead).
func noJump(t *testing.T, what string, l []orb.Point) {
	t.Helper()
	for i, p := range l {
		if p[0] < -180 || p[0] > 180 {
			t.Errorf("%s: longitude %v outside [-180, 180]", what, p[0])
		}
		if i > 0 && math.Abs(p[0]-l[i-1][0]) > 180 {
			t.Errorf("%s: jump from %v to %v", what, l[i-1], p)
		}
	}
}

// TestSplitAntimeridian: RFC 7946 §3.1.9 asks that a geometry crossing the
// antimeridian be cut in two. A line from 179.9°E to 179.9°W at latitudes
// 10 and 10.2 meets ±180° half way, at latitude 10.1.
func TestSplitAntimeridian(t *testing.T) {
	got, ok := splitAntimeridian(orb.LineString{{179.9, 10}, {-179.9, 10.2}}).(orb.MultiLineString)
	if !ok || len(got) != 2 {
		t.Fatalf("line: %#v", got)
	}
	want := orb.MultiLineString{{{179.9, 10}, {180, 10.1}}, {{-180, 10.1}, {-179.9, 10.2}}}
	for i := range want {
		for j := range want[i] {
			if math.Abs(got[i][j][0]-want[i][j][0]) > 1e-9 || math.Abs(got[i][j][1]-want[i][j][1]) > 1e-9 {
				t.Errorf("line part %d point %d = %v, want %v", i, j, got[i][j], want[i][j])
			}
		}
	}
	// Westward too, and a line that stays on one side is left alone.
	if w, ok := splitAntimeridian(orb.LineString{{-179.9, 0}, {179.9, 0}, {179.8, 0}}).(orb.MultiLineString); !ok || len(w) != 2 || w[0][1][0] != -180 || w[1][0][0] != 180 {
		t.Errorf("westward: %#v", w)
	}
	if l, ok := splitAntimeridian(orb.LineString{{7, 45}, {8, 46}}).(orb.LineString); !ok || len(l) != 2 {
		t.Errorf("plain line: %#v", l)
	}

	// A 100 m keep-out circle centred on the antimeridian: two polygons,
	// each closed and on one side, whose areas add up to the whole ring's
	// (in square degrees, the ring unwrapped).
	c, err := exposure.KeepOutCircle(orb.Point{180, -16.5}, 100)
	if err != nil {
		t.Fatal(err)
	}
	mp, ok := splitAntimeridian(c).(orb.MultiPolygon)
	if !ok || len(mp) != 2 {
		t.Fatalf("ring: %T %v", splitAntimeridian(c), len(mp))
	}
	sum := 0.0
	for i, p := range mp {
		r := p[0]
		if r[0] != r[len(r)-1] {
			t.Errorf("part %d not closed", i)
		}
		noJump(t, "ring part", r)
		sum += math.Abs(planar.Area(p))
	}
	unwrapped := make(orb.Ring, len(c[0]))
	for i, p := range c[0] {
		lon := p[0]
		if lon < 0 {
			lon += 360
		}
		unwrapped[i] = orb.Point{lon, p[1]}
	}
	if whole := math.Abs(planar.Area(orb.Polygon{unwrapped})); math.Abs(sum-whole) > 1e-9*whole {
		t.Errorf("parts' area %.6g, whole %.6g", sum, whole)
	}
	// A ring away from the antimeridian is unchanged.
	d, _ := exposure.KeepOutCircle(orb.Point{7, 45}, 100)
	if p, ok := splitAntimeridian(d).(orb.Polygon); !ok || len(p[0]) != len(d[0]) {
		t.Errorf("plain ring: %T", splitAntimeridian(d))
	}
}

// TestPlanGeoJSONAntimeridian: a plan on both sides of the antimeridian
// (invented positions, smooth earth) writes links cut at ±180° and a
// keep-out ring on the line as two polygons (RFC 7946 §3.1.9); a station
// whose keep-out is nothing gets a point, never a ring.
func TestPlanGeoJSONAntimeridian(t *testing.T) {
	dir := t.TempDir()
	planText := `name: date line
frequency: 146.55MHz
require: {margin: 10dB}
defaults:
  radio: {power: 5W, sensitivity: 0.25uV}
  antenna: {gain: 0dBi, height: 1.5m}
stations:
  - name: Shore
    at: "-16.5,180"
    radio: {power: 50W, sensitivity: 0.25uV}
    antenna: {gain: 2.15dBi, height: 0m}
  - name: Ridge
    at: "-16.55,-179.97"
    radio: {power: 0.5W, sensitivity: 0.25uV}
    antenna: {gain: 0dBi, height: 30m}
targets:
  - name: Boat
    at: "-16.45,179.95"
`
	pf := filepath.Join(dir, "plan.yaml")
	if err := os.WriteFile(pf, []byte(planText), 0o644); err != nil {
		t.Fatal(err)
	}
	out := filepath.Join(dir, "out")
	if _, stderr, code := runCmd(t, "plan", pf, "-o", out); code != 0 {
		t.Fatalf("code %d: %s", code, stderr)
	}
	read := func(name string) *geojson.FeatureCollection {
		b, err := os.ReadFile(filepath.Join(out, name))
		if err != nil {
			t.Fatal(err)
		}
		fc, err := geojson.UnmarshalFeatureCollection(b)
		if err != nil {
			t.Fatal(err)
		}
		return fc
	}
	split := 0
	for _, f := range read("links.geojson").Features {
		switch g := f.Geometry.(type) {
		case orb.MultiLineString:
			split++
			for _, l := range g {
				noJump(t, "link", l)
			}
		case orb.LineString:
			noJump(t, "link", g)
		}
	}
	if split == 0 {
		t.Error("no link was cut at the antimeridian (Ridge → Boat crosses it)")
	}
	var shorePolys, ridgePoints int
	for _, f := range read("keepout.geojson").Features {
		switch g := f.Geometry.(type) {
		case orb.MultiPolygon:
			if f.Properties["station"] == "Shore" {
				shorePolys++
			}
			for _, p := range g {
				noJump(t, "keep-out", p[0])
			}
		case orb.Polygon:
			noJump(t, "keep-out", g[0])
		case orb.Point:
			if f.Properties["station"] == "Ridge" {
				ridgePoints++
			}
		}
	}
	// 50 W at 0 m height at 146.55 MHz: a public keep-out of about 2.9 m
	// (OET Bulletin 65, 2.56 reflection factor); 0.5 W at 30 m: none.
	if shorePolys == 0 || ridgePoints != 2 {
		t.Errorf("Shore cut rings %d, Ridge points %d", shorePolys, ridgePoints)
	}
}

// TestKeepoutNoEmptyRing: a keep-out of rounding noise (2.2e-16 m) is no
// keep-out: the antenna's point is written, not a ring of no size.
func TestKeepoutNoEmptyRing(t *testing.T) {
	var rep exposure.Report
	rep.KeepoutPublicM, rep.DistancePublicM = 2.2e-16, 1.5
	fc, err := keepoutGeoJSON([]keepoutSite{{name: "A", pos: orb.Point{7, 45}, rep: rep}})
	if err != nil {
		t.Fatal(err)
	}
	for _, f := range fc.Features {
		if _, ok := f.Geometry.(orb.Point); !ok {
			t.Errorf("%v keep-out written as %T", f.Properties["tier"], f.Geometry)
		}
	}
}
