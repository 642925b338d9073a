package main

import (
	"errors"
	"fmt"
	"io"
	"os"

	"baleassay/data/desk"
)

// refuseExisting stops before any work when the output is there and may
// not be replaced (desk.WriteFile checks again when it writes).
func refuseExisting(path string, force bool) error {
	if _, err := os.Stat(path); err == nil && !force {
		return existsHint(&desk.ExistsError{Path: path})
	}
	return nil
}

// existsHint says how to replace a file on purpose.
func existsHint(err error) error {
	var ee *desk.ExistsError
	if errors.As(err, &ee) {
		return fmt.Errorf("%w: %s (give another name, or --force to replace it)", desk.ErrExists, ee.Path)
	}
	return err
}

func wrote(w io.Writer, path, what string) error {
	fi, err := os.Stat(path)
	if err != nil {
		return err
	}
	_, err = fmt.Fprintf(w, "wrote %s (%s, %s bytes)\n", path, what, fmt.Sprint(fi.Size()))
	return err
}
