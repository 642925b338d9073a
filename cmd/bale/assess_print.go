package main

import (
	"fmt"
	"io"
	"math"
	"sort"
	"strings"
	"text/tabwriter"

	"baleassay/assess"
	"baleassay/data/desk"
)

func pct(x float64) string { return fmt.Sprintf("%.2f %%", 100*x) }

func intervalText(lo, hi *float64) string {
	if lo == nil {
		return "no interval (1 pull)"
	}
	return fmt.Sprintf("%.2f – %.2f %%", 100**lo, 100**hi)
}

// shareInterval is a share's interval, or its none-found bound.
func shareInterval(s assess.ShareReport) string {
	if s.NoneFound != nil {
		if s.NoneFound.Method == assess.BoundWholeBale.String() {
			return "none in the whole bale"
		}
		return "none found: ≤ " + pctUp(s.NoneFound.Upper)
	}
	return intervalText(s.Low, s.High)
}

// pctUp prints a bound in per cent, rounded up so it never understates.
func pctUp(x float64) string {
	return assess.NoneFound{Upper: x}.UpperText() + " %"
}

func printReport(w io.Writer, rep assess.Report, res assess.Result) {
	fmt.Fprintf(w, "Bale audit: %s, %.2f kg sampled", desk.Plural(rep.Pulls, "pull", "pulls"), rep.SampledKg)
	if rep.BaleKg > 0 {
		fmt.Fprintf(w, " of a %.0f kg bale (%.1f %%)", rep.BaleKg, 100*rep.SampledShare)
	}
	fmt.Fprintf(w, "\n%s estimator, %.0f %% confidence", map[string]string{"ratio": "Cochran ratio", "mean": "ASTM D5231 mean-of-fractions"}[rep.Method], 100*rep.Confidence)
	if !math.IsNaN(res.T) {
		fmt.Fprintf(w, " (Student t = %.3f, %d df)", res.T, rep.Pulls-1)
	}
	fmt.Fprintln(w)
	printBody(w, rep.Groups, rep.Categories, rep.Confidence, rep.Pieces, rep.Hazards, rep.SampledKg)
	if s := rep.Spec; s != nil {
		limits := make([]limitRow, len(s.Limits))
		for i, l := range s.Limits {
			limits[i] = limitRow{l.LimitCore, l.MorePulls, l.PullsNeeded}
		}
		printSpec(w, s.Name, s.Verdict, s.Grade, s.GradeState, s.CountAttached, limits, "pulls", noneTexts(rep.Groups, rep.Categories))
	}
	fmt.Fprintf(w, "\nNext: %s.\n", rep.Advice.Why)
	for _, n := range rep.Notes {
		fmt.Fprintf(w, "Note: %s\n", n)
	}
	fmt.Fprintln(w, "\nSafety: bale ties are under tension and bales spring apart when cut: cut from the side, wear eye protection,")
	fmt.Fprintln(w, "never stand under a lifted bale. Hazardous containers, sharps and lithium batteries may be inside. Local codes rule.")
}

// printBody prints the shares, the piece counts and the hazards of a
// bale or a load.
func printBody(w io.Writer, groups, cats []assess.ShareReport, conf float64, pieces []assess.PieceReport, h assess.HazardReport, sampledKg float64) {
	printShares(w, groups, cats, conf)
	printPieces(w, pieces)
	fmt.Fprintln(w)
	printHazards(w, h, sampledKg)
}

// printShares prints the groups, the categories found and, grouped by
// their bound, the categories found in no pull.
func printShares(w io.Writer, groups, cats []assess.ShareReport, conf float64) {
	head := fmt.Sprintf("%.0f %% interval", 100*conf)
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', tabwriter.AlignRight)
	fmt.Fprintf(tw, "\ngroup\tkg\tshare\t%s\t\n", head)
	for _, g := range groups {
		fmt.Fprintf(tw, "%s\t%.3f\t%s\t%s\t\n", g.Name, g.Kg, pct(g.Fraction), shareInterval(g))
	}
	fmt.Fprintf(tw, "\ncategory\tcode\tkg\tshare\t%s\t\n", head)
	for _, c := range cats {
		if c.NoneFound != nil {
			continue
		}
		code := "–"
		if c.Code != nil && *c.Code > 0 {
			code = fmt.Sprint(*c.Code)
		}
		fmt.Fprintf(tw, "%s\t%s\t%.3f\t%s\t%s\t\n", c.Key, code, c.Kg, pct(c.Fraction), intervalText(c.Low, c.High))
	}
	tw.Flush()
	byBound := map[string][]string{}
	var bounds []float64
	var first *assess.NoneFoundReport
	for _, c := range cats {
		nf := c.NoneFound
		if nf == nil {
			continue
		}
		if first == nil {
			first = nf
		}
		k := pctUp(nf.Upper)
		if _, ok := byBound[k]; !ok {
			bounds = append(bounds, nf.Upper)
		}
		byBound[k] = append(byBound[k], c.Key)
	}
	if first == nil {
		return
	}
	if first.Method == assess.BoundWholeBale.String() {
		fmt.Fprintf(w, "Not found in the whole bale: %s\n", strings.Join(flatten(byBound), ", "))
		return
	}
	fmt.Fprintf(w, "Not found in %d %s (%.1f kg), bounded, not proven absent (at most, at %.0f %%):\n", first.Pulls, plural(first.Pulls, "pull", "pulls"), first.Kg, 100*first.Level)
	sort.Sort(sort.Reverse(sort.Float64Slice(bounds)))
	for _, b := range bounds {
		fmt.Fprintf(w, "  ≤ %-8s %s\n", pctUp(b), strings.Join(byBound[pctUp(b)], ", "))
	}
}

func flatten(m map[string][]string) []string {
	var out []string
	for _, v := range m {
		out = append(out, v...)
	}
	sort.Strings(out)
	return out
}

func plural(n int, one, many string) string {
	if n == 1 {
		return one
	}
	return many
}

// printPieces prints the piece counts: shares only out of the pieces
// examined, otherwise counts per pull and per 100 kg.
func printPieces(w io.Writer, pieces []assess.PieceReport) {
	if len(pieces) == 0 {
		return
	}
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', tabwriter.AlignRight)
	fmt.Fprintf(tw, "\npieces\tcount\tpulls\tper pull\tper 100 kg\texamined\tshare\tWilson\tClopper–Pearson\t\n")
	var none []string
	for _, p := range pieces {
		if p.Total == nil {
			fmt.Fprintf(tw, "%s\t%d\t%d\t%.1f\t%.1f\t–\tno share: no total_count\t\t\t\n", p.Key, p.Pieces, p.Pulls, p.PerPull, p.Per100Kg)
			continue
		}
		fmt.Fprintf(tw, "%s\t%d\t%d\t%.1f\t%.1f\t%d\t%s\t%.2f – %.2f %%\t%.2f – %.2f %%\t\n", p.Key, p.Pieces, p.Pulls, p.PerPull, p.Per100Kg,
			*p.Total, pct(*p.Fraction), 100*p.Wilson[0], 100*p.Wilson[1], 100*p.ClopperPearson[0], 100*p.ClopperPearson[1])
		if p.NoneText != "" {
			none = append(none, p.Key+": "+p.NoneText)
		}
	}
	tw.Flush()
	for _, n := range none {
		fmt.Fprintf(w, "  %s\n", n)
	}
}

func printHazards(w io.Writer, h assess.HazardReport, sampledKg float64) {
	if h.Found {
		fmt.Fprintf(w, "HAZARDS FOUND in %s %s: %.3f kg, %d %s.\n", plural(len(h.Pulls), "pull", "pulls"), strings.Join(h.Pulls, ", "), h.Kg, h.Pieces, plural(h.Pieces, "piece", "pieces"))
		fmt.Fprintln(w, wrap(assess.CautionHazard, 100))
		return
	}
	fmt.Fprintf(w, "Hazards: none found in the %.2f kg sampled (this does not prove the bale free of them).\n", sampledKg)
}

// noneTexts maps every item found in no pull to its bound in words.
func noneTexts(lists ...[]assess.ShareReport) map[string]string {
	m := map[string]string{}
	for _, l := range lists {
		for _, s := range l {
			if s.NoneFound != nil {
				m[s.Key] = s.NoneFound.Text
			}
		}
	}
	return m
}

// limitRow is a limit of a bale (pulls) or of a load (bales).
type limitRow struct {
	assess.LimitCore
	more, total *int
}

// printSpec prints a spec's verdict, its grade and its limits; unit is
// what more of decides a limit ("pulls" or "bales").
func printSpec(w io.Writer, name, verdict, grade, gradeState string, attached bool, limits []limitRow, unit string, none map[string]string) {
	fmt.Fprintf(w, "\nSpec %s: %s", name, strings.ToUpper(verdict))
	switch gradeState {
	case assess.GradeSure.String():
		fmt.Fprintf(w, "    grade: %s (the whole interval lies in this band)", grade)
	case assess.GradeSpans.String():
		fmt.Fprintf(w, "    grade: %s (the interval reaches into another band)", grade)
	case assess.GradeNoInterval.String():
		fmt.Fprintf(w, "    grade: %s (the estimate's band; one pull gives no interval)", grade)
	case assess.GradeWithheld.String():
		fmt.Fprint(w, "    no grade: it fails the spec")
	}
	fmt.Fprintln(w)
	if attached {
		fmt.Fprintln(w, "  Target PET counts the closures and labels attached to the bottles (this spec's choice).")
	} else {
		fmt.Fprintln(w, "  Target PET leaves out the closures and labels attached to the bottles.")
	}
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
	fmt.Fprintf(tw, "  item\tlimit\tshare\tinterval\tverdict\tto decide\n")
	var bounds []string
	seen := map[string]bool{}
	for _, l := range limits {
		lim := map[string]string{"min": "≥ ", "max": "≤ ", "zero": "none"}[l.Bound]
		if l.Bound != "zero" {
			lim += pct(l.Limit)
		}
		interval := intervalText(l.Low, l.High)
		if l.Fraction == 0 && l.High != nil && *l.High > 0 && l.Low != nil && *l.Low == 0 {
			interval = "none found: ≤ " + pctUp(*l.High)
		}
		fmt.Fprintf(tw, "  %s\t%s\t%s\t%s\t%s\t%s\n", l.Item, lim, pct(l.Fraction), interval, l.Verdict, needText(l.Verdict, l.Need, l.more, l.total, unit))
		if t, ok := none[l.Item]; ok && !(attached && l.Item == assess.GroupPET.Key()) && !seen[l.Item] {
			bounds = append(bounds, l.Item+": "+t)
			seen[l.Item] = true
		}
	}
	tw.Flush()
	for _, b := range bounds {
		fmt.Fprintf(w, "  %s\n", b)
	}
}

// needText says what decides a limit: "–" when decided, "4 more (10 in
// all)", "sort the whole bale" or "unknown".
func needText(verdict, need string, more, total *int, unit string) string {
	if verdict != assess.Undecided.String() {
		return "–"
	}
	switch need {
	case assess.SizePulls.String():
		one := strings.TrimSuffix(unit, "s")
		return fmt.Sprintf("%d more %s (%d in all)", *more, plural(*more, one, unit), *total)
	case assess.SizeWholeBale.String(), assess.SizeBeyondReach.String():
		if unit == "bales" {
			return "not even every bale"
		}
		return "sort the whole bale"
	}
	return "unknown"
}
