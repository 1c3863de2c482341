package report

import (
	"bytes"
	"context"
	"flag"
	"fmt"
	"image"
	"image/color"
	"image/png"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"
	"sync"
	"testing"
	"time"

	"github.com/chromedp/cdproto/cdp"
	"github.com/chromedp/cdproto/emulation"
	cdplog "github.com/chromedp/cdproto/log"
	"github.com/chromedp/cdproto/network"
	"github.com/chromedp/cdproto/runtime"
	"github.com/chromedp/chromedp"
)

var screenshotOut = flag.String("screenshot", "", "write a screenshot of the top of the demo's report (1000 px wide) to this PNG file, e.g. ../../docs/figures/report.png")

// browserPath returns the headless browser to use: $FALLOFF_BROWSER, else
// chromium (Debian's package) or Chrome on PATH; "" if none.
func browserPath() string {
	if p := os.Getenv("FALLOFF_BROWSER"); p != "" {
		return p
	}
	for _, name := range []string{"chromium", "chromium-browser", "google-chrome", "google-chrome-stable"} {
		if p, err := exec.LookPath(name); err == nil {
			return p
		}
	}
	return ""
}

// The demo's report in a real browser (headless Chromium; CI installs
// Debian's chromium and sets FALLOFF_REQUIRE_BROWSER=1). The page loads
// from a file with nothing written to the console (no message of any
// level, no exception: the page has no script, so any message is a fault,
// such as a load the Content-Security-Policy refused) and no request but
// the page itself; the rendered text holds every section, the caution and
// the k(T,P) rows with the result's numbers as the terminal formats them;
// the warnings box is on the first screen; every figure is drawn at a
// readable width; the print style sheet applies (contents hidden) and the
// PDF is A4 landscape, 841.89 × 595.28 pt (ISO 216: 297 × 210 mm at 72 pt
// per 25.4 mm), within 1 pt (Chromium sizes the page in whole CSS pixels,
// 0.75 pt each, and rounds again in the PDF), on more than one page; the
// screenshot shows the warnings box's border colour, Okabe–Ito vermillion
// #D55E00, so the style sheet was applied.
func TestBrowserRendersDemo(t *testing.T) {
	if testing.Short() {
		t.Skip("starts a browser (about 5 s)")
	}
	exe := browserPath()
	if exe == "" {
		if os.Getenv("FALLOFF_REQUIRE_BROWSER") == "1" {
			t.Fatal("FALLOFF_REQUIRE_BROWSER=1 but no chromium on PATH (apt-get install chromium)")
		}
		t.Skip("no chromium on PATH (apt-get install chromium)")
	}
	in := demoReport(t)
	page, err := RatesHTML(in)
	if err != nil {
		t.Fatal(err)
	}
	file := filepath.Join(t.TempDir(), FileName)
	if err := os.WriteFile(file, page, 0o644); err != nil {
		t.Fatal(err)
	}

	ctx, cancel := context.WithTimeout(context.Background(), 60*time.Second)
	defer cancel()
	const width, height = 1000, 1300
	actx, cancelAlloc := chromedp.NewExecAllocator(ctx, chromedp.ExecPath(exe), chromedp.Headless, chromedp.NoFirstRun,
		chromedp.NoDefaultBrowserCheck, chromedp.DisableGPU, chromedp.NoSandbox, chromedp.WindowSize(width, height),
		chromedp.Flag("hide-scrollbars", true), chromedp.Flag("force-device-scale-factor", "1"),
		chromedp.UserDataDir(t.TempDir()))
	defer cancelAlloc()
	bctx, cancelTab := chromedp.NewContext(actx)
	defer cancelTab()

	var mu sync.Mutex
	var faults, requests []string
	if err := chromedp.Listen(bctx, func(ev any) {
		mu.Lock()
		defer mu.Unlock()
		switch e := ev.(type) {
		case *runtime.EventConsoleAPICalled:
			faults = append(faults, fmt.Sprintf("console.%s", e.Type))
		case *runtime.EventExceptionThrown:
			faults = append(faults, "exception: "+e.ExceptionDetails.Text)
		case *cdplog.EventEntryAdded:
			faults = append(faults, fmt.Sprintf("log %s (%s): %s", e.Entry.Level, e.Entry.Source, e.Entry.Text))
		case *network.EventRequestWillBeSent:
			requests = append(requests, e.Request.URL)
		}
	}); err != nil {
		t.Fatal(err)
	}
	start := time.Now()
	if _, err := chromedp.Call(bctx, runtime.Enable, cdp.Empty{}); err != nil {
		t.Fatal(err)
	}
	if _, err := chromedp.Call(bctx, cdplog.Enable, cdp.Empty{}); err != nil {
		t.Fatal(err)
	}
	if _, err := chromedp.Call(bctx, network.Enable, network.EnableParams{}); err != nil {
		t.Fatal(err)
	}
	url := "file://" + filepath.ToSlash(file)
	if err := chromedp.Do(bctx, chromedp.Navigate(url)); err != nil {
		t.Fatal(err)
	}
	text, err := chromedp.Run(bctx, chromedp.Evaluate[string](`document.body.innerText`))
	if err != nil {
		t.Fatal(err)
	}
	figWidths, err := chromedp.Run(bctx, chromedp.Evaluate[[]float64](`Array.from(document.querySelectorAll('figure svg')).map(s => s.getBoundingClientRect().width)`))
	if err != nil {
		t.Fatal(err)
	}
	boxTop, err := chromedp.Run(bctx, chromedp.Evaluate[float64](`document.getElementById('warnings').getBoundingClientRect().top`))
	if err != nil {
		t.Fatal(err)
	}
	shot, err := chromedp.Run(bctx, chromedp.CaptureScreenshot())
	if err != nil {
		t.Fatal(err)
	}
	if _, err := chromedp.Call(bctx, emulation.SetEmulatedMedia, emulation.SetEmulatedMediaParams{Media: "print"}); err != nil {
		t.Fatal(err)
	}
	navShown, err := chromedp.Run(bctx, chromedp.Evaluate[string](`getComputedStyle(document.querySelector('nav')).display`))
	if err != nil {
		t.Fatal(err)
	}
	pdf, err := chromedp.Run(bctx, chromedp.PrintToPDF(chromedp.PDFPreferCSSPageSize()))
	if err != nil {
		t.Fatal(err)
	}
	t.Logf("browser: %v from navigation to PDF", time.Since(start).Round(time.Millisecond))

	mu.Lock()
	if len(faults) > 0 {
		t.Errorf("the console holds %d messages: %q", len(faults), faults)
	}
	for _, r := range requests {
		if r != url {
			t.Errorf("request to %s: the page loads something besides itself", r)
		}
	}
	mu.Unlock()

	for _, want := range []string{"Warnings (", "TST identity check", "Limits", "k(T,P)", "Fits", "Figures", "Mechanism entries", "Input",
		"Files written with this report", in.Result.Caution, "SHA-256 ", "recommended: " + string(in.Result.Fits.Recommended)} {
		if !strings.Contains(text, want) {
			t.Errorf("the rendered text lacks %q", want)
		}
	}
	if got := strings.Count(text, in.Result.Caution); got != 2 {
		t.Errorf("the caution is shown %d times, want 2 (top and bottom)", got)
	}
	// Each row of the k(T,P) table as the browser lays it out: cells
	// separated by tabs (innerText of a table row, HTML Living Standard
	// "rendered text collection steps"; from memory).
	res := in.Result
	for i, T := range res.Temperatures {
		row := []string{strconv.FormatFloat(T, 'g', 4, 64)}
		for _, k := range res.K[i] {
			row = append(row, strconv.FormatFloat(demoUnits.Rate(k, res.KPowers()), 'g', 4, 64))
		}
		if line := strings.Join(row, "\t"); !strings.Contains(text, line) {
			t.Errorf("the rendered text lacks the k(T,P) row %q", line)
		}
	}
	if len(figWidths) != len(in.Figures) {
		t.Errorf("%d figures laid out, want %d", len(figWidths), len(in.Figures))
	}
	for i, w := range figWidths {
		if w < 400 { // px: narrower, the axis labels (7–12 px in the SVG at 1:1) shrink below legibility
			t.Errorf("figure %d drawn %g px wide", i+1, w)
		}
	}
	if boxTop > height/2 {
		t.Errorf("the warnings box starts %g px down, below the first half screen", boxTop)
	}
	if navShown != "none" {
		t.Errorf("print media: the contents' display is %q, want none (the print style sheet did not apply)", navShown)
	}

	checkPDF(t, pdf)
	checkScreenshot(t, shot, width)
	if *screenshotOut != "" {
		if err := os.WriteFile(*screenshotOut, shot, 0o644); err != nil {
			t.Fatal(err)
		}
	}
}

// checkPDF checks the printed page: a PDF file of several A4 landscape
// pages.
func checkPDF(t *testing.T, pdf []byte) {
	t.Helper()
	if !bytes.HasPrefix(pdf, []byte("%PDF-")) {
		t.Fatalf("print to PDF gave %d bytes that are not a PDF", len(pdf))
	}
	pages := regexp.MustCompile(`/Type\s*/Page[^s]`).FindAll(pdf, -1)
	if len(pages) < 2 {
		t.Errorf("the PDF has %d pages, want several", len(pages))
	}
	boxes := regexp.MustCompile(`/MediaBox\s*\[\s*0\s+0\s+([\d.]+)\s+([\d.]+)\s*\]`).FindAllSubmatch(pdf, -1)
	if len(boxes) == 0 {
		t.Fatal("no /MediaBox in the PDF")
	}
	for i, b := range boxes {
		w, _ := strconv.ParseFloat(string(b[1]), 64)
		h, _ := strconv.ParseFloat(string(b[2]), 64)
		if math.Abs(w-841.89) > 1 || math.Abs(h-595.28) > 1 {
			t.Errorf("PDF page %g × %g pt, want A4 landscape 841.89 × 595.28 pt", w, h)
			break
		}
		if i == 0 {
			t.Logf("PDF: %d pages of %g × %g pt", len(pages), w, h)
		}
	}
}

// checkScreenshot checks the PNG of the first screen: its width, and that
// the warnings box's vermillion border was drawn.
func checkScreenshot(t *testing.T, shot []byte, width int) {
	t.Helper()
	img, err := png.Decode(bytes.NewReader(shot))
	if err != nil {
		t.Fatalf("screenshot: %v", err)
	}
	if w := img.Bounds().Dx(); w != width {
		t.Errorf("screenshot %d px wide, want %d", w, width)
	}
	vermillion := color.RGBA{0xD5, 0x5E, 0x00, 0xFF}
	if !hasColour(img, vermillion) {
		t.Error("no pixel of the warnings box's border colour #D55E00: the style sheet was not applied")
	}
}

func hasColour(img image.Image, c color.RGBA) bool {
	b := img.Bounds()
	for y := b.Min.Y; y < b.Max.Y; y++ {
		for x := b.Min.X; x < b.Max.X; x++ {
			r, g, bl, _ := img.At(x, y).RGBA()
			if uint8(r>>8) == c.R && uint8(g>>8) == c.G && uint8(bl>>8) == c.B {
				return true
			}
		}
	}
	return false
}
