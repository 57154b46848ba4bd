package devices

import (
	"fmt"
	"testing"
)

// TestNameSet checks case-insensitive duplicates, growth, and that equal
// hashes of different names never merge them.
func TestNameSet(t *testing.T) {
	s := newNameSet(0)
	for i := range 5000 {
		if _, ok := s.add(fmt.Sprintf("Part-%d", i), i+2); !ok {
			t.Fatalf("part %d reported as duplicate", i)
		}
	}
	for i := range 5000 {
		if first, ok := s.add(fmt.Sprintf("PART-%d", i), 9999); ok || first != i+2 {
			t.Fatalf("PART-%d: ok %v, first %d", i, ok, first)
		}
	}
	// Equal hashes of different names: the names are compared.
	s = newNameSet(0)
	for i, k := range []string{"a", "b", "c"} {
		if _, ok := s.addHash(k, 42, i+1); !ok {
			t.Errorf("%s merged with another name of the same hash", k)
		}
	}
	if first, ok := s.addHash("b", 42, 9); ok || first != 2 {
		t.Errorf("b again: ok %v, first %d", ok, first)
	}
}
