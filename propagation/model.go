package propagation

import (
	"errors"
	"fmt"
	"strings"
)

// ErrUnknownModel is wrapped by ModelByName when no model has the name.
var ErrUnknownModel = errors.New("propagation: unknown model")

// Result is the loss breakdown of one path. Losses are in dB.
type Result struct {
	// Model is the Name of the model that produced the result.
	Model string
	// FreeSpaceDB is the free-space basic transmission loss over the path
	// length (ITU-R P.525-4), with the wavelength from Params.
	FreeSpaceDB float64
	// ExcessDB is the loss beyond free space (diffraction); 0 for FreeSpace.
	ExcessDB float64
	// PathLossDB = FreeSpaceDB + ExcessDB.
	PathLossDB float64
	// LineOfSight is true when the terrain, clutter and earth bulge stay
	// below the straight ray between the antennas at every point.
	LineOfSight bool
	// WorstClearanceF1 is the smallest ratio over the intermediate points of
	// the clearance between the ray and terrain + clutter + bulge to the
	// first Fresnel-zone radius there: ≥ 1 clear, 0.6 the usual planning
	// minimum, < 0 obstructed; +Inf for a path with no intermediate points.
	WorstClearanceF1 float64
	// ObstacleIndex is the index in Path of the point of WorstClearanceF1,
	// −1 when the path has no intermediate points.
	ObstacleIndex int
	// Bullington holds the delta-Bullington terms (Terrain model only;
	// zero for other models).
	Bullington BullingtonTerms
	// ITM holds the Longley–Rice ITM terms (ITM model only; zero for
	// other models).
	ITM ITMTerms
}

// Model computes the loss of a radio path. Implementations are safe for
// concurrent use and do not allocate in Loss. Further models (for instance
// Longley–Rice ITM) join by implementing this interface; parameters they
// need beyond Params are fields of the model value, so callers holding a
// Model do not change.
type Model interface {
	// Name is the short name used on the command line and in JSON
	// ("free-space", "terrain").
	Name() string
	// Loss returns the loss breakdown of path p for prm. Errors wrap
	// ErrBadPath or ErrBadParams.
	Loss(p Path, prm Params) (Result, error)
}

// FrequencyModel is a Model that computes one path at several
// frequencies in less time than one Loss call per frequency.
type FrequencyModel interface {
	Model
	// LossAtFrequencies sets out[k] to what Loss returns for p and prm
	// with prm.FreqMHz = freqsMHz[k], the same to the last bit; out has
	// the length of freqsMHz. On an error out is incomplete.
	LossAtFrequencies(p Path, prm Params, freqsMHz []float64, out []Result) error
}

// LossAtFrequencies sets out[k] to m.Loss(p, prm) with prm.FreqMHz =
// freqsMHz[k], for a pair of repeater frequencies or a channel list over
// one path: by m's own LossAtFrequencies when m is a FrequencyModel, else
// by one Loss call per frequency. out must have the length of freqsMHz.
func LossAtFrequencies(m Model, p Path, prm Params, freqsMHz []float64, out []Result) error {
	if len(out) != len(freqsMHz) {
		return fmt.Errorf("%w: %d results for %d frequencies", ErrBadParams, len(out), len(freqsMHz))
	}
	if fm, ok := m.(FrequencyModel); ok {
		return fm.LossAtFrequencies(p, prm, freqsMHz, out)
	}
	for k, f := range freqsMHz {
		prm.FreqMHz = f
		r, err := m.Loss(p, prm)
		if err != nil {
			return err
		}
		out[k] = r
	}
	return nil
}

// frequencyScan scans a path once for several frequencies: the scan
// depends on the frequency only through ν of ITU-R P.526-16 eq. 51
// (profileScan.atWavelength).
type frequencyScan struct {
	s       profileScan
	scanned bool
}

// at returns the resolved parameters of prm at freqMHz, with f.s the scan
// of p at that frequency: the first call scans p, the next ones only
// set ν.
func (f *frequencyScan) at(p Path, prm Params, freqMHz float64) (params, error) {
	prm.FreqMHz = freqMHz
	rp, err := prm.resolve()
	if err != nil {
		return rp, err
	}
	if !f.scanned {
		if f.s, err = scanProfile(p, rp); err != nil {
			return rp, err
		}
		f.scanned = true
		return rp, nil
	}
	f.s.atWavelength(rp.wavelengthM)
	return rp, nil
}

// scanLosses sets out[k] to the loss breakdown of p at freqsMHz[k], from
// one scan of the profile for all of them: free-space loss (ITU-R
// P.525-4) with the clearance, plus delta-Bullington diffraction (ITU-R
// P.526-16 §4.5, eq. 66; its smooth profile, eqs. 60–66, per frequency)
// when diffraction is set. name is the model's.
func scanLosses(name string, diffraction bool, p Path, prm Params, freqsMHz []float64, out []Result) error {
	if len(out) != len(freqsMHz) {
		return fmt.Errorf("%w: %d results for %d frequencies", ErrBadParams, len(out), len(freqsMHz))
	}
	var f frequencyScan
	for k, freq := range freqsMHz {
		rp, err := f.at(p, prm, freq)
		if err != nil {
			return err
		}
		r := baseResult(name, &f.s, rp)
		if diffraction {
			r.Bullington = deltaBullington(p, rp, &f.s)
			r.ExcessDB = r.Bullington.LossDB
		}
		r.PathLossDB = r.FreeSpaceDB + r.ExcessDB
		out[k] = r
	}
	return nil
}

// FreeSpace is the Model of free-space loss alone (ITU-R P.525-4): terrain
// only informs the clearance and line-of-sight fields, never the loss.
type FreeSpace struct{}

// Name returns "free-space".
func (FreeSpace) Name() string { return "free-space" }

// Loss returns the free-space loss over the path length, with the clearance
// of the profile. ExcessDB is 0.
func (m FreeSpace) Loss(p Path, prm Params) (Result, error) {
	var out [1]Result
	err := scanLosses(m.Name(), false, p, prm, []float64{prm.FreqMHz}, out[:])
	return out[0], err
}

// LossAtFrequencies is Loss at each of freqsMHz, reading the profile once
// (see FrequencyModel).
func (m FreeSpace) LossAtFrequencies(p Path, prm Params, freqsMHz []float64, out []Result) error {
	return scanLosses(m.Name(), false, p, prm, freqsMHz, out)
}

// Terrain is the Model of free-space loss plus diffraction over the terrain
// profile by the delta-Bullington method of ITU-R P.526-16 §4.5, which
// includes smooth-earth diffraction (§3.2) for the polarization and ground
// in Params. Over a profile of zero heights it reduces to smooth-earth
// diffraction. It reads the profile two or three times and does not
// allocate (see BenchmarkTerrainLoss3300).
type Terrain struct{}

// Name returns "terrain".
func (Terrain) Name() string { return "terrain" }

// Loss returns free-space loss plus delta-Bullington diffraction
// (ExcessDB = BullingtonTerms.LossDB, eq. 66).
func (m Terrain) Loss(p Path, prm Params) (Result, error) {
	var out [1]Result
	err := scanLosses(m.Name(), true, p, prm, []float64{prm.FreqMHz}, out[:])
	return out[0], err
}

// LossAtFrequencies is Loss at each of freqsMHz with one scan of the
// profile for all of them (see FrequencyModel); the rest of
// delta-Bullington (the smooth profile, eqs. 60–66) is per frequency.
func (m Terrain) LossAtFrequencies(p Path, prm Params, freqsMHz []float64, out []Result) error {
	return scanLosses(m.Name(), true, p, prm, freqsMHz, out)
}

func baseResult(name string, s *profileScan, rp params) Result {
	c := s.clearance()
	return Result{
		Model:            name,
		FreeSpaceDB:      FreeSpaceLossWavelengthDB(s.dKM, rp.wavelengthM),
		LineOfSight:      c.LineOfSight,
		WorstClearanceF1: c.WorstF1,
		ObstacleIndex:    c.Index,
	}
}

// Registered is one entry of the model registry: a model value, as
// ModelByName returns it, and a one-line description for help text and
// reports.
type Registered struct {
	Model       Model
	Description string // one line, naming the published method
}

// registry lists every model callers can choose by name, in the order help
// text lists them. Adding a model is one line here: ModelByName,
// ModelNames, ModelDescription and therefore the --model flag, the plan
// file's model: field and every help text pick it up.
var registry = []Registered{
	{Terrain{}, "ITU-R P.526-16 diffraction over the terrain (delta-Bullington)"},
	{FreeSpace{}, "free space (ITU-R P.525-4), terrain ignored"},
	{ITM{}, "Longley–Rice ITM 1.2.2 (NTIA/ITS), point to point"},
}

// Models returns the registry, in a new slice: every model ModelByName
// accepts, with its description.
func Models() []Registered { return append([]Registered(nil), registry...) }

// ModelNames returns the names ModelByName accepts, in registry order, in a
// new slice.
func ModelNames() []string {
	out := make([]string, len(registry))
	for i, r := range registry {
		out[i] = r.Model.Name()
	}
	return out
}

// ModelDescription returns the registered description of the model called
// name (case-insensitive), or "" when no model has the name.
func ModelDescription(name string) string {
	for _, r := range registry {
		if strings.EqualFold(r.Model.Name(), strings.TrimSpace(name)) {
			return r.Description
		}
	}
	return ""
}

// ModelByName returns the registered model with the given Name,
// case-insensitively and ignoring surrounding space. An unknown name gives
// an error wrapping ErrUnknownModel that lists the known ones.
func ModelByName(name string) (Model, error) {
	for _, r := range registry {
		if strings.EqualFold(r.Model.Name(), strings.TrimSpace(name)) {
			return r.Model, nil
		}
	}
	return nil, fmt.Errorf("%w %q (known: %s)", ErrUnknownModel, name, strings.Join(ModelNames(), ", "))
}
