package fit

import (
	"math"
)

// Starts of the held falloff fits from the broadening at the centre.
//
// With k0 and k∞ held, a Troe or SRI fit fits only the broadening F. The
// master equation gives, at each temperature, F1 = k/(k∞/2) at Pr = 1
// (collision.TemperatureResult.Fcent). At Pr = 1 Troe's broadening is
// log F1 = log Fcent/(1 + y²) with y = c/(N − 0.14c), c = −0.4 − 0.67 log
// Fcent, N = 0.75 − 1.27 log Fcent (Gilbert, Luther & Troe 1983), which
// fixes Troe's Fcent(T) from F1 (troeFcent); SRI's is F1 = d·W·T^e
// (Stewart, Larson & Golden 1989: X = 1 at Pr = 1), W itself with d = 1,
// e = 0. The expression of Fcent(T) or W(T) fitted to those values by a
// coarse search is a start near the minimum over the whole table, so one
// or two starts replace the eight or more spread over the parameters'
// ranges (ladderStarts).

// troeFcent returns Troe's Fcent whose broadening at Pr = 1 is f1, by
// bisection in log Fcent on [3 log f1, 0], where log Fcent/(1 + y²) −
// log f1 changes sign for 0 < f1 ≤ 1 (y² ≤ 0.25 there).
func troeFcent(f1 float64) float64 {
	lf1 := math.Log10(f1)
	g := func(l float64) float64 {
		c := -0.4 - 0.67*l
		y := c / (0.75 - 1.27*l - 0.14*c)
		return l/(1+y*y) - lf1
	}
	lo, hi := 3*lf1, 0.0
	for range 60 {
		m := lo + (hi-lo)/2
		if g(m) > 0 {
			hi = m
		} else {
			lo = m
		}
	}
	return math.Pow(10, lo+(hi-lo)/2)
}

// fcentGrid is the number of trial values per temperature parameter of the
// coarse search, evenly in ln T over [broadTMin, broadTMax]: 33 values,
// about 3.3 per decade, so the best trial is within a factor 1.4 of the
// best fit, well inside the basin the Newton runs converge from.
const fcentGrid = 33

// fcentTrials returns the trial temperatures of the coarse search.
func fcentTrials() []float64 {
	out := make([]float64, fcentGrid)
	for i := range out {
		out[i] = math.Exp(math.Log(broadTMin) + (math.Log(broadTMax)-math.Log(broadTMin))*float64(i)/(fcentGrid-1))
	}
	return out
}

// fcentTarget holds Fcent(T) at the table's temperatures, usable values
// only (0 < Fcent ≤ 1).
type fcentTarget struct {
	temps, lnF []float64
}

// newFcentTarget returns the target of a Troe (troe) or SRI fit from the
// broadening f1 at Pr = 1 at temps (see the top of this file), or nil if
// fewer than three values are usable (0 < f1 ≤ 1).
func newFcentTarget(temps, f1 []float64, troe bool) *fcentTarget {
	if len(f1) != len(temps) {
		return nil
	}
	var f fcentTarget
	for i, v := range f1 {
		if v > 0 && v <= 1 {
			if troe {
				v = troeFcent(v)
			}
			f.temps, f.lnF = append(f.temps, temps[i]), append(f.lnF, math.Log(v))
		}
	}
	if len(f.temps) < 3 {
		return nil
	}
	return &f
}

// cost returns Σ (ln fc(T) − ln Fcent(T))², +Inf where fc is not positive.
func (f *fcentTarget) cost(fc func(T float64) float64) float64 {
	s := 0.0
	for i, T := range f.temps {
		v := fc(T)
		if !(v > 0) {
			return math.Inf(1)
		}
		d := math.Log(v) - f.lnF[i]
		s += d * d
	}
	return s
}

// troeA returns the A in [0, 1] that fits (1−A)·e3 + A·e1 + e2 to Fcent
// best in the least-squares sense on Fcent (linear in A), where e3, e1 and
// e2 are exp(−T/T3), exp(−T/T1) and exp(−T2/T) at each temperature.
func (f *fcentTarget) troeA(t3, t1, t2 float64) float64 {
	num, den := 0.0, 0.0
	for i, T := range f.temps {
		e3, e1 := math.Exp(-T/t3), math.Exp(-T/t1)
		e2 := 0.0
		if t2 > 0 {
			e2 = math.Exp(-t2 / T)
		}
		d := e1 - e3
		num += d * (math.Exp(f.lnF[i]) - e3 - e2)
		den += d * d
	}
	if !(den > 0) {
		return 0.5
	}
	return math.Max(0, math.Min(1, num/den))
}

// troe returns the Troe parameters whose Fcent(T) fits the target best
// over the coarse search: T3 ≤ T1 on the trial grid (the pair is
// symmetric under A ↔ 1−A), A by least squares, and, with t2, T2 on the
// grid too (for the four-parameter form, with T3 and T1 of base).
func (f *fcentTarget) troe(n int, base *Troe) Troe {
	trials := fcentTrials()
	best, bestC := Troe{A: 0.5, T3: 100, T1: 1000}, math.Inf(1)
	try := func(tr Troe) {
		tr.A = f.troeA(tr.T3, tr.T1, tr.T2)
		if c := f.cost(tr.Fcent); c < bestC {
			best, bestC = tr, c
		}
	}
	// On the trial grid the exponentials come from tables made once
	// (the same values and arithmetic as troeA, cost and Troe.Fcent, so
	// the same choice, at a ninth of the cost).
	var tab *fcentTables
	tryGrid := func(i, j, k int) {
		tr := Troe{T3: trials[i], T1: trials[j]}
		if k >= 0 {
			tr.T2, tr.HasT2 = trials[k], true
		}
		var c float64
		tr.A, c = tab.fit(f, i, j, k)
		if c < bestC {
			best, bestC = tr, c
		}
	}
	switch {
	case n == 3:
		tab = newFcentTables(f, trials)
		for i := range trials {
			for j := i; j < len(trials); j++ {
				tryGrid(i, j, -1)
			}
		}
	case n == 4 && base != nil:
		for _, t2 := range trials {
			try(Troe{T3: base.T3, T1: base.T1, T2: t2, HasT2: true})
		}
	case n == 4:
		tab = newFcentTables(f, trials)
		for i := range trials {
			for j := i; j < len(trials); j += 2 {
				for k := 0; k < len(trials); k += 2 {
					tryGrid(i, j, k)
				}
			}
		}
	}
	return best
}

// fcentTables holds exp(−T/t) (down) and exp(−t/T) (up) for every trial t
// and temperature T of a target, and the target's Fcent.
type fcentTables struct {
	down, up [][]float64
	fc       []float64
}

func newFcentTables(f *fcentTarget, trials []float64) *fcentTables {
	temps := f.temps
	t := &fcentTables{down: make([][]float64, len(trials)), up: make([][]float64, len(trials)), fc: make([]float64, len(temps))}
	for i, l := range f.lnF {
		t.fc[i] = math.Exp(l)
	}
	for k, tr := range trials {
		t.down[k], t.up[k] = make([]float64, len(temps)), make([]float64, len(temps))
		for i, T := range temps {
			t.down[k][i], t.up[k][i] = math.Exp(-T/tr), math.Exp(-tr/T)
		}
	}
	return t
}

// fit returns troeA and the cost of the Troe broadening with T3, T1 and
// (k ≥ 0) T2 the trials i, j and k, computed as troeA and cost compute
// them.
func (t *fcentTables) fit(f *fcentTarget, i, j, k int) (a, cost float64) {
	e3s, e1s := t.down[i], t.down[j]
	var e2s []float64
	if k >= 0 {
		e2s = t.up[k]
	}
	num, den := 0.0, 0.0
	for n := range f.temps {
		e3, e1 := e3s[n], e1s[n]
		e2 := 0.0
		if e2s != nil {
			e2 = e2s[n]
		}
		d := e1 - e3
		num += d * (t.fc[n] - e3 - e2)
		den += d * d
	}
	a = 0.5
	if den > 0 {
		a = math.Max(0, math.Min(1, num/den))
	}
	for n := range f.temps {
		v := (1-a)*e3s[n] + a*e1s[n]
		if e2s != nil {
			v += e2s[n]
		}
		if !(v > 0) {
			return a, math.Inf(1)
		}
		d := math.Log(v) - f.lnF[n]
		cost += d * d
	}
	return a, cost
}

// sri returns the three SRI parameters whose W(T) = a·exp(−b/T) +
// exp(−T/c) fits the target best over a coarse search: c on the trial
// grid, b over its range in steps of 500 K, a by least squares of
// Fcent − exp(−T/c) on exp(−b/T), kept in its range.
func (f *fcentTarget) sri() SRI {
	best, bestC := SRI{A: 0.5, B: 200, C: 300}, math.Inf(1)
	lo, hi := math.Exp(boundLnSa.lo), math.Exp(boundLnSa.hi)
	// The exponentials of the search from tables made once: the same
	// values in the same arithmetic as evaluating them in the loops.
	var bs []float64
	for b := boundSb.lo + 500; b < boundSb.hi; b += 500 {
		bs = append(bs, b)
	}
	ebs := make([][]float64, len(bs))
	for k, b := range bs {
		ebs[k] = make([]float64, len(f.temps))
		for i, T := range f.temps {
			ebs[k][i] = math.Exp(-b / T)
		}
	}
	fc := make([]float64, len(f.temps))
	for i, l := range f.lnF {
		fc[i] = math.Exp(l)
	}
	ec := make([]float64, len(f.temps))
	for _, c := range fcentTrials() {
		for i, T := range f.temps {
			ec[i] = math.Exp(-T / c)
		}
		for k, b := range bs {
			num, den := 0.0, 0.0
			for i := range f.temps {
				eb := ebs[k][i]
				num += eb * (fc[i] - ec[i])
				den += eb * eb
			}
			if !(den > 0) {
				continue
			}
			s := SRI{A: math.Max(lo*10, math.Min(hi/10, num/den)), B: b, C: c}
			if s.A <= lo*10 {
				continue // W would be exp(−T/c) alone: not an SRI start
			}
			w := func(T float64) float64 { return s.A*math.Exp(-s.B/T) + math.Exp(-T/s.C) }
			if cost := f.cost(w); cost < bestC {
				best, bestC = s, cost
			}
		}
	}
	return best
}

// centreStarts returns the starts of a held fit of kind from the target
// Fcent (see the comment at the top of this file), after the fit prev of
// the simpler kind before it on the ladder (nil if none):
//
//   - constant Fcent: the geometric mean of Fcent;
//   - three-parameter Troe: the coarse fit to Fcent, and from a constant
//     Fcent a (prev) A = a, T3 = 20 K, T1 = 5e4 K as ladderStarts;
//   - four-parameter Troe: prev with the best T2 of the coarse search,
//     the coarse fit of all four to Fcent, and ladderStarts' own;
//   - three-parameter SRI: the coarse fit to Fcent;
//   - five-parameter SRI: prev with d = 1, e = 0, and the coarse fit with
//     d = 1, e = 0.
func (f *fcentTarget) centreStarts(kind falloffKind, prev *FalloffResult) [][]float64 {
	var out [][]float64
	switch kind {
	case kindTroeConst:
		m := 0.0
		for _, l := range f.lnF {
			m += l
		}
		out = append(out, troeCoords(Troe{A: math.Exp(m / float64(len(f.lnF)))}, 1))
	case kindTroe3:
		out = append(out, troeCoords(f.troe(3, nil), 3))
		if prev != nil && prev.kind == kindTroeConst {
			out = append(out, troeCoords(Troe{A: prev.Troe.A, T3: 2 * broadTMin, T1: broadTMax / 2}, 3))
		}
	case kindTroe4:
		if prev != nil && prev.kind == kindTroe3 {
			out = append(out, troeCoords(f.troe(4, prev.Troe), 4))
		}
		out = append(out, troeCoords(f.troe(4, nil), 4))
		// T2 switches on a term the three-parameter fit lacked, and the
		// coarse fit to Fcent alone can settle in a poorer basin of the
		// whole table than the ladder's own (measured on the demo and the
		// recombination test file, where prev sits on a bound and the
		// ladder restarts from its spread): ladderStarts' are kept.
		out = append(out, ladderStarts(kindTroe4, prev)...)
	case kindSRI3:
		out = append(out, sriCoords(f.sri(), 3))
	case kindSRI5:
		extend := func(s SRI) []float64 {
			s.D, s.E = 1, 0
			return sriCoords(s, 5)
		}
		if prev != nil && prev.kind == kindSRI3 {
			out = append(out, extend(*prev.SRI))
		}
		out = append(out, extend(f.sri()))
	}
	return out
}
