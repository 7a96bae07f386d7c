package plan

import (
	"fmt"
	"math"
	"slices"

	"github.com/mastlink/mastlink/plan/units"
)

// Link directions. A repeater's talk-in is the station transmitting on the
// repeater's listen frequency; its talk-out is the repeater transmitting on
// its transmit frequency. Simplex targets are checked out (station
// transmitting) and back (target transmitting) on one frequency.
const (
	DirTalkIn  = "talk-in"
	DirTalkOut = "talk-out"
	DirOut     = "out"
	DirBack    = "back"
)

// direction is one way of the link between a near end (a station, a
// walker, a candidate site) and a target.
type direction struct {
	name    string  // DirTalkIn, DirTalkOut, DirOut or DirBack
	freqMHz float64 // MHz
	nearTx  bool    // the near end transmits
}

// directions returns the two ways t is checked, in the order every report
// lists them: talk-in then talk-out for a repeater, out then back for a
// simplex target. In the first the near end transmits, in the second the
// target. This is the one place a target's directions are built.
func (t Target) directions() [2]direction {
	if t.Kind == Repeater {
		return [2]direction{{DirTalkIn, t.ListenMHz, true}, {DirTalkOut, t.TransmitMHz, false}}
	}
	return [2]direction{{DirOut, t.FreqMHz, true}, {DirBack, t.FreqMHz, false}}
}

// leg is one direction of the link between a moving or candidate end (the
// "near" end, at the start of the Geometry) and a target, with every budget
// term except the path loss worked out in advance: the many paths of a
// route or a site ranking then cost one profile and one path loss per
// distinct frequency each.
type leg struct {
	direction
	budget    LinkBudget // PathLossDB left 0
	lossIndex int        // index into targetLegs.freqsMHz
}

// targetLegs are the legs to one target, and the distinct frequencies
// whose path loss they need.
type targetLegs struct {
	target   Target
	legs     []leg
	freqsMHz []float64
	// near is the near end's antenna; patterned says that either antenna
	// has a catalog pattern, so the gains depend on each path's direction.
	near      Antenna
	patterned bool
}

// newTargetLegs prepares the legs between near and t in the order of
// Target.directions. Feedline losses are computed here once.
func newTargetLegs(near End, t Target) (targetLegs, error) {
	tl := targetLegs{target: t, near: near.Antenna, patterned: patterned(near.Antenna, t.Antenna)}
	for _, d := range t.directions() {
		if !(d.freqMHz > 0) {
			return targetLegs{}, fmt.Errorf("%s: no frequency given", t.Name)
		}
		tx, rx := near, t.End
		if !d.nearTx {
			tx, rx = t.End, near
		}
		txFL, err := tx.Feedline.Loss(d.freqMHz)
		if err != nil {
			return targetLegs{}, fmt.Errorf("%s: feedline: %w", tx.Name, err)
		}
		rxFL, err := rx.Feedline.Loss(d.freqMHz)
		if err != nil {
			return targetLegs{}, fmt.Errorf("%s: feedline: %w", rx.Name, err)
		}
		txL, err := tx.losses(d.freqMHz)
		if err != nil {
			return targetLegs{}, err
		}
		rxL, err := rx.losses(d.freqMHz)
		if err != nil {
			return targetLegs{}, err
		}
		l := leg{direction: d, budget: LinkBudget{
			TxPowerDBm:       units.DBmFromW(tx.Radio.PowerW),
			TxFeedlineLossDB: txFL.TotalLossDB,
			TxGainDBi:        tx.Antenna.GainDBi,
			RxGainDBi:        rx.Antenna.GainDBi,
			RxFeedlineLossDB: rxFL.TotalLossDB,
			RxSensitivityDBm: rx.Radio.SensitivityDBm,
			TxBodyLossDB:     txL.bodyDB,
			RxBodyLossDB:     rxL.bodyDB,
			ClutterLossDB:    txL.clutterDB + rxL.clutterDB,
		}}
		l.lossIndex = slices.Index(tl.freqsMHz, d.freqMHz)
		if l.lossIndex < 0 {
			l.lossIndex = len(tl.freqsMHz)
			tl.freqsMHz = append(tl.freqsMHz, d.freqMHz)
		}
		tl.legs = append(tl.legs, l)
	}
	return tl, nil
}

// pathLosses fills loss[i] with the path loss in dB over g at
// tl.freqsMHz[i], with the near antenna nearHeightM above the ground at
// g.From and the target's antenna at g.To. The loss is the same both ways
// at one frequency (ITU-R P.526 diffraction is reciprocal), as
// Env.Evaluate also assumes, so it is computed once per frequency, with
// one reading of the profile for both frequencies of a repeater
// (Env.PathLosses).
func (e *Env) pathLosses(g *Geometry, tl *targetLegs, nearHeightM float64, loss *[2]float64) error {
	out := g.results[:len(tl.freqsMHz)] // kept in g: a local array would escape through the model's interface
	if err := e.PathLosses(g, nearHeightM, tl.target.Antenna.HeightM, tl.freqsMHz, out); err != nil {
		return fmt.Errorf("%s: %w", tl.target.Name, err)
	}
	for i, r := range out {
		loss[i] = r.PathLossDB
	}
	return nil
}

// towardFor returns the directions the path of g (near end at g.From)
// leaves both ends, with the near antenna nearHeightM above the ground, or
// nil when neither antenna has a pattern (the peak gains then hold).
func (e *Env) towardFor(g *Geometry, tl *targetLegs, nearHeightM float64) (*towardPath, error) {
	if !tl.patterned {
		return nil, nil
	}
	t, err := e.toward(g, nearHeightM, tl.target.Antenna.HeightM)
	if err != nil {
		return nil, err
	}
	return &t, nil
}

// margins fills out[k] with the margin in dB of leg k given the path
// losses from pathLosses and, for antennas with a pattern, the directions
// from towardFor, and returns the smallest. The figures are those of
// Env.Evaluate for the same ends.
func (tl *targetLegs) margins(loss *[2]float64, tw *towardPath, out []float64) float64 {
	worst := math.Inf(1)
	var nearG, farG float64
	if tw != nil {
		nearG = tl.near.GainTowardDBi(tw.fromAzDeg, tw.fromElDeg)
		farG = tl.target.Antenna.GainTowardDBi(tw.toAzDeg, tw.toElDeg)
	}
	for k := range tl.legs {
		b := tl.legs[k].budget
		b.PathLossDB = loss[tl.legs[k].lossIndex]
		if tw != nil {
			b.TxGainDBi, b.RxGainDBi = nearG, farG
			if !tl.legs[k].nearTx {
				b.TxGainDBi, b.RxGainDBi = farG, nearG
			}
		}
		m := b.Levels().MarginDB
		out[k] = m
		worst = math.Min(worst, m)
	}
	return worst
}
