package main

import (
	"fmt"
	"os"
	"path"
	"path/filepath"
	"slices"

	"github.com/falloff-kinetics/falloff/internal/figures"
	"github.com/falloff-kinetics/falloff/internal/report"
	"github.com/falloff-kinetics/falloff/pkg/batch"
	"github.com/falloff-kinetics/falloff/pkg/fit"
	"github.com/falloff-kinetics/falloff/pkg/job"
)

// htmlReportName is the report page written beside the other files of
// --out (docs/report.md).
const htmlReportName = report.FileName

// noReactionsWarning is said on stderr and in the report when --out has no
// reactions.yaml to write.
const noReactionsWarning = "no reactions.yaml written: no fitted form meets the tolerance for every reaction (hint: see the fit table; --write-failed writes the best form marked FAILED, or raise --tolerance)"

// ratesReport renders report.html of a rates run for its --out folder:
// the result, the mechanism files and figures of the same set, the
// command's warnings (also with --quiet: the page is read later), and the
// names of the files written (relative to the folder, so that a batch's
// page and a rates run's are the same). Figures that could not be drawn
// (figErr) are a warning on the page rather than a failed set.
func ratesReport(o ratesOptions, n *job.Network, res *job.RatesResult, mech, figs []job.File, figErr error, written []string) ([]byte, error) {
	var warnings []string
	if !slices.ContainsFunc(mech, func(f job.File) bool { return f.Name == "reactions.yaml" }) {
		warnings = append(warnings, noReactionsWarning)
	}
	warnings = append(warnings, targetWarnings(o, res)...)
	if figErr != nil {
		warnings = append(warnings, fmt.Sprintf("the figures could not be drawn: %v", figErr))
		figs = nil
	}
	return report.RatesHTML(report.Rates{Result: res, Title: n.Model.Title, Input: n.Model.Source, Units: o.disp.Units,
		Energy: o.units.Energy, Figures: figs, Mechanism: mech, Files: relative(o.out, written), Warnings: warnings})
}

// fitReport renders report.html of fit --out: the fits of the table, their
// figures (figures.Table, as --plots draws them), the mechanism files of
// the same set and the table echoed. Figures that could not be drawn are
// a warning on the page.
func fitReport(o fitOptions, src []byte, t *fit.Table, res *fit.Results, mech []job.File, written []string) ([]byte, error) {
	var warnings []string
	if !slices.ContainsFunc(mech, func(f job.File) bool { return f.Name == "reactions.yaml" }) {
		warnings = append(warnings, "no reactions.yaml written: no fitted form meets the tolerance (hint: --write-failed writes the best form marked FAILED, or raise --tolerance)")
	}
	figs, err := figures.Table(t, res)
	if err != nil {
		warnings = append(warnings, fmt.Sprintf("the figures could not be drawn: %v", err))
		figs = nil
	}
	return report.FitHTML(report.Fit{Table: t, Results: res, Source: src, Units: o.disp.Units, Energy: o.units.Energy,
		Figures: figs, Mechanism: mech, Files: relative(o.out, append(written, filepath.Join(o.out, htmlReportName))), Warnings: warnings})
}

// relative returns the paths relative to dir where they are inside it.
func relative(dir string, paths []string) []string {
	var names []string
	for _, p := range paths {
		if rel, err := filepath.Rel(dir, p); err == nil && filepath.IsLocal(rel) {
			p = filepath.ToSlash(rel)
		}
		names = append(names, p)
	}
	return names
}

// batchIndex renders index.html of a batch, beside its merged mechanism in
// out/mechanism: a row per reaction, its name linking to the report.html
// in its folder (out/reactions/NAME) when there is one — a reaction
// computed before reports were written has none until it is run again
// (--force).
func batchIndex(m *batch.Manifest, out string, rows []batch.Row) ([]byte, error) {
	x := report.Index{Manifest: filepath.Base(m.File), Title: m.Title}
	for _, r := range rows {
		row := report.IndexRow{Name: r.Name, Reaction: r.Reaction, State: r.State.String(), Forms: r.Forms,
			MaxErrorPct: r.MaxErrorPct, Warnings: r.Warnings, Error: r.Error}
		if fi, err := os.Stat(filepath.Join(out, batchReactions, r.Name, htmlReportName)); err == nil && fi.Mode().IsRegular() {
			row.Report = path.Join("..", batchReactions, filepath.ToSlash(r.Name), htmlReportName)
		}
		x.Rows = append(x.Rows, row)
	}
	return report.IndexHTML(x)
}
