package main

import (
	"context"
	"encoding/csv"
	"encoding/json"
	"errors"
	"fmt"
	"math"
	"path/filepath"
	"strconv"
	"strings"

	"github.com/spf13/pflag"

	"github.com/falloff-kinetics/falloff/pkg/collision"
	"github.com/falloff-kinetics/falloff/pkg/export"
	"github.com/falloff-kinetics/falloff/pkg/fit"
	"github.com/falloff-kinetics/falloff/pkg/input"
	"github.com/falloff-kinetics/falloff/pkg/units"
)

type ratesOptions struct {
	json, csv, quiet, skipCheck, skeleton bool
	jobs                                  int
	grain, ceiling                        string
	out, plots, direction                 string
	energyUnit, quantity                  string
	tolerancePct                          float64
}

func (o *ratesOptions) addFlags(fs *pflag.FlagSet) {
	fs.BoolVar(&o.json, "json", false, "print one JSON object instead of tables")
	fs.BoolVar(&o.csv, "csv", false, "print the k(T,P) grid as CSV (T/K,P/Pa,k/s-1)")
	fs.IntVarP(&o.jobs, "jobs", "j", 0, "worker goroutines over temperatures (default: GOMAXPROCS)")
	fs.StringVar(&o.grain, "grain", "", `master-equation grain with its unit, e.g. "50 cm-1", at every temperature (default: automatic, min(α, kT)/5)`)
	fs.StringVar(&o.ceiling, "ceiling", "", `top of the master-equation grid with its unit (default: automatic per temperature)`)
	fs.BoolVar(&o.skipCheck, "skip-check", false, "skip the grain and ceiling convergence check")
	fs.StringVar(&o.direction, "direction", forward, "write the reaction forward (as computed) or as the reverse recombination")
	fs.Float64Var(&o.tolerancePct, "tolerance", 1, "largest acceptable fit error in per cent: decides extra fit terms and the recommended form")
	fs.StringVarP(&o.out, "out", "o", "", "write reactions.yaml, reactions.txt, a file per fitted form, grid.csv and summary.json to this directory")
	fs.StringVar(&o.energyUnit, "energy-unit", "cal/mol", "activation-energy unit of the mechanism files: cal/mol, kcal/mol, J/mol, kJ/mol or K")
	fs.StringVar(&o.quantity, "quantity", "mol", "quantity unit of the mechanism files: mol or molecule")
	fs.BoolVar(&o.skeleton, "skeleton", false, "with --out, also write phase-example.yaml: how a Cantera phase uses the reactions")
	fs.StringVar(&o.plots, "plots", "", "write SVG plots (falloff curves, Arrhenius plot of k0 and k∞, k(E), ρ(E)) to this directory")
	fs.BoolVarP(&o.quiet, "quiet", "q", false, "no chatter or warnings on stderr")
}

func (o *ratesOptions) validate(args []string) error {
	if len(args) > 1 {
		return usagef("rates takes at most one input file, got %d", len(args))
	}
	if o.json && o.csv {
		return usagef("--json and --csv exclude each other")
	}
	if o.jobs < 0 {
		return usagef("--jobs %d: must be 0 (automatic) or positive", o.jobs)
	}
	if o.direction != forward && o.direction != recombination {
		return usagef("--direction %q: use forward or recombination", o.direction)
	}
	if !(o.tolerancePct > 0) || o.tolerancePct > 100 {
		return usagef("--tolerance %v: give a percentage between 0 and 100", o.tolerancePct)
	}
	if err := o.units().Check(); err != nil {
		return usagef("%v", err)
	}
	return (&energyOptions{grain: o.grain, ceiling: o.ceiling}).check()
}

func (o *ratesOptions) units() export.Units {
	return export.Units{Energy: o.energyUnit, Quantity: o.quantity}
}

func runRatesCmd(args []string, s streams) error {
	var o ratesOptions
	fs := newFlags("rates", "rates [flags] [FILE]",
		"  falloff rates                          # the built-in demo\n"+
			"  falloff rates ring.yaml --jobs 2\n"+
			"  falloff rates ring.yaml --csv > grid.csv\n"+
			"  falloff rates ring.yaml --json > rates.json", s)
	o.addFlags(fs)
	m, err := parseAndLoad(fs, args, o.validate, func() bool { return o.quiet || o.json || o.csv }, s)
	if err != nil {
		return err
	}
	return runRates(o, m, s)
}

// ratesReport is the JSON of `rates` (design.md §8).
type ratesReport struct {
	File           string          `json:"file"`
	Reaction       string          `json:"reaction"`
	Direction      string          `json:"direction"`
	KUnits         string          `json:"k_units"`
	Temperatures   []float64       `json:"temperatures_K"`
	Pressures      []float64       `json:"pressures_Pa"`
	K              [][]float64     `json:"k"`
	KInf           []float64       `json:"k_inf"`
	KInfIntegrated []float64       `json:"k_inf_integrated"`
	K0             []float64       `json:"k0"`
	K0Units        string          `json:"k0_units"`
	CollisionFreq  []float64       `json:"collision_frequency_per_s_per_Pa"`
	CollisionRate  []float64       `json:"collision_rate_constant_cm3_per_molecule_per_s"`
	Centre         []float64       `json:"falloff_centre_Pa"`
	Grain          []float64       `json:"grain_cm-1"`
	Ceiling        []float64       `json:"ceiling_cm-1"`
	Convergence    *float64        `json:"convergence_max_change,omitempty"`
	Transfer       string          `json:"energy_transfer"`
	Bath           bathInfo        `json:"bath"`
	PathDegeneracy float64         `json:"path_degeneracy"`
	Fits           *fit.Results    `json:"fits,omitempty"`
	Channels       []channelReport `json:"channels,omitempty"`
	Files          []string        `json:"files_written,omitempty"`
	Warnings       []string        `json:"warnings"`
	Caution        string          `json:"caution"`
}

// channelReport is one channel's share of the grid (competing channels).
type channelReport struct {
	Name           string       `json:"name"`
	Products       []string     `json:"products"`
	K              [][]float64  `json:"k"`
	KInf           []float64    `json:"k_inf"`
	KInfIntegrated []float64    `json:"k_inf_integrated"`
	K0             []float64    `json:"k0"`
	Branching      [][]float64  `json:"branching"`
	Fits           *fit.Results `json:"fits,omitempty"`
}

// separationLimit is the k0/Z above which rates warns that the reaction is
// not slow beside collisional relaxation. In the low-pressure limit the
// reaction takes k0/Z of all collisions, and the strong collider relaxes
// at the collision rate, so k0/Z > 0.1 means the slowest (chemical) mode
// is less than ten times slower than relaxation: a phenomenological rate
// coefficient presumes that separation of time scales (Bartis & Widom,
// J. Chem. Phys. 60, 3474, 1974; from memory). The factor ten is common
// practice, no source.
const separationLimit = 0.1

// convergenceLimit is the change on halving the grain or raising the
// ceiling above which rates warns.
const convergenceLimit = 0.005

func computeRates(o ratesOptions, m *input.Model, s streams) (*ratesReport, error) {
	if len(m.Pressures) == 0 {
		return nil, &input.FieldError{File: m.File, Path: "grid.pressures", Err: fmt.Errorf("missing: rates needs a pressure grid"),
			Hint: "add pressures: {from: 0.001 bar, to: 1000 bar, points: 13}"}
	}
	col, bath, err := newCollider(m)
	if err != nil {
		return nil, err
	}
	if o.direction == recombination {
		if _, err := recombinationProducts(m); err != nil {
			return nil, err // before the master equation, not after
		}
	}
	tr := newTransfer(m)
	r, _ := m.ReactantAndTS()
	e0 := channelSpecs(m)[0].e0
	var grain, ceiling float64
	if o.grain != "" {
		grain, _ = units.Parse(o.grain, units.Energy)
	} else {
		grain = m.EnergyGrid.MEGrain
	}
	if o.ceiling != "" {
		ceiling, _ = units.Parse(o.ceiling, units.Energy)
	} else {
		ceiling = m.EnergyGrid.Ceiling
	}
	if ceiling > 0 && ceiling <= e0 {
		return nil, usagef("--ceiling %q: not above the threshold %.0f cm-1", o.ceiling, e0)
	}
	if err := checkRatesSize(m, o, grain, ceiling); err != nil {
		return nil, err // before counting any states
	}
	ch, specs, err := newNetwork(m, ceiling)
	if err != nil {
		return nil, err
	}
	bar := newProgress(s, "master equation", len(m.Temperatures), o.quiet)
	res, err := collision.RunContext(s.ctx, ch, col, tr, m.Temperatures, m.Pressures,
		collision.Options{Grain: grain, Ceiling: ceiling, Jobs: o.jobs, SkipConvergence: o.skipCheck, Progress: bar.step})
	bar.finish()
	switch {
	case errors.Is(err, collision.ErrTooLarge):
		return nil, fmt.Errorf("%s: master equation: %w", m.File, err) // a request too large: bad input
	case errors.Is(err, context.Canceled):
		return nil, err
	case err != nil:
		return nil, &numericalError{fmt.Errorf("%s: master equation: %w", m.File, err)}
	}
	rep := &ratesReport{File: m.File, Direction: direction(m), KUnits: "s-1", K0Units: "cm3 molecule-1 s-1",
		Reaction:     r.Name + " -> " + strings.Join(m.Reaction.Products, " + "),
		Temperatures: m.Temperatures, Pressures: m.Pressures, K: res.K(), Transfer: tr.String(), Bath: bath,
		PathDegeneracy: ch.L, Warnings: append([]string{}, m.Warnings...), Caution: caution}
	for _, row := range res.Rows {
		kinf := 0.0
		for _, c := range specs {
			kinf += c.kInf(&r.Species, row.T)
		}
		rep.KInf = append(rep.KInf, kinf)
		rep.KInfIntegrated = append(rep.KInfIntegrated, row.KInfME)
		rep.K0 = append(rep.K0, row.K0)
		rep.CollisionRate = append(rep.CollisionRate, row.Z)
		rep.CollisionFreq = append(rep.CollisionFreq, row.Z*collision.Concentration(1, row.T))
		rep.Centre = append(rep.Centre, row.Centre)
		rep.Grain = append(rep.Grain, row.Grain)
		rep.Ceiling = append(rep.Ceiling, row.Ceiling)
		if row.Rescaled > 0 {
			_ = row // reported in docs: a few sparse low grains are normal
		}
	}
	if len(specs) > 1 {
		for c, spec := range specs {
			cr := channelReport{Name: spec.label(), Products: spec.products}
			for _, row := range res.Rows {
				cr.K = append(cr.K, row.KC[c])
				cr.KInf = append(cr.KInf, spec.kInf(&r.Species, row.T))
				cr.KInfIntegrated = append(cr.KInfIntegrated, row.KInfC[c])
				cr.K0 = append(cr.K0, row.K0C[c])
				b := make([]float64, len(row.K))
				for j, k := range row.K {
					b[j] = row.KC[c][j] / k
				}
				cr.Branching = append(cr.Branching, b)
			}
			rep.Channels = append(rep.Channels, cr)
		}
	}
	var poor []string
	worst, worstT := 0.0, 0.0
	for _, row := range res.Rows {
		if f := row.K0 / row.Z; f > separationLimit {
			poor = append(poor, num(row.T))
			if f > worst {
				worst, worstT = f, row.T
			}
		}
	}
	if len(poor) > 0 {
		rep.Warnings = append(rep.Warnings, fmt.Sprintf("%s: at %s K the low-pressure rate is more than %g of the collision rate (k0/Z = %.2g at %s K): "+
			"the reaction is not slow beside collisional relaxation, so k(T,P) there, at low pressure above all, is not a well-defined thermal rate coefficient (hint: treat those temperatures with care, or leave them out of the grid)",
			m.File, strings.Join(poor, ", "), separationLimit, worst, num(worstT)))
	}
	if c := res.Convergence; !math.IsNaN(c) {
		rep.Convergence = &c
		if c > convergenceLimit {
			rep.Warnings = append(rep.Warnings, fmt.Sprintf("%s: halving the grain or raising the ceiling by 10 kT changes k by %.2g %% (more than %.2g %%) at T = %s K, P = %s bar (hint: set energy-grid.master-equation-grain or --grain smaller, or raise --ceiling)",
				m.File, 100*c, 100*convergenceLimit, num(res.ConvergenceT), num(res.ConvergenceP/units.BarPa)))
		}
	}
	for _, xs := range [][]float64{rep.KInf, rep.KInfIntegrated, rep.K0, rep.Centre} {
		if err := finite("rates", xs...); err != nil {
			return nil, err
		}
	}
	for _, xs := range rep.K {
		if err := finite("k", xs...); err != nil {
			return nil, err
		}
	}
	return rep, nil
}

// finishRates turns the computed grid into the requested direction, fits it
// and writes the files asked for.
func finishRates(o ratesOptions, m *input.Model, rep *ratesReport, s streams) (*directed, error) {
	d, err := orient(m, rep, o.direction)
	if err != nil {
		return nil, err
	}
	if d.direction == recombination {
		rep.Direction, rep.KUnits, rep.K0Units = recombination, d.kUnits, d.k0Units
		rep.Reaction = strings.Join(d.reactants, " + ") + " -> " + strings.Join(d.products, " + ")
		rep.K, rep.K0 = d.k, d.k0
		for i := range rep.KInf {
			rep.KInf[i] /= d.kc[i]
		}
		rep.KInfIntegrated = d.kInf
	}
	res, err := fitGrid(m, rep, d, o.tolerancePct/100)
	if err != nil {
		return nil, err
	}
	rep.Fits = res
	r, _ := m.ReactantAndTS()
	entries := []mechEntry{{label: rep.Reaction, reactants: d.reactants, products: d.products, order: d.order, res: res}}
	if len(rep.Channels) > 0 {
		if d.direction == recombination {
			return nil, usagef("--direction recombination is for a single channel; with competing channels write them forward")
		}
		entries = entries[:0]
		for i := range rep.Channels {
			cr := &rep.Channels[i]
			cd := &directed{direction: forward, order: 1, k: cr.K, kInf: cr.KInfIntegrated, k0: cr.K0, kUnits: "s-1"}
			if cr.Fits, err = fitGrid(m, rep, cd, o.tolerancePct/100); err != nil {
				return nil, err
			}
			prods := cr.Products
			if len(prods) == 0 {
				prods = []string{r.Name + "-products-" + strconv.Itoa(i+1)}
			}
			entries = append(entries, mechEntry{label: cr.Name, reactants: []string{r.Name}, products: prods, order: 1, res: cr.Fits})
		}
	}
	if res.Recommended == "" {
		rep.Warnings = append(rep.Warnings, m.File+": no fitted form meets the tolerance: "+res.Reason)
	}
	var out outputSet
	if o.out != "" {
		if err := writeMechanism(&out, o.out, m, m.Source, rep, d, entries, o.units(), o.skeleton); err != nil {
			return nil, err
		}
	}
	if o.plots != "" {
		if err := writeRatePlots(&out, o.plots, m, rep, d, res); err != nil {
			return nil, err
		}
	}
	rep.Files = append([]string{}, out.paths...)
	if o.out != "" {
		summary := filepath.Join(o.out, "summary.json")
		rep.Files = append(rep.Files, summary)
		b, err := json.MarshalIndent(rep, "", "  ")
		if err != nil {
			return nil, &numericalError{err}
		}
		out.add(summary, append(b, '\n'))
	}
	written, err := out.commit(s.ctx)
	rep.Files = written
	if err != nil {
		return nil, err
	}
	return d, nil
}

func direction(m *input.Model) string {
	if len(m.Reaction.Products) == 1 {
		return "isomerization"
	}
	return "dissociation"
}

func runRates(o ratesOptions, m *input.Model, s streams) error {
	rep, err := computeRates(o, m, s)
	if err != nil {
		return err
	}
	if _, err := finishRates(o, m, rep, s); err != nil {
		return err
	}
	if !o.quiet && !o.json && !o.csv {
		for _, w := range rep.Warnings[len(m.Warnings):] {
			fmt.Fprintln(s.err, "warning:", w)
		}
	}
	switch {
	case o.json:
		return writeJSON(s.out, rep)
	case o.csv:
		return writeGridCSV(s, rep)
	}
	return printRates(s, m, rep)
}

// writeGridCSV writes one row per grid point with units in the header.
func writeGridCSV(s streams, rep *ratesReport) error {
	w := csv.NewWriter(s.out)
	if err := w.Write([]string{"T/K", "P/Pa", "k/s-1"}); err != nil {
		return err
	}
	for i, t := range rep.Temperatures {
		for j, p := range rep.Pressures {
			row := []string{strconv.FormatFloat(t, 'g', -1, 64), strconv.FormatFloat(p, 'g', -1, 64),
				strconv.FormatFloat(rep.K[i][j], 'g', -1, 64)}
			if err := w.Write(row); err != nil {
				return err
			}
		}
	}
	w.Flush()
	return w.Error()
}

func printRates(s streams, m *input.Model, rep *ratesReport) error {
	fmt.Fprintf(s.out, "%s: %s\nreaction %s (%s), L = %g\nbath %s (%s); %s\n\n",
		m.File, m.Title, rep.Reaction, rep.Direction, rep.PathDegeneracy, rep.Bath.Gas, rep.Bath.Source, rep.Transfer)
	var rows [][]string
	for i, t := range rep.Temperatures {
		rows = append(rows, []string{num(t), num(rep.KInf[i]), num6(rep.KInfIntegrated[i] / rep.KInf[i]),
			num(rep.K0[i] * units.Avogadro), num(rep.Centre[i] / units.BarPa), num(rep.Grain[i]), numE(rep.Ceiling[i])})
	}
	if err := renderTable(s.out, []string{"T / K", "k∞ / s-1", "k∞(ME)/k∞", "k0 / cm3 mol-1 s-1",
		"P(k=k∞/2) / bar", "grain / cm-1", "ceiling / cm-1"}, rows); err != nil {
		return err
	}
	fmt.Fprintln(s.out, "\nk(T,P) / s-1; columns are pressures in bar:")
	header := []string{"T / K"}
	for _, p := range rep.Pressures {
		header = append(header, num(p/units.BarPa))
	}
	rows = rows[:0]
	for i, t := range rep.Temperatures {
		row := []string{num(t)}
		for _, k := range rep.K[i] {
			row = append(row, num(k))
		}
		rows = append(rows, row)
	}
	if err := renderTable(s.out, header, rows); err != nil {
		return err
	}
	if len(rep.Channels) > 0 {
		fmt.Fprintln(s.out, "\nbranching fractions k_channel/k and k∞ per channel:")
		header := []string{"T / K", "P / bar"}
		for _, c := range rep.Channels {
			header = append(header, c.Name)
		}
		rows = rows[:0]
		for i, t := range rep.Temperatures {
			for j, p := range rep.Pressures {
				row := []string{num(t), num(p / units.BarPa)}
				for _, c := range rep.Channels {
					row = append(row, num(c.Branching[i][j]))
				}
				rows = append(rows, row)
			}
			row := []string{num(t), "k∞ / s-1"}
			for _, c := range rep.Channels {
				row = append(row, num(c.KInf[i]))
			}
			rows = append(rows, row)
		}
		if err := renderTable(s.out, header, rows); err != nil {
			return err
		}
	}
	if rep.Convergence != nil {
		fmt.Fprintf(s.out, "\nconvergence: halving the grain or raising the ceiling by 10 kT changes k by at most %.2g %%\n", 100**rep.Convergence)
	}
	if rep.Fits != nil {
		fmt.Fprintf(s.out, "\nfits to the grid (%s, k in %s):\n", rep.Direction, rep.KUnits)
		if err := renderTable(s.out, []string{"form", "max error / %", "rms error / %", "worst point", "parameters", ""}, fitRows(rep.Fits)); err != nil {
			return err
		}
		if rep.Fits.Recommended != "" {
			fmt.Fprintf(s.out, "recommended: %s (%s)\n", rep.Fits.Recommended, rep.Fits.Reason)
		} else {
			fmt.Fprintf(s.out, "no form meets the tolerance: %s\n", rep.Fits.Reason)
		}
		for _, c := range rep.Channels {
			if c.Fits == nil {
				continue
			}
			fmt.Fprintf(s.out, "\nfits to channel %s:\n", c.Name)
			if err := renderTable(s.out, []string{"form", "max error / %", "rms error / %", "worst point", "parameters", ""}, fitRows(c.Fits)); err != nil {
				return err
			}
		}
	}
	if len(rep.Files) > 0 {
		fmt.Fprintln(s.out, "\nwrote:")
		for _, f := range rep.Files {
			fmt.Fprintln(s.out, "  "+f)
		}
	}
	_, err := fmt.Fprintln(s.out, "\n"+caution)
	return err
}
