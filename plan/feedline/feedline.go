package feedline

import (
	"errors"
	"fmt"
	"math"
	"strconv"
	"strings"

	"github.com/mastlink/mastlink/plan/units"
)

// ErrUnknownCable is wrapped by LookupCable when a name is not in the
// catalog.
var ErrUnknownCable = errors.New("unknown cable")

// DefaultConnectorLossDB is the loss of one mated connector pair at VHF/UHF,
// 0.1 dB (common practice). Some licensing calculations assume a more
// conservative 0.25 dB per connection at 150 MHz and 0.5 dB at 450 MHz.
const DefaultConnectorLossDB = 0.1

// MetresPer100Ft is the length of 100 ft in metres, for converting loss per
// 100 ft (the unit of most published tables) to loss per 100 m.
const MetresPer100Ft = 100 * units.MetresPerFoot

// DBPer100FtFromDBPer100M converts a matched loss per 100 m to per 100 ft.
func DBPer100FtFromDBPer100M(dBPer100M float64) float64 {
	return dBPer100M * MetresPer100Ft / 100
}

// LossPoint is one matched-loss figure of a cable: the loss in dB per
// 100 ft at a frequency in MHz, and where it comes from.
type LossPoint struct {
	FreqMHz    float64 // MHz
	DBPer100Ft float64 // dB per 100 ft, matched (SWR 1)
	Source     string  // where the figure was published, or "user"
}

// Cable is a coaxial cable type with its matched-loss model
//
//	A(f) = K1·√f + K2·f   (dB per 100 ft, f in MHz)
//
// whose first term is conductor (skin-effect) loss and second dielectric
// loss (standard transmission-line physics). K1 and K2 are fitted, with
// both kept non-negative, to the figures in Published: a least-squares fit
// in relative error, so that every figure weighs alike whatever its size.
// The fit holds over the span of the published frequencies (see
// FittedRangeMHz); outside it the model extrapolates.
type Cable struct {
	Name           string      // catalog name, e.g. "RG-8X"
	Description    string      // one line for listings
	ImpedanceOhm   float64     // characteristic impedance, Ω
	VelocityFactor float64     // fraction of c; 0 when unknown
	MassKgPerM     float64     // kg/m, typical; 0 when unknown
	K1             float64     // dB/100 ft per √MHz
	K2             float64     // dB/100 ft per MHz
	Published      []LossPoint // figures the model was fitted to
}

// Sources of the published loss figures.
const (
	srcARRL   = "ARRL General Class License Manual, Table 6-1 (corrected)"
	srcGuide  = "radio manufacturer's repeater-systems training guide, cable appendix (nominal)"
	srcCounty = "county emergency-communications group's coax reference table"
	srcMemory = "from memory: typical datasheet figures, not checked against a source"
)

// catalogSpec is the hand-written catalog; buildCatalog fits K1 and K2.
// Velocity factors are from the published tables where given, else typical
// values from memory; masses are typical values from memory throughout.
var catalogSpec = []Cable{
	{
		Name: "RG-174", Description: "thin 50 Ω coax, 2.8 mm; short leads only",
		ImpedanceOhm: 50, VelocityFactor: 0.66 /* ARRL Table 6-1 */, MassKgPerM: 0.012, /* typical, from memory */
		Published: []LossPoint{
			{30, 4.56, srcARRL},
			{146, 10.3, srcARRL},
		},
	},
	{
		Name: "RG-58", Description: "50 Ω coax, 5 mm, solid dielectric",
		ImpedanceOhm: 50, VelocityFactor: 0.66 /* ARRL Table 6-1 */, MassKgPerM: 0.040, /* typical, from memory */
		Published: []LossPoint{
			{30, 2.47, srcARRL},
			{50, 3.30, srcGuide},
			{146, 5.63, srcARRL},
			{146, 6.10, srcGuide},
			{440, 11.75, srcGuide},
			{850, 17.75, srcGuide},
		},
	},
	{
		Name: "RG-8X", Description: "50 Ω coax, 6 mm, foam dielectric",
		// 0.78–0.82 by maker (ARRL Table 6-1); the middle is taken.
		ImpedanceOhm: 50, VelocityFactor: 0.80, MassKgPerM: 0.055, /* typical, from memory */
		Published: []LossPoint{
			{30, 2.0, srcCounty},
			{30, 1.96, srcARRL},
			{50, 2.3, srcCounty},
			{146, 4.7, srcCounty},
			{146, 4.53, srcARRL},
			{440, 8.6, srcCounty},
		},
	},
	{
		Name: "RG-213", Description: "50 Ω coax, 10.3 mm, solid dielectric, heavy",
		ImpedanceOhm: 50, VelocityFactor: 0.66 /* ARRL Table 6-1 */, MassKgPerM: 0.160, /* typical, from memory */
		Published: []LossPoint{
			{30, 1.08, srcARRL},
			{50, 1.50, srcGuide},
			{146, 2.53, srcARRL},
			{146, 2.70, srcGuide},
			{440, 4.97, srcGuide},
			{850, 7.53, srcGuide},
		},
	},
	{
		Name: "RG-8-foam", Description: "50 Ω coax, 10.3 mm, foam dielectric",
		ImpedanceOhm: 50, VelocityFactor: 0.78 /* repeater-systems guide */, MassKgPerM: 0.140, /* typical, from memory */
		Published: []LossPoint{
			{50, 1.20, srcGuide},
			{146, 2.20, srcGuide},
			{440, 3.98, srcGuide},
			{850, 5.20, srcGuide},
		},
	},
	{
		Name: "foam-0.24in", Description: "50 Ω low-loss foam coax, 0.24 in (6.1 mm) class",
		ImpedanceOhm: 50, VelocityFactor: 0.84 /* typical, from memory */, MassKgPerM: 0.050, /* typical, from memory */
		Published: []LossPoint{
			{30, 1.3, srcCounty},
			{50, 1.7, srcCounty},
			{146, 3.0, srcCounty},
			{440, 5.3, srcCounty},
		},
	},
	{
		Name: "foam-0.405in", Description: "50 Ω low-loss foam coax, 0.405 in (10.3 mm) class",
		ImpedanceOhm: 50, VelocityFactor: 0.85 /* typical, from memory */, MassKgPerM: 0.100, /* typical, from memory */
		Published: []LossPoint{
			{30, 0.7, srcCounty},
			{50, 0.9, srcCounty},
			{146, 1.5, srcCounty},
			{440, 2.7, srcCounty},
		},
	},
	{
		Name: "foam-0.6in", Description: "50 Ω low-loss foam coax, 0.6 in (15 mm) class",
		ImpedanceOhm: 50, VelocityFactor: 0.87 /* typical, from memory */, MassKgPerM: 0.195, /* typical, from memory */
		Published: []LossPoint{
			{30, 0.4, srcCounty},
			{50, 0.5, srcCounty},
			{146, 1.0, srcCounty},
			{440, 1.7, srcCounty},
		},
	},
	{
		Name: "hardline-0.5in", Description: "50 Ω 1/2 in corrugated foam-dielectric hardline",
		ImpedanceOhm: 50, VelocityFactor: 0.88 /* typical, from memory */, MassKgPerM: 0.220, /* typical, from memory */
		Published: []LossPoint{
			{50, 0.48, srcGuide},
			{146, 0.84, srcGuide},
			{440, 1.57, srcGuide},
			{850, 2.06, srcGuide},
		},
	},
	{
		Name: "RG-59", Description: "75 Ω coax, 6.1 mm; SWR 1.5 in a 50 Ω system",
		ImpedanceOhm: 75, VelocityFactor: 0.66 /* ARRL Table 6-1 */, MassKgPerM: 0.050, /* typical, from memory */
		Published: []LossPoint{
			{30, 1.79, srcARRL},
			{146, 4.11, srcARRL},
		},
	},
	{
		// No published figures at hand for RG-6: these are remembered
		// typical foam RG-6 datasheet values and are marked as such.
		Name: "RG-6", Description: "75 Ω coax, 6.9 mm, foam dielectric; SWR 1.5 in a 50 Ω system",
		ImpedanceOhm: 75, VelocityFactor: 0.82 /* typical, from memory */, MassKgPerM: 0.060, /* typical, from memory */
		Published: []LossPoint{
			{50, 1.5, srcMemory},
			{100, 2.0, srcMemory},
			{400, 4.1, srcMemory},
			{900, 6.1, srcMemory},
		},
	},
}

// catalog is catalogSpec with K1, K2 fitted; read-only after package
// initialisation.
var catalog = buildCatalog()

func buildCatalog() []Cable {
	out := make([]Cable, len(catalogSpec))
	for i, c := range catalogSpec {
		k1, k2, err := fitTwoTerm(c.Published)
		if err != nil {
			panic("plan: cable catalog " + c.Name + ": " + err.Error())
		}
		c.K1, c.K2 = k1, k2
		out[i] = c
	}
	return out
}

// fitTwoTerm fits A(f) = k1√f + k2 f to the points by least squares in
// relative error (each residual divided by the figure; by 1 when the figure
// is 0) with k1, k2 ≥ 0. With two unknowns the non-negative optimum is the
// unconstrained solution when that is non-negative, else the better of the
// two one-term fits. Figures at a single frequency cannot tell the two
// terms apart: they give the conductor term alone (k2 = 0), the loss that
// dominates coax at HF–UHF, growing as √f (skin effect).
func fitTwoTerm(pts []LossPoint) (k1, k2 float64, err error) {
	if len(pts) == 0 {
		return 0, 0, errors.New("no loss figures to fit")
	}
	var s11, s12, s22, b1, b2 float64
	type row struct{ x, y, z float64 }
	rows := make([]row, len(pts))
	for i, p := range pts {
		if !(p.FreqMHz > 0) || math.IsInf(p.FreqMHz, 0) {
			return 0, 0, fmt.Errorf("frequency %g MHz must be more than 0", p.FreqMHz)
		}
		if !(p.DBPer100Ft >= 0) || math.IsInf(p.DBPer100Ft, 0) {
			return 0, 0, fmt.Errorf("loss %g dB/100 ft at %g MHz must be 0 or more", p.DBPer100Ft, p.FreqMHz)
		}
		w := 1.0
		if p.DBPer100Ft > 0 {
			w = 1 / p.DBPer100Ft
		}
		r := row{math.Sqrt(p.FreqMHz) * w, p.FreqMHz * w, p.DBPer100Ft * w}
		rows[i] = r
		s11 += r.x * r.x
		s12 += r.x * r.y
		s22 += r.y * r.y
		b1 += r.x * r.z
		b2 += r.y * r.z
	}
	resid := func(a, b float64) float64 {
		var s float64
		for _, r := range rows {
			d := a*r.x + b*r.y - r.z
			s += d * d
		}
		return s
	}
	// One-term candidates: conductor loss only, dielectric loss only.
	k1, k2 = b1/s11, 0
	oneFreq := true
	for _, p := range pts {
		oneFreq = oneFreq && p.FreqMHz == pts[0].FreqMHz
	}
	if oneFreq {
		return k1, k2, nil
	}
	// The dielectric-only fit wins only when clearly better, not on
	// rounding residuals.
	if a := b2 / s22; resid(0, a) < resid(k1, 0)*(1-1e-9) {
		k1, k2 = 0, a
	}
	if det := s11*s22 - s12*s12; det > 1e-12*s11*s22 {
		a := (b1*s22 - b2*s12) / det
		b := (s11*b2 - s12*b1) / det
		if a >= 0 && b >= 0 {
			k1, k2 = a, b
		}
	}
	return k1, k2, nil
}

// CustomCable builds a cable from matched losses the user knows (from a
// datasheet or a measurement), in dB per 100 ft (convert with
// DBPer100FtFromDBPer100M). With two or more figures K1 and K2 are fitted
// as for the catalog. With one figure the loss is taken as conductor loss
// only (K2 = 0, A ∝ √f): right at that frequency, and an underestimate well
// above it or overestimate well below it for cables whose dielectric loss
// matters (mostly above about 400 MHz). The cable's impedance is taken as
// 50 Ω; velocity factor and mass are unknown (0).
func CustomCable(name string, points ...LossPoint) (Cable, error) {
	if len(points) == 0 {
		return Cable{}, fmt.Errorf("cable %q: give its loss at one or two frequencies", name)
	}
	k1, k2, err := fitTwoTerm(points)
	if err != nil {
		return Cable{}, &valueError{fmt.Sprintf("cable %q: %v", name, err), units.ErrRange}
	}
	return Cable{
		Name:         name,
		Description:  "user-defined",
		ImpedanceOhm: 50,
		K1:           k1,
		K2:           k2,
		Published:    append([]LossPoint(nil), points...),
	}, nil
}

// valueError is an error with its own wording that wraps a sentinel.
type valueError struct {
	msg string
	err error
}

func (e *valueError) Error() string { return e.msg }
func (e *valueError) Unwrap() error { return e.err }

// LossDBPer100Ft returns the matched loss in dB per 100 ft at freqMHz,
// K1·√f + K2·f.
func (c Cable) LossDBPer100Ft(freqMHz float64) float64 {
	return c.K1*math.Sqrt(freqMHz) + c.K2*freqMHz
}

// LossDBPer100M returns the matched loss in dB per 100 m at freqMHz.
func (c Cable) LossDBPer100M(freqMHz float64) float64 {
	return c.LossDBPer100Ft(freqMHz) * 100 / MetresPer100Ft
}

// MatchedLossDB returns the matched (SWR 1) loss in dB of lengthM metres
// of the cable at freqMHz.
func (c Cable) MatchedLossDB(lengthM, freqMHz float64) float64 {
	return c.LossDBPer100Ft(freqMHz) * lengthM / MetresPer100Ft
}

// FittedRangeMHz returns the lowest and highest frequency, MHz, among the
// figures the model was fitted to.
func (c Cable) FittedRangeMHz() (lo, hi float64) {
	lo, hi = math.Inf(1), math.Inf(-1)
	for _, p := range c.Published {
		lo, hi = math.Min(lo, p.FreqMHz), math.Max(hi, p.FreqMHz)
	}
	return lo, hi
}

// Extrapolated reports whether freqMHz lies well outside the figures the
// cable's model was fitted to: below 0.8 × the lowest or above 1.25 × the
// highest (a margin of common practice: the two-term model holds a little
// beyond its data).
func (c Cable) Extrapolated(freqMHz float64) bool {
	lo, hi := c.FittedRangeMHz()
	return len(c.Published) > 0 && (freqMHz < lo*0.8 || freqMHz > hi*1.25)
}

// RangeWarning returns a sentence when freqMHz lies outside the cable's
// fitted range (Extrapolated), else "".
func (c Cable) RangeWarning(freqMHz float64) string {
	if !c.Extrapolated(freqMHz) {
		return ""
	}
	lo, hi := c.FittedRangeMHz()
	span := fmt.Sprintf("span %s–%s MHz", trimFloat(lo), trimFloat(hi))
	if lo == hi {
		span = fmt.Sprintf("are at %s MHz", trimFloat(lo))
	}
	return fmt.Sprintf("%s's loss figures %s; at %s MHz its loss is extrapolated", c.Name, span, trimFloat(freqMHz))
}

// MismatchWarning returns a sentence when the cable is not 50 Ω, saying
// that the junction mismatch loss is applied, else "".
func (c Cable) MismatchWarning() string {
	if JunctionMismatchLossDB(c.ImpedanceOhm) == 0 {
		return ""
	}
	g := math.Abs(c.ImpedanceOhm-SystemImpedanceOhm) / (c.ImpedanceOhm + SystemImpedanceOhm)
	return fmt.Sprintf("%s is a %s Ω cable in a %d Ω system: SWR %s:1 where it meets the radio and the antenna; %.2f dB of mismatch loss is included in its line loss",
		c.Name, trimFloat(c.ImpedanceOhm), SystemImpedanceOhm, trimFloat(math.Round(SWRFromReflection(g)*100)/100), 2*JunctionMismatchLossDB(c.ImpedanceOhm))
}

// trimFloat formats v with up to 3 decimals and no trailing zeros.
func trimFloat(v float64) string {
	return strconv.FormatFloat(math.Round(v*1000)/1000, 'f', -1, 64)
}

// Cables returns a copy of the catalog in listing order.
func Cables() []Cable {
	out := make([]Cable, len(catalog))
	for i, c := range catalog {
		c.Published = append([]LossPoint(nil), c.Published...)
		out[i] = c
	}
	return out
}

// CableNames returns the catalog names in listing order.
func CableNames() []string {
	out := make([]string, len(catalog))
	for i, c := range catalog {
		out[i] = c.Name
	}
	return out
}

// normalizeCableName folds case and drops hyphens, spaces and underscores,
// so "rg8x", "RG 8X" and "RG-8X" are one name.
func normalizeCableName(s string) string {
	return strings.Map(func(r rune) rune {
		switch r {
		case '-', ' ', '_', '\t':
			return -1
		}
		return r
	}, strings.ToLower(s))
}

// LookupCable finds a catalog cable by name, ignoring case, hyphens, spaces
// and underscores. An unknown name gives an error wrapping ErrUnknownCable
// that lists the catalog: unknown cable "RG-59X" (known: RG-174, …).
func LookupCable(name string) (Cable, error) {
	key := normalizeCableName(name)
	for _, c := range catalog {
		if key != "" && normalizeCableName(c.Name) == key {
			c.Published = append([]LossPoint(nil), c.Published...)
			return c, nil
		}
	}
	return Cable{}, fmt.Errorf("%w %q (known: %s)", ErrUnknownCable, name, strings.Join(CableNames(), ", "))
}

// CableListItem is one row of the cable listing; the JSON names follow the
// `feedline --list` contract.
type CableListItem struct {
	Name           string  `json:"name"`
	Description    string  `json:"description"`
	LossDBPer100M  float64 `json:"loss_db_per_100m"` // matched, at the listing frequency
	VelocityFactor float64 `json:"velocity_factor"`
	MassKgPerM     float64 `json:"mass_kg_per_m"` // typical
}

// CableList returns the catalog with each cable's matched loss in dB per
// 100 m at freqMHz.
func CableList(freqMHz float64) []CableListItem {
	out := make([]CableListItem, len(catalog))
	for i, c := range catalog {
		out[i] = CableListItem{
			Name:           c.Name,
			Description:    c.Description,
			LossDBPer100M:  c.LossDBPer100M(freqMHz),
			VelocityFactor: c.VelocityFactor,
			MassKgPerM:     c.MassKgPerM,
		}
	}
	return out
}

// ReflectionCoefficient returns |Γ| = (SWR − 1)/(SWR + 1) for SWR ≥ 1
// (an infinite SWR gives 1).
func ReflectionCoefficient(swr float64) float64 {
	if math.IsInf(swr, 1) {
		return 1
	}
	return (swr - 1) / (swr + 1)
}

// SWRFromReflection returns the SWR (1 + |Γ|)/(1 − |Γ|) for 0 ≤ |Γ| ≤ 1.
func SWRFromReflection(gamma float64) float64 { return (1 + gamma) / (1 - gamma) }

// MismatchLossDB returns the mismatch loss −10 log10(1 − Γ²) in dB at an
// SWR ≥ 1: the share of forward power reflected by the load.
func MismatchLossDB(swr float64) float64 {
	g := ReflectionCoefficient(swr)
	return 10 * math.Log10(1/(1-g*g)) // never −0
}

// SWRTotalLossDB returns the total loss in dB of a line with matched loss
// matchedLossDB terminated in a load of the given SWR (the usual
// transmission-line-handbook formula):
//
//	a = 10^(ML/10), Γ = (SWR − 1)/(SWR + 1)
//	TL = 10 log10[(a² − Γ²) / (a (1 − Γ²))]
//
// It is the ratio of the power entering the line to the power the load
// accepts. SWR 1 gives ML; an infinite SWR gives +Inf.
//
// It is evaluated as ML + 10 log10[(1 − Γ²/a²)/(1 − Γ²)], the same
// relation, which stays finite for the thousands of dB of a very long line.
func SWRTotalLossDB(matchedLossDB, swr float64) float64 {
	g := ReflectionCoefficient(swr)
	if g >= 1 {
		return math.Inf(1)
	}
	ga := g * math.Pow(10, -matchedLossDB/10) // Γ/a
	return matchedLossDB + 10*math.Log10((1-ga*ga)/(1-g*g))
}

// SWRExtraLossDB returns the loss in dB that an SWR at the load adds to a
// line's matched loss: SWRTotalLossDB − matchedLossDB.
func SWRExtraLossDB(matchedLossDB, swr float64) float64 {
	return SWRTotalLossDB(matchedLossDB, swr) - matchedLossDB
}

// InputSWR returns the SWR seen at the input of a line with matched loss
// matchedLossDB whose load has the given SWR: the reflection shrinks to
// |Γ|/a with a = 10^(ML/10), as it crosses the line twice.
func InputSWR(matchedLossDB, loadSWR float64) float64 {
	return SWRFromReflection(ReflectionCoefficient(loadSWR) / math.Pow(10, matchedLossDB/10))
}

// SystemImpedanceOhm is the impedance radios and antennas are built for at
// VHF/UHF, 50 Ω (common practice).
const SystemImpedanceOhm = 50

// JunctionMismatchLossDB returns the loss in dB where a cable of
// impedance zOhm meets the 50 Ω system, at each of its two ends: the
// impedance step reflects |Γ| = |Z − 50|/(Z + 50) and passes 1 − Γ² of the
// power, a mismatch loss of −10 log10(1 − Γ²) per junction (the
// transmission-line relations, e.g. ARRL Antenna Book, transmission-line
// chapter; from memory). A 75 Ω cable gives |Γ| = 0.2, SWR 1.5, 0.177 dB
// per junction. 0 or 50 Ω gives 0.
func JunctionMismatchLossDB(zOhm float64) float64 {
	if !(zOhm > 0) || zOhm == SystemImpedanceOhm {
		return 0
	}
	g := math.Abs(zOhm-SystemImpedanceOhm) / (zOhm + SystemImpedanceOhm)
	return -10 * math.Log10(1-g*g)
}

// Line is the whole line between a radio and its antenna.
type Line struct {
	Cable           Cable
	LengthM         float64 // metres, 0 or more
	SWR             float64 // at the antenna, 1 or more; 0 is taken as 1 (matched)
	Connectors      int     // mated connector pairs, 0 or more
	ConnectorLossDB float64 // dB per mated pair, 0 or more (DefaultConnectorLossDB is common)
}

// NewLine returns a matched line of lengthM metres of the cable with no
// connectors counted yet and DefaultConnectorLossDB per pair.
func NewLine(c Cable, lengthM float64) Line {
	return Line{Cable: c, LengthM: lengthM, SWR: 1, ConnectorLossDB: DefaultConnectorLossDB}
}

// Loss is the loss of a Line at one frequency; the JSON names
// follow the `feedline` contract.
type Loss struct {
	Cable           string  `json:"cable"`
	LengthM         float64 `json:"length_m"`
	FreqMHz         float64 `json:"freq_mhz"`
	MatchedLossDB   float64 `json:"matched_loss_db"`   // the cable at SWR 1
	SWRLossDB       float64 `json:"swr_loss_db"`       // extra cable loss from the SWR at the antenna
	ConnectorLossDB float64 `json:"connector_loss_db"` // all mated pairs
	// ImpedanceMismatchLossDB is the loss at the cable's two junctions with
	// the 50 Ω radio and antenna when the cable is not 50 Ω (2 ×
	// JunctionMismatchLossDB); 0 for a 50 Ω cable or no cable.
	ImpedanceMismatchLossDB float64 `json:"impedance_mismatch_loss_db"`
	ImpedanceOhm            float64 `json:"impedance_ohm"`        // the cable's
	SystemImpedanceOhm      float64 `json:"system_impedance_ohm"` // SystemImpedanceOhm
	TotalLossDB             float64 `json:"total_loss_db"`        // the four above
	DeliveredFraction       float64 `json:"delivered_fraction"`   // 10^(−total/10): power accepted by the antenna over power into the line
}

// Loss computes the line's loss at freqMHz (more than 0): matched loss from
// the cable model, the extra loss from SWR (SWRExtraLossDB), the
// connectors, and for a cable that is not 50 Ω the mismatch at its two
// junctions with the 50 Ω system (JunctionMismatchLossDB, each taken
// alone: with a lossy line the two reflections add on average; a short
// line's actual loss swings between 0 and about twice that with its
// electrical length). It does not include the mismatch loss at the radio
// from the SWR at the antenna, which depends on the transmitter (see
// MismatchLossDB and InputSWR). A very long line gives a large but finite
// loss and a delivered fraction of 0.
func (f Line) Loss(freqMHz float64) (Loss, error) {
	swr := f.SWR
	if swr == 0 {
		swr = 1
	}
	switch {
	case !(f.LengthM >= 0) || math.IsInf(f.LengthM, 0):
		return Loss{}, &valueError{fmt.Sprintf("cable length %g m: give a length of 0 or more", f.LengthM), units.ErrRange}
	case !(freqMHz > 0) || math.IsInf(freqMHz, 0):
		return Loss{}, &valueError{fmt.Sprintf("frequency %g MHz: give a frequency above 0", freqMHz), units.ErrRange}
	case !(swr >= 1):
		return Loss{}, &valueError{fmt.Sprintf("swr %g: give an SWR of 1 or more (1 is matched)", f.SWR), units.ErrRange}
	case f.Connectors < 0:
		return Loss{}, &valueError{fmt.Sprintf("%d connectors: give 0 or more", f.Connectors), units.ErrRange}
	case !(f.ConnectorLossDB >= 0):
		return Loss{}, &valueError{fmt.Sprintf("connector loss %g dB: give 0 or more", f.ConnectorLossDB), units.ErrRange}
	}
	ml := f.Cable.MatchedLossDB(f.LengthM, freqMHz)
	extra := SWRExtraLossDB(ml, swr)
	conn := float64(f.Connectors) * f.ConnectorLossDB
	var junctions float64
	if f.LengthM > 0 {
		junctions = 2 * JunctionMismatchLossDB(f.Cable.ImpedanceOhm)
	}
	total := ml + extra + conn + junctions
	return Loss{
		Cable:                   f.Cable.Name,
		LengthM:                 f.LengthM,
		FreqMHz:                 freqMHz,
		MatchedLossDB:           ml,
		SWRLossDB:               extra,
		ConnectorLossDB:         conn,
		ImpedanceMismatchLossDB: junctions,
		ImpedanceOhm:            f.Cable.ImpedanceOhm,
		SystemImpedanceOhm:      SystemImpedanceOhm,
		TotalLossDB:             total,
		DeliveredFraction:       math.Pow(10, -total/10),
	}, nil
}
