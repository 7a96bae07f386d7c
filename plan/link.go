package plan

import (
	"errors"
	"fmt"
	"math"
	"strings"

	"github.com/mastlink/mastlink/plan/units"
	"github.com/mastlink/mastlink/propagation"
	"github.com/mastlink/mastlink/terrain"
	"github.com/paulmach/orb"
)

// SamePlaceM is the distance in metres below which the two ends of a link
// are taken as one place: there is no path for a propagation model to
// work on (ITU-R P.526 and P.525 need a path length), and two radios at one
// spot reach each other anyway.
const SamePlaceM = 1

// ErrSamePlace is wrapped when the two ends of a link are closer than
// SamePlaceM.
var ErrSamePlace = errors.New("same place")

// Env is what every link evaluation shares: the terrain, the propagation
// model and the radio climate. An Env is safe for concurrent use; each
// goroutine needs its own Geometry.
type Env struct {
	// Terrain supplies ground heights; nil or a set with no tiles means a
	// smooth earth at sea level.
	Terrain *terrain.Set
	// Model computes path loss; nil means propagation.Terrain
	// (ITU-R P.526-16 delta-Bullington).
	Model propagation.Model
	// K is the effective earth-radius factor; 0 means
	// propagation.DefaultKFactor (4/3).
	K float64
	// Polarization of the wave; the zero value is propagation.Vertical,
	// the usual for VHF/UHF FM.
	Polarization propagation.Polarization
	// Ground holds the ground constants for smooth-earth diffraction; the
	// zero value means propagation.Land (ITU-R P.1812-8 §4.3.3).
	Ground propagation.Ground
	// StepM is the profile sample spacing in metres; 0 follows the DEM.
	StepM float64
	// SigmaDB is the location variability σ in dB used for the probability
	// of a working link; 0 leaves the probability out.
	SigmaDB float64
}

// noTerrain is an empty tile set: a smooth earth at sea level.
var noTerrain = func() *terrain.Set {
	s, err := terrain.Open()
	if err != nil {
		panic("plan: empty tile set: " + err.Error())
	}
	return s
}()

// terrainSet returns the Env's tiles, or an empty set for a smooth earth.
func (e *Env) terrainSet() *terrain.Set {
	if e.Terrain == nil {
		return noTerrain
	}
	return e.Terrain
}

func (e *Env) model() propagation.Model {
	if e.Model == nil {
		return propagation.Terrain{}
	}
	return e.Model
}

// Geometry is the terrain between two points, extracted once and reused for
// every evaluation over that path (both directions, several frequencies,
// several mast heights). Not safe for concurrent use.
type Geometry struct {
	From, To orb.Point
	Profile  terrain.Profile
	path     propagation.Path
	// Source says where the heights came from: "terrain", "smooth earth"
	// (no elevation data covered the path), or "profile file".
	Source string
	// modelWarn gathers the ITM warnings of every PathLoss over the path
	// since it was measured.
	modelWarn propagation.ITMWarnings
	// results holds the losses of pathLosses (a repeater's two
	// frequencies) without an allocation per path.
	results [2]propagation.Result
}

// Measure fills g with the terrain profile between a and b along the WGS84
// geodesic (Karney), at the Env's step: the heights alone
// (terrain.Set.ProfileHeights); SampleDistanceM and SamplePosition give a
// sample's place.
func (e *Env) Measure(a, b orb.Point, g *Geometry) error {
	g.From, g.To = a, b
	if err := e.terrainSet().ProfileHeights(a.Lat(), a.Lon(), b.Lat(), b.Lon(), e.StepM, &g.Profile); err != nil {
		return err
	}
	g.Source = "terrain"
	g.modelWarn = 0
	if g.Profile.NoData == len(g.Profile.ElevM) {
		g.Source = "smooth earth"
	}
	n := g.Profile.Len()
	if cap(g.path.DistKM) < n {
		g.path.DistKM = make([]float64, n)
	}
	g.path.DistKM = g.path.DistKM[:n]
	// The path's heights are the profile's, not a copy: neither is
	// changed until the next Measure, which sets both.
	g.path.HeightM = g.Profile.ElevM
	g.path.ClutterM = nil
	// Samples are equally spaced: i·step in km, a multiply per sample (no
	// division), the last one the exact length.
	stepKM := g.Profile.StepM * 0.001
	dist := g.path.DistKM
	for i := range dist {
		dist[i] = float64(i) * stepKM
	}
	dist[n-1] = g.Profile.DistanceM * 0.001
	return nil
}

// SampleDistanceM returns the distance of sample i of g's profile from
// g.From along the path, metres.
func (g *Geometry) SampleDistanceM(i int) float64 {
	p := &g.Profile
	if i < len(p.DistM) {
		return p.DistM[i]
	}
	if i == p.Len()-1 {
		return p.DistanceM
	}
	return float64(i) * p.StepM
}

// SamplePosition returns the latitude and longitude of sample i of g's
// profile, degrees: on the WGS84 geodesic from g.From to g.To (Karney,
// "Algorithms for geodesics", J. Geodesy 87, 2013) for a measured
// profile, 0, 0 for a profile given without positions.
func (g *Geometry) SamplePosition(i int) (lat, lon float64) {
	p := &g.Profile
	if i < len(p.Lat) {
		return p.Lat[i], p.Lon[i]
	}
	line, _ := terrain.InverseLine(g.From.Lat(), g.From.Lon(), g.To.Lat(), g.To.Lon())
	lat, lon = line.Position(g.SampleDistanceM(i))
	if lon >= 180 {
		lon -= 360
	}
	return lat, lon
}

// GeometryFromPath makes a Geometry from a profile given directly (a
// surveyed profile, or one read from a file): distances in metres from the
// first point, heights in metres above sea level, optional clutter heights
// added to intermediate points. Positions are unknown (zero).
func GeometryFromPath(distM, elevM, clutterM []float64) (*Geometry, error) {
	if len(distM) < 2 || len(distM) != len(elevM) {
		return nil, fmt.Errorf("a profile needs at least two points with a distance and an elevation each")
	}
	g := &Geometry{Source: "profile file"}
	g.Profile.DistM = append([]float64(nil), distM...)
	g.Profile.ElevM = append([]float64(nil), elevM...)
	g.Profile.Lat = make([]float64, len(distM))
	g.Profile.Lon = make([]float64, len(distM))
	g.Profile.DistanceM = distM[len(distM)-1]
	for _, d := range distM {
		g.path.DistKM = append(g.path.DistKM, d/1000)
	}
	g.path.HeightM = append([]float64(nil), elevM...)
	if clutterM != nil {
		g.path.ClutterM = append([]float64(nil), clutterM...)
	}
	return g, nil
}

// Obstacle is the profile point where the first-Fresnel-zone clearance is
// worst.
type Obstacle struct {
	DistanceM  float64 `json:"distance_m"`  // from the transmitting end
	Lat        float64 `json:"lat"`         // degrees
	Lon        float64 `json:"lon"`         // degrees
	ElevationM float64 `json:"elevation_m"` // ground, metres above sea level
}

// LinkResult is one direction of one link: the path, its loss and the
// budget. Field names carry their units.
type LinkResult struct {
	From       string  `json:"from,omitempty"`
	To         string  `json:"to,omitempty"`
	Direction  string  `json:"direction,omitempty"` // e.g. "talk-in", "talk-out", "out", "back"
	FreqMHz    float64 `json:"freq_mhz"`
	DistanceM  float64 `json:"distance_m"`
	AzimuthDeg float64 `json:"azimuth_deg"` // at the transmitting end towards the receiver, clockwise from true north
	// RxAzimuthDeg is the azimuth at the receiving end towards the
	// transmitter. On a geodesic it differs from AzimuthDeg ± 180° (Karney
	// 2013: the forward azimuths at the two ends are not opposite).
	RxAzimuthDeg     float64 `json:"rx_azimuth_deg"`
	Terrain          string  `json:"terrain"` // terrain, smooth earth or profile file
	Model            string  `json:"model"`
	FreeSpaceLossDB  float64 `json:"free_space_loss_db"`
	ExcessLossDB     float64 `json:"excess_loss_db"`
	PathLossDB       float64 `json:"path_loss_db"`
	TxPowerDBm       float64 `json:"tx_power_dbm"`
	TxFeedlineLossDB float64 `json:"tx_feedline_loss_db"`
	TxGainDBi        float64 `json:"tx_gain_dbi"` // the transmitting antenna's peak gain
	EIRPDBm          float64 `json:"eirp_dbm"`    // toward the path
	RxGainDBi        float64 `json:"rx_gain_dbi"` // the receiving antenna's peak gain
	RxFeedlineLossDB float64 `json:"rx_feedline_loss_db"`
	// The antennas toward the path: catalog type (omitted without one),
	// where a directional one points (null for others), the elevation
	// angle the path leaves each end at, and the pattern gain toward the
	// path, which the budget uses.
	TxAntenna           string   `json:"tx_antenna,omitempty"`
	RxAntenna           string   `json:"rx_antenna,omitempty"`
	TxBearingDeg        *float64 `json:"tx_bearing_deg"`
	RxBearingDeg        *float64 `json:"rx_bearing_deg"`
	TxElevationDeg      float64  `json:"tx_elevation_deg"`
	RxElevationDeg      float64  `json:"rx_elevation_deg"`
	TxGainTowardPathDBi float64  `json:"tx_gain_toward_path_dbi"`
	RxGainTowardPathDBi float64  `json:"rx_gain_toward_path_dbi"`
	TxBodyLossDB        float64  `json:"tx_body_loss_db"`
	RxBodyLossDB        float64  `json:"rx_body_loss_db"`
	TxClutterLossDB     float64  `json:"tx_clutter_loss_db"` // ITU-R P.2108-1 §3.1
	RxClutterLossDB     float64  `json:"rx_clutter_loss_db"`
	ClutterLossDB       float64  `json:"clutter_loss_db"` // both ends'
	// Notes: an antenna used outside its band, a directional antenna
	// taken as aimed at the far end.
	Notes            []string   `json:"notes,omitempty"`
	RxPowerDBm       float64    `json:"rx_power_dbm"`
	RxSensitivityDBm float64    `json:"rx_sensitivity_dbm"`
	MarginDB         float64    `json:"margin_db"`
	ITM              *ITMReport `json:"itm,omitempty"`      // the Longley–Rice ITM's intermediate values and settings (model itm only)
	Warnings         []string   `json:"warnings,omitempty"` // the model's warnings for this path
	LineOfSight      bool       `json:"line_of_sight"`
	WorstClearanceF1 *float64   `json:"worst_clearance_f1"` // null when the path has no intermediate points
	Obstacle         *Obstacle  `json:"obstacle"`           // null when the path has no intermediate points
	Probability      *float64   `json:"probability"`        // of a working link at the location, with σ; null without σ
	NeededMarginDB   *float64   `json:"needed_margin_db,omitempty"`
	MeetsRequirement *bool      `json:"meets_requirement,omitempty"`
	// SamePlace marks a link whose two ends are closer than SamePlaceM:
	// nothing is evaluated (the figures are 0), it counts neither for nor
	// against the requirement, and a warning says so.
	SamePlace bool    `json:"same_place,omitempty"`
	Optional  bool    `json:"optional,omitempty"` // a target the requirement does not cover
	TxGroundM float64 `json:"tx_ground_m"`        // terrain height at the transmitting end, m
	RxGroundM float64 `json:"rx_ground_m"`
}

// Evaluate computes the budget from tx to rx over g at freqMHz (LinkBudget:
// dBm and dB). tx is at g.From when txAtFrom is true, else at g.To; the path
// loss is computed on g in its own orientation (ITU-R P.526 diffraction is
// reciprocal), so one Geometry serves both directions. Each antenna's gain is
// its gain toward the path (Antenna.GainTowardDBi: the catalog pattern
// toward the path's azimuth and its elevation angle at that end, the horizon
// angles of ITU-R P.452-17 Attachment 2 to Annex 1); a handheld's body loss
// comes off the EIRP or the received level, and each end's terminal clutter
// loss (ITU-R P.2108-1 §3.1, Antenna.ClutterLossDB) adds to the path loss.
// Ends closer than SamePlaceM give an error wrapping ErrSamePlace.
func (e *Env) Evaluate(g *Geometry, tx, rx End, freqMHz float64, txAtFrom bool) (LinkResult, error) {
	if !(freqMHz > 0) {
		return LinkResult{}, errors.New("no frequency given")
	}
	if d := g.Profile.DistanceM; d < SamePlaceM {
		return LinkResult{}, fmt.Errorf("%w: %s and %s are %.2f m apart; a link needs two places", ErrSamePlace, tx.Name, rx.Name, d)
	}
	fromEnd, toEnd := tx, rx
	if !txAtFrom {
		fromEnd, toEnd = rx, tx
	}
	loss, err := e.PathLoss(g, fromEnd.Antenna.HeightM, toEnd.Antenna.HeightM, freqMHz)
	if err != nil {
		return LinkResult{}, err
	}
	txFL, err := tx.Feedline.Loss(freqMHz)
	if err != nil {
		return LinkResult{}, fmt.Errorf("%s: feedline: %w", tx.Name, err)
	}
	rxFL, err := rx.Feedline.Loss(freqMHz)
	if err != nil {
		return LinkResult{}, fmt.Errorf("%s: feedline: %w", rx.Name, err)
	}
	txLine, rxLine := txFL.TotalLossDB, rxFL.TotalLossDB
	txL, err := tx.losses(freqMHz)
	if err != nil {
		return LinkResult{}, err
	}
	rxL, err := rx.losses(freqMHz)
	if err != nil {
		return LinkResult{}, err
	}
	tw, err := e.toward(g, fromEnd.Antenna.HeightM, toEnd.Antenna.HeightM)
	if err != nil {
		return LinkResult{}, err
	}
	txAz, txEl, rxAz, rxEl := tw.fromAzDeg, tw.fromElDeg, tw.toAzDeg, tw.toElDeg
	if !txAtFrom {
		txAz, txEl, rxAz, rxEl = rxAz, rxEl, txAz, txEl
	}
	b := LinkBudget{
		TxPowerDBm:       units.DBmFromW(tx.Radio.PowerW),
		TxFeedlineLossDB: txLine,
		TxGainDBi:        tx.Antenna.GainTowardDBi(txAz, txEl),
		PathLossDB:       loss.PathLossDB,
		RxGainDBi:        rx.Antenna.GainTowardDBi(rxAz, rxEl),
		RxFeedlineLossDB: rxLine,
		RxSensitivityDBm: rx.Radio.SensitivityDBm,
		TxBodyLossDB:     txL.bodyDB,
		RxBodyLossDB:     rxL.bodyDB,
		ClutterLossDB:    txL.clutterDB + rxL.clutterDB,
	}
	lv := b.Levels()
	n := g.Profile.Len()
	r := LinkResult{
		From: tx.Name, To: rx.Name,
		FreqMHz:          freqMHz,
		DistanceM:        g.Profile.DistanceM,
		Terrain:          g.Source,
		Model:            loss.Model,
		FreeSpaceLossDB:  loss.FreeSpaceDB,
		ExcessLossDB:     loss.ExcessDB,
		PathLossDB:       loss.PathLossDB,
		TxPowerDBm:       b.TxPowerDBm,
		TxFeedlineLossDB: txLine,
		TxGainDBi:        tx.Antenna.GainDBi,
		EIRPDBm:          lv.EIRPDBm,
		RxGainDBi:        rx.Antenna.GainDBi,
		RxFeedlineLossDB: rxLine,

		TxAntenna:           tx.Antenna.Name(),
		RxAntenna:           rx.Antenna.Name(),
		TxBearingDeg:        aimOf(tx.Antenna, txAz),
		RxBearingDeg:        aimOf(rx.Antenna, rxAz),
		TxElevationDeg:      txEl,
		RxElevationDeg:      rxEl,
		TxGainTowardPathDBi: b.TxGainDBi,
		RxGainTowardPathDBi: b.RxGainDBi,
		TxBodyLossDB:        b.TxBodyLossDB,
		RxBodyLossDB:        b.RxBodyLossDB,
		TxClutterLossDB:     txL.clutterDB,
		RxClutterLossDB:     rxL.clutterDB,
		ClutterLossDB:       b.ClutterLossDB,
		Notes:               append(tx.Antenna.notes(tx.Name, freqMHz), rx.Antenna.notes(rx.Name, freqMHz)...),

		RxPowerDBm:       lv.RxPowerDBm,
		RxSensitivityDBm: b.RxSensitivityDBm,
		MarginDB:         lv.MarginDB,
		LineOfSight:      loss.LineOfSight,
		TxGroundM:        g.Profile.ElevM[0],
		RxGroundM:        g.Profile.ElevM[n-1],
	}
	if txAtFrom {
		r.AzimuthDeg, r.RxAzimuthDeg = g.Profile.AzimuthDeg, g.Profile.BackAzimuthDeg
	} else {
		r.AzimuthDeg, r.RxAzimuthDeg = g.Profile.BackAzimuthDeg, g.Profile.AzimuthDeg
		r.TxGroundM, r.RxGroundM = r.RxGroundM, r.TxGroundM
	}
	if loss.ObstacleIndex >= 0 && !math.IsInf(loss.WorstClearanceF1, 0) {
		c := loss.WorstClearanceF1
		r.WorstClearanceF1 = &c
		i := loss.ObstacleIndex
		d := g.SampleDistanceM(i)
		if !txAtFrom {
			d = g.Profile.DistanceM - d
		}
		lat, lon := g.SamplePosition(i)
		r.Obstacle = &Obstacle{DistanceM: d, Lat: lat, Lon: lon, ElevationM: g.Profile.ElevM[i]}
	}
	if m, ok := e.model().(propagation.ITM); ok {
		r.ITM = newITMReport(m, loss.ITM, !txAtFrom)
		for _, w := range loss.ITM.Warnings.Messages() {
			r.Warnings = append(r.Warnings, "ITM: "+w)
		}
	}
	if e.SigmaDB > 0 {
		p := propagation.LinkProbability(r.MarginDB, e.SigmaDB)
		r.Probability = &p
	}
	return r, nil
}

// aimOf returns where a directional antenna points for a path leaving it at
// azimuthDeg, nil for an antenna without a main beam in azimuth.
func aimOf(a Antenna, azimuthDeg float64) *float64 {
	if !a.Directional() {
		return nil
	}
	b := a.AimDeg(azimuthDeg)
	return &b
}

// PathLoss returns the propagation loss over g between antennas hFromM and
// hToM metres above the ground at g.From and g.To, at freqMHz. The
// model's warnings (Longley–Rice ITM) are added to g's.
func (e *Env) PathLoss(g *Geometry, hFromM, hToM, freqMHz float64) (propagation.Result, error) {
	r, err := e.model().Loss(g.path, e.lossParams(hFromM, hToM, freqMHz))
	g.modelWarn |= r.ITM.Warnings
	return r, err
}

// PathLosses is PathLoss at each of freqsMHz into out (of the same
// length), the same figures to the last bit, with one reading of the
// profile for all of them where the model allows
// (propagation.LossAtFrequencies): a repeater's input and output
// frequencies over one path.
func (e *Env) PathLosses(g *Geometry, hFromM, hToM float64, freqsMHz []float64, out []propagation.Result) error {
	err := propagation.LossAtFrequencies(e.model(), g.path, e.lossParams(hFromM, hToM, 0), freqsMHz, out)
	for _, r := range out {
		g.modelWarn |= r.ITM.Warnings
	}
	return err
}

// lossParams returns the model parameters of a path between antennas
// hFromM and hToM metres above the ground, at freqMHz, with the Env's
// k-factor, polarization and ground.
func (e *Env) lossParams(hFromM, hToM, freqMHz float64) propagation.Params {
	k := e.K
	if k == 0 {
		k = propagation.DefaultKFactor
	}
	return propagation.Params{
		FreqMHz:       freqMHz,
		TxHeightM:     hFromM,
		RxHeightM:     hToM,
		EarthRadiusKM: propagation.EffectiveEarthRadiusKM(k),
		Polarization:  e.Polarization,
		Ground:        e.Ground,
	}
}

// ParsePolarization returns the polarization named by s: "vertical" or
// "horizontal" (case and surrounding space ignored).
func ParsePolarization(s string) (propagation.Polarization, error) {
	for _, p := range []propagation.Polarization{propagation.Vertical, propagation.Horizontal} {
		if strings.EqualFold(strings.TrimSpace(s), p.String()) {
			return p, nil
		}
	}
	return 0, fmt.Errorf("%q is not vertical or horizontal", s)
}

// ParseGround returns the ground constants named by s: "land"
// (propagation.Land) or "sea" (propagation.Sea), the two of ITU-R P.1812-8
// §4.3.3 (case and surrounding space ignored).
func ParseGround(s string) (propagation.Ground, error) {
	switch strings.ToLower(strings.TrimSpace(s)) {
	case "land":
		return propagation.Land, nil
	case "sea":
		return propagation.Sea, nil
	}
	return propagation.Ground{}, fmt.Errorf("%q is not land or sea", s)
}
