package batch

import (
	"bytes"
	"crypto/sha256"
	"errors"
	"fmt"
	"io"
	"os"
	"regexp"
	"slices"
	"strconv"
	"strings"

	"go.yaml.in/yaml/v3"

	"github.com/falloff-kinetics/falloff/pkg/input"
	"github.com/falloff-kinetics/falloff/pkg/job"
)

// Resolved is one reaction of a manifest ready to run: its input text with
// the shared sections it lacks, its effective options and its key.
type Resolved struct {
	Reaction
	// Index is the reaction's position in the manifest, from 0.
	Index int
	// Text is the resolved input: the file's text, followed, when the
	// manifest fills sections the file lacks, by those sections.
	Text []byte
	// Applied names the sections taken from the manifest, in its order.
	Applied []string
	// Options are the effective run options (Manifest.EffectiveOptions).
	Options []Option
	// Key identifies the result: a hash of the format of the records,
	// the program version, the input's path relative to the manifest
	// (Rel), the options and Text.
	Key string
	// Err is set when the input cannot be read: the reaction fails with it.
	Err error

	manifest *Manifest
	// sharedLine is the first line of Text that comes from the manifest
	// (0 when the file's text is kept whole and nothing follows it, or
	// when the text was re-encoded and lines cannot be traced).
	sharedLine int
	reencoded  bool
}

// recordFormat changes when a record's meaning changes: every key changes
// with it, and every reaction is computed again.
const recordFormat = 1

// Resolve resolves every reaction of the manifest, in order. A reaction
// whose input cannot be read has Err set; the others are unaffected.
func (m *Manifest) Resolve() []*Resolved {
	out := make([]*Resolved, len(m.Reactions))
	for i, r := range m.Reactions {
		out[i] = m.resolve(i, r)
	}
	return out
}

func (m *Manifest) resolve(i int, r Reaction) *Resolved {
	res := &Resolved{Reaction: r, Index: i, Options: m.EffectiveOptions(r), manifest: m}
	text, err := readInput(r.Input)
	if err != nil {
		res.Err = err
		res.Key = "unreadable"
		return res
	}
	res.Text, res.Applied, res.sharedLine, res.reencoded = applySettings(text, m.Settings)
	h := sha256.New()
	fmt.Fprintf(h, "falloff batch record %d\n%s\n%s\n", recordFormat, job.Version, r.Rel)
	for _, o := range res.Options {
		fmt.Fprintf(h, "%s=%q\n", o.Key, o.Value)
	}
	h.Write([]byte("\n"))
	h.Write(res.Text)
	res.Key = fmt.Sprintf("sha256:%x", h.Sum(nil))
	return res
}

// readInput reads an input file of at most input.MaxFileBytes (a longer
// one is refused by the input reader with its own message).
func readInput(path string) ([]byte, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, err
	}
	defer f.Close()
	return io.ReadAll(io.LimitReader(f, input.MaxFileBytes+1))
}

// applySettings returns text with the shared sections it lacks: a
// node-level merge that fills only top-level keys the input does not have
// (a section the input has is the input's, whole). The input's own text is
// kept byte for byte and the sections follow it, so that the input
// reader's messages keep the file's line numbers; when the text cannot
// take a block appended (a flow mapping, a document end marker), the
// merged document is encoded anew. Text that is not a YAML mapping is
// returned as it is: the input reader refuses it with its own message.
func applySettings(text []byte, settings []Section) (out []byte, applied []string, sharedLine int, reencoded bool) {
	var doc yaml.Node
	if err := yaml.Unmarshal(text, &doc); err != nil || doc.Kind != yaml.DocumentNode || len(doc.Content) != 1 || doc.Content[0].Kind != yaml.MappingNode {
		return text, nil, 0, false
	}
	top := doc.Content[0]
	have := map[string]bool{}
	for i := 0; i < len(top.Content); i += 2 {
		have[top.Content[i].Value] = true
	}
	extra := &yaml.Node{Kind: yaml.MappingNode}
	for _, s := range settings {
		if !have[s.Key] {
			applied = append(applied, s.Key)
			extra.Content = append(extra.Content, &yaml.Node{Kind: yaml.ScalarNode, Tag: "!!str", Value: s.Key}, s.Value)
		}
	}
	if len(applied) == 0 {
		return text, nil, 0, false
	}
	block, err := encodeNode(extra)
	if err == nil && top.Style&yaml.FlowStyle == 0 {
		head := text
		if len(head) > 0 && head[len(head)-1] != '\n' {
			head = append(slices.Clip(head), '\n')
		}
		out = append(slices.Clone(head), block...)
		if sameKeys(out, top, extra) {
			return out, applied, bytes.Count(head, []byte("\n")) + 1, false
		}
	}
	top.Content = append(top.Content, extra.Content...)
	out, err = encodeNode(&doc)
	if err != nil {
		return text, nil, 0, false // the input reader will say what is wrong
	}
	return out, applied, 0, true
}

// encodeNode encodes n as YAML with two-space indents.
func encodeNode(n *yaml.Node) ([]byte, error) {
	var b bytes.Buffer
	enc := yaml.NewEncoder(&b)
	enc.SetIndent(2)
	if err := enc.Encode(n); err != nil {
		return nil, err
	}
	if err := enc.Close(); err != nil {
		return nil, err
	}
	return b.Bytes(), nil
}

// sameKeys reports whether text is one YAML mapping with the keys of top
// followed by those of extra: the check that appending did not change the
// document's structure.
func sameKeys(text []byte, top, extra *yaml.Node) bool {
	dec := yaml.NewDecoder(bytes.NewReader(text))
	var doc yaml.Node
	if dec.Decode(&doc) != nil || len(doc.Content) != 1 || doc.Content[0].Kind != yaml.MappingNode {
		return false
	}
	var more yaml.Node
	if !errors.Is(dec.Decode(&more), io.EOF) {
		return false // a second document
	}
	got := doc.Content[0].Content
	want := append(slices.Clone(top.Content), extra.Content...)
	if len(got) != len(want) {
		return false
	}
	for i := 0; i < len(got); i += 2 {
		if got[i].Value != want[i].Value {
			return false
		}
	}
	return true
}

// indexPart matches one "[n]" of a field path.
var indexPart = regexp.MustCompile(`\[(\d+)\]`)

// MapError returns err with, when it is an input problem in a section the
// manifest supplied, the manifest's file and line in place of the
// resolved text's: a shared setting's mistake is reported where it is
// written, with the input it was applied to.
func (r *Resolved) MapError(err error) error {
	var fe *input.FieldError
	if !errors.As(err, &fe) || len(r.Applied) == 0 {
		return err
	}
	section := strings.SplitN(indexPart.ReplaceAllString(fe.Path, ""), ".", 2)[0]
	if !slices.Contains(r.Applied, section) {
		return err
	}
	if !r.reencoded && fe.Line > 0 && fe.Line < r.sharedLine {
		return err // the file's own line
	}
	line := 0
	for _, s := range r.manifest.Settings {
		if s.Key == section {
			line = s.Line
			if n := nodeAt(s.Value, strings.TrimPrefix(strings.TrimPrefix(fe.Path, section), ".")); n != nil {
				line = n.Line
			}
		}
	}
	out := *fe
	out.File = r.manifest.File
	out.Line = line
	out.Path = "settings." + fe.Path
	out.Err = fmt.Errorf("%w (a shared setting, applied to %s)", fe.Err, r.Input)
	return &out
}

// nodeAt returns the node at the dotted path (with [n] indexes) below n,
// or nil.
func nodeAt(n *yaml.Node, path string) *yaml.Node {
	if path == "" {
		return n
	}
	for _, part := range strings.Split(path, ".") {
		key := part
		if i := strings.IndexByte(part, '['); i >= 0 {
			key = part[:i]
		}
		if key != "" {
			if n.Kind != yaml.MappingNode {
				return nil
			}
			var next *yaml.Node
			for j := 0; j+1 < len(n.Content); j += 2 {
				if n.Content[j].Value == key {
					next = n.Content[j+1]
				}
			}
			if next == nil {
				return nil
			}
			n = next
		}
		for _, m := range indexPart.FindAllStringSubmatch(part, -1) {
			k, _ := strconv.Atoi(m[1])
			if n.Kind != yaml.SequenceNode || k >= len(n.Content) {
				return nil
			}
			n = n.Content[k]
		}
	}
	return n
}
