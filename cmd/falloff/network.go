package main

import (
	"fmt"
	"path/filepath"
	"sort"
	"strings"

	"github.com/falloff-kinetics/falloff/internal/figures"
	"github.com/falloff-kinetics/falloff/internal/report"
	"github.com/falloff-kinetics/falloff/pkg/export"
	"github.com/falloff-kinetics/falloff/pkg/fit"

	"github.com/falloff-kinetics/falloff/pkg/input"
	"github.com/falloff-kinetics/falloff/pkg/job"
	"github.com/falloff-kinetics/falloff/pkg/units"
)

// printNetworkSummary is check on a file with a network: the wells,
// fragment sets and steps, and the energy levels drawn as text.
func printNetworkSummary(s streams, m *input.Model, asJSON bool) error {
	rep := job.SummariseNetwork(m)
	if asJSON {
		return writeJSON(s.out, rep)
	}
	kcal := func(e float64) string { return fmt.Sprintf("%.2f", e/units.Cm1PerKcalPerMol) }
	frag := map[string]job.NetworkFragment{}
	for _, f := range rep.Fragments {
		frag[f.Name] = f
	}
	label := func(name string) string {
		if f, ok := frag[name]; ok {
			return strings.Join(f.Species, " + ")
		}
		return name
	}
	fmt.Fprintf(s.out, "%s: %s\nnetwork of %d wells, %d fragment sets, %d steps; energies in kcal/mol, zero-point corrected, from the zero-point level of %s\n\n",
		rep.File, rep.Title, len(rep.Wells), len(rep.Fragments), len(rep.Steps), rep.Reference)
	fmt.Fprintln(s.out, "steps:")
	for _, st := range rep.Steps {
		arrow := "↔"
		if st.ToFragments {
			arrow = "→"
		}
		how := fmt.Sprintf("via %s at %s", st.Via, kcal(st.Barrier))
		if st.Barrierless {
			how = fmt.Sprintf("barrierless, k∞ with %s above %s", kcal(st.BarrierlessEnergy), st.From)
		}
		fmt.Fprintf(s.out, "  %s %s %s  (%s)\n", st.From, arrow, label(st.To), how)
	}
	if src := rep.Source; src != nil {
		fmt.Fprintf(s.out, "  source: %s → %s (association; chemically activated rates)\n", label(src.Fragments), src.Into)
	}

	// The energy levels, highest first.
	type level struct {
		e    float64
		mark string
		text string
	}
	var levels []level
	for _, w := range rep.Wells {
		text := w.Name + " (well"
		if w.Name == rep.Reference {
			text += ", reference"
		}
		levels = append(levels, level{w.Energy, "═══", text + ")"})
	}
	for _, f := range rep.Fragments {
		levels = append(levels, level{f.Energy, "───", label(f.Name) + " (fragments)"})
	}
	for _, st := range rep.Steps {
		if !st.Barrierless {
			arrow := "↔"
			if st.ToFragments {
				arrow = "→"
			}
			levels = append(levels, level{st.Barrier, " ╳ ", fmt.Sprintf("%s (%s %s %s)", st.Via, st.From, arrow, label(st.To))})
		}
	}
	sort.SliceStable(levels, func(i, j int) bool { return levels[i].e > levels[j].e })
	fmt.Fprintln(s.out, "\nenergy levels / kcal/mol:")
	for _, l := range levels {
		fmt.Fprintf(s.out, "  %9s  %s %s\n", kcal(l.e), l.mark, l.text)
	}
	fmt.Fprintf(s.out, "\nnote: %s.\n", rep.Note)
	if len(rep.Warnings) == 0 {
		fmt.Fprintln(s.out, "no warnings")
	}
	for _, w := range rep.Warnings {
		fmt.Fprintln(s.out, "warning:", w)
	}
	_, err := fmt.Fprintln(s.out, "\n"+job.Caution)
	return err
}

// runNetworkRates is rates on a network file: the phenomenological rate
// coefficients at every (T, P), as tables or JSON. Fits, mechanism files
// and figures are not yet made for a network; asking for them is refused.
func runNetworkRates(o ratesOptions, m *input.Model, s streams) error {
	if o.csv {
		return usagef("a network's rates are printed (tables or --json) or written with --out and --plots; --csv is not yet available for a network")
	}
	var set export.FileSet
	defer set.Release()
	for _, dir := range []string{o.out, o.plots} {
		if dir == "" {
			continue
		}
		if err := set.ReserveFolder(dir); err != nil {
			return err
		}
	}
	bar := newProgress(s, "network master equation", len(m.Temperatures), o.quiet || o.json)
	res, err := job.NetworkRates(s.ctx, m, bar.step, o.workLimit.Seconds())
	bar.finish()
	if err != nil {
		return err
	}
	chs := res.FitNetwork(m, o.tolerancePct/100)
	var written []string
	var mech []job.File
	if o.out != "" {
		u, err := export.ParseUnits(o.energyUnit, string(o.disp.Quantity.Quantity))
		if err != nil {
			return usagef("%v", err)
		}
		y, txt, err := res.NetworkMechanismFiles(m, chs, u, o.writeFailed)
		if err != nil {
			return err
		}
		mech = []job.File{{Name: "reactions.yaml", Data: y}, {Name: "reactions.txt", Data: txt}}
		for _, f := range mech {
			set.Add(filepath.Join(o.out, f.Name), f.Data)
		}
	}
	var figs []job.File
	var figErr error
	if o.plots != "" || o.out != "" { // report.html shows them too
		figs, figErr = figures.Network(res, o.disp.Units)
	}
	if o.plots != "" {
		if figErr != nil {
			return figErr
		}
		for _, f := range figs {
			set.Add(filepath.Join(o.plots, f.Name), f.Data)
		}
	}
	if o.out != "" {
		var warnings []string
		if figErr != nil {
			warnings = append(warnings, fmt.Sprintf("the figures could not be drawn: %v", figErr))
			figs = nil
		}
		page, err := report.NetworkHTML(report.Network{Result: res, Channels: chs, Title: m.Title, Input: m.Source, Units: o.disp.Units,
			Figures: figs, Mechanism: mech, Files: relative(o.out, append(set.Paths(), filepath.Join(o.out, htmlReportName))), Warnings: warnings})
		if err != nil {
			return err
		}
		set.Add(filepath.Join(o.out, htmlReportName), page)
	}
	if o.out != "" || o.plots != "" {
		if written, err = set.Commit(s.ctx); err != nil {
			return err
		}
	}
	if o.json {
		return writeJSON(s.out, struct {
			*job.NetworkRatesResult
			Channels []job.NetworkChannel `json:"channels"`
			Written  []string             `json:"files_written,omitempty"`
		}{res, chs, written})
	}
	d := o.disp
	fmt.Fprintf(s.out, "%s: %s\nnetwork of %d wells; %s.\n", res.File, m.Title, len(res.Wells), res.Note)
	header, rows := res.RateTable(d.P, d.Pressure)
	fmt.Fprintln(s.out, "\nrate coefficients / s-1 (a well's own loss is the sum of its columns):")
	if err := renderTable(s.out, header, rows); err != nil {
		return err
	}
	for _, at := range sortedKeys(res.Merged) {
		mp := res.Merged[at]
		fmt.Fprintf(s.out, "merged at %s: wells in fast equilibrium taken as %s (departure %.2g):", at, strings.Join(mp.Species, ", "), mp.Departure)
		for i, from := range mp.Species {
			for j, to := range mp.Species {
				if i != j {
					fmt.Fprintf(s.out, " %s→%s %s s-1;", from, to, num(mp.K[j][i]))
				}
			}
			for x, p := range res.Products {
				fmt.Fprintf(s.out, " %s→%s %s s-1;", from, p, num(mp.KProducts[x][i]))
			}
		}
		fmt.Fprintln(s.out)
	}
	for _, at := range sortedKeys(res.Refused) {
		fmt.Fprintf(s.out, "refused at %s: %s\n", at, res.Refused[at])
	}
	if src := res.Source; src != nil {
		fmt.Fprintf(s.out, "\nsource %s -> %s: yields per captured molecule (stabilised in each well; carried to each product, back to %s included):\n", src.Fragments, src.Into, src.Fragments)
		yh, yr := res.YieldTable(d.P, d.Pressure)
		if err := renderTable(s.out, yh, yr); err != nil {
			return err
		}
		if src.KCapture == nil {
			fmt.Fprintln(s.out, "(no capture rate constant: describe every fragment species under molecules to have K_c, and the bimolecular rate coefficients k_capture × yield)")
		}
	}
	fmt.Fprintln(s.out, "\nfits (PLOG and Chebyshev, and Troe where k is a falloff curve, on the points computed per well):")
	for _, ch := range chs {
		switch {
		case ch.Written:
			rep := ch.Fits.Reports()[fit.FormName(ch.Recommended)]
			fmt.Fprintf(s.out, "  %s -> %s: %s, max error %.3g %% on %d points; %s\n", strings.Join(ch.Reactants, " + "), strings.Join(ch.Products, " + "), ch.Recommended, rep.MaxErrorPct, ch.Points, ch.Falloff)
		default:
			fmt.Fprintf(s.out, "  %s -> %s: not written: %s; %s\n", strings.Join(ch.Reactants, " + "), strings.Join(ch.Products, " + "), ch.WhyNot, ch.Falloff)
		}
	}
	for _, w := range written {
		fmt.Fprintln(s.out, "wrote", w)
	}
	_, err = fmt.Fprintln(s.out, "\n"+job.Caution)
	return err
}

// sortedKeys returns the keys of m in order.
func sortedKeys[V any](m map[string]V) []string {
	keys := make([]string, 0, len(m))
	for k := range m {
		keys = append(keys, k)
	}
	sort.Strings(keys)
	return keys
}
