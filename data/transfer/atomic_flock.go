//go:build linux || darwin || freebsd || netbsd || openbsd || dragonfly

package transfer

import (
	"os"

	"golang.org/x/sys/unix"
)

// closeBeforeRename is false where an open file can be renamed, so the
// writer keeps its lock until the file is in place.
const closeBeforeRename = false

// lockTemp takes an exclusive flock(2) on a temporary file being
// written; it is released when the file is closed or the writer dies.
func lockTemp(f *os.File) { _ = unix.Flock(int(f.Fd()), unix.LOCK_EX|unix.LOCK_NB) }

// removeIfUnlocked removes path if no process holds its lock.
func removeIfUnlocked(path string) bool {
	f, err := os.Open(path)
	if err != nil {
		return false
	}
	defer f.Close()
	if unix.Flock(int(f.Fd()), unix.LOCK_EX|unix.LOCK_NB) != nil {
		return false // a writer is alive
	}
	return os.Remove(path) == nil
}
