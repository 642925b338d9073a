package desk

import (
	"errors"
	"time"

	"baleassay/data/record"
	"baleassay/data/store"
	"baleassay/data/transfer"
)

// InspectOptions tune Inspect as the import they stand for is tuned.
type InspectOptions struct {
	AllowDemo bool // as ImportOptions.AllowDemo
}

// InspectedEvent is one event of a bundle as an import would check it.
type InspectedEvent struct {
	ID       record.EventID
	Kind     record.Kind // 0 when the event does not decode
	Demo     bool
	Err      error            // why an import refuses it (decoding or validation), nil if it does not
	Warnings []record.Warning // what an import keeps but flags
}

// Inspection is what an import into a store would make of one bundle
// file, found without importing anything: the file as transfer reads it
// (envelope, signer, signature, header, proofs, the payload plain and
// with field names), every event decoded and validated as an import
// does, and the store's side (its trust list, whether it takes demo
// records).
type Inspection struct {
	transfer.Inspection
	Path string
	// Store is the folder whose trust list and kind were used. StoreRead
	// says whether the store itself could be read (false when another
	// process holds it: then the location decides whether it is a demo
	// store); a folder without a store counts as the new real store an
	// import would make there.
	Store     string
	StoreRead bool
	DemoStore bool
	// Events are the bundle's events in order, when its body could be
	// read; DemoRecords counts those of the invented demo scenario.
	Events      []InspectedEvent
	DemoRecords int
	Warnings    int // warnings over all events
	// Refusal is why `bale import` of this file into the store would be
	// refused, as the import would say it; nil when it would be taken.
	Refusal error
}

// KindCounts counts the events that decode, by kind.
func (in Inspection) KindCounts() map[record.Kind]int {
	n := map[record.Kind]int{}
	for _, e := range in.Events {
		if e.Kind != 0 {
			n[e.Kind]++
		}
	}
	return n
}

// Inspect reads a bundle file as `bale import` into the store at loc
// would, without changing anything: the file, the store's trust list
// (this device's own key included), every event decoded strictly and
// validated, authorship, and demo records against the kind of store.
// Inspection.Refusal says whether and why the import would refuse it. A
// file that cannot be read at all is an error.
func Inspect(loc Location, path string, opt InspectOptions) (Inspection, error) {
	raw, err := transfer.ReadBundleFile(path, 0)
	if err != nil {
		return Inspection{Path: path}, err
	}
	in := Inspection{Path: path}
	dir, err := loc.Resolve()
	if err != nil {
		return in, err
	}
	in.Store = dir
	_, trust, trustErr := trustIn(dir)
	in.StoreRead, in.DemoStore = storeKind(loc)
	in.Inspection = transfer.InspectBundle(raw, trust)
	in.checkEvents(time.Now())
	switch {
	case in.EnvelopeErr != nil:
		in.Refusal = in.EnvelopeErr
	case trustErr != nil:
		in.Refusal = trustErr
	case !in.Trusted:
		in.Refusal = &transfer.UnknownSignerError{Fingerprint: in.Signer, File: path}
	case in.SigErr != nil:
		in.Refusal = in.SigErr
	case in.BodyErr != nil:
		in.Refusal = in.BodyErr
	default:
		in.Refusal = in.eventRefusal(opt)
	}
	return in, nil
}

// storeKind says whether the store at loc could be read and whether it
// is a demo store. A folder without a store is a real store to be; a
// store held by another process is judged by its location.
func storeKind(loc Location) (read, demo bool) {
	d, err := Open(loc, Options{})
	var ns *NoStoreError
	switch {
	case errors.As(err, &ns):
		return true, false
	case err != nil:
		return false, loc.Demo
	}
	defer d.Close()
	return true, d.IsDemo()
}

// checkEvents decodes and validates every event as an import does
// (record.DecodeEvent, record.ValidateEventAt).
func (in *Inspection) checkEvents(now time.Time) {
	in.Events = make([]InspectedEvent, len(in.Raws))
	for i, raw := range in.Raws {
		e := &in.Events[i]
		e.ID = in.IDs[i]
		ev, err := record.DecodeEvent(raw)
		if err != nil {
			e.Err = err
			continue
		}
		e.Kind, e.Demo = ev.Kind, ev.Demo
		if e.Demo {
			in.DemoRecords++
		}
		e.Warnings, e.Err = record.ValidateEventAt(ev, now)
		in.Warnings += len(e.Warnings)
	}
}

// eventRefusal is the import's refusal of the first bad event, or of the
// demo records a real store does not take.
func (in *Inspection) eventRefusal(opt InspectOptions) error {
	for i, e := range in.Events {
		if e.Err != nil {
			return &transfer.EventRefusedError{Index: i, ID: e.ID.String(), Err: &record.EventError{Index: i, ID: e.ID, Err: e.Err}}
		}
	}
	if in.DemoRecords > 0 && !in.DemoStore && !opt.AllowDemo {
		return &store.DemoRecordsError{N: in.DemoRecords}
	}
	return nil
}
