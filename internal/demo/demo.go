// Package demo holds the built-in demo input: an invented molecule, labelled
// as such, that the command line runs when it is given no file.
package demo

import _ "embed"

// Name is the file name the demo reports as its source.
const Name = "demo.yaml"

// Text is the demo input file.
//
//go:embed demo.yaml
var Text []byte

// NetworkName is the file name the demo network reports as its source.
const NetworkName = "network.yaml"

// NetworkText is the demo network input: two invented wells, fragments and
// a bimolecular source.
//
//go:embed network.yaml
var NetworkText []byte
