package main

import (
	"fmt"
	"path/filepath"

	"github.com/falloff-kinetics/falloff/pkg/fit"
	"github.com/falloff-kinetics/falloff/pkg/input"
	"github.com/falloff-kinetics/falloff/pkg/plots"
	"github.com/falloff-kinetics/falloff/pkg/units"
)

// evaluator is any fitted form evaluated at (T K, P Pa).
type evaluator interface{ Eval(t, p float64) float64 }

type arrheniusForm struct{ a *fit.Arrhenius }

func (f arrheniusForm) Eval(t, _ float64) float64 { return f.a.Eval(t) }

func evaluatorOf(form any) evaluator {
	switch f := form.(type) {
	case *fit.Falloff:
		return f
	case *fit.PLOG:
		return f
	case *fit.Chebyshev:
		return f
	case *fit.Arrhenius:
		return arrheniusForm{f}
	}
	return nil
}

// writeRatePlots queues in out, under dir, falloff.svg (k/k∞ against P at up to three
// temperatures, computed points and the recommended fit), arrhenius.svg (k0
// and k∞ against 1000/T), and micro.svg and density.svg (k(E) and ρ(E)).
func writeRatePlots(out *outputSet, dir string, m *input.Model, rep *ratesReport, d *directed, res *fit.Results) error {
	save := func(name string, f plots.Figure) error {
		b, err := f.SVG()
		if err != nil {
			return &numericalError{fmt.Errorf("plot %s: %w", name, err)}
		}
		out.add(filepath.Join(dir, name), b)
		return nil
	}
	var ps []float64
	for _, p := range rep.Pressures {
		ps = append(ps, p/units.BarPa)
	}
	fall := plots.Figure{Title: "Falloff curves", XLabel: "P / bar", YLabel: "k / k∞", LogX: true, LogY: true}
	ev := evaluatorOf(res.Form(res.Recommended))
	for g, it := range plotTemperatures(len(rep.Temperatures)) {
		t := rep.Temperatures[it]
		y := make([]float64, len(ps))
		for j := range ps {
			y[j] = d.k[it][j] / d.kInf[it]
		}
		fall.Series = append(fall.Series, plots.Series{Name: num(t) + " K, master equation", X: ps, Y: y, Points: true, Group: g + 1})
		if ev != nil {
			var fx, fy []float64
			for x := ps[0]; x <= ps[len(ps)-1]*1.0001; x *= 1.2 {
				fx = append(fx, x)
				fy = append(fy, ev.Eval(t, x*units.BarPa)/d.kInf[it])
			}
			fall.Series = append(fall.Series, plots.Series{Name: num(t) + " K, " + res.Recommended, X: fx, Y: fy, Group: g + 1})
		}
	}
	if err := save("falloff.svg", fall); err != nil {
		return err
	}
	inv := make([]float64, len(rep.Temperatures))
	for i, t := range rep.Temperatures {
		inv[i] = 1000 / t
	}
	arr := plots.Figure{Title: "High- and low-pressure limits", XLabel: "1000 K / T", YLabel: "k∞ / " + d.kUnits + ",  k0 / " + d.k0Units, LogY: true, LegendTop: true,
		Series: []plots.Series{{Name: "k∞", X: inv, Y: d.kInf, Points: true, Group: 1}, {Name: "k0", X: inv, Y: d.k0, Points: true, Group: 2}}}
	if err := save("arrhenius.svg", arr); err != nil {
		return err
	}
	if _, ts := m.ReactantAndTS(); ts == nil {
		return nil // k(E) and ρ(E) plots need a transition state (see micro)
	}
	ch, err := newChannel(m, &energyOptions{})
	if err != nil {
		return err
	}
	mc, err := microOf(ch, m.Temperatures)
	if err != nil {
		return err
	}
	var e, k []float64
	for i, x := range mc.K {
		if x > 0 {
			e, k = append(e, mc.Energies[i]), append(k, x)
		}
	}
	if err := save("micro.svg", plots.Figure{Title: "RRKM k(E)", XLabel: "E / cm-1", YLabel: "k(E) / s-1", LogY: true,
		Series: []plots.Series{{Name: mc.Name, X: e, Y: k}}}); err != nil {
		return err
	}
	rho := ch.rc.Densities(ch.grains)
	ee := make([]float64, len(rho))
	for i := range ee {
		ee[i] = ch.grains.Energy(i)
	}
	if err := save("density.svg", plots.Figure{Title: "Density of states", XLabel: "E / cm-1", YLabel: "ρ(E) / (cm-1)^-1", LogY: true,
		Series: []plots.Series{{Name: ch.reactant.Name, X: ee, Y: rho}}}); err != nil {
		return err
	}
	return nil
}
