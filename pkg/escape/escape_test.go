package escape

import (
	"strconv"
	"testing"
)

// Printable writes what strconv.Quote would for each unprintable rune (the
// Go spec's escapes, an outside reference) and leaves printable text,
// spaces and non-ASCII letters alone.
func TestPrintable(t *testing.T) {
	for _, c := range []struct{ in, want string }{
		{"ring", "ring"},
		{"a b é ∞", "a b é ∞"},
		{"a\x1bb", `a\x1bb`},
		{"a\u2028b", `a\u2028b`},
		{"a\u0085b", `a\u0085b`},
		{"a\vb\n", `a\vb\n`},
		{"\xff", `\xff`},
	} {
		if got := Printable(c.in); got != c.want {
			t.Errorf("Printable(%s) = %s, want %s", strconv.Quote(c.in), got, c.want)
		}
	}
}
