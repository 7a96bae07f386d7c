package gpx

import (
	"bytes"
	"errors"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"runtime"
	"runtime/metrics"
	"strings"
	"sync/atomic"
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
	// (GPX 1.1 schema: xsd:dateTime). 09:00:00.750+02:00 is 07:00:00.750
	// UTC.
	want := []time.Time{
		time.Date(2026, 5, 16, 7, 0, 0, 750e6, time.UTC),
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
		{"not xml", `<gpx><wpt lat="1" lon="2"></gpx>`, "bad.gpx:1: not well-formed XML"},
		{"lat not a number", "<gpx>\n<trk><name>walk</name><trkseg>\n<trkpt lat=\"-48.5\" lon=\"-123.9\"/>\n<trkpt lat=\"abc\" lon=\"-123.9\"/>\n</trkseg></trk></gpx>", `bad.gpx:4: trkpt 2: lat "abc" is not a number`},
		{"no lon", "<gpx><wpt lat=\"1\"/></gpx>", `bad.gpx:1: wpt 1: no lon attribute`},
		{"ele not a number", "<gpx><rte><rtept lat=\"1\" lon=\"2\"><ele>high</ele></rtept></rte></gpx>", `bad.gpx:1: rtept 1: ele "high" is not a number`},
		{"time", "<gpx><wpt lat=\"1\" lon=\"2\"><time>yesterday</time></wpt></gpx>", `wpt 1: time "yesterday" is not a date and time`},
		{"nan lat", "<gpx><wpt lat=\"NaN\" lon=\"2\"/></gpx>", "outside latitude"},
		{"only a comment", "<!-- nothing -->", "no <gpx> element"},
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

// writeLongTrack writes a GPX file with one track of n points (with
// elevation and time, as a GPS logger writes them) and returns its path
// and size.
func writeLongTrack(t testing.TB, n int) (string, int64) {
	t.Helper()
	path := filepath.Join(t.TempDir(), "long.gpx")
	var b strings.Builder
	b.WriteString(`<?xml version="1.0" encoding="UTF-8"?>` + "\n" + `<gpx version="1.1" creator="test" xmlns="http://www.topografix.com/GPX/1/1">` + "\n<trk><name>long</name><trkseg>\n")
	t0 := time.Date(2026, 5, 16, 7, 0, 0, 0, time.UTC)
	for i := 0; i < n; i++ {
		fmt.Fprintf(&b, "<trkpt lat=\"%.7f\" lon=\"%.7f\"><ele>%.1f</ele><time>%s</time></trkpt>\n",
			45+float64(i%1000)*1e-5, 7+float64(i/1000)*1e-4, 500+float64(i%37), t0.Add(time.Duration(i)*time.Second).Format(time.RFC3339))
	}
	b.WriteString("</trkseg></trk>\n</gpx>\n")
	if err := os.WriteFile(path, []byte(b.String()), 0o644); err != nil {
		t.Fatal(err)
	}
	return path, int64(b.Len())
}

// TestReadBoundedMemory reads a 100 000-point track (about 10 MB of GPX,
// elevation and time on every point) and samples the heap while it does:
// the peak must stay under 100 MB, and what is kept afterwards must be the
// points (a Place, about 100 bytes each), not a copy of the file or a
// document tree of it.
func TestReadBoundedMemory(t *testing.T) {
	const n = 100_000
	path, size := writeLongTrack(t, n)
	sample := []metrics.Sample{{Name: "/memory/classes/heap/objects:bytes"}}
	heap := func() int64 { metrics.Read(sample); return int64(sample[0].Value.Uint64()) }
	runtime.GC()
	base := heap()
	var peak atomic.Int64
	stop := make(chan struct{})
	done := make(chan struct{})
	go func() {
		defer close(done)
		for {
			if h := heap(); h > peak.Load() {
				peak.Store(h)
			}
			select {
			case <-stop:
				return
			default:
				time.Sleep(100 * time.Microsecond)
			}
		}
	}()
	var before, after runtime.MemStats
	runtime.ReadMemStats(&before)
	f, err := Read(path)
	runtime.ReadMemStats(&after)
	close(stop)
	<-done
	if err != nil || len(f.Tracks) != 1 || len(f.Tracks[0].Points) != n {
		t.Fatalf("%v", err)
	}
	runtime.GC()
	retained := heap() - base
	grew := peak.Load() - base
	total := after.TotalAlloc - before.TotalAlloc
	t.Logf("file %.1f MB; heap peak +%.1f MB; %.1f MB allocated in all (%.0f B per point, mostly XML tokens collected as it goes); %.1f MB kept (%.0f B per point)",
		float64(size)/1e6, float64(grew)/1e6, float64(total)/1e6, float64(total)/n, float64(retained)/1e6, float64(retained)/n)
	if grew > 100<<20 {
		t.Errorf("heap grew by %.1f MB while reading, over 100 MB", float64(grew)/1e6)
	}
	if retained > 200*n {
		t.Errorf("%.0f bytes kept per point: more than the points themselves", float64(retained)/n)
	}
	last := f.Tracks[0].Points[n-1]
	if last.ElevM != 500+float64((n-1)%37) || !last.Time.Equal(time.Date(2026, 5, 16, 7, 0, 0, 0, time.UTC).Add((n-1)*time.Second)) {
		t.Errorf("last point %+v", last)
	}
}

// BenchmarkReadTrack reads a 100 000-point track.
func BenchmarkReadTrack(b *testing.B) {
	path, _ := writeLongTrack(b, 100_000)
	b.ReportAllocs()
	for b.Loop() {
		if _, err := Read(path); err != nil {
			b.Fatal(err)
		}
	}
}

// FuzzDecodeTrack fuzzes the streaming decoder on track documents: it
// never panics, errors wrap ErrFile and start with the file name, and
// every point it returns lies on the globe with a finite elevation or NaN.
func FuzzDecodeTrack(f *testing.F) {
	f.Add([]byte(sampleGPX))
	f.Add([]byte(`<gpx><trk><name>a</name><trkseg><trkpt lat="1" lon="2"><ele>3</ele><time>2026-05-16T07:00:00.5-03:30</time><extensions><x><trkpt lat="9" lon="9"/></x></extensions></trkpt></trkseg></trk></gpx>`))
	f.Add([]byte(`<gpx><rte><rtept lat="1" lon="2"/><name>r</name></rte><trk><trkseg><trkpt lat="abc" lon="2"/></trkseg></trk></gpx>`))
	f.Add([]byte(`<gpx><trk><trkseg><trkpt lat="1e400" lon="-0"><ele>NaN</ele></trkpt>`))
	f.Fuzz(func(t *testing.T, data []byte) {
		g, err := Decode(data, "fuzz.gpx")
		if err != nil {
			if !errors.Is(err, ErrFile) || !strings.HasPrefix(err.Error(), "fuzz.gpx") {
				t.Fatalf("error %q does not wrap ErrFile or name the file", err)
			}
			return
		}
		for _, tr := range g.Tracks {
			for _, p := range tr.Points {
				if !(p.Pos.Lat() >= -90 && p.Pos.Lat() <= 90 && p.Pos.Lon() >= -180 && p.Pos.Lon() <= 180) || math.IsInf(p.ElevM, 0) {
					t.Fatalf("point %+v accepted", p)
				}
			}
		}
	})
}

// TestEncodeSameBytes: Encode adds no time of writing, rounds elevations
// to 0.1 m and writes a waypoint given twice (same name and position) once.
func TestEncodeSameBytes(t *testing.T) {
	out := Output{Name: "x", Waypoints: []Place{
		{Name: "Base", Pos: orb.Point{-123.8778833, -48.4966558}, ElevM: 267.4599599999922, Description: "station"},
		{Name: "Spot", Pos: orb.Point{-124, -48.5}, ElevM: math.NaN(), Description: "before gap 2"},
		{Name: "Spot", Pos: orb.Point{-124, -48.5}, ElevM: math.NaN(), Description: "after gap 1"},
		{Name: "Spot", Pos: orb.Point{-124.1, -48.5}, ElevM: math.NaN()},
	}}
	a, err := Encode(out)
	if err != nil {
		t.Fatal(err)
	}
	b, _ := Encode(out)
	if !bytes.Equal(a, b) {
		t.Error("two encodings differ")
	}
	s := string(a)
	if strings.Contains(s, "<time>") {
		t.Errorf("a time was added:\n%s", s)
	}
	if !strings.Contains(s, "<ele>267.5</ele>") {
		t.Errorf("elevation not rounded to 0.1 m:\n%s", s)
	}
	if n := strings.Count(s, "<wpt"); n != 3 || !strings.Contains(s, "before gap 2; after gap 1") {
		t.Errorf("%d waypoints, want 3 with the duplicate merged:\n%s", n, s)
	}
}
