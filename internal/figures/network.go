package figures

import (
	"errors"
	"fmt"
	"math"

	"gonum.org/v1/gonum/mat"

	"github.com/falloff-kinetics/falloff/pkg/job"
	"github.com/falloff-kinetics/falloff/pkg/plots"
)

// The figure files of a network's rates run.
const (
	PopulationsPlot = "populations.svg"
	NetworkKvsPPlot = "k-vs-P.svg"
)

// populationTimes is the number of times populations.svg is drawn at.
const populationTimes = 80

// Populations returns, at the point (it, ip) of res, the fractions of the
// wells and products against time after a start in the reference well,
// from the phenomenological rate law dX/dt = K·X, dP/dt = K_exit·X
// (X(t) = exp(A·t)·X(0) with A the rate matrix of wells and products,
// gonum's matrix exponential), at populationTimes times spaced evenly in
// log t from 1e-3 of the fastest loss's time to 10 times the slowest's.
// names lists the wells, then the products; frac[k][i] is species k at
// times[i].
func Populations(res *job.NetworkRatesResult, it, ip int) (names []string, times []float64, frac [][]float64, err error) {
	k, kx := res.K[it][ip], res.KProducts[it][ip]
	if k == nil {
		return nil, nil, nil, errors.New("figures: the point was refused")
	}
	nw, np := len(res.Wells), len(res.Products)
	n := nw + np
	a := mat.NewDense(n, n, nil)
	fast, slow := 0.0, math.Inf(1)
	for i := range nw {
		for j := range nw {
			a.Set(j, i, k[j][i])
		}
		for x := range np {
			a.Set(nw+x, i, kx[x][i])
		}
		if l := -k[i][i]; l > 0 {
			fast, slow = math.Max(fast, l), math.Min(slow, l)
		}
	}
	if !(fast > 0) {
		return nil, nil, nil, errors.New("figures: no well reacts at this point")
	}
	// The slowest time is that of the rate matrix's smallest nonzero
	// eigenvalue, which may be far below every diagonal loss (a well that
	// feeds back into another).
	var eig mat.Eigen
	if eig.Factorize(a.Slice(0, nw, 0, nw), mat.EigenNone) {
		for _, v := range eig.Values(nil) {
			if r := math.Abs(real(v)); r > 1e-12*fast {
				slow = math.Min(slow, r)
			}
		}
	}
	start := -1
	for i, w := range res.Wells {
		if w == res.Reference {
			start = i
		}
	}
	if start < 0 {
		start = 0
	}
	names = append(append(names, res.Wells...), res.Products...)
	frac = make([][]float64, n)
	lo, hi := math.Log10(1e-3/fast), math.Log10(10/slow)
	var at, e mat.Dense
	for s := range populationTimes {
		t := math.Pow(10, lo+(hi-lo)*float64(s)/(populationTimes-1))
		at.Scale(t, a)
		e.Exp(&at)
		times = append(times, t)
		for k := range n {
			frac[k] = append(frac[k], e.At(k, start))
		}
	}
	return names, times, frac, nil
}

// Network renders the figures of a network's rates run: populations.svg
// (Populations at the middle temperature and pressure, or the nearest
// point not refused) and k-vs-P.svg (every rate coefficient from the
// reference well against pressure at that temperature).
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
	names, times, frac, err := Populations(res, it, ip)
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
	return append(files, job.File{Name: NetworkKvsPPlot, Data: b}), nil
}
