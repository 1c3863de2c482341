package main

import (
	"bytes"
	"context"
	"encoding/csv"
	"encoding/json"
	"errors"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/falloff-kinetics/falloff/pkg/uncertainty"
)

// smallUncertain is the uncertainty package's small test input: two
// temperatures, two pressures, four uncertain values.
const smallUncertain = "../../pkg/uncertainty/testdata/small.yaml"

// `uncertainty --json` prints one object with the band at every grid
// point, the seed it used and the sensitivities; the same seed gives the
// same JSON with one worker and with two (the library's guarantee, seen
// through the command).
func TestUncertaintyJSON(t *testing.T) {
	args := []string{"uncertainty", smallUncertain, "--samples", "4", "--seed", "7", "--json"}
	code, out, errs := runCLI(t, append(args, "--workers", "1")...)
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	if errs != "" {
		t.Errorf("--json wrote to stderr: %q", errs)
	}
	var res uncertainty.Result
	if err := json.Unmarshal([]byte(out), &res); err != nil {
		t.Fatal(err)
	}
	if res.Seed != 7 || res.Samples != 4 || len(res.K) != 2 || len(res.K[0]) != 2 || len(res.Sensitivities) != 4 || len(res.Dominant) != 4 {
		t.Errorf("seed %d, %d samples, k %d×%d, %d sensitivities, %d regions", res.Seed, res.Samples, len(res.K), len(res.K[0]), len(res.Sensitivities), len(res.Dominant))
	}
	for i, row := range res.K {
		for j, b := range row {
			if !(b.Low <= b.Median && b.Median <= b.High && b.F >= 1) {
				t.Errorf("k[%d][%d]: band %+v out of order", i, j, b)
			}
		}
	}
	_, out2, _ := runCLI(t, append(args, "--workers", "2")...)
	if out2 != out {
		t.Error("--workers 2 printed other numbers than --workers 1")
	}
}

// --csv prints a header with units and one row per grid point, and the
// table report prints the seed.
func TestUncertaintyCSVAndTable(t *testing.T) {
	code, out, errs := runCLI(t, "uncertainty", smallUncertain, "-n", "3", "--csv", "--skip-sensitivities")
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	rows, err := csv.NewReader(strings.NewReader(out)).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	if len(rows) != 5 || rows[0][0] != "T/K" || rows[0][1] != "P/bar" || rows[0][4] != "k_p2.5/s-1" {
		t.Errorf("CSV: %d rows, header %q", len(rows), rows[0])
	}
	code, out, errs = runCLI(t, "uncertainty", smallUncertain, "-n", "3", "--seed", "12345")
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	for _, want := range []string{"3 samples, seed 12345", "which value dominates where", "fitted f(T)"} {
		if !strings.Contains(out, want) {
			t.Errorf("table report: no %q", want)
		}
	}
	if !strings.Contains(errs, "seed 12345") {
		t.Errorf("stderr does not print the seed: %q", errs)
	}
}

// The terminal report of a small run (golden file, reviewed by eye: the
// inputs with their distributions, the band at each point with both
// spreads of ln k, the limits, the fitted f(T), the sensitivities and the
// ranking).
func TestUncertaintyTerminal(t *testing.T) {
	code, out, errs := runCLI(t, "uncertainty", smallUncertain, "-q", "-n", "4", "--seed", "1")
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	golden(t, "uncertainty-small.txt", out)
}

// --out writes the band as JSON and CSV, the figures and the mechanism
// files, whose header carries f(T).
func TestUncertaintyOut(t *testing.T) {
	dir := filepath.Join(t.TempDir(), "out")
	code, _, errs := runCLI(t, "uncertainty", smallUncertain, "-n", "3", "-q", "--out", dir, "--write-failed")
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	for _, name := range []string{"uncertainty.json", "uncertainty.csv", "falloff-band.svg", "sensitivity.svg", "uncertainty-factor.svg", "reactions.yaml", "reactions.txt"} {
		if _, err := os.Stat(filepath.Join(dir, name)); err != nil {
			t.Errorf("%s: %v", name, err)
		}
	}
	b, err := os.ReadFile(filepath.Join(dir, "reactions.yaml"))
	if err != nil {
		t.Fatal(err)
	}
	if !bytes.Contains(b, []byte(uncertainty.UserFieldKey+": {f298: ")) || !bytes.Contains(b, []byte("# Uncertainty factor f =")) {
		t.Errorf("reactions.yaml has no uncertainty:\n%s", b)
	}
}

// Mistakes on the command line are usage errors; a file without an
// uncertainty section is a bad input naming the section.
func TestUncertaintyRefusals(t *testing.T) {
	cases := []struct {
		args []string
		code int
		msg  string
	}{
		{[]string{"uncertainty"}, exitUsage, "one input file"},
		{[]string{"uncertainty", smallUncertain, "--samples", "0"}, exitUsage, "--samples 0"},
		{[]string{"uncertainty", smallUncertain, "--step", "0.5"}, exitUsage, "--step"},
		{[]string{"uncertainty", smallUncertain, "--json", "--csv"}, exitUsage, "exclude"},
		{[]string{"uncertainty", hcnFile}, exitInput, "uncertainty"},
	}
	for _, c := range cases {
		code, _, errs := runCLI(t, c.args...)
		if code != c.code || !strings.Contains(errs, c.msg) {
			t.Errorf("%q: exit %d, stderr %q; want %d and %q", c.args, code, errs, c.code, c.msg)
		}
	}
}

// A cancelled run writes nothing and says so (exit 130), as rates does.
func TestUncertaintyInterrupted(t *testing.T) {
	dir := filepath.Join(t.TempDir(), "out")
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	var out, errb bytes.Buffer
	code := runContext(ctx, []string{"uncertainty", smallUncertain, "-q", "--out", dir}, strings.NewReader(""), &out, &errb)
	if code != exitInterrupted || errb.String() != "falloff: interrupted: no file written\n" {
		t.Errorf("exit %d, stderr %q", code, errb.String())
	}
	if _, err := os.Stat(dir); !errors.Is(err, os.ErrNotExist) {
		entries, _ := os.ReadDir(dir)
		if len(entries) > 0 {
			t.Errorf("%d entries left in the output folder", len(entries))
		}
	}
}
