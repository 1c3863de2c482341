package qcread

import (
	"math/rand/v2"
	"testing"
)

// sphere puts n carbon atoms at random on a sphere of radius 5 Å: the worst
// case of the axis search, where every atom is a candidate partner of
// every other (fixed seed).
func sphere(n int) []Atom {
	rng := rand.New(rand.NewPCG(1, 1))
	at := make([]Atom, n)
	for i := range at {
		v := [3]float64{rng.NormFloat64(), rng.NormFloat64(), rng.NormFloat64()}
		at[i] = Atom{"C", scale(v, 5/norm(v))}
	}
	return at
}

func benchmarkAnalyse(b *testing.B, atoms []Atom) {
	for b.Loop() {
		if _, err := Analyse(atoms); err != nil {
			b.Fatal(err)
		}
	}
}

func BenchmarkAnalyseBenzene(b *testing.B)  { benchmarkAnalyse(b, benzene()) }
func BenchmarkAnalyseSphere30(b *testing.B) { benchmarkAnalyse(b, sphere(30)) }
func BenchmarkAnalyseSphere60(b *testing.B) { benchmarkAnalyse(b, sphere(60)) }
