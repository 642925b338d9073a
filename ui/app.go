// Package ui is the field app: five screens over the use-case layer
// data/desk, drawn with Gio. Each screen is one struct holding its widget
// state; its Layout returns Actions, which App applies after the frame.
// Store work runs on one owner goroutine and comes back through the inbox
// (see async.go). ui computes nothing of its own: every figure comes from
// desk.
package ui

import (
	"image"
	"time"

	"gioui.org/app"
	"gioui.org/io/event"
	"gioui.org/io/key"
	"gioui.org/io/semantic"
	"gioui.org/layout"
	"gioui.org/op"
	"gioui.org/op/clip"
	"gioui.org/widget"

	"baleassay/data/desk"
	"baleassay/ui/kit"
	"baleassay/ui/theme"
)

// Config is what the app is opened on.
type Config struct {
	Desk  *desk.Desk // the open store; the app does not close it
	Mode  theme.Mode
	Scale float32
	Unit  desk.Unit // 0 = kg
	// Demo shows the demo banner (the store holds the demo scenario).
	Demo bool
	// Now is the clock (time.Now when nil); tests fix it.
	Now func() time.Time
	// StartOwn, when set, is offered on the demo banner: it makes and
	// opens the user's own store (the user has none yet).
	StartOwn func() (*desk.Desk, error)
}

// App is the window's content: the screens, the shell around them and the
// background machinery.
type App struct {
	cfg    Config
	th     *theme.Theme
	screen Screen
	help   bool

	tabs      [numScreens]widget.Clickable
	helpBtn   widget.Clickable
	modeBtn   widget.Clickable
	modeBtn2  widget.Clickable
	scaleBtn  widget.Clickable
	unitBtn   widget.Clickable
	closeHelp widget.Clickable
	startOwn  widget.Clickable
	helpList  widget.List

	in    inbox
	owner *owner
	m     model

	sites    *sitesScreen
	intake   *intakeScreen
	tally    *tallyScreen
	outcome  *outcomeScreen
	transfer *transferScreen

	// Frames counts laid-out frames (tests and the start-up probe read it).
	Frames     int
	firstFrame func()
}

// OnFirstFrame registers fn to run once, after the first frame is handed
// to the GPU (the start-up measurement).
func (a *App) OnFirstFrame(fn func()) { a.firstFrame = fn }

// New builds the app. Call Close when done.
func New(cfg Config) *App {
	if cfg.Scale <= 0 {
		cfg.Scale = 1
	}
	if cfg.Unit == 0 {
		cfg.Unit = desk.UnitKg
	}
	if cfg.Now == nil {
		cfg.Now = time.Now
	}
	a := &App{cfg: cfg, owner: newOwner()}
	a.th = theme.New(cfg.Mode, cfg.Scale, nil)
	a.helpList.Axis = layout.Vertical
	a.sites = newSitesScreen()
	a.intake = newIntakeScreen()
	a.tally = newTallyScreen()
	a.outcome = newOutcomeScreen()
	a.transfer = newTransferScreen()
	a.start()
	return a
}

// Close stops the background work after the queued jobs.
func (a *App) Close() { a.owner.close() }

// Desk is the store the app shows now (StartOwn may replace the first).
func (a *App) Desk() *desk.Desk { return a.cfg.Desk }

// Screen is the screen shown.
func (a *App) Screen() Screen { return a.screen }

// HelpOpen reports whether the list of keys is shown.
func (a *App) HelpOpen() bool { return a.help }

// Theme is the theme in use.
func (a *App) Theme() *theme.Theme { return a.th }

// Run drives a window until it closes.
func (a *App) Run(w *app.Window) error {
	a.in.mu.Lock()
	a.in.wake = w.Invalidate
	a.in.mu.Unlock()
	var ops op.Ops
	for {
		switch e := w.Event().(type) {
		case app.DestroyEvent:
			return e.Err
		case app.FrameEvent:
			a.in.drain()
			gtx := app.NewContext(&ops, e)
			acts := a.Layout(gtx)
			e.Frame(gtx.Ops)
			if a.firstFrame != nil {
				a.firstFrame()
				a.firstFrame = nil
			}
			a.Apply(acts)
			if len(acts) > 0 {
				w.Invalidate()
			}
		}
	}
}

// Layout draws one frame and returns what the user asked for.
func (a *App) Layout(gtx layout.Context) []Action {
	a.Frames++
	th := a.th
	var acts []Action
	defer clip.Rect{Max: gtx.Constraints.Max}.Push(gtx.Ops).Pop()
	semantic.DescriptionOp("baleassay").Add(gtx.Ops)
	kit.Fill(gtx, th.Pal.Bg, gtx.Constraints.Max, 0)
	acts = append(acts, a.globalKeys(gtx)...)

	layout.Flex{Axis: layout.Vertical}.Layout(gtx,
		layout.Rigid(func(gtx layout.Context) layout.Dimensions {
			if !a.cfg.Demo {
				return layout.Dimensions{}
			}
			if a.startOwn.Clicked(gtx) {
				acts = append(acts, StartOwnStore{})
			}
			if a.cfg.StartOwn == nil {
				return kit.Banner{Th: th, Title: "DEMO DATA",
					Text: "Invented yards, bales and pulls, for trying the app. Your own records: start baleassay without --demo (or with --store FOLDER)."}.Layout(gtx, nil)
			}
			return kit.Banner{Th: th, Title: "DEMO DATA",
				Text: "You have no records of your own yet; these are invented yards, bales and pulls."}.Layout(gtx,
				kit.Button{Th: th, Click: &a.startOwn, Text: "Start my own records"}.Layout)
		}),
		layout.Rigid(func(gtx layout.Context) layout.Dimensions {
			d, ac := a.layoutBar(gtx)
			acts = append(acts, ac...)
			return d
		}),
		layout.Flexed(1, func(gtx layout.Context) layout.Dimensions {
			return layout.UniformInset(12).Layout(gtx, func(gtx layout.Context) layout.Dimensions {
				ac, d := a.layoutScreen(gtx)
				acts = append(acts, ac...)
				return d
			})
		}),
	)
	if a.help {
		acts = append(acts, a.layoutHelp(gtx)...)
	}
	return acts
}

func (a *App) layoutScreen(gtx layout.Context) ([]Action, layout.Dimensions) {
	// children take their natural width unless they ask for more
	gtx.Constraints.Min = image.Point{}
	switch a.screen {
	case ScreenSites:
		return a.sites.Layout(gtx, a)
	case ScreenIntake:
		return a.intake.Layout(gtx, a)
	case ScreenTally:
		return a.tally.Layout(gtx, a)
	case ScreenOutcome:
		return a.outcome.Layout(gtx, a)
	case ScreenTransfer:
		return a.transfer.Layout(gtx, a)
	}
	return nil, layout.Dimensions{}
}

// globalKeys reads the keys that work everywhere.
func (a *App) globalKeys(gtx layout.Context) []Action {
	var acts []Action
	event.Op(gtx.Ops, a)
	filters := globalFilters(a)
	tally := a.screen == ScreenTally && !a.help && !a.tally.editing(gtx)
	if tally {
		// Keys typed before the tally took the focus (just after Ctrl+3)
		// reach the root: hand them to the tally.
		filters = append(filters, tallyRootFilters()...)
	}
	for {
		ev, ok := gtx.Event(filters...)
		if !ok {
			break
		}
		e, ok := ev.(key.Event)
		if !ok || e.State != key.Press {
			continue
		}
		if tally && e.Modifiers&^key.ModShift == 0 && isTallyKey(e.Name) {
			a.tally.early = append(a.tally.early, e)
			continue
		}
		switch {
		case e.Name == keyHelp:
			acts = append(acts, ToggleHelp{})
		case e.Name == key.NameEscape:
			acts = append(acts, CloseHelp{})
		case e.Name == keyContrast:
			acts = append(acts, SetMode{Mode: otherMode(a.th.Mode)})
		case e.Name == keyBigger || e.Name == "+":
			acts = append(acts, SetScale{Scale: nextScale(a.th.Scale, +1)})
		case e.Name == keySmaller:
			acts = append(acts, SetScale{Scale: nextScale(a.th.Scale, -1)})
		default:
			for _, s := range Screens() {
				if e.Name == screenKey(s) {
					acts = append(acts, GoTo{Screen: s})
				}
			}
		}
	}
	return acts
}

// Apply carries out actions. It runs on the window goroutine.
func (a *App) Apply(acts []Action) {
	for _, act := range acts {
		switch act := act.(type) {
		case GoTo:
			a.goTo(act.Screen)
		case ToggleHelp:
			a.help = !a.help
		case CloseHelp:
			if !a.help && a.screen == ScreenTally {
				a.tally.escape()
			}
			a.help = false
		case SetMode:
			a.th = a.th.With(act.Mode, a.th.Scale)
			a.cfg.Mode = act.Mode
		case SetScale:
			a.th = a.th.With(a.th.Mode, act.Scale)
			a.cfg.Scale = act.Scale
		case SetMassUnit:
			a.cfg.Unit = act.Unit
		default:
			a.applyData(act)
		}
	}
}

func otherMode(m theme.Mode) theme.Mode {
	if m == theme.HighContrast {
		return theme.Normal
	}
	return theme.HighContrast
}

// nextScale steps through theme.Scales, stopping at the ends.
func nextScale(cur float32, dir int) float32 {
	i := 0
	for j, s := range theme.Scales {
		if s <= cur+1e-3 {
			i = j
		}
	}
	i += dir
	if i < 0 {
		i = 0
	}
	if i >= len(theme.Scales) {
		i = len(theme.Scales) - 1
	}
	return theme.Scales[i]
}
