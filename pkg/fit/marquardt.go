package fit

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/mat"
)

// marquardtRules are the stopping rules of lsq.marquardt, the same as
// lsqSettings and refitSettings give gonum's Newton method: the mean square
// residual improving by less than relative·S + absolute over patience
// accepted steps, or the gradient of ½S below 1e-14, is convergence; more
// than maxSteps steps (accepted or not) is the iteration limit.
type marquardtRules struct {
	maxSteps  int
	relative  float64
	absolute  float64
	patience  int
	gradLimit float64
	damping   float64 // the starting μ
}

func fullRules() marquardtRules  { return marquardtRules{500, 1e-10, 1e-28, 5, 1e-14, 1e-3} }
func refitRules() marquardtRules { return marquardtRules{100, 1e-7, 1e-28, 3, 1e-14, refitDamping} }

var refitDamping = 1.0

// errIterationLimit marks a run of lsq.marquardt stopped at maxSteps.
var errIterationLimit = fmt.Errorf("%w: iteration limit", ErrNoConvergence)

// marquardt minimises S(x) = Σr²/m from x0 by the Levenberg–Marquardt
// method: the step h solves (JᵀJ + μ·d·I)h = −Jᵀr, d the largest diagonal
// entry of JᵀJ (so μ is dimensionless and the damping is the same in every
// coordinate: the fits' coordinates are scaled alike, and Marquardt's
// diag(JᵀJ) scaling let the weakly determined Troe T*** run to its bound
// on a GRI-Mech test table), accepted when S falls, with μ updated from the
// gain ratio ρ = ΔS / (the model's ΔS) by Nielsen's rule: μ ← μ·max(1/3,
// 1 − (2ρ − 1)³) after a success, μ ← μ·ν, ν ← 2ν after a failure.
// Sources: Levenberg 1944, Q. Appl. Math. 2, 164; Marquardt 1963, J. Soc.
// Ind. Appl. Math. 11, 431; Madsen, Nielsen & Tingleff 2004, "Methods for
// non-linear least squares problems" (IMM, DTU), Algorithm 3.16 (from
// memory). A step costs one residual evaluation and, when accepted, one
// Jacobian, against about five residual evaluations a step in the
// backtracking line search of the Newton method on these fits.
//
// It stops (converged) when the gradient of ½S is below the rules' limit,
// when the undamped Gauss–Newton step promises less than the rules'
// improvement, or when patience accepted steps in a row, none damped beyond
// μ = 1e-3, each improved S by less than that (a curved valley, where the
// promise is not kept). A step that no longer changes x ends the run:
// converged if the Gauss–Newton decrement there is below stallRelTol of S,
// an error otherwise.
func (q *lsq) marquardt(x0 []float64, rules marquardtRules) ([]float64, float64, error) {
	p, m := q.p, float64(q.m)
	x := append([]float64(nil), x0...)
	q.eval(x, true)
	s := sumSq(q.r) / m
	if math.IsInf(s, 0) || math.IsNaN(s) {
		return nil, 0, fmt.Errorf("%w: residuals not finite at the start", ErrNoConvergence)
	}
	h := mat.NewSymDense(p, nil)
	g := make([]float64, p)
	diag := make([]float64, p)
	step := make([]float64, p)
	trial := make([]float64, p)
	var chol mat.Cholesky
	a := mat.NewSymDense(p, nil)
	// normal fills h = JᵀJ/m and g = Jᵀr/m at the current x (q holds r, J).
	normal := func() float64 {
		h.SymOuterK(1/m, q.jac.T())
		gv := mat.NewVecDense(p, g)
		gv.MulVec(q.jac.T(), mat.NewVecDense(q.m, q.r))
		gv.ScaleVec(1/m, gv)
		mx, gmax := 0.0, 0.0
		for i := range p {
			mx = math.Max(mx, h.At(i, i))
			gmax = math.Max(gmax, math.Abs(g[i]))
		}
		for i := range p {
			diag[i] = mx + 1e-300
		}
		return gmax
	}
	gmax := normal()
	if !finite(g...) {
		return nil, 0, fmt.Errorf("%w: gradient not finite at the start", ErrNoConvergence)
	}
	mu, nu := rules.damping, 2.0
	best, flat := s, 0
	for steps := 1; ; steps++ {
		if gmax <= rules.gradLimit {
			return x, s, nil
		}
		if steps > rules.maxSteps {
			return x, s, errIterationLimit
		}
		for i := range p {
			for j := 0; j <= i; j++ {
				a.SetSym(i, j, h.At(i, j))
			}
			a.SetSym(i, i, h.At(i, i)+mu*diag[i])
		}
		if !chol.Factorize(a) {
			mu, nu = mu*nu, 2*nu
			continue
		}
		sv := mat.NewVecDense(p, step)
		if err := chol.SolveVecTo(sv, mat.NewVecDense(p, g)); err != nil {
			mu, nu = mu*nu, 2*nu
			continue
		}
		small, model := true, 0.0
		for i := range p {
			step[i] = -step[i]
			trial[i] = x[i] + step[i]
			if trial[i] != x[i] {
				small = false
			}
			// ½(S(x) − model(x+h)) for S/2 = ½Σr²/m: ½hᵀ(μDh − g).
			model += 0.5 * step[i] * (mu*diag[i]*step[i] - g[i])
		}
		if small {
			if q.decrementAt(h, g) <= stallRelTol*s+1e-30 {
				return x, s, nil
			}
			return x, s, fmt.Errorf("%w: no progress", ErrNoConvergence)
		}
		q.eval(trial, false)
		st := sumSq(q.r) / m
		if rho := 0.5 * (s - st) / model; st < s && !math.IsNaN(rho) && model > 0 && rho > 0 {
			copy(x, trial)
			q.eval(x, true)
			s = st
			gmax = normal()
			mu *= math.Max(1.0/3, 1-math.Pow(2*rho-1, 3))
			nu = 2
			// Converged when the undamped Gauss–Newton step promises less
			// than the rules' improvement, or when patience steps in a row,
			// damped no more than a Gauss–Newton step, improved by less
			// (a flat valley, where the promise is not kept).
			if q.decrementAt(h, g) <= 0.5*(rules.absolute+rules.relative*s) {
				return x, s, nil
			}
			if best-s > rules.absolute+rules.relative*s || mu > 1e-3 {
				best, flat = s, 0
			} else if flat++; flat >= rules.patience {
				return x, s, nil
			}
			continue
		}
		mu, nu = mu*nu, 2*nu
		if math.IsInf(mu, 0) {
			return x, s, fmt.Errorf("%w: damping overflow", ErrNoConvergence)
		}
	}
}

// sumSq returns Σv², +Inf if it is not finite.
func sumSq(v []float64) float64 {
	s := 0.0
	for _, x := range v {
		s += x * x
	}
	if math.IsNaN(s) {
		return math.Inf(1)
	}
	return s
}

// decrementAt returns ½·gᵀH⁻¹g for the Gauss–Newton Hessian h (with the
// Newton method's ridge of 1e-8 of its largest diagonal) and gradient g.
func (q *lsq) decrementAt(h *mat.SymDense, g []float64) float64 {
	r := mat.NewSymDense(q.p, nil)
	r.CopySym(h)
	mx := 0.0
	for i := range q.p {
		mx = math.Max(mx, h.At(i, i))
	}
	for i := range q.p {
		r.SetSym(i, i, h.At(i, i)+1e-8*mx+1e-300)
	}
	var ch mat.Cholesky
	if !ch.Factorize(r) {
		return math.Inf(1)
	}
	gv := mat.NewVecDense(q.p, g)
	var d mat.VecDense
	if err := ch.SolveVecTo(&d, gv); err != nil {
		return math.Inf(1)
	}
	return 0.5 * mat.Dot(gv, &d)
}
