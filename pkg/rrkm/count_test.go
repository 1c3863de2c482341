package rrkm

import (
	"context"
	"errors"
	"math"
	"slices"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"
)

// bruteForce enumerates every vector of quanta of integer frequencies (cm⁻¹)
// with total energy ≤ emax and histograms the energies: an independent
// algorithm (exact combinatorics) for the Beyer–Swinehart count.
func bruteForce(freqs []int, emax int) []float64 {
	h := make([]float64, emax+1)
	var rec func(k, e int)
	rec = func(k, e int) {
		if k == len(freqs) {
			h[e]++
			return
		}
		for x := e; x <= emax; x += freqs[k] {
			rec(k+1, x)
		}
	}
	rec(0, 0)
	return h
}

func TestBeyerSwinehartMatchesEnumeration(t *testing.T) {
	cases := []struct {
		name  string
		freqs []int
		emax  int
	}{
		{"three 1000 cm-1", []int{1000, 1000, 1000}, 6000},
		{"mixed", []int{100, 230, 470}, 5000},
		{"four modes", []int{300, 300, 520, 1111}, 6000},
		{"six modes", []int{150, 410, 410, 777, 1234, 2900}, 5000},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			s := &Species{Name: tc.name}
			for _, f := range tc.freqs {
				s.Vibrations = append(s.Vibrations, float64(f))
			}
			c, err := NewCounter(s, 1, float64(tc.emax))
			if err != nil {
				t.Fatal(err)
			}
			want := bruteForce(tc.freqs, tc.emax)
			for e, w := range want {
				// Counts are sums of integers: exact in float64.
				if c.Comb()[e] != w {
					t.Fatalf("states at %d cm-1: got %v, enumeration %v", e, c.Comb()[e], w)
				}
			}
		})
	}
}

// W(3000 cm⁻¹) for three 1000 cm⁻¹ oscillators is the number of ways to put
// at most 3 quanta in 3 modes, C(6,3) = 20 (exact combinatorics). Sum counts a
// level lying exactly at E by one half, so W just above 3000 is 20 and W at
// 3000 is 10 + 10/2.
func TestSumOfStatesThreeOscillators(t *testing.T) {
	c, err := NewCounter(&Species{Name: "x", Vibrations: []float64{1000, 1000, 1000}}, 1, 4000)
	if err != nil {
		t.Fatal(err)
	}
	if got := c.Sum(3000.5); got != 20 {
		t.Errorf("W(3000.5) = %v, want C(6,3) = 20", got)
	}
	if got := c.Sum(3000); got != 15 {
		t.Errorf("W(3000) = %v, want 10 + 10/2 = 15", got)
	}
	if got := c.IntegratedSum(2000); got != 1*1000+4*1000 {
		// ∫₀^2000 W: W = 1 on (0,1000), 4 on (1000,2000).
		t.Errorf("∫W to 2000 = %v, want 5000", got)
	}
}

// The Laplace transform of the counted vibrational states equals the
// harmonic product Π 1/(1−e^(−ν/kT)) (standard result): exactly, up to the
// truncation of the tail, for frequencies on the fine grain.
func TestCountedVibrationalQ(t *testing.T) {
	cases := []struct {
		name  string
		freqs []float64
		tK    float64
		tol   float64
	}{
		// Integer frequencies: the count is exact; tol covers the tail above
		// 60 kT (< e^-60·poly) and rounding in the sum.
		{"integer 300 K", []float64{3000, 1500, 800, 400, 200}, 300, 1e-9},
		{"integer 1000 K", []float64{3000, 1500, 800, 400, 200}, 1000, 1e-9},
		// Fractional frequencies are split between grains keeping the mean
		// energy; the variance changes by f(1−f)δ² ≤ δ²/4 a quantum, so
		// ln q moves by about ν̄(ν̄+1)(δ/kT)²/8 per mode, below 2e-5 here.
		{"fractional 300 K", []float64{2999.3, 1500.5, 801.7, 433.21, 211.9}, 300, 2e-5},
		{"fractional 1000 K", []float64{2999.3, 1500.5, 801.7, 433.21, 211.9}, 1000, 2e-5},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			s := &Species{Name: tc.name, Vibrations: tc.freqs}
			c, err := NewCounter(s, 1, 60*kT(tc.tK)+tc.freqs[0])
			if err != nil {
				t.Fatal(err)
			}
			q := 0.0
			for j, n := range c.Comb() {
				q += n * math.Exp(-float64(j)/kT(tc.tK))
			}
			want := s.VibrationalQ(tc.tK)
			if !scalar.EqualWithinRel(q, want, tc.tol) {
				t.Errorf("counted Q = %.12g, analytic %.12g (rel %.2g > %g)", q, want, q/want-1, tc.tol)
			}
		})
	}
}

// Electronic levels convolve in as quantized levels (Stein–Rabinovitch): the
// counted Q is Q_vib·Σ g e^(−E/kT).
func TestElectronicLevels(t *testing.T) {
	s := &Species{Name: "x", Vibrations: []float64{700, 1300},
		Electronic: []Level{{0, 2}, {121, 2}, {950.5, 1}}}
	const tK = 500
	c, err := NewCounter(s, 1, 60*kT(tK))
	if err != nil {
		t.Fatal(err)
	}
	q := 0.0
	for j, n := range c.Comb() {
		q += n * math.Exp(-float64(j)/kT(tK))
	}
	// The 950.5 cm-1 level is split; its e^(−E/kT) is exact to (δ/kT)²/8.
	if want := s.InternalQ(tK); !scalar.EqualWithinRel(q, want, 1e-6) {
		t.Errorf("Q = %.10g, want %.10g", q, want)
	}
}

func TestCounterRejects(t *testing.T) {
	cases := []struct {
		name    string
		s       Species
		fine    float64
		ceiling float64
	}{
		{"negative frequency", Species{Name: "a", Vibrations: []float64{-100}}, 1, 1000},
		{"frequency below grain", Species{Name: "a", Vibrations: []float64{0.5}}, 1, 1000},
		{"zero grain", Species{Name: "a", Vibrations: []float64{100}}, 0, 1000},
		{"too large", Species{Name: "a", Vibrations: []float64{100}}, 1e-3, 1e6},
		{"rotor constants", Species{Name: "a", Rotors: []Rotor{{Dim: 3, Consts: []float64{1, 2}}}}, 1, 1000},
		{"negative E0", Species{Name: "a", E0: -5}, 1, 1000},
	}
	for _, tc := range cases {
		if _, err := NewCounter(&tc.s, tc.fine, tc.ceiling); err == nil {
			t.Errorf("%s: accepted", tc.name)
		}
	}
}

// BoltzmannCounts weights each state by its exact Boltzmann factor, so
// Σ_i B_i·e^(−E_i/kT) is the harmonic Q exactly (integer frequencies, a grain
// whose edges fall on levels, and one whose edges do not).
func TestBoltzmannCounts(t *testing.T) {
	s := &Species{Name: "x", Vibrations: []float64{263, 263, 945, 1129, 2166}}
	const tK = 400
	c, err := NewCounter(s, 1, 30000)
	if err != nil {
		t.Fatal(err)
	}
	for _, w := range []float64{10, 55.5, 263} {
		g := GrainsTo(w, 29000)
		b := c.BoltzmannCounts(g, tK)
		q := 0.0
		for i, x := range b {
			q += x * math.Exp(-g.Energy(i)/kT(tK))
		}
		if want := s.VibrationalQ(tK); !scalar.EqualWithinRel(q, want, 1e-9) {
			t.Errorf("grain %v: Σ B e^(−E/kT) = %.12g, Q = %.12g", w, q, want)
		}
	}
}

// stopAfter is a context whose Err turns to context.Canceled after n calls:
// it lets a test cancel a count part-way without timing anything.
type stopAfter struct {
	context.Context
	n *int
}

func (c stopAfter) Err() error {
	if *c.n <= 0 {
		return context.Canceled
	}
	*c.n--
	return nil
}

// A cancelled count stops at the next oscillator or level it would add,
// returning the context's error, and a count that is never cancelled gives
// exactly NewCounter's states (common practice, no source: cancellation
// must not change a result).
func TestNewCounterContextStops(t *testing.T) {
	s := &Species{Name: "x", Vibrations: []float64{1000, 1500, 2000, 2500, 3000}, Electronic: []Level{{0, 2}, {800, 1}}}
	for _, checks := range []int{0, 3} {
		n := checks
		if _, err := NewCounterContext(stopAfter{context.Background(), &n}, s, 1, 20000); !errors.Is(err, context.Canceled) {
			t.Errorf("cancelled after %d checks: %v", checks, err)
		}
		if n != 0 {
			t.Errorf("cancelled after %d checks: %d checks left unused", checks, n)
		}
	}
	a, err := NewCounter(s, 1, 20000)
	if err != nil {
		t.Fatal(err)
	}
	b, err := NewCounterContext(context.Background(), s, 1, 20000)
	if err != nil {
		t.Fatal(err)
	}
	if !slices.Equal(a.Comb(), b.Comb()) {
		t.Error("the context changed the count")
	}
}

// LogCountedQ is ln CountedQ where the latter is representable (an
// independent summation in linear space), to rounding.
func TestLogCountedQ(t *testing.T) {
	r, _ := ch3ncPair()
	c, err := NewCounter(r, 1, 40000)
	if err != nil {
		t.Fatal(err)
	}
	g := GrainsTo(10, 39990)
	for _, tK := range []float64{200, 1000, 3000} {
		want := math.Log(CountedQ(c.Counts(g, 0), g, tK))
		if got := c.LogCountedQ(g, tK); math.Abs(got-want) > 1e-12*math.Abs(want) {
			t.Errorf("%g K: ln Q = %.15g, want %.15g", tK, got, want)
		}
	}
}
