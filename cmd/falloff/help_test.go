package main

import (
	"strings"
	"testing"
)

// Every verb's help prints its usage once, however it is asked for (pflag
// prints it on -h and --help; the verb must not print it again).
func TestHelpPrintedOnce(t *testing.T) {
	for _, v := range verbs() {
		for _, args := range [][]string{{v.name, "--help"}, {v.name, "-h"}, {"help", v.name}} {
			t.Run(strings.Join(args, " "), func(t *testing.T) {
				code, out, errs := runCLI(t, args...)
				if code != exitOK || errs != "" {
					t.Errorf("exit %d, stderr %q; want 0 and nothing", code, errs)
				}
				if n := strings.Count(out, "Usage:"); n != 1 {
					t.Errorf("Usage: printed %d times, want once:\n%s", n, out)
				}
				if n := strings.Count(out, "Example:"); n != 1 {
					t.Errorf("Example: printed %d times, want once", n)
				}
			})
		}
	}
}
