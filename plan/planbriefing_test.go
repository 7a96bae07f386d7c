package plan

import (
	"errors"
	"path/filepath"
	"strings"
	"testing"
	"time"
	_ "time/tzdata" // the zones below, on a machine without a zone database
)

const briefingPlanTail = "stations: [{name: a, at: '1,2', radio: {power: 5W, sensitivity: -120dBm}}]\n" +
	"targets: [{name: b, at: '1.1,2', frequency: 146, radio: {power: 5W, sensitivity: -120dBm}}]\n"

// TestPlanBriefingFields reads area, date, timezone and briefing. The
// offsets are those of the IANA time zone database (tzdata): Norway keeps
// UTC+2 in summer (EU summer time, Directive 2000/84/EC) and UTC+1 in
// winter; Colorado (America/Denver) UTC−6 in summer (US daylight saving
// time, 15 U.S.C. § 260a).
func TestPlanBriefingFields(t *testing.T) {
	cases := []struct {
		name, head string
		wantUTC    string // the date in UTC, RFC 3339
		hasTime    bool
		zone       string
	}{
		{"day only, no zone", "date: 2025-06-14\n", "2025-06-14T00:00:00Z", false, ""},
		{"day and time in Oslo summer", "timezone: Europe/Oslo\ndate: 2025-06-14 07:30\n", "2025-06-14T05:30:00Z", true, "Europe/Oslo"},
		{"T form in Oslo winter", "date: 2025-01-14T07:30\ntimezone: Europe/Oslo\n", "2025-01-14T06:30:00Z", true, "Europe/Oslo"},
		{"RFC 3339 with offset, shown in Denver", "timezone: America/Denver\ndate: 2025-06-14T12:00:00Z\n", "2025-06-14T12:00:00Z", true, "America/Denver"},
		{"nothing given", "", "0001-01-01T00:00:00Z", false, ""},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			p, err := ParsePlan([]byte("name: x\narea: Tarn valley\nbriefing: out/card.html\n"+c.head+briefingPlanTail), filepath.Join("dir", "plan.yaml"))
			if err != nil {
				t.Fatal(err)
			}
			if got := p.Date.UTC().Format(time.RFC3339); got != c.wantUTC {
				t.Errorf("date %s, want %s", got, c.wantUTC)
			}
			if p.DateHasTime != c.hasTime {
				t.Errorf("DateHasTime %v, want %v", p.DateHasTime, c.hasTime)
			}
			zone := ""
			if p.Location != nil {
				zone = p.Location.String()
			}
			if zone != c.zone {
				t.Errorf("zone %q, want %q", zone, c.zone)
			}
			if c.zone == "America/Denver" {
				if got := p.Date.Format("15:04 MST"); got != "06:00 MDT" {
					t.Errorf("shown as %s, want 06:00 MDT", got)
				}
			}
			if p.Area != "Tarn valley" || p.Briefing != filepath.Join("dir", "out", "card.html") || p.BriefingAt != 3 {
				t.Errorf("area %q, briefing %q at line %d", p.Area, p.Briefing, p.BriefingAt)
			}
		})
	}
}

// TestPlanBriefingFieldErrors: each bad field gives one line naming the
// file, line and field.
func TestPlanBriefingFieldErrors(t *testing.T) {
	cases := []struct {
		head, want string
	}{
		{"date: 14/06/2025\n", `plan.yaml:1: date: "14/06/2025" is not a date`},
		{"date: 2025-02-30\n", `plan.yaml:1: date: "2025-02-30" is not a date`},
		{"date: [2025]\n", "plan.yaml:1: date: expected a value, found a list"},
		{"timezone: Mars/Olympus\n", `plan.yaml:1: timezone: "Mars/Olympus" is not a time zone`},
		{"timezone: Local\n", `plan.yaml:1: timezone: "Local" is not a time zone`},
		{"briefing: card.pdf\n", "plan.yaml:1: briefing: card.pdf: the briefing is an HTML page"},
		{"briefing: ''\n", "plan.yaml:1: briefing: empty path"},
		{"area: {a: b}\n", "plan.yaml:1: area: expected a value, found a mapping"},
	}
	for _, c := range cases {
		_, err := ParsePlan([]byte(c.head+briefingPlanTail), "plan.yaml")
		if err == nil {
			t.Errorf("%q: no error", c.head)
			continue
		}
		if !errors.Is(err, ErrPlanFile) || !strings.HasPrefix(err.Error(), c.want) || strings.Contains(err.Error(), "\n") {
			t.Errorf("%q: error %q, want one line starting %q", c.head, err, c.want)
		}
	}
}
