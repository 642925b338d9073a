package desk

import (
	"errors"
	"fmt"
	"time"

	"baleassay/assess"
	"baleassay/data/record"
	"baleassay/data/store"
)

// DefaultSpec is the spec a bale is judged against when neither the call
// nor the bale names one.
const DefaultSpec = "glycol-feed"

// NoSpec, as a spec name, asks for no verdict.
const NoSpec = "none"

// DateRange is a span of received dates: [From, Until); a zero end is
// open.
type DateRange struct{ From, Until time.Time }

// Contains reports whether a time in Unix ms lies in the range.
func (r DateRange) Contains(ms int64) bool {
	t := time.UnixMilli(ms)
	return (r.From.IsZero() || !t.Before(r.From)) && (r.Until.IsZero() || t.Before(r.Until))
}

// ParseDateRange reads the ends as a user gives them: a day (2026-03-02,
// UTC) or an RFC 3339 time. The last day counts whole, so from and to
// the same day is that one day. A range that ends before it starts is an
// error.
func ParseDateRange(from, to string) (DateRange, error) {
	var r DateRange
	var err error
	if r.From, _, err = parseWhen("from", from); err != nil {
		return r, err
	}
	var day bool
	if r.Until, day, err = parseWhen("to", to); err != nil {
		return r, err
	}
	if day {
		r.Until = r.Until.AddDate(0, 0, 1)
	}
	if !r.From.IsZero() && !r.Until.IsZero() && !r.Until.After(r.From) {
		return r, fmt.Errorf("%w: the range ends (%s) before it starts (%s)", ErrUsage, to, from)
	}
	return r, nil
}

// ParseWhen reads a day (2026-03-02, UTC midnight) or an RFC 3339 time.
func ParseWhen(what, s string) (time.Time, error) {
	t, _, err := parseWhen(what, s)
	return t, err
}

func parseWhen(what, s string) (time.Time, bool, error) {
	if s == "" {
		return time.Time{}, false, nil
	}
	if t, err := time.Parse("2006-01-02", s); err == nil {
		return t, true, nil
	}
	if t, err := time.Parse(time.RFC3339, s); err == nil {
		return t, false, nil
	}
	return time.Time{}, false, fmt.Errorf("%w: %s %q: give a date as 2026-03-02 or 2026-03-02T14:30:00Z", ErrUsage, what, s)
}

// AuditState says whether a bale has an audit.
type AuditState uint8

// The audit states.
const (
	AuditNoPulls AuditState = iota + 1 // nothing to assess yet
	AuditDone                          // assessed (Result is set)
	AuditFailed                        // the pulls could not be assessed (Err says why)
)

func (s AuditState) String() string {
	switch s {
	case AuditNoPulls:
		return "no_pulls"
	case AuditDone:
		return "assessed"
	case AuditFailed:
		return "failed"
	}
	return fmt.Sprintf("audit(%d)", uint8(s))
}

// AuditSummary is a bale's audit in one line: its target-PET share, the
// verdict of its spec and whether hazards were found.
type AuditSummary struct {
	State       AuditState
	Pulls       int
	TargetPET   assess.Share
	Spec        string         // the spec judged against ("" for none)
	Verdict     assess.Verdict // valid when HasVerdict
	HasVerdict  bool
	Hazard      bool
	LabelClash  []string // labels given to more than one pull (two devices): a conflict to resolve
	Err         error    // why there is no audit (AuditFailed)
	SpecMissing bool     // the bale's spec could not be found: no verdict
}

// summarize assesses a bale's pulls against its own spec (or the
// default one) at the default level.
func (d *Desk) summarize(b record.BaleRecord, pulls []store.PullView) AuditSummary {
	sum := AuditSummary{Pulls: len(pulls)}
	if len(pulls) == 0 {
		sum.State = AuditNoPulls
		return sum
	}
	a, clash, err := auditOf(b, pulls)
	sum.LabelClash = clash
	if err != nil {
		sum.State, sum.Err = AuditFailed, err
		return sum
	}
	res, err := assess.Assess(a, assess.Options{})
	if err != nil {
		sum.State, sum.Err = AuditFailed, err
		return sum
	}
	sum.State = AuditDone
	sum.TargetPET = res.Group(assess.GroupPET)
	sum.Hazard = len(res.HazardPulls) > 0 || res.HazardPieces > 0
	name := b.Spec
	if name == "" {
		name = DefaultSpec
	}
	spec, err := d.LoadSpec(name)
	if errors.Is(err, store.ErrDamaged) {
		sum.State, sum.Err = AuditFailed, err // Bales reports it: never a listing without its verdicts
		return sum
	}
	if err != nil {
		sum.SpecMissing = true
		return sum
	}
	if v, err := assess.Judge(res, spec); err == nil {
		sum.Spec, sum.Verdict, sum.HasVerdict = spec.Name, v.Verdict, true
	}
	return sum
}

// auditOf builds the audit of a bale from its pulls; pulls that share a
// label are kept apart and named in clash (store.AuditInput, which
// publish uses too).
func auditOf(b record.BaleRecord, pulls []store.PullView) (assess.Audit, []string, error) {
	return store.AuditInput(b, pulls)
}

// LoadSpec finds a spec by name (a stored spec wins over a built-in one of
// the same name) or reads it from a JSON file. A nil *Desk (no store
// open) knows the built-in specs and files only.
func (d *Desk) LoadSpec(nameOrPath string) (assess.Spec, error) {
	if body, found, err := d.setting(SettingSpec, nameOrPath); err != nil {
		return assess.Spec{}, err
	} else if found {
		return assess.ParseSpec(body)
	}
	return assess.LoadSpec(nameOrPath)
}

// AuditOptions tune an audit; zero values take the defaults.
type AuditOptions struct {
	Spec       string // spec name or file; NoSpec for no verdict; "" for the bale's own, or DefaultSpec
	Confidence float64
	Method     assess.Method
	Precision  float64 // relative precision of the sample-size advice
}

// Audit is a full audit of a bale's pulls.
type Audit struct {
	Bale       record.EntityID // zero for pulls from a file
	Record     record.BaleRecord
	Input      assess.Audit // the pulls as assessed (labels that clash made unique)
	Result     assess.Result
	Verdict    *assess.SpecVerdict
	Advice     assess.Advice
	Report     assess.Report
	LabelClash []string
}

// AuditBale assesses a stored bale's pulls against its stored spec (or
// the one named), with the store's settings.
func (d *Desk) AuditBale(text string, opt AuditOptions) (Audit, error) {
	st, err := d.Resolve(text, record.KindBale)
	if err != nil {
		return Audit{}, err
	}
	cur, err := live(st)
	if err != nil {
		return Audit{}, err
	}
	pulls, err := d.st.Pulls(st.ID)
	if err != nil {
		return Audit{}, err
	}
	if len(pulls) == 0 {
		return Audit{}, fmt.Errorf("%w: bale %s has no pulls yet (pulls add %s FILE)", ErrNoPulls, st.ID, st.ID)
	}
	a, clash, err := auditOf(*cur.Bale, pulls)
	if err != nil {
		return Audit{}, err
	}
	if opt.Spec == "" {
		opt.Spec = cur.Bale.Spec
	}
	out, err := d.audit(a, opt)
	out.Bale, out.Record, out.LabelClash = st.ID, *cur.Bale, clash
	return out, err
}

// AuditPulls assesses pulls read from a file; baleKg 0 means the bale's
// mass is not known. It may be called on a nil *Desk (no store open).
func (d *Desk) AuditPulls(pulls []assess.Pull, baleKg float64, opt AuditOptions) (Audit, error) {
	if err := checkBaleKg(pulls, baleKg, false); err != nil {
		return Audit{}, err
	}
	return d.audit(assess.Audit{Pulls: pulls, BaleKg: baleKg}, opt)
}

func (d *Desk) audit(a assess.Audit, opt AuditOptions) (Audit, error) {
	if opt.Spec == "" {
		opt.Spec = DefaultSpec
	}
	if opt.Precision == 0 {
		opt.Precision = assess.DefaultRelPrecision
	}
	res, err := assess.Assess(a, assess.Options{Method: opt.Method, Confidence: opt.Confidence})
	if err != nil {
		return Audit{}, err
	}
	out := Audit{Input: a, Result: res}
	if opt.Spec != NoSpec {
		spec, err := d.LoadSpec(opt.Spec)
		if err != nil {
			return out, err
		}
		v, err := assess.Judge(res, spec)
		if err != nil {
			return out, err
		}
		out.Verdict = &v
	}
	out.Advice = assess.Advise(res, out.Verdict, opt.Precision)
	out.Report = assess.NewReport(res, out.Verdict, out.Advice)
	return out, nil
}
