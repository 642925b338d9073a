package desk

import (
	"errors"
	"fmt"

	"baleassay/assess"
	"baleassay/data/record"
)

// ReadPullsFile reads one bale's pulls from a CSV file (ReadPulls: BOM,
// "did you mean", kg or lb, the optional total_count, weighed and taken
// columns) for an audit without a store, and holds every pull to the
// rules a save holds it to (AuditPullsOf). A FIFO, device or folder is
// refused without waiting on it. unit 0 takes the file's own unit line,
// or kg.
func ReadPullsFile(path string, unit Unit) ([]assess.Pull, error) {
	f, _, err := assess.OpenRegular(path)
	if err != nil {
		return nil, &PullsError{Name: path, Msg: fmt.Sprintf("cannot read the file (%v); check the path", err)}
	}
	defer f.Close()
	recs, err := ReadPulls(f, path, unit)
	if err != nil {
		return nil, err
	}
	return AuditPullsOf(path, recs)
}

// AuditPullsOf turns pulls read from a file (name, for messages) into the
// audit's pulls, each held to the bounds of a save
// (record.ValidatePullValues: each part and their sum at most 5,000 kg,
// piece counts to 10⁶, the pieces examined not below the pieces counted,
// the parts against the weighed mass, terminal-safe labels): a file
// assessed without a store is one the store would take. The error wraps
// ErrBadPulls and the records' sentinel.
func AuditPullsOf(name string, recs []record.PullRecord) ([]assess.Pull, error) {
	out := make([]assess.Pull, 0, len(recs))
	for _, r := range recs {
		if err := record.ValidatePullValues(r); err != nil {
			return nil, fmt.Errorf("%w: %s, pull %q: %w", ErrBadPulls, name, r.Label, err)
		}
		p, err := record.AssessPull(r)
		if err != nil {
			return nil, fmt.Errorf("%w: %s, pull %q: %w", ErrBadPulls, name, r.Label, err)
		}
		out = append(out, p)
	}
	return out, nil
}

// ErrBaleMass refuses a bale mass given beside pulls that no saved bale
// could have: out of range, or less than what was sampled from it.
var ErrBaleMass = errors.New("the bale's mass does not fit")

// checkBaleKg holds the bale mass given beside pulls to the rule of a
// saved bale (finite, above 0, at most 5,000 kg) and to the pulls: the
// bale cannot weigh less than what was sampled from it. known says
// whether the mass must be given (an audit may go without it: 0).
func checkBaleKg(pulls []assess.Pull, baleKg float64, known bool) error {
	if !known && baleKg == 0 {
		return nil
	}
	if err := record.ValidateGrossKg(baleKg); err != nil {
		return fmt.Errorf("%w: %w", ErrBaleMass, err)
	}
	if s := (assess.Audit{Pulls: pulls}).SampledKg(); baleKg < s*(1-1e-9) {
		return fmt.Errorf("%w: %s kg is below the %s kg sampled; check the bale's mass or the pull masses", ErrBaleMass, Num(baleKg, 3), Num(s, 3))
	}
	return nil
}
