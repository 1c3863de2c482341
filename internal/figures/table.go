package figures

import (
	"fmt"

	"github.com/falloff-kinetics/falloff/pkg/fit"
	"github.com/falloff-kinetics/falloff/pkg/job"
	"github.com/falloff-kinetics/falloff/pkg/units"
)

// MaxPlotTemperatures is the most temperatures fit's k-vs-P.svg shows, for
// the reason of MaxPlotPressures.
const MaxPlotTemperatures = 5

// figureFile is a figure's file name and its renderer.
type figureFile struct {
	name string
	svg  func() ([]byte, error)
}

// Table renders the figures of `fit TABLE --plots DIR`:
// k-vs-T.svg (k against 1000/T at up to MaxPlotPressures of the table's
// pressures), k-vs-P.svg (k against P at up to MaxPlotTemperatures of its
// temperatures), each with the table's points and the recommended form
// (or the closest one when none meets the tolerance), and residuals.svg,
// 100·(k_fit/k − 1) of that form at every point. Pressures are in bar and
// k in the table's units, as fit prints them.
func Table(tab *fit.Table, res *fit.Results) ([]job.File, error) {
	form, formName := PlotForm(res)
	same := func(k float64) float64 { return k }
	figs := []figureFile{
		{KvsTPlot, kvsTFigure(tab, form, formName, "table", units.BarPa, "bar", same, tab.KUnits).SVG},
		{KvsPPlot, kvsPFigure(tab, spread(len(tab.Temperatures()), MaxPlotTemperatures), form, formName, "table", units.BarPa, "bar", same, tab.KUnits).SVG},
	}
	if form != nil {
		figs = append(figs, figureFile{ResidualsPlot, residualFigure(tab, form, formName, "table", units.BarPa, "bar").SVG})
	}
	var files []job.File
	for _, f := range figs {
		b, err := f.svg()
		if err != nil {
			return nil, &job.NumericalError{Err: fmt.Errorf("%s: %w", f.name, err)}
		}
		files = append(files, job.File{Name: f.name, Data: b})
	}
	return files, nil
}
