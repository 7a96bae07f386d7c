package plan

import (
	"math"
	"testing"

	"github.com/mastlink/mastlink/plan/units"
)

func TestLinkBudget(t *testing.T) {
	// Worked by hand [calc]: 5 W (36.99 dBm) through 1.5 dB of line into a
	// 2.15 dBi antenna → EIRP 37.64 dBm; 120 dB path, 6 dBi and 2 dB of line
	// at the far end → −78.36 dBm; against 0.25 µV (−119.03 dBm by P = V²/R,
	// 50 Ω) → margin 40.67 dB.
	b := LinkBudget{
		TxPowerDBm:       units.DBmFromW(5),
		TxFeedlineLossDB: 1.5,
		TxGainDBi:        2.15,
		PathLossDB:       120,
		RxGainDBi:        6,
		RxFeedlineLossDB: 2,
		RxSensitivityDBm: units.DBmFromMicrovolts(0.25),
	}
	got := b.Levels()
	cases := []struct {
		name      string
		got, want float64
		tol       float64
	}{
		{"EIRP", got.EIRPDBm, 37.64, 0.005},
		{"received", got.RxPowerDBm, -78.36, 0.005},
		{"margin", got.MarginDB, 40.67, 0.005},
	}
	for _, c := range cases {
		if math.Abs(c.got-c.want) > c.tol {
			t.Errorf("%s: %.3f, want %.2f", c.name, c.got, c.want)
		}
	}
}
