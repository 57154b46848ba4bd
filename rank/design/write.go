package design

import (
	"fmt"
	"os"
	"path/filepath"
)

// WriteAtomic writes data to path through a temporary file in the same
// directory, synced and then moved into place. With noClobber an existing
// file is never replaced: the move is a hard link, which fails when path
// exists (O_EXCL semantics), falling back to a checked rename where the
// file system has no hard links.
func WriteAtomic(path string, data []byte, noClobber bool) (err error) {
	dir := filepath.Dir(path)
	f, err := os.CreateTemp(dir, "."+filepath.Base(path)+".tmp-*")
	if err != nil {
		return fmt.Errorf("writing %s: %w", path, err)
	}
	tmp := f.Name()
	defer func() {
		if err != nil {
			os.Remove(tmp)
		}
	}()
	if err = f.Chmod(0o644); err == nil {
		if _, err = f.Write(data); err == nil {
			err = f.Sync()
		}
	}
	if cerr := f.Close(); err == nil {
		err = cerr
	}
	if err != nil {
		return fmt.Errorf("writing %s: %w", path, err)
	}
	if !noClobber {
		if err = os.Rename(tmp, path); err != nil {
			return fmt.Errorf("writing %s: %w", path, err)
		}
		return nil
	}
	if err = os.Link(tmp, path); err == nil {
		os.Remove(tmp)
		return nil
	}
	if os.IsExist(err) {
		return fmt.Errorf("%s already exists: it is left as it is", path)
	}
	// No hard links here: check, then rename (a narrow race remains).
	if _, serr := os.Lstat(path); serr == nil {
		err = fmt.Errorf("%s already exists: it is left as it is", path)
		return err
	}
	if err = os.Rename(tmp, path); err != nil {
		return fmt.Errorf("writing %s: %w", path, err)
	}
	return nil
}
