package input

import (
	"fmt"
	"math"
	"slices"
	"sort"
	"strings"

	"github.com/falloff-kinetics/falloff/pkg/units"
	"go.yaml.in/yaml/v3"
)

// grid converts the temperature and pressure grid; tempPaths[i] is the path
// of the field that gives temps[i].
func (p *parser) grid(r *rawGrid) (temps []float64, tempPaths []string, pressures []float64, err error) {
	if r == nil {
		return nil, nil, nil, p.missing("grid", "give at least grid: {temperatures: {from: 300 K, to: 2500 K, points: 12}}")
	}
	if r.Temperatures == nil {
		return nil, nil, nil, p.missing("grid.temperatures", "write temperatures: {from: 300 K, to: 2500 K, points: 12} or {unit: K, values: [300, 400]}")
	}
	if temps, tempPaths, err = p.axis("grid.temperatures", r.Temperatures, units.Temperature); err != nil {
		return nil, nil, nil, err
	}
	if r.Pressures != nil {
		if pressures, _, err = p.axis("grid.pressures", r.Pressures, units.Pressure); err != nil {
			return nil, nil, nil, err
		}
	}
	return temps, tempPaths, pressures, nil
}

// axis converts a temperature or pressure axis, {from, to, points} or
// {unit, values}, into ascending values in the internal unit of d.
// Temperatures from a range are evenly spaced in 1/T, pressures in log P,
// the spacings in which rate constants vary most smoothly. paths[i] is the
// path of the field that gives the i-th value: from or to at the ends of a
// range, the range itself inside it, values[k] for a list.
func (p *parser) axis(path string, r *rawRange, d units.Dimension) (vals []float64, paths []string, err error) {
	shape := fmt.Sprintf("{from: %s, to: %s, points: 12} or {unit: %s, values: [...]}",
		map[units.Dimension]string{units.Temperature: "300 K", units.Pressure: "0.001 bar"}[d],
		map[units.Dimension]string{units.Temperature: "2500 K", units.Pressure: "1000 bar"}[d], d.Internal())
	isRange := given(&r.From) || given(&r.To) || given(&r.Points) || given(&r.Spacing)
	isList := given(&r.Unit) || given(&r.Values)
	switch {
	case isRange && isList:
		// Point at the list's key, the one that joined the range.
		kp, n := path+".unit", &r.Unit
		if !given(n) {
			kp, n = path+".values", &r.Values
		}
		return nil, nil, p.errAt(kp, n, problemf("mixes {from, to, points} with {unit, values}"), "use one form: "+shape)
	case isList:
		return p.axisList(path, r, d)
	case !isRange:
		return nil, nil, p.errAt(path, nil, problemf("empty"), "write "+shape)
	}

	positive := func(key string, n *yaml.Node) (float64, error) {
		kp := path + "." + key
		if !given(n) {
			return 0, p.missing(kp, "write "+shape)
		}
		x, err := p.quantity(kp, n, d)
		if err != nil {
			return 0, err
		}
		if !(x > 0) {
			return 0, p.errAt(kp, n, problemf("a %s must be positive", d), positiveHint(d))
		}
		if err := axisLimit(d).check(p, kp, n, x); err != nil {
			return 0, err
		}
		return x, nil
	}
	from, err := positive("from", &r.From)
	if err != nil {
		return nil, nil, err
	}
	to, err := positive("to", &r.To)
	if err != nil {
		return nil, nil, err
	}
	pp := path + ".points"
	if !given(&r.Points) {
		return nil, nil, p.missing(pp, "give the number of points, e.g. points: 12")
	}
	n, err := p.integer(pp, &r.Points)
	if err != nil {
		return nil, nil, err
	}
	switch {
	case n < 1:
		return nil, nil, p.errAt(pp, &r.Points, problemf("must be at least 1"), "give 2 or more points, or 1 with from equal to to")
	case from > to:
		return nil, nil, p.errAt(path+".from", &r.From, problemf("above to (%s)", r.To.Value), "from is the low end of the range: swap them")
	case from == to && n > 1:
		return nil, nil, p.errAt(pp, &r.Points, problemf("%d points between equal ends", n), "use points: 1, or widen the range")
	case from < to && n == 1:
		return nil, nil, p.errAt(pp, &r.Points, problemf("one point cannot span from %s to %s", r.From.Value, r.To.Value),
			"give 2 or more points, or make from equal to to")
	}
	// spacing: even (the default) or chebyshev, the Chebyshev–Gauss–Lobatto
	// nodes x = mid + half·cos(iπ/(n−1)) of the same reduced coordinate,
	// ends included: the points on which a Chebyshev fit of that order
	// interpolates best (Trefethen, Approximation Theory and Approximation
	// Practice, SIAM 2013, ch. 2 and 15).
	cheb := false
	if given(&r.Spacing) {
		sp, err := p.name(path+".spacing", &r.Spacing)
		if err != nil {
			return nil, nil, err
		}
		switch sp {
		case "even":
		case "chebyshev":
			cheb = true
		default:
			hint := "use even (evenly in 1/T or log P, the default) or chebyshev (Chebyshev nodes, for a Chebyshev fit)"
			if c := closest(sp, []string{"even", "chebyshev"}, nil); c != "" {
				hint = "did you mean " + c + "? " + hint
			}
			return nil, nil, p.errAt(path+".spacing", &r.Spacing, problemf("unknown spacing"), hint)
		}
	}
	if n == 1 {
		return []float64{from}, []string{path + ".from"}, nil
	}

	// x is 1/T or ln P; the ends are set exactly, not recomputed.
	fwd, inv := func(v float64) float64 { return 1 / v }, func(x float64) float64 { return 1 / x }
	if d == units.Pressure {
		fwd, inv = math.Log, math.Exp
	}
	x0, x1 := fwd(from), fwd(to)
	out := make([]float64, n)
	paths = make([]string, n)
	for i := range out {
		f := float64(i) / float64(n-1)
		if cheb {
			f = (1 - math.Cos(math.Pi*f)) / 2
		}
		out[i] = inv(x0 + (x1-x0)*f)
		paths[i] = path
	}
	out[0], out[n-1] = from, to
	paths[0], paths[n-1] = path+".from", path+".to"
	// Ends only ulps apart, or a 1/T beyond the float64 range, leave the
	// points not distinct or not numbers.
	for i := 1; i < n; i++ {
		if !(out[i] > out[i-1]) {
			return nil, nil, p.errAt(pp, &r.Points, problemf("%d points cannot be spaced apart between %s and %s", n, r.From.Value, r.To.Value),
				"use fewer points or a wider range, or list the values: "+shape)
		}
	}
	return out, paths, nil
}

// axisLimit is the physical range of a grid value of dimension d.
func axisLimit(d units.Dimension) limit {
	if d == units.Temperature {
		return temperatureLimit
	}
	return pressureLimit
}

func positiveHint(d units.Dimension) string {
	if d == units.Temperature {
		return "temperatures are absolute, in K"
	}
	return "pressures are absolute, e.g. 1 atm; the grid is spaced in log P"
}

// axisList converts {unit, values} into sorted values and the path of each;
// duplicates are an error.
func (p *parser) axisList(path string, r *rawRange, d units.Dimension) ([]float64, []string, error) {
	xs, nodes, err := p.list(path, &rawList{Unit: r.Unit, Values: r.Values}, d)
	if err != nil {
		return nil, nil, err
	}
	order := make([]int, len(xs))
	for i := range order {
		order[i] = i
		if !(xs[i] > 0) {
			return nil, nil, p.errAt(fmt.Sprintf("%s.values[%d]", path, i), nodes[i], problemf("a %s must be positive", d), positiveHint(d))
		}
		if err := axisLimit(d).check(p, fmt.Sprintf("%s.values[%d]", path, i), nodes[i], xs[i]); err != nil {
			return nil, nil, err
		}
	}
	sort.SliceStable(order, func(a, b int) bool { return xs[order[a]] < xs[order[b]] })
	out := make([]float64, len(xs))
	paths := make([]string, len(xs))
	for k, i := range order {
		out[k] = xs[i]
		paths[k] = fmt.Sprintf("%s.values[%d]", path, i)
		if k > 0 && out[k] == out[k-1] {
			later := max(i, order[k-1])
			return nil, nil, p.errAt(fmt.Sprintf("%s.values[%d]", path, later), nodes[later],
				problemf("given twice (also values[%d])", min(i, order[k-1])), "delete one of them")
		}
	}
	return out, paths, nil
}

// fitNames are the fitted forms pkg/fit provides; all but arrhenius describe
// pressure dependence.
var fitNames = []string{"arrhenius", "lindemann", "troe", "sri", "plog", "chebyshev"}

// fits converts the list of fits.
func (p *parser) fits(n *yaml.Node) ([]string, error) {
	if !given(n) {
		return nil, nil
	}
	known := "the fits are: " + strings.Join(fitNames, ", ")
	if n.Kind != yaml.SequenceNode {
		return nil, p.errAt("fits", n, problemf("expected a list of fit names, found %s", kindName(n)), "write fits: [troe, plog]; "+known)
	}
	var out []string
	for i, c := range n.Content {
		fp := fmt.Sprintf("fits[%d]", i)
		name, err := p.name(fp, c)
		if err != nil {
			return nil, err
		}
		if !slices.Contains(fitNames, name) {
			hint := known
			if s := closest(name, fitNames, nil); s != "" {
				hint = "did you mean " + s + "? " + known
			}
			return nil, p.errAt(fp, c, problemf("unknown fit"), hint)
		}
		if j := slices.Index(out, name); j >= 0 {
			return nil, p.errAt(fp, c, problemf("listed twice (also fits[%d])", j), "delete one of them")
		}
		out = append(out, name)
	}
	return out, nil
}

// energyGrid converts the energy-grid section, filling in defaults.
func (p *parser) energyGrid(r *rawEnergyGrid) (EnergyGrid, error) {
	g := EnergyGrid{Fine: DefaultFineGrain, Grain: DefaultGrain}
	if r == nil {
		return g, nil
	}
	var err error
	read := func(key string, n *yaml.Node, dst *float64) error {
		if !given(n) {
			return nil
		}
		kp := "energy-grid." + key
		if *dst, err = p.quantity(kp, n, units.Energy); err != nil {
			return err
		}
		if !(*dst > 0) {
			return p.errAt(kp, n, problemf("must be positive"), "")
		}
		return nil
	}
	if err := read("fine-grain", &r.FineGrain, &g.Fine); err != nil {
		return g, err
	}
	if err := read("grain", &r.Grain, &g.Grain); err != nil {
		return g, err
	}
	if err := read("master-equation-grain", &r.MEGrain, &g.MEGrain); err != nil {
		return g, err
	}
	if given(&r.MEGrain) && g.MEGrain < g.Fine {
		return g, p.errAt("energy-grid.master-equation-grain", &r.MEGrain,
			problemf("grain %s cm-1 is smaller than fine-grain %s cm-1", fmtCm1(g.MEGrain), fmtCm1(g.Fine)),
			"the master-equation grain must be at least the fine counting grain")
	}
	if err := read("ceiling", &r.Ceiling, &g.Ceiling); err != nil {
		return g, err
	}
	if g.Grain < g.Fine {
		n := &r.Grain
		path := "energy-grid.grain"
		if !given(n) {
			n, path = &r.FineGrain, "energy-grid.fine-grain"
		}
		return g, p.errAt(path, n, problemf("grain %s cm-1 is smaller than fine-grain %s cm-1", fmtCm1(g.Grain), fmtCm1(g.Fine)),
			"the reporting grain must be at least the fine counting grain")
	}
	return g, nil
}

// fmtCm1 formats an energy in cm⁻¹ for messages.
func fmtCm1(x float64) string { return fmt.Sprintf("%.6g", x) }
