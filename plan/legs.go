package plan

import (
	"fmt"
	"math"

	"github.com/mastlink/mastlink/plan/units"
)

// leg is one direction of the link between a moving or candidate end (the
// "near" end, at the start of the Geometry) and a target, with every budget
// term except the path loss worked out in advance: the many paths of a
// route or a site ranking then cost one profile and one path loss per
// distinct frequency each.
type leg struct {
	dir       string     // DirTalkIn, DirTalkOut, DirOut or DirBack
	freqMHz   float64    // MHz
	nearTx    bool       // the near end transmits
	budget    LinkBudget // PathLossDB left 0
	lossIndex int        // index into targetLegs.freqsMHz
}

// targetLegs are the legs to one target, and the distinct frequencies
// whose path loss they need.
type targetLegs struct {
	target   Target
	legs     []leg
	freqsMHz []float64
}

// newTargetLegs prepares the legs between near and t as targetLinks
// orders them: talk-in then talk-out for a repeater, out then back for a
// simplex target. feedline.Line losses are computed here once.
func newTargetLegs(near End, t Target) (targetLegs, error) {
	type spec struct {
		dir    string
		freq   float64
		nearTx bool
	}
	specs := []spec{{DirOut, t.FreqMHz, true}, {DirBack, t.FreqMHz, false}}
	if t.Kind == Repeater {
		specs = []spec{{DirTalkIn, t.ListenMHz, true}, {DirTalkOut, t.TransmitMHz, false}}
	}
	tl := targetLegs{target: t}
	for _, s := range specs {
		if !(s.freq > 0) {
			return targetLegs{}, fmt.Errorf("%s: no frequency given", t.Name)
		}
		tx, rx := near, t.End
		if !s.nearTx {
			tx, rx = t.End, near
		}
		txFL, err := tx.Feedline.Loss(s.freq)
		if err != nil {
			return targetLegs{}, fmt.Errorf("%s: feedline: %w", tx.Name, err)
		}
		rxFL, err := rx.Feedline.Loss(s.freq)
		if err != nil {
			return targetLegs{}, fmt.Errorf("%s: feedline: %w", rx.Name, err)
		}
		l := leg{dir: s.dir, freqMHz: s.freq, nearTx: s.nearTx, budget: LinkBudget{
			TxPowerDBm:       units.DBmFromW(tx.Radio.PowerW),
			TxFeedlineLossDB: txFL.TotalLossDB,
			TxGainDBi:        tx.Antenna.GainDBi,
			RxGainDBi:        rx.Antenna.GainDBi,
			RxFeedlineLossDB: rxFL.TotalLossDB,
			RxSensitivityDBm: rx.Radio.SensitivityDBm,
		}}
		l.lossIndex = -1
		for i, f := range tl.freqsMHz {
			if f == s.freq {
				l.lossIndex = i
			}
		}
		if l.lossIndex < 0 {
			l.lossIndex = len(tl.freqsMHz)
			tl.freqsMHz = append(tl.freqsMHz, s.freq)
		}
		tl.legs = append(tl.legs, l)
	}
	return tl, nil
}

// pathLosses fills loss[i] with the path loss in dB over g at
// tl.freqsMHz[i], with the near antenna nearHeightM above the ground at
// g.From and the target's antenna at g.To. The loss is the same both ways
// at one frequency (ITU-R P.526 diffraction is reciprocal), as
// Env.Evaluate also assumes, so it is computed once per frequency.
func (e *Env) pathLosses(g *Geometry, tl *targetLegs, nearHeightM float64, loss *[2]float64) error {
	for i, f := range tl.freqsMHz {
		r, err := e.PathLoss(g, nearHeightM, tl.target.Antenna.HeightM, f)
		if err != nil {
			return fmt.Errorf("%s: %w", tl.target.Name, err)
		}
		loss[i] = r.PathLossDB
	}
	return nil
}

// margins fills out[k] with the margin in dB of leg k given the path
// losses from pathLosses, and returns the smallest. The figures are those
// of Env.Evaluate for the same ends.
func (tl *targetLegs) margins(loss *[2]float64, out []float64) float64 {
	worst := math.Inf(1)
	for k := range tl.legs {
		b := tl.legs[k].budget
		b.PathLossDB = loss[tl.legs[k].lossIndex]
		m := b.Levels().MarginDB
		out[k] = m
		worst = math.Min(worst, m)
	}
	return worst
}
