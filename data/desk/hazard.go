package desk

import (
	"fmt"
	"strings"

	"baleassay/assess"
	"baleassay/data/record"
)

// HazardNotice is the notice a front end shows when pulls it saved hold
// a hazard (a battery, an oil or chemical container, sharps, medical
// waste) by mass or by count, naming the pulls; "" when none does.
func HazardNotice(pulls []record.PullRecord) string {
	var labels []string
	for _, p := range pulls {
		if p.Kg["hazard"] > 0 || p.Pieces["hazard"] > 0 {
			labels = append(labels, p.Label)
		}
	}
	if len(labels) == 0 {
		return ""
	}
	what := "pulls"
	if len(labels) == 1 {
		what = "pull"
	}
	return fmt.Sprintf("HAZARD in %s %s. %s", what, strings.Join(labels, ", "), assess.CautionHazard)
}
