package rrkm

import (
	"math"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"
)

// ThermalEnergy against two independent routes: the thermodynamic identities
// ⟨E⟩ = kT·d lnQ/d lnT and var = (kT)²·(d lnQ/d lnT + d² lnQ/d(lnT)²)
// (any statistical-mechanics text, e.g. McQuarrie 1976, Statistical
// Mechanics, eqs. 3-33 and 3-37) by central differences of InternalQ, to
// 1e-5 (difference error of steps 1e-3 in ln T); and the moments of the
// counted Boltzmann distribution Σ B_i·e^(−E_i/kT) on a 1 cm⁻¹ grain, to
// 1e-3 (grain error of the moments, with the classical rotor convolved).
func TestThermalEnergy(t *testing.T) {
	worstD, worstC := 0.0, 0.0
	species := []*Species{
		{Name: "vibrations", Vibrations: []float64{3014, 2966, 2966, 2166, 1467, 1467, 1429, 1129, 1129, 945, 263, 263}},
		{Name: "with rotor", Vibrations: []float64{2100, 1200, 800, 450}, Rotors: []Rotor{{Dim: 3, Consts: []float64{2, 0.5, 0.4}, Symmetry: 1}}},
		{Name: "electronic", Vibrations: []float64{1500, 700}, Electronic: []Level{{0, 2}, {140, 2}}},
		{Name: "hindered", Vibrations: []float64{1100, 900}, Hindered: []HinderedRotor{{B: 5.5, V0: 400, Fold: 3, Symmetry: 3}}},
	}
	for _, s := range species {
		for _, tK := range []float64{300, 1000, 2500} {
			mean, sd := s.ThermalEnergy(tK)
			kt := kT(tK)
			lq := func(u float64) float64 { return math.Log(s.InternalQ(tK * math.Exp(u))) }
			const h = 1e-3
			d1 := (lq(h) - lq(-h)) / (2 * h)
			d2 := (lq(h) - 2*lq(0) + lq(-h)) / (h * h)
			worstD = math.Max(worstD, math.Max(math.Abs(mean/(kt*d1)-1), math.Abs(sd/(kt*math.Sqrt(d1+d2))-1)))
			if m := kt * d1; !scalar.EqualWithinAbsOrRel(mean, m, 1e-9, 1e-5) {
				t.Errorf("%s, %v K: ⟨E⟩ = %.8g, kT·dlnQ/dlnT = %.8g", s.Name, tK, mean, m)
			}
			if v := kt * math.Sqrt(d1+d2); !scalar.EqualWithinAbsOrRel(sd, v, 1e-9, 1e-5) {
				t.Errorf("%s, %v K: σ = %.8g, from d²lnQ = %.8g", s.Name, tK, sd, v)
			}
			if s.Name == "hindered" {
				continue // its counted levels follow the same Q; the difference check covers it
			}
			top := mean + 40*sd + 40*kt
			c, err := NewCounter(s, 1, top)
			if err != nil {
				t.Fatal(err)
			}
			g := GrainsTo(1, top-1)
			b := c.BoltzmannCounts(g, tK)
			z, e1, e2 := 0.0, 0.0, 0.0
			for i, x := range b {
				e := g.Energy(i)
				w := x * math.Exp(-e/kt)
				z += w
				e1 += w * e
				e2 += w * e * e
			}
			cm, csd := e1/z, math.Sqrt(e2/z-(e1/z)*(e1/z))
			worstC = math.Max(worstC, math.Max(math.Abs(mean/cm-1), math.Abs(sd/csd-1)))
			if !scalar.EqualWithinAbsOrRel(mean, cm, 1, 1e-3) || !scalar.EqualWithinAbsOrRel(sd, csd, 1, 1e-3) {
				t.Errorf("%s, %v K: ⟨E⟩, σ = %.6g, %.6g; counted %.6g, %.6g", s.Name, tK, mean, sd, cm, csd)
			}
		}
	}
	t.Logf("worst relative deviation: %.2g from d lnQ, %.2g from the counted distribution", worstD, worstC)
}
