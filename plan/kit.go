package plan

// The antenna as it stands: catalog type and pattern, aiming, the losses
// of an operator's body and of terminal clutter, and the angles a path
// leaves each end at.

import (
	"errors"
	"fmt"
	"math"
	"strconv"
	"strings"

	"github.com/mastlink/mastlink/plan/antenna"
	"github.com/mastlink/mastlink/plan/units"
	"github.com/mastlink/mastlink/propagation"
)

// AntennaOptions is an end's antenna as text, as a user writes it on the
// command line (--antenna, --bearing, --gain, --height, --body-loss,
// --clutter) or in a plan file (antenna: {type, bearing, gain, height},
// body_loss:, clutter:). An empty field leaves the Antenna it is applied to
// unchanged. This is the one parser and validator of these fields: the plan
// file and every command use it.
type AntennaOptions struct {
	Type     string // catalog name (antenna.Lookup)
	Bearing  string // degrees clockwise from true north, 0–360 ("deg" or "°" accepted)
	Gain     string // peak gain (units.ParseGainDBi); overrides the type's
	Height   string // above ground (units.ParseLengthM)
	BodyLoss string // face, belt or none (typical figures), or a loss in dB
	Clutter  string // a terminal clutter class (propagation.ParseClutterClass)
}

// Keys of AntennaOptions as a plan file spells them, for OptionError.
const (
	OptAntennaType = "type"
	OptBearing     = "bearing"
	OptGain        = "gain"
	OptHeight      = "height"
	OptBodyLoss    = "body_loss"
	OptClutter     = "clutter"
)

// Apply parses and checks o and sets the matching fields of dst. The type
// sets the peak gain from the catalog, and a given gain then overrides it.
// A handheld type (antenna.Antenna.Handheld) with no body loss given, here
// or before, takes the typical loss of a radio held at the face
// (antenna.BodyLossFaceDB, marked "face, typical"); any other type, or no
// type, has no body loss unless one is given. Every error is a
// *units.OptionError whose Option is one of the Opt… keys; dst is then
// left as it was.
func (o AntennaOptions) Apply(dst *Antenna) error {
	a := *dst
	fail := func(key string, err error) error { return &units.OptionError{Option: key, Err: err} }
	if o.Type != "" {
		t, err := antenna.Lookup(o.Type)
		if err != nil {
			return fail(OptAntennaType, err)
		}
		a.Type, a.GainDBi = &t, t.GainDBi
		switch {
		case t.Handheld && a.BodyLoss == "":
			a.BodyLossDB, a.BodyLoss = antenna.AtFace.BodyLossDB(), antenna.AtFace.String()+", typical"
		case !t.Handheld && strings.HasSuffix(a.BodyLoss, "typical") && o.BodyLoss == "":
			a.BodyLossDB, a.BodyLoss = 0, "" // the typical default of a handheld type replaced
		}
	}
	if o.Gain != "" {
		g, err := units.ParseGainDBi(o.Gain)
		if err != nil {
			return fail(OptGain, err)
		}
		a.GainDBi = g
	}
	if o.Height != "" {
		h, err := units.ParseLengthM(o.Height)
		if err != nil {
			return fail(OptHeight, err)
		}
		a.HeightM = h
	}
	if o.Bearing != "" {
		b, err := ParseBearingDeg(o.Bearing)
		if err != nil {
			return fail(OptBearing, err)
		}
		a.BearingDeg, a.Aimed = b, true
	}
	if o.BodyLoss != "" {
		if c, err := antenna.ParseCarry(o.BodyLoss); err == nil {
			a.BodyLossDB, a.BodyLoss = c.BodyLossDB(), c.String()+", typical"
			if c == antenna.NotCarried {
				a.BodyLoss = "none"
			}
		} else {
			l, lerr := units.ParseLossDB(o.BodyLoss)
			if lerr != nil {
				return fail(OptBodyLoss, fmt.Errorf("%q: give face, belt, none, or a loss such as 4dB", o.BodyLoss))
			}
			a.BodyLossDB, a.BodyLoss = l, "given"
		}
	}
	if o.Clutter != "" {
		c, err := propagation.ParseClutterClass(o.Clutter)
		if err != nil {
			return fail(OptClutter, err)
		}
		a.Clutter = c
	}
	*dst = a
	return nil
}

// ParseBearingDeg reads a bearing in degrees clockwise from true north,
// from 0 to 360 inclusive (360 is north): a number, optionally followed by
// "deg" or "°".
func ParseBearingDeg(s string) (float64, error) {
	t := strings.TrimSpace(s)
	t = strings.TrimSpace(strings.TrimSuffix(strings.TrimSuffix(strings.ToLower(t), "deg"), "°"))
	v, err := strconv.ParseFloat(t, 64)
	if err != nil || !(v >= 0 && v <= 360) {
		return 0, fmt.Errorf("%q is not a bearing: give degrees clockwise from true north, 0 to 360", s)
	}
	return math.Mod(v, 360), nil
}

// Name returns the antenna's catalog name, or "" without a type.
func (a Antenna) Name() string {
	if a.Type == nil {
		return ""
	}
	return a.Type.Name
}

// Directional reports whether the antenna has a catalog type with a main
// beam in azimuth.
func (a Antenna) Directional() bool { return a.Type != nil && a.Type.Directional() }

// AimDeg returns the bearing the antenna points at for a path leaving it
// at azimuthDeg (degrees true): BearingDeg when aimed, else the path's
// own azimuth (a directional antenna with no bearing faces the far end).
func (a Antenna) AimDeg(azimuthDeg float64) float64 {
	if a.Aimed {
		return a.BearingDeg
	}
	return azimuthDeg
}

// GainTowardDBi returns the antenna's gain in dBi toward a path leaving it
// at azimuthDeg (degrees clockwise from true north) and elevationDeg
// (degrees above the horizontal): GainDBi plus the catalog type's pattern
// relative to its peak (antenna.Antenna.RelativeDB: a cosⁿ main lobe per
// principal plane with a front-to-back floor), aimed at AimDeg; GainDBi
// without a type.
func (a Antenna) GainTowardDBi(azimuthDeg, elevationDeg float64) float64 {
	if a.Type == nil {
		return a.GainDBi
	}
	return a.GainDBi + a.Type.RelativeDB(antenna.AzimuthOffsetDeg(azimuthDeg, a.AimDeg(azimuthDeg)), elevationDeg)
}

// ClutterLossDB returns the terminal clutter loss in dB at freqMHz for the
// antenna's clutter class and height: ITU-R P.2108-1 (09/2021) §3.1, the
// class's representative clutter height (Table 3) and the default street
// width (propagation.TerminalClutterLoss); 0 without clutter or with the
// antenna at or above the clutter.
//
// The path loss it adds to is computed with the antenna at its real height
// over the bare-earth profile, not raised to the representative clutter
// height as P.2108-1 §3.1 describes: raising a handheld to the top of a
// forest would credit it with clearance over the terrain it does not have.
// Part of the clutter is then counted twice, which errs on the side of
// caution.
func (a Antenna) ClutterLossDB(freqMHz float64) (float64, error) {
	if a.Clutter == propagation.NoClutter {
		return 0, nil
	}
	l, err := propagation.TerminalClutterLoss(a.Clutter, freqMHz, a.HeightM)
	if err != nil {
		return 0, fmt.Errorf("clutter %s: %w", a.Clutter, err)
	}
	return l, nil
}

// notes returns what a report should say about the antenna at freqMHz: a
// catalog type whose band does not cover the frequency, and a directional
// antenna with no bearing, which is taken as aimed at the far end.
func (a Antenna) notes(who string, freqMHz float64) []string {
	if a.Type == nil {
		return nil
	}
	var out []string
	if !a.Type.Covers(freqMHz) {
		out = append(out, fmt.Sprintf("%s: the %s (%s, %g–%g MHz) is not made for %s; its catalog figures may not hold",
			who, a.Type.Name, a.Type.Band, a.Type.MinMHz, a.Type.MaxMHz, units.FormatFreq(freqMHz)))
	}
	if a.Type.Directional() && !a.Aimed {
		out = append(out, fmt.Sprintf("%s: the %s has no bearing; taken as aimed at the far end", who, a.Type.Name))
	}
	return out
}

// endLosses are the losses of an end's surroundings at one frequency.
type endLosses struct {
	bodyDB, clutterDB float64
}

func (e End) losses(freqMHz float64) (endLosses, error) {
	c, err := e.Antenna.ClutterLossDB(freqMHz)
	if err != nil {
		return endLosses{}, fmt.Errorf("%s: %w", e.Name, err)
	}
	return endLosses{bodyDB: e.Antenna.BodyLossDB, clutterDB: c}, nil
}

// errNoPath is returned by pathElevationsDeg for a profile without two points.
var errNoPath = errors.New("a path needs two points")

// pathElevationsDeg returns the elevation angles in degrees above the
// horizontal at which a path leaves its two ends, antennas hFromM and hToM
// above the ground at the first and last profile point, over an earth of
// effective radius aeKM: at each end the larger of the angle to the other
// antenna and the angle to the highest horizon of the profile, with the
// curvature term −d/(2·a_e), as the horizon elevation angles θ_t and θ_r of
// ITU-R P.452-17 Annex 1, Attachment 2, §5.1.1 (eqs. 150–153 there, from
// memory of the numbering). Intermediate points include the profile's
// clutter where it has one.
func pathElevationsDeg(p propagation.Path, hFromM, hToM, aeKM float64) (fromDeg, toDeg float64, err error) {
	n := len(p.DistKM)
	if n < 2 {
		return 0, 0, errNoPath
	}
	d := p.DistKM[n-1] - p.DistKM[0]
	if !(d > 0) {
		return 0, 0, nil
	}
	hts := p.HeightM[0] + hFromM
	hrs := p.HeightM[n-1] + hToM
	// Angles in radians: (Δh/1000)/d − d/(2 a_e), d in km, heights in m.
	thT := (hrs-hts)/(1000*d) - d/(2*aeKM)
	thR := (hts-hrs)/(1000*d) - d/(2*aeKM)
	for i := 1; i < n-1; i++ {
		h := p.HeightM[i]
		if p.ClutterM != nil {
			h += p.ClutterM[i]
		}
		di := p.DistKM[i] - p.DistKM[0]
		dj := d - di
		if di > 0 {
			thT = math.Max(thT, (h-hts)/(1000*di)-di/(2*aeKM))
		}
		if dj > 0 {
			thR = math.Max(thR, (h-hrs)/(1000*dj)-dj/(2*aeKM))
		}
	}
	return thT * 180 / math.Pi, thR * 180 / math.Pi, nil
}

// patterned reports whether either antenna's gain depends on the path.
func patterned(a, b Antenna) bool { return a.Type != nil || b.Type != nil }

// towardPath is the direction a path leaves each end of g.
type towardPath struct {
	fromAzDeg, toAzDeg float64 // azimuths from g.From and from g.To, degrees true
	fromElDeg, toElDeg float64 // elevation angles there, degrees
}

// toward returns the directions the path of g leaves its ends, antennas
// hFromM and hToM above the ground.
func (e *Env) toward(g *Geometry, hFromM, hToM float64) (towardPath, error) {
	k := e.K
	if k == 0 {
		k = propagation.DefaultKFactor
	}
	t := towardPath{fromAzDeg: g.Profile.AzimuthDeg, toAzDeg: g.Profile.BackAzimuthDeg}
	var err error
	t.fromElDeg, t.toElDeg, err = pathElevationsDeg(g.path, hFromM, hToM, propagation.EffectiveEarthRadiusKM(k))
	return t, err
}
