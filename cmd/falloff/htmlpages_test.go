package main

import (
	"bytes"
	"context"
	"encoding/csv"
	"encoding/json"
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"reflect"
	"strconv"
	"strings"
	"syscall"
	"testing"

	"github.com/falloff-kinetics/falloff/pkg/job"
	"github.com/falloff-kinetics/falloff/pkg/units"
)

// sameBody checks that the page's table holds the terminal's rows cell for
// cell, and that each page header starts with the terminal's (the page
// adds the unit the terminal gives in the table's title line).
func sameBody(t *testing.T, what string, term, page [][]string) {
	t.Helper()
	if len(term) < 2 || len(term) != len(page) {
		t.Errorf("%s: terminal %d rows, report %d", what, len(term), len(page))
		return
	}
	if fmt.Sprint(term[1:]) != fmt.Sprint(page[1:]) {
		t.Errorf("%s: the terminal's rows and the report's differ:\nterminal %q\nreport   %q", what, term[1:], page[1:])
	}
	if len(term[0]) != len(page[0]) {
		t.Errorf("%s: header %q, terminal %q", what, page[0], term[0])
		return
	}
	for i, h := range term[0] {
		if !strings.HasPrefix(page[0][i], h) {
			t.Errorf("%s: header %q does not start with the terminal's %q", what, page[0][i], h)
		}
	}
}

// `uncertainty --out` writes report.html in the same set as its other
// files: listed in uncertainty.json and on the terminal, its tables of the
// uncertain values, the band, the limits with f(T), the sensitivities and
// the ranking hold the very cells of the terminal's tables (same digits;
// the band and limits headers add their units), its warnings box the
// missing reactions.yaml that --quiet kept off stderr.
func TestUncertaintyReportFile(t *testing.T) {
	dir := filepath.Join(t.TempDir(), "out")
	code, out, errs := runCLI(t, "uncertainty", smallUncertain, "-n", "3", "--seed", "5", "-q", "--out", dir)
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	path := filepath.Join(dir, htmlReportName)
	b, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	page := string(b)
	var sum struct {
		Files []string `json:"files_written"`
	}
	s, err := os.ReadFile(filepath.Join(dir, uncertaintyJSONFile))
	if err != nil {
		t.Fatal(err)
	}
	if err := json.Unmarshal(s, &sum); err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(strings.Join(sum.Files, "\n"), path) || !strings.Contains(out, path) {
		t.Errorf("report.html is not listed in uncertainty.json (%q) or on the terminal", sum.Files)
	}
	for _, c := range []struct{ title, id string }{{"Monte Carlo:", "inputs"}, {"sensitivity coefficients of ln k:", "sensitivities"}, {"which value dominates where", "ranking"}} {
		term, cells := terminalTable(t, out, c.title), pageTable(t, page, c.id)
		if len(term) == 0 || fmt.Sprint(term) != fmt.Sprint(cells) {
			t.Errorf("%s: the terminal's table and the report's differ:\nterminal %q\nreport   %q", c.id, term, cells)
		}
	}
	sameBody(t, "band", terminalTable(t, out, "k(T,P) / s-1: nominal"), pageTable(t, page, "band"))
	sameBody(t, "limits", terminalTable(t, out, "limits: k∞"), pageTable(t, page, "factor"))
	fitLine := out[strings.Index(out, "fitted f(T) = ")+len("fitted f(T) = "):]
	fitLine = fitLine[:strings.Index(fitLine, ",")]
	if !strings.Contains(page, "Fitted f(T) = "+fitLine) {
		t.Errorf("the report does not state the terminal's fitted f(T) = %s", fitLine)
	}
	if i := strings.Index(page, `id="warnings"`); i < 0 || !strings.Contains(page[i:i+strings.Index(page[i:], "</section>")], "no reactions.yaml written") {
		t.Error("the warnings box does not say that no reactions.yaml was written")
	}
}

// `compare --out DIR` writes the figure, the CSV, the JSON and report.html
// together. The page's k/k∞ table is the terminal's cell for cell and its
// k0 columns the terminal's k0 table; compare.json is what --json prints
// plus the files written; the CSV holds the same numbers in full
// precision (strconv's shortest round-trip form, so equal exactly after
// the same unit conversion).
func TestCompareOut(t *testing.T) {
	dir := filepath.Join(t.TempDir(), "cmp")
	code, out, errs := runCLI(t, "compare", "-q", "--alpha", "150 cm-1", "--alpha", "600 cm-1", "--out", dir, "--plot-temperatures", "800 K", ch3ncFile)
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	for _, name := range []string{"compare.svg", compareCSVFile, compareJSONFile, htmlReportName} {
		if !strings.Contains(out, filepath.Join(dir, name)) {
			t.Errorf("the terminal does not list %s as written", name)
		}
	}
	b, err := os.ReadFile(filepath.Join(dir, htmlReportName))
	if err != nil {
		t.Fatal(err)
	}
	page := string(b)
	term, cells := terminalTable(t, out, "k(T,P)/k∞ under each"), pageTable(t, page, "ratio")
	if len(term) == 0 || fmt.Sprint(term) != fmt.Sprint(cells) {
		t.Errorf("k/k∞: the terminal's table and the report's differ:\nterminal %q\nreport   %q", term, cells)
	}
	k0 := pageTable(t, page, "limits")
	for i := range k0 {
		k0[i] = append(k0[i][:1], k0[i][2:]...) // without the k∞ column the terminal does not print
	}
	for m := 1; m < len(k0[0]); m++ {
		k0[0][m] = strings.TrimPrefix(k0[0][m], "k0 ") // "k0 MODEL / unit": the terminal says k0 in its title line
	}
	sameBody(t, "k0", terminalTable(t, out, "k0 / cm3 mol-1 s-1:"), k0)
	if !strings.Contains(page, "800 K, strong collider") {
		t.Error("the figure does not follow --plot-temperatures")
	}
	svg, err := os.ReadFile(filepath.Join(dir, "compare.svg"))
	if err != nil {
		t.Fatal(err)
	}
	if _, body, _ := bytes.Cut(svg, []byte("<svg")); !strings.Contains(page, string(body)) {
		t.Error("compare.svg is not inlined unchanged in the page")
	}

	var written struct {
		job.CompareResult
		Files []string `json:"files_written"`
	}
	j, err := os.ReadFile(filepath.Join(dir, compareJSONFile))
	if err != nil {
		t.Fatal(err)
	}
	if err := json.Unmarshal(j, &written); err != nil {
		t.Fatal(err)
	}
	code, out, errs = runCLI(t, "compare", "--json", "--alpha", "150 cm-1", "--alpha", "600 cm-1", ch3ncFile)
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var printed job.CompareResult
	if err := json.Unmarshal([]byte(out), &printed); err != nil {
		t.Fatal(err)
	}
	if !reflect.DeepEqual(written.CompareResult, printed) || len(written.Files) != 4 {
		t.Errorf("compare.json differs from --json, or lists %d files (want 4)", len(written.Files))
	}
	if strings.Contains(out, "files_written") {
		t.Error("--json without --out prints files_written")
	}

	f, err := os.Open(filepath.Join(dir, compareCSVFile))
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	rows, err := csv.NewReader(f).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	r := written.CompareResult
	nM := len(r.Models)
	if len(rows) != 1+len(r.Temperatures)*len(r.Pressures) || rows[0][1] != "P/bar" || rows[0][3] != "k[strong collider]/s-1" ||
		rows[0][3+nM] != "k0[strong collider]/cm3 mol-1 s-1" {
		t.Fatalf("CSV: %d rows, header %q", len(rows), rows[0])
	}
	for i := range r.Temperatures {
		for jp, p := range r.Pressures {
			row := rows[1+i*len(r.Pressures)+jp]
			if got, _ := strconv.ParseFloat(row[1], 64); got != p/units.BarPa {
				t.Errorf("CSV P %q, want %v", row[1], p/units.BarPa)
			}
			for m, md := range r.Models {
				if got, _ := strconv.ParseFloat(row[3+m], 64); got != md.K[i][jp] {
					t.Errorf("CSV k[%s] %q, want %v", md.Name, row[3+m], md.K[i][jp])
				}
			}
		}
	}
}

// compare --out is all or nothing: with a FIFO where report.html goes,
// no file of the set is published, the tables are still printed and the
// error names the page (exit 1, as rates --out).
func TestCompareOutAllOrNothing(t *testing.T) {
	dir := t.TempDir()
	if err := syscall.Mkfifo(filepath.Join(dir, htmlReportName), 0o644); err != nil {
		t.Fatal(err)
	}
	code, out, errs := runCLI(t, "compare", "-q", "--out", dir, ch3ncFile)
	if code != exitInput || !strings.Contains(out, "k(T,P)/k∞") || !strings.Contains(errs, htmlReportName) {
		t.Errorf("exit %d, stderr %q; want exit %d naming %s, with the tables printed", code, errs, exitInput, htmlReportName)
	}
	for _, f := range []string{"compare.svg", compareCSVFile, compareJSONFile} {
		if _, err := os.Stat(filepath.Join(dir, f)); err == nil {
			t.Errorf("%s was published without report.html", f)
		}
	}
}

// A cancelled compare --out writes nothing and says so (exit 130), and
// leaves no folder it created.
func TestCompareOutInterrupted(t *testing.T) {
	dir := filepath.Join(t.TempDir(), "cmp")
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	var out, errb bytes.Buffer
	code := runContext(ctx, []string{"compare", "-q", "--out", dir, ch3ncFile}, strings.NewReader(""), &out, &errb)
	if code != exitInterrupted || errb.String() != "falloff: interrupted: no file written\n" {
		t.Errorf("exit %d, stderr %q", code, errb.String())
	}
	if _, err := os.Stat(dir); !errors.Is(err, os.ErrNotExist) {
		t.Errorf("the output folder was left behind (%v)", err)
	}
}
