package desk

import (
	"fmt"
	"strings"

	"baleassay/data/record"
	"baleassay/data/transfer"
)

// BundleExt is the file name ending of a bundle file.
const BundleExt = transfer.BundleExt

// The size of a bundle's parts, in MiB (BundleOptions.PartBytes).
const (
	DefaultPartMiB = transfer.DefaultPartBytes >> 20
	MaxPartMiB     = transfer.MaxBundleBytes >> 20
)

// BundleFiles expands files and folders as an import does: a folder
// stands for its bundle files (not recursive), sorted by name. Arguments
// that name no bundle file at all are refused.
func BundleFiles(paths []string) ([]string, error) {
	files, err := transfer.ExpandPaths(paths)
	if err != nil {
		return nil, err
	}
	if len(files) == 0 {
		return nil, fmt.Errorf("no %s files in %s", BundleExt, strings.Join(paths, ", "))
	}
	return files, nil
}

// SelfName is what the trust list calls this device's own key, which is
// always trusted and never listed.
const SelfName = transfer.SelfName

// TrustedKey is one key of the trust list: bundles it signs are
// imported.
type TrustedKey struct {
	Name        string
	Fingerprint transfer.Fingerprint
	Device      record.DeviceID // the device the key belongs to
}

// TrustedKeys lists the trust list of the store at loc, by name. It is
// read without opening the store, so it works while another process
// holds it; a folder without a store has an empty list.
func TrustedKeys(loc Location) ([]TrustedKey, error) {
	dir, err := loc.Resolve()
	if err != nil {
		return nil, err
	}
	tl, _, err := trustIn(dir)
	if err != nil {
		return nil, err
	}
	out := make([]TrustedKey, len(tl.Entries))
	for i, e := range tl.Entries {
		out[i] = TrustedKey{Name: e.Name, Fingerprint: e.Fingerprint, Device: e.Fingerprint.Device()}
	}
	return out, nil
}
