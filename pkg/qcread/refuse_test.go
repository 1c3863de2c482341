package qcread

import (
	"errors"
	"io"
	"strings"
	"testing"
)

// refusal is a file a reader must refuse: a recorded broken file (name
// ending in .out) or text made in the test, and what the message says.
type refusal = struct{ name, text, want string }

// checkRefusals runs each case through the reader (readFile for recorded
// files under path, read for texts) and wants a *ReadError, no result, and
// one line naming the file and containing want.
func checkRefusals(t *testing.T, cases []refusal, path func(string) string,
	readFile func(string) (*Frequencies, error), read func(io.Reader, string) (*Frequencies, error)) {
	t.Helper()
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			var f *Frequencies
			var err error
			if strings.HasSuffix(tc.name, ".out") {
				f, err = readFile(path(tc.name))
			} else {
				f, err = read(strings.NewReader(tc.text), tc.name)
			}
			var re *ReadError
			if err == nil || !errors.As(err, &re) || f != nil {
				t.Fatalf("got %v, %v; want a *ReadError", f, err)
			}
			msg := err.Error()
			if !strings.Contains(msg, tc.want) || !strings.Contains(msg, tc.name) || strings.ContainsAny(msg, "\n\r") {
				t.Errorf("error %q: want one line naming %q and containing %q", msg, tc.name, tc.want)
			}
		})
	}
}
