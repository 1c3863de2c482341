package figures

import (
	"fmt"
	"strings"

	"github.com/falloff-kinetics/falloff/pkg/job"
	"github.com/falloff-kinetics/falloff/pkg/plots"
	"github.com/falloff-kinetics/falloff/pkg/uncertainty"
)

// The figure files of an uncertainty run.
const (
	BandPlot        = "falloff-band.svg"
	SensitivityPlot = "sensitivity.svg"
	FactorPlot      = "uncertainty-factor.svg"
)

// Uncertainty renders the figures of an uncertainty run:
//
//   - falloff-band.svg: the falloff curves k/k∞ (over the nominal k∞)
//     against P at the lowest, middle and highest temperature: the nominal
//     points, the median and the shaded central 95 % of the samples;
//   - sensitivity.svg: the sensitivity coefficients of ln k against T at
//     the lowest, middle and highest pressure, one panel each (without
//     sensitivities, none);
//   - uncertainty-factor.svg: f = sqrt(k97.5/k2.5), the largest over the
//     pressures, against T, with the fitted f(T) = f298·exp(|g(1/T −
//     1/298 K)|).
func Uncertainty(res *uncertainty.Result, d Units) ([]job.File, error) {
	var files []job.File
	save := func(name string, svg func() ([]byte, error)) error {
		b, err := svg()
		if err != nil {
			return &job.NumericalError{Err: fmt.Errorf("%s: %w", name, err)}
		}
		files = append(files, job.File{Name: name, Data: b})
		return nil
	}
	if err := save(BandPlot, bandFigure(res, d).SVG); err != nil {
		return nil, err
	}
	if len(res.Sensitivities) > 0 {
		panels := sensitivityPanels(res, d)
		if err := save(SensitivityPlot, func() ([]byte, error) { return plots.Panels(panels...) }); err != nil {
			return nil, err
		}
	}
	if err := save(FactorPlot, factorFigure(res).SVG); err != nil {
		return nil, err
	}
	return files, nil
}

// bandFigure draws the falloff curves k/k∞ against P with their bands at
// up to three temperatures, every curve over the nominal k∞ of its
// temperature (one number per curve: the band is that of k, and the
// curves of several temperatures share an axis).
func bandFigure(res *uncertainty.Result, d Units) plots.BandFigure {
	f := plots.BandFigure{Figure: plots.Figure{Title: fmt.Sprintf("Falloff curves with the central 95 %% of %d samples", res.Samples),
		XLabel: "P / " + d.Pressure, YLabel: "k / nominal k∞", LogX: true, LogY: true}}
	var ps []float64
	for _, p := range res.Pressures {
		ps = append(ps, d.P(p))
	}
	for g, it := range DefaultTemperatures(len(res.Temperatures)) {
		name := plotNum(res.Temperatures[it]) + " K"
		kInf := res.NominalKInf[it]
		var nom, med, lo, hi []float64
		for j := range res.Pressures {
			b := res.K[it][j]
			nom = append(nom, res.NominalK[it][j]/kInf)
			med = append(med, b.Median/kInf)
			lo = append(lo, b.Low/kInf)
			hi = append(hi, b.High/kInf)
		}
		f.Series = append(f.Series,
			plots.Series{Name: name, X: ps, Y: nom, Points: true, Group: g + 1},
			plots.Series{Name: name, X: ps, Y: med, Group: g + 1})
		f.Bands = append(f.Bands, plots.Band{X: ps, Low: lo, High: hi, Group: g + 1})
	}
	f.Key = []plots.Series{{Name: "nominal", Points: true}, {Name: "median of the samples"}}
	return f
}

// sensitivityPanels draws the coefficients against T at the lowest,
// middle and highest pressure.
func sensitivityPanels(res *uncertainty.Result, d Units) []plots.Figure {
	var out []plots.Figure
	for _, jp := range DefaultTemperatures(len(res.Pressures)) {
		f := plots.Figure{Title: "at " + plotNum(d.P(res.Pressures[jp])) + " " + d.Pressure,
			XLabel: "T / K", YLabel: "sensitivity of ln k", LegendTop: true}
		for i, s := range res.Sensitivities {
			var y []float64
			for it := range res.Temperatures {
				y = append(y, s.K[it][jp])
			}
			name := sensitivityLabel(res.Inputs[i])
			f.Series = append(f.Series, plots.Series{Name: name, X: res.Temperatures, Y: y, Group: i + 1},
				plots.Series{Name: name, X: res.Temperatures, Y: y, Points: true, Group: i + 1})
		}
		out = append(out, f)
	}
	return out
}

// sensitivityLabel names an input with what its coefficient is per.
func sensitivityLabel(in uncertainty.Input) string {
	if in.Relative {
		return in.Path + " (per ln x)"
	}
	if _, unit, ok := strings.Cut(in.Sensitivity, " per "); ok {
		return in.Path + " (per " + unit + ")"
	}
	return in.Path
}

// factorFigure draws f(T) and its fit.
func factorFigure(res *uncertainty.Result) plots.Figure {
	f := plots.Figure{Title: "Uncertainty factor, largest over the pressures", XLabel: "T / K", YLabel: "f = sqrt(k97.5/k2.5)"}
	f.Series = append(f.Series, plots.Series{Name: "Monte Carlo", X: res.Temperatures, Y: res.FactorT, Points: true, Group: 1})
	fit := res.Factor
	var x, y []float64
	for _, t := range invSpace(res.Temperatures, fitCurvePoints) {
		x, y = append(x, t), append(y, fit.At(t))
	}
	f.Series = append(f.Series, plots.Series{Name: fmt.Sprintf("%.3g exp(|%.3g K (1/T − 1/298 K)|)", fit.F298, fit.G), X: x, Y: y, Group: 2})
	return f
}
