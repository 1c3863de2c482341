package uncertainty

import (
	"context"
	"strings"
	"testing"

	"go.yaml.in/yaml/v3"

	"github.com/falloff-kinetics/falloff/pkg/export"
	"github.com/falloff-kinetics/falloff/pkg/job"
)

// Annotate puts f(T) and its fit into the mechanism files: the header of
// every file, the comment of the entry, and a rate-uncertainty field of
// the Cantera YAML entry that a YAML reader gives back as written (the
// numbers rounded to the three digits of the comments).
func TestAnnotateMechanism(t *testing.T) {
	n, us := load(t, "testdata/small.yaml", "")
	res := runT(t, n, us, Options{Samples: 4, Seed: 2, SkipSensitivities: true})
	rates, err := n.Rates(context.Background(), job.Options{SkipCheck: true, SkipHeldOut: true})
	if err != nil {
		t.Fatal(err)
	}
	res.Annotate(rates)
	files, err := rates.MechanismFiles(job.FileOptions{Units: export.Units{}, WriteFailed: true})
	if err != nil {
		t.Fatal(err)
	}
	seen := 0
	for _, f := range files {
		// Comments are wrapped: compare the words, without the markers.
		text := strings.Join(strings.Fields(strings.NewReplacer("\n# ", " ", "\n! ", " ").Replace(string(f.Data))), " ")
		switch {
		case strings.HasSuffix(f.Name, ".yaml") && strings.HasPrefix(f.Name, "reactions"):
			seen++
			var doc struct {
				Reactions []map[string]any `yaml:"reactions"`
			}
			if err := yaml.Unmarshal(f.Data, &doc); err != nil {
				t.Fatalf("%s: %v", f.Name, err)
			}
			u, ok := doc.Reactions[0][UserFieldKey].(map[string]any)
			if !ok {
				t.Fatalf("%s: no %s field in %v", f.Name, UserFieldKey, doc.Reactions[0])
			}
			if got, want := u["f298"], round3(res.Factor.F298); got != want {
				t.Errorf("%s: f298 = %v, want %v", f.Name, got, want)
			}
			if r, ok := u["T-range"].([]any); !ok || len(r) != 2 || number(r[0]) != res.Factor.TMin || number(r[1]) != res.Factor.TMax {
				t.Errorf("%s: T-range = %v, want [%v, %v]", f.Name, u["T-range"], res.Factor.TMin, res.Factor.TMax)
			}
			fallthrough
		case strings.HasSuffix(f.Name, ".txt"):
			for _, want := range []string{"Uncertainty factor f = sqrt(k97.5%/k2.5%)", "uncertainty factor f(T) = " + g3(res.Factor.F298), "seed 2"} {
				if !strings.Contains(text, want) {
					t.Errorf("%s: no %q", f.Name, want)
				}
			}
		}
	}
	if seen == 0 {
		t.Fatal("no reactions YAML file written")
	}
}

// number is a YAML number as a float64 (YAML reads 700 as an int).
func number(v any) float64 {
	switch x := v.(type) {
	case int:
		return float64(x)
	case float64:
		return x
	}
	return -1
}
