package desk

import (
	"context"
	"errors"
	"fmt"
	"io/fs"
	"os"

	"baleassay/data/transfer"
)

// Trust returns the trust list and a function that also accepts this
// store's own key, when it has one.
func (d *Desk) Trust() (*transfer.TrustList, transfer.TrustFunc, error) {
	d.tmu.Lock()
	defer d.tmu.Unlock()
	return trustIn(d.st.Dir())
}

// trustIn reads the trust list of a store folder without opening the
// store (inspect reads it alongside a store in use).
func trustIn(dir string) (*transfer.TrustList, transfer.TrustFunc, error) {
	tl, err := transfer.LoadTrust(dir)
	if err != nil {
		return nil, nil, err
	}
	var self transfer.Fingerprint
	k, err := transfer.LoadDeviceKey(dir)
	switch {
	case err == nil:
		self = k.Fingerprint()
	case !errors.Is(err, fs.ErrNotExist):
		return nil, nil, err
	}
	return tl, tl.Func(self), nil
}

// FingerprintSource says where a fingerprint came from.
type FingerprintSource uint8

// The sources of a fingerprint.
const (
	FromText   FingerprintSource = iota + 1 // typed (read out by phone)
	FromPEM                                 // a public key file
	FromBundle                              // the signer of a bundle file
)

func (s FingerprintSource) String() string {
	switch s {
	case FromText:
		return "typed fingerprint"
	case FromPEM:
		return "public key file"
	case FromBundle:
		return "signer of a bundle"
	}
	return fmt.Sprintf("source(%d)", uint8(s))
}

// FingerprintOf reads a fingerprint from text, or from a public key PEM
// or a bundle file of that name.
func FingerprintOf(arg string) (transfer.Fingerprint, FingerprintSource, error) {
	if st, err := os.Stat(arg); err != nil || !st.Mode().IsRegular() {
		fp, err := transfer.ParseFingerprint(arg)
		if err != nil {
			return fp, 0, fmt.Errorf("%w: %q is neither a file nor a fingerprint: %v", ErrUsage, arg, err)
		}
		return fp, FromText, nil
	}
	b, err := transfer.ReadBundleFile(arg, 0)
	if err != nil {
		return transfer.Fingerprint{}, 0, err
	}
	if pub, err := transfer.ParsePublicKeyPEM(b); err == nil {
		return transfer.FingerprintOf(pub), FromPEM, nil
	}
	fp, err := transfer.BundleSigner(b)
	if err != nil {
		return fp, 0, fmt.Errorf("%w: %s is neither a public key file nor a readable bundle: %v", ErrUsage, arg, err)
	}
	return fp, FromBundle, nil
}

// ErrOwnKey refuses to trust this device's own key (always trusted).
var ErrOwnKey = errors.New("this device's own key")

// TrustAdd trusts the key a fingerprint, PEM or bundle names (see
// TrustKey; a front end that asks for confirmation uses CandidateOf and
// TrustKey, so that what is trusted is what was shown).
func (d *Desk) TrustAdd(arg, name string) (transfer.Fingerprint, FingerprintSource, error) {
	fp, src, err := FingerprintOf(arg)
	if err != nil {
		return fp, src, err
	}
	return fp, src, d.TrustKey(fp, name)
}

// TrustRemove stops trusting a key by name or fingerprint, under the
// store's lock.
func (d *Desk) TrustRemove(nameOrFP string) (transfer.TrustEntry, error) {
	d.tmu.Lock()
	defer d.tmu.Unlock()
	var e transfer.TrustEntry
	err := transfer.UpdateTrust(d.st, func(tl *transfer.TrustList) error {
		var err error
		e, err = tl.Remove(nameOrFP)
		return err
	})
	return e, err
}

// ImportOptions tune Import.
type ImportOptions struct {
	// AllowDemo lets a store of real records take the demo scenario's
	// records.
	AllowDemo bool
}

// Import merges bundle files (each all or nothing) in order. It stops
// between files when ctx is done (files already imported stay) and
// reports progress (may be nil).
func (d *Desk) Import(ctx context.Context, paths []string, opt ImportOptions, progress func(Progress)) (transfer.ImportReport, error) {
	_, trust, err := d.Trust()
	if err != nil {
		return transfer.ImportReport{}, err
	}
	im := &transfer.Importer{Store: d.st, Trust: trust, AllowDemo: opt.AllowDemo}
	if progress != nil {
		im.Progress = func(p transfer.Progress) {
			step := StepReading
			switch p.Step {
			case "applying":
				step = StepApplying
			case "done":
				step = StepDone
			case "refused":
				step = StepRefused
			}
			done := p.Index - 1
			if step == StepDone || step == StepRefused {
				done = p.Index
			}
			progress(Progress{Step: step, Done: done, Of: p.Of, File: p.File, Events: p.Events, EventsSoFar: p.EventsSoFar})
		}
	}
	im.Context = ctx
	rep := im.ImportFiles(paths)
	return rep, rep.Stopped
}
