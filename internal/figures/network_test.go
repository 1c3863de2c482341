package figures

import (
	"math"
	"testing"

	"github.com/falloff-kinetics/falloff/pkg/job"
)

// The populations from the rate law conserve the total (the columns of
// the rate matrix sum to zero), start all in the reference well, and, for
// A ⇌ B with A → P, approach at long times the products only, with the
// exact two-state solution of the same K at an intermediate time (the
// matrix exponential against the closed form of a 2 × 2 system plus its
// product; Atkins' consecutive-reaction algebra, common textbook result).
// Tolerance 1e-9: gonum's Padé matrix exponential to rounding.
func TestPopulationsConserve(t *testing.T) {
	kab, kba, kap := 3.0, 1.0, 0.5
	res := &job.NetworkRatesResult{Reference: "A", Wells: []string{"A", "B"}, Products: []string{"P"},
		Temperatures: []float64{1000}, Pressures: []float64{1e5},
		K:         [][][][]float64{{{{-(kab + kap), kba}, {kab, -kba}}}},
		KProducts: [][][][]float64{{{{kap, 0}}}}}
	names, times, frac, err := Populations(res, 0, 0)
	if err != nil {
		t.Fatal(err)
	}
	if len(names) != 3 || frac[0][0] < 0.99 {
		t.Fatalf("names %v, A at the first time %g", names, frac[0][0])
	}
	// Eigenvalues of [[-(kab+kap), kba], [kab, -kba]].
	tr, det := -(kab + kap + kba), kap*kba
	l1 := (tr + math.Sqrt(tr*tr-4*det)) / 2
	l2 := (tr - math.Sqrt(tr*tr-4*det)) / 2
	for i, tt := range times {
		sum := frac[0][i] + frac[1][i] + frac[2][i]
		if math.Abs(sum-1) > 1e-9 {
			t.Fatalf("t = %g: Σ = %.12g", tt, sum)
		}
		// B(t) from A(0) = 1: kab (e^{l1 t} − e^{l2 t})/(l1 − l2).
		b := kab * (math.Exp(l1*tt) - math.Exp(l2*tt)) / (l1 - l2)
		if math.Abs(frac[1][i]-b) > 1e-9 {
			t.Fatalf("t = %g: B = %.12g, closed form %.12g", tt, frac[1][i], b)
		}
	}
	if last := len(times) - 1; frac[2][last] < 0.99 {
		t.Errorf("at the last time P = %g, want nearly all", frac[2][last])
	}
}
