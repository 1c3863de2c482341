package fit

import (
	"fmt"
	"math"
	"slices"
)

// Point is one rate coefficient of a table.
type Point struct {
	T     float64 // K
	P     float64 // Pa
	K     float64 // k units
	Sigma float64 // relative standard uncertainty of K (0.05 = 5 %); 0 = none
}

// Table is a set of rate coefficients k(T,P) in one unit. It need not be a
// full grid, but the falloff, PLOG and Chebyshev fits want several pressures
// at each of several temperatures.
type Table struct {
	Name   string // where the table came from (a file name), for messages
	KUnits string // units of K as written, e.g. "s-1" or "cm3/mol/s"
	Points []Point
}

// FromGrid returns the table of the grid k[iT][iP] at temps[iT] K and
// pressures[iP] Pa, as the master equation produces it. It panics if the
// lengths do not match; the values are checked by the fits.
func FromGrid(temps, pressures []float64, k [][]float64, kUnits string) *Table {
	if len(k) != len(temps) {
		panic(fmt.Sprintf("fit: FromGrid: %d rows of k for %d temperatures", len(k), len(temps)))
	}
	t := &Table{KUnits: kUnits, Points: make([]Point, 0, len(temps)*len(pressures))}
	for i, T := range temps {
		if len(k[i]) != len(pressures) {
			panic(fmt.Sprintf("fit: FromGrid: row %d of k has %d values for %d pressures", i, len(k[i]), len(pressures)))
		}
		for j, P := range pressures {
			t.Points = append(t.Points, Point{T: T, P: P, K: k[i][j]})
		}
	}
	return t
}

// distinctRelTol is the relative difference below which two temperatures
// or pressures count as the same grid value.
const distinctRelTol = 1e-9

// distinct returns the sorted distinct values of v (within distinctRelTol).
func distinct(v []float64) []float64 {
	s := slices.Clone(v)
	slices.Sort(s)
	out := s[:0]
	for _, x := range s {
		if len(out) > 0 && math.Abs(x-out[len(out)-1]) <= distinctRelTol*math.Abs(x) {
			continue
		}
		out = append(out, x)
	}
	return slices.Clip(out)
}

// Temperatures returns the distinct temperatures of the table in K, ascending.
func (t *Table) Temperatures() []float64 {
	v := make([]float64, len(t.Points))
	for i, p := range t.Points {
		v[i] = p.T
	}
	return distinct(v)
}

// Pressures returns the distinct pressures of the table in Pa, ascending.
func (t *Table) Pressures() []float64 {
	v := make([]float64, len(t.Points))
	for i, p := range t.Points {
		v[i] = p.P
	}
	return distinct(v)
}

// index returns the position of x in the sorted distinct values d.
func index(d []float64, x float64) int {
	i, _ := slices.BinarySearchFunc(d, x, func(a, b float64) int {
		switch {
		case math.Abs(a-b) <= distinctRelTol*math.Abs(b):
			return 0
		case a < b:
			return -1
		}
		return 1
	})
	return i
}

// Weighted reports whether the points carry uncertainties (all of them do).
func (t *Table) Weighted() bool { return len(t.Points) > 0 && t.Points[0].Sigma > 0 }

// name returns the table's name for messages.
func (t *Table) name() string {
	if t.Name == "" {
		return "table"
	}
	return t.Name
}

// Validate checks that every value is finite and positive and that
// uncertainties are given for all points or none. A (T,P) point may appear
// more than once: replicate measurements, which the fits treat as separate
// data. Every fit calls it; the errors wrap ErrBadData.
func (t *Table) Validate() error {
	if len(t.Points) == 0 {
		return fmt.Errorf("%w: %s has no points", ErrTooFewData, t.name())
	}
	w := t.Points[0].Sigma > 0
	for i, p := range t.Points {
		at := fmt.Sprintf("%s: point %d (T = %g K, P = %g Pa)", t.name(), i+1, p.T, p.P)
		switch {
		case !(p.T > 0) || math.IsInf(p.T, 0):
			return fmt.Errorf("%w: %s: T must be positive and finite", ErrBadData, at)
		case !(p.P > 0) || math.IsInf(p.P, 0):
			return fmt.Errorf("%w: %s: P must be positive and finite", ErrBadData, at)
		case math.IsNaN(p.K) || math.IsInf(p.K, 0):
			return fmt.Errorf("%w: %s: k = %g is not finite", ErrBadData, at, p.K)
		case p.K <= 0:
			return fmt.Errorf("%w: %s: k = %g is not positive (fits work in log k)", ErrBadData, at, p.K)
		case p.Sigma < 0 || math.IsNaN(p.Sigma) || math.IsInf(p.Sigma, 0):
			return fmt.Errorf("%w: %s: sigma = %g must be finite and ≥ 0", ErrBadData, at, p.Sigma)
		case (p.Sigma > 0) != w:
			return fmt.Errorf("%w: %s: uncertainties are given for some points but not all", ErrBadData, at)
		}
	}
	return nil
}

// sites returns the number of distinct (T, P) points of the table:
// replicates count once, since they add no information on the shape of
// k(T, P) that a fitted coefficient could use.
func (t *Table) sites() int {
	type key struct{ T, P float64 }
	seen := make(map[key]bool, len(t.Points))
	temps, press := t.Temperatures(), t.Pressures()
	for _, p := range t.Points {
		seen[key{temps[index(temps, p.T)], press[index(press, p.P)]}] = true
	}
	return len(seen)
}

// weights returns the least-squares weights 1/σ of the points in log k
// (a relative uncertainty σ of k is an absolute one of ln k), or all ones.
func (t *Table) weights() []float64 {
	w := make([]float64, len(t.Points))
	for i, p := range t.Points {
		w[i] = 1
		if p.Sigma > 0 {
			w[i] = 1 / p.Sigma
		}
	}
	return w
}

// extent returns the T range in K and P range in Pa of the table.
func (t *Table) extent() (tr, pr [2]float64) {
	tr = [2]float64{math.Inf(1), math.Inf(-1)}
	pr = tr
	for _, p := range t.Points {
		tr[0], tr[1] = math.Min(tr[0], p.T), math.Max(tr[1], p.T)
		pr[0], pr[1] = math.Min(pr[0], p.P), math.Max(pr[1], p.P)
	}
	return tr, pr
}
