package job_test

import (
	"context"
	"reflect"
	"strings"
	"testing"

	"github.com/falloff-kinetics/falloff/pkg/input"
	"github.com/falloff-kinetics/falloff/pkg/job"
)

// The state counts do not depend on the collisions: solving a network with
// another ⟨ΔE⟩down and another reactant σ on the counts of the original
// gives the numbers of counting its own, bit for bit; and Solve gives the
// k, k∞ and k0 of Rates for the same file (an exact property of the code
// paths: the same counts, grain and ceiling). The file is the one with
// competing channels, Eckart and Wigner tunnelling and a barrierless
// channel, so that every kind of channel's k(E) is reused.
func TestSolveReusesCounts(t *testing.T) {
	ctx := context.Background()
	n := network(t, "../../testdata/ch3nc-channels.yaml")
	counts, err := n.CountStates(ctx, job.Options{})
	if err != nil {
		t.Fatal(err)
	}
	rates, err := n.Rates(ctx, job.Options{SkipCheck: true, SkipHeldOut: true})
	if err != nil {
		t.Fatal(err)
	}
	nominal, err := n.Solve(ctx, counts, job.Options{})
	if err != nil {
		t.Fatal(err)
	}
	if !reflect.DeepEqual(nominal.K, rates.K) || !reflect.DeepEqual(nominal.KInf, rates.KInf) || !reflect.DeepEqual(nominal.K0, rates.K0) {
		t.Error("Solve differs from Rates on the same file")
	}
	text := strings.Replace(string(n.Model.Source), "alpha-300: 200 cm-1", "alpha-300: 420 cm-1", 1)
	text = strings.Replace(text, "sigma: 4.47 angstrom", "sigma: 5.1 angstrom", 1)
	m, err := input.Parse("other.yaml", []byte(text))
	if err != nil {
		t.Fatal(err)
	}
	other, err := job.New(m)
	if err != nil {
		t.Fatal(err)
	}
	reused, err := other.Solve(ctx, counts, job.Options{Jobs: 1})
	if err != nil {
		t.Fatal(err)
	}
	own, err := other.Solve(ctx, nil, job.Options{Jobs: 2})
	if err != nil {
		t.Fatal(err)
	}
	if !reflect.DeepEqual(reused, own) {
		t.Error("the original's counts give other numbers than the network's own")
	}
	if reflect.DeepEqual(reused.K, nominal.K) {
		t.Error("another ⟨ΔE⟩down and σ gave the same k: the collisions were not used")
	}
}
