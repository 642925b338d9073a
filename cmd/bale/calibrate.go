package main

import (
	"context"
	"encoding/json"
	"fmt"
	"io"
	"math"
	"os"
	"text/tabwriter"

	"baleassay/assess"
	"baleassay/data/desk"
	"baleassay/yield"
)

func init() {
	register(command{
		name: "calibrate",
		usage: "[--site SITE] [--line NAME] [--from DATE --to DATE] [--draws N] [--seed S] [--scale-error F] [--scale-floor-kg K] " +
			"[--moisture-sd P] [--ohv-sd S] [--av-sd S] [--save] [--out FILE] [--json]  [--store DIR|--demo]",
		summary: "predicted against measured per line and per site (bias, spread, P10–P90 coverage), and adjusted line efficiencies to save as a new version",
		run:     runCalibrate,
	})
}

func runCalibrate(args []string, stdout, stderr io.Writer) error {
	fs := newFlags("calibrate")
	dir := storeFlag(fs)
	var opt desk.CalibrateOptions
	fs.StringVar(&opt.Site, "site", "", "only batches whose bales all come from this site")
	fs.StringVar(&opt.Line, "line", "", "only batches run on this line (its name)")
	from := fs.String("from", "", "batches run from this day or time")
	to := fs.String("to", "", "batches run up to this day (inclusive) or time")
	fs.IntVar(&opt.MC.Draws, "draws", desk.DefaultCalibrationDraws, "Monte Carlo draws per batch prediction")
	fs.Uint64Var(&opt.MC.Seed, "seed", 1, "random seed; the same seed gives the same numbers")
	fs.Float64Var(&opt.Errors.ScaleRelSD, "scale-error", yield.DefaultScaleRelSD, "relative standard deviation of a weighing (0.005 = 0.5 %)")
	fs.Float64Var(&opt.Errors.ScaleAbsKg, "scale-floor-kg", yield.DefaultScaleAbsKg, "the weighing error's floor, kg (one SD)")
	fs.Float64Var(&opt.Errors.MoistureSD, "moisture-sd", yield.DefaultMoistureSD, "standard deviation of a moisture reading, percentage points")
	fs.Float64Var(&opt.Errors.HydroxylSD, "ohv-sd", 0, "standard deviation of the laboratory's hydroxyl value, mg KOH/g (0: not stated)")
	fs.Float64Var(&opt.Errors.AcidSD, "av-sd", 0, "standard deviation of the laboratory's acid value, mg KOH/g (0: not stated)")
	save := fs.Bool("save", false, "save the proposed line profile as a new version of the line (one line only)")
	outFile := fs.String("out", "", "write the proposed line profile to this JSON file (one line only)")
	asJSON := fs.Bool("json", false, "print JSON")
	_, d, err := openForArgs(fs, dir, args, 0, ": choose batches with --site, --line, --from and --to")
	if err != nil {
		return err
	}
	defer d.Close()
	if opt.MC.Draws < 2 || opt.MC.Draws > yield.MaxDraws {
		return usagef("--draws %d: give 2 to %d", opt.MC.Draws, yield.MaxDraws)
	}
	if opt.Range, err = desk.ParseDateRange(*from, *to); err != nil {
		return usagef("%v", err)
	}
	rep, err := d.Calibrate(context.Background(), opt, nil)
	if err != nil {
		return err
	}
	if *save || *outFile != "" {
		if err := keepProposal(d, rep, *save, *outFile, stdout, *asJSON); err != nil {
			return err
		}
	}
	if *asJSON {
		return writeJSON(stdout, calibrationOut(rep))
	}
	printCalibration(stdout, rep)
	return nil
}

// keepProposal saves and/or writes the one line's proposal.
func keepProposal(d *desk.Desk, rep desk.CalibrationReport, save bool, path string, stdout io.Writer, quiet bool) error {
	if len(rep.Lines) != 1 {
		return fmt.Errorf("the batches ran on %s; choose one with --line to save or write its proposal", desk.Plural(len(rep.Lines), "line", "lines"))
	}
	lr := rep.Lines[0]
	if lr.Proposal == nil {
		return fmt.Errorf("no proposal for line %q: %v", lr.Line, lr.ProposalErr)
	}
	if lr.Proposal.ProposalErr != nil {
		return fmt.Errorf("the proposed ranges for line %q do not form a valid profile: %v", lr.Line, lr.Proposal.ProposalErr)
	}
	if path != "" {
		b, err := json.MarshalIndent(lr.Proposal.Line, "", "  ")
		if err != nil {
			return err
		}
		if err := os.WriteFile(path, append(b, '\n'), 0o644); err != nil {
			return fmt.Errorf("cannot write %s: %v", path, err)
		}
		if !quiet {
			fmt.Fprintf(stdout, "wrote the proposed profile of %q to %s\n", lr.Line, path)
		}
	}
	if save {
		id, updated, err := d.SaveCalibratedLine(lr.Proposal.Line)
		if err != nil {
			return err
		}
		if !quiet {
			what := "saved"
			if updated {
				what = "saved a new version of"
			}
			fmt.Fprintf(stdout, "%s line %q (%s); the old version stays in its history (bale show %s)\n", what, lr.Line, id, id)
		}
	}
	return nil
}

func pctOf(x float64) string {
	if math.IsNaN(x) || math.IsInf(x, 0) {
		return "–"
	}
	return desk.Num(100*x, 2) + " %"
}

func num3(x float64) string {
	if math.IsNaN(x) || math.IsInf(x, 0) {
		return "–"
	}
	return assess.Sig(x, 4)
}

func quantityUnit(q yield.Observable) string {
	switch q.Kind {
	case yield.ObsMoisturePct:
		return "points"
	case yield.ObsHydroxylValue, yield.ObsAcidValue:
		return "mg KOH/g"
	}
	return "kg"
}

func printAgreement(w io.Writer, g desk.GroupAgreement, indent string) {
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
	fmt.Fprintf(tw, "%squantity\tn\tbias (measured − predicted)\t90 %% interval\tspread (SD)\tinside P10–P90\twith measuring error\n", indent)
	for _, q := range g.Quantities {
		a := q.Agreement
		u := quantityUnit(q.Quantity)
		rel := ""
		if u == "kg" {
			rel = " (" + pctOf(a.BiasRel) + ")"
		}
		fmt.Fprintf(tw, "%s%s\t%d\t%s %s%s\t[%s, %s]\t%s %s\t%d of %d: %s\t%d: %s\n", indent, q.Quantity, a.N, num3(a.Bias), u, rel,
			num3(a.BiasLow), num3(a.BiasHigh), num3(a.SD), u, a.Inside, a.N, verdictText(a.Verdict), a.InsideWithError, verdictText(a.VerdictWithError))
	}
	tw.Flush()
}

func verdictText(v yield.CoverageVerdict) string {
	switch v {
	case yield.CoverageTooFew:
		return "too few to judge"
	case yield.CoverageAsStated:
		return "as stated"
	case yield.CoverageTooNarrow:
		return "too narrow"
	case yield.CoverageTooWide:
		return "too wide"
	}
	return v.String()
}

func printCalibration(w io.Writer, rep desk.CalibrationReport) {
	if len(rep.Lines) == 0 {
		fmt.Fprintln(w, "no measured batches could be predicted (bale measured add records them)")
	}
	for _, lr := range rep.Lines {
		fmt.Fprintf(w, "Line %q: %s predicted against what was measured\n", lr.Line, desk.Plural(len(lr.Batches), "batch", "batches"))
		printAgreement(w, lr.All, "  ")
		if lr.Proposal == nil {
			fmt.Fprintf(w, "  no proposal: %v\n\n", lr.ProposalErr)
			continue
		}
		p := lr.Proposal
		fmt.Fprintf(w, "  Proposed efficiencies (%s):\n", p.Method)
		tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
		fmt.Fprintln(tw, "    share\tprofile\tmeasured say\tlearnt\tnew range\t")
		for _, e := range p.Params {
			if e.Informed < 0.05 {
				continue
			}
			fmt.Fprintf(tw, "    %s\t[%s, %s]\t%s ± %s\t%s\t[%s, %s]\t\n", e.Ref.Label(lr.Current), assess.Sig(e.Prior.Lo, 4), assess.Sig(e.Prior.Hi, 4), assess.Sig(e.Mean, 4), assess.Sig(e.SD, 2),
				pctOf(e.Informed), assess.Sig(e.Proposed.Lo, 4), assess.Sig(e.Proposed.Hi, 4))
		}
		tw.Flush()
		left := 0
		for _, e := range p.Params {
			if e.Informed < 0.05 {
				left++
			}
		}
		if left > 0 {
			fmt.Fprintf(w, "    (%s the measurements say little about keep their ranges)\n", desk.Plural(left, "share", "shares"))
		}
		fmt.Fprintf(w, "  PET yield of the line: %s ± %s → %s ± %s\n", pctOf(p.PETYield.PriorMean), pctOf(p.PETYield.PriorSD), pctOf(p.PETYield.Mean), pctOf(p.PETYield.SD))
		fmt.Fprintf(w, "  fit: χ² %s → %s on %d measured values", num3(p.ChiSqPrior), num3(p.ChiSqPost), p.Observations)
		if r := p.ChiSqPost / float64(p.Observations); r > 2 {
			fmt.Fprintf(w, " (%.1f per value: the line model or the stated measuring errors do not fit these batches)", r)
		}
		fmt.Fprintln(w)
		if p.Shrunk {
			fmt.Fprintln(w, "  the audited compositions were first shrunk to their expected values given the audits (regression calibration)")
		}
		for _, c := range p.Correlated {
			fmt.Fprintf(w, "  %s and %s are told apart only together (correlation %.2f): weigh the streams they feed\n", c.A, c.B, c.Rho)
		}
		if p.ProposalErr != nil {
			fmt.Fprintf(w, "  the proposed ranges do not form a valid profile: %v\n", p.ProposalErr)
		} else {
			fmt.Fprintf(w, "  keep it: bale calibrate --line %q --save (a new version of the line), or --out FILE\n", lr.Line)
		}
		fmt.Fprintln(w)
	}
	if len(rep.Sites) > 0 {
		fmt.Fprintln(w, "Per site (batches whose bales all come from one site; every quantity is in --json):")
		tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
		fmt.Fprintln(tw, "  site	batches	flake: bias	90 % interval	inside P10–P90	hydroxyl value: bias	")
		for _, g := range rep.Sites {
			flake, ohv := "–\t–\t–", "–"
			for _, q := range g.Quantities {
				a := q.Agreement
				switch q.Quantity.Kind {
				case yield.ObsFlakeKg, yield.ObsFlakeDryKg:
					flake = fmt.Sprintf("%s\t[%s, %s] kg\t%d of %d", pctOf(a.BiasRel), num3(a.BiasLow), num3(a.BiasHigh), a.Inside, a.N)
				case yield.ObsHydroxylValue:
					ohv = num3(a.Bias) + " mg KOH/g"
				}
			}
			fmt.Fprintf(tw, "  %s\t%d\t%s\t%s\t\n", g.Name, g.Batches, flake, ohv)
		}
		tw.Flush()
	}
	if rep.MixedLeftOut > 0 {
		fmt.Fprintf(w, "%s with this site's bales mixed with others' left out\n", desk.Plural(rep.MixedLeftOut, "batch", "batches"))
	}
	for _, b := range rep.Skipped {
		fmt.Fprintf(w, "not predicted: batch %s: %s\n", b.ID, b.Skipped)
	}
	fmt.Fprintln(w, "The P10–P90 is the prediction's own spread (audits and line ranges); \"with measuring error\" widens it by the stated scale and laboratory errors. The acid value is predicted from residual PVC only.")
}

// calibrationJSON is the output of 'bale calibrate --json'.
type calibrationJSON struct {
	Method       string        `json:"method"`
	Lines        []lineCalJSON `json:"lines"`
	Sites        []groupJSON   `json:"sites"`
	Skipped      []skippedJSON `json:"skipped"`
	MixedLeftOut int           `json:"mixed_left_out"`
}

type lineCalJSON struct {
	Line       string        `json:"line"`
	Batches    []batchJSON   `json:"batches"`
	All        groupJSON     `json:"agreement"`
	Proposal   *proposalJSON `json:"proposal"`
	NoProposal string        `json:"no_proposal,omitempty"`
}

type batchJSON struct {
	ID         string         `json:"id"`
	Site       string         `json:"site,omitempty"`
	Ran        string         `json:"ran"`
	Bales      int            `json:"bales"`
	Quantities []batchQtyJSON `json:"quantities"`
}

type batchQtyJSON struct {
	Quantity  string      `json:"quantity"`
	Measured  float64     `json:"measured"`
	Predicted summaryJSON `json:"predicted"`
}

type groupJSON struct {
	Name       string    `json:"name"`
	Site       string    `json:"site,omitempty"`
	Batches    int       `json:"batches"`
	Quantities []qtyJSON `json:"quantities"`
}

type qtyJSON struct {
	Quantity         string   `json:"quantity"`
	N                int      `json:"n"`
	Bias             *float64 `json:"bias"`
	BiasRel          *float64 `json:"bias_rel"`
	BiasLow          *float64 `json:"bias_low"`
	BiasHigh         *float64 `json:"bias_high"`
	SD               *float64 `json:"sd"`
	SDRel            *float64 `json:"sd_rel"`
	Inside           int      `json:"inside"`
	Below            int      `json:"below"`
	Above            int      `json:"above"`
	CoverageLow      float64  `json:"coverage_low"`
	CoverageHigh     float64  `json:"coverage_high"`
	Verdict          string   `json:"verdict"`
	InsideWithError  int      `json:"inside_with_error"`
	VerdictWithError string   `json:"verdict_with_error"`
}

type proposalJSON struct {
	Method       string         `json:"method"`
	Params       []paramJSON    `json:"params"`
	PETYield     yield.PETYield `json:"pet_yield"`
	ChiSqPrior   float64        `json:"chi2_prior"`
	ChiSqPost    float64        `json:"chi2_post"`
	Observations int            `json:"observations"`
	Shrunk       bool           `json:"shrunk"`
	Correlated   []correlJSON   `json:"correlated"`
	Valid        bool           `json:"valid"`
	Line         yield.Line     `json:"line"`
}

type paramJSON struct {
	Share     string      `json:"share"`
	Label     string      `json:"label"`
	Profile   yield.Param `json:"profile"`
	PriorMean float64     `json:"prior_mean"`
	PriorSD   float64     `json:"prior_sd"`
	Mean      float64     `json:"mean"`
	SD        float64     `json:"sd"`
	Informed  float64     `json:"informed"`
	Proposed  yield.Param `json:"proposed"`
}

type correlJSON struct {
	A   string  `json:"a"`
	B   string  `json:"b"`
	Rho float64 `json:"rho"`
}

type skippedJSON struct {
	ID  string `json:"id"`
	Why string `json:"why"`
}

func groupOut(g desk.GroupAgreement) groupJSON {
	out := groupJSON{Name: g.Name, Batches: g.Batches, Quantities: []qtyJSON{}}
	if g.Site != [16]byte{} {
		out.Site = g.Site.String()
	}
	for _, q := range g.Quantities {
		a := q.Agreement
		out.Quantities = append(out.Quantities, qtyJSON{Quantity: q.Quantity.String(), N: a.N, Bias: jnum(a.Bias), BiasRel: jnum(a.BiasRel),
			BiasLow: jnum(a.BiasLow), BiasHigh: jnum(a.BiasHigh), SD: jnum(a.SD), SDRel: jnum(a.SDRel), Inside: a.Inside, Below: a.Below, Above: a.Above,
			CoverageLow: a.CoverageLow, CoverageHigh: a.CoverageHigh, Verdict: a.Verdict.String(), InsideWithError: a.InsideWithError, VerdictWithError: a.VerdictWithError.String()})
	}
	return out
}

func calibrationOut(rep desk.CalibrationReport) calibrationJSON {
	out := calibrationJSON{Method: rep.Method, Lines: []lineCalJSON{}, Sites: []groupJSON{}, Skipped: []skippedJSON{}, MixedLeftOut: rep.MixedLeftOut}
	for _, lr := range rep.Lines {
		l := lineCalJSON{Line: lr.Line, Batches: []batchJSON{}, All: groupOut(lr.All)}
		for _, b := range lr.Batches {
			bj := batchJSON{ID: b.ID.String(), Site: b.SiteName, Ran: recTime(b.Rec.RanMs), Bales: len(b.Rec.Bales)}
			for i, q := range b.Observe {
				bj.Quantities = append(bj.Quantities, batchQtyJSON{Quantity: q.String(), Measured: b.Measured[i], Predicted: summaryOf(b.Pred.Full[i])})
			}
			l.Batches = append(l.Batches, bj)
		}
		if p := lr.Proposal; p != nil {
			pj := &proposalJSON{Method: p.Method, Params: []paramJSON{}, PETYield: p.PETYield, ChiSqPrior: p.ChiSqPrior, ChiSqPost: p.ChiSqPost,
				Observations: p.Observations, Shrunk: p.Shrunk, Correlated: []correlJSON{}, Valid: p.ProposalErr == nil, Line: p.Line}
			for _, e := range p.Params {
				pj.Params = append(pj.Params, paramJSON{Share: e.Ref.String(), Label: e.Ref.Label(lr.Current), Profile: e.Prior, PriorMean: e.PriorMean,
					PriorSD: e.PriorSD, Mean: e.Mean, SD: e.SD, Informed: e.Informed, Proposed: e.Proposed})
			}
			for _, c := range p.Correlated {
				pj.Correlated = append(pj.Correlated, correlJSON{c.A.String(), c.B.String(), c.Rho})
			}
			l.Proposal = pj
		} else if lr.ProposalErr != nil {
			l.NoProposal = lr.ProposalErr.Error()
		}
		out.Lines = append(out.Lines, l)
	}
	for _, g := range rep.Sites {
		out.Sites = append(out.Sites, groupOut(g))
	}
	for _, b := range rep.Skipped {
		out.Skipped = append(out.Skipped, skippedJSON{b.ID.String(), b.Skipped})
	}
	return out
}
