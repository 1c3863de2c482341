package rrkm

import (
	"fmt"
	"testing"
)

// molecule30 is a 30-mode molecule with frequencies spread as in a C5
// hydrocarbon (illustrative) and a 3D external rotor.
func molecule30() *Species {
	f := make([]float64, 30)
	for i := range f {
		f[i] = 150 + float64(i)*(3100-150)/29
	}
	return &Species{Name: "m30", Vibrations: f,
		Rotors: []Rotor{{Dim: 3, Consts: []float64{0.25, 0.11, 0.09}, Symmetry: 1}}}
}

// BenchmarkCount30Modes counts a 30-mode molecule to 100 000 cm⁻¹ on a
// 1 cm⁻¹ fine grain (the Beyer–Swinehart pass) and re-bins it with the
// rotor convolved onto 10 cm⁻¹ grains.
func BenchmarkCount30Modes(b *testing.B) {
	s := molecule30()
	b.Run("vibrations", func(b *testing.B) {
		for b.Loop() {
			if _, err := NewCounter(&Species{Name: "v", Vibrations: s.Vibrations}, 1, 100000); err != nil {
				b.Fatal(err)
			}
		}
	})
	b.Run("with-rotor-10cm-1-grains", func(b *testing.B) {
		for b.Loop() {
			c, err := NewCounter(s, 1, 100000)
			if err != nil {
				b.Fatal(err)
			}
			c.Counts(GrainsTo(10, 99990), 0)
		}
	})
}

// BenchmarkRotorConvolution compares the block-expansion convolution with the
// direct O(N) sum it replaces (the reference), per evaluated energy, at the
// top of a 100 000 cm⁻¹ count.
func BenchmarkRotorConvolution(b *testing.B) {
	c, err := NewCounter(molecule30(), 1, 100000)
	if err != nil {
		b.Fatal(err)
	}
	for _, e := range []float64{10000, 99000} {
		b.Run(fmt.Sprintf("blocks-E=%g", e), func(b *testing.B) {
			for b.Loop() {
				c.Sum(e)
			}
		})
		b.Run(fmt.Sprintf("direct-E=%g", e), func(b *testing.B) {
			ps := &powerSum{c: c.comb, delta: 1, block: 64} // no blocks: all exact
			for b.Loop() {
				ps.at(e, 1.5)
			}
		})
	}
}

// BenchmarkILTMicro computes an inverse-Laplace k(E) for the 30-mode molecule
// on 10 cm⁻¹ grains to 100 000 cm⁻¹: n = 1.5 with the 3D rotor is a
// whole exponent (p = 3, repeated multiplication), n = 0.35 goes through
// math.Pow in the near part of every power sum.
func BenchmarkILTMicro(b *testing.B) {
	c, err := NewCounter(molecule30(), 1, 100000)
	if err != nil {
		b.Fatal(err)
	}
	g := GrainsTo(10, 99990)
	for _, n := range []float64{1.5, 0.35} {
		b.Run(fmt.Sprintf("n=%g", n), func(b *testing.B) {
			for b.Loop() {
				if _, err := ILTMicro(c, ILT{A: 1e13, T0: 300, N: n, EInf: 5000}, g); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}
