package exposure_test

import (
	"fmt"
	"time"

	"github.com/mastlink/mastlink/plan/exposure"
	"github.com/paulmach/orb"
)

// An event coordinator puts a 50 W FM mobile radio on 146.52 MHz into a
// 2.15 dBi dipole on a 3 m mast, transmitting continuously in the worst
// case, and asks how far people must stay from the mast.
func ExampleEvaluate() {
	rep, err := exposure.Evaluate(exposure.Input{
		PowerW:         50,
		GainDBi:        2.15,
		FreqMHz:        146.52,
		Mode:           exposure.ModeFM,
		AntennaHeightM: 3,
	})
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("standard %s, EIRP %.1f W, duty factor %.1f\n", rep.Standard, rep.EIRPW, rep.DutyFactor)
	fmt.Printf("limits: public %.2f W/m², occupational %.2f W/m²\n", rep.LimitPublicWM2, rep.LimitOccupationalWM2)
	fmt.Printf("distance from the antenna: public %.2f m, occupational %.2f m\n", rep.DistancePublicM, rep.DistanceOccupationalM)
	fmt.Printf("keep-out from the mast foot (head at %.0f m): public %.2f m, occupational %.2f m\n", rep.HeadHeightM, rep.KeepoutPublicM, rep.KeepoutOccupationalM)
	fmt.Printf("near field within %.2f m; US routine-evaluation exemption beyond %.2f m\n", rep.NearFieldM, rep.ExemptBeyondM)
	fmt.Println(len(rep.Cautions), "cautions, first:", rep.Cautions[0])
	// Output:
	// standard fcc, EIRP 82.0 W, duty factor 1.0
	// limits: public 2.00 W/m², occupational 10.00 W/m²
	// distance from the antenna: public 2.89 m, occupational 1.29 m
	// keep-out from the mast foot (head at 2 m): public 2.71 m, occupational 0.82 m
	// near field within 0.33 m; US routine-evaluation exemption beyond 3.61 m
	// 7 cautions, first: These distances are far-field estimates (FCC OET Bulletin 65): conservative at the distances shown, but unreliable within about λ/2π of the antenna, where near fields dominate.
}

// Transmitting 5 minutes, then listening 5 minutes: a 6-minute window can
// hold 5 minutes on the air, a 30-minute window 15.
func ExampleWorstCaseOnAirFraction() {
	for _, window := range []time.Duration{6 * time.Minute, 30 * time.Minute} {
		f, err := exposure.WorstCaseOnAirFraction(5*time.Minute, 5*time.Minute, window)
		if err != nil {
			fmt.Println(err)
			return
		}
		fmt.Printf("%v window: %.1f %% on the air\n", window, 100*f)
	}
	// Output:
	// 6m0s window: 83.3 % on the air
	// 30m0s window: 50.0 % on the air
}

// The 3.61 m exemption distance of a 50 W ERP station at 146.52 MHz, under
// 47 CFR § 1.1307(b)(3)(i)(C).
func ExampleExemptBeyondM() {
	r, err := exposure.ExemptBeyondM(146.52, 50)
	if err != nil {
		fmt.Println(err)
		return
	}
	threshold, _ := exposure.ExemptionThresholdERPW(146.52, r)
	fmt.Printf("exempt beyond %.2f m (threshold there %.1f W ERP)\n", r, threshold)
	// Output:
	// exempt beyond 3.61 m (threshold there 50.0 W ERP)
}

// A keep-out circle of 2.71 m around a mast at an invented field site, as a
// GeoJSON-ready polygon.
func ExampleKeepOutCircle() {
	poly, err := exposure.KeepOutCircle(orb.Point{10.1234, 47.4560}, 2.71)
	if err != nil {
		fmt.Println(err)
		return
	}
	ring := poly[0]
	fmt.Printf("%d points, closed %v, counter-clockwise %v\n", len(ring), ring[0] == ring[len(ring)-1], ring.Orientation() == orb.CCW)
	fmt.Printf("northern vertex: lon %.7f, lat %.7f\n", ring[0][0], ring[0][1])
	// Output:
	// 73 points, closed true, counter-clockwise true
	// northern vertex: lon 10.1234000, lat 47.4560244
}
