//go:build unix

package transfer

import (
	"fmt"
	"io/fs"
	"os"
	"syscall"
)

// checkPrivateDir refuses a store folder that group or others can write:
// they could replace the trust list or the key inside it.
func checkPrivateDir(dir string) error {
	st, err := os.Stat(dir)
	if err != nil {
		if os.IsNotExist(err) {
			return nil // nothing there to trust yet
		}
		return err
	}
	if st.Mode().Perm()&0o022 != 0 {
		return fmt.Errorf("%w: the store folder %s is writable by other users (mode %v); run: chmod go-w %s", ErrUnsafePermissions, dir, st.Mode().Perm(), dir)
	}
	if err := ownedByMe(dir, st); err != nil {
		return err
	}
	return nil
}

// checkPrivateFile refuses a trust list that is a link, another user's,
// or writable by group or others.
func checkPrivateFile(path string, st fs.FileInfo) error {
	switch {
	case st.Mode()&fs.ModeSymlink != 0:
		return fmt.Errorf("%w: %s is a symbolic link; keep the trust list itself in the store folder", ErrUnsafePermissions, path)
	case !st.Mode().IsRegular():
		return fmt.Errorf("%w: %s is not a regular file", ErrUnsafePermissions, path)
	case st.Mode().Perm()&0o022 != 0:
		return fmt.Errorf("%w: %s is writable by other users (mode %v); run: chmod 600 %s", ErrUnsafePermissions, path, st.Mode().Perm(), path)
	}
	return ownedByMe(path, st)
}

// ownedByMe refuses a file or folder of another user (root's are
// accepted: an administrator may have made the folder).
func ownedByMe(path string, st fs.FileInfo) error {
	sys, ok := st.Sys().(*syscall.Stat_t)
	if !ok {
		return nil
	}
	if uid := os.Getuid(); int(sys.Uid) != uid && sys.Uid != 0 {
		return fmt.Errorf("%w: %s belongs to user %d, not to you (%d); run: chown %d %s", ErrUnsafePermissions, path, sys.Uid, uid, uid, path)
	}
	return nil
}
