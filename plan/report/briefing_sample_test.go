package report

import (
	"bytes"
	"image"
	"image/color"
	"image/png"
	"math"
	"time"

	"github.com/mastlink/mastlink/plan/exposure"
)

// sampleMapPNG draws a stand-in for the plan's map: an invented terrain
// shaded by height, two stations, a target and the links between them.
// Only for the briefing tests; the real map comes from the map renderer.
func sampleMapPNG() []byte {
	const w, hgt = 720, 440
	img := image.NewNRGBA(image.Rect(0, 0, w, hgt))
	height := func(x, y float64) float64 {
		return 300 + 500*math.Exp(-(math.Pow((x-470)/130, 2)+math.Pow((y-180)/90, 2))) +
			260*math.Exp(-(math.Pow((x-160)/110, 2)+math.Pow((y-330)/120, 2))) + 30*math.Sin(x/37)*math.Cos(y/29)
	}
	for y := 0; y < hgt; y++ {
		for x := 0; x < w; x++ {
			z := height(float64(x), float64(y))
			// Light from the north-west: the slope towards it brightens.
			shade := 0.75 + 0.02*(height(float64(x)-1, float64(y)-1)-z)
			shade = math.Max(0.45, math.Min(1.1, shade))
			t := math.Max(0, math.Min(1, (z-280)/600))
			r := (0.55 + 0.35*t) * 255 * shade
			g := (0.68 + 0.12*t) * 255 * shade
			b := (0.50 + 0.20*t) * 255 * shade
			img.SetNRGBA(x, y, color.NRGBA{clamp8(r), clamp8(g), clamp8(b), 255})
		}
	}
	line := func(x0, y0, x1, y1 float64, c color.NRGBA) {
		n := int(math.Hypot(x1-x0, y1-y0))
		for i := 0; i <= n; i++ {
			t := float64(i) / float64(n)
			for d := -1; d <= 1; d++ {
				img.SetNRGBA(int(x0+t*(x1-x0))+d, int(y0+t*(y1-y0)), c)
			}
		}
	}
	dot := func(cx, cy, r float64, c color.NRGBA) {
		for y := cy - r; y <= cy+r; y++ {
			for x := cx - r; x <= cx+r; x++ {
				if math.Hypot(x-cx, y-cy) <= r {
					img.SetNRGBA(int(x), int(y), c)
				}
			}
		}
	}
	line(120, 360, 470, 170, color.NRGBA{0x2b, 0x5d, 0x88, 255})
	line(120, 360, 640, 300, color.NRGBA{0xa1, 0x16, 0x1d, 255})
	dot(120, 360, 9, color.NRGBA{0x11, 0x11, 0x11, 255})
	dot(470, 170, 9, color.NRGBA{0x11, 0x11, 0x11, 255})
	dot(640, 300, 7, color.NRGBA{0x44, 0x01, 0x54, 255})
	var buf bytes.Buffer
	if err := png.Encode(&buf, img); err != nil {
		panic(err)
	}
	return buf.Bytes()
}

func clamp8(v float64) uint8 { return uint8(math.Max(0, math.Min(255, v))) }

// sampleProfile is an invented path of n samples over lengthM: a valley
// floor rising to a ridge at ridgeAt (fraction of the path).
func sampleProfile(n int, lengthM, baseM, ridgeM, ridgeAt float64) (d, e []float64) {
	d, e = make([]float64, n), make([]float64, n)
	for i := range d {
		x := float64(i) / float64(n-1)
		d[i] = lengthM * x
		e[i] = baseM + 80*x + ridgeM*math.Exp(-math.Pow((x-ridgeAt)/0.09, 2)) + 12*math.Sin(23*x)
	}
	return d, e
}

// sampleBriefing is an invented demo-sized plan: two stations, three
// targets, a mast sweep, two weak links, one route, and the usual cautions.
func sampleBriefing() BriefingData {
	d1, e1 := sampleProfile(400, 11_050, 430, 12, 0.74)
	d2, e2 := sampleProfile(300, 9_800, 520, 120, 0.35)
	loc := time.FixedZone("CET", 3600)
	link := func(tg string, out bool, dir string, f, dist, m float64, meets bool) BriefingLink {
		return BriefingLink{Target: tg, StationTransmits: out, Direction: dir, FreqMHz: f, DistanceM: dist, MarginDB: m, Meets: meets}
	}
	var rows []BriefingMastRow
	for _, c := range []struct {
		cable string
		loss  float64
	}{{"RG-58", 4.1}, {"RG-8X", 2.6}, {"RG-213", 1.4}} {
		for hM := 2.0; hM <= 12; hM += 2 {
			m := 1 + 14*math.Log10(hM) - c.loss*(hM+10)/10
			rows = append(rows, BriefingMastRow{HeightM: hM, Cable: c.cable, WorstMarginDB: math.Round(m*10) / 10, Meets: m >= 10})
		}
	}
	return BriefingData{
		Title:    "Harrow Fell search exercise",
		Date:     time.Date(2025, 5, 17, 6, 30, 0, 0, time.UTC),
		Location: loc,
		Area:     "Harrow Fell and the Tarnby valley (invented)",
		Requirement: BriefingRequirement{MarginDB: 10, ReliabilityPct: 90,
			Note: "Talk-in to the Pine Knob repeater matters most: it carries the search traffic."},
		Map: &BriefingMap{PNG: sampleMapPNG(),
			Alt:     "Map of Harrow Fell: the command post at Tarn Saddle and the relay on Corvane Knoll, with the link to Pine Knob repeater clear and the link to Base camp blocked by the fell.",
			Caption: "Stations (black), target (purple); blue: link with margin to spare; red: link short of the requirement. Keep-out circles are smaller than the dots at this scale."},
		Stations: []BriefingStation{
			{Name: "Command post", Site: "Tarn Saddle", Links: []BriefingLink{
				link("Pine Knob repeater", true, "talk-in", 146.340, 14_200, 13.4, true),
				link("Pine Knob repeater", false, "talk-out", 146.940, 14_200, 21.7, true),
				link("Base camp", true, "out", 145.500, 9_800, -6.2, false),
				link("Base camp", false, "back", 145.500, 9_800, -8.9, false),
			}},
			{Name: "Corvane relay", Site: "Corvane Knoll", Links: []BriefingLink{
				link("Pine Knob repeater", true, "talk-in", 146.340, 11_050, 18.2, true),
				link("Pine Knob repeater", false, "talk-out", 146.940, 11_050, 24.9, true),
				link("Base camp", true, "out", 145.500, 6_300, 7.4, false),
				link("Base camp", false, "back", 145.500, 6_300, 4.8, false),
				{Target: "Ridge team <B & C>", StationTransmits: true, Direction: "out", FreqMHz: 446.00625, DistanceM: 3_900, MarginDB: 15.0, Meets: true, Optional: true},
			}},
		},
		Mast: &BriefingMast{Station: "Command post", RunM: 10, Rows: rows,
			RecommendedHeightM: 8, RecommendedCable: "RG-213", RecommendedCableLengthM: 21},
		Profiles: []BriefingProfile{
			{Title: "Command post to Base camp", DistM: d2, ElevM: e2, FromHeightM: 8, ToHeightM: 2, FreqMHz: 145.5,
				Note: "Blocked: the spur 3.4 km out stands in the path; margin −6.2 dB out and −8.9 dB back."},
			{Title: "Corvane relay to Pine Knob repeater", DistM: d1, ElevM: e1, FromHeightM: 6, ToHeightM: 20, FreqMHz: 146.34,
				Note: "Grazing: the rise 0.7 km from the relay touches the line of sight; margin 18.2 dB in and 24.9 dB out all the same."},
		},
		Routes: []BriefingRoute{{Name: "Tarn path to the summit cairn", Walker: "a 5 W handheld on its stub antenna",
			LengthM: 7_420, CoveredFraction: 0.83,
			Gaps: []BriefingGap{{StartM: 2_150, EndM: 3_020, WorstMarginDB: -4.5, Missing: []string{"Pine Knob repeater"}},
				{StartM: 5_900, EndM: 6_310, WorstMarginDB: 2.1, Missing: []string{"Pine Knob repeater", "Base camp"}}},
			CallSpots: []BriefingCallSpot{
				{Target: "Pine Knob repeater", Side: "before", DistanceM: 1_980, Lat: 54.41212, Lon: -3.10544, MarginDB: 16.3},
				{Target: "Pine Knob repeater", Side: "after", DistanceM: 3_240, Lat: 54.42003, Lon: -3.09411, MarginDB: 14.0},
			}}},
		Exposure: []BriefingKeepout{
			{Station: "Command post", FreqMHz: 146.340, EIRPW: 36.1, Mode: "FM", DutyFactor: 1, TxFraction: 0.5,
				AveragingPublicS: 1800, AveragingOccupationalS: 360, Standard: "FCC 47 CFR § 1.1310",
				AntennaHeightM: 8, HeadHeightM: 2, KeepoutPublicM: 0, KeepoutOccupationalM: 0},
			{Station: "Corvane relay", FreqMHz: 146.340, EIRPW: 61.4, Mode: "FM", DutyFactor: 1, TxFraction: 0.5,
				AveragingPublicS: 1800, AveragingOccupationalS: 360, Standard: "FCC 47 CFR § 1.1310",
				AntennaHeightM: 2, HeadHeightM: 2, KeepoutPublicM: 2.2100000001, KeepoutOccupationalM: 0.98},
		},
		Cautions: append(exposure.Cautions(), "Transmit only within your licence and the band plan; local rules on masts, land access and transmitting apply."),
		Inputs: BriefingInputs{PlanFile: "harrow-fell.yaml", Model: "terrain: ITU-R P.526-16 delta-Bullington", K: 4.0 / 3,
			TerrainFiles: []string{"N54W004.hgt"},
			Kit: []BriefingKit{
				{Station: "Command post", PowerW: 25, SensitivityDBm: -122, Antenna: "2 m ground plane", GainDBi: 2.15, HeightM: 8, Cable: "RG-213", CableLengthM: 21, Connectors: 2, SWR: 1.3},
				{Station: "Corvane relay", PowerW: 50, SensitivityDBm: -121, Antenna: "2 m collinear", GainDBi: 6, HeightM: 6, Cable: "RG-8X", CableLengthM: 15, Connectors: 2},
			},
			Notes: []string{"mastlink (development build)"}},
	}
}
