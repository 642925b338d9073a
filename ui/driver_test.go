package ui

import (
	"image"
	"strings"
	"testing"

	"gioui.org/f32"
	"gioui.org/io/event"
	"gioui.org/io/input"
	"gioui.org/io/key"
	"gioui.org/io/pointer"
	"gioui.org/layout"
	"gioui.org/op"

	"baleassay/ui/uitest"
)

// driver runs an App through Gio's input router, the way the window does:
// queued events, then a frame that lays out and applies the actions.
type driver struct {
	t    *testing.T
	a    *App
	r    *input.Router
	ops  op.Ops
	size image.Point
	// acts collects every action applied, in order.
	acts []Action
}

func newDriver(t *testing.T, a *App, size image.Point) *driver {
	t.Helper()
	d := &driver{t: t, a: a, r: new(input.Router), size: size}
	d.frame()
	return d
}

// frame lays out one frame, hands it to the router and applies the
// actions, after applying whatever background work posted.
func (d *driver) frame() []Action {
	d.a.in.drain()
	d.ops.Reset()
	gtx := uitest.Context(&d.ops, d.r, d.size)
	acts := d.a.Layout(gtx)
	d.r.Frame(&d.ops)
	d.a.Apply(acts)
	d.acts = append(d.acts, acts...)
	return acts
}

// settle waits for the background work and runs frames until none is
// pending.
func (d *driver) settle() {
	d.a.owner.idle()
	d.frame()
	d.a.owner.idle()
	d.frame()
}

// press sends a key press and release, then two frames (the first
// delivers the event, the second shows its effect).
func (d *driver) press(name key.Name, mods key.Modifiers) []Action {
	d.r.Queue(key.Event{Name: name, Modifiers: mods, State: key.Press},
		key.Event{Name: name, Modifiers: mods, State: key.Release})
	acts := d.frame()
	return append(acts, d.frame()...)
}

// pressChar presses a printable key as a real window does: the key event
// first (a handler may move the focus), then the same character as text
// for whichever editor holds the focus after that frame.
func (d *driver) pressChar(name key.Name) []Action {
	d.r.Queue(key.Event{Name: name, State: key.Press})
	acts := d.frame()
	if st := d.r.EditorState(); true {
		s := st.Selection.Start
		d.r.Queue(key.EditEvent{Range: key.Range{Start: s, End: st.Selection.End}, Text: strings.ToLower(string(name))},
			key.SelectionEvent{Start: s + 1, End: s + 1})
	}
	d.r.Queue(key.Event{Name: name, State: key.Release})
	acts = append(acts, d.frame()...)
	return append(acts, d.frame()...)
}

// typeText types s into the focused editor one character at a time, as
// the window's input method does.
func (d *driver) typeText(s string) {
	for _, c := range s {
		st := d.r.EditorState()
		start := st.Selection.Start
		end := st.Selection.End
		d.r.Queue(key.EditEvent{Range: key.Range{Start: start, End: end}, Text: string(c)},
			key.SelectionEvent{Start: start + 1, End: start + 1})
		d.frame()
	}
}

// focus gives the keyboard focus to a tag (an editor), as a click would.
func (d *driver) focus(tag event.Tag) {
	d.r.Source().Execute(key.FocusCmd{Tag: tag})
	d.frame()
}

// tab moves the focus as the window does for Tab.
func (d *driver) tab(back bool) {
	dir := key.FocusForward
	if back {
		dir = key.FocusBackward
	}
	d.r.MoveFocus(dir)
	d.frame()
	d.frame()
}

// find returns the bounds of the first control whose label contains
// text, failing the test when there is none.
func (d *driver) find(text string) image.Rectangle {
	d.t.Helper()
	nodes := d.r.AppendSemantics(nil)
	for _, n := range nodes {
		if n.Desc.Label == text {
			return n.Desc.Bounds
		}
	}
	for _, n := range nodes {
		if strings.Contains(n.Desc.Label, text) {
			return n.Desc.Bounds
		}
	}
	var labels []string
	for _, n := range d.r.AppendSemantics(nil) {
		if n.Desc.Label != "" {
			labels = append(labels, n.Desc.Label)
		}
	}
	d.t.Fatalf("no control labelled %q; labels: %q", text, labels)
	return image.Rectangle{}
}

// click presses and releases the primary button over the control
// labelled text.
func (d *driver) click(text string) []Action {
	d.t.Helper()
	b := d.find(text)
	p := f32.Pt(float32(b.Min.X+b.Max.X)/2, float32(b.Min.Y+b.Max.Y)/2)
	d.r.Queue(
		pointer.Event{Kind: pointer.Press, Source: pointer.Mouse, Buttons: pointer.ButtonPrimary, Position: p},
		pointer.Event{Kind: pointer.Release, Source: pointer.Mouse, Buttons: pointer.ButtonPrimary, Position: p},
	)
	acts := d.frame()
	return append(acts, d.frame()...)
}

// render draws the current state headless.
func (d *driver) render() *image.RGBA {
	return uitest.Render(d.t, d.size.X, d.size.Y, d.r, func(gtx layout.Context) {
		acts := d.a.Layout(gtx)
		if len(acts) > 0 {
			d.t.Fatalf("rendering returned actions %v", acts)
		}
	})
}

// hasAction reports whether acts holds an action equal to want.
func hasAction(acts []Action, want Action) bool {
	for _, a := range acts {
		if a == want {
			return true
		}
	}
	return false
}
