package main

import (
	"bufio"
	"bytes"
	"context"
	"errors"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"syscall"
	"testing"
	"time"
)

// TestMain lets the test binary stand in for the falloff binary, so that a
// test can run it as a child process and signal it.
func TestMain(m *testing.M) {
	if os.Getenv("FALLOFF_RUN_MAIN") == "1" {
		os.Exit(run(os.Args[1:], os.Stdin, os.Stdout, os.Stderr))
	}
	os.Exit(m.Run())
}

// slowRates is a demo run long enough (several seconds) to be interrupted in
// the master equation.
var slowRates = []string{"rates", "--grain", "40 cm-1", "--skip-check", "--jobs", "1"}

// SIGINT during the master equation stops the run: exit code 130, one line
// saying no file was written, and the output folder holds no file, whole or
// partial (temporary files included).
func TestInterruptBySignal(t *testing.T) {
	if testing.Short() {
		t.Skip("runs a child process for seconds")
	}
	dir := filepath.Join(t.TempDir(), "out")
	cmd := exec.Command(os.Args[0], append(slowRates, "--out", dir)...)
	cmd.Env = append(os.Environ(), "FALLOFF_RUN_MAIN=1")
	stderr, err := cmd.StderrPipe()
	if err != nil {
		t.Fatal(err)
	}
	cmd.Stdout = new(bytes.Buffer)
	if err := cmd.Start(); err != nil {
		t.Fatal(err)
	}
	// The demo notice comes after the signal handler is installed (run).
	lines := bufio.NewScanner(stderr)
	var got []string
	if !lines.Scan() || !strings.Contains(lines.Text(), "built-in demo") {
		t.Fatalf("first stderr line %q", lines.Text())
	}
	time.Sleep(300 * time.Millisecond)
	sent := time.Now()
	if err := cmd.Process.Signal(syscall.SIGINT); err != nil {
		t.Fatal(err)
	}
	for lines.Scan() {
		got = append(got, lines.Text())
	}
	err = cmd.Wait()
	var ee *exec.ExitError
	if !errors.As(err, &ee) || ee.ExitCode() != exitInterrupted {
		t.Fatalf("exit: %v; want code %d (stderr %q)", err, exitInterrupted, got)
	}
	if len(got) != 1 || got[0] != "falloff: interrupted: no file written" {
		t.Errorf("stderr after the signal: %q", got)
	}
	if d := time.Since(sent); d > 5*time.Second {
		t.Errorf("took %v to stop", d)
	}
	if entries, _ := os.ReadDir(dir); len(entries) > 0 {
		t.Errorf("%d entries left in the output folder, first %s", len(entries), entries[0].Name())
	}
}

// A context cancelled before the end writes nothing and says so; the same
// in-process path a signal takes.
func TestInterruptedRun(t *testing.T) {
	dir := filepath.Join(t.TempDir(), "out")
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	var out, errb bytes.Buffer
	code := runContext(ctx, []string{"rates", "-q", "--out", dir}, strings.NewReader(""), &out, &errb)
	if code != exitInterrupted || errb.String() != "falloff: interrupted: no file written\n" {
		t.Errorf("exit %d, stderr %q", code, errb.String())
	}
	if _, err := os.Stat(dir); !errors.Is(err, os.ErrNotExist) {
		t.Errorf("output folder created: %v", err)
	}
}

// bigMolecule writes an input whose state count takes seconds: 60 000
// modes (an invented, very large molecule) counted on the 1 cm⁻¹ grain.
func bigMolecule(t *testing.T) string {
	t.Helper()
	modes := func(n int) string {
		v := make([]string, n)
		for i := range v {
			v[i] = "3000"
		}
		return strings.Join(v, ", ")
	}
	text := `title: A very large invented molecule (test input, invented)
molecules:
  big:
    mass: 90000 amu
    vibrations: {unit: cm-1, values: [` + modes(45000) + `]}
    lennard-jones: {sigma: 20 angstrom, epsilon: 2000 K}
  big-TS:
    energy: 42 kcal/mol
    imaginary-frequency: 600 cm-1
    vibrations: {unit: cm-1, values: [` + modes(44999) + `]}
reaction: {reactant: big, via: big-TS, products: [a, b]}
bath: {gas: Ar}
energy-transfer: {model: strong-collider}
grid:
  temperatures: {unit: K, values: [300, 400]}
  pressures: {unit: bar, values: [0.1, 10]}
`
	path := filepath.Join(t.TempDir(), "big.yaml")
	if err := os.WriteFile(path, []byte(text), 0o644); err != nil {
		t.Fatal(err)
	}
	return path
}

// SIGINT while states are counted stops the run too (it once ran on to the
// end of the count): exit 130 and the one line, without waiting for the
// count to finish.
func TestInterruptWhileCounting(t *testing.T) {
	if testing.Short() {
		t.Skip("runs a child process for seconds")
	}
	in := bigMolecule(t)
	cmd := exec.Command(os.Args[0], "rates", "-q", "--skip-check", in)
	cmd.Env = append(os.Environ(), "FALLOFF_RUN_MAIN=1")
	var stderr bytes.Buffer
	cmd.Stderr, cmd.Stdout = &stderr, new(bytes.Buffer)
	start := time.Now()
	if err := cmd.Start(); err != nil {
		t.Fatal(err)
	}
	time.Sleep(700 * time.Millisecond) // past parsing, into the count
	sent := time.Now()
	if err := cmd.Process.Signal(syscall.SIGINT); err != nil {
		t.Fatal(err)
	}
	err := cmd.Wait()
	var ee *exec.ExitError
	if !errors.As(err, &ee) || ee.ExitCode() != exitInterrupted {
		t.Fatalf("exit: %v; want code %d (stderr %q)", err, exitInterrupted, stderr.String())
	}
	if got := stderr.String(); got != "falloff: interrupted: no file written\n" {
		t.Errorf("stderr %q", got)
	}
	t.Logf("stopped %v after the signal, %v after the start", time.Since(sent), time.Since(start))
	if d := time.Since(sent); d > 5*time.Second {
		t.Errorf("took %v to stop", d)
	}
}
