package main

import (
	"crypto/sha256"
	"encoding/json"
	"fmt"
	"html"
	"os"
	"path/filepath"
	"regexp"
	"strings"
	"syscall"
	"testing"
)

// terminalTable returns the cells of the ASCII table printed after the
// line starting with title: each row's cells, trimmed, header first.
func terminalTable(t *testing.T, out, title string) [][]string {
	t.Helper()
	i := strings.Index(out, title)
	if i < 0 {
		t.Fatalf("no %q in the terminal report", title)
	}
	var rows [][]string
	started := false
	for _, line := range strings.Split(out[i:], "\n")[1:] {
		if !strings.HasPrefix(line, "|") && !strings.HasPrefix(line, "+") {
			if started {
				break
			}
			continue
		}
		started = true
		if strings.HasPrefix(line, "+") {
			continue
		}
		var row []string
		for _, c := range strings.Split(strings.Trim(line, "|"), "|") {
			row = append(row, strings.TrimSpace(c))
		}
		rows = append(rows, row)
	}
	return rows
}

var (
	cellRE = regexp.MustCompile(`(?s)<t[hd][^>]*>(.*?)</t[hd]>`)
	tagRE  = regexp.MustCompile(`<[^>]*>`)
	rowRE  = regexp.MustCompile(`(?s)<tr[^>]*>(.*?)</tr>`)
)

// pageTable returns the cells of the first table in the page's section
// id, header first, as text: tags (a link) dropped, unescaped
// (html/template writes "+" as "&#43;").
func pageTable(t *testing.T, page, id string) [][]string {
	t.Helper()
	i := strings.Index(page, `<section id="`+id+`">`)
	if i < 0 {
		t.Fatalf("no section %q in report.html", id)
	}
	sec := page[i:]
	sec = sec[:strings.Index(sec, "</table>")]
	var rows [][]string
	for _, r := range rowRE.FindAllStringSubmatch(sec, -1) {
		var row []string
		for _, c := range cellRE.FindAllStringSubmatch(r[1], -1) {
			row = append(row, html.UnescapeString(tagRE.ReplaceAllString(c[1], "")))
		}
		rows = append(rows, row)
	}
	return rows
}

// `rates --out` writes report.html with the other files, in the same set:
// it is listed in summary.json with its SHA-256, and its limits and
// k(T,P) tables hold the very cells of the terminal tables (same units,
// same digits), here in atm per molecule to follow the display flags.
func TestRatesReportFile(t *testing.T) {
	dir := filepath.Join(t.TempDir(), "out")
	code, out, errs := runCLI(t, "rates", "-q", "--skip-check", "--pressure-unit", "atm", "--quantity", "molecule", "--out", dir, ch3ncFile)
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	b, err := os.ReadFile(filepath.Join(dir, htmlReportName))
	if err != nil {
		t.Fatal(err)
	}
	page := string(b)
	var sum struct {
		Files     []string          `json:"files_written"`
		Checksums map[string]string `json:"file_checksums"`
	}
	s, err := os.ReadFile(filepath.Join(dir, "summary.json"))
	if err != nil {
		t.Fatal(err)
	}
	if err := json.Unmarshal(s, &sum); err != nil {
		t.Fatal(err)
	}
	path := filepath.Join(dir, htmlReportName)
	if want := fmt.Sprintf("sha256:%x", sha256.Sum256(b)); sum.Checksums[path] != want {
		t.Errorf("summary.json gives report.html checksum %q, want %q", sum.Checksums[path], want)
	}
	if !strings.Contains(out, path) {
		t.Errorf("the terminal's list of files written lacks %s", path)
	}
	for _, c := range []struct{ title, id string }{{"k(T,P) / ", "grid"}, {"+-------+", "limits"}} {
		term, cells := terminalTable(t, out, c.title), pageTable(t, page, c.id)
		if len(term) == 0 || fmt.Sprint(term) != fmt.Sprint(cells) {
			t.Errorf("%s: the terminal's table and the report's differ:\nterminal %q\nreport   %q", c.id, term, cells)
		}
	}
	// Every fit failed on this small grid: the page's warnings box says so,
	// and that no reactions.yaml was written, although --quiet kept stderr
	// silent.
	for _, want := range []string{"no reactions.yaml written", "no form recommended", "failed: chebyshev, plog, troe"} {
		if i := strings.Index(page, `id="warnings"`); i < 0 || !strings.Contains(page[i:strings.Index(page, "</section>")], want) {
			t.Errorf("the warnings box lacks %q", want)
		}
	}
}

// report.html is one of the set: when it cannot be written (a FIFO in its
// place), nothing of the set is published, and the terminal report is
// still printed.
func TestRatesReportAllOrNothing(t *testing.T) {
	dir := t.TempDir()
	if err := syscall.Mkfifo(filepath.Join(dir, htmlReportName), 0o644); err != nil {
		t.Fatal(err)
	}
	code, out, errs := runCLI(t, "rates", "-q", "--skip-check", "--out", dir, ch3ncFile)
	if code != exitInput || !strings.Contains(out, "k(T,P) / s-1") || !strings.Contains(errs, htmlReportName) {
		t.Errorf("exit %d, stderr %q; want exit %d naming %s, with the report printed", code, errs, exitInput, htmlReportName)
	}
	for _, f := range []string{"grid.csv", "summary.json"} {
		if _, err := os.Stat(filepath.Join(dir, f)); err == nil {
			t.Errorf("%s was published without report.html", f)
		}
	}
}

// `fit --out` writes report.html in the same set as the mechanism files:
// its fit table holds the terminal's cells, its mechanism section the
// reactions.yaml written, and its input section the table as read. On the
// GRI-Mech 3.0 H+CH3(+M) table (Smith et al. 1999) Troe is recommended.
func TestFitReportFile(t *testing.T) {
	dir := filepath.Join(t.TempDir(), "out")
	code, out, errs := runCLI(t, "fit", "-q", "--forms", "troe,plog,chebyshev", "--reactants", "H,CH3", "--products", "CH4", "--out", dir, griTable)
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	b, err := os.ReadFile(filepath.Join(dir, htmlReportName))
	if err != nil {
		t.Fatal(err)
	}
	page := string(b)
	term, cells := terminalTable(t, out, "k in"), pageTable(t, page, "fits")
	if len(term) == 0 || fmt.Sprint(term) != fmt.Sprint(cells) {
		t.Errorf("the terminal's fit table and the report's differ:\nterminal %q\nreport   %q", term, cells)
	}
	yaml, err := os.ReadFile(filepath.Join(dir, "reactions.yaml"))
	if err != nil {
		t.Fatal(err)
	}
	src, err := os.ReadFile(griTable)
	if err != nil {
		t.Fatal(err)
	}
	for what, want := range map[string]string{"reactions.yaml": string(yaml), "the table": string(src), "recommendation": "Recommended: troe"} {
		if !strings.Contains(html.UnescapeString(page), want) {
			t.Errorf("report.html lacks %s", what)
		}
	}
}

// A batch writes index.html beside the merged mechanism: the summary
// table's cells (reaction, equation, state, recommended form, fit error,
// warnings), each finished reaction's name linking to the report.html in
// its own folder, which exists; the broken input is a FAILED row without
// a link, and its error is in the warnings box.
func TestBatchIndex(t *testing.T) {
	out := filepath.Join(t.TempDir(), "b")
	stdout, _ := runBatch(t, exitInput, filepath.Join(batchData, "broken.yaml"), "--out", out, "-q")
	dir := filepath.Join(out, batchMechanism)
	b, err := os.ReadFile(filepath.Join(dir, "index.html"))
	if err != nil {
		t.Fatal(err)
	}
	page := string(b)
	term, cells := terminalTable(t, stdout, "broken.yaml"), pageTable(t, page, "reactions")
	if len(term) != 5 || fmt.Sprint(term) != fmt.Sprint(cells) {
		t.Errorf("the summary table and the index's differ:\nsummary %q\nindex   %q", term, cells)
	}
	links := regexp.MustCompile(`<a href="(\.\./[^"]+)">([^<]+)</a>`).FindAllStringSubmatch(page, -1)
	var linked []string
	for _, l := range links {
		linked = append(linked, l[2])
		if _, err := os.Stat(filepath.Join(dir, filepath.FromSlash(l[1]))); err != nil {
			t.Errorf("%s links to a missing page: %v", l[2], err)
		}
	}
	if strings.Join(linked, " ") != "r01 r02 r03" {
		t.Errorf("linked reactions %v, want r01 r02 r03 (r-bad failed)", linked)
	}
	i := strings.Index(page, `id="warnings"`)
	if i < 0 || !strings.Contains(page[i:i+strings.Index(page[i:], "</section>")], "r-bad: FAILED: ") {
		t.Error("the warnings box does not name the failed reaction")
	}
}

// The recombination direction (k in cm3 mol-1 s-1, k0 in cm6 mol-2 s-1)
// in Torr: the report's limits, k(T,P) and fit tables hold the terminal's
// cells, units in the headers included.
func TestRatesReportRecombination(t *testing.T) {
	dir := filepath.Join(t.TempDir(), "out")
	code, out, errs := runCLI(t, "rates", "-q", "--skip-check", "--direction", "recombination", "--pressure-unit", "Torr", "--out", dir, recombFile)
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	b, err := os.ReadFile(filepath.Join(dir, htmlReportName))
	if err != nil {
		t.Fatal(err)
	}
	for _, c := range []struct{ title, id string }{{"k(T,P) / ", "grid"}, {"+-------+", "limits"}, {"fits to the grid (", "fits"}} {
		term, cells := terminalTable(t, out, c.title), pageTable(t, string(b), c.id)
		if len(term) == 0 || fmt.Sprint(term) != fmt.Sprint(cells) {
			t.Errorf("%s: the terminal's table and the report's differ:\nterminal %q\nreport   %q", c.id, term, cells)
		}
	}
	if !strings.Contains(string(b), "k0 / cm6 mol-2 s-1") {
		t.Error("no k0 column in cm6 mol-2 s-1")
	}
}
