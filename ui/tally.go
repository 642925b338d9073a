package ui

import (
	"strconv"
	"strings"

	"gioui.org/io/event"
	"gioui.org/io/key"
	"gioui.org/layout"
	"gioui.org/widget"

	"baleassay/assess"
	"baleassay/data/desk"
	"baleassay/data/record"
	"baleassay/ui/kit"
)

// tallyStep is where the grader is in a pull.
type tallyStep int

// The steps of a pull.
const (
	stepPullMass tallyStep = iota // typing the weighed mass of the pull
	stepPick                      // choosing the category of the next fraction
	stepFraction                  // typing a fraction's mass
)

func (s tallyStep) String() string {
	switch s {
	case stepPullMass:
		return "pull-mass"
	case stepPick:
		return "pick"
	case stepFraction:
		return "fraction"
	}
	return "step(" + strconv.Itoa(int(s)) + ")"
}

// entry is one fraction added to the pull, in the order typed (Backspace
// undoes the last).
type entry struct {
	cat int
	kg  float64
}

// tallyScreen: one pull at a time — its weighed mass, then each
// fraction by category key or button, the unsorted remainder shown, every
// change kept as a draft in the store.
type tallyScreen struct {
	step     tallyStep
	pullMass *kit.Field
	frac     *kit.Field
	cat      int
	entries  []entry
	label    string
	taken    int64           // the pull's time, kept when correcting
	corrects record.EntityID // a saved pull being corrected

	focusFirst bool        // move the focus to the step's control next frame
	early      []key.Event // tally keys that came before the tally had the focus
	keyTag     bool        // the tally's own key handler (its address is the tag)

	catBtns   []widget.Clickable
	saveBtn   widget.Clickable
	undoBtn   widget.Clickable
	dropBtn   widget.Clickable
	anywayBtn widget.Clickable
	correct   clicks
	list      widget.List
	btnList   widget.List
	lastDraft draftKey // what the draft last sent held, to send only changes
}

func newTallyScreen() *tallyScreen {
	s := &tallyScreen{pullMass: kit.NewField(), frac: kit.NewField(), correct: clicks{},
		catBtns: make([]widget.Clickable, assess.NumCategories())}
	s.list.Axis = layout.Vertical
	s.btnList.Axis = layout.Vertical
	return s
}

// reset starts a new pull.
func (s *tallyScreen) reset() {
	s.step, s.entries, s.label, s.taken, s.corrects = stepPullMass, nil, "", 0, record.EntityID{}
	s.pullMass.SetText("")
	s.frac.SetText("")
	s.pullMass.Problem, s.frac.Problem = "", ""
	s.lastDraft = draftKey{}
	s.focusFirst = true
}

// restore puts a draft (or a saved pull to correct) back on the screen.
func (s *tallyScreen) restore(p record.PullRecord) {
	s.reset()
	s.label, s.taken = p.Label, p.TakenMs
	for i := 0; i < assess.NumCategories(); i++ {
		if kg := p.Kg[assess.CategoryAt(i).Key]; kg > 0 {
			s.entries = append(s.entries, entry{cat: i, kg: kg})
		}
	}
	if p.StatedKg > 0 {
		s.pullMass.SetText(strconv.FormatFloat(p.StatedKg, 'f', -1, 64))
		s.step = stepPick
	}
	s.lastDraft = s.key2()
}

// record is the pull as typed so far, in kg.
func (s *tallyScreen) record(a *App, u desk.Unit) record.PullRecord {
	p := record.PullRecord{Bale: a.m.bale, Label: s.label, Kg: map[string]float64{}}
	if m, err := desk.ParseMass(s.pullMass.Text(), u); err == nil {
		p.StatedKg = m.Kg
	}
	for _, e := range s.entries {
		p.Kg[assess.CategoryAt(e.cat).Key] += e.kg
	}
	return p
}

// draftKey identifies what a draft holds without building it: the typed
// mass, the label and the fractions (appended or undone one at a time).
type draftKey struct {
	mass, label string
	n           int
	last        entry
}

func (s *tallyScreen) key2() draftKey {
	k := draftKey{mass: s.pullMass.Text(), label: s.label, n: len(s.entries)}
	if k.n > 0 {
		k.last = s.entries[k.n-1]
	}
	return k
}

// nextLabel is P1, P2, … after the bale's saved pulls.
func nextLabel(rows []desk.PullRow) string {
	used := map[string]bool{}
	for _, r := range rows {
		used[r.Pull.Label] = true
	}
	for n := len(rows) + 1; ; n++ {
		if l := "P" + strconv.Itoa(n); !used[l] {
			return l
		}
	}
}

// Layout draws the screen and returns the user's actions.
func (s *tallyScreen) Layout(gtx layout.Context, a *App) ([]Action, layout.Dimensions) {
	if a.m.bale.IsZero() {
		return nil, layout.Flex{Axis: layout.Vertical}.Layout(gtx,
			layout.Rigid(title(a.th, "Tally pulls")), vgap(12),
			layout.Rigid(body(a.th, "No bale yet: receive one first (Ctrl+2), or open one from its site (Ctrl+1).")))
	}
	if s.label == "" && a.m.pulls.Has && !a.m.pulls.Busy {
		s.label = nextLabel(a.m.pulls.Value)
	}
	acts := s.update(gtx, a)
	if k := s.key2(); k != s.lastDraft && s.corrects.IsZero() {
		s.lastDraft = k
		if p := s.record(a, a.cfg.Unit); len(p.Kg) > 0 || p.StatedKg > 0 {
			acts = append(acts, KeepDraft{Bale: a.m.bale, Pull: p})
		}
	}
	return acts, s.layout(gtx, a)
}

// update reads this frame's input: the fields, the keys, the buttons.
func (s *tallyScreen) update(gtx layout.Context, a *App) []Action {
	var acts []Action
	u := a.cfg.Unit
	if s.focusFirst {
		s.focusFirst = false
		gtx.Execute(key.FocusCmd{Tag: s.focusTarget()})
	}
	if submitted(gtx, s.pullMass) {
		s.confirmPullMass(gtx, u)
	}
	if submitted(gtx, s.frac) {
		s.addFraction(gtx, u)
	}
	event.Op(gtx.Ops, &s.keyTag)
	keys := s.early
	s.early = nil
	for {
		ev, ok := gtx.Event(tallyFilters(&s.keyTag)...)
		if !ok {
			break
		}
		if e, ok := ev.(key.Event); ok && e.State == key.Press {
			keys = append(keys, e)
		}
	}
	for _, e := range keys {
		acts = append(acts, s.key(gtx, a, e)...)
	}
	for i := range s.catBtns {
		if s.catBtns[i].Clicked(gtx) {
			s.pick(gtx, i)
		}
	}
	if s.undoBtn.Clicked(gtx) {
		s.undo()
	}
	if s.saveBtn.Clicked(gtx) {
		acts = append(acts, s.save(a, false)...)
	}
	if s.anywayBtn.Clicked(gtx) {
		acts = append(acts, s.save(a, true)...)
	}
	if s.dropBtn.Clicked(gtx) {
		acts = append(acts, DropDraft{Bale: a.m.bale})
	}
	for id, c := range s.correct {
		if c.Clicked(gtx) {
			for _, r := range a.m.pulls.Value {
				if r.ID == id {
					s.restore(r.Pull)
					s.corrects = id
					s.step = stepPick
					gtx.Execute(key.FocusCmd{Tag: &s.keyTag})
				}
			}
		}
	}
	return acts
}

func (s *tallyScreen) focusTarget() event.Tag { return &s.keyTag }

// editing reports whether one of the tally's editors has the focus (the
// user clicked into a field): then keys are the editor's.
func (s *tallyScreen) editing(gtx layout.Context) bool {
	return gtx.Focused(&s.pullMass.Editor) || gtx.Focused(&s.frac.Editor)
}

// key handles one key of the tally's own.
func (s *tallyScreen) key(gtx layout.Context, a *App, e key.Event) []Action {
	u := a.cfg.Unit
	switch s.step {
	case stepPullMass:
		if e.Name == key.NameReturn || e.Name == key.NameEnter {
			s.confirmPullMass(gtx, u)
		} else {
			typeKey(s.pullMass, e.Name)
		}
		return nil
	case stepFraction:
		if e.Name == key.NameReturn || e.Name == key.NameEnter {
			s.addFraction(gtx, u)
		} else {
			typeKey(s.frac, e.Name)
		}
		return nil
	}
	switch e.Name {
	case key.NameReturn, key.NameEnter:
		return s.save(a, false)
	case key.NameDeleteBackward:
		s.undo()
	default:
		if i, ok := categoryOfKey(e.Name); ok {
			s.pick(gtx, i)
		}
	}
	return nil
}

// typeKey types a key into a field the tally fills itself. The tally
// keeps the keyboard focus through a whole pull and reads keys, not text:
// a key that changes the step can then never arrive a second time as text
// in the next field, however fast the keys come.
func typeKey(f *kit.Field, n key.Name) {
	t := f.Text()
	switch {
	case n == key.NameDeleteBackward:
		if len(t) > 0 {
			t = t[:len(t)-1]
		}
	case len(n) == 1 && strings.ContainsAny(string(n), "0123456789.,+"):
		t += string(n)
	default:
		return
	}
	f.SetText(t)
}

// confirmPullMass checks the pull's mass and goes on to the fractions.
func (s *tallyScreen) confirmPullMass(gtx layout.Context, u desk.Unit) {
	if _, err := desk.ParseMass(s.pullMass.Text(), u); err != nil {
		s.pullMass.Problem = errText(err)
		return
	}
	s.pullMass.Problem = ""
	s.step = stepPick
	gtx.Execute(key.FocusCmd{Tag: &s.keyTag})
}

// pick chooses the category of the next fraction and moves to its field.
func (s *tallyScreen) pick(gtx layout.Context, i int) {
	if s.step == stepPullMass {
		if _, err := desk.ParseMass(s.pullMass.Text(), desk.UnitKg); err != nil {
			s.pullMass.Problem = "Weigh the pull first and type its mass here; then choose the categories."
			return
		}
	}
	s.cat, s.step = i, stepFraction
	s.frac.SetText("")
	s.frac.Problem = ""
	gtx.Execute(key.FocusCmd{Tag: &s.keyTag})
}

// addFraction adds the typed mass to the chosen category.
func (s *tallyScreen) addFraction(gtx layout.Context, u desk.Unit) {
	m, err := desk.ParseMass(s.frac.Text(), u)
	if err != nil {
		s.frac.Problem = errText(err)
		return
	}
	s.entries = append(s.entries, entry{cat: s.cat, kg: m.Kg})
	s.frac.SetText("")
	s.frac.Problem = ""
	s.step = stepPick
	gtx.Execute(key.FocusCmd{Tag: &s.keyTag})
}

// escape leaves a fraction's field without adding it.
func (s *tallyScreen) escape() {
	if s.step == stepFraction {
		s.step = stepPick
		s.frac.SetText("")
		s.frac.Problem = ""
		s.focusFirst = true
	}
}

func (s *tallyScreen) undo() {
	if s.step == stepPick && len(s.entries) > 0 {
		s.entries = s.entries[:len(s.entries)-1]
	}
}

// save asks to save the pull once it has a mass and a fraction.
func (s *tallyScreen) save(a *App, confirm bool) []Action {
	if s.step != stepPick || len(s.entries) == 0 {
		return nil
	}
	p := s.record(a, a.cfg.Unit)
	p.TakenMs = s.taken
	if p.TakenMs == 0 {
		p.TakenMs = a.cfg.Now().UnixMilli()
	}
	return []Action{SavePull{Bale: a.m.bale, Pull: p, Corrects: s.corrects, Confirm: confirm}}
}
