package ui

import (
	"baleassay/data/desk"
	"baleassay/data/record"
	"baleassay/ui/theme"
)

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
type SetMassUnit struct{ Unit desk.Unit }

func (GoTo) isAction()        {}
func (ToggleHelp) isAction()  {}
func (CloseHelp) isAction()   {}
func (SetMode) isAction()     {}
func (SetScale) isAction()    {}
func (SetMassUnit) isAction() {}

// SelectSite shows a site's recent bales.
type SelectSite struct{ ID record.EntityID }

// AddSite saves a new pickup site; Confirm accepts the checks shown.
type AddSite struct {
	Site    record.SiteRecord
	Confirm bool
}

// CorrectSite saves a site's new value, superseding its current one;
// Confirm accepts the checks shown.
type CorrectSite struct {
	ID      record.EntityID
	Site    record.SiteRecord
	Confirm bool
}

// FindNear lists the sites nearest a point typed or pasted.
type FindNear struct{ Lat, Lon float64 }

// OpenBale makes a bale the current one and opens a screen on it.
type OpenBale struct {
	ID     record.EntityID
	Screen Screen
}

// ReceiveAt opens the bale form for a site.
type ReceiveAt struct{ Site record.EntityID }

// SaveBale saves a new bale; Confirm accepts the checks shown.
type SaveBale struct {
	In      desk.BaleInput
	Confirm bool
}

// KeepDraft stores the pull being typed (every keystroke).
type KeepDraft struct {
	Bale record.EntityID
	Pull record.PullRecord
}

// SavePull saves the pull being typed as a new pull of the bale, or, when
// Corrects is set, as a correction that supersedes that pull.
type SavePull struct {
	Bale     record.EntityID
	Pull     record.PullRecord
	Corrects record.EntityID
	Confirm  bool
}

// DropDraft throws away the pull being typed.
type DropDraft struct{ Bale record.EntityID }

// ExportTo writes what is new for a destination into a folder.
type ExportTo struct{ Dir, Dest string }

// ImportFrom imports every bundle file of a folder.
type ImportFrom struct{ Dir string }

// CancelImport stops an import between files.
type CancelImport struct{}

// TrustSigner trusts, under a name, the key that signed a bundle file.
type TrustSigner struct{ File, Name string }

func (SelectSite) isAction()   {}
func (FindNear) isAction()     {}
func (AddSite) isAction()      {}
func (CorrectSite) isAction()  {}
func (OpenBale) isAction()     {}
func (ReceiveAt) isAction()    {}
func (SaveBale) isAction()     {}
func (KeepDraft) isAction()    {}
func (SavePull) isAction()     {}
func (DropDraft) isAction()    {}
func (ExportTo) isAction()     {}
func (ImportFrom) isAction()   {}
func (CancelImport) isAction() {}
func (TrustSigner) isAction()  {}

// StartOwnStore leaves the demo for a new store of the user's own.
type StartOwnStore struct{}

func (StartOwnStore) isAction() {}
