package devices

import (
	"hash/maphash"
	"strings"
)

// nameSet remembers the part names seen in one read, compared ignoring
// case, with the line of each. It is an open-addressing hash table of
// 64-bit hashes of the lower-cased names (cheaper than a map with string
// keys for 100k names); on a hash hit it compares the names themselves, so
// a collision never merges two different names.
type nameSet struct {
	seed    maphash.Seed
	slots   []nameSlot // power-of-two size, at most half full
	entries []nameEntry
}

type nameSlot struct {
	hash uint64
	idx  int32 // index in entries + 1; 0 = empty
}

type nameEntry struct {
	key  string // lower-cased name
	line int
}

func newNameSet(hint int) *nameSet {
	n := 64
	for n < 2*hint {
		n *= 2
	}
	return &nameSet{seed: maphash.MakeSeed(), slots: make([]nameSlot, n), entries: make([]nameEntry, 0, hint)}
}

// add records name at line. When a part of the same name (ignoring case)
// was seen, it returns that part's line and false.
func (s *nameSet) add(name string, line int) (first int, ok bool) {
	key := strings.ToLower(name)
	return s.addHash(key, maphash.String(s.seed, key), line)
}

// addHash is add with the key lower-cased and hashed.
func (s *nameSet) addHash(key string, h uint64, line int) (first int, ok bool) {
	mask := uint64(len(s.slots) - 1)
	for i := h & mask; ; i = (i + 1) & mask {
		sl := &s.slots[i]
		if sl.idx == 0 {
			s.entries = append(s.entries, nameEntry{key, line})
			*sl = nameSlot{h, int32(len(s.entries))}
			if 2*len(s.entries) > len(s.slots) {
				s.grow()
			}
			return 0, true
		}
		if sl.hash == h {
			if e := s.entries[sl.idx-1]; e.key == key {
				return e.line, false
			}
		}
	}
}

// grow doubles the table.
func (s *nameSet) grow() {
	old := s.slots
	s.slots = make([]nameSlot, 2*len(old))
	mask := uint64(len(s.slots) - 1)
	for _, sl := range old {
		if sl.idx == 0 {
			continue
		}
		i := sl.hash & mask
		for s.slots[i].idx != 0 {
			i = (i + 1) & mask
		}
		s.slots[i] = sl
	}
}
