package main

import (
	"github.com/spf13/pflag"

	"github.com/falloff-kinetics/falloff/pkg/input"
	"github.com/falloff-kinetics/falloff/pkg/units"
)

// reportOptions are the flags of the verbs that count states and report on
// an input file (states, micro).
type reportOptions struct {
	json, quiet bool
	step        string // row spacing of terminal tables, with its unit
	energy      energyOptions
}

func (o *reportOptions) addFlags(fs *pflag.FlagSet) {
	fs.BoolVar(&o.json, "json", false, "print one JSON object (every grain) instead of tables")
	fs.StringVar(&o.step, "step", o.step, "energy spacing of the rows in the terminal table, with its unit")
	o.energy.addFlags(fs)
	fs.BoolVarP(&o.quiet, "quiet", "q", false, "no chatter or warnings on stderr")
}

func (o *reportOptions) validate(verb string, args []string) error {
	if len(args) > 1 {
		return usagef("%s takes at most one input file, got %d", verb, len(args))
	}
	if x, err := units.Parse(o.step, units.Energy); err != nil {
		return usagef("--step: %v", err)
	} else if !(x > 0) {
		return usagef("--step %q: must be positive", o.step)
	}
	return o.energy.check()
}

func (o *reportOptions) stepCm1() float64 {
	x, _ := units.Parse(o.step, units.Energy) // checked by validate
	return x
}

// parse reads the verb's flags, validates them and loads the model (the
// built-in demo when no file is named).
func (o *reportOptions) parse(verb string, args []string, s streams, example string) (*input.Model, error) {
	fs := newFlags(verb, verb+" [flags] [FILE]", example, s)
	o.addFlags(fs)
	args, err := parseVerb(fs, args, func(a []string) error { return o.validate(verb, a) })
	if err != nil {
		return nil, err
	}
	return loadModel(args, o.quiet || o.json, s)
}
