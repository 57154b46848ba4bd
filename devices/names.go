package devices

import (
	"hash/maphash"
	"strings"
)

// nameSet remembers the part names seen in one read, compared ignoring
// case, with the line of each. It keys a map by a 64-bit hash of the
// lower-cased name (cheaper than string keys for 100k names) and compares
// the names themselves on a hash hit, so a collision never merges two
// different names.
type nameSet struct {
	seed    maphash.Seed
	byHash  map[uint64]int32 // hash → index in entries
	entries []nameEntry
	clashes map[string]int // names whose hash was taken by another name
}

type nameEntry struct {
	key  string // lower-cased name
	line int
}

func newNameSet(hint int) *nameSet {
	return &nameSet{seed: maphash.MakeSeed(), byHash: make(map[uint64]int32, hint), entries: make([]nameEntry, 0, hint)}
}

// add records name at line. When a part of the same name (ignoring case)
// was seen, it returns that part's line and false.
func (s *nameSet) add(name string, line int) (first int, ok bool) {
	key := strings.ToLower(name)
	h := maphash.String(s.seed, key)
	i, hit := s.byHash[h]
	if !hit {
		s.byHash[h] = int32(len(s.entries))
		s.entries = append(s.entries, nameEntry{key, line})
		return 0, true
	}
	if e := s.entries[i]; e.key == key {
		return e.line, false
	}
	if s.clashes == nil {
		s.clashes = map[string]int{}
	}
	if l, dup := s.clashes[key]; dup {
		return l, false
	}
	s.clashes[key] = line
	return 0, true
}
