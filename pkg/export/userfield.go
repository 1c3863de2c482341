package export

import (
	"bytes"
	"fmt"
	"math"
)

// UserField is an extra key of a reaction's Cantera YAML entry, written
// after its rate as
//
//	KEY: {NAME: 1.5, NAME: [300.0, 2000.0]}
//
// Cantera's reader keeps keys of an entry that it does not know as the
// reaction's input data and otherwise ignores them (Cantera YAML reference,
// "general.md"; from memory), so a mechanism can carry what its rates
// leave out, such as their uncertainty. Keys and names are lower-case
// letters, digits and '-'; values are finite numbers.
type UserField struct {
	Key    string
	Values []UserValue
}

// UserValue is one entry of a UserField: a number, or a list of numbers
// when there are several.
type UserValue struct {
	Name    string
	Numbers []float64
}

// plainKey reports whether s is a key YAML reads back as itself: lower-case
// letters, digits and '-', starting with a letter.
func plainKey(s string) bool {
	for i, c := range s {
		switch {
		case c >= 'a' && c <= 'z', c >= 'A' && c <= 'Z':
		case i > 0 && (c >= '0' && c <= '9' || c == '-' || c == '_'):
		default:
			return false
		}
	}
	return s != ""
}

// writeUserFields writes the fields of one entry, indented under it.
func writeUserFields(b *bytes.Buffer, fs []UserField) error {
	for _, f := range fs {
		if !plainKey(f.Key) {
			return fmt.Errorf("export: user field %q: keys are letters, digits, '-' and '_'", f.Key)
		}
		fmt.Fprintf(b, "  %s: {", f.Key)
		for i, v := range f.Values {
			if !plainKey(v.Name) || len(v.Numbers) == 0 {
				return fmt.Errorf("export: user field %s: entry %q: names are letters, digits, '-' and '_', with a number", f.Key, v.Name)
			}
			if i > 0 {
				b.WriteString(", ")
			}
			var nums []string
			for _, x := range v.Numbers {
				if math.IsNaN(x) || math.IsInf(x, 0) {
					return fmt.Errorf("export: user field %s.%s: %v is not a finite number", f.Key, v.Name, x)
				}
				nums = append(nums, yf(x))
			}
			if len(nums) == 1 {
				fmt.Fprintf(b, "%s: %s", v.Name, nums[0])
			} else {
				fmt.Fprintf(b, "%s: [%s]", v.Name, joinComma(nums))
			}
		}
		b.WriteString("}\n")
	}
	return nil
}

// joinComma joins s with ", ".
func joinComma(s []string) string {
	var b bytes.Buffer
	for i, x := range s {
		if i > 0 {
			b.WriteString(", ")
		}
		b.WriteString(x)
	}
	return b.String()
}
