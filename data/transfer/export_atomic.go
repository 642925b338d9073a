package transfer

import (
	"bufio"
	"errors"
	"fmt"
	"io"
	"io/fs"
	"os"
	"path/filepath"
	"time"
)

// Temporary files of WriteFileAtomic and WriteFileNew are named
// .baleassay-<random>.tmp in the target's folder; CleanStaleTemps removes
// the ones a killed writer left.
const (
	tempPrefix = ".baleassay-"
	tempSuffix = ".tmp"
)

// staleAfter is how old a temporary file must be before it counts as
// left behind (its writer also holds a lock on it where the system has
// file locks). Tests shorten it.
var staleAfter = 10 * time.Second

// ErrTargetExists refuses to write over an existing file. It wraps
// fs.ErrExist.
var ErrTargetExists = fmt.Errorf("file exists and is not replaced: %w", fs.ErrExist)

// WriteFileAtomic writes b to path so that path holds either its old
// content or all of b, never a part: it writes a temporary file in the
// same folder, syncs it, renames it over path and syncs the folder, the
// sequence POSIX rename(2) semantics make crash-safe on local
// filesystems. On error the temporary file is removed and path is
// untouched.
func WriteFileAtomic(path string, b []byte, perm os.FileMode) error {
	return writeFile(path, b, perm, true)
}

// WriteFileNew is WriteFileAtomic for a file that must not exist yet: it
// never replaces one, even one created while it writes (the final step
// is renameat2 with RENAME_NOREPLACE on Linux, which FAT and exFAT sticks
// support, or a hard link elsewhere). An existing path gives
// ErrTargetExists and leaves it as it was.
func WriteFileNew(path string, b []byte, perm os.FileMode) error {
	return writeFile(path, b, perm, false)
}

// WriteStream is WriteFileAtomic (replace) or WriteFileNew (not replace)
// with the bytes written by write through a buffer, so that a large
// export or report never sits in memory whole. When write fails nothing
// appears at path and write's error is returned as it is.
func WriteStream(path string, perm os.FileMode, replace bool, write func(w io.Writer) error) error {
	return writeWith(path, perm, replace, func(f *os.File, tmp string) error {
		bw := bufio.NewWriterSize(f, 1<<16)
		if err := write(bw); err != nil {
			return err
		}
		if err := bw.Flush(); err != nil {
			return fmt.Errorf("writing %s: %w", tmp, err)
		}
		return nil
	})
}

func writeFile(path string, b []byte, perm os.FileMode, replace bool) error {
	return writeWith(path, perm, replace, func(f *os.File, tmp string) error {
		if _, err := f.Write(b); err != nil {
			return fmt.Errorf("writing %s: %w", tmp, err)
		}
		return nil
	})
}

// writeWith writes a temporary file in path's folder through fill,
// syncs it and puts it in place (replacing path or never), then syncs
// the folder.
func writeWith(path string, perm os.FileMode, replace bool, fill func(f *os.File, tmp string) error) (err error) {
	dir := filepath.Dir(path)
	f, err := os.CreateTemp(dir, tempPrefix+"*"+tempSuffix)
	if err != nil {
		return fmt.Errorf("cannot write in %s: %w", dir, err)
	}
	lockTemp(f) // held until f is closed: CleanStaleTemps leaves it alone
	tmp := f.Name()
	closed := false
	defer func() {
		if !closed {
			f.Close()
		}
		if err != nil {
			os.Remove(tmp)
		}
	}()
	if err = f.Chmod(perm); err != nil {
		return fmt.Errorf("%s: %w", tmp, err)
	}
	if err = fill(f, tmp); err != nil {
		return err
	}
	if err = f.Sync(); err != nil {
		return fmt.Errorf("syncing %s: %w", tmp, err)
	}
	if closeBeforeRename {
		closed = true
		if err = f.Close(); err != nil {
			return fmt.Errorf("closing %s: %w", tmp, err)
		}
	}
	if replace {
		err = os.Rename(tmp, path)
	} else {
		err = renameNoReplace(tmp, path)
	}
	if errors.Is(err, fs.ErrExist) {
		return fmt.Errorf("%w: %s", ErrTargetExists, path)
	}
	if err != nil {
		return fmt.Errorf("renaming into %s: %w", path, err)
	}
	if !closed {
		closed = true
		if err = f.Close(); err != nil {
			return fmt.Errorf("closing %s: %w", path, err)
		}
	}
	return syncDir(dir)
}

// linkNoReplace places tmp at path with a hard link (which fails if path
// exists) and removes tmp. Where the filesystem has no hard links it
// checks that path is free and renames: that last fallback leaves a
// moment in which a file created by another program could be replaced.
func linkNoReplace(tmp, path string) error {
	err := os.Link(tmp, path)
	if err == nil {
		return os.Remove(tmp)
	}
	if errors.Is(err, fs.ErrExist) {
		return err
	}
	if _, serr := os.Lstat(path); serr == nil {
		return fs.ErrExist
	}
	return os.Rename(tmp, path)
}

// CleanStaleTemps removes the temporary files a killed WriteFileAtomic
// or WriteFileNew left in dir: those older than a few seconds whose
// writer no longer holds their lock. It returns how many it removed;
// failures to remove are ignored (the next run tries again).
func CleanStaleTemps(dir string) int {
	m, err := filepath.Glob(filepath.Join(dir, tempPrefix+"*"+tempSuffix))
	if err != nil {
		return 0
	}
	n := 0
	for _, p := range m {
		st, err := os.Lstat(p)
		if err != nil || !st.Mode().IsRegular() || time.Since(st.ModTime()) < staleAfter {
			continue
		}
		if removeIfUnlocked(p) {
			n++
		}
	}
	return n
}

// syncDir fsyncs a folder so a rename or create in it is durable.
func syncDir(dir string) error {
	d, err := os.Open(dir)
	if err != nil {
		return fmt.Errorf("opening folder %s to sync: %w", dir, err)
	}
	defer d.Close()
	if err := d.Sync(); err != nil {
		return fmt.Errorf("syncing folder %s: %w", dir, err)
	}
	return nil
}
