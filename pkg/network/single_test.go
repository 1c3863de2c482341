package network

import (
	"fmt"
	"math"
	"testing"

	"github.com/falloff-kinetics/falloff/pkg/collision"
	"github.com/falloff-kinetics/falloff/pkg/rrkm"
)

// singleTol is the agreement asked of one well with one exit against
// pkg/collision. The two solve the same matrix by independent algorithms
// (a dense eigendecomposition here; banded inverse iteration with the flux
// identity, or the strong collider's secular equation, there), so they
// differ by rounding only: 1e-10 where the dense solve can give it. Its
// eigenvalues are accurate to ε·‖S‖ absolutely (Result.Roundoff relative,
// up to 1e-6 here, where k(E) at the top of the grid reaches 1e12 s⁻¹ and
// k_uni is 1e3 s⁻¹); the rate coefficients, from the flux form, were
// measured 3 to 3000 times below that bound, so where Roundoff exceeds
// 1e-10 it is the tolerance. The eigenvalue itself gets 10·Roundoff (the
// bound holds up to a modest factor of the order n; measured 2.8).
const singleTol = 1e-10

// TestSingleWell: a network of one well with one exit is the single-well
// master equation, so its phenomenological k(A→X), and the magnitude of its
// one chemically significant eigenvalue, equal pkg/collision's k_uni for
// the same k(E), Boltzmann weights, kernel and ω; K[A][A] = −k_uni since
// the exit is the only loss. Strong collider (with and without an
// efficiency) and exponential-down.
func TestSingleWell(t *testing.T) {
	rc := counter(t, spA, offA)
	m := rrkm.RRKM(rc, counter(t, tsX, tsX.E0), 1, testGrid)
	worst, worstStrict, worstEig, strict := 0.0, 0.0, 0.0, 0
	for _, tr := range []collision.Transfer{{Strong: true}, {Strong: true, Efficiency: 0.3}, expDown} {
		for _, tK := range []float64{900, 1200, 1500} {
			for _, omega := range []float64{1e6, 1e8, 1e10, 1e12} {
				t.Run(fmt.Sprintf("%v/%gK/%g", tr, tK, omega), func(t *testing.T) {
					cw := collision.NewWell(m, rc, tK)
					var want float64
					if tr.Strong {
						want = cw.StrongCollider(efficiency(tr) * omega)
					} else {
						ker, err := collision.ExponentialDown(cw, tr.Alpha(tK))
						if err != nil {
							t.Fatal(err)
						}
						sol, err := cw.Solve(ker, omega)
						if err != nil {
							t.Fatal(err)
						}
						want = sol.K
					}
					net := &Network{Grains: testGrid,
						Wells: []Well{{Name: "A", Counts: m.Counts, CountScale: m.Scale, Transfer: tr}},
						Exits: []Exit{{Name: "X", Well: 0, K: m.K}}}
					// collision's k_uni is the slowest eigenvalue however
					// poorly it is separated (up to 0.28 here, at 1500 K),
					// so the comparison holds beyond the default threshold.
					res, err := Solve(net, tK, omega, Options{MaxSeparation: 0.5})
					if err != nil {
						t.Fatal(err)
					}
					if res.Grains != cw.N() {
						t.Errorf("%d grains, collision's well has %d", res.Grains, cw.N())
					}
					tol := math.Max(singleTol, res.Roundoff)
					if tol == singleTol {
						strict++
					}
					for _, c := range []struct {
						what string
						got  float64
						tol  float64
					}{{"k(A→X)", res.KExit[0][0], tol}, {"−K[A][A]", -res.K[0][0], tol}, {"−λ", -res.Eigenvalues[0], 10 * tol}} {
						d := math.Abs(c.got-want) / want
						if c.what == "−λ" {
							worstEig = math.Max(worstEig, d/tol)
						} else {
							worst = math.Max(worst, d)
							if tol == singleTol {
								worstStrict = math.Max(worstStrict, d)
							}
						}
						if d > c.tol {
							t.Errorf("%s = %.15g s-1, collision k_uni = %.15g (relative %.2g, tolerance %.2g)", c.what, c.got, want, d, c.tol)
						}
					}
				})
			}
		}
	}
	if strict < 6 {
		t.Errorf("only %d cases precise enough for the 1e-10 tolerance", strict)
	}
	t.Logf("largest relative deviation of k(A→X), K[A][A] from collision's k_uni: %.2g; %.2g in the %d cases held to 1e-10; −λ: %.2g of its tolerance unit", worst, worstStrict, strict, worstEig)
}
