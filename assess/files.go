package assess

import (
	"errors"
	"fmt"
	"io"
	"io/fs"
	"os"
)

// Size caps of the files the program reads, checked before a byte is
// read. A pulls CSV of 10,000 pulls in every category is about 2 MiB; a
// spec, line profile or flake spec is a few kilobytes and must fit a
// stored setting (64 KiB).
const (
	MaxPullsFileBytes    = 16 << 20
	MaxDocumentFileBytes = 64 << 10
)

// Errors of ReadFileLimited.
var (
	ErrNotRegular   = errors.New("not a regular file")
	ErrFileTooLarge = errors.New("file is larger than the limit")
)

// OpenRegular opens path for reading only if it is a regular file,
// without blocking: a FIFO, a device or a folder is refused from its
// status before it is opened (opening a FIFO waits for a writer), and the
// open itself does not block (O_NONBLOCK where the system has it), in
// case the name is swapped meanwhile; the opened file is checked again.
func OpenRegular(path string) (*os.File, fs.FileInfo, error) {
	st, err := os.Stat(path)
	if err != nil {
		return nil, nil, err
	}
	if !st.Mode().IsRegular() {
		return nil, nil, fmt.Errorf("%w: %s is %s", ErrNotRegular, path, modeName(st.Mode()))
	}
	f, err := os.OpenFile(path, os.O_RDONLY|openNonblock, 0)
	if err != nil {
		return nil, nil, err
	}
	if st, err = f.Stat(); err != nil || !st.Mode().IsRegular() {
		f.Close()
		if err == nil {
			err = fmt.Errorf("%w: %s changed while it was opened", ErrNotRegular, path)
		}
		return nil, nil, err
	}
	return f, st, nil
}

// ReadFileLimited reads a regular file (see OpenRegular) of at most max
// bytes, refusing a larger one from its size before reading, and reading
// no more than max+1 bytes even if it grows meanwhile.
func ReadFileLimited(path string, max int64) ([]byte, error) {
	f, st, err := OpenRegular(path)
	if err != nil {
		return nil, err
	}
	defer f.Close()
	if st.Size() > max {
		return nil, fmt.Errorf("%w: %s has %d bytes, the limit is %d", ErrFileTooLarge, path, st.Size(), max)
	}
	b, err := io.ReadAll(io.LimitReader(f, max+1))
	if err != nil {
		return nil, err
	}
	if int64(len(b)) > max {
		return nil, fmt.Errorf("%w: %s grew past %d bytes while it was read", ErrFileTooLarge, path, max)
	}
	return b, nil
}

func modeName(m fs.FileMode) string {
	switch {
	case m.IsDir():
		return "a folder"
	case m&fs.ModeNamedPipe != 0:
		return "a named pipe (FIFO)"
	case m&fs.ModeSocket != 0:
		return "a socket"
	case m&fs.ModeDevice != 0:
		return "a device"
	}
	return "not a regular file"
}
