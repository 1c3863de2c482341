package job

import (
	"math"
	"slices"

	"github.com/falloff-kinetics/falloff/pkg/collision"
	"github.com/falloff-kinetics/falloff/pkg/input"
	"github.com/falloff-kinetics/falloff/pkg/rrkm"
)

// Spectrum is the main channel's RRKM k(E) and the reactant's density of
// states ρ(E) on the grains the master equation used: at each energy the
// grains of the coldest temperature whose grid reaches it (the finest
// grains, kT/5 or α/5 wide), so one run's counts serve its figures and no
// state is counted twice.
type Spectrum struct {
	Channel string  // the main channel, "reactant -> transition state"
	Species string  // the reactant
	E0      float64 // the main channel's threshold, cm⁻¹
	// Grain is the width of the finest grains (those at the lowest
	// energies), cm⁻¹.
	Grain    float64
	Energies []float64 // grain energies, cm⁻¹, ascending
	K        []float64 // k(E), s⁻¹, as Micro reports it (without Wigner's thermal factor)
	Density  []float64 // ρ(E), states per cm⁻¹
}

// spectrum merges the rows' grains into a Spectrum, or returns nil where
// the master equation's k(E) is not the one Micro reports (a barrierless
// main channel, an adiabatic J treatment) or a density passes float64
// (counts kept scaled, rrkm.Counter.Scale).
func (n *Network) spectrum(rows []collision.TemperatureResult) *Spectrum {
	main := n.Main()
	if main.TS == nil || (n.Model.Reaction.Rotation != input.AllActive && n.Model.Reaction.Rotation != "") {
		return nil
	}
	var ss []*collision.Spectrum
	var temps []float64
	for _, r := range rows {
		if r.Spectrum == nil || r.Spectrum.Scale != 0 || len(r.Spectrum.E) == 0 {
			return nil
		}
		ss, temps = append(ss, r.Spectrum), append(temps, r.T)
	}
	if len(ss) == 0 {
		return nil
	}
	order := make([]int, len(ss))
	for i := range order {
		order[i] = i
	}
	// The coldest grid first: its grains are the finest, and each hotter
	// grid adds the energies above the last one.
	slices.SortStableFunc(order, func(a, b int) int {
		switch {
		case temps[a] < temps[b]:
			return -1
		case temps[a] > temps[b]:
			return 1
		}
		return 0
	})
	r := n.reactant()
	out := &Spectrum{Channel: r.Name + " -> " + main.TS.Name, Species: r.Name, E0: main.E0, Grain: ss[order[0]].Width}
	top := math.Inf(-1)
	for _, i := range order {
		s := ss[i]
		kw := 1.0
		if main.Tunnelling == input.Wigner {
			kw = rrkm.Wigner(main.TS.Imaginary, temps[i]) // thermal: k(E) itself has none
		}
		for g, e := range s.E {
			if e-s.Width/2 < top {
				continue
			}
			out.Energies = append(out.Energies, e)
			out.K = append(out.K, s.K[g]/kw)
			out.Density = append(out.Density, s.Counts[g]/s.Width)
		}
		if len(out.Energies) > 0 {
			top = math.Max(top, out.Energies[len(out.Energies)-1]+s.Width/2)
		}
	}
	if !allFinite(out.K) || !allFinite(out.Density) {
		return nil
	}
	return out
}
