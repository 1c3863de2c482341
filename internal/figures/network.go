package figures

import (
	"errors"
	"fmt"
	"math"

	"github.com/falloff-kinetics/falloff/pkg/job"
	"github.com/falloff-kinetics/falloff/pkg/plots"
)

// The figure files of a network's rates run.
const (
	PopulationsPlot = "populations.svg"
	NetworkKvsPPlot = "k-vs-P.svg"
	YieldsPlot      = "yields.svg"
)

// Network renders the figures of a network's rates run: populations.svg
// (Populations at the middle temperature and pressure, or the nearest
// point not refused) and k-vs-P.svg (every rate coefficient from the
// reference well against pressure at that temperature) and, with a
// bimolecular source, yields.svg (the yields per captured molecule,
// stabilised in each well and carried to each product, against pressure at
// that temperature; the tables and --json give every temperature).
func Network(res *job.NetworkRatesResult, d Units) ([]job.File, error) {
	it, ip := -1, -1
	best := math.Inf(1)
	mt, mp := len(res.Temperatures)/2, len(res.Pressures)/2
	for i := range res.Temperatures {
		for j := range res.Pressures {
			if res.K[i][j] == nil {
				continue
			}
			if dist := math.Abs(float64(i-mt)) + math.Abs(float64(j-mp)); dist < best {
				it, ip, best = i, j, dist
			}
		}
	}
	if it < 0 {
		return nil, errors.New("figures: every point of the network was refused; nothing to draw")
	}
	names, times, frac, err := res.Populations(it, ip)
	if err != nil {
		return nil, err
	}
	pop := plots.Figure{Title: fmt.Sprintf("Populations after a start in %s, %s K, %s %s", res.Reference, num(res.Temperatures[it]), num(d.P(res.Pressures[ip])), d.Pressure),
		XLabel: "t / s", YLabel: "fraction", LogX: true}
	for k, nm := range names {
		pop.Series = append(pop.Series, plots.Series{Name: nm, X: times, Y: frac[k], Group: k + 1})
	}
	b, err := pop.SVG()
	if err != nil {
		return nil, &job.NumericalError{Err: fmt.Errorf("%s: %w", PopulationsPlot, err)}
	}
	files := []job.File{{Name: PopulationsPlot, Data: b}}

	kp := plots.Figure{Title: fmt.Sprintf("Rate coefficients at %s K", num(res.Temperatures[it])), XLabel: "P / " + d.Pressure, YLabel: "k / s-1", LogX: true, LogY: true}
	g := 1
	for a, from := range res.Wells {
		add := func(name string, k func(j int) (float64, bool)) {
			var x, y []float64
			for j, p := range res.Pressures {
				if v, ok := k(j); ok && v > 0 {
					x, y = append(x, d.P(p)), append(y, v)
				}
			}
			if len(x) > 0 {
				kp.Series = append(kp.Series, plots.Series{Name: name, X: x, Y: y, Points: true, Group: g})
				kp.Series = append(kp.Series, plots.Series{Name: name, X: x, Y: y, Group: g})
				g++
			}
		}
		for b, to := range res.Wells {
			if b != a {
				add(from+" → "+to, func(j int) (float64, bool) {
					if res.K[it][j] == nil {
						return 0, false
					}
					return res.K[it][j][b][a], true
				})
			}
		}
		for x, p := range res.Products {
			add(from+" → "+p, func(j int) (float64, bool) {
				if res.KProducts[it][j] == nil {
					return 0, false
				}
				return res.KProducts[it][j][x][a], true
			})
		}
	}
	b, err = kp.SVG()
	if err != nil {
		return nil, &job.NumericalError{Err: fmt.Errorf("%s: %w", NetworkKvsPPlot, err)}
	}
	files = append(files, job.File{Name: NetworkKvsPPlot, Data: b})
	if res.Source == nil {
		return files, nil
	}
	src := res.Source
	yf := plots.Figure{Title: fmt.Sprintf("Yields of %s → %s per captured molecule at %s K", src.Fragments, src.Into, num(res.Temperatures[it])),
		XLabel: "P / " + d.Pressure, YLabel: "yield", LogX: true}
	g = 1
	series := func(name string, y func(i, j int) (float64, bool)) {
		var xs, ys []float64
		for j, p := range res.Pressures {
			if v, ok := y(it, j); ok && v >= 0 {
				xs, ys = append(xs, d.P(p)), append(ys, v)
			}
		}
		if len(xs) > 0 {
			yf.Series = append(yf.Series, plots.Series{Name: name, X: xs, Y: ys, Points: true, Group: g})
			yf.Series = append(yf.Series, plots.Series{Name: name, X: xs, Y: ys, Group: g})
		}
		g++
	}
	for w, name := range res.Wells {
		series("stabilised in "+name, func(i, j int) (float64, bool) {
			if src.Stabilised[i][j] == nil {
				return 0, false
			}
			return src.Stabilised[i][j][w], true
		})
	}
	for x, name := range res.Products {
		series("to "+name, func(i, j int) (float64, bool) {
			if src.Activated[i][j] == nil {
				return 0, false
			}
			return src.Activated[i][j][x], true
		})
	}
	b, err = yf.SVG()
	if err != nil {
		return nil, &job.NumericalError{Err: fmt.Errorf("%s: %w", YieldsPlot, err)}
	}
	return append(files, job.File{Name: YieldsPlot, Data: b}), nil
}
