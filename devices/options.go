package devices

import (
	"fmt"
	"io"
	"os"
	"strings"
)

// ReadOptions configures a read of a parts library. The zero value is the
// default that Read, Load, Check and Scan use.
type ReadOptions struct {
	// UnknownAsNotes accepts columns the loader does not know as the user's
	// own notes (a supplier reference, a colour): they are kept in the
	// library's Columns and Unknown, their cells are not read, and each is
	// reported once as a warning that names it. By default an unknown
	// column is an error, most often a misspelt column name whose values
	// would otherwise be silently dropped.
	UnknownAsNotes bool
}

// Read is the package's Read with these options.
func (o ReadOptions) Read(r io.Reader, name string) (*Library, error) {
	lib, probs := o.Check(r, name)
	if f := probs.Fatals(); len(f) > 0 {
		return lib, f
	}
	return lib, nil
}

// Load is the package's Load with these options.
func (o ReadOptions) Load(path string) (*Library, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, fmt.Errorf("parts library: %w", err)
	}
	defer f.Close()
	return o.Read(f, path)
}

// Check reads a parts library like Read and returns every problem found,
// warnings included, in file order: what a user needs to fix. The library
// is unusable when any problem is fatal (probs.Fatal()).
func (o ReadOptions) Check(r io.Reader, name string) (*Library, ProblemList) {
	return check(r, name, defaultDecoder(), o)
}

// Scan reads a parts library like Check but holds no parts: it calls fn
// for each valid part, in file order, with a pointer to a Part that is
// reused for the next row (copy it to keep it). When fn returns an error,
// Scan stops and the list ends with a fatal problem wrapping that error.
// Duplicate names are still detected, from the names seen so far.
func (o ReadOptions) Scan(r io.Reader, name string, fn func(*Part) error) (Header, ProblemList) {
	l := newLoader(name, fn, o)
	l.sizeHint = sizeOf(r)
	return l.scan(r, defaultDecoder())
}

// unknownColumn is the cause of a problem with an unknown column: an error,
// or a warning when unknown columns are accepted as notes; both name the
// closest known columns when one is near enough to be a misspelling.
func unknownColumn(name string, asNotes bool) error {
	msg := ErrUnknownColumn.Error()
	if asNotes {
		msg += ", kept as a note"
	}
	if near := closestColumns(name); len(near) > 0 {
		msg += "; did you mean " + strings.Join(near, " or ") + "?"
	}
	return &valueError{msg: msg, kind: ErrUnknownColumn}
}

// closestColumns returns the known column names nearest to name by edit
// distance, in Part's order, when they are near enough to be a typing slip
// (NearestNames).
func closestColumns(name string) []string {
	known := make([]string, len(partSchema.cols))
	for i := range partSchema.cols {
		known[i] = partSchema.cols[i].name
	}
	return NearestNames(name, known)
}

// NearestNames returns the names of known nearest to name by edit distance
// (insertions, deletions, substitutions and swaps of adjacent characters,
// ignoring case), in known's order, when they are near enough to be a
// typing slip: at most one edit for names of up to five characters, two up
// to eight, three beyond. A name equal to name (ignoring case) is not
// returned: it is no suggestion. It serves the suggestions for columns,
// part names and flags.
func NearestNames(name string, known []string) []string {
	a := []rune(strings.ToLower(name))
	limit := 1
	switch {
	case len(a) > 8:
		limit = 3
	case len(a) > 5:
		limit = 2
	}
	best := limit + 1
	var out []string
	for _, c := range known {
		switch d := editDistance(a, []rune(strings.ToLower(c))); {
		case d == 0:
		case d < best:
			best, out = d, append(out[:0], c)
		case d == best:
			out = append(out, c)
		}
	}
	return out
}

// editDistance is the optimal-string-alignment distance between a and b:
// the Levenshtein distance with a swap of two adjacent characters counted
// as one edit.
func editDistance(a, b []rune) int {
	// Three rows of the dynamic-programming table.
	prev2 := make([]int, len(b)+1)
	prev := make([]int, len(b)+1)
	cur := make([]int, len(b)+1)
	for j := range prev {
		prev[j] = j
	}
	for i := 1; i <= len(a); i++ {
		cur[0] = i
		for j := 1; j <= len(b); j++ {
			cost := 1
			if a[i-1] == b[j-1] {
				cost = 0
			}
			cur[j] = min(prev[j]+1, cur[j-1]+1, prev[j-1]+cost)
			if i > 1 && j > 1 && a[i-1] == b[j-2] && a[i-2] == b[j-1] {
				cur[j] = min(cur[j], prev2[j-2]+1)
			}
		}
		prev2, prev, cur = prev, cur, prev2
	}
	return prev[len(b)]
}
