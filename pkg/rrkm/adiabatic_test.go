package rrkm

import (
	"math"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"
)

// The split keeps the classical rotational partition function: the K rotor
// times the J rotor's kT/B̄ is the three-dimensional top's
// sqrt(π(kT)³/(ABC)) (Herzberg 1945; Holbrook, Pilling & Robertson 1996,
// ch. 4), for a prolate, an oblate and a near-spherical top; a linear
// molecule's rotor is all J. Tolerance 1e-12: products of a few numbers.
func TestSplitExternalRotationKeepsQ(t *testing.T) {
	for _, c := range [][]float64{{5.25, 0.3357, 0.3357}, {0.35, 0.33, 0.12}, {1.9, 0.42, 0.38}, {5.2, 5.2, 5.2}, {0.12, 0.35, 0.33}} {
		s := &Species{Name: "top", Rotors: []Rotor{{Dim: 3, Consts: c, Symmetry: 1}}}
		act, j := SplitExternalRotation(s)
		full, _ := s.rotorFactor()
		part, dim := act.rotorFactor()
		if dim != 1 || !scalar.EqualWithinRel(part/j.B, full, 1e-12) {
			t.Errorf("%v: K rotor factor %g / B̄ %g = %g, want %g (dim %d)", c, part, j.B, part/j.B, full, dim)
		}
	}
	lin := &Species{Name: "lin", Rotors: []Rotor{{Dim: 2, Consts: []float64{1.478}, Symmetry: 1}}}
	act, j := SplitExternalRotation(lin)
	if len(act.Rotors) != 0 || j.B != 1.478 {
		t.Errorf("linear: active rotors %v, J rotor %v", act.Rotors, j)
	}
	if len(lin.Rotors) != 1 {
		t.Error("the split changed its argument")
	}
}

// Mulholland's expansion of the rigid-rotor sum, Q_J = kT/B̄ + 1/3 +
// B̄/(15kT) + … (McQuarrie 1976, eq. 6-29, from memory), for B̄/kT ≤ 0.05:
// the next term, 4(B̄/kT)²/315, is below 3.2e-5 of Q there; the
// distribution sums to 1 and its mean B̄J(J+1) is kT − B̄/3 to the same order
// (the derivative of the expansion).
func TestQJ(t *testing.T) {
	for _, c := range []struct{ b, tK float64 }{{0.3357, 300}, {1.478, 2000}, {0.05, 200}, {10.5, 3000}} {
		r := JRotor{B: c.b}
		x := c.b / kT(c.tK)
		want := 1/x + 1.0/3 + x/15
		if got := r.QJ(c.tK); math.Abs(got/want-1) > 4*x*x/315+1e-12 {
			t.Errorf("B̄ %g, %g K: Q_J = %.10g, want %.10g", c.b, c.tK, got, want)
		}
		p := r.JDistribution(c.tK)
		sum, mean := 0.0, 0.0
		for j, pj := range p {
			sum += pj
			mean += pj * r.Energy(j)
		}
		if math.Abs(sum-1) > 1e-12 || math.Abs(mean/(kT(c.tK)-c.b/3)-1) > 2*x*x {
			t.Errorf("B̄ %g, %g K: Σp = %v, ⟨E⟩ = %g, want kT − B̄/3 = %g", c.b, c.tK, sum, mean, kT(c.tK)-c.b/3)
		}
	}
}

// The high-pressure limit is unchanged: the Boltzmann average over the
// active energy and J of k(E, J) is canonical TST with the rotational
// partition functions of the J-resolved model (KInfAdiabatic, quantum J
// sums), and it equals canonical TST with the full classical tops to the
// quantum correction of the J sums, (B̄‡ − B̄)/(3kT) ≤ 2e-4 here. The TST
// identity (Holbrook, Pilling & Robertson 1996, eq. 4.26) with the same
// tolerance as TestThermalAverageEqualsCanonical, 1e-3 (grain error of
// 5 cm⁻¹ grains; the K rotor's density, ∝ E^(−1/2), is less smooth than a
// top's), 200–3000 K, on a linear reactant with a bent TS (HCN), a
// prolate top (CH3NC) and a pair with hindered rotors (ethane).
func TestAdiabaticThermalAverage(t *testing.T) {
	const tol = 1e-3
	temps := []float64{200, 300, 500, 1000, 2000, 3000}
	for _, pair := range []func() (*Species, *Species){hcnPair, ch3ncPair, ethanePair} {
		r, ts := pair()
		t.Run(r.Name, func(t *testing.T) {
			ra, jr := SplitExternalRotation(r)
			tsa, jts := SplitExternalRotation(ts)
			ceiling := ts.E0 + 40*kT(3000)
			rc, err := NewCounter(ra, 1, ceiling)
			if err != nil {
				t.Fatal(err)
			}
			tc, err := NewCounter(tsa, 1, ceiling-ts.E0+MaxJShift(jr, jts, 3000)+10)
			if err != nil {
				t.Fatal(err)
			}
			l := PathDegeneracy(r, ts)
			// The linear reactant's active density is its bare vibrational
			// comb: snapping sparse levels to grain centres errs by up to
			// Δ/2kT per level, so its grains are 2 cm⁻¹ (0.7e-3 at 200 K).
			width := 5.0
			if len(ra.Rotors) == 0 {
				width = 2
			}
			g := GrainsTo(width, ceiling-width)
			tab := tc.NewSumTable(tc.Ceiling())
			worst, worstFull := 0.0, 0.0
			for _, tK := range temps {
				m := RRKMAdiabatic(rc, tab, l, g, jr, jts, tK)
				got := m.ThermalK(tK)
				want, full := KInfAdiabatic(ra, tsa, jr, jts, l, tK), KInf(r, ts, l, tK)
				worst = math.Max(worst, math.Abs(got/want-1))
				worstFull = math.Max(worstFull, math.Abs(got/full-1))
				if !scalar.EqualWithinRel(got, want, tol) || !scalar.EqualWithinRel(got, full, tol) {
					t.Errorf("%v K: <k(E,J)> = %.6g, TST (J sums) %.6g, TST (classical tops) %.6g s-1", tK, got, want, full)
				}
			}
			t.Logf("%s: worst |<k>/k∞ − 1| = %.2g (J sums), %.2g (classical tops)", r.Name, worst, worstFull)
		})
	}
}

// J = 0, and any J when B̄‡ = B̄, reduce to today's k(E) with the J rotor
// removed from both sides: RRKM on species built by hand with the K rotor
// alone (an independent construction of the active species). k(E, J=0)
// is exact up to rounding (1e-12); the J average goes through SumTable,
// whose linear interpolation of ∫W between half nodes errs by at most
// δ²ρ/8 (1e-4 of a grain's sum here).
func TestAdiabaticReducesToActiveRRKM(t *testing.T) {
	r, ts := ch3ncPair()
	// By hand: prolate tops, K rotor about a with constant A.
	rHand := *r
	rHand.Rotors = []Rotor{{Dim: 1, Consts: []float64{5.25}, Symmetry: 1}}
	tsHand := *ts
	tsHand.Rotors = []Rotor{{Dim: 1, Consts: []float64{1.9}, Symmetry: 1}}
	ceiling := 30000.0
	rc, _ := NewCounter(&rHand, 1, ceiling)
	tc, _ := NewCounter(&tsHand, 1, ceiling)
	g := GrainsTo(20, ceiling-20)
	base := RRKM(rc, tc, 3, g)
	_, jr := SplitExternalRotation(r)
	_, jts := SplitExternalRotation(ts)
	at0 := RRKMAtJ(rc, tc, 3, g, jr, jts, 0)
	same := RRKMAdiabatic(rc, tc.NewSumTable(ceiling), 3, g, jr, jr, 800) // B̄‡ = B̄: no centrifugal shift
	for i := range base.K {
		if !scalar.EqualWithinAbsOrRel(at0.K[i], base.K[i], 1e-300, 1e-12) || !scalar.EqualWithinAbsOrRel(same.K[i], base.K[i], 1e-300, 1e-4) {
			t.Fatalf("grain %v cm-1: k(E, J=0) = %g, J-averaged with B̄‡ = B̄ %g, RRKM of the active species %g", g.Energy(i), at0.K[i], same.K[i], base.K[i])
		}
	}
	// A tight TS (B̄‡ > B̄): the threshold rises with J, so k(E, J) falls.
	at50 := RRKMAtJ(rc, tc, 3, g, jr, jts, 50)
	shift := (jts.B - jr.B) * 50 * 51
	if !(shift > 0) || at50.E0 != ts.E0+shift {
		t.Fatalf("J = 50: threshold %g, want %g", at50.E0, ts.E0+shift)
	}
	for i := range base.K {
		if at50.K[i] > base.K[i]*(1+1e-12) {
			t.Fatalf("grain %v: k(E, 50) = %g above k(E, 0) = %g", g.Energy(i), at50.K[i], base.K[i])
		}
		if g.Energy(i)+g.Width/2 < ts.E0+shift && at50.K[i] != 0 {
			t.Fatalf("grain %v below E0(J=50) = %g: k = %g", g.Energy(i), ts.E0+shift, at50.K[i])
		}
	}
}
