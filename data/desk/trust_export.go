package desk

import (
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"strings"

	"baleassay/data/transfer"
)

// BundleOptions choose what ExportBundles writes.
type BundleOptions struct {
	// SinceLast names a destination ("lab"): only what it has not had
	// from this store yet. Empty: every record.
	SinceLast string
	// PartBytes splits the export into signed parts of at most this
	// payload (transfer.DefaultPartBytes when 0).
	PartBytes int
	// Force lets an export to a file name replace an existing file; in a
	// folder free names are always picked.
	Force bool
}

// ExportBundles writes this store's records as signed bundle files to to: a
// folder (names bale-<device>-<number>.bale, never replacing a file) or
// a file name (refused if it exists, unless Force). Every record carries
// its author's proof. It returns what was written and the signing key's
// fingerprint. A missing target folder is refused before anything is
// written, with what to do.
func (d *Desk) ExportBundles(to string, o BundleOptions) (transfer.ExportResult, transfer.Fingerprint, error) {
	if o.PartBytes < 0 || o.PartBytes > transfer.MaxBundleBytes {
		return transfer.ExportResult{}, transfer.Fingerprint{}, fmt.Errorf("%w: parts of 1 to %d MiB", ErrUsage, MaxPartMiB)
	}
	if err := CheckExportTarget(to); err != nil {
		return transfer.ExportResult{}, transfer.Fingerprint{}, err
	}
	_, k, err := d.signingKey()
	if err != nil {
		return transfer.ExportResult{}, transfer.Fingerprint{}, err
	}
	res, err := transfer.Export(d.st, k, to, transfer.ExportOptions{SinceLast: o.SinceLast, PartBytes: o.PartBytes, Force: o.Force})
	return res, k.Fingerprint(), err
}

// CheckExportTarget refuses, before anything is written, a target whose
// folder does not exist or is a file, with a message that says what to
// do.
func CheckExportTarget(to string) error {
	dir := to
	if !strings.HasSuffix(to, string(os.PathSeparator)) {
		if fi, err := os.Stat(to); err == nil && fi.IsDir() {
			return nil
		}
		dir = filepath.Dir(to)
	}
	fi, err := os.Stat(dir)
	switch {
	case errors.Is(err, os.ErrNotExist):
		return fmt.Errorf("folder %s does not exist: plug in or mount the stick, or create the folder, then export again", dir)
	case err != nil:
		return fmt.Errorf("cannot use %s: %v", dir, err)
	case !fi.IsDir():
		return fmt.Errorf("%s is a file, not a folder: give a folder or a new file name", dir)
	}
	return nil
}
