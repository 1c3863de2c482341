package fit

import (
	"errors"
	"fmt"
	"math"
	"slices"

	"gonum.org/v1/gonum/mat"
	"gonum.org/v1/gonum/optimize"
)

// residualFunc fills r (length m) with the weighted residuals at x and,
// when jac is not nil, jac (m × len(x)) with their Jacobian.
type residualFunc func(x, r []float64, jac *mat.Dense)

// lsq is a nonlinear least-squares problem S(x) = ½·Σr²/m, minimised by
// Levenberg–Marquardt (lsq.marquardt) on the analytic Jacobian. The
// previous solver, gonum's modified Newton method on the Gauss–Newton
// Hessian JᵀJ/m with a backtracking line search (Gauss–Newton with a line
// search and a ridge where JᵀJ is singular), remains for the PLOG held-out
// refits (see fitTwoTerms) and as the reference the tests compare with.
type lsq struct {
	m, p int
	// refit marks a refit for cross-validation from a start near its
	// minimum: it stops at refitSettings, and a run that reaches their
	// iteration limit with a finite result counts as converged.
	refit bool
	// newton makes solve use gonum's Newton method (the previous solver)
	// instead of lsq.marquardt; see fitTwoTerms.
	newton bool
	f      residualFunc
	x      []float64
	r      []float64
	jac    *mat.Dense
	haveJ  bool
	valid  bool
}

func newLSQ(m, p int, f residualFunc) *lsq {
	return &lsq{m: m, p: p, f: f, x: make([]float64, p), r: make([]float64, m), jac: mat.NewDense(m, p, nil)}
}

func (q *lsq) eval(x []float64, needJ bool) {
	if q.valid && slices.Equal(x, q.x) && (q.haveJ || !needJ) {
		return
	}
	copy(q.x, x)
	if countEvals {
		evalCount++
	}
	q.valid = true
	q.haveJ = needJ
	if needJ {
		q.f(x, q.r, q.jac)
	} else {
		q.f(x, q.r, nil)
	}
}

// cost returns Σr²/m at x, +Inf if a residual is not finite.
func (q *lsq) cost(x []float64) float64 {
	q.eval(x, false)
	s := 0.0
	for _, v := range q.r {
		s += v * v
	}
	if math.IsNaN(s) {
		return math.Inf(1)
	}
	return s / float64(q.m)
}

func (q *lsq) problem() optimize.Problem {
	return optimize.Problem{
		Func: func(x []float64) float64 { return 0.5 * q.cost(x) },
		Grad: func(grad, x []float64) {
			q.eval(x, true)
			g := mat.NewVecDense(q.p, grad)
			g.MulVec(q.jac.T(), mat.NewVecDense(q.m, q.r))
			g.ScaleVec(1/float64(q.m), g)
			// Where residuals overflow, Func is +Inf and the line search
			// backs off; a zero gradient there keeps optimize from
			// rejecting the step outright.
			for i, v := range grad {
				if math.IsNaN(v) || math.IsInf(v, 0) {
					grad[i] = 0
				}
			}
		},
		Hess: func(h *mat.SymDense, x []float64) {
			q.eval(x, true)
			h.SymOuterK(1/float64(q.m), q.jac.T())
			// A ridge of 1e-8 of the largest curvature keeps Newton's
			// step defined when a parameter has no effect on the
			// residuals, and short in directions that barely matter
			// (1e-8 was the fastest of 1e-10, 1e-8, 1e-6 on the
			// benchmark and the round-trip tests).
			mx := 0.0
			for i := range q.p {
				mx = math.Max(mx, h.At(i, i))
			}
			for i := range q.p {
				v := h.At(i, i) + 1e-8*mx + 1e-300
				if math.IsNaN(v) || math.IsInf(v, 0) {
					v = 1
				}
				h.SetSym(i, i, v)
			}
		},
	}
}

// lsqSettings are the stopping rules of every nonlinear fit: stop when the
// mean square residual has improved by less than 1e-10 of itself (plus
// 1e-28 absolute, for data fitted exactly) over 5 iterations, or when the
// gradient is below 1e-14; more than 500 Newton steps count as failure.
func lsqSettings() *optimize.Settings {
	return &optimize.Settings{
		MajorIterations:   500,
		GradientThreshold: 1e-14,
		Converger:         &optimize.FunctionConverge{Absolute: 1e-28, Relative: 1e-10, Iterations: 5},
	}
}

// refitSettings are the stopping rules of a cross-validation refit: a
// held-out error needs about three digits, which the mean square residual
// gives long before it stops improving by 1e-10 of itself; the fit of a
// sum of two Arrhenius terms whose second term barely matters creeps along
// its flat direction for hundreds of steps otherwise.
func refitSettings() *optimize.Settings {
	return &optimize.Settings{
		MajorIterations:   100,
		GradientThreshold: 1e-14,
		Converger:         &optimize.FunctionConverge{Absolute: 1e-28, Relative: 1e-7, Iterations: 3},
	}
}

// solve minimises from x0 and returns the minimiser and Σr²/m. A start
// that stops with an error from optimize.Minimize or a failure status is
// an error wrapping ErrNoConvergence.
func (q *lsq) solve(x0 []float64) ([]float64, float64, error) {
	q.valid = false
	if !newtonSolver && !q.newton {
		rules := fullRules()
		if q.refit {
			rules = refitRules()
		}
		x, c, err := q.marquardt(x0, rules)
		if q.refit && errors.Is(err, errIterationLimit) && finite(x...) {
			err = nil
		}
		if err == nil && finite(x...) && !math.IsInf(c, 0) {
			return x, c, nil
		}
		// Where Levenberg–Marquardt fails or runs out of steps, the
		// Newton method's line search carries on from where it stopped,
		// as before it (a fallback; no test table needs it since the
		// creep rule of marquardt).
		if x != nil && finite(x...) && !math.IsInf(c, 0) {
			x0 = x
		}
		q.valid = false
	}
	if c := q.cost(x0); math.IsInf(c, 0) {
		return nil, 0, fmt.Errorf("%w: residuals not finite at the start", ErrNoConvergence)
	}
	// Newton's line search can stall (no progress, or a search that fails)
	// where the Gauss–Newton model is poor, or at a minimum already found
	// to machine precision. A stalled run counts as converged only if the
	// Newton decrement there, the decrease the quadratic model still
	// promises, is below stallRelTol of the cost; otherwise it restarts
	// from where it stopped, once with Newton and once with BFGS.
	var res *optimize.Result
	var err error
	x := x0
	for try, method := range []func() optimize.Method{
		func() optimize.Method { return &optimize.Newton{Linesearcher: &optimize.Backtracking{}} },
		func() optimize.Method { return &optimize.Newton{Linesearcher: &optimize.Backtracking{}} },
		func() optimize.Method { return &optimize.BFGS{} },
	} {
		settings := lsqSettings()
		if q.refit {
			settings = refitSettings()
		}
		if try < 2 && !gonumNewton {
			// The same Newton run without gonum's machinery (newtonRun).
			xr, fr, st, e := q.newtonRun(x, settings)
			res, err = &optimize.Result{Location: optimize.Location{X: xr, F: fr}, Status: st}, e
		} else {
			res, err = optimize.Minimize(q.problem(), x, settings, method())
		}
		if err == nil && res != nil {
			err = res.Status.Err()
		}
		if q.refit && res != nil && res.Status == optimize.IterationLimit && finite(res.X...) {
			err = nil
			break
		}
		if err == nil || res == nil || !finite(res.X...) {
			break
		}
		if stalled(err) && q.decrement(res.X) <= stallRelTol*res.F+1e-30 {
			err = nil
			break
		}
		x = res.X
	}
	if err != nil {
		return nil, 0, fmt.Errorf("%w: %v", ErrNoConvergence, err)
	}
	x = slices.Clone(res.X)
	c := q.cost(x)
	if !finite(x...) || math.IsInf(c, 0) {
		return nil, 0, fmt.Errorf("%w: non-finite result", ErrNoConvergence)
	}
	return x, c, nil
}

// newtonSolver selects the previous solver, gonum's Newton method with a
// backtracking line search (then BFGS), for the tests and benchmarks that
// compare it with lsq.marquardt.
var newtonSolver = false

// gonumNewton makes the Newton runs go through gonum's optimize.Minimize
// instead of newtonRun, its port (for the test comparing them).
var gonumNewton = false

// countEvals makes eval count the residual evaluations in evalCount (for
// a test comparing the solvers; not safe with concurrent fits).
var (
	countEvals bool
	evalCount  int
)

// stallRelTol is the Newton decrement, relative to the cost, below which
// a run whose line search stalled is at its minimum: 1e-8 of the cost
// changes the fitted k by about 1e-4 of its error.
const stallRelTol = 1e-8

// stalled reports a line-search stop.
func stalled(err error) bool {
	return errors.Is(err, optimize.ErrNoProgress) || errors.Is(err, optimize.ErrLinesearcherFailure)
}

// decrement returns ½·gᵀH⁻¹g at x for the gradient g and regularised
// Gauss–Newton Hessian H of ½·cost: the decrease a Newton step promises.
func (q *lsq) decrement(x []float64) float64 {
	p := q.problem()
	g := make([]float64, q.p)
	p.Grad(g, x)
	h := mat.NewSymDense(q.p, nil)
	p.Hess(h, x)
	var ch mat.Cholesky
	if !ch.Factorize(h) {
		return math.Inf(1)
	}
	gv := mat.NewVecDense(q.p, g)
	var d mat.VecDense
	if err := ch.SolveVecTo(&d, gv); err != nil {
		return math.Inf(1)
	}
	return 0.5 * mat.Dot(gv, &d)
}

// multiStart solves from every start and returns the best converged
// result. It fails only if no start converges.
func (q *lsq) multiStart(starts [][]float64) ([]float64, float64, error) {
	var best []float64
	bestC := math.Inf(1)
	var lastErr error
	for _, x0 := range starts {
		x, c, err := q.solve(x0)
		if err != nil {
			lastErr = err
			continue
		}
		if c < bestC {
			best, bestC = x, c
		}
	}
	if best == nil {
		return nil, 0, fmt.Errorf("%w from %d starts (last: %v)", ErrNoConvergence, len(starts), lastErr)
	}
	return best, bestC, nil
}

// screening selects screenedStart's screening; false makes it multiStart,
// the previous algorithm, which benchmarks time beside it.
var screening = true

// screenKeep is how many of the screened starts screenedStart finishes
// with the full rules: the screening's cost, three digits, can rank two
// basins of nearly equal depth the wrong way round (measured on the
// five-parameter SRI fit of GRI-Mech 3.0's 2CH3), so the best two are
// finished.
const screenKeep = 2

// screenedStart solves from every start with the loose stopping rules of
// refitSettings (a screening: about three digits of the cost, at most
// 100 steps), then from the screenKeep screened points of least cost with
// the full rules, and returns the best. Starts that end far apart in cost
// are told apart long before the full rules stop; a run that creeps along
// a flat direction toward a bound (the slowest kind, some twenty times a
// normal run) is cut at the screening's limit. With at most screenKeep
// starts it is multiStart.
func (q *lsq) screenedStart(starts [][]float64) ([]float64, float64, error) {
	if len(starts) <= screenKeep || !screening {
		return q.multiStart(starts)
	}
	type screened struct {
		x []float64
		c float64
	}
	var done []screened
	q.refit = true
	for _, x0 := range starts {
		if x, c, err := q.solve(x0); err == nil {
			done = append(done, screened{x, c})
		}
	}
	q.refit = false
	if len(done) == 0 {
		return q.multiStart(starts) // none screened: the full rules decide
	}
	slices.SortStableFunc(done, func(a, b screened) int {
		switch {
		case a.c < b.c:
			return -1
		case a.c > b.c:
			return 1
		}
		return 0
	})
	var best [][]float64
	for _, d := range done[:min(screenKeep, len(done))] {
		best = append(best, d.x)
	}
	return q.multiStart(best)
}

// bound maps an unconstrained coordinate v onto (lo, hi) by
// y = lo + (hi−lo)(1+tanh v)/2, so a fit never leaves the interval.
type bound struct{ lo, hi float64 }

// val returns y(v) and dy/dv.
func (b bound) val(v float64) (float64, float64) {
	t := math.Tanh(v)
	return b.lo + (b.hi-b.lo)*(1+t)/2, (b.hi - b.lo) * (1 - t*t) / 2
}

// inv returns the v of y, with y pulled inside the interval.
func (b bound) inv(y float64) float64 {
	s := 2*(y-b.lo)/(b.hi-b.lo) - 1
	s = math.Max(-1+1e-9, math.Min(1-1e-9, s))
	return math.Atanh(s)
}
