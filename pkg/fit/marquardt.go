package fit

import (
	"fmt"
	"math"
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

// fullRules are a fit's rules; refitRules those of a screening run or a
// cross-validation refit (about three digits of S, at most 100 steps),
// which start with steps damped to about half the Gauss–Newton step
// (μ = 1): a refit starts near its minimum, and a screening run only ranks
// its start.
func fullRules() marquardtRules  { return marquardtRules{500, 1e-10, 1e-28, 5, 1e-14, 1e-3} }
func refitRules() marquardtRules { return marquardtRules{100, 1e-7, 1e-28, 3, 1e-14, 1} }

// creepSteps and creepFall define a creeping run (marquardt): S fell by
// less than creepFall of itself over the last creepSteps accepted steps, 2e-8
// of itself a step. On the five-parameter SRI of GRI-Mech 3.0's 2CH3 (held
// limits, 30 × 20 table) S falls by 1e-9 to 1e-8 a step for hundreds of
// steps as d runs to its bound; stopped there it ends where the Newton
// method's run ends (max error 72.6065 % both, the same bound reported) in
// a quarter of its evaluations. 1e-5 stopped too early to see the bound.
const (
	creepSteps = 50
	creepFall  = 1e-6
)

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
	// Dense p × p work arrays (p ≤ 8 here): h = JᵀJ/m, a = h + μ·d·I and
	// its Cholesky factor in place.
	h := make([]float64, p*p)
	a := make([]float64, p*p)
	g := make([]float64, p)
	step := make([]float64, p)
	trial := make([]float64, p)
	var d float64 // the largest diagonal entry of h
	// normal fills h and g = Jᵀr/m at the current x (q holds r and J).
	normal := func() float64 {
		q.normalEquations(h, g)
		d = 0
		gmax := 0.0
		for i := range p {
			d = math.Max(d, h[i*p+i])
			gmax = math.Max(gmax, math.Abs(g[i]))
		}
		d += 1e-300
		return gmax
	}
	gmax := normal()
	if !finite(g...) {
		return nil, 0, fmt.Errorf("%w: gradient not finite at the start", ErrNoConvergence)
	}
	mu, nu := rules.damping, 2.0
	best, flat := s, 0
	// hist[k % creepSteps] is S after accepted step k (creep test).
	var hist [creepSteps]float64
	accepted := 0
	for steps := 1; ; steps++ {
		if gmax <= rules.gradLimit {
			return x, s, nil
		}
		if steps > rules.maxSteps {
			return x, s, errIterationLimit
		}
		copy(a, h)
		for i := range p {
			a[i*p+i] += mu * d
		}
		for i := range p {
			step[i] = -g[i]
		}
		if !cholSolve(a, p, step) {
			mu, nu = mu*nu, 2*nu
			continue
		}
		small, model := true, 0.0
		for i := range p {
			trial[i] = x[i] + step[i]
			if trial[i] != x[i] {
				small = false
			}
			// ½(S(x) − model(x+h)) for S/2 = ½Σr²/m: ½hᵀ(μ·d·h − g).
			model += 0.5 * step[i] * (mu*d*step[i] - g[i])
		}
		if small {
			if q.decrementAt(h, g, a, step) <= stallRelTol*s+1e-30 {
				return x, s, nil
			}
			return x, s, fmt.Errorf("%w: no progress", ErrNoConvergence)
		}
		// The Jacobian comes with the trial's residuals: most steps are
		// accepted, and an accepted step needs it.
		q.eval(trial, true)
		st := sumSq(q.r) / m
		if rho := 0.5 * (s - st) / model; st < s && !math.IsNaN(rho) && model > 0 && rho > 0 {
			copy(x, trial)
			s = st
			gmax = normal()
			mu *= math.Max(1.0/3, 1-math.Pow(2*rho-1, 3))
			nu = 2
			// Converged when the undamped Gauss–Newton step promises less
			// than the rules' improvement, or when patience steps in a row,
			// damped no more than a Gauss–Newton step, improved by less
			// (a flat valley, where the promise is not kept).
			if q.decrementAt(h, g, a, step) <= 0.5*(rules.absolute+rules.relative*s) {
				return x, s, nil
			}
			if best-s > rules.absolute+rules.relative*s || mu > 1e-3 {
				best, flat = s, 0
			} else if flat++; flat >= rules.patience {
				return x, s, nil
			}
			// A valley running toward a bound of the coordinates (tanh
			// maps them onto finite ranges): S still falls at every step,
			// but by less than creepFall of itself over creepSteps steps.
			// Stopped there; the fit's bound check reports the parameter
			// that ran to its bound.
			if accepted >= creepSteps && hist[accepted%creepSteps]-s < creepFall*s {
				return x, s, nil
			}
			hist[accepted%creepSteps] = s
			accepted++
			continue
		}
		q.eval(x, true) // back to x's residuals and Jacobian
		mu, nu = mu*nu, 2*nu
		if math.IsInf(mu, 0) {
			return x, s, fmt.Errorf("%w: damping overflow", ErrNoConvergence)
		}
	}
}

// normalEquations sets h (p × p, both triangles) to JᵀJ/m and g to Jᵀr/m
// at the point q was last evaluated at with its Jacobian.
func (q *lsq) normalEquations(h, g []float64) {
	p, inv := q.p, 1/float64(q.m)
	jr := q.jac.RawMatrix()
	clear(h)
	clear(g)
	for k := range q.m {
		row := jr.Data[k*jr.Stride : k*jr.Stride+p]
		rk := q.r[k]
		for i, ji := range row {
			g[i] += ji * rk
			hi := h[i*p : i*p+i+1]
			for j := range hi {
				hi[j] += ji * row[j]
			}
		}
	}
	for i := range p {
		g[i] *= inv
		for j := 0; j <= i; j++ {
			h[i*p+j] *= inv
			h[j*p+i] = h[i*p+j]
		}
	}
}

// cholSolve overwrites the symmetric positive definite p × p matrix a
// (row-major, both triangles) with its Cholesky factor L (lower triangle)
// and b with the solution of a·x = b. It reports false if a pivot is not
// positive.
func cholSolve(a []float64, p int, b []float64) bool {
	for j := range p {
		s := a[j*p+j]
		for k := range j {
			s -= a[j*p+k] * a[j*p+k]
		}
		if !(s > 0) || math.IsInf(s, 0) {
			return false
		}
		ljj := math.Sqrt(s)
		a[j*p+j] = ljj
		for i := j + 1; i < p; i++ {
			t := a[i*p+j]
			for k := range j {
				t -= a[i*p+k] * a[j*p+k]
			}
			a[i*p+j] = t / ljj
		}
	}
	for i := range p { // L·y = b
		t := b[i]
		for k := range i {
			t -= a[i*p+k] * b[k]
		}
		b[i] = t / a[i*p+i]
	}
	for i := p - 1; i >= 0; i-- { // Lᵀ·x = y
		t := b[i]
		for k := i + 1; k < p; k++ {
			t -= a[k*p+i] * b[k]
		}
		b[i] = t / a[i*p+i]
	}
	return true
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

// decrementAt returns ½·gᵀH⁻¹g for the Gauss–Newton Hessian h (p × p,
// both triangles) with the Newton method's ridge of 1e-8 of its largest
// diagonal, and gradient g; work and v are p × p and p scratch arrays.
func (q *lsq) decrementAt(h, g, work, v []float64) float64 {
	p := q.p
	copy(work, h)
	mx := 0.0
	for i := range p {
		mx = math.Max(mx, h[i*p+i])
	}
	for i := range p {
		work[i*p+i] += 1e-8*mx + 1e-300
	}
	copy(v, g)
	if !cholSolve(work, p, v) {
		return math.Inf(1)
	}
	dec := 0.0
	for i := range p {
		dec += g[i] * v[i]
	}
	return 0.5 * dec
}
