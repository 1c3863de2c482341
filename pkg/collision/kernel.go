package collision

import (
	"fmt"
	"math"
	"sync"
)

// bandTolerance is where the exponential-down kernel is cut: transfers with
// exp(−ΔE/α) below it (ΔE > 16α) are dropped, in detailed-balance pairs, so
// the kernel stays exactly balanced and normalised. Cutting at 1e-10
// instead changes k, k0 and the falloff centre by less than 1e-6 (measured on
// the benchmark grid) and costs twice the time.
const bandTolerance = 1e-7

// KernelReach returns how far in energy, cm⁻¹, the exponential-down kernel
// with mean downward energy alpha cm⁻¹ reaches from a grain: where
// exp(−ΔE/α) falls to bandTolerance (16.1·α).
func KernelReach(alpha float64) float64 { return alpha * -math.Log(bandTolerance) }

// minDownShare is the least total downward probability a grain keeps when the
// top-down normalisation meets a grain whose upward probabilities from
// detailed balance alone would sum to one or more.
const minDownShare = 0.01

// Kernel is a collisional transition-probability matrix P(i←j) on a well's
// grains, banded: P[j][d] = P(j−d ← j)... stored by column j for the
// downward part and the diagonal; upward entries follow from detailed balance.
type Kernel struct {
	N, Band int
	// down[j][d] = P(j−d ← j) for d = 0..Band (d = 0 is the diagonal);
	// P(j ← j−d) = down[j][d]·F[j]/F[j−d] by detailed balance.
	down [][]float64
	f    []float64
	// Rescaled counts the grains where upward probabilities had to be scaled
	// down to keep a downward share (see ExponentialDown).
	Rescaled int

	once sync.Once
	op   collisionOperator
}

// ExponentialDown builds the exponential-down kernel with mean downward energy
// alpha cm⁻¹ on well w: P(i←j) = C_j·∫exp(−(E_j−E)/α)dE over grain i for
// E_i ≤ E_j, the
// upward P(j←i) = P(i←j)·F_j/F_i by detailed balance, and C_j fixed from the
// top grain down so that every column sums to one (Gilbert & Smith 1990,
// §5.2). Where the upward probabilities out of a sparse low grain, fixed by
// the columns above, would already sum to 1 − minDownShare or more, they are
// all scaled down together with their partners (so detailed balance stays
// exact) and the removed probability is returned to the diagonal of the
// upper grains (so their columns still sum to one).
func ExponentialDown(w *Well, alpha float64) (*Kernel, error) {
	if !(alpha > 0) {
		return nil, fmt.Errorf("collision: alpha = %v cm-1 must be positive", alpha)
	}
	n := w.N()
	cut := alpha * -math.Log(bandTolerance)
	band := 0
	for j := range n {
		i := j
		for i > 0 && w.E[j]-w.E[i-1] <= cut {
			i--
		}
		band = max(band, j-i)
	}
	// The kernel is sampled at grain centres (midpoint rule), the elastic
	// term with weight 1: it stands for the lower half of the grain on the
	// downward side and the upper half on the upward side, where the
	// continuous kernel has the same value. (Integrating the downward
	// branch alone over the grains would halve it, a first-order error.)
	k := &Kernel{N: n, Band: band, f: w.F, down: make([][]float64, n)}
	up := make([]float64, n) // Σ of upward probabilities out of each grain
	for j := n - 1; j >= 0; j-- {
		dj := make([]float64, min(band, j)+1)
		k.down[j] = dj
		sum := 0.0
		for d := range dj {
			if de := w.E[j] - w.E[j-d]; d == 0 {
				dj[d] = 1
			} else if de <= cut {
				dj[d] = math.Exp(-de / alpha)
			}
			sum += dj[d]
		}
		if up[j] > 1-minDownShare {
			s := (1 - minDownShare) / up[j]
			for d := 1; d <= band && j+d < n; d++ {
				if d < len(k.down[j+d]) {
					p := k.down[j+d][d]
					k.down[j+d][d] = s * p
					k.down[j+d][0] += (1 - s) * p
				}
			}
			up[j] = 1 - minDownShare
			k.Rescaled++
		}
		c := (1 - up[j]) / sum
		for d := range dj {
			dj[d] *= c
			if d > 0 {
				up[j-d] += dj[d] * w.F[j] / w.F[j-d]
			}
		}
	}
	return k, nil
}

// At returns P(i←j).
func (k *Kernel) At(i, j int) float64 {
	switch d := j - i; {
	case d >= 0 && d < len(k.down[j]):
		return k.down[j][d]
	case d < 0 && -d < len(k.down[i]):
		return k.down[i][-d] * k.f[i] / k.f[j]
	}
	return 0
}

// symmetric returns S(i,j) = P(i←j)·sqrt(F_j/F_i) for j ≥ i (symmetric by
// detailed balance) from the downward entry.
func (k *Kernel) symmetric(i, j int) float64 {
	d := j - i
	if d >= len(k.down[j]) {
		return 0
	}
	return k.down[j][d] * math.Sqrt(k.f[j]/k.f[i])
}
