package uncertainty

import (
	"context"
	"testing"

	"github.com/falloff-kinetics/falloff/pkg/job"
)

// BenchmarkSample measures the cost of a Monte Carlo sample of the ring
// input (18 vibrations, 3 temperatures × 3 pressures) when only
// collisional values (α300, the reactant's σ) are uncertain: with the
// nominal state counts reused, and with the states counted again for every
// sample (Options.Recount, as a sample that changes the barrier or the
// frequencies must). Each iteration is a run of 8 samples on one worker
// without sensitivities; ns/sample is its time over the 9 master-equation
// runs (the nominal one and the samples), the nominal count included.
func BenchmarkSample(b *testing.B) {
	const section = "uncertainty:\n  energy-transfer.alpha-300: {factor: 2}\n  molecules.ring.lennard-jones.sigma: {sd: 0.3 angstrom}\n"
	const samples = 8
	for _, tc := range []struct {
		name    string
		recount bool
	}{{"reuse", false}, {"recount", true}} {
		b.Run(tc.name, func(b *testing.B) {
			n, us := load(b, "testdata/ring.yaml", section)
			opt := Options{Samples: samples, Workers: 1, SkipSensitivities: true, Recount: tc.recount}
			for b.Loop() {
				if _, err := Run(context.Background(), n, us, opt); err != nil {
					b.Fatal(err)
				}
			}
			b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N*(samples+1)), "ns/sample")
		})
	}
}

// BenchmarkSampleParts splits a sample of the ring input into its two
// costs: counting the states (job.Network.CountStates, saved by the reuse)
// and solving the master equation over the grid with given counts
// (job.Network.Solve, every sample's cost), both on one core.
func BenchmarkSampleParts(b *testing.B) {
	n, _ := load(b, "testdata/ring.yaml", "")
	ctx := context.Background()
	b.Run("count", func(b *testing.B) {
		for b.Loop() {
			if _, err := n.CountStates(ctx, job.Options{}); err != nil {
				b.Fatal(err)
			}
		}
	})
	b.Run("solve", func(b *testing.B) {
		c, err := n.CountStates(ctx, job.Options{})
		if err != nil {
			b.Fatal(err)
		}
		for b.Loop() {
			if _, err := n.Solve(ctx, c, job.Options{Jobs: 1}); err != nil {
				b.Fatal(err)
			}
		}
	})
}
