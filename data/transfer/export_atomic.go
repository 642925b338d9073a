package transfer

import (
	"fmt"
	"os"
	"path/filepath"
)

// WriteFileAtomic writes b to path so that path holds either its old
// content or all of b, never a part: it writes a temporary file in the
// same folder, syncs it, renames it over path and syncs the folder, the
// sequence POSIX rename(2) semantics make crash-safe on local
// filesystems. On error the temporary file is removed and path is
// untouched.
func WriteFileAtomic(path string, b []byte, perm os.FileMode) (err error) {
	dir := filepath.Dir(path)
	f, err := os.CreateTemp(dir, "."+filepath.Base(path)+".tmp-*")
	if err != nil {
		return fmt.Errorf("data: cannot write in %s: %w", dir, err)
	}
	tmp := f.Name()
	defer func() {
		if err != nil {
			f.Close()
			os.Remove(tmp)
		}
	}()
	if err = f.Chmod(perm); err != nil {
		return fmt.Errorf("data: %s: %w", tmp, err)
	}
	if _, err = f.Write(b); err != nil {
		return fmt.Errorf("data: writing %s: %w", tmp, err)
	}
	if err = f.Sync(); err != nil {
		return fmt.Errorf("data: syncing %s: %w", tmp, err)
	}
	if err = f.Close(); err != nil {
		return fmt.Errorf("data: closing %s: %w", tmp, err)
	}
	if err = os.Rename(tmp, path); err != nil {
		return fmt.Errorf("data: renaming into %s: %w", path, err)
	}
	if err = syncDir(dir); err != nil {
		return err
	}
	return nil
}

// syncDir fsyncs a folder so a rename or create in it is durable.
func syncDir(dir string) error {
	d, err := os.Open(dir)
	if err != nil {
		return fmt.Errorf("data: opening folder %s to sync: %w", dir, err)
	}
	defer d.Close()
	if err := d.Sync(); err != nil {
		return fmt.Errorf("data: syncing folder %s: %w", dir, err)
	}
	return nil
}
