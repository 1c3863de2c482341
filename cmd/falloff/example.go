package main

import (
	"github.com/spf13/pflag"

	"github.com/falloff-kinetics/falloff/internal/demo"
)

type exampleOptions struct{ network bool }

func (o *exampleOptions) addFlags(fs *pflag.FlagSet) {
	fs.BoolVar(&o.network, "network", false, "print the demo network input instead (two invented wells, fragments and a bimolecular source)")
}

func (o *exampleOptions) validate(args []string) error {
	if len(args) != 0 {
		return usagef("example takes no arguments")
	}
	return nil
}

func runExampleCmd(args []string, s streams) error {
	var o exampleOptions
	fs := newFlags("example", "example > my-reaction.yaml",
		"  falloff example > ring.yaml     # write the demo input, then edit it\n  falloff micro ring.yaml\n  falloff example --network > net.yaml && falloff check net.yaml", s)
	o.addFlags(fs)
	args, err := parseVerb(fs, args, o.validate)
	if err != nil {
		return err
	}
	return runExample(o, s)
}

func runExample(o exampleOptions, s streams) error {
	text := demo.Text
	if o.network {
		text = demo.NetworkText
	}
	_, err := s.out.Write(text)
	return err
}
