// Package pagecheck holds the checks the tests make on the printable pages
// mastlink writes (the deployment briefing): the page's structure as an
// outline for golden files, and a load in a real browser (Debian's
// chromium, headless, driven through the Chrome DevTools Protocol) that
// fails on console errors and failed loads, takes a screenshot and prints
// to PDF on A4 and US Letter. Only tests import it.
package pagecheck

import (
	"bytes"
	"context"
	"fmt"
	"image/png"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"strings"
	"sync"
	"testing"
	"time"

	"github.com/chromedp/cdproto/cdp"
	cdplog "github.com/chromedp/cdproto/log"
	"github.com/chromedp/cdproto/network"
	"github.com/chromedp/cdproto/runtime"
	"github.com/chromedp/chromedp"
	"golang.org/x/net/html"
)

// Outline lists a page's structure, one element a line, indented by
// depth: landmarks, sections, headings, tables with their captions and
// header cells, figures, images and lists, with their ids, classes and
// text where it names something. Inline SVG is shown as one line.
func Outline(page []byte) (string, error) {
	doc, err := html.Parse(bytes.NewReader(page))
	if err != nil {
		return "", err
	}
	keep := map[string]bool{"html": true, "head": true, "title": true, "style": true, "body": true, "header": true, "main": true, "footer": true,
		"section": true, "aside": true, "h1": true, "h2": true, "h3": true, "table": true, "caption": true, "thead": true, "tbody": true,
		"tr": true, "th": true, "figure": true, "figcaption": true, "img": true, "svg": true, "ul": true, "li": true, "dl": true, "dt": true, "div": true, "time": true}
	texty := map[string]bool{"title": true, "h1": true, "h2": true, "h3": true, "caption": true, "th": true, "dt": true, "time": true}
	var b strings.Builder
	var walk func(n *html.Node, depth int)
	walk = func(n *html.Node, depth int) {
		if n.Type == html.ElementNode && keep[n.Data] {
			b.WriteString(strings.Repeat("  ", depth) + n.Data)
			for _, a := range n.Attr {
				switch a.Key {
				case "id", "class", "scope", "alt", "role", "aria-label", "lang":
					v := a.Val
					if len(v) > 60 {
						v = v[:60] + "…"
					}
					b.WriteString(" " + a.Key + "=" + v)
				case "src":
					b.WriteString(" src=" + a.Val[:min(len(a.Val), 22)] + "…")
				}
			}
			if texty[n.Data] {
				b.WriteString(": " + strings.Join(strings.Fields(textOf(n)), " "))
			}
			b.WriteString("\n")
			if n.Data == "svg" || n.Data == "style" {
				return
			}
			depth++
		}
		for c := n.FirstChild; c != nil; c = c.NextSibling {
			walk(c, depth)
		}
	}
	walk(doc, 0)
	return b.String(), nil
}

func textOf(n *html.Node) string {
	if n.Type == html.TextNode {
		return n.Data
	}
	var s strings.Builder
	for c := n.FirstChild; c != nil; c = c.NextSibling {
		s.WriteString(textOf(c))
	}
	return s.String()
}

var (
	outsideRef = regexp.MustCompile(`(?i)(src|href|srcset|action|data)\s*=\s*["']?\s*(https?:)?//|url\(\s*["']?\s*(https?:)?//|@import|<script|<link|<iframe|<object|<embed`)
	srcHref    = regexp.MustCompile(`(?i)(?:src|href)\s*=\s*"([^"]*)"`)
)

// Outside lists what in page refers to anything outside itself: an
// http(s) or protocol-relative URL in src, href or CSS url(), an @import, a
// script, link, iframe, object or embed element, a src or href that is
// neither a data: PNG nor a link within the page, and any "http" beyond
// the SVG namespace name (an identifier, never fetched). A page that works
// offline gives none.
func Outside(page []byte) []string {
	s := string(page)
	out := outsideRef.FindAllString(s, -1)
	for _, m := range srcHref.FindAllStringSubmatch(s, -1) {
		if u := m[1]; !strings.HasPrefix(u, "data:image/png;base64,") && !strings.HasPrefix(u, "#") {
			out = append(out, u[:min(len(u), 40)])
		}
	}
	if n := strings.Count(s, "http") - strings.Count(s, `xmlns="http://www.w3.org/2000/svg"`); n != 0 {
		out = append(out, fmt.Sprintf("%d occurrences of http besides the SVG namespace", n))
	}
	return out
}

// Tool returns the path of a reference tool, skipping the test when it is
// missing, or failing it when MASTLINK_REQUIRE_CROSSCHECKS=1 (as in CI,
// which installs it).
func Tool(t testing.TB, name, debianPackage string) string {
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

// InBrowser loads the HTML file in a real browser (Debian's chromium,
// headless) from a file: URL and checks what a reader would: no console
// error, no exception, no failed load and no request beyond the file
// itself, a screenshot of the first screen with ink on at least 5 % of it,
// and a print to PDF on A4 and on US Letter of 1 to 4 pages whose text
// (pdftotext from Debian's poppler-utils) holds every string of want
// (compared with runs of white space made one space). It returns the
// screenshot (PNG) and the Letter PDF. The test is skipped when chromium or
// pdftotext is missing (failed with MASTLINK_REQUIRE_CROSSCHECKS=1) and in
// -short mode.
func InBrowser(t *testing.T, file string, want []string) (screenshot, letterPDF []byte) {
	t.Helper()
	if testing.Short() {
		t.Skip("starts a browser")
	}
	chromium := Tool(t, "chromium", "chromium")
	pdftotext := Tool(t, "pdftotext", "poppler-utils")
	abs, err := filepath.Abs(file)
	if err != nil {
		t.Fatal(err)
	}
	dir := t.TempDir()

	ctx, cancel := context.WithTimeout(context.Background(), 60*time.Second)
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
	if err := chromedp.Do(bctx, chromedp.EmulateViewport(900, 1200), chromedp.Navigate("file://"+abs)); err != nil {
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
		if paper.name == "Letter" {
			letterPDF = pdf
		}
		pdfFile := filepath.Join(dir, "page-"+paper.name+".pdf")
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
		for _, w := range want {
			if !strings.Contains(text, strings.Join(strings.Fields(w), " ")) {
				t.Errorf("%s: the PDF's text lacks %q", paper.name, w)
			}
		}
	}
	mu.Lock()
	defer mu.Unlock()
	for _, p := range problems {
		t.Error(p)
	}
	return shot, letterPDF
}
