package report

import (
	"bytes"
	"context"
	"fmt"
	"image/png"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"sync"
	"testing"
	"time"

	"github.com/chromedp/cdproto/cdp"
	cdplog "github.com/chromedp/cdproto/log"
	"github.com/chromedp/cdproto/network"
	"github.com/chromedp/cdproto/runtime"
	"github.com/chromedp/chromedp"
)

// crossCheckTool returns the path of a reference tool, skipping the test
// when it is missing, or failing it when MASTLINK_REQUIRE_CROSSCHECKS=1
// (as in CI, which installs it).
func crossCheckTool(t *testing.T, name, debianPackage string) string {
	t.Helper()
	path, err := exec.LookPath(name)
	if err == nil {
		return path
	}
	msg := fmt.Sprintf("%s not found (Debian package %s)", name, debianPackage)
	if os.Getenv("MASTLINK_REQUIRE_CROSSCHECKS") == "1" {
		t.Fatal(msg + " and MASTLINK_REQUIRE_CROSSCHECKS=1")
	}
	t.Skip(msg + "; skipping the browser check")
	return ""
}

// TestBriefingInBrowser loads the sample briefing in a real browser
// (Debian's chromium, headless) from a file: URL and checks what a reader
// would: no console error and no failed load, a screenshot with ink on it,
// and a print to PDF on A4 and on US Letter of 1 to 4 pages whose text
// (pdftotext from Debian's poppler-utils) holds the plan's name and every
// caution.
func TestBriefingInBrowser(t *testing.T) {
	if testing.Short() {
		t.Skip("starts a browser")
	}
	chromium := crossCheckTool(t, "chromium", "chromium")
	pdftotext := crossCheckTool(t, "pdftotext", "poppler-utils")

	dir := t.TempDir()
	data := sampleBriefing()
	var page bytes.Buffer
	if err := Briefing(&page, data); err != nil {
		t.Fatal(err)
	}
	file := filepath.Join(dir, "briefing.html")
	if err := os.WriteFile(file, page.Bytes(), 0o644); err != nil {
		t.Fatal(err)
	}

	ctx, cancel := context.WithTimeout(context.Background(), 30*time.Second)
	defer cancel()
	actx, acancel := chromedp.NewExecAllocator(ctx,
		chromedp.ExecPath(chromium),
		chromedp.Flag("headless", true),
		chromedp.Flag("no-sandbox", true),
		chromedp.Flag("disable-gpu", true),
		chromedp.Flag("disable-quic", true),
		chromedp.Flag("no-first-run", true),
		chromedp.Flag("disable-background-networking", true),
		chromedp.Flag("disable-component-update", true),
		chromedp.Flag("disable-sync", true),
		chromedp.UserDataDir(filepath.Join(dir, "profile")),
	)
	defer acancel()
	bctx, bcancel := chromedp.NewContext(actx)
	defer bcancel()

	var mu sync.Mutex
	var problems []string
	note := func(format string, a ...any) {
		mu.Lock()
		problems = append(problems, fmt.Sprintf(format, a...))
		mu.Unlock()
	}
	if err := chromedp.Listen(bctx, func(ev any) {
		switch e := ev.(type) {
		case *runtime.EventConsoleAPICalled:
			if e.Type == runtime.ConsoleAPICalledTypeError || e.Type == runtime.ConsoleAPICalledTypeAssert {
				note("console %s", e.Type)
			}
		case *runtime.EventExceptionThrown:
			note("exception: %s", e.ExceptionDetails.Text)
		case *cdplog.EventEntryAdded:
			if e.Entry.Level == cdplog.EntryLevelError {
				note("log error: %s (%s)", e.Entry.Text, e.Entry.URL)
			}
		case *network.EventLoadingFailed:
			note("load failed: %s %s", e.Type, e.ErrorText)
		case *network.EventResponseReceived:
			if e.Response.Status >= 400 {
				note("HTTP %d for %s", e.Response.Status, e.Response.URL)
			}
		case *network.EventRequestWillBeSent:
			if u := e.Request.URL; !strings.HasPrefix(u, "file:") && !strings.HasPrefix(u, "data:") {
				note("request to %s: the page must not reach out", u)
			}
		}
	}); err != nil {
		t.Fatal(err)
	}
	if _, err := chromedp.Call(bctx, runtime.Enable, cdp.Empty{}); err != nil {
		t.Fatal(err)
	}
	if _, err := chromedp.Call(bctx, cdplog.Enable, cdp.Empty{}); err != nil {
		t.Fatal(err)
	}
	if _, err := chromedp.Call(bctx, network.Enable, network.EnableParams{}); err != nil {
		t.Fatal(err)
	}
	if err := chromedp.Do(bctx, chromedp.EmulateViewport(900, 1200), chromedp.Navigate("file://"+file)); err != nil {
		t.Fatal(err)
	}

	// A screenshot of the first screen: the title, the requirement and the
	// map leave ink on a good part of it.
	shot, err := chromedp.Run(bctx, chromedp.CaptureScreenshot())
	if err != nil {
		t.Fatal(err)
	}
	img, err := png.Decode(bytes.NewReader(shot))
	if err != nil {
		t.Fatalf("screenshot is not a PNG: %v", err)
	}
	b := img.Bounds()
	inked := 0
	for y := b.Min.Y; y < b.Max.Y; y++ {
		for x := b.Min.X; x < b.Max.X; x++ {
			if r, g, bl, _ := img.At(x, y).RGBA(); r < 0xf000 || g < 0xf000 || bl < 0xf000 {
				inked++
			}
		}
	}
	if frac := float64(inked) / float64(b.Dx()*b.Dy()); frac < 0.05 {
		t.Errorf("screenshot %v has ink on %.1f %% of its pixels: blank or nearly", b, 100*frac)
	}

	for _, paper := range []struct {
		name string
		size chromedp.PaperSize
	}{{"A4", chromedp.PaperA4}, {"Letter", chromedp.PaperLetter}} {
		pdf, err := chromedp.Run(bctx, chromedp.PrintToPDF(chromedp.PDFPaper(paper.size)))
		if err != nil {
			t.Fatal(err)
		}
		pdfFile := filepath.Join(dir, "briefing-"+paper.name+".pdf")
		if err := os.WriteFile(pdfFile, pdf, 0o644); err != nil {
			t.Fatal(err)
		}
		out, err := exec.CommandContext(ctx, pdftotext, "-enc", "UTF-8", pdfFile, "-").Output()
		if err != nil {
			t.Fatalf("%s: pdftotext: %v", paper.name, err)
		}
		// pdftotext ends every page with a form feed.
		if pages := bytes.Count(out, []byte("\f")); pages < 1 || pages > 4 {
			t.Errorf("%s: %d pages, want 1 to 4", paper.name, pages)
		}
		text := strings.Join(strings.Fields(string(out)), " ")
		for _, want := range append([]string{data.Title, "CAUTIONS"}, data.Cautions...) {
			if !strings.Contains(text, strings.Join(strings.Fields(want), " ")) {
				t.Errorf("%s: the PDF's text lacks %q", paper.name, want)
			}
		}
	}
	mu.Lock()
	defer mu.Unlock()
	for _, p := range problems {
		t.Error(p)
	}
}
