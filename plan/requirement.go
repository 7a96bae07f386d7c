package plan

import (
	"errors"

	"github.com/mastlink/mastlink/plan/units"
	"github.com/mastlink/mastlink/propagation"
)

// Requirement is what every required link must meet.
type Requirement struct {
	MarginDB    float64 // fade margin over the receiver sensitivity, dB
	Reliability float64 // fraction of locations, 0 when not asked
	SigmaDB     float64 // location variability σ used with Reliability, dB
	// ByModel is set when the propagation model gives the variability
	// itself (the Longley–Rice ITM, see ITMRequirement): the loss is then
	// already the loss at Reliability, so no σ margin is added.
	ByModel bool
	// Default is true when nothing was asked (neither a margin nor a
	// reliability) and MarginDB is DefaultMarginDB.
	Default bool
}

// DefaultMarginDB is the fade margin in dB every required link must meet
// when neither a margin nor a reliability is asked for, by the plan file
// and by every command alike: 10 dB (common practice for portable VHF/UHF
// links, enough for the fading a few metres of movement gives).
const DefaultMarginDB = 10.0

// DefaultRequirement is the requirement when nothing is asked:
// DefaultMarginDB of margin, σ DefaultSigmaDB, no reliability.
func DefaultRequirement() Requirement {
	return Requirement{MarginDB: DefaultMarginDB, SigmaDB: DefaultSigmaDB, Default: true}
}

// NeededMarginDB returns the margin a link needs: the larger of MarginDB and
// the margin that gives Reliability with a log-normal location variability
// of SigmaDB (ITU-R P.1812-8 §4.8, eq. 69: M = σ·I(1 − p)). With ByModel
// it is MarginDB: the model's loss already holds the reliability.
func (r Requirement) NeededMarginDB() float64 {
	m := r.MarginDB
	if r.Reliability > 0 && r.SigmaDB > 0 && !r.ByModel {
		if need := propagation.MarginForReliabilityDB(r.Reliability, r.SigmaDB); need > m {
			m = need
		}
	}
	return m
}

// DefaultSigmaDB is the location variability σ in dB taken when none is
// given: 5.5 dB, ITU-R P.1812-8 Table 6 (for planning at VHF/UHF).
const DefaultSigmaDB = 5.5

// RequirementOptions is a requirement as text, as a user writes it on the
// command line (--margin, --reliability, --sigma) or under a plan file's
// require: (margin, reliability, sigma). An empty field leaves the
// Requirement it is applied to unchanged. This is the one parser and
// validator of a requirement: the plan file and every command use it.
type RequirementOptions struct {
	Margin      string // fade margin, a loss in dB (units.ParseLossDB)
	Reliability string // fraction of locations, above 0 % and below 100 % (units.ParseRatio)
	Sigma       string // location variability σ in dB, 0 or more; more than 0 with a reliability
}

// Asked reports whether o asks for a margin or a reliability; when it
// does not, the requirement is DefaultRequirement (and a σ alone changes
// only the σ).
func (o RequirementOptions) Asked() bool { return o.Margin != "" || o.Reliability != "" }

// Apply parses and checks o and sets the matching fields of dst. A
// reliability needs σ above 0 dB (from o or already in dst): with σ = 0 the
// margin it asks for is undefined (ITU-R P.1812-8 eq. 69). Every error is
// a *units.OptionError whose Option is "margin", "reliability" or "sigma";
// dst is then left as it was.
func (o RequirementOptions) Apply(dst *Requirement) error {
	r := *dst
	fail := func(key string, err error) error { return &units.OptionError{Option: key, Err: err} }
	var err error
	if o.Margin != "" {
		if r.MarginDB, err = units.ParseLossDB(o.Margin); err != nil {
			return fail("margin", err)
		}
	}
	if o.Reliability != "" {
		if r.Reliability, err = units.ParseRatio(o.Reliability); err != nil {
			return fail("reliability", err)
		}
		if !(r.Reliability > 0 && r.Reliability < 1) {
			return fail("reliability", errors.New("must be above 0% and below 100% (e.g. 90%)"))
		}
	}
	if o.Sigma != "" {
		if r.SigmaDB, err = units.ParseLossDB(o.Sigma); err != nil {
			return fail("sigma", err)
		}
	}
	if r.Reliability > 0 && !(r.SigmaDB > 0) {
		return fail("sigma", errors.New("must be more than 0 dB with a reliability (5.5 to 8 dB is usual at VHF/UHF)"))
	}
	if o.Asked() {
		if dst.Default {
			// Something is asked now: the default margin no longer
			// stands unless the margin itself was given.
			if o.Margin == "" {
				r.MarginDB = 0
			}
			r.Default = false
		}
	}
	*dst = r
	return nil
}
