package report

import (
	"bytes"
	"math"
	"strings"
	"testing"
)

// spiked is a flat profile of n samples over lengthM at groundM with one
// sample raised to spikeM at index k.
func spiked(n int, lengthM, groundM float64, k int, spikeM float64) (d, h []float64) {
	d, h = flat(n, lengthM, groundM)
	h[k] = spikeM
	return d, h
}

// TestFresnelZoneLayout checks the zone's radius against ITU-R P.526-16
// eq. 2, R1 = √(λ d1 d2 / d), and its rounded form eq. 3,
// R1 = 550 √(d1 d2 / (d f)) (d in km, f in MHz), and the governing
// obstacle's clearance worked by hand.
func TestFresnelZoneLayout(t *testing.T) {
	cases := []struct {
		name                 string
		lengthM, freqMHz, k  float64
		spikeAt              int // sample index of 101 (0: no spike)
		spikeM               float64
		wantMidR1M           float64 // eq. 2 by hand: √(c/f · d1 d2 / d)
		wantClearM, wantF1   float64
		tolR1M, tolF1, tolCM float64
	}{
		// 10 km at 150 MHz: λ = 1.998616 m; mid R1 = √(1.998616 · 5000 · 5000 / 10000) = 70.686 m
		// (eq. 3: 550 √(5·5/(10·150)) = 71.00 m). Spike 110 m at 3 km under a 120 m ray:
		// clearance 10 m, R1 = √(1.998616 · 3000 · 7000 / 10000) = 64.785 m → 0.1544 F1.
		{"10 km 150 MHz, spike clears", 10_000, 150, 0, 30, 110, 70.686, 10, 0.1544, 0.01, 0.001, 0.001},
		// 20 km at 446 MHz: λ = 0.672181 m; mid R1 = √(0.672181 · 10⁴ · 10⁴ / 2·10⁴) = 57.97 m.
		// Spike 140 m at 10 km: clearance −20 m → −0.3450 F1.
		{"20 km 446 MHz, spike blocks", 20_000, 446, 0, 50, 140, 57.973, -20, -0.3450, 0.01, 0.001, 0.001},
		// Flat ground at 100 m on an earth of k = 4/3 over 20 km: the bulge at mid-path,
		// 500 · 10 · 10 / 8494.67 = 5.886 m (ITU-R P.526-16 eq. 49 term), takes that much
		// from the 20 m clearance: 14.114 m at mid, 14.114/57.973 = 0.2435 F1.
		{"20 km 446 MHz, bulge governs", 20_000, 446, 4.0 / 3, 0, 0, 57.973, 14.114, 0.2435, 0.01, 0.001, 0.002},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			d, h := flat(101, c.lengthM, 100)
			if c.spikeAt > 0 {
				d, h = spiked(101, c.lengthM, 100, c.spikeAt, c.spikeM)
			}
			opts := []ProfileOption{WithAntennas(20, 20), WithFrequency(c.freqMHz)}
			if c.k > 0 {
				opts = append(opts, WithEarthBulge(c.k))
			}
			ch, err := newProfileChart(d, h, opts)
			if err != nil {
				t.Fatal(err)
			}
			l := ch.layout(d, h)
			if got := l.zoneR1[zoneSteps/2]; math.Abs(got-c.wantMidR1M) > c.tolR1M {
				t.Errorf("mid-path R1 %.3f m, want %.3f m (ITU-R P.526-16 eq. 2)", got, c.wantMidR1M)
			}
			eq3 := 550 * math.Sqrt(c.lengthM/2000*c.lengthM/2000/(c.lengthM/1000*c.freqMHz)) // ITU-R P.526-16 eq. 3
			if got := l.zoneR1[zoneSteps/2]; math.Abs(got-eq3)/eq3 > 0.006 {
				t.Errorf("mid-path R1 %.3f m differs from eq. 3's %.3f m by more than its rounding of 547.5 to 550", got, eq3)
			}
			if !l.obstacle {
				t.Fatal("no governing obstacle found")
			}
			if math.Abs(l.obsClearM-c.wantClearM) > c.tolCM || math.Abs(l.obsClearF1-c.wantF1) > c.tolF1 {
				t.Errorf("obstacle clearance %.4f m = %.4f F1, want %.4f m = %.4f F1", l.obsClearM, l.obsClearF1, c.wantClearM, c.wantF1)
			}
			if c.spikeAt > 0 && l.obsDistM != d[c.spikeAt] {
				t.Errorf("obstacle at %.0f m, want the spike at %.0f m", l.obsDistM, d[c.spikeAt])
			}
		})
	}
}

// TestProfileSVGFresnel reads the zone and the obstacle back from the SVG
// through its tick labels.
func TestProfileSVGFresnel(t *testing.T) {
	d, h := spiked(101, 10_000, 100, 30, 110)
	var buf bytes.Buffer
	if err := ProfileSVG(&buf, d, h, WithAntennas(20, 20), WithFrequency(150), WithTitle("spike")); err != nil {
		t.Fatal(err)
	}
	doc := parseSVG(t, buf.Bytes())
	zone := pathPoints(t, doc.attrs["fresnel-zone"]["d"])
	if len(zone) != 2*zoneSteps {
		t.Fatalf("zone outline has %d vertices, want %d", len(zone), 2*zoneSteps)
	}
	// Upper edge at mid-path: ray 120 m + R1 70.686 m (ITU-R P.526-16 eq. 2, worked above).
	if got := doc.heightAt(t, zone[zoneSteps/2][1]); math.Abs(got-190.686) > 0.05 {
		t.Errorf("zone top at mid-path drawn at %.3f m, want 190.686 m", got)
	}
	// Lower edge at mid-path: the upper edge has zoneSteps+1 vertices, the
	// lower one runs back from zoneSteps−1, so mid-path is vertex zoneSteps + zoneSteps/2.
	if got := doc.heightAt(t, zone[zoneSteps+zoneSteps/2][1]); math.Abs(got-49.314) > 0.05 {
		t.Errorf("zone bottom at mid-path drawn at %.3f m, want 49.314 m", got)
	}
	z6 := pathPoints(t, doc.attrs["fresnel-zone-06"]["d"])
	if got := doc.heightAt(t, z6[zoneSteps/2][1]); math.Abs(got-(120+0.6*70.686)) > 0.05 {
		t.Errorf("0.6 zone top at mid-path drawn at %.3f m, want %.3f m", got, 120+0.6*70.686)
	}
	if _, ok := doc.attrs["obstacle"]; !ok {
		t.Fatal("no obstacle marker")
	}
	if s := buf.String(); !strings.Contains(s, "obstacle at 3.00 km: clears by 0.15 F1 (10.0 m)") {
		t.Errorf("obstacle label missing or wrong in\n%s", s)
	}
}

// TestProfilePNGFresnel: the zone's tint lies between the ray and the
// zone's edge at mid-path, background above it, and the obstacle's red
// marker stands in the spike's column only.
func TestProfilePNGFresnel(t *testing.T) {
	d, h := spiked(101, 10_000, 100, 30, 110)
	opts := []ProfileOption{WithAntennas(20, 20), WithFrequency(150)}
	img := decodePNG(t, d, h, opts...)
	ch, err := newProfileChart(d, h, opts)
	if err != nil {
		t.Fatal(err)
	}
	l := ch.layout(d, h)
	// Heights by hand (ITU-R P.526-16 eq. 2): ray 120 m, zone edge 190.686 m at 5 km.
	xMid := int(l.px(5_000))
	yRay, yEdge := l.py(120), l.py(190.686)
	tinted := func(x, y int) bool {
		r, _, b, _ := img.At(x, y).RGBA()
		return int(b>>8)-int(r>>8) > 12 // the blue tint over white
	}
	for y := int(yEdge) + 3; y < int(yRay)-3; y++ {
		if !tinted(xMid, y) && !near(img.At(xMid, y), colourZone06, 60) {
			t.Fatalf("pixel (%d, %d) inside the zone is %v, not tinted", xMid, y, img.At(xMid, y))
		}
	}
	for y := int(l.top) + 2; y < int(yEdge)-3; y++ {
		if tinted(xMid, y) {
			t.Fatalf("pixel (%d, %d) above the zone (edge at %.1f) is tinted", xMid, y, yEdge)
		}
	}
	// The marker: red between the ground top of the spike (110 m) and the ray.
	xObs := l.px(3_000)
	red := func(x, y int) bool { return near(img.At(x, y), colourObstacle, 40) }
	found := 0
	for y := int(l.py(120)) + 1; y < int(l.py(110)); y++ {
		for dx := -1; dx <= 1; dx++ {
			if red(int(xObs)+dx, y) {
				found++
				break
			}
		}
	}
	if found < int(l.py(110)-l.py(120))-2 {
		t.Errorf("obstacle line found on %d rows at x ≈ %.1f, want the whole span", found, xObs)
	}
	for _, x := range []int{int(xObs) - 40, int(xObs) + 40, xMid} {
		for y := int(l.top); y < int(l.bottom); y++ {
			if red(x, y) {
				t.Fatalf("obstacle colour at (%d, %d), away from the obstacle's column %.1f", x, y, xObs)
			}
		}
	}
}

func TestFresnelErrors(t *testing.T) {
	d, h := flat(10, 1000, 10)
	cases := []struct {
		name string
		opts []ProfileOption
		msg  string
	}{
		{"no antennas", []ProfileOption{WithFrequency(146)}, "needs the antenna heights"},
		{"too low", []ProfileOption{WithAntennas(2, 2), WithFrequency(0.5)}, "outside 1 MHz"},
		{"NaN", []ProfileOption{WithAntennas(2, 2), WithFrequency(math.NaN())}, "outside 1 MHz"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			var buf bytes.Buffer
			err := ProfileSVG(&buf, d, h, c.opts...)
			if err == nil || !strings.Contains(err.Error(), c.msg) || buf.Len() != 0 {
				t.Fatalf("error %v (wrote %d bytes), want one naming %q and nothing written", err, buf.Len(), c.msg)
			}
		})
	}
}
