package report_test

import (
	"bytes"
	"encoding/xml"
	"fmt"
	"io"

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
