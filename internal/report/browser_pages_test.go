package report

import (
	"context"
	"fmt"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"sync"
	"testing"
	"time"

	"github.com/chromedp/cdproto/cdp"
	cdplog "github.com/chromedp/cdproto/log"
	"github.com/chromedp/cdproto/network"
	"github.com/chromedp/cdproto/runtime"
	"github.com/chromedp/chromedp"

	"github.com/falloff-kinetics/falloff/pkg/job"
)

// The uncertainty and comparison pages in a real browser (headless
// Chromium, as TestBrowserRendersDemo; skipped without one and under
// -short): each loads from a file with no console message of any level,
// no exception and no request but the page itself, and its rendered text
// holds every section heading, the caution twice and each row of its main
// table with the result's numbers as the terminal formats them (cells
// separated by tabs in a table row's innerText, HTML Living Standard
// "rendered text collection steps"; from memory).
func TestBrowserRendersUncertaintyAndCompare(t *testing.T) {
	if testing.Short() {
		t.Skip("starts a browser (about 3 s)")
	}
	exe := browserPath()
	if exe == "" {
		if os.Getenv("FALLOFF_REQUIRE_BROWSER") == "1" {
			t.Fatal("FALLOFF_REQUIRE_BROWSER=1 but no chromium on PATH (apt-get install chromium)")
		}
		t.Skip("no chromium on PATH (apt-get install chromium)")
	}
	g := func(x float64) string { return strconv.FormatFloat(x, 'g', 4, 64) }

	u := uncertaintyReport(t)
	up, err := UncertaintyHTML(u)
	if err != nil {
		t.Fatal(err)
	}
	var uRows []string
	for i, T := range u.Result.Temperatures {
		for j, P := range u.Result.Pressures {
			b := u.Result.K[i][j]
			uRows = append(uRows, strings.Join([]string{g(T), g(demoUnits.P(P)), g(u.Result.NominalK[i][j]), g(b.Median), g(b.Low), g(b.High), g(b.F)}, "\t"))
		}
	}
	c := compareReport(t)
	cp, err := CompareHTML(c)
	if err != nil {
		t.Fatal(err)
	}
	var cRows []string
	for i, T := range c.Result.Temperatures {
		for j, P := range c.Result.Pressures {
			row := []string{g(T), g(demoUnits.P(P))}
			for _, m := range c.Result.Models {
				row = append(row, g(m.K[i][j]/c.Result.KInf[i]))
			}
			cRows = append(cRows, strings.Join(row, "\t"))
		}
	}

	for _, tc := range []struct {
		name     string
		page     []byte
		headings []string
		rows     []string
	}{
		{"uncertainty", up, []string{"Warnings (", "Uncertain values", "Band of k(T,P)", "Limits and uncertainty factor f(T)", "Sensitivity coefficients",
			"Dominant values", "Figures", "Mechanism entries", "Input", "Files written with this report", "seed 7"}, uRows},
		{"compare", cp, []string{"Warnings (", "k/k∞ under each model", "k(T,P) under each model", "Limits", "Figures", "Input",
			"Files written with this report"}, cRows},
	} {
		t.Run(tc.name, func(t *testing.T) {
			text, faults, requests, url := browserText(t, exe, tc.page)
			if len(faults) > 0 {
				t.Errorf("the console holds %d messages: %q", len(faults), faults)
			}
			for _, r := range requests {
				if r != url {
					t.Errorf("request to %s: the page loads something besides itself", r)
				}
			}
			for _, want := range tc.headings {
				if !strings.Contains(text, want) {
					t.Errorf("the rendered text lacks %q", want)
				}
			}
			if n := strings.Count(text, job.Caution); n != 2 {
				t.Errorf("the caution is shown %d times, want 2", n)
			}
			for _, row := range tc.rows {
				if !strings.Contains(text, row) {
					t.Errorf("the rendered text lacks the row %q", row)
				}
			}
		})
	}
}

// browserText loads page from a file in headless Chromium and returns the
// body's innerText, the console messages and exceptions, the requests
// made and the page's URL.
func browserText(t *testing.T, exe string, page []byte) (text string, faults, requests []string, url string) {
	t.Helper()
	file := filepath.Join(t.TempDir(), FileName)
	if err := os.WriteFile(file, page, 0o644); err != nil {
		t.Fatal(err)
	}
	ctx, cancel := context.WithTimeout(context.Background(), 60*time.Second)
	defer cancel()
	actx, cancelAlloc := chromedp.NewExecAllocator(ctx, chromedp.ExecPath(exe), chromedp.Headless, chromedp.NoFirstRun,
		chromedp.NoDefaultBrowserCheck, chromedp.DisableGPU, chromedp.NoSandbox, chromedp.WindowSize(1000, 1300),
		chromedp.UserDataDir(t.TempDir()))
	defer cancelAlloc()
	bctx, cancelTab := chromedp.NewContext(actx)
	defer cancelTab()
	var mu sync.Mutex
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
	for _, enable := range []func() error{
		func() error { _, err := chromedp.Call(bctx, runtime.Enable, cdp.Empty{}); return err },
		func() error { _, err := chromedp.Call(bctx, cdplog.Enable, cdp.Empty{}); return err },
		func() error { _, err := chromedp.Call(bctx, network.Enable, network.EnableParams{}); return err },
	} {
		if err := enable(); err != nil {
			t.Fatal(err)
		}
	}
	url = "file://" + filepath.ToSlash(file)
	if err := chromedp.Do(bctx, chromedp.Navigate(url)); err != nil {
		t.Fatal(err)
	}
	text, err := chromedp.Run(bctx, chromedp.Evaluate[string](`document.body.innerText`))
	if err != nil {
		t.Fatal(err)
	}
	mu.Lock()
	defer mu.Unlock()
	return text, append([]string(nil), faults...), append([]string(nil), requests...), url
}
