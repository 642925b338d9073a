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

// writeOut opens the store dir names and writes path through write, never
// over an existing file unless force (refused before any work), then
// says what was written; write returns that in a few words.
func writeOut(dir, path string, force bool, stdout io.Writer, write func(d *desk.Desk, w io.Writer) (string, error)) error {
	if err := refuseExisting(path, force); err != nil {
		return err
	}
	d, err := openDesk(dir, false)
	if err != nil {
		return err
	}
	defer d.Close()
	var what string
	err = desk.WriteFile(path, force, func(w io.Writer) error {
		var err error
		what, err = write(d, w)
		return err
	})
	if err != nil {
		return existsHint(err)
	}
	return wrote(stdout, path, what)
}
