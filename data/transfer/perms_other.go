//go:build !unix

package transfer

import (
	"fmt"
	"io/fs"
)

// checkPrivateDir: file modes are not permissions here (Windows uses
// access control lists, which the user's profile folder already limits).
func checkPrivateDir(string) error { return nil }

// checkPrivateFile refuses a trust list that is a link or not a file.
func checkPrivateFile(path string, st fs.FileInfo) error {
	if !st.Mode().IsRegular() {
		return fmt.Errorf("%w: %s is not a regular file", ErrUnsafePermissions, path)
	}
	return nil
}
