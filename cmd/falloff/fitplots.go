package main

import (
	"fmt"
	"path/filepath"

	"github.com/falloff-kinetics/falloff/pkg/export"
	"github.com/falloff-kinetics/falloff/pkg/fit"
	"github.com/falloff-kinetics/falloff/pkg/job"
	"github.com/falloff-kinetics/falloff/pkg/units"
)

// maxPlotTemperatures is the most temperatures fit's k-vs-P.svg shows, for
// the reason of maxPlotPressures.
const maxPlotTemperatures = 5

// figureFile is a figure's file name and its renderer.
type figureFile struct {
	name string
	svg  func() ([]byte, error)
}

// writeFitPlots writes, under dir, the figures of `fit TABLE --plots DIR`:
// k-vs-T.svg (k against 1000/T at up to maxPlotPressures of the table's
// pressures), k-vs-P.svg (k against P at up to maxPlotTemperatures of its
// temperatures), each with the table's points and the recommended form
// (or the closest one when none meets the tolerance), and residuals.svg,
// 100·(k_fit/k − 1) of that form at every point. Pressures are in bar and
// k in the table's units, as fit prints them. The files are written
// together (export.FileSet).
func writeFitPlots(dir string, tab *fit.Table, res *fit.Results, s streams) error {
	var set export.FileSet
	defer set.Release()
	if err := set.ReserveFolder(dir); err != nil {
		return err
	}
	form, formName := plotForm(res)
	same := func(k float64) float64 { return k }
	figs := []figureFile{
		{kvsTPlot, kvsTFigure(tab, form, formName, "table", units.BarPa, "bar", same, tab.KUnits).SVG},
		{kvsPPlot, kvsPFigure(tab, spread(len(tab.Temperatures()), maxPlotTemperatures), form, formName, "table", units.BarPa, "bar", same, tab.KUnits).SVG},
	}
	if form != nil {
		figs = append(figs, figureFile{residualsPlot, residualFigure(tab, form, formName, "table", units.BarPa, "bar").SVG})
	}
	for _, f := range figs {
		b, err := f.svg()
		if err != nil {
			return &job.NumericalError{Err: fmt.Errorf("%s: %w", f.name, err)}
		}
		set.Add(filepath.Join(dir, f.name), b)
	}
	_, err := set.Commit(s.ctx)
	return err
}
