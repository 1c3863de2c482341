package main

import (
	"path/filepath"

	"github.com/falloff-kinetics/falloff/pkg/export"
	"github.com/falloff-kinetics/falloff/pkg/job"
	"github.com/falloff-kinetics/falloff/pkg/plots"
)

// addRatePlots queues in set, under dir, falloff.svg (k/k∞ against P at up
// to three temperatures, computed points and the recommended fit),
// arrhenius.svg (k0 and k∞ against 1000/T), and micro.svg and density.svg
// (k(E) and ρ(E) of the main channel, when it has a transition state).
func addRatePlots(set *export.FileSet, dir string, n *job.Network, res *job.RatesResult, d display) error {
	save := func(name string, f plots.Figure) error {
		b, err := f.SVG()
		if err != nil {
			return &job.NumericalError{Err: err}
		}
		set.Add(filepath.Join(dir, name), b)
		return nil
	}
	var ps []float64
	for _, p := range res.Pressures {
		ps = append(ps, d.p(p))
	}
	fall := plots.Figure{Title: "Falloff curves", XLabel: "P / " + d.pressureUnit, YLabel: "k / k∞", LogX: true, LogY: true}
	best := res.Fits.Form(res.Fits.Recommended)
	for g, it := range plotTemperatures(len(res.Temperatures)) {
		t, kInf := res.Temperatures[it], res.KInfIntegrated[it]
		y := make([]float64, len(ps))
		for j := range ps {
			y[j] = res.K[it][j] / kInf
		}
		fall.Series = append(fall.Series, plots.Series{Name: num(t) + " K, master equation", X: ps, Y: y, Points: true, Group: g + 1})
		if best != nil {
			var fx, fy []float64
			for x := ps[0]; x <= ps[len(ps)-1]*1.0001; x *= 1.2 {
				fx = append(fx, x)
				fy = append(fy, best.Eval(t, x*d.paPerUnit)/kInf)
			}
			fall.Series = append(fall.Series, plots.Series{Name: num(t) + " K, " + string(res.Fits.Recommended), X: fx, Y: fy, Group: g + 1})
		}
	}
	if err := save("falloff.svg", fall); err != nil {
		return err
	}
	inv := make([]float64, len(res.Temperatures))
	for i, t := range res.Temperatures {
		inv[i] = 1000 / t
	}
	kInf, k0 := make([]float64, len(inv)), make([]float64, len(inv))
	for i := range inv {
		kInf[i], k0[i] = d.rate(res.KInfIntegrated[i], res.KPowers()), d.rate(res.K0[i], res.K0Powers())
	}
	arr := plots.Figure{Title: "High- and low-pressure limits", XLabel: "1000 K / T",
		YLabel: "k∞ / " + d.rateUnit(res.KPowers()) + ",  k0 / " + d.rateUnit(res.K0Powers()), LogY: true, LegendTop: true,
		Series: []plots.Series{{Name: "k∞", X: inv, Y: kInf, Points: true, Group: 1}, {Name: "k0", X: inv, Y: k0, Points: true, Group: 2}}}
	if err := save("arrhenius.svg", arr); err != nil {
		return err
	}
	if n.Main().TS == nil {
		return nil // k(E) and ρ(E) plots need a transition state (see micro)
	}
	counts, err := n.Count(job.ReportGrid{})
	if err != nil {
		return err
	}
	mi, err := counts.Micro()
	if err != nil {
		return err
	}
	mc := mi.Channels[0]
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
	name, energies, density := counts.ReactantDensity()
	return save("density.svg", plots.Figure{Title: "Density of states", XLabel: "E / cm-1", YLabel: "ρ(E) / (cm-1)^-1", LogY: true,
		Series: []plots.Series{{Name: name, X: energies, Y: density}}})
}
