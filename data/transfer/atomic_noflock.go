//go:build !(linux || darwin || freebsd || netbsd || openbsd || dragonfly)

package transfer

import (
	"os"
	"time"
)

// closeBeforeRename: some systems (Windows) cannot rename an open file.
const closeBeforeRename = true

// lockTemp does nothing where there is no flock(2).
func lockTemp(*os.File) {}

// removeIfUnlocked removes a temporary file left for over an hour, the
// best a system without flock(2) allows.
func removeIfUnlocked(path string) bool {
	st, err := os.Lstat(path)
	if err != nil || time.Since(st.ModTime()) < time.Hour {
		return false
	}
	return os.Remove(path) == nil
}
