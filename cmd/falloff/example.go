package main

import (
	"github.com/spf13/pflag"

	"github.com/falloff-kinetics/falloff/internal/demo"
)

type exampleOptions struct{}

func (o *exampleOptions) addFlags(*pflag.FlagSet) {}

func (o *exampleOptions) validate(args []string) error {
	if len(args) != 0 {
		return usagef("example takes no arguments")
	}
	return nil
}

func runExampleCmd(args []string, s streams) error {
	var o exampleOptions
	fs := newFlags("example", "example > my-reaction.yaml",
		"  falloff example > ring.yaml     # write the demo input, then edit it\n  falloff micro ring.yaml", s)
	o.addFlags(fs)
	args, err := parseVerb(fs, args, o.validate)
	if err != nil {
		return err
	}
	return runExample(s)
}

func runExample(s streams) error {
	_, err := s.out.Write(demo.Text)
	return err
}
