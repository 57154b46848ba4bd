package design

import (
	"bytes"
	"errors"
	"fmt"
	"os"
	"regexp"
	"slices"
	"strconv"
	"strings"

	"github.com/BurntSushi/toml"

	"swrank/rank/stage"
)

// nonStageKeys are flags that are not part of a stage.
var nonStageKeys = map[string]bool{"parts": true, "demo": true, "partner": true, "format": true, "all": true, "top": true}

// Keys of the sections other than [stage]; [stage] takes every other stage
// flag.
var sectionKeys = map[string][]string{
	"driver":   {"vdrive", "vdrive-off", "rsrc", "rsnk", "ipk-src", "ipk-snk", "rg-ext", "iq", "drive-edge"},
	"thermal":  {"ta", "rth-ca", "tj"},
	"derating": {"derate"},
	"choice":   {"weighting", "parallel", "parallel-max", "fitted", "top", "partner"},
}

// file is the decoded design file.
type file struct {
	path     string
	keys     map[string]keyPos
	Parts    rawValue              `toml:"parts"`
	Stage    map[string]rawValue   `toml:"stage"`
	Driver   map[string]rawValue   `toml:"driver"`
	Thermal  map[string]rawValue   `toml:"thermal"`
	Derating map[string]rawValue   `toml:"derating"`
	Choice   map[string]rawValue   `toml:"choice"`
	Point    []map[string]rawValue `toml:"point"`
}

type section struct {
	name   string
	values map[string]rawValue
}

func (df *file) sections() []section {
	return []section{{"stage", df.Stage}, {"driver", df.Driver}, {"thermal", df.Thermal}, {"derating", df.Derating}, {"choice", df.Choice}}
}

// checkSection checks that key belongs in section sec.
func (df *file) checkSection(sec, key string, c Command) error {
	if keys, ok := sectionKeys[sec]; ok {
		if slices.Contains(keys, key) {
			return nil
		}
		return df.errAt(sec+"."+key, fmt.Errorf("unknown key in [%s] (want %s)", sec, strings.Join(keys, ", ")))
	}
	// [stage]: any stage flag, and valley.
	if key == "valley" {
		return nil
	}
	for _, keys := range sectionKeys {
		if slices.Contains(keys, key) {
			return df.errAt(sec+"."+key, fmt.Errorf("%s belongs in another section", key))
		}
	}
	// A stage flag of some command may sit in a design shared by rank,
	// compare and sweep.
	if nonStageKeys[key] || c.Flags.Lookup(key) == nil && c.StageFlags(&stage.Stage{}).Lookup(key) == nil {
		return df.errAt(sec+"."+key, errors.New("unknown key in [stage]"))
	}
	return nil
}

// rawValue is a design-file value kept as the text a flag would take.
type rawValue struct{ s string }

// UnmarshalTOML accepts strings ("500k", "4.7n"), numbers and booleans.
func (r *rawValue) UnmarshalTOML(v any) error {
	switch x := v.(type) {
	case string:
		r.s = x
	case float64:
		r.s = strconv.FormatFloat(x, 'g', -1, 64)
	case int64:
		r.s = strconv.FormatInt(x, 10)
	case bool:
		r.s = strconv.FormatBool(x)
	default:
		return fmt.Errorf("want a string, number or true/false, not a %T", v)
	}
	return nil
}

// keyPos is where a key sits in the design file.
type keyPos struct{ line, col int }

// Error is a problem in a design file, located like encoding/csv's
// ParseError.
type Error struct {
	File      string // the design file's path
	Line, Col int    // where the key sits, from 1; 0 when unknown
	Field     string // the key: section.key, point.N.key, or "syntax"
	Err       error  // the problem
}

// Error prints the problem after its place: file:line:col: field: problem.
func (e *Error) Error() string {
	if e.Line > 0 {
		return fmt.Sprintf("%s:%d:%d: %s: %v", e.File, e.Line, e.Col, e.Field, e.Err)
	}
	return fmt.Sprintf("%s: %s: %v", e.File, e.Field, e.Err)
}

// Unwrap returns the problem.
func (e *Error) Unwrap() error { return e.Err }

// errAt locates err at key (section.key or point.N.key).
func (df *file) errAt(key string, err error) error {
	p := df.keys[key]
	return &Error{File: df.path, Line: p.line, Col: p.col, Field: key, Err: err}
}

// load reads and decodes a design file.
func load(path string) (*file, error) {
	src, err := os.ReadFile(path)
	if err != nil {
		return nil, fmt.Errorf("design file: %w", err)
	}
	df := &file{path: path, keys: locateKeys(src)}
	md, err := toml.NewDecoder(bytes.NewReader(src)).Decode(df)
	if err != nil {
		var pe toml.ParseError
		if errors.As(err, &pe) {
			field := pe.LastKey
			if field == "" {
				field = "syntax"
			}
			return nil, &Error{File: path, Line: pe.Position.Line, Col: max(pe.Position.Col, 1), Field: field, Err: errors.New(pe.Message)}
		}
		return nil, fmt.Errorf("%s: %w", path, err)
	}
	if u := md.Undecoded(); len(u) > 0 {
		k := u[0].String()
		return nil, df.errAt(k, errors.New("unknown key (want parts, or a table [stage], [driver], [thermal], [derating], [choice] or [[point]])"))
	}
	return df, nil
}

var (
	tableRe = regexp.MustCompile(`^\s*(\[\[?)\s*([A-Za-z0-9_-]+)\s*\]\]?`)
	keyRe   = regexp.MustCompile(`^(\s*)("([^"]*)"|[A-Za-z0-9_-]+)\s*=`)
)

// locateKeys finds the line and column of each key of a design file,
// named section.key, point.N.key or key at the top: enough to point a
// user at the value to fix. (The TOML decoder reports the position of
// syntax errors itself.)
func locateKeys(src []byte) map[string]keyPos {
	out := map[string]keyPos{}
	prefix := ""
	points := 0
	for i, line := range strings.Split(string(src), "\n") {
		if m := tableRe.FindStringSubmatch(line); m != nil {
			name := m[2]
			if m[1] == "[[" {
				if name == "point" {
					points++
				}
				prefix = fmt.Sprintf("%s.%d", name, points)
			} else {
				prefix = name
			}
			out[prefix] = keyPos{i + 1, strings.Index(line, "[") + 1}
			continue
		}
		if m := keyRe.FindStringSubmatch(line); m != nil {
			k := m[2]
			if m[3] != "" {
				k = m[3]
			}
			full := k
			if prefix != "" {
				full = prefix + "." + k
			}
			out[full] = keyPos{i + 1, len(m[1]) + 1}
		}
	}
	return out
}

func sortedKeys[V any](m map[string]V) []string {
	keys := make([]string, 0, len(m))
	for k := range m {
		keys = append(keys, k)
	}
	slices.Sort(keys)
	return keys
}
