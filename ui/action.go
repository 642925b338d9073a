package ui

import "baleassay/ui/theme"

// Action is what a screen's Layout returns: the user's intent, applied by
// the app after the frame. The set is closed: only this package's types
// implement it.
type Action interface{ isAction() }

// GoTo opens a screen.
type GoTo struct{ Screen Screen }

// ToggleHelp shows or hides the list of keys.
type ToggleHelp struct{}

// CloseHelp hides the list of keys.
type CloseHelp struct{}

// SetMode switches the palette.
type SetMode struct{ Mode theme.Mode }

// SetScale sets the text scale.
type SetScale struct{ Scale float32 }

// SetMassUnit sets the unit masses are typed and shown in.
type SetMassUnit struct{ Unit MassUnit }

func (GoTo) isAction()        {}
func (ToggleHelp) isAction()  {}
func (CloseHelp) isAction()   {}
func (SetMode) isAction()     {}
func (SetScale) isAction()    {}
func (SetMassUnit) isAction() {}
