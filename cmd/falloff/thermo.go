package main

import (
	"errors"
	"fmt"
	"io"
	"math"
	"slices"
	"strconv"
	"strings"

	"github.com/spf13/pflag"

	"github.com/falloff-kinetics/falloff/pkg/input"
	"github.com/falloff-kinetics/falloff/pkg/job"
	"github.com/falloff-kinetics/falloff/pkg/thermo"
	"github.com/falloff-kinetics/falloff/pkg/units"
)

// thermoOptions are the flags of the thermo verb.
type thermoOptions struct {
	json, quiet, matchSlope bool
	from, to, midpoint      string
	step                    string

	// Parsed by validate (0: not given).
	tLow, tHigh, tMid, tStep float64
	auto                     bool
}

func (o *thermoOptions) addFlags(fs *pflag.FlagSet) {
	fs.BoolVar(&o.json, "json", false, "print one JSON object instead of tables")
	fs.StringVar(&o.from, "from", "", `lowest temperature of the table and the NASA fit, with its unit (default: the file's thermo.temperature-range, else "200 K")`)
	fs.StringVar(&o.to, "to", "", `highest temperature of the table and the NASA fit (default: the file's, else "3000 K")`)
	fs.StringVar(&o.midpoint, "midpoint", "", `common temperature of the two NASA ranges, or "auto" for the one of least Cp error (default: the file's thermo.midpoint, else "1000 K")`)
	fs.StringVar(&o.step, "step", "100 K", "temperature spacing of the table's rows")
	fs.BoolVar(&o.matchSlope, "match-slope", false, "make dCp/dT continuous at the midpoint too (costs some accuracy)")
	fs.BoolVarP(&o.quiet, "quiet", "q", false, "no chatter or warnings on stderr")
}

func (o *thermoOptions) validate(args []string) error {
	if len(args) > 1 {
		return usagef("thermo takes at most one input file, got %d", len(args))
	}
	parse := func(name, text string, v *float64) error {
		if text == "" {
			return nil
		}
		x, err := units.Parse(text, units.Temperature)
		if err != nil || !(x > 0) || math.IsInf(x, 0) {
			return usagef("--%s %q: give a positive temperature with its unit, e.g. \"1000 K\"", name, text)
		}
		*v = x
		return nil
	}
	if strings.TrimSpace(o.midpoint) == "auto" {
		o.auto = true
	} else if err := parse("midpoint", o.midpoint, &o.tMid); err != nil {
		return err
	}
	for _, f := range []struct {
		name, text string
		v          *float64
	}{{"from", o.from, &o.tLow}, {"to", o.to, &o.tHigh}, {"step", o.step, &o.tStep}} {
		if err := parse(f.name, f.text, f.v); err != nil {
			return err
		}
	}
	if !(o.tStep > 0) {
		return usagef("--step %q: give the row spacing with its unit, e.g. \"100 K\"", o.step)
	}
	if o.tLow > 0 && o.tHigh > 0 && !(o.tLow < o.tHigh) {
		return usagef("--from %s is not below --to %s", o.from, o.to)
	}
	return nil
}

func runThermoCmd(args []string, s streams) error {
	var o thermoOptions
	fs := newFlags("thermo", "thermo [flags] [FILE]",
		"  falloff thermo ring.yaml                       # Cp, S, H-H298 and NASA polynomials of every species\n"+
			"  falloff thermo ring.yaml --from \"300 K\" --to \"2500 K\" --midpoint auto\n"+
			"  falloff thermo ring.yaml --json > thermo.json", s)
	o.addFlags(fs)
	n, err := parseAndLoad(fs, args, o.validate, func() bool { return o.quiet || o.json }, s)
	if err != nil {
		return err
	}
	table, err := o.table(n.Model.Thermo)
	if err != nil {
		return err
	}
	set, err := thermo.FromModel(n.Model, thermo.Options{
		Range:        thermo.Range{TLow: o.tLow, TMid: o.tMid, THigh: o.tHigh},
		AutoMidpoint: o.auto,
		MatchSlope:   o.matchSlope,
		Table:        table,
	})
	var re *thermo.RangeError
	switch {
	case errors.As(err, &re):
		return usagef("%v (hint: check --from, --to, --midpoint and --step)", re)
	case errors.Is(err, thermo.ErrFit):
		return &job.NumericalError{Err: err}
	case err != nil:
		return err
	}
	if o.json {
		return writeJSON(s.out, set)
	}
	return printThermo(s.out, n.Model.Title, set)
}

// maxTableRows bounds the rows of one species' table: a step of 1 K over
// 10 000 K is a typo, not a table.
const maxTableRows = 2000

// table returns the temperatures of the table: 298.15 K, the range's ends
// (the flags', else the file's, else the default) and every multiple of
// the step between. sec reads the file's thermo section; its errors are
// FromModel's to report.
func (o *thermoOptions) table(sec func() (*input.Thermo, error)) ([]float64, error) {
	lo, hi := o.tLow, o.tHigh
	if s, err := sec(); err == nil {
		if lo == 0 {
			lo = s.TLow
		}
		if hi == 0 {
			hi = s.THigh
		}
	}
	if lo == 0 {
		lo = thermo.DefaultRange.TLow
	}
	if hi == 0 {
		hi = thermo.DefaultRange.THigh
	}
	if !(hi > lo) {
		return nil, nil // FromModel reports the range
	}
	if (hi-lo)/o.tStep > maxTableRows {
		return nil, usagef("--step %s: %.0f rows from %g to %g K (at most %d)", o.step, (hi-lo)/o.tStep, lo, hi, maxTableRows)
	}
	ts := []float64{lo}
	for t := math.Floor(lo/o.tStep)*o.tStep + o.tStep; t < hi-1e-9; t += o.tStep {
		ts = append(ts, t)
	}
	ts = append(ts, hi)
	if !slices.Contains(ts, thermo.TRef) {
		ts = append(ts, thermo.TRef)
		slices.Sort(ts)
	}
	return ts, nil
}

// printThermo writes each species' table, NASA polynomials and fit errors.
func printThermo(w io.Writer, title string, set *thermo.Set) error {
	fmt.Fprintf(w, "%s: %s\nIdeal gas, standard state 1 bar; H relative to 298.15 K; rigid rotor, harmonic oscillator, hindered rotors and electronic levels as in the partition functions.\n", set.File, title)
	for _, e := range set.Species {
		fmt.Fprintf(w, "\n%s%s: H°(298.15 K) = %s kJ/mol (%s), H°(298.15 K) − H°(0) = %s kJ/mol\n",
			e.Name, formula(e.Composition), strconv.FormatFloat(e.H298/1000, 'f', 3, 64), basisText(e.Basis), num(e.Increment/1000))
		var rows [][]string
		for _, p := range e.Table {
			rows = append(rows, []string{strconv.FormatFloat(p.T, 'f', -1, 64), num(p.Cp), num(p.S), num(p.H / 1000), num(-p.G / p.T)})
		}
		if err := renderTable(w, []string{"T / K", "Cp / J/(mol K)", "S / J/(mol K)", "H-H298 / kJ/mol", "-(G-H298)/T / J/(mol K)"}, rows); err != nil {
			return err
		}
		p := e.NASA
		fmt.Fprintf(w, "NASA polynomials (a1 … a7; Cp/R, H/RT, S/R):\n")
		fmt.Fprintf(w, "  %s-%s K: %s\n", num(p.TLow), num(p.TMid), coeffs(p.Low))
		fmt.Fprintf(w, "  %s-%s K: %s\n", num(p.TMid), num(p.THigh), coeffs(p.High))
		f := e.Fit
		fmt.Fprintf(w, "fit error: Cp %s %% (%s K), S %s %% (%s K), H %s J/mol (%s K)\n",
			num(f.CpPct), num(f.CpAt), num(f.SPct), num(f.SAt), num(f.H), num(f.HAt))
		for _, n := range e.Notes {
			fmt.Fprintf(w, "note: %s\n", n)
		}
	}
	if len(set.Notes) > 0 {
		fmt.Fprintln(w)
		for _, n := range set.Notes {
			fmt.Fprintf(w, "note: %s\n", n)
		}
	}
	return nil
}

func coeffs(a [7]float64) string {
	var s []string
	for _, x := range a {
		s = append(s, strconv.FormatFloat(x, 'e', 8, 64))
	}
	return strings.Join(s, " ")
}

// formula writes a composition as " (C1 H4)", or "" without one.
func formula(c []thermo.Element) string {
	if len(c) == 0 {
		return ""
	}
	var s []string
	for _, e := range c {
		s = append(s, e.Symbol+strconv.Itoa(e.Count))
	}
	return " (" + strings.Join(s, " ") + ")"
}

func basisText(b thermo.Basis) string {
	switch b {
	case thermo.Given:
		return "ΔfH° given"
	case thermo.Derived:
		return "ΔfH° from the reaction energy"
	}
	return "placeholder scale, not ΔfH°"
}
