package figures

import (
	"fmt"
	"math"
	"strconv"
	"strings"
	"sync"

	"github.com/falloff-kinetics/falloff/pkg/fit"
	"github.com/falloff-kinetics/falloff/pkg/job"
	"github.com/falloff-kinetics/falloff/pkg/plots"
	"github.com/falloff-kinetics/falloff/pkg/units"
)

// Rules of the figures.
const (
	// MaxPlotPressures is the most pressures k-vs-T.svg shows: more
	// curves than colours the eye tells apart on one axis would hide
	// each other.
	MaxPlotPressures = 5
	// MicroAboveKT: micro.svg shows k(E) up to E0 + MicroAboveKT·kT at the
	// highest temperature of the grid. The thermal population there is
	// e^−30 ≈ 1e-13 of that at E0 — nothing at any grid temperature
	// depends on k(E) above it; the master equation's own ceiling is
	// E0 + 30–40 kT (docs/design.md §4).
	MicroAboveKT = 30
	// microFluxFloor: with tunnelling, micro.svg starts below E0 where the
	// reactive flux k(E)·ρ(E)·e^(−E/kT) at the lowest grid temperature
	// (where tunnelling reaches deepest) rises above this fraction of its
	// peak; energies below add less than a millionth to any thermal rate.
	// Common practice, no source.
	microFluxFloor = 1e-6
	// fitCurvePoints is the number of points a fitted curve is drawn
	// with: smooth at 16 cm.
	fitCurvePoints = 80
)

// The figure files a rates run writes under --plots.
const (
	FalloffPlot   = "falloff.svg"
	LimitsPlot    = "arrhenius.svg"
	KvsTPlot      = "k-vs-T.svg"
	KvsPPlot      = "k-vs-P.svg"
	ResidualsPlot = "residuals.svg"
	FcentPlot     = "fcent.svg"
	MicroPlot     = "micro.svg"
	DensityPlot   = "density.svg"
)

// Rates renders the figures of a rates run:
//
//   - falloff.svg: k/k∞ against P at the temperatures asked for (temps in
//     K, each shown at the nearest grid temperature; none: the lowest,
//     middle and highest), computed points and the recommended fit;
//   - arrhenius.svg: two panels, k∞ and k0 against 1000/T, each in its own
//     unit, with the fitted falloff form's limits;
//   - k-vs-T.svg: k against 1000/T at up to MaxPlotPressures pressures,
//     computed points and the recommended fit;
//   - residuals.svg: 100·(k_fit/k − 1) of the recommended fit over the grid;
//   - fcent.svg: Fcent(T) of the master equation, and of the Troe fit if
//     there is one;
//   - micro.svg and density.svg: k(E) of the main channel (from the
//     threshold, or below it with tunnelling, to E0 + MicroAboveKT·kT at
//     the highest temperature, or the master equation's ceiling if lower)
//     and the reactant's ρ(E), when the channel has a transition state;
//     on the grains the master equation used (res.Spectrum), else, with
//     an adiabatic J treatment, counted on the reporting grains.
//
// A temperature outside the grid is an error (a *job.OptionError on
// --plot-temperatures).
func Rates(n *job.Network, res *job.RatesResult, d Units, temps []float64) ([]job.File, error) {
	its, err := TemperatureIndices(res.Temperatures, temps)
	if err != nil {
		return nil, err
	}
	// The figures are laid out here and drawn together at the end, each on
	// a goroutine of its own, into files in this order.
	type pending struct {
		name string
		svg  func() ([]byte, error)
	}
	var todo []pending
	save := func(name string, svg func() ([]byte, error)) error {
		todo = append(todo, pending{name, svg})
		return nil
	}
	draw := func() ([]job.File, error) {
		files := make([]job.File, len(todo))
		errs := make([]error, len(todo))
		var wg sync.WaitGroup
		for i, f := range todo {
			wg.Go(func() {
				b, err := f.svg()
				files[i], errs[i] = job.File{Name: f.name, Data: b}, err
			})
		}
		wg.Wait()
		for i, err := range errs {
			if err != nil {
				return nil, &job.NumericalError{Err: fmt.Errorf("%s: %w", todo[i].name, err)}
			}
		}
		return files, nil
	}
	form, formName := PlotForm(res.Fits)
	kp := res.KPowers()
	ps := make([]float64, len(res.Pressures))
	for j, p := range res.Pressures {
		ps[j] = d.P(p)
	}

	fall := plots.Figure{Title: "Falloff curves", XLabel: "P / " + d.Pressure, YLabel: "k / k∞", LogX: true, LogY: true}
	for g, it := range its {
		t, kInf := res.Temperatures[it], res.KInfIntegrated[it]
		y := make([]float64, len(ps))
		for j := range ps {
			y[j] = res.K[it][j] / kInf
		}
		fall.Series = append(fall.Series, plots.Series{Name: num(t) + " K, master equation", X: ps, Y: y, Points: true, Group: g + 1})
		if form != nil {
			fx := logSpace(ps[0], ps[len(ps)-1], fitCurvePoints)
			fy := make([]float64, len(fx))
			for i, x := range fx {
				fy[i] = form.Eval(t, x*d.PaPerUnit) / kInf
			}
			fall.Series = append(fall.Series, plots.Series{Name: num(t) + " K, " + formName, X: fx, Y: fy, Group: g + 1})
		}
	}
	if err := save(FalloffPlot, fall.SVG); err != nil {
		return nil, err
	}

	if err := save(LimitsPlot, func() ([]byte, error) { return plots.Panels(limitFigures(res, d)...) }); err != nil {
		return nil, err
	}

	tab := fit.FromGrid(res.Temperatures, res.Pressures, res.K, res.KUnits)
	kT := kvsTFigure(tab, form, formName, "master equation", d.PaPerUnit, d.Pressure,
		func(k float64) float64 { return d.Rate(k, kp) }, d.RateUnit(kp))
	if err := save(KvsTPlot, kT.SVG); err != nil {
		return nil, err
	}
	if form != nil {
		m := residualFigure(tab, form, formName, "master equation", d.PaPerUnit, d.Pressure)
		if err := save(ResidualsPlot, m.SVG); err != nil {
			return nil, err
		}
	}
	if err := save(FcentPlot, fcentFigure(res).SVG); err != nil {
		return nil, err
	}

	if n.Main().TS == nil {
		return draw() // k(E) and ρ(E) plots need a transition state (see micro)
	}
	var mc job.MicroChannel
	var name string
	var energies, density []float64
	if sp := res.Spectrum; sp != nil {
		// The master equation's own grains: no state is counted again.
		mc = job.MicroChannel{Name: sp.Channel, E0: sp.E0, Grain: sp.Grain, Energies: sp.Energies, K: sp.K}
		name, energies, density = sp.Species, sp.Energies, sp.Density
	} else {
		counts, err := n.Count(job.ReportGrid{})
		if err != nil {
			return nil, err
		}
		mi, err := counts.Micro()
		if err != nil {
			return nil, err
		}
		mc = mi.Channels[0]
		name, energies, density = counts.ReactantDensity()
	}
	if err := save(MicroPlot, microFigure(mc, energies, density, res.Temperatures).SVG); err != nil {
		return nil, err
	}
	save(DensityPlot, plots.Figure{Title: "Density of states", XLabel: "E / cm-1", YLabel: "ρ(E) / states per cm-1", LogY: true,
		Series: []plots.Series{{Name: name, X: energies, Y: density}}}.SVG)
	return draw()
}

// TemperatureIndices returns the indices in grid of the temperatures
// to plot: for each of want (K), the grid temperature nearest in 1/T,
// without repeats; with want empty, the lowest, middle and highest. A
// temperature outside the grid's range is a usage error.
func TemperatureIndices(grid, want []float64) ([]int, error) {
	if len(want) == 0 {
		return DefaultTemperatures(len(grid)), nil
	}
	lo, hi := math.Inf(1), math.Inf(-1)
	for _, t := range grid {
		lo, hi = math.Min(lo, t), math.Max(hi, t)
	}
	var idx []int
	seen := map[int]bool{}
	for _, t := range want {
		// The slack lets "300 K" select a grid point at 300 K computed
		// from a range in other units.
		if t < lo*(1-1e-9) || t > hi*(1+1e-9) {
			return nil, &job.OptionError{Option: "--plot-temperatures", Err: fmt.Errorf("%s K is outside the grid's temperatures, %s–%s K", num(t), num(lo), num(hi)),
				Hint: "give temperatures within the grid"}
		}
		best := 0
		for i, g := range grid {
			if math.Abs(1/g-1/t) < math.Abs(1/grid[best]-1/t) {
				best = i
			}
		}
		if !seen[best] {
			seen[best] = true
			idx = append(idx, best)
		}
	}
	return idx, nil
}

// PlotForm returns the form the figures draw: the recommended one, or,
// when none meets the tolerance, the one with the smallest largest error
// (named so); nil if nothing was fitted.
func PlotForm(res *fit.Results) (fit.Form, string) {
	if res == nil {
		return nil, ""
	}
	if f := res.Form(res.Recommended); f != nil {
		return f, string(res.Recommended) + " fit"
	}
	best, bestErr := fit.FormName(""), math.Inf(1)
	for name, r := range res.Reports() {
		if r.MaxErrorPct < bestErr || (r.MaxErrorPct == bestErr && name < best) {
			best, bestErr = name, r.MaxErrorPct
		}
	}
	if best == "" {
		return nil, ""
	}
	return res.Form(best), string(best) + " fit (above tolerance)"
}

// FalloffForm returns the falloff form whose k0 and k∞ the limits panels
// draw: the recommended one if it is a falloff form, else Troe, Lindemann
// or SRI, whichever was fitted first; nil if none.
func FalloffForm(res *fit.Results) (*fit.Falloff, string) {
	if res == nil {
		return nil, ""
	}
	for _, name := range []fit.FormName{res.Recommended, fit.FormTroe, fit.FormLindemann, fit.FormSRI} {
		if f, ok := res.Form(name).(*fit.Falloff); ok && f != nil {
			return f, string(name)
		}
	}
	return nil, ""
}

// limitFigures returns the panels of arrhenius.svg: k∞ and k0 against
// 1000/T, each with its unit, the computed points and the falloff fit's
// modified Arrhenius limits.
func limitFigures(res *job.RatesResult, d Units) []plots.Figure {
	inv := make([]float64, len(res.Temperatures))
	kInf, k0 := make([]float64, len(inv)), make([]float64, len(inv))
	for i, t := range res.Temperatures {
		inv[i] = 1000 / t
		kInf[i], k0[i] = d.Rate(res.KInfIntegrated[i], res.KPowers()), d.Rate(res.K0[i], res.K0Powers())
	}
	high := plots.Figure{Title: "High-pressure limit", XLabel: "1000 K / T", YLabel: "k∞ / " + d.RateUnit(res.KPowers()), LogY: true, LegendTop: true,
		Series: []plots.Series{{Name: "k∞, master equation", X: inv, Y: kInf, Points: true, Group: 1}}}
	low := plots.Figure{Title: "Low-pressure limit", XLabel: "1000 K / T", YLabel: "k0 / " + d.RateUnit(res.K0Powers()), LogY: true, LegendTop: true,
		Series: []plots.Series{{Name: "k0, master equation", X: inv, Y: k0, Points: true, Group: 2}}}
	if f, name := FalloffForm(res.Fits); f != nil {
		tx := invSpace(res.Temperatures, fitCurvePoints)
		fx, hy, ly := make([]float64, len(tx)), make([]float64, len(tx)), make([]float64, len(tx))
		for i, t := range tx {
			fx[i] = 1000 / t
			hy[i], ly[i] = d.Rate(f.High.At(t), res.KPowers()), d.Rate(f.Low.At(t), res.K0Powers())
		}
		high.Series = append(high.Series, plots.Series{Name: "k∞, " + name + " fit", X: fx, Y: hy, Group: 1})
		low.Series = append(low.Series, plots.Series{Name: "k0, " + name + " fit", X: fx, Y: ly, Group: 2})
	}
	return []plots.Figure{high, low}
}

// kvsTFigure draws k against 1000/T at up to MaxPlotPressures of the
// table's pressures: the table's points (named source) and form's curves.
// paPerUnit and pUnit give the pressures' display unit, kDisplay and
// kUnit k's.
func kvsTFigure(tab *fit.Table, form fit.Evaluator, formName, source string, paPerUnit float64, pUnit string,
	kDisplay func(float64) float64, kUnit string) plots.Figure {
	f := plots.Figure{Title: "Rate constant against temperature", XLabel: "1000 K / T", YLabel: "k / " + kUnit, LogY: true}
	temps, pressures := tab.Temperatures(), tab.Pressures()
	for g, jp := range spread(len(pressures), MaxPlotPressures) {
		p := pressures[jp]
		name := plotNum(p/paPerUnit) + " " + pUnit
		var x, y []float64
		for _, pt := range tab.Points {
			if sameValue(pt.P, p) {
				x, y = append(x, 1000/pt.T), append(y, kDisplay(pt.K))
			}
		}
		f.Series = append(f.Series, plots.Series{Name: name, X: x, Y: y, Points: true, Group: g + 1})
		if form != nil {
			var fx, fy []float64
			for _, t := range invSpace(temps, fitCurvePoints) {
				fx, fy = append(fx, 1000/t), append(fy, kDisplay(form.Eval(t, p)))
			}
			f.Series = append(f.Series, plots.Series{Name: name, X: fx, Y: fy, Group: g + 1})
		}
	}
	f.Key = []plots.Series{{Name: source, Points: true}}
	if form != nil {
		f.Key = append(f.Key, plots.Series{Name: formName})
	}
	return f
}

// kvsPFigure draws k against P at up to MaxPlotPressures of the table's
// temperatures (the indices its), as kvsTFigure does against 1000/T.
func kvsPFigure(tab *fit.Table, its []int, form fit.Evaluator, formName, source string, paPerUnit float64, pUnit string,
	kDisplay func(float64) float64, kUnit string) plots.Figure {
	f := plots.Figure{Title: "Rate constant against pressure", XLabel: "P / " + pUnit, YLabel: "k / " + kUnit, LogX: true, LogY: true}
	temps, pressures := tab.Temperatures(), tab.Pressures()
	for g, it := range its {
		t := temps[it]
		name := plotNum(t) + " K"
		var x, y []float64
		for _, pt := range tab.Points {
			if sameValue(pt.T, t) {
				x, y = append(x, pt.P/paPerUnit), append(y, kDisplay(pt.K))
			}
		}
		f.Series = append(f.Series, plots.Series{Name: name, X: x, Y: y, Points: true, Group: g + 1})
		if form != nil {
			var fx, fy []float64
			for _, p := range logSpace(pressures[0], pressures[len(pressures)-1], fitCurvePoints) {
				fx, fy = append(fx, p/paPerUnit), append(fy, kDisplay(form.Eval(t, p)))
			}
			f.Series = append(f.Series, plots.Series{Name: name, X: fx, Y: fy, Group: g + 1})
		}
	}
	f.Key = []plots.Series{{Name: source, Points: true}}
	if form != nil {
		f.Key = append(f.Key, plots.Series{Name: formName})
	}
	return f
}

// residuals returns the deviation of form from the table in per cent,
// 100·(k_fit/k − 1), on the grid of the table's distinct temperatures (K)
// and pressures (Pa): z[iP][iT], NaN where the table has no point.
func residuals(tab *fit.Table, form fit.Evaluator) (temps, pressures []float64, z [][]float64) {
	temps, pressures = tab.Temperatures(), tab.Pressures()
	z = make([][]float64, len(pressures))
	for j := range z {
		z[j] = make([]float64, len(temps))
		for i := range z[j] {
			z[j][i] = math.NaN()
		}
	}
	for _, pt := range tab.Points {
		i, j := nearest(temps, pt.T), nearest(pressures, pt.P)
		z[j][i] = 100 * (form.Eval(pt.T, pt.P)/pt.K - 1)
	}
	return temps, pressures, z
}

// residualFigure maps residuals over T and P, a cell per point of the
// table.
func residualFigure(tab *fit.Table, form fit.Evaluator, formName, source string, paPerUnit float64, pUnit string) plots.Map {
	temps, pressures, z := residuals(tab, form)
	y := make([]float64, len(pressures))
	for j, p := range pressures {
		y[j] = p / paPerUnit
	}
	return plots.Map{Title: "Deviation of the " + formName + " from the " + source, XLabel: "T / K", YLabel: "P / " + pUnit,
		ZLabel: "(k_fit − k)/k / %", X: temps, Y: y, Z: z, Diverging: true, Annotate: true}
}

// fcentFigure draws Fcent(T) of the master equation (k/(k∞/2) at Pr = 1)
// and, if there is a Troe fit, its Fcent(T) (Gilbert, Luther & Troe 1983).
func fcentFigure(res *job.RatesResult) plots.Figure {
	f := plots.Figure{Title: "Broadening at the centre of the falloff curve", XLabel: "T / K", YLabel: "Fcent", YMin: 0, YMax: 1,
		Series: []plots.Series{{Name: "master equation", X: res.Temperatures, Y: res.Fcent, Points: true, Group: 1}}}
	if res.Fits != nil && res.Fits.Troe != nil && res.Fits.Troe.Troe != nil {
		tr := res.Fits.Troe.Troe
		lo, hi := minMax(res.Temperatures)
		var x, y []float64
		for i := range fitCurvePoints {
			t := lo + (hi-lo)*float64(i)/(fitCurvePoints-1)
			x, y = append(x, t), append(y, tr.Fcent(t))
		}
		f.Series = append(f.Series, plots.Series{Name: "troe fit", X: x, Y: y, Group: 1})
	}
	return f
}

// microFigure draws k(E) of channel mc over the energies that matter
// (see MicroAboveKT, microFluxFloor); energies and density are the
// reactant's ρ(E) on the same grains, temps the grid temperatures.
func microFigure(mc job.MicroChannel, energies, density, temps []float64) plots.Figure {
	lo, hi := microRange(mc, energies, density, temps)
	if len(mc.KJ) > 0 {
		// Adiabatic J: k(E, J) at the reported J on the active energy.
		f := plots.Figure{Title: "RRKM k(E, J)", XLabel: "active energy E / cm-1", YLabel: "k(E, J) / s-1", LogY: true}
		for j, kj := range mc.KJ {
			var e, k []float64
			for i, x := range kj {
				if x > 0 && mc.Energies[i] >= lo && mc.Energies[i] <= hi {
					e, k = append(e, mc.Energies[i]), append(k, x)
				}
			}
			f.Series = append(f.Series, plots.Series{Name: fmt.Sprintf("J = %d", mc.J[j]), X: e, Y: k, Group: j + 1})
		}
		return f
	}
	var e, k []float64
	for i, x := range mc.K {
		if x > 0 && mc.Energies[i] >= lo && mc.Energies[i] <= hi {
			e, k = append(e, mc.Energies[i]), append(k, x)
		}
	}
	f := plots.Figure{Title: "RRKM k(E)", XLabel: "E / cm-1", YLabel: "k(E) / s-1", LogY: true,
		Series: []plots.Series{{Name: mc.Name, X: e, Y: k, Group: 1}}}
	if len(e) > 0 && e[0] <= mc.E0-mc.Grain {
		// Tunnelling (k > 0 below the grain of E0): mark the threshold
		// the curve passes through.
		kmin, kmax := minMax(k)
		f.Series = append(f.Series, plots.Series{Name: "E0 = " + numE(mc.E0) + " cm-1", X: []float64{mc.E0, mc.E0}, Y: []float64{kmin, kmax}, Dash: 2, Group: 2})
	}
	return f
}

// microRange returns the energies (cm⁻¹) micro.svg shows: from the first
// grain with k(E) > 0, or with tunnelling from where the reactive flux at
// the lowest temperature reaches microFluxFloor of its peak, to E0 +
// MicroAboveKT·kT at the highest temperature.
func microRange(mc job.MicroChannel, energies, density, temps []float64) (lo, hi float64) {
	tLo, tHi := minMax(temps)
	hi = mc.E0 + MicroAboveKT*units.KT(tHi)
	first := -1
	for i, k := range mc.K {
		if k > 0 {
			first = i
			break
		}
	}
	if first < 0 {
		return mc.E0, hi
	}
	lo = mc.Energies[first]
	if lo > mc.E0-mc.Grain || len(density) != len(mc.K) {
		// No tunnelling: k(E) starts in the grain of E0.
		return lo, hi
	}
	// ln of the flux, relative to E0 to stay in range.
	kT := units.KT(tLo)
	lf := make([]float64, len(mc.K))
	peak := math.Inf(-1)
	for i, k := range mc.K {
		lf[i] = math.Inf(-1)
		if k > 0 && density[i] > 0 && energies[i] <= hi {
			lf[i] = math.Log(k) + math.Log(density[i]) - (energies[i]-mc.E0)/kT
			peak = math.Max(peak, lf[i])
		}
	}
	for i, l := range lf {
		if l >= peak+math.Log(microFluxFloor) {
			return math.Min(energies[i], mc.E0), hi
		}
	}
	return lo, hi
}

// spread returns up to m indices of n evenly spread from the first to the
// last.
func spread(n, m int) []int {
	if n <= m {
		idx := make([]int, n)
		for i := range idx {
			idx[i] = i
		}
		return idx
	}
	idx := make([]int, m)
	for i := range idx {
		idx[i] = int(math.Round(float64(i) * float64(n-1) / float64(m-1)))
	}
	return idx
}

// logSpace returns n values from a to b evenly spaced in log.
func logSpace(a, b float64, n int) []float64 {
	out := make([]float64, n)
	for i := range out {
		out[i] = a * math.Pow(b/a, float64(i)/float64(n-1))
	}
	out[n-1] = b
	return out
}

// invSpace returns n temperatures over the range of temps evenly spaced in
// 1/T.
func invSpace(temps []float64, n int) []float64 {
	lo, hi := minMax(temps)
	out := make([]float64, n)
	for i := range out {
		out[i] = 1 / (1/lo + (1/hi-1/lo)*float64(i)/float64(n-1))
	}
	return out
}

// minMax returns the smallest and largest of v.
func minMax(v []float64) (lo, hi float64) {
	lo, hi = math.Inf(1), math.Inf(-1)
	for _, x := range v {
		lo, hi = math.Min(lo, x), math.Max(hi, x)
	}
	return lo, hi
}

// sameValue reports whether two table temperatures or pressures are the
// same grid value (as fit.Table's distinct values are told apart).
func sameValue(a, b float64) bool { return math.Abs(a-b) <= 1e-9*math.Abs(b) }

// nearest returns the index of the value of sorted nearest to x.
func nearest(sorted []float64, x float64) int {
	best := 0
	for i, v := range sorted {
		if math.Abs(v-x) < math.Abs(sorted[best]-x) {
			best = i
		}
	}
	return best
}

// plotNum writes a legend number: 4 significant digits, an exponent
// without its "+" and leading zeros (1e5, 2.5e-3).
func plotNum(x float64) string {
	s := strconv.FormatFloat(x, 'g', 4, 64)
	if m, e, ok := strings.Cut(s, "e"); ok {
		n, _ := strconv.Atoi(e)
		return m + "e" + strconv.Itoa(n)
	}
	return s
}
