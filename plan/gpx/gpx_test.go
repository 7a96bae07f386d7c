package gpx

import (
	"errors"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"

	"github.com/paulmach/orb"
)

const sampleGPX = `<?xml version="1.0" encoding="UTF-8"?>
<gpx version="1.1" creator="test" xmlns="http://www.topografix.com/GPX/1/1">
  <wpt lat="-48.5" lon="-123.5"><ele>1702</ele><name>Test Summit</name><desc>a summit</desc></wpt>
  <wpt lat="-48.6" lon="-123.4"><name>Low Camp</name></wpt>
  <trk><name>walk</name><trkseg>
    <trkpt lat="-48.60" lon="-123.40"><ele>300</ele><time>2026-05-16T09:00:00.750+02:00</time></trkpt>
    <trkpt lat="-48.61" lon="-123.41"><time>2026-05-16T07:01:00Z</time></trkpt>
  </trkseg><trkseg>
    <trkpt lat="-48.62" lon="-123.42"><time>2026-05-16T03:02:00-04:00</time></trkpt>
  </trkseg></trk>
  <rte><name>way</name><rtept lat="-48.1" lon="-123.1"/><rtept lat="-48.2" lon="-123.2"/></rte>
</gpx>`

func TestDecodeGPX(t *testing.T) {
	f, err := Decode([]byte(sampleGPX), "sample.gpx")
	if err != nil {
		t.Fatal(err)
	}
	if len(f.Waypoints) != 2 || f.Waypoints[0].Name != "Test Summit" || f.Waypoints[0].ElevM != 1702 {
		t.Fatalf("waypoints = %+v", f.Waypoints)
	}
	if !math.IsNaN(f.Waypoints[1].ElevM) {
		t.Errorf("missing <ele> should be NaN, got %v", f.Waypoints[1].ElevM)
	}
	if len(f.Tracks) != 2 || len(f.Tracks[0].Points) != 3 || f.Tracks[1].Name != "way" {
		t.Fatalf("tracks = %+v", f.Tracks)
	}
	// Times with offsets and fractional seconds come out in UTC
	// (GPX 1.1 schema: xsd:dateTime). 09:00:00.750+02:00 is 07:00:00 UTC
	// (gpxgo keeps whole seconds).
	want := []time.Time{
		time.Date(2026, 5, 16, 7, 0, 0, 0, time.UTC),
		time.Date(2026, 5, 16, 7, 1, 0, 0, time.UTC),
		time.Date(2026, 5, 16, 7, 2, 0, 0, time.UTC),
	}
	for i, w := range want {
		if got := f.Tracks[0].Points[i].Time; !got.Equal(w) || got.Location() != time.UTC {
			t.Errorf("point %d time = %v, want %v UTC", i, got, w)
		}
	}
}

func TestLookupSuggests(t *testing.T) {
	f, err := Decode([]byte(sampleGPX), "sample.gpx")
	if err != nil {
		t.Fatal(err)
	}
	p, err := f.Lookup("  test summit ")
	if err != nil || p.Pos != (orb.Point{-123.5, -48.5}) {
		t.Fatalf("Lookup = %+v, %v", p, err)
	}
	_, err = f.Lookup("Test Sumit")
	if !errors.Is(err, ErrUnknownWaypoint) || !strings.Contains(err.Error(), `closest: "Test Summit"`) {
		t.Fatalf("err = %v", err)
	}
}

func TestDecodeGPXErrors(t *testing.T) {
	cases := []struct{ name, doc, want string }{
		{"empty", "  ", "the file is empty"},
		{"not xml", "<gpx><wpt></gpx>", "bad.gpx:1: not well-formed XML"},
		{"second line", "<gpx>\n<wpt lat=\"1\" lon=\"2\">\n</gpx>", "bad.gpx:3:"},
		{"not gpx", "<kml></kml>", "root element is <kml>"},
		{"bad lat", `<gpx version="1.1"><wpt lat="95" lon="0"><name>x</name></wpt></gpx>`, "outside latitude"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			_, err := Decode([]byte(c.doc), "bad.gpx")
			if err == nil || !errors.Is(err, ErrFile) || !strings.Contains(err.Error(), c.want) {
				t.Fatalf("err = %v, want it to contain %q", err, c.want)
			}
		})
	}
}

func TestGPXRoundTrip(t *testing.T) {
	in := Output{
		Name: "round trip",
		Waypoints: []Place{{Name: "A", Pos: orb.Point{-123.25, -48.75}, ElevM: 812.5, Description: "margin 12.3 dB",
			Time: time.Date(2026, 5, 16, 9, 30, 0, 0, time.FixedZone("x", 3600))}},
		Tracks: []Track{{Name: "t", Points: []Place{{Pos: orb.Point{-123, -48}, ElevM: math.NaN()}, {Pos: orb.Point{-123.001, -48.001}, ElevM: 10}}}},
		Routes: []Track{{Name: "r", Points: []Place{{Pos: orb.Point{1, 2}, ElevM: math.NaN()}, {Pos: orb.Point{1, 2}, ElevM: math.NaN()}}}},
	}
	b, err := Encode(in)
	if err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(string(b), "<time>2026-05-16T08:30:00Z</time>") {
		t.Errorf("time not written in UTC:\n%s", b)
	}
	path := filepath.Join(t.TempDir(), "rt.gpx")
	if err := os.WriteFile(path, b, 0o644); err != nil {
		t.Fatal(err)
	}
	out, err := Read(path)
	if err != nil {
		t.Fatal(err)
	}
	w := out.Waypoints[0]
	if w.Name != "A" || w.Pos != in.Waypoints[0].Pos || w.ElevM != 812.5 || w.Description != "margin 12.3 dB" || !w.Time.Equal(in.Waypoints[0].Time) {
		t.Errorf("waypoint round trip: %+v", w)
	}
	if len(out.Tracks) != 2 || len(out.Tracks[0].Points) != 2 || !math.IsNaN(out.Tracks[0].Points[0].ElevM) {
		t.Errorf("tracks round trip: %+v", out.Tracks)
	}
}

func FuzzDecodeGPX(f *testing.F) {
	f.Add([]byte(sampleGPX))
	f.Add([]byte(`<gpx version="1.0"><wpt lat="1" lon="2"/></gpx>`))
	f.Add([]byte(`<gpx><trk><trkseg><trkpt lat="a" lon="b"><time>x</time></trkpt></trkseg></trk></gpx>`))
	f.Fuzz(func(t *testing.T, data []byte) {
		g, err := Decode(data, "fuzz.gpx")
		if err != nil {
			if !errors.Is(err, ErrFile) {
				t.Fatalf("error does not wrap ErrFile: %v", err)
			}
			return
		}
		for _, w := range g.Waypoints {
			if w.Pos.Lat() < -90 || w.Pos.Lat() > 90 {
				t.Fatalf("latitude out of range accepted: %v", w.Pos)
			}
		}
	})
}
