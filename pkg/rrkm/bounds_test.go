package rrkm

import (
	"errors"
	"testing"
	"time"
)

// A quantum or a level beyond the top of the count adds no state below it:
// the count is exactly the count without it (an exact limit), however far
// away it lies — 1e19 cm⁻¹ once overflowed the bin index and panicked.
func TestCountIgnoresLevelsBeyondCeiling(t *testing.T) {
	base := Species{Name: "base", Vibrations: []float64{1000, 1500, 2900}}
	const fine, ceiling = 1.0, 20000.0
	want, err := NewCounter(&base, fine, ceiling)
	if err != nil {
		t.Fatal(err)
	}
	for _, far := range []float64{ceiling + 10, 1e9, 1e19, 1e300} {
		withLevel := base
		withLevel.Electronic = []Level{{0, 1}, {far, 2}}
		withVib := base
		withVib.Vibrations = append([]float64{far}, base.Vibrations...)
		for _, s := range []*Species{&withLevel, &withVib} {
			got, err := NewCounter(s, fine, ceiling)
			if err != nil {
				t.Fatalf("%g cm-1: %v", far, err)
			}
			for j, x := range got.Comb() {
				if x != want.Comb()[j] {
					t.Fatalf("%g cm-1: comb[%d] = %g, want %g", far, j, x, want.Comb()[j])
				}
			}
		}
	}
}

// A barrier so high that the basis would run into the billions fails with
// ErrTooLarge before anything is allocated (1e20 cm⁻¹ once exhausted
// memory), and a series beyond MaxHarmonics is refused by Validate (one of
// 100 000 terms once never finished).
func TestHinderedRotorHugeInputsRefused(t *testing.T) {
	start := time.Now()
	for _, v0 := range []float64{1e10, 1e20, 1e300} {
		_, err := HinderedRotor{B: 5.3, V0: v0, Fold: 3}.Levels(1e5)
		if !errors.Is(err, ErrTooLarge) {
			t.Errorf("V0 = %g cm-1: err = %v, want ErrTooLarge", v0, err)
		}
	}
	if d := time.Since(start); d > 5*time.Second {
		t.Errorf("refusing took %v", d) // a few milliseconds; 5 s for a loaded machine
	}
	series := func(k int) HinderedRotor {
		return HinderedRotor{B: 5.3, V0: 1000, Fold: 3, Cos: make([]float64, k)}
	}
	if err := series(MaxHarmonics).Validate(); err != nil {
		t.Errorf("%d terms: %v", MaxHarmonics, err)
	}
	if err := series(MaxHarmonics + 1).Validate(); err == nil {
		t.Errorf("%d terms accepted", MaxHarmonics+1)
	}
	if err := series(100_000).Validate(); err == nil {
		t.Error("100000 terms accepted")
	}
}

// BasisSize, which solves nothing, predicts the solver: its block is within
// the limit exactly when Levels succeeds, for light and heavy rotors, with
// and without harmonics, at low and high ceilings.
func TestBasisSizePredictsLevels(t *testing.T) {
	if testing.Short() {
		t.Skip("solves blocks of up to 1500 functions densely")
	}
	cases := []struct {
		h    HinderedRotor
		emax float64
	}{
		{HinderedRotor{B: 5.3, V0: 1000, Fold: 3}, 1e4},
		{HinderedRotor{B: 5.3, V0: 1000, Fold: 3}, 6e5},
		{HinderedRotor{B: 0.01, V0: 1.05e5, Fold: 12}, 6e5},
		{HinderedRotor{B: 1e-3, V0: 1000, Fold: 1}, 6e5},
		{HinderedRotor{B: 1e-3, V0: 1.05e5, Fold: 1}, 1e5},
		{HinderedRotor{B: 5, V0: 1000, Fold: 3, Cos: []float64{100, 50, 20}}, 6e5},
		{HinderedRotor{B: 0.1, V0: 1000, Fold: 3, Cos: make([]float64, 24)}, 1e4},
		{HinderedRotor{B: 0.1, V0: 1000, Fold: 3, Cos: make([]float64, 24)}, 6e5},
		{HinderedRotor{B: 0.01, V0: 1000, Fold: 1, Cos: []float64{100}}, 1e5},
	}
	for _, c := range cases {
		size, limit := c.h.BasisSize(c.emax)
		_, err := c.h.Levels(c.emax)
		if (size <= limit) != (err == nil) {
			t.Errorf("%+v to %g cm-1: BasisSize %d (limit %d), Levels err %v", c.h, c.emax, size, limit, err)
		}
	}
}
