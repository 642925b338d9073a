package desk

import (
	"errors"
	"fmt"
	"io"
	"io/fs"
	"os"
	"path/filepath"

	"baleassay/data/transfer"
)

// ErrExists refuses to replace a file that is already there.
var ErrExists = errors.New("the file is already there")

// ExistsError names the file an export or report would have replaced.
type ExistsError struct{ Path string }

func (e *ExistsError) Error() string {
	return fmt.Sprintf("%s is already there: give another name, or replace it on purpose (force)", e.Path)
}

func (e *ExistsError) Unwrap() error { return ErrExists }

// WriteFile writes a report or an export to path through write, as
// bundles are written (transfer.WriteStream): the bytes go to a
// temporary file in the same folder, are synced, and only then appear
// under path, so a reader (or a pulled USB stick) never sees half a
// file. An existing file is never replaced unless force, not even one
// made while the bytes are written: the last step is renameat2 with
// RENAME_NOREPLACE on Linux (FAT and exFAT sticks support it) or a hard
// link. When write fails nothing appears and the error is returned as it
// is.
func WriteFile(path string, force bool, write func(w io.Writer) error) error {
	dir := filepath.Dir(path)
	if err := checkOutFolder(dir); err != nil {
		return err
	}
	if fi, err := os.Stat(path); err == nil {
		if fi.IsDir() {
			return fmt.Errorf("%w: %s is a folder: give a file name", ErrUsage, path)
		}
		if !force {
			return &ExistsError{path}
		}
	}
	err := transfer.WriteStream(path, 0o644, force, write)
	if !force && errors.Is(err, transfer.ErrTargetExists) {
		return &ExistsError{path}
	}
	return err
}

// checkOutFolder refuses, before any work, a folder that is not there.
func checkOutFolder(dir string) error {
	fi, err := os.Stat(dir)
	switch {
	case errors.Is(err, fs.ErrNotExist):
		return fmt.Errorf("%w: folder %s does not exist: create it (or mount the stick) first", ErrUsage, dir)
	case err != nil:
		return fmt.Errorf("cannot use %s: %w", dir, err)
	case !fi.IsDir():
		return fmt.Errorf("%w: %s is a file, not a folder", ErrUsage, dir)
	}
	return nil
}
