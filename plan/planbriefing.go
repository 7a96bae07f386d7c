package plan

import (
	"fmt"
	"path/filepath"
	"strings"
	"time"

	"go.yaml.in/yaml/v3"
)

// The plan file's fields for the printable briefing: where and when the
// deployment is, the time zone its times are shown in, and where the
// briefing goes.

// planDateLayouts are the forms `date:` takes: a day, or a day and a time
// of day (ISO 8601 calendar date and local time, as RFC 3339 writes them),
// or a full RFC 3339 time with its offset.
var planDateLayouts = []struct {
	layout  string
	hasTime bool
	zoned   bool
}{
	{"2006-01-02", false, false},
	{"2006-01-02 15:04", true, false},
	{"2006-01-02T15:04", true, false},
	{"2006-01-02 15:04:05", true, false},
	{"2006-01-02T15:04:05", true, false},
	{time.RFC3339, true, true},
}

// briefingFields reads area, date, timezone and briefing into pl.
func (p *planParser) briefingFields(f map[string]*yaml.Node, pl *Plan) error {
	var err error
	if n := f["area"]; n != nil {
		if pl.Area, err = p.scalar(n, "area"); err != nil {
			return err
		}
	}
	if n := f["timezone"]; n != nil {
		name, err := p.scalar(n, "timezone")
		if err != nil {
			return err
		}
		if pl.Location, err = loadZone(name); err != nil {
			return p.wrap(n, "timezone", err)
		}
	}
	if n := f["date"]; n != nil {
		s, err := p.scalar(n, "date")
		if err != nil {
			return err
		}
		loc := pl.Location
		if loc == nil {
			loc = time.UTC
		}
		ok := false
		for _, l := range planDateLayouts {
			t, perr := time.ParseInLocation(l.layout, s, loc)
			if perr != nil {
				continue
			}
			pl.Date, pl.DateHasTime, ok = t, l.hasTime, true
			if l.zoned && pl.Location != nil {
				pl.Date = t.In(pl.Location)
			}
			break
		}
		if !ok {
			return p.errf(n, "date", "%q is not a date: give 2025-06-14, or 2025-06-14 07:30 (in the plan's timezone, else UTC)", s)
		}
	}
	if n := f["briefing"]; n != nil {
		if pl.Briefing, err = p.path(n, "briefing"); err != nil {
			return err
		}
		pl.BriefingAt = n.Line
		if ext := strings.ToLower(filepath.Ext(pl.Briefing)); ext != ".html" && ext != ".htm" {
			return p.errf(n, "briefing", "%s: the briefing is an HTML page; give a file name ending in .html", pl.Briefing)
		}
	}
	return nil
}

// loadZone returns the IANA time zone called name ("Europe/Oslo", "UTC").
// The commands embed the time-zone database (time/tzdata), so this works
// on a machine without one.
func loadZone(name string) (*time.Location, error) {
	if name == "" || name == "Local" {
		return nil, fmt.Errorf("%q is not a time zone: give an IANA name such as Europe/Oslo, America/Denver or UTC", name)
	}
	loc, err := time.LoadLocation(name)
	if err != nil {
		return nil, fmt.Errorf("%q is not a time zone known to the IANA database: give a name such as Europe/Oslo, America/Denver or UTC", name)
	}
	return loc, nil
}
