package report_test

import (
	"bytes"
	"encoding/xml"
	"fmt"
	"image/png"
	"io"
	"regexp"
	"time"

	"github.com/mastlink/mastlink/plan/report"
)

// ExampleProfileSVG draws a 6 km invented profile with a 2 m and a 15 m mast
// at its ends, on an earth of k = 4/3, and lists the chart's labels.
func ExampleProfileSVG() {
	distM := []float64{0, 1000, 2000, 3000, 4000, 5000, 6000}
	elevM := []float64{420, 455, 610, 780, 690, 530, 505}
	var buf bytes.Buffer
	err := report.ProfileSVG(&buf, distM, elevM,
		report.WithTitle("Gorsefold trailhead to Corvane Peak"),
		report.WithAntennas(2, 15),
		report.WithEarthBulge(4.0/3))
	if err != nil {
		fmt.Println(err)
		return
	}
	dec := xml.NewDecoder(&buf)
	for {
		tok, err := dec.Token()
		if err == io.EOF {
			break
		}
		if err != nil {
			fmt.Println(err)
			return
		}
		if se, ok := tok.(xml.StartElement); ok && se.Name.Local == "text" {
			for _, a := range se.Attr {
				if a.Name.Local == "id" {
					var s string
					_ = dec.DecodeElement(&s, &se)
					fmt.Printf("%s: %s\n", a.Value, s)
				}
			}
		}
	}
	// Output:
	// title: Gorsefold trailhead to Corvane Peak
	// x-axis-label: distance (km)
	// y-axis-label: elevation (m)
}

// ExampleProfilePNG draws the same invented profile as a 1200 × 540 pixel
// PNG for a printed briefing and reads the size back from the file.
func ExampleProfilePNG() {
	distM := []float64{0, 1000, 2000, 3000, 4000, 5000, 6000}
	elevM := []float64{420, 455, 610, 780, 690, 530, 505}
	var buf bytes.Buffer
	err := report.ProfilePNG(&buf, distM, elevM,
		report.WithTitle("Gorsefold trailhead to Corvane Peak"),
		report.WithAntennas(2, 15),
		report.WithEarthBulge(4.0/3),
		report.WithSize(1200, 540))
	if err != nil {
		fmt.Println(err)
		return
	}
	cfg, err := png.DecodeConfig(&buf)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("%d × %d px\n", cfg.Width, cfg.Height)
	// Output:
	// 1200 × 540 px
}

// ExampleBriefing writes a briefing for an invented one-station plan and
// lists its section headings.
func ExampleBriefing() {
	data := report.BriefingData{
		Title:       "Gorsefold valley net",
		Date:        time.Date(2025, 6, 7, 8, 0, 0, 0, time.UTC),
		Area:        "Gorsefold valley (invented)",
		Requirement: report.BriefingRequirement{MarginDB: 10},
		Stations: []report.BriefingStation{{Name: "Trailhead", Links: []report.BriefingLink{
			{Target: "Corvane repeater", StationTransmits: true, Direction: "talk-in", FreqMHz: 146.34, DistanceM: 6000, MarginDB: 17.5, Meets: true},
			{Target: "Corvane repeater", Direction: "talk-out", FreqMHz: 146.94, DistanceM: 6000, MarginDB: 24.0, Meets: true},
		}}},
		Exposure: []report.BriefingKeepout{{Station: "Trailhead", FreqMHz: 146.34, EIRPW: 8.2, Mode: "FM",
			DutyFactor: 1, TxFraction: 0.5, KeepoutPublicM: 0.84, KeepoutOccupationalM: 0.31}},
		Cautions: []string{"Keep masts well clear of power lines."},
		Inputs:   report.BriefingInputs{Model: "free space", K: 4.0 / 3},
	}
	var buf bytes.Buffer
	if err := report.Briefing(&buf, data); err != nil {
		fmt.Println(err)
		return
	}
	for _, m := range regexp.MustCompile(`<h2[^>]*>([^<]*)</h2>`).FindAllStringSubmatch(buf.String(), -1) {
		fmt.Println(m[1])
	}
	// Output:
	// Requirement
	// Who hears whom
	// RF exposure keep-out
	// Cautions
	// Inputs used
}
