package design

import (
	"os"
	"path/filepath"
	"testing"
)

// WriteAtomic with noClobber never replaces a file; without it, it
// replaces the file whole.
func TestWriteAtomic(t *testing.T) {
	dir := t.TempDir()
	p := filepath.Join(dir, "out.svg")
	if err := WriteAtomic(p, []byte("one"), true); err != nil {
		t.Fatal(err)
	}
	if err := WriteAtomic(p, []byte("two"), true); err == nil {
		t.Error("noClobber replaced a file")
	}
	if b, _ := os.ReadFile(p); string(b) != "one" {
		t.Errorf("content %q", b)
	}
	if err := WriteAtomic(p, []byte("three"), false); err != nil {
		t.Fatal(err)
	}
	if b, _ := os.ReadFile(p); string(b) != "three" {
		t.Errorf("content %q", b)
	}
	ents, _ := os.ReadDir(dir)
	if len(ents) != 1 {
		t.Errorf("files left: %v", ents)
	}
}
