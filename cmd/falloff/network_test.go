package main

import (
	"encoding/json"
	"os"
	"path/filepath"
	"strings"
	"testing"

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
		{"rates --out on a network", []string{"rates", "--out", t.TempDir(), file}, exitUsage, "not yet available for a network"},
	})
}
