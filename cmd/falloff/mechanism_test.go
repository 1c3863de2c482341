package main

import (
	"bytes"
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"go.yaml.in/yaml/v3"

	"github.com/falloff-kinetics/falloff/pkg/fit"
	"github.com/falloff-kinetics/falloff/pkg/input"
	"github.com/falloff-kinetics/falloff/pkg/job"
	"github.com/falloff-kinetics/falloff/pkg/rrkm"
)

const recombFile = "../../testdata/ring-recombination.yaml"

// readSummary reads summary.json back into the report type.
func readSummary(t *testing.T, dir string) job.RatesResult {
	t.Helper()
	b, err := os.ReadFile(filepath.Join(dir, "summary.json"))
	if err != nil {
		t.Fatal(err)
	}
	var r job.RatesResult
	if err := json.Unmarshal(b, &r); err != nil {
		t.Fatal(err)
	}
	return r
}

// End to end: `rates --out` writes every file; read back, grid.csv equals
// the summary's grid, every fitted form in summary.json reproduces that grid
// within its reported error, the YAML files parse, and no temporary file is
// left behind.
func TestRatesOutFiles(t *testing.T) {
	for _, tc := range []struct {
		file, direction string
	}{{ch3ncFile, string(job.Forward)}, {recombFile, string(job.Recombination)}} {
		t.Run(tc.direction, func(t *testing.T) {
			dir := filepath.Join(t.TempDir(), "out")
			code, _, errs := runCLI(t, "rates", "-q", "--skip-check", "--write-failed", "--direction", tc.direction, "--out", dir, "--plots", dir, "--skeleton", tc.file)
			if code != exitOK {
				t.Fatalf("exit %d: %s", code, errs)
			}
			sum := readSummary(t, dir)
			entries, _ := os.ReadDir(dir)
			var names []string
			for _, e := range entries {
				names = append(names, e.Name())
				if strings.HasPrefix(e.Name(), ".") && e.Name() != ".falloff-set" { // the set's record stays
					t.Errorf("temporary file left: %s", e.Name())
				}
			}
			for _, want := range []string{"reactions.yaml", "reactions.txt", "grid.csv", "summary.json", "phase-example.yaml",
				"falloff.svg", "arrhenius.svg", "micro.svg", "density.svg"} {
				if !strings.Contains(strings.Join(names, " "), want) {
					t.Errorf("%s not written (have %v)", want, names)
				}
			}
			// Three temperatures, each with its computed points and the
			// recommended fit.
			if got := svgCurves(t, filepath.Join(dir, "falloff.svg")); got != 6 {
				t.Errorf("falloff.svg has %d curves, want 6", got)
			}
			f, err := os.Open(filepath.Join(dir, "grid.csv"))
			if err != nil {
				t.Fatal(err)
			}
			defer f.Close()
			tab, err := fit.ReadCSV("grid.csv", f)
			if err != nil {
				t.Fatal(err)
			}
			if len(tab.Points) != len(sum.Temperatures)*len(sum.Pressures) {
				t.Fatalf("grid.csv has %d points", len(tab.Points))
			}
			// grid.csv is in the run's units (per mol by default); the fits
			// are per molecule, as the JSON is.
			perMol := 1.0
			if tc.direction == string(job.Recombination) {
				perMol = 6.02214076e23 // N_A, CODATA 2018 (exact)
				if tab.KUnits != "cm3 mol-1 s-1" {
					t.Errorf("grid.csv k units %q, want cm3 mol-1 s-1", tab.KUnits)
				}
			}
			for name, rep := range sum.Fits.Reports() {
				ev := sum.Fits.Form(name)
				for _, p := range tab.Points {
					if d := math.Abs(ev.Eval(p.T, p.P)*perMol/p.K - 1); !(d <= rep.MaxError()*(1+1e-6)+1e-9) {
						t.Fatalf("%s at %v K, %v Pa: error %.3g above the reported %.3g", name, p.T, p.P, d, rep.MaxError())
					}
				}
			}
			for _, n := range names {
				if strings.HasSuffix(n, ".yaml") {
					b, _ := os.ReadFile(filepath.Join(dir, n))
					var doc map[string]any
					if err := yaml.Unmarshal(b, &doc); err != nil {
						t.Errorf("%s: %v", n, err)
					}
				}
			}
		})
	}
}

// Detailed balance: the recombination grid is the dissociation grid divided
// by K_c(T) computed, here independently of the command, from the same
// partition functions (rrkm.EquilibriumConstant): k_f/k_r = K_c to rounding
// (1e-12) at every grid point.
func TestRecombinationDetailedBalance(t *testing.T) {
	var fwd, rev job.RatesResult
	for _, c := range []struct {
		dir string
		r   *job.RatesResult
	}{{string(job.Forward), &fwd}, {string(job.Recombination), &rev}} {
		code, out, errs := runCLI(t, "rates", "--json", "--skip-check", "--direction", c.dir, recombFile)
		if code != exitOK {
			t.Fatalf("exit %d: %s", code, errs)
		}
		if err := json.Unmarshal([]byte(out), c.r); err != nil {
			t.Fatal(err)
		}
	}
	if rev.Direction != string(job.Recombination) || rev.KUnits != "cm3 molecule-1 s-1" || rev.K0Units != "cm6 molecule-2 s-1" {
		t.Errorf("recombination labels: %q %q %q", rev.Direction, rev.KUnits, rev.K0Units)
	}
	src, _ := os.ReadFile(recombFile)
	m, err := input.Parse(recombFile, src)
	if err != nil {
		t.Fatal(err)
	}
	r, _ := m.ReactantAndTS()
	prods := []*rrkm.Species{&m.Molecule("frag-a").Species, &m.Molecule("frag-b").Species}
	for i, tk := range fwd.Temperatures {
		kc := rrkm.EquilibriumConstant(&r.Species, prods, m.Reaction.ReactionEnergy, tk)
		for j := range fwd.Pressures {
			if got := fwd.K[i][j] / rev.K[i][j]; math.Abs(got/kc-1) > 1e-12 {
				t.Errorf("%v K: k_f/k_r = %.15g, K_c = %.15g", tk, got, kc)
			}
		}
		if got := fwd.K0[i] / rev.K0[i]; math.Abs(got/kc-1) > 1e-12 {
			t.Errorf("%v K: k0 ratio %.15g, K_c %.15g", tk, got, kc)
		}
	}
}

// Golden file of the recombination mechanism text (reviewed by hand once).
func TestRecombinationGolden(t *testing.T) {
	dir := t.TempDir()
	if code, _, errs := runCLI(t, "rates", "-q", "--skip-check", "--write-failed", "--direction", string(job.Recombination), "--energy-unit", "kJ/mol", "--out", dir, recombFile); code != exitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	for _, n := range []string{"reactions-troe.txt", "reactions-plog.yaml"} {
		b, err := os.ReadFile(filepath.Join(dir, n))
		if err != nil {
			t.Fatal(err)
		}
		golden(t, "recombination-"+n, string(bytes.ReplaceAll(b, []byte(recombFile), []byte("INPUT"))))
	}
}

func TestRecombinationErrors(t *testing.T) {
	checkFailures(t, []failCase{
		{"isomerization", []string{"rates", "--direction", string(job.Recombination), ch3ncFile}, exitInput, "reaction.products"},
		{"no reaction energy", []string{"rates", "-q", "--direction", string(job.Recombination)}, exitInput, "reaction-energy"},
		{"bad direction", []string{"rates", "--direction", "sideways", ch3ncFile}, exitUsage, "forward or recombination"},
		{"bad unit", []string{"rates", "--energy-unit", "erg", ch3ncFile}, exitUsage, "erg"},
	})
}

// A failed fit is not a mechanism unless asked for: on CH3NC's small grid
// every form fails its tolerance, so rates --out writes only grid.csv,
// report.html and summary.json and says why; on the demo Chebyshev meets it (on the grid
// and between its points) and is written as reactions.yaml and
// reactions-chebyshev, while the failed Troe and PLOG fits are not.
func TestFailedFitsNotWritten(t *testing.T) {
	dir := t.TempDir()
	code, _, errs := runCLI(t, "rates", "--skip-check", "--out", dir, ch3ncFile)
	if code != exitOK || !strings.Contains(errs, "no reactions.yaml written") {
		t.Fatalf("exit %d, stderr %q", code, errs)
	}
	var got []string
	entries, _ := os.ReadDir(dir)
	for _, e := range entries {
		if !strings.HasPrefix(e.Name(), ".") {
			got = append(got, e.Name())
		}
	}
	if strings.Join(got, " ") != "grid.csv report.html summary.json" {
		t.Errorf("all fits failed, yet the folder holds %v", got)
	}
	dir = t.TempDir()
	if code, _, errs := runCLI(t, "rates", "-q", "--skip-check", "--out", dir); code != exitOK {
		t.Fatalf("demo: exit %d: %s", code, errs)
	}
	sum := readSummary(t, dir)
	if sum.Fits.Recommended != fit.FormChebyshev {
		t.Fatalf("demo recommends %q", sum.Fits.Recommended)
	}
	for name, want := range map[string]bool{"reactions.yaml": true, "reactions-chebyshev.yaml": true,
		"reactions-troe.yaml": !sum.Fits.Troe.Failed, "reactions-plog.yaml": !sum.Fits.PLOG.Failed} {
		if _, err := os.Stat(filepath.Join(dir, name)); (err == nil) != want {
			t.Errorf("%s written: %v, want %v", name, err == nil, want)
		}
	}
}
