package rrkm

import (
	"fmt"
	"testing"
)

func TestExplore(t *testing.T) {
	r := &Species{Name: "R", Vibrations: []float64{3014, 2966, 2966, 2166, 1467, 1467, 1429, 1129, 1129, 945, 263, 263},
		Rotors: []Rotor{{Dim: 3, Consts: []float64{5.25, 0.34, 0.34}, Symmetry: 1}}}
	ts := &Species{Name: "TS", E0: 13300, Vibrations: []float64{3050, 2990, 2990, 2100, 1450, 1450, 1400, 1100, 1100, 600, 280},
		Rotors: []Rotor{{Dim: 3, Consts: []float64{1.9, 0.42, 0.38}, Symmetry: 1}}}
	for _, T := range []float64{200, 300, 500, 1000, 2000, 3000} {
		ceil := ts.E0 + 40*kT(T)
		rc, _ := NewCounter(r, 1, ceil)
		tc, _ := NewCounter(ts, 1, ceil)
		g := GrainsTo(10, ceil-10)
		m := RRKM(rc, tc, 1, g)
		fmt.Println(T, m.ThermalK(T)/KInf(r, ts, 1, T), CountedQ(m.Counts, g, T)/r.InternalQ(T))
	}
}
