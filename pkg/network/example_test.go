package network_test

import (
	"fmt"
	"log"
	"math"

	"github.com/falloff-kinetics/falloff/pkg/collision"
	"github.com/falloff-kinetics/falloff/pkg/network"
	"github.com/falloff-kinetics/falloff/pkg/rrkm"
	"github.com/falloff-kinetics/falloff/pkg/units"
)

// Two invented isomers A and B (B 1000 cm⁻¹ above A) joined by a transition
// state 30 kcal/mol above A, without exits: the rate coefficients of
// A ⇌ B at 1000 K and ω = 1e9 s⁻¹, whose ratio is the equilibrium constant
// from the wells' counted partition functions.
func ExampleSolve() {
	g := rrkm.GrainsTo(200, 30000) // the common grid, from A's zero-point level
	rot := []rrkm.Rotor{{Dim: 3, Consts: []float64{1.5, 0.3, 0.25}}}
	a := &rrkm.Species{Name: "A", Vibrations: []float64{3000, 1500, 1200, 1000, 800, 500}, Rotors: rot}
	b := &rrkm.Species{Name: "B", Vibrations: []float64{2900, 1400, 1100, 900, 700, 400}, Rotors: rot}
	ts := &rrkm.Species{Name: "TS", E0: 30 * units.Cm1PerKcalPerMol, Vibrations: []float64{2950, 1450, 1150, 950, 600}, Rotors: rot}
	const offB = 1000 // B's zero-point level, cm⁻¹ above A's

	count := func(s *rrkm.Species, off float64) *rrkm.Counter {
		c, err := rrkm.NewCounter(s, 1, g.Top()-off)
		if err != nil {
			log.Fatal(err)
		}
		return c
	}
	ca, cb, ct := count(a, 0), count(b, offB), count(ts, ts.E0)
	m := rrkm.RRKM(ca, ct, 1, g) // k(E) of A → B
	nb := cb.Counts(g, offB)     // B's states on the common grid

	tr := collision.Transfer{Alpha300: 250, Exponent: 0.85}
	net := &network.Network{
		Grains: g,
		Wells: []network.Well{
			{Name: "A", Counts: m.Counts, Transfer: tr},
			{Name: "B", Counts: nb, Transfer: tr},
		},
		// k(B → A) follows from detailed balance.
		Isomerisations: []network.Isomerisation{{Name: "A=B", From: 0, To: 1, K: m.K}},
	}
	const tK = 1000
	res, err := network.Solve(net, tK, 1e9, network.Options{})
	if err != nil {
		fmt.Println(err)
		return
	}
	kf, kr := res.K[1][0], res.K[0][1]
	keq := rrkm.CountedQ(nb, g, tK) / rrkm.CountedQ(m.Counts, g, tK)
	fmt.Printf("chemically significant eigenvalues: %d, separation below 0.1: %v\n", len(res.Eigenvalues), res.Separation < 0.1)
	fmt.Printf("k(A→B)/k(B→A) = Q_B/Q_A to 1e-9: %v\n", math.Abs(kf/kr/keq-1) < 1e-9)
	// Output:
	// chemically significant eigenvalues: 2, separation below 0.1: true
	// k(A→B)/k(B→A) = Q_B/Q_A to 1e-9: true
}
