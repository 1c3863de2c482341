package input

import "fmt"

// Renamed keys. A key renamed in this release is still read under its old
// name, with a warning, until the next one; the raw types hold both names
// (the old one tagged renamed:"NEW"), and hints list only the new.

// renameUse is one place where a file uses an old key name.
type renameUse struct {
	path     string // the field as written, with its old name
	old, new string // the key's old and new names
}

// renamedKey returns the name under which the mapping at parent gives the
// key newKey, formerly oldKey: oldKey if the file writes only that (noted
// for a warning), else newKey. Both names at once is an error.
func (p *parser) renamedKey(parent, newKey, oldKey string) (string, error) {
	oldPath := join(parent, oldKey)
	if _, ok := p.index.byPath[oldPath]; !ok {
		return newKey, nil
	}
	if _, ok := p.index.byPath[join(parent, newKey)]; ok {
		return "", p.errAt(oldPath, p.index.byPath[oldPath],
			problemf("given beside %s, its new name", newKey),
			fmt.Sprintf("keep %s and delete %s", newKey, oldKey))
	}
	p.renames = append(p.renames, renameUse{path: oldPath, old: oldKey, new: newKey})
	return oldKey, nil
}

// warnRenamed records one warning for each old key name the file uses, at
// its first place, saying how many more there are.
func (p *parser) warnRenamed() {
	var order []string
	first := map[string]renameUse{}
	count := map[string]int{}
	for _, u := range p.renames {
		if _, seen := first[u.old]; !seen {
			order = append(order, u.old)
			first[u.old] = u
		}
		count[u.old]++
	}
	for _, old := range order {
		u := first[old]
		more := ""
		if n := count[old] - 1; n > 0 {
			more = fmt.Sprintf("; it appears in %d more place%s", n, plural(n))
		}
		p.warn(u.path, "%q is the old name of %s (read until the next release): rename it%s", old, u.new, more)
	}
}
