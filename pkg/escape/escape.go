// Package escape makes text from input files safe to show: every rune that
// could act on a terminal or break a one-line message is written as a Go
// escape. The input reader, the table reader and the writers share it.
package escape

import (
	"fmt"
	"strconv"
	"strings"
	"unicode"
	"unicode/utf8"
)

// NotPrintable reports a rune a message must not carry raw: anything
// unicode.IsPrint refuses except the plain space (control and format
// characters, line and paragraph separators), and invalid UTF-8.
func NotPrintable(r rune) bool { return r != ' ' && !unicode.IsPrint(r) || r == utf8.RuneError }

// Printable escapes, as %q would, every rune of s that NotPrintable
// refuses; an invalid byte is written \xNN.
func Printable(s string) string {
	if !strings.ContainsFunc(s, NotPrintable) {
		return s
	}
	var b strings.Builder
	for i, r := range s {
		switch {
		case r == utf8.RuneError:
			if _, size := utf8.DecodeRuneInString(s[i:]); size == 1 {
				fmt.Fprintf(&b, `\x%02x`, s[i]) // an invalid byte
			} else {
				b.WriteString(`\ufffd`)
			}
		case NotPrintable(r):
			q := strconv.QuoteRune(r)
			b.WriteString(q[1 : len(q)-1])
		default:
			b.WriteRune(r)
		}
	}
	return b.String()
}
