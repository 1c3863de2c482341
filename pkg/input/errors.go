package input

import (
	"fmt"
	"github.com/falloff-kinetics/falloff/pkg/escape"
	"strconv"
	"strings"
	"unicode/utf8"
)

// FieldError reports one problem with one field of an input file. Its message
// is a single line,
//
//	FILE:LINE: PATH: "VALUE": problem (hint: HINT)
//
// where PATH is the dotted path of the field, such as
// molecules.ring.vibrations.values[3]. LINE is left out when unknown, PATH
// for a problem with the whole file, VALUE when the field is missing and the
// hint when there is none. Every character that is not printable (ESC, NEL,
// U+2028, invalid UTF-8) is written escaped, as strconv.Quote writes it, in
// every part; a VALUE longer than 80 characters is cut to its first 60 with
// an ellipsis and its length in bytes.
type FieldError struct {
	File  string // the file name given to Parse
	Line  int    // 1-based line in the file, 0 if unknown
	Path  string // dotted path of the field, "" for the whole file
	Value string // the offending value as written, "" if the field is missing
	Hint  string // how to fix it, "" if there is nothing to add
	Err   error  // what is wrong
}

func (e *FieldError) Error() string {
	var b strings.Builder
	b.WriteString(escape.Printable(e.File))
	if e.Line > 0 {
		b.WriteString(":" + strconv.Itoa(e.Line))
	}
	if e.Path != "" {
		b.WriteString(": " + escape.Printable(clipPath(e.Path)))
	}
	if e.Value != "" {
		b.WriteString(": " + quoteClipped(e.Value))
	}
	if e.Err != nil {
		b.WriteString(": " + escape.Printable(oneLine(e.Err.Error())))
	}
	if e.Hint != "" {
		b.WriteString(" (hint: " + escape.Printable(oneLine(e.Hint)) + ")")
	}
	return b.String()
}

// maxQuoted is the longest value, in runes, that a message quotes whole; a
// longer one (a 5 MB scalar, say) is cut to its first clipRunes runes and
// an ellipsis, and its length is given.
const (
	maxQuoted = 80
	clipRunes = 60
)

// quoteClipped quotes s as strconv.Quote does, which escapes every control
// and format character (ESC, NEL, U+2028, ...), cutting a long s.
func quoteClipped(s string) string {
	// strconv.Quote leaves U+FFFD as it is (it is printable); Printable
	// then writes it \ufffd, as every other rune a message must not carry.
	if utf8.RuneCountInString(s) <= maxQuoted {
		return escape.Printable(strconv.Quote(s))
	}
	cut := s
	for i := range s {
		if utf8.RuneCountInString(s[:i]) == clipRunes {
			cut = s[:i]
			break
		}
	}
	return fmt.Sprintf("%s… (%d bytes)", escape.Printable(strconv.Quote(cut)), len(s))
}

// clipPath cuts a path longer than maxPath bytes (one holding a huge key)
// in the middle, keeping its ends, and says how long it was.
func clipPath(path string) string {
	const maxPath, keep = 200, 60
	if len(path) <= maxPath {
		return path
	}
	head, tail := path[:keep], path[len(path)-keep:]
	for !utf8.ValidString(head) {
		head = head[:len(head)-1]
	}
	for !utf8.ValidString(tail) {
		tail = tail[1:]
	}
	return fmt.Sprintf("%s…%s (a path of %d bytes)", head, tail, len(path))
}

// Unwrap returns the underlying problem, so that errors.Is(err,
// units.ErrNoUnit) and errors.As(err, &unitErr) see through a FieldError.
func (e *FieldError) Unwrap() error { return e.Err }

// oneLine folds any line breaks so that a message stays on one line.
func oneLine(s string) string {
	if !strings.ContainsAny(s, "\r\n") {
		return s
	}
	return strings.Join(strings.Fields(s), " ")
}

// problem is the Err of a FieldError: a short description for the message,
// optionally wrapping the error that caused it (a *units.UnitError, say), whose
// own text would repeat the value and the hint.
type problem struct {
	msg   string
	cause error
}

func (p *problem) Error() string { return p.msg }
func (p *problem) Unwrap() error { return p.cause }

func problemf(format string, args ...any) error {
	return &problem{msg: fmt.Sprintf(format, args...)}
}
