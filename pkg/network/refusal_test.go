package network

import (
	"errors"
	"fmt"
	"math"
	"strings"
	"testing"
	"time"

	"github.com/falloff-kinetics/falloff/pkg/collision"
	"github.com/falloff-kinetics/falloff/pkg/rrkm"
	"github.com/falloff-kinetics/falloff/pkg/units"
)

// TestSeparationRefused: two wells joined 2 kcal/mol above the shallower at
// low pressure interconvert about as fast as energy relaxes, so there is no
// rate coefficient: Solve returns a *SeparationError (errors.Is
// ErrNotSeparated) naming the separation, above the default 0.1. A
// threshold passed in Options is honoured on both sides of a measured
// separation.
func TestSeparationRefused(t *testing.T) {
	net := twoWells(t, expDown)
	net.Isomerisations[0].K = rrkmK(t, spA, offA, tsLow, 1)
	for _, p := range []point{{1000, 1e6}, {700, 1e8}} {
		_, err := Solve(net, p.tK, p.omega, Options{})
		var se *SeparationError
		if !errors.As(err, &se) || !errors.Is(err, ErrNotSeparated) {
			t.Fatalf("%v: error %v, want a *SeparationError", p, err)
		}
		if !(se.Separation > DefaultMaxSeparation) || se.Max != DefaultMaxSeparation {
			t.Errorf("%v: separation %v, threshold %v", p, se.Separation, se.Max)
		}
		if !strings.Contains(err.Error(), fmt.Sprintf("%.3g", se.Separation)) {
			t.Errorf("%v: message does not show the separation %.3g: %v", p, se.Separation, err)
		}
		t.Logf("%v: %v", p, err)
	}
	// The regular two-well network at 1000 K, 1e6 s⁻¹ has separation 0.034.
	good := twoWells(t, expDown)
	res, err := Solve(good, 1000, 1e6, Options{})
	if err != nil {
		t.Fatal(err)
	}
	if _, err := Solve(good, 1000, 1e6, Options{MaxSeparation: res.Separation * 1.01}); err != nil {
		t.Errorf("threshold just above the separation %.4g: %v", res.Separation, err)
	}
	if _, err := Solve(good, 1000, 1e6, Options{MaxSeparation: res.Separation * 0.99}); !errors.Is(err, ErrNotSeparated) {
		t.Errorf("threshold just below the separation %.4g: error %v", res.Separation, err)
	}
}

// TestPrecisionRefused: at 550 K the chemically significant eigenvalues of
// the three-well network are below 1e-12 of the matrix norm (k(E) at the
// top of the grid), beyond the default rounding threshold 1e-4 of the
// dense solver: a *PrecisionError (errors.Is ErrRoundoff) with the
// estimate. (The banded solver keeps the precision: TestLowTemperature.)
func TestPrecisionRefused(t *testing.T) {
	_, err := Solve(threeWells(t, expDown), 550, 1e10, Options{Dense: true})
	var pe *PrecisionError
	if !errors.As(err, &pe) || !errors.Is(err, ErrRoundoff) {
		t.Fatalf("error %v, want a *PrecisionError", err)
	}
	if !(pe.Roundoff > DefaultMaxRoundoff) {
		t.Errorf("roundoff %v", pe.Roundoff)
	}
	t.Log(err)
}

// reverseK is k(B→A) for A ⇌ B over TS-AB, computed from B's side:
// L·c·W̄‡·Δ/N_B (the formula of rrkmK, with B's counts).
func reverseK(t *testing.T) []float64 {
	return rrkmK(t, spB, offB, tsAB, 1)
}

// TestGivenReverse: a reverse k(E) computed independently from B's counts
// (W‡/(hρ_B)) agrees with detailed balance to rounding and is accepted,
// giving the same rate coefficients to 1e-12; one 1e-6 off at one grain is
// refused with a message naming detailed balance.
func TestGivenReverse(t *testing.T) {
	net := twoWells(t, expDown)
	ref, err := Solve(net, 1000, 1e9, Options{})
	if err != nil {
		t.Fatal(err)
	}
	net.Isomerisations[0].Reverse = reverseK(t)
	res, err := Solve(net, 1000, 1e9, Options{})
	if err != nil {
		t.Fatal(err)
	}
	worst := 0.0
	for j := range res.K {
		for i := range res.K {
			d := math.Abs(res.K[j][i]/ref.K[j][i] - 1)
			worst = math.Max(worst, d)
			if d > 1e-12 {
				t.Errorf("K[%d][%d] = %.15g with the reverse given, %.15g without", j, i, res.K[j][i], ref.K[j][i])
			}
		}
	}
	t.Logf("largest relative change with the reverse given: %.2g", worst)
	bad := append([]float64(nil), net.Isomerisations[0].Reverse...)
	i := int(tsAB.E0/testGrid.Width) + 20
	bad[i] *= 1 + 1e-6
	net.Isomerisations[0].Reverse = bad
	if _, err := Solve(net, 1000, 1e9, Options{}); err == nil || !strings.Contains(err.Error(), "detailed balance") {
		t.Errorf("reverse 1e-6 off: error %v", err)
	}
}

// TestInvalidNetwork: data the solver cannot use is refused with an error
// naming what is wrong, never a panic or NaN.
func TestInvalidNetwork(t *testing.T) {
	cases := []struct {
		name   string
		change func(n *Network)
		tK     float64
		omega  float64
		want   string
	}{
		{"short counts", func(n *Network) { n.Wells[0].Counts = n.Wells[0].Counts[1:] }, 1000, 1e9, "counts on"},
		{"NaN count", func(n *Network) { n.Wells[1].Counts[30] = math.NaN() }, 1000, 1e9, "counts[30]"},
		{"negative k", func(n *Network) { n.Isomerisations[0].K[60] = -1 }, 1000, 1e9, "k(E)[60]"},
		{"infinite k", func(n *Network) { n.Isomerisations[0].K[60] = math.Inf(1) }, 1000, 1e9, "k(E)[60]"},
		{"self", func(n *Network) { n.Isomerisations[0].To = 0 }, 1000, 1e9, "to itself"},
		{"index", func(n *Network) { n.Isomerisations[0].To = 2 }, 1000, 1e9, "outside"},
		{"duplicate name", func(n *Network) { n.Wells[1].Name = "A" }, 1000, 1e9, "used twice"},
		{"exit below well", func(n *Network) {
			k := make([]float64, testGrid.N)
			k[2] = 1 // 400 cm⁻¹, below B's zero-point level at 1600 cm⁻¹
			n.Exits = []Exit{{Name: "P", Well: 1, K: k}}
		}, 1000, 1e9, "no state"},
		{"exit named as a well", func(n *Network) { n.Exits = []Exit{{Name: "B", Well: 0, K: make([]float64, testGrid.N)}} }, 1000, 1e9, "same name"},
		{"alpha", func(n *Network) { n.Wells[0].Transfer = collision.Transfer{Alpha300: 0} }, 1000, 1e9, "alpha"},
		{"efficiency", func(n *Network) { n.Wells[0].Transfer = collision.Transfer{Strong: true, Efficiency: 2} }, 1000, 1e9, "efficiency"},
		{"no well", func(n *Network) { n.Wells = nil; n.Isomerisations = nil }, 1000, 1e9, "no well"},
		{"temperature", func(n *Network) {}, 0, 1e9, "temperature"},
		{"omega", func(n *Network) {}, 1000, math.Inf(1), "collision frequency"},
		{"empty well", func(n *Network) { n.Wells[1].Counts = make([]float64, testGrid.N); n.Isomerisations = nil }, 1000, 1e9, "no state"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			net := twoWells(t, expDown)
			net.Wells[1].Counts = append([]float64(nil), net.Wells[1].Counts...)
			net.Isomerisations[0].K = append([]float64(nil), net.Isomerisations[0].K...)
			c.change(net)
			res, err := Solve(net, c.tK, c.omega, Options{})
			if err == nil || !strings.Contains(err.Error(), c.want) {
				t.Errorf("error %v (result %v), want one containing %q", err, res != nil, c.want)
			}
		})
	}
}

// TestTooLarge: more grains than the dense solver takes (with
// Options.Dense), or a band matrix beyond MaxBandedEntries
// (exponential-down: 45 000 grains of 10 cm⁻¹ with a kernel reaching
// 16.1·α ≈ 11 000 cm⁻¹, over 1e8 entries), give ErrTooLarge before any
// matrix is formed, from Solve and CheckSize alike. The same 4500
// strong-collider grains are a band matrix of half-bandwidth 3 plus three
// rank-one terms for the banded solver, which takes them.
func TestTooLarge(t *testing.T) {
	g := rrkm.Grains{Width: 10, N: 1500}
	ones := make([]float64, g.N)
	for i := range ones {
		ones[i] = 1
	}
	net := &Network{Grains: g}
	for _, name := range []string{"A", "B", "C"} {
		net.Wells = append(net.Wells, Well{Name: name, Counts: ones, Transfer: collision.Transfer{Strong: true}})
	}
	if _, err := Solve(net, 1000, 1e9, Options{Dense: true}); !errors.Is(err, ErrTooLarge) {
		t.Errorf("4500 grains, dense: error %v, want ErrTooLarge", err)
	}
	if err := CheckSize(net, 1000); err != nil {
		t.Errorf("4500 strong-collider grains: CheckSize: %v", err)
	}
	if _, err := Solve(net, 1000, 1e9, Options{}); err != nil {
		t.Errorf("4500 strong-collider grains, banded: %v", err)
	}
	big := &Network{Grains: rrkm.Grains{Width: 10, N: 15000}}
	many := make([]float64, big.Grains.N)
	for i := range many {
		many[i] = 1
	}
	for _, name := range []string{"A", "B", "C"} {
		big.Wells = append(big.Wells, Well{Name: name, Counts: many, Transfer: expDown})
	}
	start := time.Now()
	_, err := Solve(big, 1000, 1e9, Options{})
	if !errors.Is(err, ErrTooLarge) || !strings.Contains(err.Error(), "entries") {
		t.Errorf("45 000 banded grains: error %v, want ErrTooLarge naming the entries", err)
	}
	if err := CheckSize(big, 1000); !errors.Is(err, ErrTooLarge) {
		t.Errorf("45 000 banded grains: CheckSize: %v, want ErrTooLarge", err)
	}
	if small := CheckSize(threeWells(t, expDown), 1000); small != nil {
		t.Errorf("the three-well test network: CheckSize: %v", small)
	}
	t.Logf("%v (refused in %v)", err, time.Since(start))
}

// TestLayoutBanded: the grains of all wells are interleaved by energy, so
// that with the exponential-down kernel (cut where exp(−ΔE/α) < 1e-7,
// pkg/collision) every nonzero entry of the matrix lies within
// n_wells·(band + 1) of the diagonal, band = ⌊16.12·α/Δ⌋ grains: the
// structure the banded solver needs, and within bandBound, its size check.
func TestLayoutBanded(t *testing.T) {
	const tK = 1000
	net := threeWells(t, expDown)
	l := newLayout(net, tK)
	s, _, err := build(net, l, tK, 1e9)
	if err != nil {
		t.Fatal(err)
	}
	for p := 1; p < l.size(); p++ {
		if l.grain[p] < l.grain[p-1] {
			t.Fatalf("position %d: grain %d after grain %d", p, l.grain[p], l.grain[p-1])
		}
	}
	band := int(math.Floor(expDown.Alpha(tK) * -math.Log(1e-7) / testGrid.Width))
	limit := len(net.Wells) * (band + 1)
	widest := 0
	for p := range l.size() {
		for q := p + 1; q < l.size(); q++ {
			if s.At(p, q) != 0 {
				widest = max(widest, q-p)
			}
		}
	}
	if widest > limit {
		t.Errorf("nonzero entry %d positions off the diagonal, limit %d", widest, limit)
	}
	if bb := bandBound(net, tK); bb < widest {
		t.Errorf("bandBound %d below the measured half-bandwidth %d", bb, widest)
	}
	t.Logf("half-bandwidth %d of %d positions (limit %d, bandBound %d; α = %.0f cm-1, %g cm-1 grains)", widest, l.size(), limit, bandBound(net, tK), expDown.Alpha(tK), testGrid.Width)
}

// TestHighWell: a well 100 000 cm⁻¹ (286 kcal/mol) above another. At 300 K
// its equilibrium fraction is exp(−480) = 5e-209, formed in log space,
// and its rate coefficient down is still resolved; at 150 K the low
// well's weights at the high well's energies (exp(−960)) leave the
// floating-point range, and Solve refuses rather than drop grains that
// the high well's population reaches.
func TestHighWell(t *testing.T) {
	// Strong-collider wells of one state per grain (an invented toy with
	// exact Boltzmann populations), joined at the high well's energies
	// with k = 1e6 s⁻¹ both ways (equal counts).
	g := rrkm.Grains{Width: 500, N: 240} // to 120 000 cm⁻¹
	lo, hi := make([]float64, g.N), make([]float64, g.N)
	k := make([]float64, g.N)
	const eHigh = 100000
	for i := range g.N {
		lo[i] = 1
		if g.Energy(i) >= eHigh {
			hi[i] = 1
			k[i] = 1e6
		}
	}
	strong := collision.Transfer{Strong: true}
	net := &Network{Grains: g,
		Wells:          []Well{{Name: "low", Counts: lo, Transfer: strong}, {Name: "high", Counts: hi, Transfer: strong}},
		Isomerisations: []Isomerisation{{Name: "up", From: 0, To: 1, K: k}},
	}
	res, err := Solve(net, 300, 1e9, Options{})
	if err != nil {
		t.Fatal(err)
	}
	// Q_high/Q_low = exp(−E_high/kT) exactly for equal ladders (the grid's
	// top cuts both at the same grain).
	r := math.Exp(-eHigh / units.KT(300))
	if x := res.Equilibrium[1]; math.Abs(x/(r/(1+r))-1) > 1e-10 {
		t.Errorf("high well fraction %v, want %v", x, r/(1+r))
	}
	// Every grain of the high well leaves at k = 1e6 s⁻¹; with ω = 1e9 s⁻¹
	// its distribution stays thermal but for a depletion of order
	// k/ω = 1e-3 (strong collider, Lindemann–Hinshelwood steady state).
	if kr := res.K[0][1]; !(math.Abs(kr/1e6-1) < 2e-3) {
		t.Errorf("k(high→low) = %v s-1, want 1e6 to 2e-3", kr)
	}
	t.Logf("x_high = %.6g (relative %.2g), k(high→low) = %.6g s-1, k(low→high) = %.3g s-1", res.Equilibrium[1], math.Abs(res.Equilibrium[1]/(r/(1+r))-1), res.K[0][1], res.K[1][0])
	// The uphill coefficient, k(high→low)·5e-209, lies far below the
	// rounding of the solve (see Result.K): only its size is checked.
	if kf := res.K[1][0]; !(math.Abs(kf) < 1e-100) {
		t.Errorf("k(low→high) = %v s-1, want a magnitude below 1e-100", kf)
	}
	_, err = Solve(net, 150, 1e9, Options{})
	if err == nil || !strings.Contains(err.Error(), "floating-point range") {
		t.Errorf("150 K: error %v, want a refusal naming the floating-point range", err)
	}
}
