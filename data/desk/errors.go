package desk

import (
	"errors"
	"fmt"
	"strconv"
	"strings"

	"baleassay/data/record"
	"baleassay/data/store"
)

// Sentinels. Every error of the desk wraps one of these or an error of
// the records (record.ErrInvalid and its family); test with errors.Is.
// Messages speak to the user and carry no package prefix.
var (
	ErrNoStore      = errors.New("no records store there yet")
	ErrNotFound     = errors.New("not found")
	ErrAmbiguous    = errors.New("more than one record matches")
	ErrWrongKind    = errors.New("a record of another kind")
	ErrDeleted      = errors.New("removed")
	ErrRefused      = errors.New("not saved")
	ErrNeedsConfirm = errors.New("needs confirming")
	ErrNoPulls      = errors.New("no pulls")
	ErrUsage        = errors.New("wrong input")
	ErrDemoExists   = errors.New("a demo store is already there")
	ErrRealStore    = errors.New("that folder holds real records")
)

// NoStoreError says that a folder holds no store yet.
type NoStoreError struct {
	Dir  string
	Demo bool
}

func (e *NoStoreError) Error() string {
	if e.Demo {
		return fmt.Sprintf("there is no demo store at %s yet: make it first (bale demo)", e.Dir)
	}
	return fmt.Sprintf("there is no records store at %s yet: add a site first, or name another store folder", e.Dir)
}

func (e *NoStoreError) Unwrap() error { return ErrNoStore }

// Candidate is one record an ambiguous id or name could mean.
type Candidate struct {
	ID    record.EntityID
	Kind  record.Kind
	Label string // name, tag or label
}

// AmbiguousError lists the records a text could mean.
type AmbiguousError struct {
	Text       string
	Candidates []Candidate
}

func (e *AmbiguousError) Error() string {
	var b strings.Builder
	fmt.Fprintf(&b, "%q matches %d records; give more digits of the one you mean:", e.Text, len(e.Candidates))
	for _, c := range e.Candidates {
		fmt.Fprintf(&b, "\n  %s  %s %s", c.ID, c.Kind, c.Label)
	}
	return b.String()
}

func (e *AmbiguousError) Unwrap() error { return ErrAmbiguous }

// Refusal is why a save was refused outright.
type Refusal uint8

// The refusals.
const (
	RefuseInvalid        Refusal = iota + 1 // a value breaks a record rule (see the wrapped *record.FieldError)
	RefuseOverGross                         // the pulls weigh more than the bale
	RefuseDuplicateLabel                    // the bale has a pull of that label
	RefuseUnknownSpec                       // the bale names a spec that is neither stored nor built in
	RefuseCentimetres                       // a bale side above 5 m: centimetres given for metres
	RefuseSiteHasBales                      // a site with bales removed without confirming
	RefuseDeleted                           // the record was removed
	RefuseConflicted                        // a record in conflict cannot be used until resolved
	RefuseBadPulls                          // a pulls file that cannot be read as it is
	refusalEnd
)

var refusalNames = [...]string{"", "invalid", "over_gross", "duplicate_label", "unknown_spec", "centimetres", "site_has_bales", "deleted", "conflicted", "bad_pulls"}

func (r Refusal) String() string {
	if r > 0 && r < refusalEnd {
		return refusalNames[r]
	}
	return "refusal(" + strconv.Itoa(int(r)) + ")"
}

// RefusedError refuses a save with its reason; nothing was written.
type RefusedError struct {
	Reason Refusal
	Msg    string
	Err    error // the underlying error, when there is one
}

func (e *RefusedError) Error() string { return "not saved: " + e.Msg }

func (e *RefusedError) Unwrap() []error {
	if e.Err != nil {
		return []error{ErrRefused, e.Err}
	}
	return []error{ErrRefused}
}

func refused(r Refusal, format string, args ...any) *RefusedError {
	return &RefusedError{Reason: r, Msg: fmt.Sprintf(format, args...)}
}

// Concern is an implausible-but-possible value that a save asks the user
// to confirm.
type Concern uint8

// The concerns.
const (
	ConcernNullIsland     Concern = iota + 1 // coordinates exactly 0, 0
	ConcernDenseBale                         // denser than plausible
	ConcernLightBale                         // below the common minimum density
	ConcernFutureClock                       // a stamp ahead of this device's clock
	ConcernSiteNearby                        // another site within 50 m
	ConcernSiteSameName                      // another site of the same name
	ConcernReceivedFuture                    // a bale received in the future
	ConcernReceivedOld                       // a bale received before 1990
	ConcernSiteHasBales                      // removing a site that still has bales
	ConcernFlakeShare                        // a measured batch's flake is an implausible share of its bales
	ConcernMeasuredTwice                     // a bale already in another measured batch
	ConcernNotAudited                        // a measured batch holds a bale without pulls: it cannot be predicted
	ConcernRanFuture                         // a measured batch dated in the future
	concernEnd
)

var concernNames = [...]string{"", "null_island", "dense_bale", "light_bale", "future_clock", "site_nearby", "site_same_name", "received_future", "received_old", "site_has_bales",
	"flake_share", "measured_twice", "not_audited", "ran_future"}

func (c Concern) String() string {
	if c > 0 && c < concernEnd {
		return concernNames[c]
	}
	return "concern(" + strconv.Itoa(int(c)) + ")"
}

// Check is one concern about one value.
type Check struct {
	Concern Concern
	Message string
}

// ConfirmError refuses a save until the user confirms its checks
// (Confirm in the call's options); nothing was written.
type ConfirmError struct{ Checks []Check }

func (e *ConfirmError) Error() string {
	parts := make([]string, len(e.Checks))
	for i, c := range e.Checks {
		parts[i] = c.Message
	}
	return "please check: " + strings.Join(parts, "; ")
}

func (e *ConfirmError) Unwrap() error { return ErrNeedsConfirm }

func concernOf(c record.WarningCode) Concern {
	switch c {
	case record.WarnNullIsland:
		return ConcernNullIsland
	case record.WarnDenseBale:
		return ConcernDenseBale
	case record.WarnLightBale:
		return ConcernLightBale
	}
	return ConcernFutureClock
}

// saveError turns an error of a store save into one of the desk.
func saveError(err error) error {
	var we *store.WarningsError
	if errors.As(err, &we) {
		ce := &ConfirmError{}
		for _, w := range we.Warnings {
			ce.Checks = append(ce.Checks, Check{concernOf(w.Code), w.Message})
		}
		return ce
	}
	var fe *record.FieldError
	if errors.As(err, &fe) {
		return &RefusedError{Reason: RefuseInvalid, Msg: fe.Error(), Err: err}
	}
	return err
}

// Plural gives "1 pull", "2 pulls".
func Plural(n int, one, many string) string {
	if n == 1 {
		return "1 " + one
	}
	return strconv.Itoa(n) + " " + many
}

// Num writes x for text: fixed-point with at most digits decimals,
// trailing zeros dropped, never an exponent.
func Num(x float64, digits int) string {
	s := strconv.FormatFloat(x, 'f', digits, 64)
	if strings.Contains(s, ".") {
		s = strings.TrimRight(strings.TrimRight(s, "0"), ".")
	}
	if s == "-0" {
		s = "0"
	}
	return s
}
