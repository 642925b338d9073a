package main

import (
	"baleassay/data/desk"
	"baleassay/data/transfer"
	"fmt"
	"io"
)

func init() {
	register(command{
		name:    "inspect",
		usage:   "FILE [--store DIR]",
		summary: "show a bundle's header, signer, signature check and payload (CBOR diagnostic notation) without importing",
		run:     runInspect,
	})
}

func runInspect(args []string, stdout, stderr io.Writer) error {
	fs := newFlags("inspect")
	store := storeFlag(fs)
	pos, err := parseArgs(fs, args)
	if err != nil {
		return err
	}
	if len(pos) != 1 {
		return usagef("give one bundle file")
	}
	raw, err := transfer.ReadBundleFile(pos[0], 0)
	if err != nil {
		return err
	}
	// The trust list is read if the store folder has one; nothing is
	// created or opened for writing.
	var trust transfer.TrustFunc
	if dir, err := storeDir(*store); err == nil {
		if _, tf, err := desk.TrustIn(dir); err == nil {
			trust = tf
		}
	}
	in := transfer.InspectBundle(raw, trust)
	if err := in.WriteText(stdout); err != nil {
		return err
	}
	switch {
	case in.EnvelopeErr != nil:
		return fmt.Errorf("%s would be refused: %w", pos[0], in.EnvelopeErr)
	case in.SigErr != nil:
		return fmt.Errorf("%s would be refused: %w", pos[0], in.SigErr)
	case in.BodyErr != nil:
		return fmt.Errorf("%s would be refused: %w", pos[0], in.BodyErr)
	}
	return nil
}
