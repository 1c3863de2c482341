package main

import (
	"github.com/spf13/pflag"

	"github.com/falloff-kinetics/falloff/pkg/job"
	"github.com/falloff-kinetics/falloff/pkg/units"
)

// energyFlag is a flag holding a positive energy with its unit, such as
// --grain "50 cm-1". validate parses it once into a job.Setting; nothing
// parses the text again.
type energyFlag struct {
	name, text string
	set        job.Setting // zero until validate, and if the flag is not given
}

func (f *energyFlag) add(fs *pflag.FlagSet, name, usage string) {
	f.name = "--" + name
	fs.StringVar(&f.text, name, f.text, usage)
}

// validate parses the flag's value: a usage error if it has no unit, the
// wrong dimension, or is not positive.
func (f *energyFlag) validate() error {
	if f.text == "" {
		return nil
	}
	x, err := units.Parse(f.text, units.Energy)
	if err != nil {
		return usagef("%s: %v", f.name, err)
	}
	if !(x > 0) {
		return usagef("%s %q: must be positive", f.name, f.text)
	}
	f.set = job.Setting{Cm1: x, Option: f.name, Text: f.text}
	return nil
}
