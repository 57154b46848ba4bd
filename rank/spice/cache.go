package spice

import (
	"crypto/sha256"
	"encoding/hex"
	"encoding/json"
	"fmt"
	"os"
	"path/filepath"
)

// Cache keeps simulation results on disk, keyed by a hash of everything
// that decides them (the model files' bytes, the deck text and the
// settings), so that a rerun simulates only what changed. A nil *Cache
// caches nothing.
type Cache struct {
	Dir string // directory of the entries; created on the first write
}

// cacheVersion changes whenever the meaning of a cached result changes.
const cacheVersion = "swrank-verify-1"

// DefaultCacheDir is the user's cache directory for swrank:
// os.UserCacheDir()/swrank (e.g. ~/.cache/swrank on Linux).
func DefaultCacheDir() (string, error) {
	d, err := os.UserCacheDir()
	if err != nil {
		return "", fmt.Errorf("cache directory: %w", err)
	}
	return filepath.Join(d, "swrank"), nil
}

// Key hashes its parts, each length-prefixed, into a cache key.
func Key(parts ...[]byte) string {
	h := sha256.New()
	h.Write([]byte(cacheVersion))
	for _, p := range parts {
		fmt.Fprintf(h, "\x00%d\x00", len(p))
		h.Write(p)
	}
	return hex.EncodeToString(h.Sum(nil))
}

func (c *Cache) path(key string) string { return filepath.Join(c.Dir, "verify", key+".json") }

// Get reads the entry key into v and reports whether there was one.
func (c *Cache) Get(key string, v any) bool {
	if c == nil || c.Dir == "" {
		return false
	}
	b, err := os.ReadFile(c.path(key))
	if err != nil {
		return false
	}
	return json.Unmarshal(b, v) == nil
}

// Put writes v as the entry key, atomically (a temporary file renamed
// into place).
func (c *Cache) Put(key string, v any) error {
	if c == nil || c.Dir == "" {
		return nil
	}
	b, err := json.Marshal(v)
	if err != nil {
		return fmt.Errorf("cache: %w", err)
	}
	p := c.path(key)
	if err := os.MkdirAll(filepath.Dir(p), 0o755); err != nil {
		return fmt.Errorf("cache: %w", err)
	}
	f, err := os.CreateTemp(filepath.Dir(p), ".entry-*")
	if err != nil {
		return fmt.Errorf("cache: %w", err)
	}
	if _, err := f.Write(b); err != nil {
		f.Close()
		os.Remove(f.Name())
		return fmt.Errorf("cache: %w", err)
	}
	if err := f.Close(); err != nil {
		os.Remove(f.Name())
		return fmt.Errorf("cache: %w", err)
	}
	if err := os.Rename(f.Name(), p); err != nil {
		os.Remove(f.Name())
		return fmt.Errorf("cache: %w", err)
	}
	return nil
}
