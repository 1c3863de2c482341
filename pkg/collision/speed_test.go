package collision

import (
	"context"
	"math"
	"slices"
	"testing"

	"github.com/falloff-kinetics/falloff/pkg/rrkm"
)

// halfAgreeTol bounds |p½(interpolated and refined)/p½(root search) − 1|:
// both stop where |ln(k/(k∞/2))| is below 1e-8 (halfTol) or 1e-9 (the
// search), and the slope d ln k/d ln p there is above 0.1 on any falloff
// curve (0.5 for Lindemann's; broadening lowers it), so they agree to
// (1e-8 + 1e-9)/0.1 ≈ 1.1e-7; 2e-7 leaves room for rounding.
const halfAgreeTol = 2e-7

// The half-pressure interpolated from the grid and refined with at most
// two solves (halfPressure) equals the old root search on the master
// equation (halfPressureSearch, false position to |g| < 1e-9, an
// independent algorithm on the same function) to halfAgreeTol, at every
// temperature of the benchmark grid (300–2500 K; 6 of them with -short):
// where the grid straddles p½ and, with the grid cut to its three lowest
// or three highest pressures (1e-3 to 4e-3 bar, 2.5e2 to 1e3 bar), where
// it does not and is extended toward p½ first.
func TestHalfPressureFromGrid(t *testing.T) {
	ch, col, tr, temps, ps := benchGrid(t)
	if testing.Short() {
		temps = []float64{temps[0], temps[6], temps[12], temps[18], temps[24], temps[29]}
	}
	worst := 0.0
	for _, tK := range temps {
		p, err := prepare(ch, tr, tK, 0, 0)
		if err != nil {
			t.Fatal(err)
		}
		z := col.Z(tK)
		kInf := p.kInf()
		k0, _, err := p.k0PerOmega()
		if err != nil {
			t.Fatal(err)
		}
		for _, sub := range [][]float64{ps, ps[:3], ps[len(ps)-3:]} {
			cut := len(sub)
			omegas, ks := make([]float64, cut), make([]float64, cut)
			for j, pr := range sub {
				omegas[j] = z * Concentration(pr, tK)
				if ks[j], err = p.rate(omegas[j]); err != nil {
					t.Fatal(err)
				}
			}
			got, err := p.halfPressure(kInf, k0, omegas, ks)
			if err != nil {
				t.Fatal(err)
			}
			want, err := p.halfPressureSearch(kInf, k0, omegas, ks)
			if err != nil {
				t.Fatal(err)
			}
			d := math.Abs(got/want - 1)
			worst = math.Max(worst, d)
			if d > halfAgreeTol {
				t.Errorf("%g K, %g–%g Pa: p½ ω = %.10g s-1 from the grid, %.10g s-1 by the root search (rel. diff %.2g)", tK, sub[0], sub[cut-1], got, want, d)
			}
		}
	}
	t.Logf("largest relative difference of p½: %.2g", worst)
}

// The worker pool hands out every index once, in the order given, and
// the grid's results do not depend on the number of workers: the 30 × 20
// benchmark grid with its limits and convergence check on 1, 2 and 3
// workers gives bit-identical rows (each temperature is solved by one
// worker alone, in the same operations).
func TestWorkersIdentical(t *testing.T) {
	if testing.Short() {
		t.Skip("the 30 × 20 grid three times")
	}
	ch, col, tr, temps, ps := benchGrid(t)
	var ref *Result
	for _, jobs := range []int{1, 2, 3} {
		res, err := RunContext(context.Background(), ch, col, tr, temps, ps, Options{Jobs: jobs})
		if err != nil {
			t.Fatal(err)
		}
		if ref == nil {
			ref = res
			continue
		}
		if res.Convergence != ref.Convergence || res.ConvergenceT != ref.ConvergenceT || res.ConvergenceP != ref.ConvergenceP {
			t.Errorf("jobs %d: convergence %v at %v K, %v Pa; with 1 worker %v at %v K, %v Pa", jobs,
				res.Convergence, res.ConvergenceT, res.ConvergenceP, ref.Convergence, ref.ConvergenceT, ref.ConvergenceP)
		}
		for i := range temps {
			a, b := res.Rows[i], ref.Rows[i]
			if !slices.Equal(a.K, b.K) || a.K0 != b.K0 || a.HalfPressure != b.HalfPressure || a.Fcent != b.Fcent || a.KInfME != b.KInfME {
				t.Errorf("jobs %d, %g K: the row differs from one worker's", jobs, temps[i])
			}
		}
	}
}

// costOrder is a permutation that puts the costliest temperature first:
// on the benchmark grid (300–2500 K) the 300 K grid has the most grains ×
// band² (its grain kT/5 is the finest), so it goes first.
func TestCostOrder(t *testing.T) {
	ch, _, tr, temps, _ := benchGrid(t)
	order := costOrder(ch, tr, temps, 0, 0)
	sorted := slices.Clone(order)
	slices.Sort(sorted)
	for i, v := range sorted {
		if v != i {
			t.Fatalf("order %v is not a permutation of 0..%d", order, len(temps)-1)
		}
	}
	entries := func(i int) float64 {
		p, err := prepare(ch, tr, temps[i], 0, 0)
		if err != nil {
			t.Fatal(err)
		}
		return float64(p.w.N()) * float64(p.kernel.Band*p.kernel.Band)
	}
	if first, last := entries(order[0]), entries(order[len(order)-1]); first < last {
		t.Errorf("first in order (%g K) costs %g, last (%g K) %g", temps[order[0]], first, temps[order[len(order)-1]], last)
	}
}

// NewWell takes the Boltzmann counts of a reactant with classical rotors
// from the counts k(E) was computed with. That rests on rrkm's rule that
// such a reactant's Boltzmann counts are its plain counts
// (rrkm.Counter.ScaledBoltzmannCountsFrom): checked here bit for bit, on
// the benchmark molecule (a 3D rotor) at 300 and 2500 K, so that a change
// of the rule in pkg/rrkm shows.
func TestWellCountsReused(t *testing.T) {
	ch, _, tr, _, _ := benchGrid(t)
	for _, tK := range []float64{300, 2500} {
		p, err := prepare(ch, tr, tK, 0, 0)
		if err != nil {
			t.Fatal(err)
		}
		g := rrkm.GrainsTo(p.w.Grain, p.w.E[p.w.N()-1]+p.w.Grain/2)
		m := rrkm.RRKM(ch.Reactant, ch.TS, ch.L, g)
		lbc := ch.Reactant.LogBoltzmannCounts(g, tK)
		for i, x := range m.Counts {
			if want := math.Log(x) + float64(m.Scale)*math.Ln2; lbc[i] != want && !(math.IsInf(lbc[i], -1) && math.IsInf(want, -1)) {
				t.Fatalf("%g K, grain %d: Boltzmann count e^%v, plain count e^%v", tK, i, lbc[i], want)
			}
		}
	}
}
