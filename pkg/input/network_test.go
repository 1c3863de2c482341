package input

import (
	"errors"
	"math"
	"os"
	"strings"
	"testing"

	"github.com/falloff-kinetics/falloff/pkg/units"
)

// networkDemo is the built-in demo network (invented data).
func networkDemo(t *testing.T) string {
	t.Helper()
	b, err := os.ReadFile("../../internal/demo/network.yaml")
	if err != nil {
		t.Fatal(err)
	}
	return string(b)
}

// The demo network reads as written: energies from the reference well in
// kcal/mol converted exactly (1 kcal/mol = 349.7551 cm⁻¹, CODATA 2018 with
// the thermochemical calorie), wells, fragment sets, steps and the source
// in file order.
func TestNetworkDemo(t *testing.T) {
	m, err := Parse("network.yaml", []byte(networkDemo(t)))
	if err != nil {
		t.Fatal(err)
	}
	net := m.Network
	if net == nil || m.Reaction.Reactant != "" {
		t.Fatalf("network %v, reaction %+v", net, m.Reaction)
	}
	if net.Reference != "chain" || len(net.Wells) != 2 || net.Wells[1].Name != "ring" ||
		math.Abs(net.Wells[1].Energy+12*units.Cm1PerKcalPerMol) > 1e-9 {
		t.Errorf("wells %+v", net.Wells)
	}
	if len(net.Fragments) != 2 || strings.Join(net.Fragments[0].Species, " + ") != "frag-a + frag-b" ||
		math.Abs(net.Fragments[0].Energy-22*units.Cm1PerKcalPerMol) > 1e-9 {
		t.Errorf("fragments %+v", net.Fragments)
	}
	if len(net.Steps) != 3 || net.Steps[0].Via != "closure-TS" || net.Steps[0].ToFragments || !net.Steps[1].ToFragments || net.Steps[2].Barrierless == nil {
		t.Errorf("steps %+v", net.Steps)
	}
	if net.Source == nil || net.Source.Fragments != "scission" || net.Source.Into != "chain" {
		t.Errorf("source %+v", net.Source)
	}
	if got := m.Molecule("closure-TS").E0; math.Abs(got-24*units.Cm1PerKcalPerMol) > 1e-9 {
		t.Errorf("closure-TS energy %g", got)
	}
}

// Every inconsistency of a network is one FieldError at the field, with a
// hint.
func TestNetworkRefused(t *testing.T) {
	demo := networkDemo(t)
	cases := []struct {
		name, old, new, path, msg string
	}{
		{"TS below a well", "energy: 24.0 kcal/mol", "energy: -13.0 kcal/mol", "network.steps[0].via", "below chain"},
		{"barrierless between wells", "{from: chain, to: ring, via: closure-TS}", "{from: chain, to: ring, barrierless: {A: 1e13 s-1, energy: 40 kcal/mol}}", "network.steps[0].barrierless", "between two wells"},
		{"unknown well", "    ring: {energy: -12.0 kcal/mol}", "    rign: {energy: -12.0 kcal/mol}", "network.wells.rign", "no molecule"},
		{"TS as a well", "    ring: {energy: -12.0 kcal/mol}", "    ring: {energy: -12.0 kcal/mol}\n    closure-TS: {}", "network.wells.closure-TS", "transition state"},
		{"reaction and network", "network:\n", "reaction: {reactant: chain, via: closure-TS}\nnetwork:\n", "reaction", "both"},
		{"duplicate step", "    - {from: chain, to: scission, via: scission-TS}\n", "    - {from: chain, to: scission, via: scission-TS}\n    - {from: ring, to: chain, via: closure-TS}\n", "network.steps[2]", "the same step"},
		{"source without a step", "source: {fragments: scission, into: chain}", "source: {fragments: scission, into: ring}", "network.source", "no step joins"},
		{"reference not a well", "reference: chain", "reference: scission", "network.reference", "not one of the wells"},
		{"reference energy", "    chain: {}", "    chain: {energy: 1 kcal/mol}", "network.wells.chain.energy", "not 0"},
		{"step from fragments", "{from: chain, to: scission, via: scission-TS}", "{from: scission, to: chain, via: scission-TS}", "network.steps[1].from", "not one of the wells"},
		{"barrierless below the fragments", "energy: 52.0 kcal/mol}", "energy: 50.0 kcal/mol}", "network.steps[2].barrierless.energy", "below the fragments"},
		{"fragment set named like a molecule", "    scission: {species", "    ring: {species", "network.fragments.ring", "name of a molecule"},
		{"no steps", "  steps:\n", "  old-steps:\n", "network.old-steps", ""},
		{"tunnelling on a barrierless step", "energy: 52.0 kcal/mol}}", "energy: 52.0 kcal/mol}, tunnelling: wigner}", "network.steps[2].tunnelling", "no transition state"},
		{"path degeneracy on a barrierless step", "energy: 52.0 kcal/mol}}", "energy: 52.0 kcal/mol}, path-degeneracy: 2}", "network.steps[2].path-degeneracy", "no transition state"},
		{"unknown tunnelling", "{from: chain, to: ring, via: closure-TS}", "{from: chain, to: ring, via: closure-TS, tunnelling: quantum}", "network.steps[0].tunnelling", "unknown tunnelling"},
		{"negative path degeneracy", "{from: chain, to: ring, via: closure-TS}", "{from: chain, to: ring, via: closure-TS, path-degeneracy: -2}", "network.steps[0].path-degeneracy", "positive"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			if strings.Count(demo, c.old) != 1 {
				t.Fatalf("%q occurs %d times in the demo", c.old, strings.Count(demo, c.old))
			}
			_, err := Parse("net.yaml", []byte(strings.Replace(demo, c.old, c.new, 1)))
			var fe *FieldError
			if !errors.As(err, &fe) || fe.Path != c.path || !strings.Contains(err.Error(), c.msg) || strings.Contains(err.Error(), "\n") {
				t.Errorf("got %v; want a one-line FieldError at %s containing %q", err, c.path, c.msg)
			}
		})
	}
}
