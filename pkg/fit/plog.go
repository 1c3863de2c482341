package fit

import (
	"fmt"
	"math"
	"runtime"
	"slices"
	"sync"

	"gonum.org/v1/gonum/mat"
)

// PlogPressure is the fit at one pressure of a PLOG form.
type PlogPressure struct {
	P           float64 `json:"P_Pa"` // the entry's pressure: geometric mean of its group's
	NTerms      int     `json:"n_terms"`
	NTemps      int     `json:"n_temperatures"` // distinct temperatures fitted
	MaxErrorPct float64 `json:"max_error_pct"`
	RMSErrorPct float64 `json:"rms_error_pct"`
	// OneTermMaxErrorPct and TwoTermMaxErrorPct are the max errors at this
	// pressure of the one- and two-term fits, and their held-out (leave
	// one temperature out) counterparts, when both were fitted: the
	// numbers the choice of NTerms was made on.
	OneTermMaxErrorPct        *float64 `json:"one_term_max_error_pct,omitempty"`
	TwoTermMaxErrorPct        *float64 `json:"two_term_max_error_pct,omitempty"`
	OneTermHeldOutMaxErrorPct *float64 `json:"one_term_heldout_max_error_pct,omitempty"`
	TwoTermHeldOutMaxErrorPct *float64 `json:"two_term_heldout_max_error_pct,omitempty"`
	// LeftOutMaxErrorPct is, for an inner pressure, the max error at its
	// points of the interpolation between its neighbours, this entry left
	// out: the error a simulator makes between the listed pressures,
	// measured at twice their spacing.
	LeftOutMaxErrorPct *float64 `json:"left_out_max_error_pct,omitempty"`
}

// SkippedPressure is a pressure of the table with too few temperatures to
// be a PLOG entry; its points are still compared with the interpolation.
type SkippedPressure struct {
	P       float64 `json:"P_Pa"`
	NPoints int     `json:"n_points"`
	Reason  string  `json:"reason"`
}

// PLOGResult is a fitted PLOG form with its report and the errors at
// each pressure. The report's in-sample error is measured at the table's
// points, where PLOG is exact in P; its held-out error (Report.HeldOut)
// measures the interpolation between the listed pressures.
type PLOGResult struct {
	PLOG
	Pressures []PlogPressure    `json:"pressure_errors"`
	Skipped   []SkippedPressure `json:"skipped_pressures,omitempty"`
	Report
}

// minTwoTermTemps is the fewest temperatures at one pressure for which a
// sum of two Arrhenius terms (6 parameters) is tried: one more than its
// parameters, so it does not interpolate exactly.
const minTwoTermTemps = 7

// maxTermFolds is the most temperatures left out, one at a time, to
// compare the one- and two-term fits at one pressure; evenly spread over
// the interior ones. Each is a nonlinear refit, so the number is kept
// small; eight already show a second term that follows noise.
const maxTermFolds = 8

// FitPLOG fits an entry of one or two modified Arrhenius terms at each
// pressure of the table. Pressures within opt.GroupTol (relative) of each
// other form one entry, at their geometric mean, so that measured data
// whose pressures scatter a little, or differ from one temperature to the
// next, still give entries; an entry needs at least 2 temperatures (with
// 2 it is A·exp(−Ta/T)), and pressures with fewer are listed in Skipped.
// The form needs at least 2 entries.
//
// At each pressure: one term by linear least squares in ln k. If its
// maximum error there exceeds opt.Tolerance, the pressure has at least 7
// temperatures and opt.PLOGOneTerm is false, a sum of two terms with
// positive A is fitted by nonlinear least squares in ln k, from splits of
// the temperature range and from the one-term fit; it is kept if its
// held-out error (each of up to 8 interior temperatures left out and
// refitted) is below 0.9 of the one term's, or, with too few
// temperatures for that, if its maximum error is. opt.PLOGMaxN bounds
// |n| of every term and opt.Fix.N fixes n.
//
// The report's held-out error is that of the interpolation between the
// listed pressures: at opt.Holdout's points if any lie in the table's
// range, else by leaving each inner entry out in turn and comparing the
// interpolation of its neighbours with its points (LeftOutMaxErrorPct);
// points of skipped pressures are compared with the interpolation too.
func FitPLOG(t *Table, opt Options) (*PLOGResult, error) {
	opt = opt.withDefaults()
	if err := t.Validate(); err != nil {
		return nil, err
	}
	if err := checkHoldout(opt); err != nil {
		return nil, err
	}
	if err := checkPLOGOptions(opt); err != nil {
		return nil, err
	}
	groups := groupBy(t.Points, func(p Point) float64 { return p.P }, opt.GroupTol)
	if len(groups) < 2 {
		return nil, fmt.Errorf("%w: %s: a PLOG form needs at least 2 pressures (simulators require two); the table has 1 (%g Pa): use arrhenius",
			ErrTooFewData, t.name(), groups[0].value)
	}
	type fitted struct {
		entry PlogEntry
		rep   PlogPressure
		nPar  int
		skip  string // why the pressure has no entry
		err   error
	}
	out := make([]fitted, len(groups))
	// The pressures are independent fits; run them on opt.Jobs workers
	// (0: all CPUs).
	jobs := opt.Jobs
	if jobs <= 0 {
		jobs = runtime.GOMAXPROCS(0)
	}
	var wg sync.WaitGroup
	next := make(chan int)
	for range min(jobs, len(groups)) {
		wg.Go(func() {
			for i := range next {
				f := &out[i]
				f.entry, f.rep, f.nPar, f.skip, f.err = fitPlogGroup(t, groups[i], opt)
			}
		})
	}
	for i := range groups {
		next <- i
	}
	close(next)
	wg.Wait()
	res := &PLOGResult{}
	nPar := 0
	var entryGroup []int // group index of each entry
	for i, f := range out {
		switch {
		case f.err != nil:
			return nil, f.err
		case f.skip != "":
			res.Skipped = append(res.Skipped, SkippedPressure{P: groups[i].value, NPoints: len(groups[i].idx), Reason: f.skip})
		default:
			res.Entries = append(res.Entries, f.entry)
			res.Pressures = append(res.Pressures, f.rep)
			entryGroup = append(entryGroup, i)
			nPar += f.nPar
		}
	}
	if len(res.Entries) < 2 {
		return nil, fmt.Errorf("%w: %s: a PLOG form needs at least 2 pressures with at least 2 temperatures each; the table has %d such of %d pressures",
			ErrTooFewData, t.name(), len(res.Entries), len(groups))
	}
	rep, err := formReport(t, &res.PLOG)
	if err != nil {
		return nil, err
	}
	rep.NParams = nPar
	res.Report = rep

	// Between the pressures: leave each inner entry out.
	cv := newHeldOutAcc(HeldOutCV)
	for e := 1; e+1 < len(res.Entries); e++ {
		left := PLOG{Entries: slices.Delete(slices.Clone(res.Entries), e, e+1)}
		one := newHeldOutAcc(HeldOutCV)
		for _, i := range groups[entryGroup[e]].idx {
			p := t.Points[i]
			k := left.Eval(p.T, p.P)
			one.add(p, k)
			cv.add(p, k)
		}
		if h := one.result(); h != nil {
			v := h.MaxErrorPct
			res.Pressures[e].LeftOutMaxErrorPct = &v
		}
	}
	lo, hi := res.Entries[0].P, res.Entries[len(res.Entries)-1].P
	for i, g := range groups {
		if !slices.Contains(entryGroup, i) && g.value > lo && g.value < hi {
			for _, j := range g.idx {
				p := t.Points[j]
				cv.add(p, res.PLOG.Eval(p.T, p.P))
			}
		}
	}
	tr, pr := t.extent()
	if pts := extraPoints(opt.Holdout, tr, pr); len(pts) > 0 {
		res.HeldOut = heldOutExtra(pts, &res.PLOG)
	} else {
		res.HeldOut = cv.result()
	}
	return res, nil
}

// checkPLOGOptions checks the PLOG settings of opt.
func checkPLOGOptions(opt Options) error {
	if opt.PLOGMaxN < 0 || math.IsNaN(opt.PLOGMaxN) || math.IsInf(opt.PLOGMaxN, 0) {
		return fmt.Errorf("%w: PLOG bound on |n| = %g: give a positive number, or 0 for none", ErrBadData, opt.PLOGMaxN)
	}
	if n := opt.Fix.N; n != nil {
		if !finite(*n) {
			return fmt.Errorf("%w: fixed n = %g is not finite", ErrBadData, *n)
		}
		if opt.PLOGMaxN > 0 && math.Abs(*n) > opt.PLOGMaxN {
			return fmt.Errorf("%w: fixed n = %g is outside the PLOG bound |n| ≤ %g", ErrBadData, *n, opt.PLOGMaxN)
		}
	}
	return nil
}

// nRule is the constraint on the temperature exponent of fitted terms.
type nRule struct {
	fixed  *float64 // n fixed to this value
	maxAbs float64  // |n| ≤ maxAbs if positive
}

func plogNRule(opt Options) nRule { return nRule{fixed: opt.Fix.N, maxAbs: opt.PLOGMaxN} }

// free reports an unconstrained n.
func (r nRule) free() bool { return r.fixed == nil && !(r.maxAbs > 0) }

// perTerm returns the number of fitted parameters of one term.
func (r nRule) perTerm() int {
	if r.fixed != nil {
		return 2
	}
	return 3
}

// fitPlogGroup fits the entry of one pressure group. skip is non-empty
// (and the rest zero) when the group has too few temperatures.
func fitPlogGroup(t *Table, g group, opt Options) (PlogEntry, PlogPressure, int, string, error) {
	sub := &Table{Name: t.Name, KUnits: t.KUnits}
	var ts, ks, sig []float64
	for _, i := range g.idx {
		p := t.Points[i]
		sub.Points = append(sub.Points, p)
		ts, ks, sig = append(ts, p.T), append(ks, p.K), append(sig, p.Sigma)
	}
	if !t.Weighted() {
		sig = nil
	}
	nt := len(distinct(ts))
	if nt < 2 {
		return PlogEntry{}, PlogPressure{}, 0, fmt.Sprintf("%d temperature (%g K); an entry needs 2", nt, ts[0]), nil
	}
	nr := plogNRule(opt)
	fail := func(err error) (PlogEntry, PlogPressure, int, string, error) {
		return PlogEntry{}, PlogPressure{}, 0, "", fmt.Errorf("%s: PLOG at P = %g Pa: %w", t.name(), g.value, err)
	}
	one, err := fitOneTerm(ts, ks, sig, nr)
	if err != nil {
		return fail(err)
	}
	terms := []Arrhenius{one}
	r, err := NewReport(sub, one, nr.perTerm())
	if err != nil {
		return fail(err)
	}
	pp := PlogPressure{P: g.value, NTemps: nt}
	if !opt.PLOGOneTerm && r.MaxError() > opt.Tolerance && nt >= minTwoTermTemps {
		starts := twoTermStarts(ts, ks)
		starts = append(starts, [2]Arrhenius{{A: one.A / 2, N: one.N, Ta: one.Ta}, {A: one.A / 2, N: one.N, Ta: one.Ta * 1.5}})
		if two, err := fitTwoTerms(ts, ks, sig, starts, nr, false); err == nil {
			if r2, err := NewReport(sub, plogEntryEval{two}, 2*nr.perTerm()); err == nil {
				e1, e2 := r.MaxErrorPct, r2.MaxErrorPct
				pp.OneTermMaxErrorPct, pp.TwoTermMaxErrorPct = &e1, &e2
				h1, h2 := termHeldOut(sub, opt.GroupTol, func(tt, kk, ss []float64) ([]Arrhenius, error) {
					a, err := fitOneTerm(tt, kk, ss, nr)
					return []Arrhenius{a}, err
				}), termHeldOut(sub, opt.GroupTol, func(tt, kk, ss []float64) ([]Arrhenius, error) {
					return fitTwoTerms(tt, kk, ss, [][2]Arrhenius{{two[0], two[1]}}, nr, true)
				})
				// The second term must lower the held-out error by a tenth
				// (more parameters must buy that much, as elsewhere in this
				// package); without held-out figures, the error at the
				// pressure's points.
				var keep bool
				switch {
				case math.IsNaN(h1) || math.IsNaN(h2) || (math.IsInf(h1, 1) && math.IsInf(h2, 1)):
					keep = e2 < 0.9*e1
				default:
					keep = h2 < 0.9*h1 && e2 < e1
				}
				if !math.IsNaN(h1) {
					v1, v2 := 100*h1, 100*h2
					if !math.IsInf(v1, 1) {
						pp.OneTermHeldOutMaxErrorPct = &v1
					}
					if !math.IsInf(v2, 1) {
						pp.TwoTermHeldOutMaxErrorPct = &v2
					}
				}
				if keep {
					terms, r = two, r2
				}
			}
		}
	}
	pp.NTerms, pp.MaxErrorPct, pp.RMSErrorPct = len(terms), r.MaxErrorPct, r.RMSErrorPct
	return PlogEntry{P: g.value, Terms: terms}, pp, len(terms) * nr.perTerm(), "", nil
}

// termHeldOut leaves out each of up to maxTermFolds interior temperatures
// of the one-pressure table sub in turn, refits with fit and returns the
// largest relative error at the points left out, as a fraction: +Inf if a
// refit failed, NaN if sub has no interior temperature.
func termHeldOut(sub *Table, tol float64, fit func(ts, ks, sig []float64) ([]Arrhenius, error)) float64 {
	gs := groupBy(sub.Points, func(p Point) float64 { return p.T }, tol)
	if len(gs) < 3 {
		return math.NaN()
	}
	worst := 0.0
	for _, i := range spread(len(gs)-2, maxTermFolds) {
		train := sub.without(gs[1+i].idx)
		var ts, ks, sig []float64
		for _, p := range train.Points {
			ts, ks, sig = append(ts, p.T), append(ks, p.K), append(sig, p.Sigma)
		}
		if !sub.Weighted() {
			sig = nil
		}
		terms, err := fit(ts, ks, sig)
		if err != nil {
			return math.Inf(1)
		}
		for _, j := range gs[1+i].idx {
			p := sub.Points[j]
			k := PlogEntry{Terms: terms}.eval(p.T)
			e := math.Abs(k/p.K - 1)
			if !(k > 0) || math.IsNaN(e) || math.IsInf(e, 0) {
				return math.Inf(1)
			}
			worst = math.Max(worst, e)
		}
	}
	return worst
}

// fitOneTerm fits one modified Arrhenius term under the rule nr: n fixed,
// or, if the free fit's |n| exceeds the bound, n at the bound (the least-
// squares problem is convex, so a violated bound is active at the
// constrained minimum).
func fitOneTerm(ts, ks, sig []float64, nr nRule) (Arrhenius, error) {
	if nr.fixed != nil {
		return fitArrheniusFixedN(ts, ks, sig, *nr.fixed)
	}
	a, err := FitArrhenius(ts, ks, sig)
	if err != nil || !(nr.maxAbs > 0) || math.Abs(a.N) <= nr.maxAbs {
		return a, err
	}
	return fitArrheniusFixedN(ts, ks, sig, math.Copysign(nr.maxAbs, a.N))
}

// plogEntryEval evaluates the sum of Arrhenius terms.
type plogEntryEval struct{ terms []Arrhenius }

func (e plogEntryEval) Eval(t, _ float64) float64 { return PlogEntry{Terms: e.terms}.eval(t) }

// twoTermStarts returns starting pairs for a two-term fit: for splits of
// the distinct temperatures at a half, a third and two thirds, terms
// fitted to the lower and upper parts, and the "peeled" pairs: one part's
// term and the fit of what it leaves of the other part.
func twoTermStarts(ts, ks []float64) [][2]Arrhenius {
	d := distinct(ts)
	var starts [][2]Arrhenius
	for _, frac := range []float64{0.5, 1.0 / 3, 2.0 / 3} {
		cut := d[max(2, min(len(d)-4, int(frac*float64(len(d)))))]
		var lt, lk, ut, uk []float64
		for i, T := range ts {
			if T <= cut {
				lt, lk = append(lt, T), append(lk, ks[i])
			} else {
				ut, uk = append(ut, T), append(uk, ks[i])
			}
		}
		a1, err1 := FitArrhenius(lt, lk, nil)
		a2, err2 := FitArrhenius(ut, uk, nil)
		if err1 != nil || err2 != nil {
			continue
		}
		starts = append(starts, [2]Arrhenius{a1, a2})
		// Peeling: fit one end, subtract that term from the other end's
		// data and fit what is left.
		if b, err := peel(a1, ut, uk); err == nil {
			starts = append(starts, [2]Arrhenius{a1, b})
		}
		if b, err := peel(a2, lt, lk); err == nil {
			starts = append(starts, [2]Arrhenius{b, a2})
		}
	}
	return starts
}

// fitTwoTerms fits k = k1(T) + k2(T), both modified Arrhenius with A > 0,
// by nonlinear least squares in ln k from each start, under the rule nr
// for n. With refit (a cross-validation refit from a start near its
// minimum) it stops earlier (refitSettings). The terms are returned
// ordered by Ta.
func fitTwoTerms(ts, ks, sig []float64, starts [][2]Arrhenius, nr nRule, refit bool) ([]Arrhenius, error) {
	d := distinct(ts)
	if len(d) < 3 {
		return nil, fmt.Errorf("%w: a two-term fit needs at least 3 temperatures", ErrTooFewData)
	}
	lnk := make([]float64, len(ts))
	w := make([]float64, len(ts))
	for i := range ts {
		lnk[i] = math.Log(ks[i])
		w[i] = 1
		if sig != nil {
			w[i] = 1 / sig[i]
		}
	}
	var m twoTermModel
	var err error
	if nr.free() {
		m, err = newNodeTerms(d[0], d[len(d)-1])
	} else {
		m = newBoundTerms(d[0], d[len(d)-1], nr)
	}
	if err != nil {
		return nil, err
	}
	np := m.nParams()
	basis := make([][]float64, len(ts))
	for i, T := range ts {
		basis[i] = m.basis(T)
	}
	_, nodes := m.(nodeTerms) // free n: the terms inline (nodeTerms.term)
	f := func(x, r []float64, jac *mat.Dense) {
		var g1, g2 [3]float64
		for i := range ts {
			var l1, l2 float64
			var d1, d2 []float64
			if b := basis[i]; nodes {
				l1, l2 = b[0]*x[0]+b[1]*x[1]+b[2]*x[2], b[0]*x[3]+b[1]*x[4]+b[2]*x[5]
				d1, d2 = b, b
			} else {
				l1, d1 = m.term(x[:np], b, g1[:])
				l2, d2 = m.term(x[np:], b, g2[:])
			}
			hi, lo := max(l1, l2), min(l1, l2)
			e := math.Exp(lo - hi)
			lsum := hi + math.Log1p(e)
			r[i] = w[i] * (lsum - lnk[i])
			if jac != nil {
				// Each term's share of k: 1/(1 + e) for the larger,
				// e/(1 + e) for the other.
				s1, s2 := 1/(1+e), 0.0
				s2 = e * s1
				if l1 < l2 {
					s1, s2 = s2, s1
				}
				jr := jac.RawMatrix()
				row := jr.Data[i*jr.Stride : i*jr.Stride+2*np]
				for j := range np {
					row[j] = w[i] * s1 * d1[j]
					row[np+j] = w[i] * s2 * d2[j]
				}
			}
		}
	}
	var xs [][]float64
	for _, s := range starts {
		x := append(m.coords(s[0]), m.coords(s[1])...)
		if finite(x...) {
			xs = append(xs, x)
		}
	}
	if len(xs) == 0 {
		return nil, fmt.Errorf("%w: no start for the two-term fit", ErrNoConvergence)
	}
	q := newLSQ(len(ts), 2*np, f)
	q.refit = refit
	// A held-out refit leaves a temperature out of a fit of six parameters
	// to a few temperatures, often under-determined: where it ends in the
	// flat valley depends on the path. The Newton method's line search
	// stays near the full fit it starts from; Levenberg–Marquardt walks the
	// valley to its far end, whose extrapolation to the point left out
	// measures the path, not the form (GRI-Mech 3.0 H+CH3 at 10 bar:
	// 2.6e4 % against 25 %). So refits keep the Newton method.
	q.newton = refit
	x, _, err := q.screenedStart(xs)
	if err != nil {
		return nil, err
	}
	terms := []Arrhenius{m.arrhenius(x[:np]), m.arrhenius(x[np:])}
	for _, a := range terms {
		if !finite(a.A, a.N, a.Ta) || !(a.A > 0) {
			return nil, fmt.Errorf("%w: two-term fit gave A = %g, n = %g, Ta = %g K", ErrNoConvergence, a.A, a.N, a.Ta)
		}
	}
	slices.SortFunc(terms, func(a, b Arrhenius) int {
		switch {
		case a.Ta < b.Ta:
			return -1
		case a.Ta > b.Ta:
			return 1
		}
		return 0
	})
	return terms, nil
}

// twoTermModel parametrizes one Arrhenius term of a two-term fit.
type twoTermModel interface {
	nParams() int
	// basis returns what term needs of T.
	basis(t float64) []float64
	// term returns ln k of the term with coordinates x at a point with
	// basis b, and fills d with its derivatives by x.
	term(x, b, d []float64) (float64, []float64)
	coords(a Arrhenius) []float64
	arrhenius(x []float64) Arrhenius
}

// nodeTerms represents a free term by ln k at three node temperatures
// (arrNodes): linear in the coordinates and well conditioned.
type nodeTerms struct{ n *arrNodes }

func newNodeTerms(tmin, tmax float64) (twoTermModel, error) {
	n, err := newArrNodes(tmin, tmax)
	if err != nil {
		return nil, err
	}
	return nodeTerms{n}, nil
}

func (m nodeTerms) nParams() int { return 3 }
func (m nodeTerms) basis(t float64) []float64 {
	b := m.n.basis(t)
	return b[:]
}
func (m nodeTerms) term(x, b, d []float64) (float64, []float64) {
	copy(d, b)
	return b[0]*x[0] + b[1]*x[1] + b[2]*x[2], d[:3]
}
func (m nodeTerms) coords(a Arrhenius) []float64 {
	v := m.n.values(a)
	return v[:]
}
func (m nodeTerms) arrhenius(x []float64) Arrhenius { return m.n.arrhenius(x) }

// boundTerms represents a term with a constrained n: ln k = a − b·Tr/T +
// n·ln(T/Tr), Tr the geometric mean of the range, with n fixed or n =
// maxAbs·tanh(v) (so |n| < maxAbs).
type boundTerms struct {
	tr float64
	nr nRule
}

func newBoundTerms(tmin, tmax float64, nr nRule) twoTermModel {
	return boundTerms{tr: math.Sqrt(tmin * tmax), nr: nr}
}

func (m boundTerms) nParams() int              { return m.nr.perTerm() }
func (m boundTerms) basis(t float64) []float64 { return []float64{-m.tr / t, math.Log(t / m.tr)} }
func (m boundTerms) n(x []float64) (n, dn float64) {
	if m.nr.fixed != nil {
		return *m.nr.fixed, 0
	}
	th := math.Tanh(x[2])
	return m.nr.maxAbs * th, m.nr.maxAbs * (1 - th*th)
}
func (m boundTerms) term(x, b, d []float64) (float64, []float64) {
	n, dn := m.n(x)
	d[0], d[1] = 1, b[0]
	if m.nr.fixed == nil {
		d[2] = dn * b[1]
	}
	return x[0] + x[1]*b[0] + n*b[1], d[:m.nParams()]
}
func (m boundTerms) coords(a Arrhenius) []float64 {
	n := a.N
	if m.nr.fixed != nil {
		n = *m.nr.fixed
	}
	x := []float64{math.Log(a.A) + n*math.Log(m.tr), a.Ta / m.tr}
	if m.nr.fixed == nil {
		s := math.Max(-1+1e-6, math.Min(1-1e-6, n/m.nr.maxAbs))
		x = append(x, math.Atanh(s))
	}
	return x
}
func (m boundTerms) arrhenius(x []float64) Arrhenius {
	n, _ := m.n(x)
	return Arrhenius{A: math.Exp(x[0] - n*math.Log(m.tr)), N: n, Ta: x[1] * m.tr}
}

// peel fits an Arrhenius term to k − a(T) at the temperatures where that
// is positive (at least 3 of them).
func peel(a Arrhenius, ts, ks []float64) (Arrhenius, error) {
	var pt, pk []float64
	for i, T := range ts {
		if r := ks[i] - a.At(T); r > 0 {
			pt, pk = append(pt, T), append(pk, r)
		}
	}
	if len(distinct(pt)) < 3 {
		return Arrhenius{}, fmt.Errorf("%w: nothing left to peel", ErrTooFewData)
	}
	return FitArrhenius(pt, pk, nil)
}
