package main

import (
	"encoding/json"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"go.yaml.in/yaml/v3"

	"github.com/falloff-kinetics/falloff/internal/demo"
)

// example --network prints the demo network; check summarises it (the
// steps and the energy levels, highest first, in kcal/mol from the
// reference) and --json carries the same; a one-well calculation on it is
// refused with one line naming the network section.
func TestNetworkCheck(t *testing.T) {
	code, out, _ := runCLI(t, "example", "--network")
	if code != exitOK || out != string(demo.NetworkText) {
		t.Fatalf("example --network: exit %d", code)
	}
	file := filepath.Join(t.TempDir(), "net.yaml")
	if err := os.WriteFile(file, demo.NetworkText, 0o644); err != nil {
		t.Fatal(err)
	}
	code, out, errs := runCLI(t, "check", file)
	if code != exitOK {
		t.Fatalf("check: exit %d: %s", code, errs)
	}
	for _, want := range []string{"network of 2 wells, 2 fragment sets, 3 steps", "chain ↔ ring  (via closure-TS at 24.00)",
		"source: frag-a + frag-b → chain", "qualified review"} {
		if !strings.Contains(out, want) {
			t.Errorf("check output lacks %q:\n%s", want, out)
		}
	}
	// Levels highest first: ring-b + H (40), scission-TS (38.5), closure-TS
	// (24), frag-a + frag-b (22), chain (0), ring (−12).
	order := []string{"40.00", "38.50", "24.00", "22.00", "0.00", "-12.00"}
	last := -1
	for _, o := range order {
		i := strings.Index(out, "  "+o+"  ")
		if i < last {
			t.Errorf("energy level %s out of order:\n%s", o, out)
		}
		last = i
	}
	code, out, _ = runCLI(t, "check", file, "--json")
	var rep struct {
		Reference string `json:"reference"`
		Steps     []struct {
			Via     string  `json:"via"`
			Barrier float64 `json:"barrier_cm-1"`
		} `json:"steps"`
	}
	if code != exitOK || json.Unmarshal([]byte(out), &rep) != nil || rep.Reference != "chain" || len(rep.Steps) != 3 || rep.Steps[0].Via != "closure-TS" {
		t.Errorf("check --json: exit %d, %+v", code, rep)
	}
	checkFailures(t, []failCase{
		{"micro on a network", []string{"micro", file}, exitInput, "network: a network of several wells"},
		{"compare on a network", []string{"compare", file}, exitInput, "rates` gives its rate coefficients"},
		{"rates --csv on a network", []string{"rates", "--csv", file}, exitUsage, "not yet available for a network"},
	})
}

// rates --out on a network writes the mechanism files of the rate
// coefficients whose fits pass: here a one-well network (the CH3NC
// validation molecules, 4 × 9 points, 3 % tolerance), whose one entry,
// CH3NC <=> CH3CN, is read back by the YAML library.
func TestNetworkRatesOut(t *testing.T) {
	if testing.Short() {
		t.Skip("36 network solves and their fits, about 20 s")
	}
	src := `title: one-well network (CH3NC validation molecules)
molecules:
  CH3NC:
    mass: 41.0265 amu
    vibrations: {unit: cm-1, values: [278.6, 278.6, 969.7, 1162.4, 1162.4, 1481.5, 1517.0, 1517.0, 2249.9, 3064.2, 3138.0, 3138.0]}
    rotation: {constants: {unit: cm-1, values: [5.27235, 0.333999, 0.333999]}, symmetry: 3}
    lennard-jones: {sigma: 4.47 angstrom, epsilon: 380 K}
  TS:
    energy: 38.0989 kcal/mol
    imaginary-frequency: 440.4 cm-1
    vibrations: {unit: cm-1, values: [208.6, 621.9, 999.6, 1002.0, 1350.0, 1492.8, 1506.8, 2020.7, 3113.7, 3204.7, 3245.0]}
    rotation: {constants: {unit: cm-1, values: [1.35081, 0.526916, 0.409692]}, symmetry: 1}
network:
  reference: CH3NC
  wells: {CH3NC: {}}
  fragments: {iso: {species: [CH3CN], energy: -24.18585 kcal/mol}}
  steps: [{from: CH3NC, to: iso, via: TS}]
bath: {gas: Ar}
energy-transfer: {model: exponential-down, alpha-300: 300 cm-1}
grid:
  temperatures: {from: 800 K, to: 1200 K, points: 4}
  pressures: {from: 0.1 bar, to: 10 bar, points: 9}
`
	dir := t.TempDir()
	file := filepath.Join(dir, "net.yaml")
	if err := os.WriteFile(file, []byte(src), 0o644); err != nil {
		t.Fatal(err)
	}
	out := filepath.Join(dir, "out")
	plotsDir := filepath.Join(dir, "plots")
	code, js, errs := runCLI(t, "rates", "-q", "--json", "--tolerance", "3", "--out", out, "--plots", plotsDir, file)
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var res struct {
		KProducts [][][][]float64 `json:"k_products_per_s"`
		Channels  []struct {
			Written     bool   `json:"written"`
			Recommended string `json:"recommended"`
		} `json:"channels"`
	}
	if err := json.Unmarshal([]byte(js), &res); err != nil {
		t.Fatal(err)
	}
	if len(res.Channels) != 1 || !res.Channels[0].Written {
		t.Fatalf("channels %+v", res.Channels)
	}
	y, err := os.ReadFile(filepath.Join(out, "reactions.yaml"))
	if err != nil {
		t.Fatal(err)
	}
	var doc struct {
		Reactions []struct {
			Equation string `yaml:"equation"`
		} `yaml:"reactions"`
	}
	if err := yaml.Unmarshal(y, &doc); err != nil || len(doc.Reactions) != 1 || doc.Reactions[0].Equation != "CH3NC <=> CH3CN" {
		t.Fatalf("reactions.yaml: %v, %+v", err, doc.Reactions)
	}
	for _, f := range []string{filepath.Join(out, "reactions.txt"), filepath.Join(plotsDir, "populations.svg"), filepath.Join(plotsDir, "k-vs-P.svg")} {
		if _, err := os.Stat(f); err != nil {
			t.Error(err)
		}
	}
}

// TestNetworkYieldsPlot: with a bimolecular source, --plots draws the
// yields against pressure beside the populations and the rate
// coefficients, one curve per well (stabilised) and per product
// (chemically activated), from the yields the tables show; --out writes
// report.html with the mechanism files (internal/report checks its
// content).
func TestNetworkYieldsPlot(t *testing.T) {
	dir := t.TempDir()
	file := filepath.Join(dir, "net.yaml")
	if err := os.WriteFile(file, demo.NetworkText, 0o644); err != nil {
		t.Fatal(err)
	}
	plotsDir := filepath.Join(dir, "plots")
	out := filepath.Join(dir, "out")
	if code, _, errs := runCLI(t, "rates", "-q", "--plots", plotsDir, "--out", out, "--write-failed", file); code != exitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	for _, f := range []string{"reactions.yaml", "reactions.txt", htmlReportName} {
		if _, err := os.Stat(filepath.Join(out, f)); err != nil {
			t.Error(err)
		}
	}
	svg, err := os.ReadFile(filepath.Join(plotsDir, "yields.svg"))
	if err != nil {
		t.Fatal(err)
	}
	for _, want := range []string{"stabilised in chain", "stabilised in ring", "per captured molecule"} {
		if !strings.Contains(string(svg), want) {
			t.Errorf("yields.svg has no %q", want)
		}
	}
}
