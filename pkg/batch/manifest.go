package batch

import (
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"slices"
	"strconv"
	"strings"

	"go.yaml.in/yaml/v3"

	"github.com/falloff-kinetics/falloff/pkg/input"
)

// Manifest is a batch manifest read from its file: the reactions it lists,
// in the manifest's order (each glob's matches sorted by path), the shared
// input sections and the run options.
type Manifest struct {
	// File is the manifest's path as given; Dir the folder that relative
	// paths in it are taken from.
	File, Dir string
	// Source is the manifest's text.
	Source []byte
	// Title is the manifest's title: (or its file name without one).
	Title string
	// Output is the output folder the manifest names (relative to Dir,
	// joined), "" if it names none.
	Output string
	// Settings are the shared input sections, in file order.
	Settings []Section
	// Options are the run options of every reaction, in file order.
	Options []Option
	// Reactions are the reactions, in manifest order.
	Reactions []Reaction
}

// Section is one shared input section of a manifest's settings: (bath:,
// grid:, …) with its YAML value.
type Section struct {
	Key   string
	Value *yaml.Node
	Line  int // of the key in the manifest
}

// Option is one run option: the name of a rates flag without the dashes
// (direction, tolerance, energy-unit, …) and its value as written.
type Option struct {
	Key, Value string
	Line       int // in the manifest
}

// Reaction is one reaction of a manifest: its name (the output folder's
// name), its input file and the options of its entry, which override the
// manifest's.
type Reaction struct {
	Name  string
	Input string // path of the input file (the manifest's Dir joined)
	// Rel is the input's path relative to the manifest's folder, with
	// slashes: the same however the manifest's path is spelled, so keys and
	// the merged files do not depend on the working folder.
	Rel     string
	Options []Option
	Line    int // of the entry in the manifest
}

// SettingKeys are the input sections a manifest may share: each fills the
// section of that name in an input that lacks it.
var SettingKeys = []string{"bath", "energy-transfer", "grid", "fits", "energy-grid"}

// EntryOptionKeys are the run options an entry of the manifest may set
// for its reactions (and the manifest for all); they change one
// reaction's result only.
var EntryOptionKeys = []string{"direction", "tolerance", "grain", "ceiling", "skip-check", "skip-held-out", "free-limits", "work-limit"}

// MechanismOptionKeys are the run options only the manifest may set: the
// units of every file, which the merged mechanism shares.
var MechanismOptionKeys = []string{"energy-unit", "quantity", "pressure-unit", "skeleton"}

// MaxManifestBytes is the largest manifest read.
const MaxManifestBytes = 1 << 20

// ReadManifest reads and checks the manifest at path: its keys, the
// settings and options it may hold, and its inputs (each glob must match a
// file; two reactions may not share a name). An explicit input file that
// does not exist is kept: that reaction fails when it runs, the others
// run. Problems are *input.FieldError values naming the manifest's line.
func ReadManifest(path string) (*Manifest, error) {
	fi, err := os.Stat(path)
	if err != nil {
		return nil, err
	}
	if fi.Size() > MaxManifestBytes {
		return nil, &input.FieldError{File: path, Err: fmt.Errorf("manifest of %d bytes is too large (at most %d)", fi.Size(), MaxManifestBytes),
			Hint: "list input files or globs, not their contents"}
	}
	data, err := os.ReadFile(path)
	if err != nil {
		return nil, err
	}
	return ParseManifest(path, data)
}

// ParseManifest reads a manifest from data; path names it in messages and
// fixes the folder of relative paths.
func ParseManifest(path string, data []byte) (*Manifest, error) {
	m := &Manifest{File: path, Dir: filepath.Dir(path), Source: data}
	fail := func(n *yaml.Node, field, value string, err error, hint string) error {
		fe := &input.FieldError{File: path, Path: field, Value: value, Err: err, Hint: hint}
		if n != nil {
			fe.Line = n.Line
		}
		return fe
	}
	var doc yaml.Node
	if err := yaml.Unmarshal(data, &doc); err != nil {
		return nil, fail(nil, "", "", fmt.Errorf("not valid YAML: %s", strings.SplitN(err.Error(), "\n", 2)[0]), "a manifest is a YAML mapping with inputs:, settings: and options:; see docs/batch.md")
	}
	if doc.Kind != yaml.DocumentNode || len(doc.Content) != 1 || doc.Content[0].Kind != yaml.MappingNode {
		return nil, fail(nil, "", "", errors.New("the top level is not a mapping of keys"), "a manifest starts with inputs:; see docs/batch.md")
	}
	top := doc.Content[0]
	var inputs *yaml.Node
	for i := 0; i+1 < len(top.Content); i += 2 {
		k, v := top.Content[i], top.Content[i+1]
		switch k.Value {
		case "title":
			if v.Kind != yaml.ScalarNode {
				return nil, fail(v, "title", "", errors.New("not a text"), `give one line, e.g. title: "C3 ring openings (invented)"`)
			}
			m.Title = v.Value
		case "output":
			if v.Kind != yaml.ScalarNode || v.Value == "" {
				return nil, fail(v, "output", "", errors.New("not a folder name"), "give the output folder, relative to the manifest")
			}
			m.Output = filepath.Join(m.Dir, v.Value)
		case "inputs":
			inputs = v
		case "settings":
			if v.Kind != yaml.MappingNode {
				return nil, fail(v, "settings", "", errors.New("not a mapping"), "settings: maps input sections ("+strings.Join(SettingKeys, ", ")+") to their shared values")
			}
			for j := 0; j+1 < len(v.Content); j += 2 {
				sk := v.Content[j]
				if !slices.Contains(SettingKeys, sk.Value) {
					return nil, fail(sk, "settings."+sk.Value, "", errors.New("not a section a manifest can share"),
						"shared sections: "+strings.Join(SettingKeys, ", ")+"; molecules and reactions belong in each input file")
				}
				if slices.ContainsFunc(m.Settings, func(s Section) bool { return s.Key == sk.Value }) {
					return nil, fail(sk, "settings."+sk.Value, "", errors.New("given twice"), "keep one")
				}
				m.Settings = append(m.Settings, Section{Key: sk.Value, Value: v.Content[j+1], Line: sk.Line})
			}
		case "options":
			opts, err := options(path, "options", v, append(slices.Clone(EntryOptionKeys), MechanismOptionKeys...))
			if err != nil {
				return nil, err
			}
			m.Options = opts
		default:
			return nil, fail(k, k.Value, "", errors.New("unknown key"), "a manifest has title:, output:, inputs:, settings: and options:")
		}
	}
	if m.Title == "" {
		m.Title = strings.TrimSuffix(filepath.Base(path), filepath.Ext(path))
	}
	if inputs == nil || inputs.Kind != yaml.SequenceNode || len(inputs.Content) == 0 {
		return nil, fail(inputs, "inputs", "", errors.New("missing or empty"), "list the input files or globs, e.g. inputs: [reactions/*.yaml]")
	}
	seen := map[string]int{} // name → index in m.Reactions
	for i, e := range inputs.Content {
		field := "inputs[" + strconv.Itoa(i) + "]"
		rs, err := m.entry(field, e)
		if err != nil {
			return nil, err
		}
		for _, r := range rs {
			if j, ok := seen[r.Name]; ok {
				return nil, fail(e, field, r.Input, fmt.Errorf("a second reaction named %q (the first is %s, line %d)", r.Name, m.Reactions[j].Input, m.Reactions[j].Line),
					"each reaction's output folder is named after its file; give one of them a name: {file: …, name: …}")
			}
			seen[r.Name] = len(m.Reactions)
			m.Reactions = append(m.Reactions, r)
		}
	}
	return m, nil
}

// entry reads one entry of inputs: a file or glob, or a mapping {file,
// name, options}.
func (m *Manifest) entry(field string, e *yaml.Node) ([]Reaction, error) {
	fail := func(n *yaml.Node, f, value string, err error, hint string) error {
		return &input.FieldError{File: m.File, Line: n.Line, Path: f, Value: value, Err: err, Hint: hint}
	}
	var pattern, name string
	var opts []Option
	switch e.Kind {
	case yaml.ScalarNode:
		pattern = e.Value
	case yaml.MappingNode:
		for j := 0; j+1 < len(e.Content); j += 2 {
			k, v := e.Content[j], e.Content[j+1]
			switch k.Value {
			case "file":
				pattern = v.Value
			case "name":
				name = v.Value
				if !validName(name) {
					return nil, fail(v, field+".name", name, errors.New("not a usable folder name"), "letters, digits, '.', '_' and '-', not starting with '.'")
				}
			case "options":
				var err error
				if opts, err = options(m.File, field+".options", v, EntryOptionKeys); err != nil {
					return nil, err
				}
			default:
				return nil, fail(k, field+"."+k.Value, "", errors.New("unknown key"), "an entry has file:, name: and options:")
			}
		}
	default:
		return nil, fail(e, field, "", errors.New("not a file name"), "give a file or glob, or {file: …, name: …, options: {…}}")
	}
	if pattern == "" {
		return nil, fail(e, field+".file", "", errors.New("missing"), "name the input file or a glob, relative to the manifest")
	}
	full := pattern
	if !filepath.IsAbs(full) {
		full = filepath.Join(m.Dir, pattern)
	}
	if !strings.ContainsAny(pattern, "*?[") {
		if name == "" {
			name = stem(full)
			if !validName(name) {
				return nil, fail(e, field, pattern, errors.New("the file's name is not a usable folder name"), "give the entry a name: {file: …, name: …} (letters, digits, '.', '_', '-')")
			}
		}
		return []Reaction{{Name: name, Input: full, Rel: m.rel(full), Options: opts, Line: e.Line}}, nil
	}
	if name != "" {
		return nil, fail(e, field+".name", name, errors.New("a name for a glob"), "name: is for one file; a glob's reactions are named after their files")
	}
	files, err := filepath.Glob(full)
	if err != nil {
		return nil, fail(e, field, pattern, err, "check the glob's brackets")
	}
	if len(files) == 0 {
		return nil, fail(e, field, pattern, errors.New("matches no file"), "globs are relative to the manifest's folder, "+m.Dir)
	}
	slices.Sort(files)
	var out []Reaction
	for _, f := range files {
		if !validName(stem(f)) {
			return nil, fail(e, field, f, errors.New("the file's name is not a usable folder name"), "list it on its own with a name: {file: …, name: …}")
		}
		out = append(out, Reaction{Name: stem(f), Input: f, Rel: m.rel(f), Options: opts, Line: e.Line})
	}
	return out, nil
}

// options reads a mapping of run options, each a scalar, keys from allowed.
func options(file, field string, v *yaml.Node, allowed []string) ([]Option, error) {
	if v.Kind != yaml.MappingNode {
		return nil, &input.FieldError{File: file, Line: v.Line, Path: field, Err: errors.New("not a mapping"), Hint: "e.g. {direction: forward, tolerance: 5}"}
	}
	var out []Option
	for j := 0; j+1 < len(v.Content); j += 2 {
		k, val := v.Content[j], v.Content[j+1]
		if !slices.Contains(allowed, k.Value) {
			hint := "options here: " + strings.Join(allowed, ", ")
			if slices.Contains(MechanismOptionKeys, k.Value) {
				hint = "the units are the merged mechanism's, so only the manifest's options: can set them"
			}
			return nil, &input.FieldError{File: file, Line: k.Line, Path: field + "." + k.Value, Err: errors.New("not an option here"), Hint: hint}
		}
		if val.Kind != yaml.ScalarNode {
			return nil, &input.FieldError{File: file, Line: val.Line, Path: field + "." + k.Value, Err: errors.New("not a single value"), Hint: "give it as the rates flag takes it, e.g. tolerance: 5"}
		}
		if slices.ContainsFunc(out, func(o Option) bool { return o.Key == k.Value }) {
			return nil, &input.FieldError{File: file, Line: k.Line, Path: field + "." + k.Value, Err: errors.New("given twice"), Hint: "keep one"}
		}
		out = append(out, Option{Key: k.Value, Value: val.Value, Line: k.Line})
	}
	return out, nil
}

// rel returns path relative to the manifest's folder, with slashes; an
// absolute path when it has none (another volume).
func (m *Manifest) rel(path string) string {
	dir, err1 := filepath.Abs(m.Dir)
	abs, err2 := filepath.Abs(path)
	if err1 != nil || err2 != nil {
		return filepath.ToSlash(path)
	}
	r, err := filepath.Rel(dir, abs)
	if err != nil {
		return filepath.ToSlash(abs)
	}
	return filepath.ToSlash(r)
}

// stem is a file's name without folder and extension.
func stem(path string) string {
	b := filepath.Base(path)
	return strings.TrimSuffix(b, filepath.Ext(b))
}

// validName reports whether s is usable as a folder name everywhere.
func validName(s string) bool {
	if s == "" || s[0] == '.' || len(s) > 100 {
		return false
	}
	for _, r := range s {
		if !(r >= 'a' && r <= 'z' || r >= 'A' && r <= 'Z' || r >= '0' && r <= '9' || strings.ContainsRune("._-", r)) {
			return false
		}
	}
	return true
}

// EffectiveOptions returns r's run options: the manifest's, each replaced
// by the entry's of the same key, in the order of the manifest's then the
// entry's new keys.
func (m *Manifest) EffectiveOptions(r Reaction) []Option {
	out := slices.Clone(m.Options)
	for _, o := range r.Options {
		if i := slices.IndexFunc(out, func(x Option) bool { return x.Key == o.Key }); i >= 0 {
			out[i] = o
		} else {
			out = append(out, o)
		}
	}
	return out
}
