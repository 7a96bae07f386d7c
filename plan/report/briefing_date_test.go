package report

import (
	"bytes"
	"strings"
	"testing"
	"time"
	_ "time/tzdata" // Etc/GMT+8 below, without a system zone database
)

// TestBriefingDate: the date line shows the time in the plan's zone, or
// only the day when DateOnly is set. 17 May 2025 is a Saturday (Gregorian
// calendar).
func TestBriefingDate(t *testing.T) {
	cases := []struct {
		name     string
		dateOnly bool
		loc      *time.Location
		want     string
	}{
		{"time in zone", false, time.FixedZone("CEST", 2*3600), `<time datetime="2025-05-17T08:30:00+02:00">Saturday 17 May 2025, 08:30 CEST</time>`},
		{"time in UTC", false, nil, `<time datetime="2025-05-17T06:30:00Z">Saturday 17 May 2025, 06:30 UTC</time>`},
		{"day only", true, nil, `<time datetime="2025-05-17">Saturday 17 May 2025</time>`},
	}
	for _, c := range cases {
		d := sampleBriefing()
		d.Location, d.DateOnly = c.loc, c.dateOnly
		var b bytes.Buffer
		if err := Briefing(&b, d); err != nil {
			t.Fatal(err)
		}
		if !strings.Contains(b.String(), c.want) {
			i := strings.Index(b.String(), "<time")
			t.Errorf("%s: page has %.90s, want %s", c.name, b.String()[i:], c.want)
		}
	}
}

// TestZoneLabel: IANA's Etc/GMT+8 is UTC−8 (its sign is POSIX's, inverted;
// tzdata "etcetera" file) and has no abbreviation, so it is written from its
// offset; zones with an abbreviation keep it.
func TestZoneLabel(t *testing.T) {
	at := time.Date(2025, 6, 14, 15, 30, 0, 0, time.UTC)
	etc, err := time.LoadLocation("Etc/GMT+8")
	if err != nil {
		t.Fatal(err)
	}
	for _, c := range []struct {
		loc  *time.Location
		want string
	}{
		{etc, "UTC−08"},
		{time.FixedZone("", 5*3600+1800), "UTC+0530"},
		{time.FixedZone("CEST", 2*3600), "CEST"},
		{time.UTC, "UTC"},
	} {
		if got := zoneLabel(at.In(c.loc)); got != c.want {
			t.Errorf("%v: %q, want %q", c.loc, got, c.want)
		}
	}
}
