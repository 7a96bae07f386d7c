package report

import (
	"bytes"
	"os"
	"path/filepath"
	"testing"

	"github.com/mastlink/mastlink/internal/pagecheck"
)

// TestBriefingInBrowser loads the sample briefing in a real browser
// (Debian's chromium, headless) from a file: URL and checks what a reader
// would (pagecheck.InBrowser): no console error and no failed load, a
// screenshot with ink on it, and a print to PDF on A4 and on US Letter of 1
// to 4 pages whose text (pdftotext from Debian's poppler-utils) holds the
// plan's name and every caution.
func TestBriefingInBrowser(t *testing.T) {
	data := sampleBriefing()
	var page bytes.Buffer
	if err := Briefing(&page, data); err != nil {
		t.Fatal(err)
	}
	file := filepath.Join(t.TempDir(), "briefing.html")
	if err := os.WriteFile(file, page.Bytes(), 0o644); err != nil {
		t.Fatal(err)
	}
	pagecheck.InBrowser(t, file, append([]string{data.Title, "CAUTIONS"}, data.Cautions...))
}
