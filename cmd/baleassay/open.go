package main

import (
	"errors"
	"fmt"

	"baleassay/data/desk"
)

// opened is the store the app shows and what the banner should say.
type opened struct {
	d    *desk.Desk
	demo bool // the demo store
	// noOwn is true when the user has no store yet and gets the demo.
	noOwn bool
}

// openStore opens what the flags name: --store DIR (made if missing, so
// a grader can start a store on a stick), --demo (made if missing), or
// the user's store; with no store of the user's yet, the demo store.
func openStore(o options) (opened, error) {
	switch {
	case o.store != "":
		d, err := desk.Open(desk.Location{Dir: o.store}, desk.Options{Create: true})
		if err != nil {
			return opened{}, err
		}
		return opened{d: d, demo: d.IsDemo()}, nil
	case o.demo:
		d, err := openDemo()
		return opened{d: d, demo: true}, err
	}
	d, err := desk.Open(desk.Location{}, desk.Options{})
	if errors.Is(err, desk.ErrNoStore) {
		d, err := openDemo()
		return opened{d: d, demo: true, noOwn: true}, err
	}
	if err != nil {
		return opened{}, err
	}
	return opened{d: d, demo: d.IsDemo()}, nil
}

// openDemo opens the demo store, making it first if there is none.
func openDemo() (*desk.Desk, error) {
	d, err := desk.Open(desk.Location{Demo: true}, desk.Options{})
	if errors.Is(err, desk.ErrNoStore) {
		if _, _, err := desk.MakeDemo(desk.DemoOptions{Weeks: 6, Seed: 1}); err != nil {
			return nil, fmt.Errorf("making the demo store: %w", err)
		}
		d, err = desk.Open(desk.Location{Demo: true}, desk.Options{})
	}
	return d, err
}

// startOwn makes and opens the user's own store (the banner's offer).
func startOwn() (*desk.Desk, error) {
	return desk.Open(desk.Location{}, desk.Options{Create: true})
}
