package main

import (
	"bytes"
	"encoding/csv"
	"encoding/json"
	"fmt"
	"github.com/falloff-kinetics/falloff/pkg/job"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"github.com/falloff-kinetics/falloff/pkg/collision"
)

const ch3ncFile = "../../testdata/ch3nc-falloff.yaml"

func TestRatesTerminal(t *testing.T) {
	code, out, errs := runCLI(t, "rates", "-q", ch3ncFile)
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	golden(t, "rates-ch3nc.txt", out)
}

// `rates --json` carries the fields of docs/design.md §8 with consistent shapes,
// and physics the grid must obey: k rises with pressure and stays below the
// high-pressure limit; the thermal average of k(E) matches canonical TST to
// 0.5 % (Holbrook, Pilling & Robertson 1996, eq. 4.26). The output does not
// depend on the number of workers.
func TestRatesJSON(t *testing.T) {
	code, out, errs := runCLI(t, "rates", "--json", "--jobs", "1", ch3ncFile)
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var r job.RatesResult
	dec := json.NewDecoder(strings.NewReader(out))
	dec.DisallowUnknownFields()
	if err := dec.Decode(&r); err != nil {
		t.Fatal(err)
	}
	nT, nP := len(r.Temperatures), len(r.Pressures)
	if nT != 3 || nP != 5 || len(r.K) != nT || len(r.K0) != nT || len(r.KInf) != nT || len(r.CollisionFreq) != nT {
		t.Fatalf("shapes: %d T, %d P, k %d rows", nT, nP, len(r.K))
	}
	if r.KUnits != "s-1" || r.K0Units == "" || r.Direction != "isomerization" {
		t.Errorf("units or direction: %q %q %q", r.KUnits, r.K0Units, r.Direction)
	}
	for i := range r.K {
		if len(r.K[i]) != nP {
			t.Fatalf("row %d has %d pressures", i, len(r.K[i]))
		}
		for j, k := range r.K[i] {
			if k > r.KInfIntegrated[i]*(1+1e-9) || (j > 0 && k < r.K[i][j-1]) {
				t.Errorf("T = %v, P = %v: k = %v breaks monotonicity or exceeds k∞ %v", r.Temperatures[i], r.Pressures[j], k, r.KInfIntegrated[i])
			}
		}
		if d := r.KInfIntegrated[i]/r.KInf[i] - 1; d > 0.005 || d < -0.005 {
			t.Errorf("T = %v: k∞(ME)/k∞(TST) − 1 = %.3g", r.Temperatures[i], d)
		}
	}
	_, out2, _ := runCLI(t, "rates", "--json", "--jobs", "3", ch3ncFile)
	if out2 != out {
		t.Error("--jobs 3 output differs from --jobs 1")
	}
	// Golden JSON, numbers compared to 1e-6 (a fit minimum may move in the
	// last digits with the floating-point unit's fused multiply-adds).
	goldenJSON(t, "rates-ch3nc.json", out, 1e-6)
}

// BenchmarkDemo times the main job on the built-in demo: the 12 × 13 grid,
// fits and all output files (target: a few seconds).
func BenchmarkDemo(b *testing.B) {
	dir := b.TempDir()
	for b.Loop() {
		var out, errb strings.Builder
		if code := run([]string{"rates", "-q", "--out", dir, "--plots", dir}, strings.NewReader(""), &out, &errb); code != exitOK {
			b.Fatalf("exit %d: %s", code, errb.String())
		}
	}
}

// `rates --csv` writes one row per grid point, units in the header.
func TestRatesCSV(t *testing.T) {
	code, out, errs := runCLI(t, "rates", "--csv", "--skip-check", ch3ncFile)
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	rows, err := csv.NewReader(strings.NewReader(out)).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	if strings.Join(rows[0], ",") != "T/K,P/bar,k/s-1" || len(rows) != 1+3*5 {
		t.Fatalf("header %v, %d rows", rows[0], len(rows))
	}
	// 760 Torr is exactly 1.01325 bar.
	if p, _ := strconv.ParseFloat(rows[4][1], 64); math.Abs(p-1.01325) > 1e-15 {
		t.Errorf("fourth pressure %v bar, want 1.01325", p)
	}
}

// Every number carries the unit of what it shows: in the recombination
// direction the grid is second order, so the CSV (in the units asked for)
// says cm3 mol-1 s-1, its values are the JSON's per-molecule k times N_A
// (CODATA 2018, exact), its pressures are in atm, and `fit` reads the table
// back in those units; the terminal labels k∞ and k0 with their
// second- and third-order units.
func TestRecombinationUnits(t *testing.T) {
	args := []string{"rates", "-q", "--skip-check", "--direction", "recombination", recombFile}
	code, js, errs := runCLI(t, append(args, "--json")...)
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var r job.RatesResult
	if err := json.Unmarshal([]byte(js), &r); err != nil {
		t.Fatal(err)
	}
	_, out, _ := runCLI(t, append(args, "--csv", "--pressure-unit", "atm")...)
	rows, err := csv.NewReader(strings.NewReader(out)).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	if got := strings.Join(rows[0], ","); got != "T/K,P/atm,k/cm3 mol-1 s-1" {
		t.Fatalf("header %q", got)
	}
	const na = 6.02214076e23
	for i := range r.Temperatures {
		for j := range r.Pressures {
			row := rows[1+i*len(r.Pressures)+j]
			p, _ := strconv.ParseFloat(row[1], 64)
			k, _ := strconv.ParseFloat(row[2], 64)
			if math.Abs(p*101325/r.Pressures[j]-1) > 1e-14 || math.Abs(k/(r.K[i][j]*na)-1) > 1e-14 {
				t.Fatalf("row %v: want P = %g Pa, k = %g cm3 molecule-1 s-1 × N_A", row, r.Pressures[j], r.K[i][j])
			}
		}
	}
	table := filepath.Join(t.TempDir(), "grid.csv")
	if err := os.WriteFile(table, []byte(out), 0o644); err != nil {
		t.Fatal(err)
	}
	_, fitOut, fitErr := runCLI(t, "fit", "--forms", "troe", table)
	if !strings.Contains(fitOut, "k in cm3 mol-1 s-1") {
		t.Errorf("fit did not read the units back: %s %s", fitOut, fitErr)
	}
	_, text, _ := runCLI(t, args...)
	for _, want := range []string{"k∞ / cm3 mol-1 s-1", "k0 / cm6 mol-2 s-1", "k(T,P) / cm3 mol-1 s-1"} {
		if !strings.Contains(text, want) {
			t.Errorf("terminal report lacks %q", want)
		}
	}
}

func TestRatesErrors(t *testing.T) {
	dir := t.TempDir()
	text, err := os.ReadFile(ch3ncFile)
	if err != nil {
		t.Fatal(err)
	}
	write := func(name, old, repl string) string {
		p := filepath.Join(dir, name)
		if err := os.WriteFile(p, []byte(strings.Replace(string(text), old, repl, 1)), 0o644); err != nil {
			t.Fatal(err)
		}
		return p
	}
	checkFailures(t, []failCase{
		{"no pressures", []string{"rates", hcnFile}, exitInput, "grid.pressures"},
		{"unknown gas", []string{"rates", write("gas.yaml", "gas: Ar", "gas: SF6")}, exitInput, "bath.gas"},
		{"no reactant LJ", []string{"rates", write("lj.yaml", "    lennard-jones: {sigma: 4.47 angstrom, epsilon: 380 K}\n", "")}, exitInput, "lennard-jones"},
		{"json and csv", []string{"rates", "--json", "--csv", ch3ncFile}, exitUsage, "exclude"},
		{"grain without unit", []string{"rates", "--grain", "50", ch3ncFile}, exitUsage, "no unit"},
		{"grid too large", []string{"rates", "--grain", "1 cm-1", ch3ncFile}, exitInput, "memory"},
	})
}

// The convergence check runs on inputs it once failed on: a barrierless main
// channel (no transition-state counter; it panicked) and a master-equation
// grain less than twice the fine grain (half of it cannot be counted; it
// exited 3 after the whole grid). The strong collider keeps the runs short.
func TestRatesConvergenceCheckEdges(t *testing.T) {
	dir := t.TempDir()
	strong := func(name, file string, edits ...string) string {
		t.Helper()
		text, err := os.ReadFile(file)
		if err != nil {
			t.Fatal(err)
		}
		s := string(text)
		for i := 0; i+1 < len(edits); i += 2 {
			if !strings.Contains(s, edits[i]) {
				t.Fatalf("%s: no %q", file, edits[i])
			}
			s = strings.Replace(s, edits[i], edits[i+1], 1)
		}
		p := filepath.Join(dir, name)
		if err := os.WriteFile(p, []byte(s), 0o644); err != nil {
			t.Fatal(err)
		}
		return p
	}
	cases := []struct{ name, path string }{
		{"barrierless", strong("barrierless.yaml", barrierlessFile,
			"  model: exponential-down\n  alpha-300: 200 cm-1\n  alpha-exponent: 0.8\n", "  model: strong-collider\n")},
		{"grain below twice the fine grain", strong("grain.yaml", "../../testdata/demo.yaml",
			"  model: exponential-down\n  alpha-300: 250 cm-1\n  alpha-exponent: 0.85\n", "  model: strong-collider\n",
			"points: 16}", "points: 2}",
			"fits: [troe, plog, chebyshev]", "energy-grid: {fine-grain: 10 cm-1, master-equation-grain: 15 cm-1}")},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			code, out, errs := runCLI(t, "rates", "--json", tc.path)
			if code != exitOK {
				t.Fatalf("exit %d: %s", code, errs)
			}
			var r job.RatesResult
			if err := json.Unmarshal([]byte(out), &r); err != nil {
				t.Fatal(err)
			}
			if r.Convergence == nil {
				t.Error("no convergence figure: the check did not run")
			}
		})
	}
}

// A numerical failure in the master equation exits 3 with one line that
// names the input, the (T, P) point, the stage and a hint.
func TestNumericalFailureMessage(t *testing.T) {
	pe := &collision.PointError{T: 1500, P: 1e3, Stage: "k(T,P)", Err: fmt.Errorf("%w after 1000 inverse iterations", collision.ErrNoConvergence)}
	var errb bytes.Buffer
	code := exitCode(&job.NumericalError{Err: fmt.Errorf("x.yaml: master equation: %w", pe)}, &errb)
	want := "falloff: x.yaml: master equation: T = 1500 K, P = 1000 Pa (0.01 bar): k(T,P): collision: master equation: no convergence after 1000 inverse iterations (hint: "
	if code != exitNumerical || !strings.HasPrefix(errb.String(), want) || strings.Count(errb.String(), "\n") != 1 {
		t.Errorf("exit %d, stderr %q", code, errb.String())
	}
}

// rates warns where the low-pressure rate is a sizeable share of the
// collision rate (k0/Z > 0.1: chemical and relaxation time scales not
// separated), naming those temperatures: on the demo (42 kcal/mol, 18
// modes) only at 2500 K, where k0/Z recomputed from the JSON is above 0.1
// and below it at 1500 K; CH3NC below 1200 K never.
func TestSeparationWarning(t *testing.T) {
	for _, tc := range []struct {
		args []string
		want string // "" for no warning
	}{
		{[]string{"rates", "--json", "--skip-check", "../../testdata/catalogue-base.yaml"}, "at 2500 K the low-pressure rate is more than 0.1 of the collision rate"},
		{[]string{"rates", "--json", "--skip-check", ch3ncFile}, ""},
	} {
		code, out, errs := runCLI(t, tc.args...)
		if code != exitOK {
			t.Fatalf("exit %d: %s", code, errs)
		}
		var r job.RatesResult
		if err := json.Unmarshal([]byte(out), &r); err != nil {
			t.Fatal(err)
		}
		var got []string
		for _, w := range r.Warnings {
			if strings.Contains(w, "collision rate") {
				got = append(got, w)
			}
		}
		switch {
		case tc.want == "" && len(got) > 0:
			t.Errorf("%v: unexpected warning %q", tc.args, got)
		case tc.want != "" && (len(got) != 1 || !strings.Contains(got[0], tc.want)):
			t.Errorf("%v: warnings %q, want one containing %q", tc.args, got, tc.want)
		}
		for i, tK := range r.Temperatures {
			// k0 in cm3 molecule-1 s-1 against Z = ω/[M] at 1 Pa.
			f := r.K0[i] / (r.CollisionFreq[i] / collision.Concentration(1, tK))
			if warned := tc.want != "" && tK == 2500; warned != (f > job.SeparationLimit) {
				t.Errorf("%v: %v K: k0/Z = %.3g, warned %v", tc.args, tK, f, warned)
			}
		}
	}
}

// rates checks its --grain against the fine grain and the memory limit
// before counting states.
func TestRatesGrainFlag(t *testing.T) {
	checkFailures(t, []failCase{
		{"grain below the fine grain", []string{"rates", "--grain", "0.5 cm-1", ch3ncFile}, exitUsage, "below the fine counting grain"},
		{"convergence grid too large", []string{"rates", "--grain", "5 cm-1", ch3ncFile}, exitInput, "--skip-check"},
	})
}
