package plan_test

import (
	"fmt"

	"github.com/mastlink/mastlink/plan"
	"github.com/mastlink/mastlink/plan/units"
)

func ExampleLinkBudget_Levels() {
	b := plan.LinkBudget{
		TxPowerDBm:       units.DBmFromW(5),
		TxFeedlineLossDB: 1.5,
		TxGainDBi:        2.15,
		PathLossDB:       120,
		RxGainDBi:        6,
		RxFeedlineLossDB: 2,
		RxSensitivityDBm: units.DBmFromMicrovolts(0.25),
	}
	l := b.Levels()
	fmt.Printf("EIRP %.1f dBm, received %.1f dBm (%s), margin %.1f dB\n",
		l.EIRPDBm, l.RxPowerDBm, units.SMeter(l.RxPowerDBm, 146.52), l.MarginDB)
	// Output: EIRP 37.6 dBm, received -78.4 dBm (S9+15dB), margin 40.7 dB
}
