package rrkm

import (
	"fmt"
	"math"

	"github.com/falloff-kinetics/falloff/pkg/units"
)

// Micro holds the RRKM rate constants of one channel on a grain grid.
type Micro struct {
	Grains Grains
	E0     float64   // threshold, cm⁻¹
	L      float64   // reaction-path degeneracy
	Counts []float64 // reactant states per grain
	SumTS  []float64 // grain-averaged W‡(E − E0), or N‡(E) with tunnelling
	K      []float64 // k(E) in s⁻¹; 0 where the grain holds no reactant state
	// Tunnel is the barrier k(E) tunnels through, nil for plain RRKM.
	Tunnel *Eckart
}

// RRKM computes k(E) = L·c·W̄‡(E−E0)/ρ̄(E) on grains g, with W̄‡ and ρ̄ grain
// averages (Marcus, J. Chem. Phys. 20, 359, 1952; Holbrook, Pilling &
// Robertson 1996, eq. 4.21). Grains with no reactant state get k = 0: they
// carry no population, and a rate from an empty or sparse bin would be noise.
func RRKM(reactant, ts *Counter, l float64, g Grains) *Micro {
	e0 := ts.species.E0
	m := &Micro{Grains: g, E0: e0, L: l,
		Counts: reactant.Counts(g, 0),
		SumTS:  ts.AveragedSums(g, e0),
		K:      make([]float64, g.N)}
	m.rates()
	return m
}

// RRKMTunnel computes k(E) = L·c·N̄‡(E)/ρ̄(E) with tunnelling through the
// Eckart barrier e: N̄‡ is the grain average of N‡(E) = ∫ρ‡(x)P(E − x)dx
// (Miller, J. Am. Chem. Soc. 101, 6810, 1979; see AveragedTunnelSums), so
// k(E) > 0 below E0, down to the upper asymptote max(0, V1 − V2). A nil e
// gives RRKM. The barrier top must be the threshold, e.V1 = E0 of the
// transition state, and ts must be counted to g.Top() − max(0, V1 − V2);
// RRKMTunnel panics otherwise, or if e is invalid.
func RRKMTunnel(reactant, ts *Counter, l float64, g Grains, e *Eckart) *Micro {
	if e == nil {
		return RRKM(reactant, ts, l, g)
	}
	checkTop("RRKMTunnel", ts.species, e)
	m := &Micro{Grains: g, E0: ts.species.E0, L: l,
		Counts: reactant.Counts(g, 0),
		SumTS:  ts.AveragedTunnelSums(g, *e),
		K:      make([]float64, g.N),
		Tunnel: e}
	m.rates()
	return m
}

// checkTop panics if the barrier top is not the threshold of ts: k(E) and
// k∞ measure the transition state's levels from E0, the barrier from V1.
func checkTop(where string, ts *Species, e *Eckart) {
	if math.Abs(e.V1-ts.E0) > 1e-9*math.Max(1, ts.E0) {
		panic(fmt.Sprintf("rrkm: %s: species %q: Eckart V1 = %v cm-1 differs from the threshold E0 = %v cm-1", where, ts.Name, e.V1, ts.E0))
	}
}

// rates fills K from Counts and SumTS.
func (m *Micro) rates() {
	l, g := m.L, m.Grains
	for i, n := range m.Counts {
		if n > 0 && m.SumTS[i] > 0 {
			m.K[i] = l * units.LightCm * m.SumTS[i] * g.Width / n
		}
	}
}

// ThermalK returns the Boltzmann average of k(E) at tK, which canonical TST
// must reproduce.
func (m *Micro) ThermalK(tK float64) float64 {
	return thermalAverage(m.Counts, m.K, m.Grains, tK)
}
