package plan

import (
	"time"

	"github.com/mastlink/mastlink/plan/antenna"
	"github.com/mastlink/mastlink/plan/feedline"
	"github.com/mastlink/mastlink/plan/gpx"
	"github.com/mastlink/mastlink/plan/units"
	"github.com/mastlink/mastlink/propagation"
)

// The plan: a parsed plan file with every name resolved.

// Plan is a parsed, validated plan file with every name resolved.
type Plan struct {
	Path string // the plan file as given
	Name string
	Area string // where, in words (`area:`); "" when not given
	// Date is when the deployment is (`date:`), in Location when the plan
	// gives a time zone, else UTC; the zero time when not given. DateHasTime
	// is set when the plan gave a time of day as well as the day.
	Date        time.Time
	DateHasTime bool
	// Location is the plan's time zone (`timezone:`, an IANA name such as
	// "Europe/Oslo"); nil when not given.
	Location *time.Location
	// Briefing is where the printable briefing goes (`briefing:`, resolved
	// against the plan's folder); "" when the plan asks for none.
	Briefing     string
	BriefingAt   int // line of the briefing field, for errors about it
	FreqMHz      float64
	Terrain      []string  // DEM directories or files, resolved against the plan's folder
	TerrainAt    int       // line of the terrain field, for errors about missing tiles
	Waypoints    *gpx.File // nil when the plan names none
	Require      Requirement
	K            float64                  // effective earth-radius factor (units.ParseKFactor)
	Model        propagation.Model        // from propagation.ModelByName; propagation.Terrain unless the plan says
	Polarization propagation.Polarization // vertical unless the plan says
	Ground       propagation.Ground       // ground constants, propagation.Land unless the plan says
	Stations     []Station
	Targets      []Target
	Mast         *MastSweep
	Routes       []string // GPX files with tracks, resolved
	Sites        []string // GPX files with candidate waypoints, resolved
	Roads        []string // GPX files whose tracks and routes are roads a relay can be brought along, resolved
	Relays       []RelaySpec
	InputFiles   []string // every file the plan reads, for output guards

	// Defaults is the kit under `defaults:` (a handheld: 0 dBi at 1.5 m
	// unless the plan says otherwise; no radio unless it gives one), the
	// kit carried along routes. Its Name and Pos are empty.
	Defaults End
}

// MastSweep asks for the lowest mast and lightest cable that meet the
// requirement.
type MastSweep struct {
	Heights units.LengthRange
	Cables  []feedline.Cable // from the catalog, or described by the user
	RunM    float64          // cable from the mast foot to the radio, metres
	SlackM  float64          // extra cable for drip loops and the mast head, metres
	// Antennas are catalog antennas to try in place of the station's, in
	// the order of preference (the one you would rather carry first);
	// none keeps the station's own.
	Antennas []antenna.Antenna
	// KeepoutLimitM, when above 0, is the largest public RF-exposure
	// keep-out radius in metres the site allows (the clear space around
	// the mast foot); rows above it are marked and never recommended.
	KeepoutLimitM float64
}

// withType returns a with the catalog type t in place of its own (the
// catalog's gain; bearing, body loss and clutter kept), as AntennaOptions
// would set it.
func withType(a Antenna, t antenna.Antenna) Antenna {
	a.Type, a.GainDBi = &t, t.GainDBi
	if t.Handheld && a.BodyLoss == "" {
		a.BodyLossDB, a.BodyLoss = antenna.AtFace.BodyLossDB(), antenna.AtFace.String()+", typical"
	}
	return a
}

// RelaySpec is a relay the plan asks for (`relays:`): two parties who
// cannot hear each other, by name (a station, a target, a waypoint or
// LAT,LON), the relay's antenna heights to try, the search radius and the
// frequencies of the two links (0: the plan's frequency).
type RelaySpec struct {
	Between, And       string
	HeightsM           []float64 // none: the defaults' antenna height
	RadiusM            float64   // 0: the distance between the parties
	FreqAMHz, FreqBMHz float64
	Line               int // in the plan file, for errors
}
