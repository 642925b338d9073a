package main

import (
	"encoding/hex"
	"fmt"
	"io"
	"sort"
	"strings"
	"time"

	"baleassay/data/desk"
	"baleassay/data/record"
)

func init() {
	register(command{
		name:    "inspect",
		usage:   "FILE [--raw] [--allow-demo] [--store DIR|--demo]",
		summary: "show a bundle's header, signer, signature, events and payload (with field names; --raw for CBOR diagnostic notation) and whether import would take it, without importing",
		run:     runInspect,
	})
}

// maxEventLines is how many refused or flagged events inspect lists by
// name; the payload below shows them all.
const maxEventLines = 20

func runInspect(args []string, stdout, stderr io.Writer) error {
	fs := newFlags("inspect")
	store := storeFlag(fs)
	raw := fs.Bool("raw", false, "print the payload in plain CBOR diagnostic notation (RFC 8949 §8), integer keys as they are")
	allowDemo := fs.Bool("allow-demo", false, "judge as 'bale import --allow-demo' would: demo records into a store of real records")
	pos, err := parseArgs(fs, args)
	if err != nil {
		return err
	}
	if len(pos) != 1 {
		return usagef("give one bundle file")
	}
	in, err := desk.Inspect(location(*store), pos[0], desk.InspectOptions{AllowDemo: *allowDemo})
	if err != nil {
		return err
	}
	printInspection(stdout, in, *raw)
	if in.Refusal != nil {
		return fmt.Errorf("%s would be refused: %w", pos[0], in.Refusal)
	}
	return nil
}

func printInspection(w io.Writer, in desk.Inspection, raw bool) {
	p := func(format string, args ...any) { fmt.Fprintf(w, format+"\n", args...) }
	p("file:       %s, %s", in.Path, desk.Plural(in.Size, "byte", "bytes"))
	if in.EnvelopeErr != nil {
		p("envelope:   NOT a valid bundle: %v", in.EnvelopeErr)
		if in.Diagnostic != "" {
			p("as CBOR (RFC 8949 §8 diagnostic notation):\n%s", in.Diagnostic)
		}
		return
	}
	p("envelope:   COSE_Sign1 (tag 18), Ed25519")
	trust := fmt.Sprintf("NOT trusted by the store at %s (check the fingerprint with the sender, then: bale trust add %s --name NAME)", in.Store, in.Path)
	if in.Trusted {
		trust = fmt.Sprintf("trusted as %q", in.SignerName)
	}
	p("signer:     %s, %s", in.Signer, trust)
	if in.SignatureOK {
		p("signature:  verifies")
	} else {
		p("signature:  DOES NOT VERIFY: %v", in.SigErr)
	}
	if in.BodyErr != nil {
		p("body:       refused: %v", in.BodyErr)
	}
	if h := in.Header; h.Seq > 0 {
		p("device:     %s", h.Device)
		p("bundle:     %d (part %d of %d)", h.Seq, h.Part, h.Parts)
		if h.Seq > 1 {
			p("previous:   %s", hex.EncodeToString(h.Prev[:]))
		}
		p("clock:      %s+%d", time.UnixMilli(h.WallMs).UTC().Format(time.RFC3339), h.Logical)
		p("events:     %s", eventsLine(in))
		for k, pi := range in.Proofs {
			if pi.Err != nil {
				p("proof %d:    REFUSED: %v", k+1, pi.Err)
				continue
			}
			who := "another device"
			if pi.Device == h.Device {
				who = "the signer"
			}
			p("proof %d:    device %s (%s) signed for %s, key %s", k+1, pi.Device, who, desk.Plural(pi.Lists, "event", "events"), pi.Key)
		}
	}
	printEventChecks(p, in)
	if in.Refusal != nil {
		p("import:     REFUSED: %v", in.Refusal)
	} else {
		p("import:     would be taken into the store at %s", in.Store)
	}
	if raw {
		p("payload (RFC 8949 §8 diagnostic notation):\n%s", in.Diagnostic)
		return
	}
	p("payload (field names from bundle.cddl, /comments/ on times and kinds; --raw for plain CBOR diagnostic notation):\n%s", in.Named)
}

// eventsLine counts the events by kind: "921 (12 sites, 124 bales, …)".
func eventsLine(in desk.Inspection) string {
	counts := in.KindCounts()
	kinds := make([]record.Kind, 0, len(counts))
	for k := range counts {
		kinds = append(kinds, k)
	}
	sort.Slice(kinds, func(i, j int) bool { return kinds[i] < kinds[j] })
	parts := make([]string, 0, len(kinds))
	for _, k := range kinds {
		parts = append(parts, kindCount(k, counts[k]))
	}
	s := fmt.Sprint(in.Inspection.Events)
	if len(parts) > 0 {
		s += " (" + strings.Join(parts, ", ") + ")"
	}
	if in.DemoRecords > 0 {
		s += fmt.Sprintf("; %d of the invented demo scenario", in.DemoRecords)
	}
	return s
}

// kindCount writes "3 sites", "1 measured batch".
func kindCount(k record.Kind, n int) string {
	switch k {
	case record.KindMeasured:
		return desk.Plural(n, "measured batch", "measured batches")
	case record.KindSetting:
		return desk.Plural(n, "setting", "settings")
	}
	return desk.Plural(n, k.String(), k.String()+"s")
}

// printEventChecks lists the events an import would refuse or flag.
func printEventChecks(p func(string, ...any), in desk.Inspection) {
	if len(in.Events) == 0 {
		return
	}
	bad, shown := 0, 0
	for i, e := range in.Events {
		if e.Err == nil && len(e.Warnings) == 0 {
			continue
		}
		if e.Err != nil {
			bad++
		}
		if shown == maxEventLines {
			continue
		}
		shown++
		id := e.ID.String()
		if e.Err != nil {
			p("event %d:  REFUSED (id %.16s…): %v", i+1, id, e.Err)
		}
		for _, w := range e.Warnings {
			p("event %d:  warning (id %.16s…): %s", i+1, id, w)
		}
	}
	switch {
	case bad == 0 && in.Warnings == 0:
		p("checks:     every event decodes and passes the records' validation")
	case bad == 0:
		p("checks:     every event decodes and passes the records' validation; %s kept but flagged", desk.Plural(in.Warnings, "warning", "warnings"))
	default:
		p("checks:     %s of %d refused by the records' validation", desk.Plural(bad, "event", "events"), len(in.Events))
	}
}
