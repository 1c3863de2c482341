package main

import (
	"bytes"
	"context"
	"encoding/json"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/falloff-kinetics/falloff/internal/demo"
	"github.com/falloff-kinetics/falloff/pkg/export"
	"github.com/falloff-kinetics/falloff/pkg/input"
	"github.com/falloff-kinetics/falloff/pkg/job"
)

// The command line only formats what the library computes: on every input
// of testdata/ and the demo, the JSON that `rates --json` prints equals,
// byte for byte, the library's result (job.Network.Rates) marshalled, and
// each file `rates --out` writes equals the library's rendering of it
// (RatesResult.MechanismFiles). Inputs without pressures are compared
// through states and micro. The convergence check is skipped to keep the
// test short; it does not change the grid.
func TestLibraryEqualsCommandLine(t *testing.T) {
	files, err := filepath.Glob("../../testdata/*.yaml")
	if err != nil {
		t.Fatal(err)
	}
	for _, path := range append([]string{""}, files...) {
		name := filepath.Base(path)
		if path == "" {
			name = demo.Name
		}
		t.Run(name, func(t *testing.T) {
			if testing.Short() && (name == "catalogue-base.yaml" || name == "demo.yaml" && path != "") {
				t.Skip("the same molecule as the built-in demo")
			}
			var m *input.Model
			var err error
			if path == "" {
				m, err = input.Parse(demo.Name, demo.Text)
			} else {
				m, err = input.ReadFile(path)
			}
			if err != nil {
				t.Fatal(err)
			}
			n, err := job.New(m)
			if err != nil {
				t.Fatal(err)
			}
			args := func(verb string, extra ...string) []string {
				a := append([]string{verb, "-q"}, extra...)
				if path != "" {
					a = append(a, path)
				}
				return a
			}
			if len(m.Pressures) == 0 {
				st, err := n.States(job.ReportGrid{})
				if err != nil {
					t.Fatal(err)
				}
				sameJSON(t, "states", st, args("states", "--json"))
				mi, err := n.Micro(job.ReportGrid{})
				if err != nil {
					t.Fatal(err)
				}
				sameJSON(t, "micro", mi, args("micro", "--json"))
				return
			}
			res, err := n.Rates(context.Background(), job.Options{SkipCheck: true})
			if err != nil {
				t.Fatal(err)
			}
			sameJSON(t, "rates", ratesJSON{RatesResult: res}, args("rates", "--json", "--skip-check"))

			dir := t.TempDir()
			if code, _, errs := runCLI(t, args("rates", "--skip-check", "--out", dir)...); code != exitOK {
				t.Fatalf("rates --out: exit %d: %s", code, errs)
			}
			want, err := res.MechanismFiles(job.FileOptions{Units: export.DefaultUnits, PressureUnit: "bar"})
			if err != nil {
				t.Fatal(err)
			}
			for _, f := range want {
				got, err := os.ReadFile(filepath.Join(dir, f.Name))
				if err != nil {
					t.Fatal(err)
				}
				if !bytes.Equal(got, f.Data) {
					t.Errorf("%s written by rates differs from the library's rendering", f.Name)
				}
			}
			entries, _ := os.ReadDir(dir)
			shown := 0
			for _, e := range entries {
				if !strings.HasPrefix(e.Name(), ".") { // the file set's own record
					shown++
				}
			}
			if shown != len(want)+2 { // + report.html and summary.json
				t.Errorf("rates --out wrote %d files, the library renders %d, report.html and summary.json", shown, len(want))
			}
		})
	}
}

// sameJSON runs the command line args and compares its stdout with v
// marshalled as the command marshals it.
func sameJSON(t *testing.T, what string, v any, args []string) {
	t.Helper()
	code, out, errs := runCLI(t, args...)
	if code != exitOK {
		t.Fatalf("%s: exit %d: %s", what, code, errs)
	}
	b, err := json.MarshalIndent(v, "", "  ")
	if err != nil {
		t.Fatal(err)
	}
	if out != string(b)+"\n" {
		t.Errorf("%s --json differs from the library's result", what)
	}
}
