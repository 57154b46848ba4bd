package devices

import (
	"fmt"
	"strings"
)

// PartNames remembers the part names read from several libraries, one
// after another, to refuse a name that two of them hold: which row a
// ranking would mean by it is then unclear. Names compare ignoring case,
// as within one library. The zero value is ready to use.
type PartNames struct {
	seen map[string]string // lower-cased name → source that held it first
}

// Add records the part name read from source. When another source held a
// part of the same name, the error (wrapping ErrDuplicatePart) names the
// part and both sources. Each library checks its own names as it is
// read; Add is for the names of one source after another.
func (n *PartNames) Add(name, source string) error {
	if n.seen == nil {
		n.seen = map[string]string{}
	}
	key := strings.ToLower(name)
	if first, ok := n.seen[key]; ok {
		return fmt.Errorf("%w: %q is in both %s and %s (rename one, or give one library)", ErrDuplicatePart, name, first, source)
	}
	n.seen[key] = source
	return nil
}

// Merge joins libraries read from different sources into one, in the
// order given: its Source lists theirs joined by ", ", its Parts, Unknown
// columns and Warnings are theirs in turn, and its Columns those of the
// first. A part name held by two libraries is an error naming both.
func Merge(libs ...*Library) (*Library, error) {
	switch len(libs) {
	case 0:
		return nil, ErrNoParts
	case 1:
		return libs[0], nil
	}
	out := &Library{Columns: libs[0].Columns}
	var names PartNames
	var sources []string
	for _, l := range libs {
		sources = append(sources, l.Source)
		for i := range l.Parts {
			if err := names.Add(l.Parts[i].Name, l.Source); err != nil {
				return nil, err
			}
		}
		out.Parts = append(out.Parts, l.Parts...)
		out.Unknown = append(out.Unknown, l.Unknown...)
		out.Warnings = append(out.Warnings, l.Warnings...)
	}
	out.Source = strings.Join(sources, ", ")
	return out, nil
}
