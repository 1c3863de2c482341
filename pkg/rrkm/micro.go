package rrkm

import (
	"github.com/falloff-kinetics/falloff/pkg/units"
)

// Micro holds the RRKM rate constants of one channel on a grain grid.
type Micro struct {
	Grains Grains
	E0     float64   // threshold, cm⁻¹
	L      float64   // reaction-path degeneracy
	Counts []float64 // reactant states per grain
	SumTS  []float64 // grain-averaged W‡(E − E0)
	K      []float64 // k(E) in s⁻¹; 0 where the grain holds no reactant state
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
	for i, n := range m.Counts {
		if n > 0 && m.SumTS[i] > 0 {
			m.K[i] = l * units.LightCm * m.SumTS[i] * g.Width / n
		}
	}
	return m
}

// ThermalK returns the Boltzmann average of k(E) at tK, which canonical TST
// must reproduce.
func (m *Micro) ThermalK(tK float64) float64 {
	return ThermalAverage(m.Counts, m.K, m.Grains, tK)
}
