package collision

import (
	"errors"
	"fmt"
	"math"

	"github.com/falloff-kinetics/falloff/pkg/band"
)

// ErrNoConvergence reports an inverse iteration that did not settle.
var ErrNoConvergence = errors.New("collision: master equation: no convergence")

// ErrIllConditioned reports a master-equation matrix that rounding has made
// indefinite even after the stabilising shift (see system.tau).
var ErrIllConditioned = errors.New("collision: master equation: ill-conditioned matrix")

// Solution is the slowest eigenmode of a master equation.
type Solution struct {
	K          float64   // k_uni = λ0 in s⁻¹ (or per unit ω for LowPressure)
	Population []float64 // the eigenvector n(E) on the well's grains, Σ n = 1
	Iterations int
}

// iterationTol is the relative change of λ at which inverse iteration stops.
const iterationTol = 1e-13

// system is A = −(symmetrised M), positive definite, in descending-energy
// order (position p ↔ grain n−1−p), with the per-grain loss rates that enter
// the flux identity.
type system struct {
	a    *band.Sym
	loss []float64 // ascending-energy order
	sqf  []float64 // sqrt(F), ascending
	// tau is the stabilising shift: the iteration factorises A + τI, whose
	// eigenvectors are those of A. Collisions conserve population, so A's
	// smallest eigenvalue k_uni can lie below the rounding of its
	// factorisation (k_uni/ω < 1e-15, a large molecule far below its
	// falloff); without the shift rounding can make a pivot vanish in the
	// middle of the grid and the factors grow without bound. With it the
	// factorised matrix stays a positive-definite M-matrix, and inverse
	// iteration converges as (λ0+τ)/(λ1+τ), in a step or two when λ0 ≪ τ.
	tau float64
	// ldl, if not nil, is storage for the factors from an earlier point of
	// the same shape (band.FactorInto); eigen leaves its factors there.
	ldl *band.LDL
	// With lazy set, A = ω·op + diag(diag) is formed into a only when
	// needed (matrix): the factorisation forms it as it fills its storage
	// (band.FactorScaledInto), and only a shift needs A itself.
	lazy  bool
	op    *band.Sym
	omega float64
	diag  []float64 // row order (descending energy)
}

// matrix returns A, formed into s.a the first time.
func (s *system) matrix() *band.Sym {
	if s.lazy {
		for i, v := range s.op.A {
			s.a.A[i] = s.omega * v
		}
		for p, d := range s.diag {
			*s.a.At(p, 0) += d
		}
		s.lazy = false
	}
	return s.a
}

// factor returns the LDLᵀ factors of A − σI in s.ldl's storage.
func (s *system) factor(sigma float64) (*band.LDL, bool) {
	if !s.lazy {
		return band.FactorInto(s.ldl, s.a, sigma)
	}
	return band.FactorScaledInto(s.ldl, s.op, s.omega, s.diag, sigma)
}

// tauPerOmega is τ per unit collision frequency: above the rounding of the
// Schur complements (about b·ε·ω for half-bandwidth b ≤ 1000) and far
// below the relaxation eigenvalues (λ1 ≳ 1e-3·ω).
const tauPerOmega = 1e-11

// collisionOperator is I − P_sym on grains 0..nk−1 in descending order, with
// the diagonal 1 − P(i←i) summed from the off-diagonal column entries (over
// all grains), so the collision operator conserves population to rounding;
// and, per grain, the probability of a transition to grains ≥ nk.
type collisionOperator struct {
	c      *band.Sym
	escape []float64
}

func newCollisionOperator(w *Well, k *Kernel, nk int) collisionOperator {
	n := w.N()
	op := collisionOperator{c: band.NewSym(nk, min(k.Band, max(nk-1, 0))), escape: make([]float64, nk)}
	b := op.c.B
	for i := range nk {
		p := nk - 1 - i
		out := 0.0
		for d := 1; d <= k.Band; d++ {
			if i-d >= 0 {
				out += k.At(i-d, i)
			}
			if i+d < n {
				pu := k.At(i+d, i)
				out += pu
				if i+d >= nk {
					op.escape[i] += pu
				}
			}
		}
		*op.c.At(p, 0) = out
		for d := 1; d <= b && i+d < nk; d++ {
			// Row p, column p−d is grain i+d (higher in energy).
			*op.c.At(p, d) = -k.symmetric(i, i+d)
		}
	}
	return op
}

// operator returns the kernel's collision operator on all grains, built once.
func (k *Kernel) operator(w *Well) collisionOperator {
	k.once.Do(func() { k.op = newCollisionOperator(w, k, w.N()) })
	return k.op
}

func sqrtF(w *Well, nk int) []float64 {
	s := make([]float64, nk)
	for i := range s {
		s[i] = math.Sqrt(w.F[i])
	}
	return s
}

// build assembles A = ω(I − P_sym) + diag(k) with loss_i = k_i.
func build(w *Well, k *Kernel, omega float64) *system {
	return buildInto(nil, w, k, omega)
}

// buildInto is build reusing what prev, the system of the previous
// pressure on the same well (nil for none), holds that does not depend on
// ω: the storage A is formed in if it is needed (system.matrix), the
// factors' storage, √F and the diagonal k in row order. One temperature's
// pressures so allocate and compute these once per worker, not per
// pressure.
func buildInto(prev *system, w *Well, k *Kernel, omega float64) *system {
	op := k.operator(w)
	n := w.N()
	if prev != nil && prev.a.N == n && prev.a.B == op.c.B && len(prev.diag) == n {
		return &system{a: prev.a, ldl: prev.ldl, loss: w.K, sqf: prev.sqf, diag: prev.diag,
			tau: tauPerOmega * omega, lazy: true, op: op.c, omega: omega}
	}
	s := &system{a: band.NewSym(n, op.c.B), loss: w.K, sqf: sqrtF(w, n), tau: tauPerOmega * omega, lazy: true, op: op.c, omega: omega, diag: make([]float64, n)}
	for i := range n {
		s.diag[n-1-i] = w.K[i]
	}
	return s
}

// buildLowPressure assembles the low-pressure problem: the grains below
// threshold with ω = 1, every grain with k > 0 absorbing, and loss_i the
// probability of a collision from i into an absorbing grain.
func buildLowPressure(w *Well, k *Kernel) *system {
	nk := w.belowFloor()
	op := newCollisionOperator(w, k, nk)
	return &system{a: op.c, loss: op.escape, sqf: sqrtF(w, nk), tau: tauPerOmega}
}

// maxIterations bounds inverse iteration (a variable so that a test can
// provoke the failure).
var maxIterations = 1000

// shiftEvery is the number of inverse iterations without convergence after
// which the shift moves toward the slowest eigenvalue.
const shiftEvery = 25

// eigen finds the slowest mode by inverse iteration started from the
// equilibrium distribution, and λ0 from the flux identity. When the slowest
// mode is poorly separated from the next (the reaction about as fast as
// energy relaxation) plain inverse iteration converges slowly, as
// (λ0/λ1)^k; it then shifts to σ below λ0, converging as
// ((λ0−σ)/(λ1−σ))^k. The shift moves 90 % of the way to the Rayleigh
// quotient (an upper bound on λ0) and is kept only if A − σI factorises
// with positive pivots, which proves σ < λ0, so it never converges to
// another mode.
func (s *system) eigen() (Solution, error) {
	n := len(s.loss)
	if n == 0 {
		return Solution{}, errors.New("collision: no grains")
	}
	f, ok := s.factor(-s.tau)
	if ok {
		s.ldl = f
	}
	if !ok {
		return Solution{}, fmt.Errorf("%w: a pivot of its LDLᵀ factorisation is not positive", ErrIllConditioned)
	}
	x := make([]float64, n) // descending order
	for p := range x {
		x[p] = s.sqf[n-1-p]
	}
	pop := make([]float64, n)
	prev := math.Inf(1)
	sigma := -s.tau
	for it := 1; it <= maxIterations; it++ {
		f.Solve(x)
		scale, nan := 0.0, false
		for _, v := range x {
			if a := math.Abs(v); a > scale {
				scale = a
			} else if a != a {
				nan = true
			}
		}
		if nan {
			scale = math.NaN()
		}
		if !(scale > 0) || math.IsInf(scale, 0) {
			return Solution{}, fmt.Errorf("%w: iterate is %v", ErrNoConvergence, scale)
		}
		num, den := 0.0, 0.0
		for p := range x {
			x[p] /= scale
			i := n - 1 - p
			pop[i] = x[p] * s.sqf[i]
			num += s.loss[i] * pop[i]
			den += pop[i]
		}
		lambda := num / den
		if math.Abs(lambda-prev) <= iterationTol*math.Abs(lambda) {
			for i := range pop {
				pop[i] /= den
			}
			return Solution{K: lambda, Population: pop, Iterations: it}, nil
		}
		prev = lambda
		if it%shiftEvery == 0 {
			rq := s.matrix().Rayleigh(x)
			for step := 0.9; step > 1e-3; step /= 4 {
				next := sigma + step*(rq-sigma)
				if g, ok := band.Factor(s.matrix(), next); ok {
					f, sigma = g, next
					break
				}
			}
		}
	}
	return Solution{}, fmt.Errorf("%w after %d inverse iterations", ErrNoConvergence, maxIterations)
}

// reactiveFloor is the k(E) in s⁻¹ below which a grain under the classical
// threshold counts as non-reactive in the low-pressure limit. Without
// tunnelling such grains have k = 0 exactly; with it, grains deep under the
// barrier have tiny k(E) > 0, and they react far more slowly than molecules
// collide at any pressure of interest (ω is above 1 s⁻¹ even at 1e-9 bar), so
// k0 is the limit for ω well above the floor.
const reactiveFloor = 1e-6

// belowFloor returns the number of leading non-reactive grains: k = 0, or,
// below the lowest classical threshold E0 (tunnelling), k below the floor.
func (w *Well) belowFloor() int {
	nk := 0
	for nk < w.N() && (w.K[nk] == 0 || w.E[nk] < w.E0 && w.K[nk] < reactiveFloor) {
		nk++
	}
	return nk
}

// Solve returns k_uni for collision frequency omega (s⁻¹) with kernel k.
func (w *Well) Solve(k *Kernel, omega float64) (Solution, error) {
	if !(omega > 0) || math.IsInf(omega, 0) {
		return Solution{}, fmt.Errorf("collision: collision frequency %v s-1 must be positive and finite", omega)
	}
	return build(w, k, omega).eigen()
}

// LowPressure returns the low-pressure limit of k_uni/ω: in that limit every
// grain with k > 0 is absorbing, and the rate is the collisional flux into
// them from the grains below threshold in their slowest mode.
func (w *Well) LowPressure(k *Kernel) (Solution, error) {
	if w.belowFloor() == 0 {
		return Solution{}, errors.New("collision: no grain below threshold")
	}
	return buildLowPressure(w, k).eigen()
}
