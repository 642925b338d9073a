package desk

import (
	"encoding/json"
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"sort"

	"baleassay/data/transfer"
)

// The app's export: a folder (a USB stick) and a destination name, with
// the destinations remembered so the grader picks one instead of typing
// a path in gloves. Only what is new for that destination is written
// (transfer.ExportOptions.SinceLast).

// destinationsFile is the list of remembered destinations, in the store
// folder. It is local to this device: it never travels in a bundle.
const destinationsFile = "destinations.json"

// ExportDest is a remembered export target.
type ExportDest struct {
	Name   string `json:"name"`    // the destination's name ("lab")
	Dir    string `json:"dir"`     // the folder last written to
	LastMs int64  `json:"last_ms"` // when, Unix ms
}

// ExportResult is what Export wrote.
type ExportResult struct {
	transfer.ExportResult
	Signer transfer.Fingerprint
}

// Destinations lists the remembered destinations, the latest used first.
func (d *Desk) Destinations() ([]ExportDest, error) {
	raw, err := os.ReadFile(filepath.Join(d.Dir(), destinationsFile))
	if errors.Is(err, os.ErrNotExist) {
		return nil, nil
	}
	if err != nil {
		return nil, err
	}
	var out []ExportDest
	if err := json.Unmarshal(raw, &out); err != nil {
		return nil, fmt.Errorf("the list of export destinations %s is damaged (%v): delete it and export again", filepath.Join(d.Dir(), destinationsFile), err)
	}
	sort.SliceStable(out, func(i, j int) bool { return out[i].LastMs > out[j].LastMs })
	return out, nil
}

// Export writes what destination dest has not had yet from this store as
// signed bundle files into the folder dir, and remembers dir for dest.
// The folder must exist (a USB stick that is not mounted is not made up).
// With nothing new, no file is written and Files is empty.
func (d *Desk) Export(dir, dest string) (ExportResult, error) {
	if dest == "" {
		return ExportResult{}, fmt.Errorf("%w: give the destination a name (e.g. lab), so the next export writes only what is new for it", ErrUsage)
	}
	fi, err := os.Stat(dir)
	if err != nil || !fi.IsDir() {
		return ExportResult{}, fmt.Errorf("%w: the folder %q does not exist: plug in the stick or choose an existing folder", ErrUsage, dir)
	}
	key, _, err := d.key()
	if err != nil {
		return ExportResult{}, err
	}
	res, err := transfer.Export(d.st, key, dir+string(os.PathSeparator), transfer.ExportOptions{SinceLast: dest})
	if err != nil {
		if errors.Is(err, transfer.ErrDestName) {
			return ExportResult{}, fmt.Errorf("%w: destination %q: use 1 to 64 letters, digits, '.', '_' or '-'", ErrUsage, dest)
		}
		return ExportResult{}, err
	}
	if err := d.remember(ExportDest{Name: dest, Dir: dir, LastMs: d.now().UnixMilli()}); err != nil {
		return ExportResult{ExportResult: res, Signer: key.Fingerprint()}, err
	}
	return ExportResult{ExportResult: res, Signer: key.Fingerprint()}, nil
}

// remember adds or updates a destination, written atomically.
func (d *Desk) remember(dst ExportDest) error {
	d.tmu.Lock()
	defer d.tmu.Unlock()
	have, err := d.Destinations()
	if err != nil {
		have = nil // a damaged list is replaced by a good one
	}
	out := []ExportDest{dst}
	for _, h := range have {
		if h.Name != dst.Name {
			out = append(out, h)
		}
	}
	raw, err := json.MarshalIndent(out, "", "  ")
	if err != nil {
		return err
	}
	return transfer.WriteFileAtomic(filepath.Join(d.Dir(), destinationsFile), raw, 0o644)
}
