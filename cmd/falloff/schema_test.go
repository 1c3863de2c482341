package main

import (
	"os"
	"path/filepath"
	"slices"
	"sort"
	"strings"
	"testing"

	"go.yaml.in/yaml/v3"
)

// Cantera's documented YAML schema, as far as our files use it (Cantera's
// YAML reference: general.md, phases.md, species.md, reactions.md; from
// memory): the keys each map may have, the unit names, and the keys each
// reaction type needs.
var (
	schemaUnits = map[string][]string{
		"length":            {"cm", "m", "mm"},
		"time":              {"s"},
		"quantity":          {"mol", "kmol", "molec"},
		"activation-energy": {"cal/mol", "kcal/mol", "J/mol", "kJ/mol", "K", "eV"},
	}
	schemaPhaseKeys   = []string{"name", "thermo", "elements", "species", "kinetics", "reactions", "state", "transport", "skip-undeclared-elements"}
	schemaSpeciesKeys = []string{"name", "composition", "thermo", "note"}
	schemaNASAKeys    = []string{"model", "temperature-ranges", "data", "reference-pressure", "note"}
	schemaReaction    = map[string]struct{ required, allowed []string }{
		"":                             {[]string{"equation", "rate-constant"}, []string{"duplicate", "note"}},
		"falloff":                      {[]string{"equation", "type", "low-P-rate-constant", "high-P-rate-constant"}, []string{"Troe", "SRI", "efficiencies", "duplicate", "note"}},
		"pressure-dependent-Arrhenius": {[]string{"equation", "type", "rate-constants"}, []string{"duplicate", "note"}},
		"Chebyshev":                    {[]string{"equation", "type", "temperature-range", "pressure-range", "data"}, []string{"duplicate", "note"}},
	}
)

// keysOf returns the keys of a YAML map.
func keysOf(m map[string]any) []string {
	var k []string
	for key := range m {
		k = append(k, key)
	}
	sort.Strings(k)
	return k
}

// The files of rates --out, with species, follow that schema strictly:
// only known keys, known unit names, the required keys of each reaction
// type with the right types, duplicates declared, every species of every
// equation defined in species.yaml with elements the phase declares, and
// the phase pointing at files and sections that exist.
func TestCanteraSchema(t *testing.T) {
	in, err := os.ReadFile("../../pkg/thermo/testdata/ring-thermo.yaml")
	if err != nil {
		t.Fatal(err)
	}
	input := filepath.Join(t.TempDir(), "ring.yaml")
	text := strings.Replace(string(in), "fits: [troe, plog, chebyshev]", "fits: [arrhenius, lindemann, troe, sri, plog, chebyshev]", 1)
	if err := os.WriteFile(input, []byte(text), 0o644); err != nil {
		t.Fatal(err)
	}
	for _, q := range []string{"mol", "molecule"} {
		out := filepath.Join(t.TempDir(), "out")
		if code, _, errs := runCLI(t, "rates", "-q", "--skip-check", "--skip-held-out", "--write-failed", "--quantity", q, "--direction", "recombination", "--out", out, input); code != exitOK {
			t.Fatalf("exit %d: %s", code, errs)
		}
		load := func(name string) map[string]any {
			var doc map[string]any
			b, err := os.ReadFile(filepath.Join(out, name))
			if err != nil {
				t.Fatal(err)
			}
			if err := yaml.Unmarshal(b, &doc); err != nil {
				t.Fatalf("%s: %v", name, err)
			}
			return doc
		}
		sp := load("species.yaml")
		defined := map[string]map[string]any{}
		for _, s := range sp["species"].([]any) {
			m := s.(map[string]any)
			for _, k := range keysOf(m) {
				if !slices.Contains(schemaSpeciesKeys, k) {
					t.Errorf("species key %q", k)
				}
			}
			th := m["thermo"].(map[string]any)
			for _, k := range keysOf(th) {
				if !slices.Contains(schemaNASAKeys, k) {
					t.Errorf("species thermo key %q", k)
				}
			}
			if th["model"] != "NASA7" || len(th["temperature-ranges"].([]any)) != 3 || len(th["data"].([]any)) != 2 {
				t.Errorf("species %v: NASA7 data malformed", m["name"])
			}
			for _, row := range th["data"].([]any) {
				if len(row.([]any)) != 7 {
					t.Errorf("species %v: a NASA7 range with %d coefficients", m["name"], len(row.([]any)))
				}
			}
			defined[m["name"].(string)] = m["composition"].(map[string]any)
		}
		ph := load("phase.yaml")["phases"].([]any)[0].(map[string]any)
		for _, k := range keysOf(ph) {
			if !slices.Contains(schemaPhaseKeys, k) {
				t.Errorf("phase key %q", k)
			}
		}
		declared := map[string]bool{}
		for _, e := range ph["elements"].([]any) {
			declared[e.(string)] = true
		}
		for name, comp := range defined {
			for el := range comp {
				if !declared[el] {
					t.Errorf("species %s uses element %s the phase does not declare", name, el)
				}
			}
		}
		for _, inc := range append(ph["species"].([]any), ph["reactions"].([]any)...) {
			for ref := range inc.(map[string]any) {
				file, section, _ := strings.Cut(ref, "/")
				if _, ok := load(file)[section]; !ok {
					t.Errorf("phase refers to %s, which has no %s", file, section)
				}
			}
		}
		for _, name := range []string{"reactions.yaml", "reactions-troe.yaml", "reactions-sri.yaml", "reactions-plog.yaml", "reactions-chebyshev.yaml", "reactions-arrhenius.yaml", "reactions-lindemann.yaml"} {
			doc := load(name)
			for k, v := range doc["units"].(map[string]any) {
				if !slices.Contains(schemaUnits[k], v.(string)) {
					t.Errorf("%s: units %s: %v", name, k, v)
				}
			}
			seen := map[string]int{}
			for _, r := range doc["reactions"].([]any) {
				m := r.(map[string]any)
				typ, _ := m["type"].(string)
				rule, ok := schemaReaction[typ]
				if !ok {
					t.Errorf("%s: reaction type %q", name, typ)
					continue
				}
				for _, k := range rule.required {
					if _, ok := m[k]; !ok {
						t.Errorf("%s: %s reaction without %s", name, typ, k)
					}
				}
				for _, k := range keysOf(m) {
					if !slices.Contains(rule.required, k) && !slices.Contains(rule.allowed, k) {
						t.Errorf("%s: %s reaction with key %q", name, typ, k)
					}
				}
				eq := m["equation"].(string)
				seen[eq]++
				for _, side := range strings.Split(strings.NewReplacer("(+M)", " ", "<=>", "+").Replace(eq), "+") {
					if s := strings.TrimSpace(side); s != "" {
						if _, ok := defined[s]; !ok {
							t.Errorf("%s: %q names species %q, not in species.yaml", name, eq, s)
						}
					}
				}
				if seen[eq] > 1 && m["duplicate"] != true {
					t.Errorf("%s: %q repeated without duplicate: true", name, eq)
				}
			}
		}
	}
}
