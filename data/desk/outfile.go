package desk

import (
	"bufio"
	"errors"
	"fmt"
	"io"
	"io/fs"
	"os"
	"path/filepath"
)

// ErrExists refuses to replace a file that is already there.
var ErrExists = errors.New("the file is already there")

// ExistsError names the file an export or report would have replaced.
type ExistsError struct{ Path string }

func (e *ExistsError) Error() string {
	return fmt.Sprintf("%s is already there: give another name, or replace it on purpose (force)", e.Path)
}

func (e *ExistsError) Unwrap() error { return ErrExists }

// WriteFile writes a report or an export to path through write. The
// bytes go to a temporary file in the same folder, are synced, and only
// then appear under path, so a reader (or a pulled USB stick) never sees
// half a file. An existing file is never replaced unless force: the
// temporary file is hard-linked to path, which fails when path exists
// (on a file system without hard links, such as FAT, the check and the
// rename are two steps). When write fails nothing appears and the error
// is returned as it is.
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
	tmp, err := os.CreateTemp(dir, "."+filepath.Base(path)+".tmp-*")
	if err != nil {
		return fmt.Errorf("cannot write in %s: %w", dir, err)
	}
	name := tmp.Name()
	defer func() {
		if tmp != nil {
			tmp.Close()
		}
		os.Remove(name) // after a link or a failure; gone already after a rename
	}()
	bw := bufio.NewWriterSize(tmp, 1<<16)
	if err := write(bw); err != nil {
		return err
	}
	if err := bw.Flush(); err != nil {
		return fmt.Errorf("writing %s: %w", path, err)
	}
	if err := tmp.Sync(); err != nil {
		return fmt.Errorf("writing %s: %w", path, err)
	}
	if err := tmp.Chmod(0o644); err != nil {
		return fmt.Errorf("writing %s: %w", path, err)
	}
	err = tmp.Close()
	tmp = nil
	if err != nil {
		return fmt.Errorf("writing %s: %w", path, err)
	}
	if err := place(name, path, force); err != nil {
		return err
	}
	syncDir(dir)
	return nil
}

// place moves the finished temporary file to path.
func place(tmp, path string, force bool) error {
	if force {
		if err := os.Rename(tmp, path); err != nil {
			return fmt.Errorf("cannot write %s: %w", path, err)
		}
		return nil
	}
	err := os.Link(tmp, path)
	switch {
	case err == nil:
		return nil
	case errors.Is(err, fs.ErrExist):
		return &ExistsError{path}
	}
	// No hard links here: check, then rename.
	if _, err := os.Lstat(path); err == nil {
		return &ExistsError{path}
	}
	if err := os.Rename(tmp, path); err != nil {
		return fmt.Errorf("cannot write %s: %w", path, err)
	}
	return nil
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

// syncDir makes a rename durable where the system allows it.
func syncDir(dir string) {
	if f, err := os.Open(dir); err == nil {
		f.Sync()
		f.Close()
	}
}
