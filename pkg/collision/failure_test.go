package collision

import (
	"context"
	"errors"
	"math"
	"strings"
	"sync/atomic"
	"testing"

	"gonum.org/v1/gonum/mat"

	"github.com/falloff-kinetics/falloff/pkg/rrkm"

	"github.com/falloff-kinetics/falloff/pkg/band"
)

// A failure inside the master equation comes back as a *PointError naming
// the temperature, the pressure where there is one, the stage and a hint,
// on one line; never as a number.
func TestPointErrors(t *testing.T) {
	ch, _ := testChannel(t, 90000)
	col := Collider{Fixed: 3e-10}
	temps, ps := []float64{700, 900}, []float64{1e3, 1e5}

	t.Run("no convergence", func(t *testing.T) {
		defer func(n int) { maxIterations = n }(maxIterations)
		maxIterations = 1 // one iteration cannot meet the tolerance
		_, err := Run(ch, col, Transfer{Alpha300: 300}, temps, ps, Options{Jobs: 1, SkipConvergence: true})
		var pe *PointError
		if !errors.As(err, &pe) || !errors.Is(err, ErrNoConvergence) {
			t.Fatalf("err = %v, want a *PointError wrapping ErrNoConvergence", err)
		}
		if pe.T != 700 || pe.P != 1e3 || pe.Stage != "k(T,P)" {
			t.Errorf("at T = %v, P = %v, stage %q; want 700 K, 1000 Pa, k(T,P)", pe.T, pe.P, pe.Stage)
		}
		checkMessage(t, err, "T = 700 K, P = 1000 Pa (0.01 bar): k(T,P):", "hint:")
	})

	t.Run("NaN in k(E)", func(t *testing.T) {
		bad := ch
		bad.Micro = func(g rrkm.Grains, tK float64) (*rrkm.Micro, error) {
			m := rrkm.RRKM(ch.Reactant, ch.TS, ch.L, g)
			if tK == 900 {
				m.K[len(m.K)-3] = math.NaN()
			}
			return m, nil
		}
		_, err := Run(bad, col, Transfer{Strong: true}, temps, ps, Options{Jobs: 2, SkipConvergence: true})
		var pe *PointError
		if !errors.As(err, &pe) || pe.T != 900 || pe.Stage != "k(E)" || !errors.Is(err, errNotFinite) {
			t.Fatalf("err = %v, want a k(E) failure at 900 K", err)
		}
		checkMessage(t, err, "T = 900 K: k(E): k(E) = NaN s-1 at E = ", "hint: check the transition state")
	})
}

func checkMessage(t *testing.T, err error, parts ...string) {
	t.Helper()
	msg := err.Error()
	if strings.Contains(msg, "\n") {
		t.Errorf("message spans lines: %q", msg)
	}
	for _, p := range parts {
		if !strings.Contains(msg, p) {
			t.Errorf("message %q lacks %q", msg, p)
		}
	}
}

// checkRate refuses what no master equation can give: k above the
// high-pressure limit, k falling as the pressure rises, NaN.
func TestCheckRate(t *testing.T) {
	ps := []float64{1, 10}
	for _, tc := range []struct {
		name string
		k    float64
		prev []float64
		ok   bool
	}{
		{"fine", 0.5, []float64{0.4}, true},
		{"at the limit", 1, []float64{0.4}, true},
		{"above the limit", 1.01, []float64{0.4}, false},
		{"falls with pressure", 0.3, []float64{0.4}, false},
		{"NaN", math.NaN(), nil, false},
		{"zero", 0, nil, false},
	} {
		err := checkRate(tc.k, 1, tc.prev, ps[:len(tc.prev)+1])
		if (err == nil) != tc.ok {
			t.Errorf("%s: err = %v", tc.name, err)
		}
	}
}

// band.Factor's positivity test is Sylvester's law of inertia: A − σI
// factorises with positive pivots exactly when σ is below the smallest
// eigenvalue (Golub & Van Loan 2013, §8.4.1). Checked on a master-equation
// matrix against gonum's dense symmetric eigensolver: shifts 1 % below the
// smallest eigenvalue pass, 1 % above fail.
func TestFactorShiftedInertia(t *testing.T) {
	ch, _ := testChannel(t, 60000)
	// A low ceiling keeps ‖A‖ (the largest k(E)) small beside λ0.
	p, err := prepare(ch, Transfer{Alpha300: 300}, 1200, 100, ch.E0+6000)
	if err != nil {
		t.Fatal(err)
	}
	s := build(p.w, p.kernel, 1e8)
	s.matrix()
	n := s.a.N
	d := mat.NewSymDense(n, nil)
	for q := range n {
		for dd := 0; dd <= s.a.B && q-dd >= 0; dd++ {
			d.SetSym(q, q-dd, *s.a.At(q, dd))
		}
	}
	var es mat.EigenSym
	if !es.Factorize(d, false) {
		t.Fatal("eigendecomposition failed")
	}
	l0 := es.Values(nil)[0]
	norm := 0.0
	for q := range n {
		norm = math.Max(norm, *s.a.At(q, 0))
	}
	// The dense eigenvalue carries an absolute error of about n·ε·‖A‖; the
	// ±1 % shifts must lie well outside it.
	if l0 < 1e4*float64(n)*1e-16*norm {
		t.Fatalf("λ0 = %g, ‖A‖ ≈ %g: too close to rounding for this test", l0, norm)
	}
	if _, ok := band.Factor(s.a, 0.99*l0); !ok {
		t.Errorf("σ = 0.99 λ0 refused")
	}
	if _, ok := band.Factor(s.a, 1.01*l0); ok {
		t.Errorf("σ = 1.01 λ0 accepted")
	}
}

// A cancelled context stops Run between temperatures and returns
// context.Canceled, not a partial result.
func TestRunCancelled(t *testing.T) {
	ch, _ := testChannel(t, 90000)
	col := Collider{Fixed: 3e-10}
	temps := []float64{500, 600, 700, 800, 900, 1000}
	ctx, cancel := context.WithCancel(context.Background())
	var done atomic.Int32
	res, err := RunContext(ctx, ch, col, Transfer{Alpha300: 300}, temps, []float64{1e3, 1e5},
		Options{Jobs: 1, Progress: func() {
			if done.Add(1) == 2 {
				cancel()
			}
		}})
	if !errors.Is(err, context.Canceled) || res != nil {
		t.Fatalf("res %v, err %v; want nil and context.Canceled", res, err)
	}
	if n := done.Load(); n != 2 {
		t.Errorf("%d temperatures solved after cancelling at the second", n)
	}
	cancel()
	if _, err := RunContext(ctx, ch, col, Transfer{Strong: true}, temps, []float64{1e3}, Options{}); !errors.Is(err, context.Canceled) {
		t.Errorf("already cancelled: err = %v", err)
	}
}

// A panic in a worker goroutine (a defect, here planted in a channel's
// k(E)) comes back from Run as an error wrapping ErrInternal that names the
// temperature, instead of ending the process.
func TestWorkerPanicIsAnError(t *testing.T) {
	ch, _ := testChannel(t, 60000)
	ch.Micro = func(rrkm.Grains, float64) (*rrkm.Micro, error) { panic("planted") }
	_, err := Run(ch, Collider{Fixed: 3e-10}, Transfer{Strong: true}, []float64{800}, []float64{1e5}, Options{SkipConvergence: true})
	if !errors.Is(err, ErrInternal) || !strings.Contains(err.Error(), "800 K") || !strings.Contains(err.Error(), "planted") {
		t.Errorf("Run: %v, want ErrInternal at 800 K", err)
	}
}
