// Command falloff computes RRKM and master-equation rate coefficients for
// unimolecular reactions and writes them in forms mechanism simulators read.
// Run `falloff help` for the verbs.
package main

import "os"

func main() { os.Exit(run(os.Args[1:], os.Stdin, os.Stdout, os.Stderr)) }
