package store

import (
	"fmt"
	"sort"

	"baleassay/assess"
	"baleassay/data/record"
)

// AuditInput builds the audit of a bale from its shown pulls as the front
// ends assess it (desk) and as publish stores it. Pulls that share a label
// (added on two devices at once) are kept apart: each such label gets the
// last 8 hex digits of its pull's id, and the shared labels are returned
// in clash, so a conflict never drops a bale's audit.
func AuditInput(b record.BaleRecord, pulls []PullView) (a assess.Audit, clash []string, err error) {
	a = assess.Audit{BaleKg: b.GrossKg}
	count := map[string]int{}
	for _, p := range pulls {
		count[p.Pull.Label]++
	}
	for l, n := range count {
		if n > 1 {
			clash = append(clash, l)
		}
	}
	sort.Strings(clash)
	for _, p := range pulls {
		ap, err := record.AssessPull(p.Pull)
		if err != nil {
			return a, clash, err
		}
		if count[p.Pull.Label] > 1 {
			s := p.ID.String()
			ap.Label = fmt.Sprintf("%s (%s)", p.Pull.Label, s[len(s)-8:])
		}
		a.Pulls = append(a.Pulls, ap)
	}
	return a, clash, nil
}
