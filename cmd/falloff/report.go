package main

import (
	"github.com/spf13/pflag"

	"github.com/falloff-kinetics/falloff/pkg/job"
)

// reportOptions are the flags of the verbs that count states and report on
// an input file (states, micro).
type reportOptions struct {
	json, quiet    bool
	jResolved      bool       // states only: --j-resolved
	step           energyFlag // row spacing of terminal tables
	grain, ceiling energyFlag
}

func (o *reportOptions) addFlags(fs *pflag.FlagSet) {
	fs.BoolVar(&o.json, "json", false, "print one JSON object (every grain) instead of tables")
	o.step.add(fs, "step", "energy spacing of the rows in the terminal table, with its unit")
	o.grain.add(fs, "grain", `reporting grain with its unit, e.g. "20 cm-1" (default: the file's energy-grid.grain, else 10 cm-1)`)
	o.ceiling.add(fs, "ceiling", `highest energy with its unit, e.g. "60000 cm-1" (default: E0 + 60 kT at the highest temperature, more for a large molecule)`)
	fs.BoolVarP(&o.quiet, "quiet", "q", false, "no chatter or warnings on stderr")
}

func (o *reportOptions) validate(verb string, args []string) error {
	if len(args) > 1 {
		return usagef("%s takes at most one input file, got %d", verb, len(args))
	}
	for _, f := range []*energyFlag{&o.step, &o.grain, &o.ceiling} {
		if err := f.validate(); err != nil {
			return err
		}
	}
	return nil
}

// grid is the reporting grid the flags ask for.
func (o *reportOptions) grid() job.ReportGrid {
	return job.ReportGrid{Grain: o.grain.set, Ceiling: o.ceiling.set}
}

// parse reads the verb's flags, validates them and loads the network (the
// built-in demo when no file is named).
func (o *reportOptions) parse(verb string, args []string, s streams, example string) (*job.Network, error) {
	fs := newFlags(verb, verb+" [flags] [FILE]", example, s)
	o.addFlags(fs)
	if verb == "states" {
		fs.BoolVar(&o.jResolved, "j-resolved", false, "the J-resolved states of the adiabatic J treatment: rho(E, J) and W(E, J) at a few J")
	}
	args, err := parseVerb(fs, args, func(a []string) error { return o.validate(verb, a) })
	if err != nil {
		return nil, err
	}
	return loadNetwork(args, o.quiet || o.json, s)
}
