package rrkm

import (
	"fmt"
	"math"
)

// Grains describes the grid on which sums, densities and k(E) are reported:
// N grains of width Width cm⁻¹, grain i centred on i·Width.
type Grains struct {
	Width float64
	N     int
}

// Energy returns the centre of grain i in cm⁻¹.
func (g Grains) Energy(i int) float64 { return float64(i) * g.Width }

// Top returns the upper edge of the last grain in cm⁻¹.
func (g Grains) Top() float64 { return (float64(g.N) - 0.5) * g.Width }

// GrainsTo returns the grains of width w that lie wholly below ceiling (at
// least one).
func GrainsTo(w, ceiling float64) Grains {
	return Grains{Width: w, N: max(1, int(math.Floor(ceiling/w+0.5+1e-9)))}
}

// Counts returns the number of states in each grain, the exact integral of
// ρ over [(i−½)Δ, (i+½)Δ), shifted up by offset cm⁻¹ (the threshold of a
// transition state; 0 for a reactant); +Inf where that number is beyond
// the floating-point range (see ScaledCounts).
func (c *Counter) Counts(g Grains, offset float64) []float64 {
	return unscale(c.ScaledCounts(g, offset), c.scale)
}

// ScaledCounts returns Counts times 2^−Scale(), finite at any size.
func (c *Counter) ScaledCounts(g Grains, offset float64) []float64 {
	c.need(g, offset)
	out := make([]float64, g.N)
	lo := c.ScaledSum(-0.5*g.Width - offset)
	for i := range out {
		hi := c.ScaledSum((float64(i)+0.5)*g.Width - offset)
		out[i] = hi - lo
		lo = hi
	}
	return out
}

// unscale multiplies xs in place by 2^scale and returns it.
func unscale(xs []float64, scale int) []float64 {
	if scale != 0 {
		for i, x := range xs {
			xs[i] = math.Ldexp(x, scale)
		}
	}
	return xs
}

// Densities returns the grain-averaged density of states in states per cm⁻¹.
// It is +Inf where the density is beyond the floating-point range.
func (c *Counter) Densities(g Grains) []float64 {
	n := c.ScaledCounts(g, 0)
	for i := range n {
		n[i] /= g.Width
	}
	return unscale(n, c.scale)
}

// SumsAt returns W at the grain centres (states below E_i, half of any at E_i).
func (c *Counter) SumsAt(g Grains) []float64 {
	c.need(g, 0)
	out := make([]float64, g.N)
	for i := range out {
		out[i] = c.Sum(g.Energy(i))
	}
	return out
}

// AveragedSums returns the grain averages of W(E − offset), the sum of states
// measured from a threshold at offset cm⁻¹: the quantity k(E) needs, because a
// grain average keeps the thermal average of k(E) equal to canonical TST.
// It is +Inf where the average is beyond the floating-point range.
func (c *Counter) AveragedSums(g Grains, offset float64) []float64 {
	return unscale(c.averagedSums(g, offset), c.scale)
}

// averagedSums is AveragedSums times 2^−scale.
func (c *Counter) averagedSums(g Grains, offset float64) []float64 {
	c.need(g, offset)
	out := make([]float64, g.N)
	lo := c.integratedSum(-0.5*g.Width - offset)
	for i := range out {
		hi := c.integratedSum((float64(i)+0.5)*g.Width - offset)
		out[i] = (hi - lo) / g.Width
		lo = hi
	}
	return out
}

// fracCounts returns, per grain, the exact integral over the grain of
// [ρ ⊗ x^(q−1)/Γ(q)](E − offset), q ≥ 0 (for q = 0 the kernel is δ(x)), times
// 2^−scale: the differences of fracSum at the grain edges. q = 0 gives
// ScaledCounts(g, offset), q = 1 gives Δ·averagedSums(g, offset).
func (c *Counter) fracCounts(g Grains, offset, q float64) []float64 {
	c.need(g, offset)
	ps := c.combPowerSum(q)
	out := make([]float64, g.N)
	lo := c.fracSum(-0.5*g.Width-offset, q, ps)
	for i := range out {
		hi := c.fracSum((float64(i)+0.5)*g.Width-offset, q, ps)
		out[i] = hi - lo
		lo = hi
	}
	return out
}

func (c *Counter) need(g Grains, offset float64) {
	if top := g.Top() - offset; top > c.ceiling+c.fine {
		panic(fmt.Sprintf("rrkm: species %q: grains reach %v cm-1, counted only to %v cm-1", c.species.Name, top, c.ceiling))
	}
}

// BoltzmannCounts returns, per grain, Σ exp(−(E−E_i)/kT) over the states in
// grain i (E_i its centre): the number of states weighted by their exact
// Boltzmann factors relative to the centre. For the quantized states it is
// exact from the fine comb, which matters at low temperature where a coarse
// grain holds a few sparse levels. For a species with classical rotors the
// density is continuous and the plain count is used (second-order error).
// Σ_i BoltzmannCounts_i·exp(−E_i/kT) is then the partition function. It is
// +Inf where the number is beyond the floating-point range (see
// LogBoltzmannCounts).
func (c *Counter) BoltzmannCounts(g Grains, tK float64) []float64 {
	return unscale(c.scaledBoltzmannCounts(g, tK), c.scale)
}

// LogBoltzmannCounts returns the natural logarithms of BoltzmannCounts (−Inf
// for a grain without states), finite at any size: the Boltzmann weights of
// the grains are exp(LogBoltzmannCounts_i − E_i/kT)/Q.
func (c *Counter) LogBoltzmannCounts(g Grains, tK float64) []float64 {
	out := c.scaledBoltzmannCounts(g, tK)
	for i, x := range out {
		out[i] = math.Log(x) + float64(c.scale)*math.Ln2
	}
	return out
}

// scaledBoltzmannCounts is BoltzmannCounts times 2^−scale.
func (c *Counter) scaledBoltzmannCounts(g Grains, tK float64) []float64 {
	return c.ScaledBoltzmannCountsFrom(g, tK, 0)
}

// ScaledBoltzmannCountsFrom returns BoltzmannCounts times 2^−Scale (the unit
// of ScaledCounts) on grains g whose zero lies offset cm⁻¹ below the
// species' zero-point level (a well of a network on the common grid):
// per grain i, Σ exp(−(E − E_i)/kT) over the states in it, E and E_i on
// g's scale; the plain ScaledCounts(g, offset) for a species with
// classical rotors.
func (c *Counter) ScaledBoltzmannCountsFrom(g Grains, tK, offset float64) []float64 {
	if c.rot != nil {
		return c.ScaledCounts(g, offset)
	}
	c.need(g, offset)
	beta := 1 / kT(tK)
	out := make([]float64, g.N)
	for j, n := range c.comb {
		e := float64(j)*c.fine + offset
		i := int(math.Floor(e/g.Width + 0.5))
		if i >= g.N {
			break
		}
		// A level on a grain edge goes half to each side, as in Counts.
		if d := e/g.Width - float64(i); d < -0.5+1e-12 && i > 0 {
			out[i-1] += n / 2 * math.Exp(-beta*(e-g.Energy(i-1)))
			n /= 2
		}
		out[i] += n * math.Exp(-beta*(e-g.Energy(i)))
	}
	return out
}

// CountedQ returns the partition function of the counted states on grains g,
// Σ N_i·exp(−E_i/kT), with N_i = Counts(g, 0). It equals PartitionFunction to
// O((Δ/kT)²) when the grains reach well above the thermal energies.
func CountedQ(counts []float64, g Grains, tK float64) float64 {
	beta := 1 / kT(tK)
	q := 0.0
	for i, n := range counts {
		q += n * math.Exp(-beta*g.Energy(i))
	}
	return q
}

// LogCountedQ returns the natural logarithm of CountedQ of the counter's
// grain counts on g at tK, formed in log space from the scaled counts, so
// that it is finite for a molecule whose counts pass the floating-point
// range (where Counts is +Inf) while its partition function does not.
func (c *Counter) LogCountedQ(g Grains, tK float64) float64 {
	counts := c.ScaledCounts(g, 0)
	beta := 1 / kT(tK)
	top := math.Inf(-1)
	lw := make([]float64, len(counts))
	for i, n := range counts {
		lw[i] = math.Inf(-1)
		if n > 0 {
			lw[i] = math.Log(n) - beta*g.Energy(i)
			top = math.Max(top, lw[i])
		}
	}
	if math.IsInf(top, -1) {
		return top
	}
	s := 0.0
	for _, l := range lw {
		s += math.Exp(l - top)
	}
	return top + math.Log(s) + float64(c.scale)*math.Ln2
}

// Log10Densities returns log10 of the grain-averaged density of states in
// states per cm⁻¹ (−Inf for an empty grain), finite at any size.
func (c *Counter) Log10Densities(g Grains) []float64 {
	n := c.ScaledCounts(g, 0)
	out := make([]float64, len(n))
	for i, x := range n {
		out[i] = (math.Log(x/g.Width) + float64(c.scale)*math.Ln2) / math.Ln10
	}
	return out
}

// Log10SumsAt returns log10 of SumsAt (−Inf where W = 0), finite at any size.
func (c *Counter) Log10SumsAt(g Grains) []float64 {
	c.need(g, 0)
	out := make([]float64, g.N)
	for i := range out {
		out[i] = c.LogSum(g.Energy(i)) / math.Ln10
	}
	return out
}
