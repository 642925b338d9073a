package ui

import (
	"errors"
	"fmt"
	"path/filepath"

	"gioui.org/layout"
	"gioui.org/widget"

	"baleassay/data/desk"
	"baleassay/data/transfer"
	"baleassay/ui/kit"
	"baleassay/ui/theme"
)

// transferScreen: export what is new for a destination into a folder,
// import the bundles of a folder with progress and a report per file,
// and trust an unknown signer by name.
type transferScreen struct {
	outDir, dest, inDir, trustName *kit.Field
	exportBtn, importBtn, stopBtn  widget.Clickable
	trustBtn                       widget.Clickable
	destBtns                       map[string]*widget.Clickable
	list                           widget.List
}

func newTransferScreen() *transferScreen {
	s := &transferScreen{outDir: kit.NewField(), dest: kit.NewField(), inDir: kit.NewField(), trustName: kit.NewField(),
		destBtns: map[string]*widget.Clickable{}}
	s.list.Axis = layout.Vertical
	return s
}

// unknownSigner is the first file of the last import refused for want
// of trust.
func unknownSigner(rep transfer.ImportReport) (*transfer.UnknownSignerError, string) {
	for _, f := range rep.Files {
		var us *transfer.UnknownSignerError
		if errors.As(f.Err, &us) {
			return us, f.Path
		}
	}
	return nil, ""
}

// Layout draws the screen and returns the user's actions.
func (s *transferScreen) Layout(gtx layout.Context, a *App) ([]Action, layout.Dimensions) {
	th := a.th
	var acts []Action
	if submitted(gtx, s.outDir, s.dest) || s.exportBtn.Clicked(gtx) {
		acts = append(acts, s.export()...)
	}
	if submitted(gtx, s.inDir) || s.importBtn.Clicked(gtx) {
		acts = append(acts, s.imp()...)
	}
	if s.stopBtn.Clicked(gtx) {
		acts = append(acts, CancelImport{})
	}
	for _, d := range a.m.dests.Value {
		if b := s.destBtns[d.Name]; b != nil && b.Clicked(gtx) {
			s.dest.SetText(d.Name)
			s.outDir.SetText(d.Dir)
		}
	}
	us, file := unknownSigner(a.m.imported.Value)
	if s.trustBtn.Clicked(gtx) && us != nil {
		if s.trustName.Text() == "" {
			s.trustName.Problem = "Give the sender a name you will recognise (e.g. tablet north) before trusting it."
		} else {
			s.trustName.Problem = ""
			acts = append(acts, TrustSigner{File: file, Name: s.trustName.Text()})
		}
	}
	exportPane := func(gtx layout.Context) layout.Dimensions { return s.exportPane(gtx, a) }
	importPane := func(gtx layout.Context) layout.Dimensions { return s.importPane(gtx, a, us) }
	return acts, columns(gtx, th, exportPane, importPane)
}

func (s *transferScreen) export() []Action {
	dir := filepath.Clean(s.outDir.Text())
	s.outDir.Problem, s.dest.Problem = "", ""
	if s.outDir.Text() == "" {
		s.outDir.Problem = "Type the folder to write to, e.g. the USB stick's folder."
		return nil
	}
	if s.dest.Text() == "" {
		s.dest.Problem = "Name who the records are for (e.g. lab): the next export then writes only what is new for them."
		return nil
	}
	return []Action{ExportTo{Dir: dir, Dest: s.dest.Text()}}
}

func (s *transferScreen) imp() []Action {
	s.inDir.Problem = ""
	if s.inDir.Text() == "" {
		s.inDir.Problem = "Type the folder holding the .bale files."
		return nil
	}
	return []Action{ImportFrom{Dir: filepath.Clean(s.inDir.Text())}}
}

func (s *transferScreen) exportPane(gtx layout.Context, a *App) layout.Dimensions {
	th := a.th
	kids := []layout.FlexChild{
		layout.Rigid(title(th, "Send records")),
		vgap(4),
		layout.Rigid(muted(th, "Writes signed bundle files with what the destination has not had from this device.")),
		vgap(8),
		layout.Rigid(kit.FieldStyle{Th: th, F: s.outDir, Label: "Folder to write to", Hint: "e.g. /media/usb", Width: 360}.Layout),
		vgap(8),
		layout.Rigid(kit.FieldStyle{Th: th, F: s.dest, Label: "For (destination name)", Hint: "e.g. lab", Width: 200}.Layout),
		vgap(8),
	}
	if ds := a.m.dests.Value; len(ds) > 0 {
		kids = append(kids, layout.Rigid(body(th, "Remembered destinations:")), vgap(4))
		var row []layout.FlexChild
		for _, d := range ds {
			b := s.destBtns[d.Name]
			if b == nil {
				b = new(widget.Clickable)
				s.destBtns[d.Name] = b
			}
			row = append(row, layout.Rigid(kit.Button{Th: th, Click: b, Text: d.Name, Sub: d.Dir}.Layout), layout.Rigid(kit.Gap(kit.SpacingDp)))
		}
		kids = append(kids, layout.Rigid(func(gtx layout.Context) layout.Dimensions { return layout.Flex{}.Layout(gtx, row...) }), vgap(8))
	}
	kids = append(kids, layout.Rigid(kit.Button{Th: th, Click: &s.exportBtn, Text: "Write new records", Role: kit.RolePrimary}.Layout), vgap(8))
	ex := a.m.exported
	switch {
	case ex.Busy:
		kids = append(kids, layout.Rigid(body(th, "Writing …")))
	case ex.Err != nil:
		kids = append(kids, layout.Rigid(kit.Problem{Th: th, Text: errText(ex.Err)}.Layout))
	case ex.Has && len(ex.Value.Files) == 0:
		kids = append(kids, layout.Rigid(body(th, "Nothing new for this destination since the last export: no file written.")))
	case ex.Has:
		r := ex.Value
		kids = append(kids, layout.Rigid(kit.Text{Th: th, Text: fmt.Sprintf("Wrote %s with %s (%d bytes).", desk.Plural(len(r.Files), "file", "files"), desk.Plural(r.Events, "record", "records"), r.Bytes), Bold: true, Color: th.Pal.Text}.Layout))
		for _, f := range r.Files {
			kids = append(kids, layout.Rigid(muted(th, f)))
		}
		kids = append(kids, layout.Rigid(muted(th, "Signed by this device, fingerprint "+r.Signer.String())))
	}
	return layout.Flex{Axis: layout.Vertical}.Layout(gtx, kids...)
}

func (s *transferScreen) importPane(gtx layout.Context, a *App, us *transfer.UnknownSignerError) layout.Dimensions {
	th := a.th
	im := a.m.imported
	kids := []layout.FlexChild{
		layout.Rigid(title(th, "Receive records")),
		vgap(4),
		layout.Rigid(muted(th, "Imports every .bale file of a folder; each file comes in whole or not at all.")),
		vgap(8),
		layout.Rigid(kit.FieldStyle{Th: th, F: s.inDir, Label: "Folder to read", Hint: "e.g. /media/usb", Width: 360}.Layout),
		vgap(8),
		layout.Rigid(func(gtx layout.Context) layout.Dimensions {
			if im.Busy {
				return kit.Button{Th: th, Click: &s.stopBtn, Text: "Stop after this file"}.Layout(gtx)
			}
			return kit.Button{Th: th, Click: &s.importBtn, Text: "Import the folder", Role: kit.RolePrimary}.Layout(gtx)
		}),
		vgap(8),
	}
	if p := a.m.progress; im.Busy && p.Of > 0 {
		kids = append(kids, layout.Rigid(kit.Progress{Th: th, Share: float64(p.Done) / float64(p.Of),
			Text: fmt.Sprintf("%d of %s · %s %s", p.Done, desk.Plural(p.Of, "file", "files"), p.Step, filepath.Base(p.File))}.Layout), vgap(8))
	}
	if im.Err != nil && !im.Busy && len(im.Value.Files) == 0 {
		kids = append(kids, layout.Rigid(kit.Problem{Th: th, Text: errText(im.Err)}.Layout))
	}
	if im.Has {
		for _, f := range im.Value.Files {
			kids = append(kids, layout.Rigid(fileLine(th, f)), vgap(4))
		}
		for _, g := range im.Value.Gaps {
			kids = append(kids, layout.Rigid(body(th, g.String())))
		}
	}
	if us != nil {
		kids = append(kids, vgap(8), layout.Rigid(heading(th, "An unknown sender")),
			layout.Rigid(body(th, "Fingerprint "+us.Fingerprint.String())),
			layout.Rigid(body(th, "Device "+us.Device)),
			layout.Rigid(muted(th, "Check the fingerprint with the sender (by phone or in person) before you trust it.")),
			vgap(6),
			layout.Rigid(kit.FieldStyle{Th: th, F: s.trustName, Label: "Trust this sender as (name)", Hint: "e.g. tablet north", Width: 260}.Layout),
			vgap(6),
			layout.Rigid(kit.Button{Th: th, Click: &s.trustBtn, Text: "Trust this sender", Role: kit.RolePrimary}.Layout))
		if t := a.m.trusted; t.Has && !t.Busy {
			if t.Err != nil {
				kids = append(kids, layout.Rigid(kit.Problem{Th: th, Text: errText(t.Err)}.Layout))
			} else {
				kids = append(kids, layout.Rigid(body(th, "Trusted as "+t.Value+". Import the folder again.")))
			}
		}
	}
	return s.list.Layout(gtx, 1, func(gtx layout.Context, _ int) layout.Dimensions {
		return layout.Flex{Axis: layout.Vertical}.Layout(gtx, kids...)
	})
}

// fileLine is one file's outcome in plain words.
func fileLine(th *theme.Theme, f transfer.FileReport) layout.Widget {
	name := filepath.Base(f.Path)
	if f.Err != nil {
		return kit.Problem{Th: th, Text: name + ": refused, nothing changed — " + errText(f.Err)}.Layout
	}
	txt := fmt.Sprintf("%s: %d new, %d already here", name, f.New, f.Present)
	if f.Conflicts > 0 {
		txt += ", " + desk.Plural(f.Conflicts, "conflict", "conflicts") + " to resolve"
	}
	if f.Replay {
		txt += " (imported before: nothing to do)"
	}
	if f.Signer != "" {
		txt += " · from " + f.Signer
	}
	return body(th, txt)
}
