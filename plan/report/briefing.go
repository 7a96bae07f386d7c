package report

import (
	"bytes"
	"encoding/base64"
	"errors"
	"fmt"
	"html"
	"image/png"
	"io"
	"math"
	"strconv"
	"strings"
	"time"

	"github.com/mastlink/mastlink/plan/units"
)

// ErrBriefingData is wrapped by every error about the data given to
// Briefing.
var ErrBriefingData = errors.New("briefing data")

const (
	metresPerFoot = units.MetresPerFoot
	metresPerMile = units.MetresPerMile
)

// BriefingData is everything the printable deployment briefing shows, as
// plain values the planner fills from its results. Lengths are metres,
// frequencies MHz, levels dB, dBm, dBi and W, fractions 0–1; the page
// converts lengths to feet and miles when Imperial is set. Fields marked
// required must be given; optional sections are left out when empty.
type BriefingData struct {
	// Title is the plan's name (required), the page's heading.
	Title string
	// Date is when the deployment (or the briefing) is (required, not the
	// zero time). It is shown in Location.
	Date time.Time
	// Location is the plan's time zone; nil shows Date in its own zone.
	Location *time.Location
	// DateOnly shows Date as a day, without the time of day (for a plan
	// that gives only the day).
	DateOnly bool
	// Area says where, in words (e.g. "Harrow Fell, north of Tarnby").
	Area string
	// Imperial shows lengths in feet and miles instead of metres and km.
	Imperial bool
	// Requirement is what every required link must keep.
	Requirement BriefingRequirement
	// Map is the plan's map; nil leaves the map out.
	Map *BriefingMap
	// Stations are the stations with every target both ways (required:
	// at least one, each with a name).
	Stations []BriefingStation
	// Mast is the mast-and-cable sweep; nil when the plan asks for none.
	Mast *BriefingMast
	// Profiles are the terrain profiles of the links that are short or
	// blocked; each is drawn with its first Fresnel zone at Inputs.K.
	Profiles []BriefingProfile
	// Routes are the tracks checked for coverage.
	Routes []BriefingRoute
	// Exposure is the RF-exposure keep-out of each transmitting station.
	Exposure []BriefingKeepout
	// Cautions are the safety notes set apart in a box (required: at least
	// one; give the exposure package's cautions and any the plan adds).
	Cautions []string
	// Inputs are what the sheet was computed from, to reproduce it.
	Inputs BriefingInputs
}

// BriefingRequirement is the margin every required link must keep.
type BriefingRequirement struct {
	// MarginDB is the fade margin required, dB.
	MarginDB float64
	// ReliabilityPct is the location/time reliability asked for, per cent
	// (0 when not asked).
	ReliabilityPct float64
	// Note is an optional sentence in plain words.
	Note string
}

// BriefingMap is the plan's map as a PNG image, embedded in the page.
type BriefingMap struct {
	// PNG is the image file's bytes (required when the map is given).
	PNG []byte
	// Alt says what the map shows, for readers who cannot see it
	// (required when the map is given).
	Alt string
	// Caption is printed under the map (its legend in words, scale, date
	// of the terrain).
	Caption string
}

// BriefingStation is one station and its links to every target.
type BriefingStation struct {
	// Name is the station's name (required).
	Name string
	// Site says where it goes: a waypoint name or "lat, lon".
	Site string
	// Links are every target in both directions, in the order to print.
	Links []BriefingLink
}

// BriefingLink is one direction of the link between a station and a
// target.
type BriefingLink struct {
	// Target is the far end's name (required).
	Target string
	// StationTransmits is true when the station transmits and the target
	// receives (talk-in to a repeater, or "out" to a simplex target).
	StationTransmits bool
	// Direction is the trade word for it, e.g. "talk-in", "talk-out",
	// "out", "back" (optional, shown in brackets).
	Direction string
	// FreqMHz is the frequency on the air, MHz.
	FreqMHz float64
	// DistanceM is the path length, metres.
	DistanceM float64
	// MarginDB is the fade margin, dB (received level above sensitivity).
	MarginDB float64
	// Meets is true when the link meets the requirement.
	Meets bool
	// Optional marks a target the requirement does not cover.
	Optional bool
}

// BriefingMast is a mast-and-cable sweep for one station.
type BriefingMast struct {
	// Station is the station swept (required).
	Station string
	// RunM is the cable run from the mast foot to the radio, metres.
	RunM float64
	// Rows are the heights and cables tried (required: at least one).
	Rows []BriefingMastRow
	// RecommendedHeightM and RecommendedCable are the choice: the lowest
	// mast, then the lightest cable, that meets the requirement.
	// RecommendedCable is "" when nothing does.
	RecommendedHeightM float64
	RecommendedCable   string
	// RecommendedCableLengthM is the length of cable to bring, metres.
	RecommendedCableLengthM float64
	// Note is an optional sentence in plain words.
	Note string
}

// BriefingMastRow is one mast height and cable of a sweep.
type BriefingMastRow struct {
	HeightM       float64 // antenna height above ground, metres
	Cable         string  // the cable's name
	WorstMarginDB float64 // worst margin over the required links, dB
	Meets         bool    // meets the requirement
}

// BriefingProfile is the terrain along one link, drawn with the
// masts, the line of sight and the first Fresnel zone.
type BriefingProfile struct {
	// Title names the link, e.g. "Command post to Corvane relay".
	Title string
	// DistM and ElevM are the profile: distances along the path in metres
	// (non-decreasing) and ground heights in metres above sea level.
	DistM, ElevM []float64
	// FromHeightM and ToHeightM are the antenna heights above ground at
	// the two ends, metres.
	FromHeightM, ToHeightM float64
	// FreqMHz is the link's frequency, MHz.
	FreqMHz float64
	// Note says what to read on it, e.g. "blocked by the ridge at 3.2 km;
	// margin −6 dB".
	Note string
}

// BriefingRoute is the coverage along one track.
type BriefingRoute struct {
	// Name is the track's name (required).
	Name string
	// Walker is the kit carried, in words.
	Walker string
	// LengthM is the track's length, metres.
	LengthM float64
	// CoveredFraction is the fraction of the length where every required
	// target is reached, 0–1.
	CoveredFraction float64
	// Gaps are the dead stretches.
	Gaps []BriefingGap
	// CallSpots are the places to stop and call before or after a gap.
	CallSpots []BriefingCallSpot
}

// BriefingGap is a dead stretch along a route.
type BriefingGap struct {
	StartM, EndM  float64  // along the track, metres
	WorstMarginDB float64  // lowest margin inside, dB
	Missing       []string // targets out of reach somewhere in it
}

// BriefingCallSpot is a place near a gap where a target is reached best.
type BriefingCallSpot struct {
	Target    string  // the target reached
	Side      string  // "before" or "after" the gap
	DistanceM float64 // along the track, metres
	Lat, Lon  float64 // degrees (WGS84)
	MarginDB  float64 // to the target, the lower of both directions, dB
}

// BriefingKeepout is the RF-exposure keep-out around one station's mast
// and the averaging assumptions behind it.
type BriefingKeepout struct {
	// Station is the station's name (required).
	Station string
	// FreqMHz is the frequency evaluated, MHz.
	FreqMHz float64
	// EIRPW is the peak EIRP, W.
	EIRPW float64
	// Mode is the emission mode (e.g. "FM", "SSB voice").
	Mode string
	// DutyFactor is the mode's duty factor, 0–1.
	DutyFactor float64
	// TxFraction is the worst-case fraction of the averaging window on the
	// air, 0–1.
	TxFraction float64
	// AveragingPublicS and AveragingOccupationalS are the averaging
	// windows of the two tiers, seconds.
	AveragingPublicS, AveragingOccupationalS float64
	// Standard names the limits (e.g. "FCC 47 CFR § 1.1310").
	Standard string
	// AntennaHeightM and HeadHeightM are the heights used, metres.
	AntennaHeightM, HeadHeightM float64
	// KeepoutPublicM and KeepoutOccupationalM are the keep-out radii
	// around the mast foot, metres (≥ 0); printed rounded up.
	KeepoutPublicM, KeepoutOccupationalM float64
}

// BriefingInputs are what the sheet was computed from.
type BriefingInputs struct {
	// PlanFile is the plan file's name.
	PlanFile string
	// Model names the propagation model (e.g. "terrain: ITU-R P.526-16
	// delta-Bullington").
	Model string
	// K is the effective earth-radius factor (required, 0.1–100).
	K float64
	// TerrainFiles are the elevation files used; none means a smooth earth.
	TerrainFiles []string
	// Kit is each station's equipment.
	Kit []BriefingKit
	// Notes are further lines (program version, warnings).
	Notes []string
}

// BriefingKit is one station's equipment.
type BriefingKit struct {
	Station        string  // the station's name
	PowerW         float64 // transmitter output, W
	SensitivityDBm float64 // receiver sensitivity, dBm
	Antenna        string  // the antenna's name ("" when given by gain only)
	GainDBi        float64 // antenna gain, dBi
	HeightM        float64 // antenna height above ground, metres
	Cable          string  // feedline cable name
	CableLengthM   float64 // feedline length, metres
	Connectors     int     // connectors in the feedline
	SWR            float64 // standing-wave ratio at the antenna (0: matched)
}

// Briefing writes the deployment briefing to w as one self-contained HTML5
// page: inline CSS, the map embedded as a data: URI, the charts as inline
// SVG, no scripts and no reference to any other file or the network. It
// prints on A4 and US Letter (page margins fit both; sections start on new
// pages where a briefing turns over; rows, tables and figures are not cut),
// black on white with the map in colour. Sections in the order a briefing
// runs: title, date and area; the requirement; the map; a table per
// station of every target both ways; the mast and cable choice with the
// sweep chart; the profiles (ProfileSVG with WithFrequency, so with the
// first Fresnel zone per ITU-R P.526-16 eq. 2); routes' dead stretches and
// call spots; the exposure keep-out with its averaging assumptions; the
// cautions, boxed; the inputs. Keep-out distances are rounded up. Every
// string is escaped for HTML. The same data give the same bytes.
//
// Missing required fields or bad values give an error wrapping
// ErrBriefingData naming the field, and nothing is written; write errors
// from w are returned as they are.
func Briefing(w io.Writer, b BriefingData) error {
	if err := b.check(); err != nil {
		return err
	}
	var p page
	p.d = &b
	if err := p.render(); err != nil {
		return err
	}
	_, err := w.Write(p.buf.Bytes())
	return err
}

// check reports the first missing or bad field.
func (b *BriefingData) check() error {
	bad := func(format string, a ...any) error {
		return fmt.Errorf("%w: "+format, append([]any{ErrBriefingData}, a...)...)
	}
	if strings.TrimSpace(b.Title) == "" {
		return bad("Title is empty; give the plan's name")
	}
	if b.Date.IsZero() {
		return bad("Date is not set; give the deployment's date")
	}
	if len(b.Stations) == 0 {
		return bad("Stations is empty; give at least one station")
	}
	if len(b.Cautions) == 0 {
		return bad("Cautions is empty; give the safety cautions (exposure estimate, power lines, guying, weather, local rules)")
	}
	if !(b.Inputs.K >= 0.1 && b.Inputs.K <= 100) {
		return bad("Inputs.K is %v; give the effective earth-radius factor used (0.1 to 100, usually 4/3)", b.Inputs.K)
	}
	if !finite(b.Requirement.MarginDB) || !finite(b.Requirement.ReliabilityPct) {
		return bad("Requirement has a value that is not a finite number")
	}
	for i, s := range b.Stations {
		if strings.TrimSpace(s.Name) == "" {
			return bad("Stations[%d].Name is empty", i)
		}
		for j, l := range s.Links {
			if strings.TrimSpace(l.Target) == "" {
				return bad("Stations[%d] (%s).Links[%d].Target is empty", i, s.Name, j)
			}
			if !finite(l.FreqMHz) || !finite(l.DistanceM) || !finite(l.MarginDB) {
				return bad("Stations[%d] (%s).Links[%d] (%s) has a value that is not a finite number", i, s.Name, j, l.Target)
			}
		}
	}
	if m := b.Map; m != nil {
		if len(m.PNG) == 0 {
			return bad("Map.PNG is empty; give the map image or leave Map nil")
		}
		if _, err := png.DecodeConfig(bytes.NewReader(m.PNG)); err != nil {
			return bad("Map.PNG is not a PNG image: %v", err)
		}
		if strings.TrimSpace(m.Alt) == "" {
			return bad("Map.Alt is empty; say in words what the map shows")
		}
	}
	if m := b.Mast; m != nil {
		if strings.TrimSpace(m.Station) == "" {
			return bad("Mast.Station is empty")
		}
		if len(m.Rows) == 0 {
			return bad("Mast.Rows is empty; give the sweep's rows or leave Mast nil")
		}
		for i, r := range m.Rows {
			if !finite(r.HeightM) || !finite(r.WorstMarginDB) || r.HeightM < 0 {
				return bad("Mast.Rows[%d] has a height or margin that is not a finite number (or a negative height)", i)
			}
		}
	}
	for i, r := range b.Routes {
		if strings.TrimSpace(r.Name) == "" {
			return bad("Routes[%d].Name is empty", i)
		}
	}
	for i, e := range b.Exposure {
		if strings.TrimSpace(e.Station) == "" {
			return bad("Exposure[%d].Station is empty", i)
		}
		if !(e.KeepoutPublicM >= 0) || !(e.KeepoutOccupationalM >= 0) || math.IsInf(e.KeepoutPublicM, 0) || math.IsInf(e.KeepoutOccupationalM, 0) {
			return bad("Exposure[%d] (%s): keep-out radii must be finite and 0 m or more", i, e.Station)
		}
	}
	return nil
}

// page builds the HTML.
type page struct {
	d   *BriefingData
	buf bytes.Buffer
}

func (p *page) w(s string)                 { p.buf.WriteString(s) }
func (p *page) f(format string, a ...any)  { fmt.Fprintf(&p.buf, format, a...) }
func (p *page) el(tag, attrs, text string) { p.f("<%s%s>%s</%s>\n", tag, attrs, h(text), tag) }
func (p *page) cell(tag, class, text string) {
	p.f("<%s%s>%s</%s>", tag, classAttr(class), h(text), tag)
}
func (p *page) rowHead(text string) { p.f(`<th scope="row">%s</th>`, h(text)) }

// h escapes text for HTML content and attribute values.
func h(s string) string { return html.EscapeString(s) }

// classAttr is a class attribute, or nothing for no class.
func classAttr(c string) string {
	if c == "" {
		return ""
	}
	return ` class="` + c + `"`
}

func (p *page) colHeads(class string, cols ...string) {
	p.w("<thead><tr>")
	for _, c := range cols {
		p.f(`<th scope="col"%s>%s</th>`, classAttr(class), h(c))
	}
	p.w("</tr></thead>\n")
}

// render writes the whole page into p.buf.
func (p *page) render() error {
	d := p.d
	p.w("<!DOCTYPE html>\n<html lang=\"en\">\n<head>\n<meta charset=\"utf-8\">\n")
	p.w(`<meta name="viewport" content="width=device-width, initial-scale=1">` + "\n")
	p.el("title", "", "Briefing: "+d.Title)
	p.w("<style>\n" + briefingCSS + "</style>\n</head>\n<body>\n")

	// Title, date and area.
	p.w("<header class=\"masthead\">\n")
	p.el("p", ` class="kicker"`, "Deployment briefing")
	p.el("h1", "", d.Title)
	t := d.Date
	if d.Location != nil {
		t = t.In(d.Location)
	}
	if d.DateOnly {
		p.f(`<p class="when"><time datetime="%s">%s</time>`, h(t.Format(time.DateOnly)), h(t.Format("Monday 2 January 2006")))
	} else {
		p.f(`<p class="when"><time datetime="%s">%s</time>`, h(t.Format(time.RFC3339)), h(t.Format("Monday 2 January 2006, 15:04")+" "+zoneLabel(t)))
	}
	if d.Area != "" {
		p.f(`<span class="sep" aria-hidden="true"> · </span><span class="area">%s</span>`, h(d.Area))
	}
	p.w("</p>\n")
	p.w(`<p class="see-cautions">Safety: read the <a href="#cautions">cautions</a> before anyone puts up a mast or transmits.</p>` + "\n")
	p.w("</header>\n<main>\n")

	p.requirement()
	if err := p.mapSection(); err != nil {
		return err
	}
	p.links()
	p.mast()
	if err := p.profiles(); err != nil {
		return err
	}
	p.routes()
	p.exposure()
	p.cautions()
	p.inputs()
	p.w("</main>\n")
	p.f("<footer><p>Made with mastlink from %s. Check the figures on site; conditions change.</p></footer>\n", h(orDefault(d.Inputs.PlanFile, "the plan")))
	p.w("</body>\n</html>\n")
	return nil
}

// zoneLabel names t's time zone by its abbreviation (CEST, MDT), or as
// UTC−08 where the zone has none but its offset (the IANA Etc zones).
func zoneLabel(t time.Time) string {
	abbr := t.Format("MST")
	if strings.HasPrefix(abbr, "+") || strings.HasPrefix(abbr, "-") {
		return "UTC" + minus(abbr)
	}
	return abbr
}

func orDefault(s, def string) string {
	if strings.TrimSpace(s) == "" {
		return def
	}
	return s
}

func (p *page) section(id, class, heading string) {
	p.f(`<section id="%s"%s aria-labelledby="%s-h">`+"\n", id, classAttr(class), id)
	p.f(`<h2 id="%s-h">%s</h2>`+"\n", id, h(heading))
}

func (p *page) requirement() {
	d := p.d
	p.section("requirement", "", "Requirement")
	req := "Every required link must keep at least " + fmt1(d.Requirement.MarginDB) + " dB of fade margin"
	if d.Requirement.ReliabilityPct > 0 {
		req += " (" + trimFloat(d.Requirement.ReliabilityPct, 1) + " % of locations and times)"
	}
	p.el("p", "", req+".")
	if d.Requirement.Note != "" {
		p.el("p", "", d.Requirement.Note)
	}
	total, meets, dead := 0, 0, 0
	for _, s := range d.Stations {
		for _, l := range s.Links {
			if l.Optional {
				continue
			}
			total++
			if l.Meets {
				meets++
			} else if l.MarginDB < 0 {
				dead++
			}
		}
	}
	if total > 0 {
		sum := fmt.Sprintf("%d of %d required link directions meet it", meets, total)
		switch {
		case meets == total:
			sum += "."
		case dead > 0:
			sum += fmt.Sprintf("; %d fall short and %d of those are not expected to work at all.", total-meets, dead)
		default:
			sum += fmt.Sprintf("; %d fall short.", total-meets)
		}
		cls := ` class="summary ok"`
		if meets < total {
			cls = ` class="summary short"`
		}
		p.el("p", cls, sum)
	}
	p.w("</section>\n")
}

func (p *page) mapSection() error {
	m := p.d.Map
	if m == nil {
		return nil
	}
	cfg, err := png.DecodeConfig(bytes.NewReader(m.PNG))
	if err != nil {
		return fmt.Errorf("%w: Map.PNG: %v", ErrBriefingData, err)
	}
	p.section("map", "", "Map")
	p.f(`<figure class="map"><img src="data:image/png;base64,%s" width="%d" height="%d" alt="%s">`,
		base64.StdEncoding.EncodeToString(m.PNG), cfg.Width, cfg.Height, h(m.Alt))
	if m.Caption != "" {
		p.f("<figcaption>%s</figcaption>", h(m.Caption))
	}
	p.w("</figure>\n</section>\n")
	return nil
}

// verdict is a link's outcome in plain words and its class.
func verdict(l BriefingLink) (string, string) {
	switch {
	case l.Meets:
		return "works", "ok"
	case l.MarginDB >= 0:
		return "unreliable", "weak"
	default:
		return "will not work", "fail"
	}
}

func (p *page) links() {
	d := p.d
	p.w(`<section id="links" aria-labelledby="links-h">` + "\n")
	// The heading stays on the page of the first station's table.
	p.w(`<div class="keep">` + "\n")
	p.w(`<h2 id="links-h">Who hears whom</h2>` + "\n")
	p.el("p", ` class="lead"`, "Each station against every target, both ways. Margin is how far the received signal stays above the receiver's sensitivity; the requirement is "+fmt1(d.Requirement.MarginDB)+" dB.")
	for i, s := range d.Stations {
		p.w(`<div class="station">` + "\n")
		head := s.Name
		p.f(`<h3 id="station-%d">%s`, i+1, h(head))
		if s.Site != "" {
			p.f(` <span class="site">at %s</span>`, h(s.Site))
		}
		p.w("</h3>\n")
		if len(s.Links) == 0 {
			p.el("p", "", "No targets for this station.")
			p.w("</div>\n")
			if i == 0 {
				p.w("</div>\n")
			}
			continue
		}
		p.w("<table class=\"links\">\n")
		p.f("<caption>Links of %s, both ways</caption>\n", h(s.Name))
		p.colHeads("", "Target", "Way", "Frequency (MHz)", "Distance ("+p.distUnit()+")", "Margin (dB)", "Verdict")
		p.w("<tbody>\n")
		for _, l := range s.Links {
			p.w("<tr>")
			tg := l.Target
			if l.Optional {
				tg += " (optional)"
			}
			p.rowHead(tg)
			way := "we receive"
			if l.StationTransmits {
				way = "we transmit"
			}
			if l.Direction != "" {
				way += " (" + l.Direction + ")"
			}
			p.cell("td", "way", way)
			p.cell("td", "num", freq(l.FreqMHz))
			p.cell("td", "num", p.dist(l.DistanceM))
			p.cell("td", "num", minus(fmt1(l.MarginDB)))
			v, cls := verdict(l)
			p.cell("td", "verdict "+cls, v)
			p.w("</tr>\n")
		}
		p.w("</tbody>\n</table>\n</div>\n")
		if i == 0 {
			p.w("</div>\n")
		}
	}
	p.w("</section>\n")
}

func (p *page) mast() {
	m := p.d.Mast
	if m == nil {
		return
	}
	p.section("mast", "", "Mast and cable")
	if m.RecommendedCable != "" {
		s := fmt.Sprintf("At %s: put the antenna %s up on the mast and feed it with %s", m.Station, p.height(m.RecommendedHeightM), m.RecommendedCable)
		if m.RecommendedCableLengthM > 0 {
			s += " (bring " + p.height(m.RecommendedCableLengthM) + " of it"
			if m.RunM > 0 {
				s += ", with a " + p.height(m.RunM) + " run from the mast foot to the radio"
			}
			s += ")"
		}
		p.f(`<p class="choice"><strong>Recommended.</strong> %s: the lowest mast, then the lightest cable, that meets the requirement.</p>`+"\n", h(s))
	} else {
		best := m.Rows[0]
		for _, r := range m.Rows {
			if r.WorstMarginDB > best.WorstMarginDB {
				best = r
			}
		}
		p.f(`<p class="choice short"><strong>No mast and cable tried meets the requirement.</strong> %s</p>`+"\n",
			h(fmt.Sprintf("At %s the best is %s with %s, worst margin %s dB.", m.Station, p.height(best.HeightM), best.Cable, minus(fmt1(best.WorstMarginDB)))))
	}
	if m.Note != "" {
		p.el("p", "", m.Note)
	}
	p.w(`<figure class="sweep">` + "\n")
	p.w(sweepSVG(m, p.d.Requirement.MarginDB, p.d.Imperial))
	p.f("<figcaption>Worst margin over the required links against mast height, one line per cable; the dashed line is the required %s dB.</figcaption>\n</figure>\n", h(minus(fmt1(p.d.Requirement.MarginDB))))
	p.w("</section>\n")
}

func (p *page) profiles() error {
	d := p.d
	if len(d.Profiles) == 0 {
		return nil
	}
	p.f(`<section id="profiles" aria-labelledby="profiles-h">` + "\n")
	// The heading and the first chart stay on one page.
	p.w(`<div class="keep">` + "\n")
	p.w(`<h2 id="profiles-h">Terrain profiles of the weak links</h2>` + "\n")
	p.el("p", ` class="lead"`, "Ground along each path with the masts, the line of sight and the first Fresnel zone over an earth of k = "+kLabel(d.Inputs.K)+". Keep at least 0.6 of the zone clear of the ground.")
	for i, pr := range d.Profiles {
		opts := []ProfileOption{WithTitle(pr.Title), WithAntennas(pr.FromHeightM, pr.ToHeightM),
			WithEarthBulge(d.Inputs.K), WithFrequency(pr.FreqMHz), WithSize(800, 300)}
		if d.Imperial {
			opts = append(opts, WithImperial())
		}
		var svg bytes.Buffer
		if err := ProfileSVG(&svg, pr.DistM, pr.ElevM, opts...); err != nil {
			return fmt.Errorf("Profiles[%d] (%s): %w", i, pr.Title, wrapChart(err))
		}
		p.w(`<figure class="profile">` + "\n")
		p.w(inlineSVG(svg.String(), fmt.Sprintf("p%d-", i+1), "Terrain profile: "+pr.Title))
		if pr.Note != "" {
			p.f("<figcaption>%s</figcaption>\n", h(pr.Note))
		}
		p.w("</figure>\n")
		if i == 0 {
			p.w("</div>\n")
		}
	}
	p.w("</section>\n")
	return nil
}

// wrapChart makes a chart error a briefing data error too.
func wrapChart(err error) error {
	if errors.Is(err, ErrChartData) {
		return fmt.Errorf("%w: %w", ErrBriefingData, err)
	}
	return err
}

// inlineSVG makes a standalone SVG document fit inside HTML: no XML
// declaration, ids made unique with prefix, an image role with a label,
// and a size set by CSS.
func inlineSVG(svg, prefix, label string) string {
	svg = strings.TrimPrefix(svg, `<?xml version="1.0" encoding="UTF-8"?>`+"\n")
	svg = strings.ReplaceAll(svg, ` id="`, ` id="`+prefix)
	return strings.Replace(svg, "<svg ", `<svg class="chart" role="img" aria-label="`+h(label)+`" `, 1)
}

func (p *page) routes() {
	d := p.d
	if len(d.Routes) == 0 {
		return
	}
	p.section("routes", "", "Routes: dead stretches and call spots")
	for i, r := range d.Routes {
		p.w(`<div class="route">` + "\n")
		p.f(`<h3 id="route-%d">%s</h3>`+"\n", i+1, h(r.Name))
		s := fmt.Sprintf("%s long; every required target is reached along %s %% of it", p.dist(r.LengthM)+" "+p.distUnit(), trimFloat(100*r.CoveredFraction, 0))
		if r.Walker != "" {
			s += ", carrying " + r.Walker
		}
		p.el("p", "", s+".")
		if len(r.Gaps) == 0 {
			p.el("p", "", "No dead stretches.")
		} else {
			p.w("<table class=\"gaps\">\n")
			p.f("<caption>Dead stretches on %s</caption>\n", h(r.Name))
			p.colHeads("", "From ("+p.distUnit()+")", "To ("+p.distUnit()+")", "Length ("+p.distUnit()+")", "Out of reach", "Worst margin (dB)")
			p.w("<tbody>\n")
			for _, g := range r.Gaps {
				p.w("<tr>")
				p.rowHead(p.dist(g.StartM))
				p.cell("td", "num", p.dist(g.EndM))
				p.cell("td", "num", p.dist(g.EndM-g.StartM))
				p.cell("td", "", strings.Join(g.Missing, ", "))
				p.cell("td", "num", minus(fmt1(g.WorstMarginDB)))
				p.w("</tr>\n")
			}
			p.w("</tbody>\n</table>\n")
		}
		if len(r.CallSpots) > 0 {
			p.w("<table class=\"spots\">\n")
			p.f("<caption>Where to stop and call on %s</caption>\n", h(r.Name))
			p.colHeads("", "At ("+p.distUnit()+")", "Call", "Where", "Position", "Margin (dB)")
			p.w("<tbody>\n")
			for _, c := range r.CallSpots {
				p.w("<tr>")
				p.rowHead(p.dist(c.DistanceM))
				p.cell("td", "", c.Target)
				where := "before the dead stretch"
				if c.Side == "after" {
					where = "after the dead stretch"
				}
				p.cell("td", "", where)
				p.cell("td", "num", latLon(c.Lat, c.Lon))
				p.cell("td", "num", minus(fmt1(c.MarginDB)))
				p.w("</tr>\n")
			}
			p.w("</tbody>\n</table>\n")
		}
		p.w("</div>\n")
	}
	p.w("</section>\n")
}

func (p *page) exposure() {
	d := p.d
	if len(d.Exposure) == 0 {
		return
	}
	p.section("exposure", "", "RF exposure keep-out")
	p.el("p", ` class="lead"`, "Keep everyone farther than this from the foot of each mast while it transmits. Distances are rounded up.")
	p.w("<table class=\"keepout\">\n<caption>Keep-out radius around each mast</caption>\n")
	p.colHeads("", "Station", "Frequency (MHz)", "EIRP (W)", "Public ("+p.heightUnit()+")", "Workers ("+p.heightUnit()+")", "Assumed")
	p.w("<tbody>\n")
	for _, e := range d.Exposure {
		p.w("<tr>")
		p.rowHead(e.Station)
		p.cell("td", "num", freq(e.FreqMHz))
		p.cell("td", "num", trimFloat(e.EIRPW, 1))
		p.cell("td", "num keep", p.keepout(e.KeepoutPublicM))
		p.cell("td", "num keep", p.keepout(e.KeepoutOccupationalM))
		p.cell("td", "assume", p.assumptions(e))
		p.w("</tr>\n")
	}
	p.w("</tbody>\n</table>\n")
	p.el("p", ` class="small"`, "Public: anyone, unaware of the transmitter. Workers: people trained and aware of it (occupational limits). A keep-out of 0 means the antenna is high enough that no standing person's head comes within the compliance distance.")
	p.w("</section>\n")
}

// assumptions writes the averaging assumptions of a keep-out.
func (p *page) assumptions(e BriefingKeepout) string {
	var parts []string
	if e.Mode != "" {
		parts = append(parts, e.Mode)
	}
	parts = append(parts, "duty factor "+pct(e.DutyFactor))
	parts = append(parts, "on the air "+pct(e.TxFraction)+" of the time")
	if e.AveragingPublicS > 0 || e.AveragingOccupationalS > 0 {
		parts = append(parts, "averaged over "+duration(e.AveragingPublicS)+" (public) and "+duration(e.AveragingOccupationalS)+" (workers)")
	}
	if e.Standard != "" {
		parts = append(parts, e.Standard)
	}
	if e.AntennaHeightM > 0 {
		parts = append(parts, "antenna "+p.height(e.AntennaHeightM)+" up, head at "+p.height(e.HeadHeightM))
	}
	return strings.Join(parts, "; ")
}

func (p *page) cautions() {
	p.w(`<aside id="cautions" class="cautions" aria-labelledby="cautions-h">` + "\n")
	p.w(`<h2 id="cautions-h">Cautions</h2>` + "\n<ul>\n")
	for _, c := range p.d.Cautions {
		p.f("<li>%s</li>\n", h(c))
	}
	p.w("</ul>\n</aside>\n")
}

func (p *page) inputs() {
	d := p.d
	in := d.Inputs
	p.section("inputs", "", "Inputs used")
	p.w("<dl class=\"inputs\">\n")
	dl := func(k, v string) {
		if v != "" {
			p.f("<dt>%s</dt><dd>%s</dd>\n", h(k), h(v))
		}
	}
	dl("Plan file", in.PlanFile)
	dl("Propagation model", in.Model)
	dl("Effective earth-radius factor", "k = "+kLabel(in.K))
	if len(in.TerrainFiles) == 0 {
		dl("Terrain", "none: a smooth earth")
	} else {
		dl("Terrain files", strings.Join(in.TerrainFiles, ", "))
	}
	for _, n := range in.Notes {
		dl("Note", n)
	}
	p.w("</dl>\n")
	if len(in.Kit) > 0 {
		p.w("<table class=\"kit\">\n<caption>Kit per station</caption>\n")
		p.colHeads("", "Station", "Power (W)", "Sensitivity (dBm)", "Antenna", "Height ("+p.heightUnit()+")", "Feedline")
		p.w("<tbody>\n")
		for _, k := range in.Kit {
			p.w("<tr>")
			p.rowHead(k.Station)
			p.cell("td", "num", trimFloat(k.PowerW, 1))
			p.cell("td", "num", minus(fmt1(k.SensitivityDBm)))
			ant := strings.TrimSpace(k.Antenna + " " + trimFloat(k.GainDBi, 2) + " dBi")
			p.cell("td", "", ant)
			p.cell("td", "num", p.heightNum(k.HeightM))
			feed := k.Cable
			if k.CableLengthM > 0 {
				feed += ", " + p.height(k.CableLengthM)
			}
			if k.Connectors > 0 {
				feed += fmt.Sprintf(", %d connectors", k.Connectors)
			}
			if k.SWR > 0 {
				feed += ", SWR " + trimFloat(k.SWR, 1)
			}
			p.cell("td", "", strings.TrimPrefix(feed, ", "))
			p.w("</tr>\n")
		}
		p.w("</tbody>\n</table>\n")
	}
	p.w("</section>\n")
}

// Units.

func (p *page) distUnit() string {
	if p.d.Imperial {
		return "mi"
	}
	return "km"
}

func (p *page) heightUnit() string {
	if p.d.Imperial {
		return "ft"
	}
	return "m"
}

// dist writes a distance in km or miles, two decimals under 10, one above.
func (p *page) dist(m float64) string {
	v := m / 1000
	if p.d.Imperial {
		v = m / metresPerMile
	}
	if math.Abs(v) < 10 {
		return strconv.FormatFloat(v, 'f', 2, 64)
	}
	return strconv.FormatFloat(v, 'f', 1, 64)
}

// heightNum writes a height in m or ft, to 0.1 below 10 and whole above.
func (p *page) heightNum(m float64) string {
	v := m
	if p.d.Imperial {
		v = m / metresPerFoot
	}
	if v < 10 {
		return trimFloat(v, 1)
	}
	return strconv.FormatFloat(v, 'f', 0, 64)
}

func (p *page) height(m float64) string { return p.heightNum(m) + " " + p.heightUnit() }

// keepout writes a safety distance rounded up: to the next 0.1 m, or the
// next whole foot. A float's last-digit noise (1e-9 of a step) is not
// rounded up.
func (p *page) keepout(m float64) string {
	if m <= 0 {
		return "0"
	}
	if p.d.Imperial {
		return strconv.FormatFloat(roundUp(m/metresPerFoot, 1), 'f', 0, 64)
	}
	return strconv.FormatFloat(roundUp(m, 0.1), 'f', 1, 64)
}

// roundUp rounds v up to a whole number of steps.
func roundUp(v, step float64) float64 {
	return math.Ceil(v/step-1e-9) * step
}

// freq writes a frequency in MHz with three decimals, or up to five when
// the channel needs them (446.00625).
func freq(mhz float64) string {
	s := strconv.FormatFloat(mhz, 'f', 5, 64)
	for strings.HasSuffix(s, "0") && len(s)-strings.IndexByte(s, '.') > 4 {
		s = s[:len(s)-1]
	}
	return s
}

// fmt1 writes v with one decimal.
func fmt1(v float64) string { return strconv.FormatFloat(v, 'f', 1, 64) }

// trimFloat writes v with up to dec decimals, trimming zeros.
func trimFloat(v float64, dec int) string {
	s := strconv.FormatFloat(v, 'f', dec, 64)
	if strings.Contains(s, ".") {
		s = strings.TrimRight(strings.TrimRight(s, "0"), ".")
	}
	return s
}

// minus writes a leading hyphen as the minus sign (U+2212), as print does.
func minus(s string) string {
	if strings.HasPrefix(s, "-") {
		return "\u2212" + s[1:]
	}
	return s
}

// pct writes a fraction as whole per cent.
func pct(f float64) string { return trimFloat(100*f, 0) + " %" }

// duration writes seconds as minutes or seconds.
func duration(s float64) string {
	if s >= 60 {
		return trimFloat(s/60, 1) + " min"
	}
	return trimFloat(s, 0) + " s"
}

// latLon writes a position in degrees with five decimals and hemispheres.
func latLon(lat, lon float64) string {
	ns, ew := "N", "E"
	if lat < 0 {
		ns, lat = "S", -lat
	}
	if lon < 0 {
		ew, lon = "W", -lon
	}
	return strconv.FormatFloat(lat, 'f', 5, 64) + "° " + ns + ", " + strconv.FormatFloat(lon, 'f', 5, 64) + "° " + ew
}
