package fit

import (
	"math"

	"gonum.org/v1/gonum/optimize"
)

// newtonRun is gonum's optimize.Minimize with the Newton method and a
// backtracking line search (gonum v0.17.0: optimize.Newton, Backtracking,
// FunctionConverge and Minimize's checks, the same steps in the same
// order) on lsq.problem's objective ½·S, its gradient Jᵀr/m and the ridged
// Gauss–Newton Hessian, without Minimize's goroutines, channels and
// per-step allocations and without the condition estimate gonum's Cholesky
// makes on every factorisation. The PLOG held-out refits use it
// (fitTwoTerms): it ends where gonum's run ends, to rounding
// (TestNewtonRunMatchesGonum), at a fraction of the cost.
//
// It returns the last major iteration's point and ½·S there, the status
// gonum would report and the error it would return
// (optimize.ErrNoProgress, ErrLinesearcherFailure, ErrNonDescentDirection).
func (q *lsq) newtonRun(x0 []float64, set *optimize.Settings) ([]float64, float64, optimize.Status, error) {
	const (
		increase = 5     // Newton.Increase default
		maxMods  = 20    // maxNewtonModifications
		gradStop = 1e-12 // Newton.GradStopThreshold default (defaultGradientAbsTol)
		decrease = 1e-4  // Backtracking.DecreaseFactor default
		contract = 0.5   // Backtracking.ContractionFactor default
		minStep  = 1e-20 // Backtracking.MinimumStepSize default
	)
	p := q.p
	fc, _ := set.Converger.(*optimize.FunctionConverge)
	x := append([]float64(nil), x0...)
	g := make([]float64, p)
	h := make([]float64, p*p)
	a := make([]float64, p*p)
	dir := make([]float64, p)
	xt := make([]float64, p)
	// fill sets g and h at the point q was last evaluated at with its
	// Jacobian: lsq.problem's Grad and Hess.
	fill := func() {
		q.normalEquations(h, g)
		mx := 0.0
		for i := range p {
			if math.IsNaN(g[i]) || math.IsInf(g[i], 0) {
				g[i] = 0
			}
			mx = math.Max(mx, h[i*p+i])
		}
		for i := range p {
			v := h[i*p+i] + 1e-8*mx + 1e-300
			if math.IsNaN(v) || math.IsInf(v, 0) {
				v = 1
			}
			h[i*p+i] = v
		}
	}
	norm := func(v []float64) float64 {
		n := 0.0
		for _, e := range v {
			n = math.Max(n, math.Abs(e))
		}
		return n
	}
	// Trial points get residuals only (about three trials an accepted
	// step on the PLOG refits); the accepted one then gets its Jacobian.
	f := 0.5 * q.cost(x)
	q.eval(x, true)
	fill()
	if math.IsInf(f, 1) || math.IsNaN(f) {
		return x, f, optimize.Failure, optimize.ErrFunc(f)
	}
	// major is Minimize's bookkeeping of a major iteration at (x, f, g).
	iters, flat := 0, 0
	var best float64
	first := true
	major := func() optimize.Status {
		iters++
		if math.IsInf(f, -1) {
			return optimize.FunctionNegativeInfinity
		}
		if set.GradientThreshold > 0 && norm(g) < set.GradientThreshold {
			return optimize.GradientThreshold
		}
		if fc != nil && fc.Iterations > 0 {
			if first {
				best, first = f, false
			} else if maxAbs := math.Max(math.Abs(f), math.Abs(best)); f < best && best-f > fc.Relative*maxAbs+fc.Absolute {
				best, flat = f, 0
			} else if flat++; flat >= fc.Iterations {
				return optimize.FunctionConvergence
			}
		}
		if set.MajorIterations > 0 && iters >= set.MajorIterations {
			return optimize.IterationLimit
		}
		return optimize.NotTerminated
	}
	if st := major(); st != optimize.NotTerminated { // the starting location
		return x, f, st, nil
	}
	tau := 0.0
	for {
		// Newton.NextDirection (Nocedal & Wright 2006, Algorithm 3.3):
		// the smallest τ ≥ 0 on the ladder 0, 0.001, ×5 … making H + τI
		// positive definite, or the steepest descent after 20 tries.
		minA := h[0]
		for i := 1; i < p; i++ {
			minA = math.Min(minA, h[i*p+i])
		}
		if minA > 0 {
			tau = 0
		} else if tau == 0 {
			tau = -minA + 0.001
		}
		found := false
		for range maxMods {
			copy(a, h)
			for i := range p {
				a[i*p+i] = h[i*p+i] + tau
			}
			for i := range p {
				dir[i] = g[i]
			}
			if cholSolve(a, p, dir) {
				for i := range p {
					dir[i] = -dir[i]
				}
				found = true
				break
			}
			tau = math.Max(increase*tau, 0.001)
		}
		if !found {
			for i := range p {
				dir[i] = -g[i]
			}
		}
		proj := 0.0
		for i := range p {
			proj += g[i] * dir[i]
		}
		if proj >= 0 {
			return x, f, optimize.Failure, optimize.ErrNonDescentDirection
		}
		// Backtracking from the full step: the Armijo condition, halving.
		step := 1.0
		var ft float64
		for {
			same := true
			for i := range p {
				xt[i] = x[i] + step*dir[i]
				if xt[i] != x[i] {
					same = false
				}
			}
			if same {
				return x, f, optimize.Failure, optimize.ErrNoProgress
			}
			ft = 0.5 * q.cost(xt)
			if ft <= f+decrease*step*proj {
				break
			}
			step *= contract
			if step < minStep {
				return x, f, optimize.Failure, optimize.ErrLinesearcherFailure
			}
		}
		copy(x, xt)
		f = ft
		q.eval(x, true)
		fill()
		if st := major(); st != optimize.NotTerminated {
			return x, f, st, nil
		}
		if norm(g) < gradStop {
			return x, f, optimize.GradientThreshold, nil
		}
	}
}
