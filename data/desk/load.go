package desk

import (
	"context"
	"fmt"
	"os"
	"strconv"
	"strings"

	"baleassay/assess"
	"baleassay/data/record"
	"baleassay/yield"
)

// LoadBaleInput names one audited bale of a load: a stored bale (id, tag
// or unique digits, Text), or a pulls file with the bale's gross mass
// (File and Kg).
type LoadBaleInput struct {
	Text string
	File string
	Kg   float64
}

// ParseLoadBale reads a bale as a user gives it on a command line: a
// stored bale ("KL-0417", "1f3a9c2e"), or a pulls file with its mass
// after a colon ("bale7.csv:548").
func ParseLoadBale(s string) (LoadBaleInput, error) {
	if i := strings.LastIndex(s, ":"); i > 0 {
		kg, err := strconv.ParseFloat(s[i+1:], 64)
		if err != nil || !(kg > 0) {
			return LoadBaleInput{}, fmt.Errorf("%w: %q: give a pulls file with the bale's gross mass in kg after a colon, e.g. bale7.csv:548", ErrUsage, s)
		}
		return LoadBaleInput{File: s[:i], Kg: kg}, nil
	}
	if _, err := os.Stat(s); err == nil {
		return LoadBaleInput{}, fmt.Errorf("%w: %s is a file: add the bale's gross mass after a colon, e.g. %s:548 (a load weighs its bales in)", ErrUsage, s, s)
	}
	return LoadBaleInput{Text: s}, nil
}

// LoadOptions tune a load audit; zero values take the defaults.
type LoadOptions struct {
	// Bales is the number of bales delivered (N); 0 means only the
	// audited ones, i.e. the whole load was audited.
	Bales int
	// LoadKg is the load's mass; 0 counts Bales × the mean audited bale.
	LoadKg     float64
	Spec       string // spec name or file; NoSpec for no verdict; "" for DefaultSpec
	Confidence float64
	// BaleCost is the effort of auditing one more bale besides its pulls,
	// in pulls' worth (0: assess.DefaultBaleCost).
	BaleCost float64
	// Yield, when set, also runs the load through this plan.
	Yield *yield.Plan
	MC    yield.MCOptions
}

// LoadAudit is a load audit: the load's composition, verdict and advice,
// and with a plan its flake and polyol.
type LoadAudit struct {
	Load    assess.Load
	Result  assess.LoadResult
	Verdict *assess.SpecVerdict
	Advice  assess.LoadAdvice
	Report  assess.LoadReport
	// With a plan (LoadOptions.Yield): the load through the line and the
	// reactor, and what drives its spread.
	Yield   *YieldRun
	Drivers []yield.Driver
}

// AuditLoad audits a load from its audited bales: stored bales (their
// pulls and gross mass from the store; a nil *Desk knows none) or pulls
// files with their masses. It reads every bale first and refuses the
// whole load on the first bad one, naming it.
func (d *Desk) AuditLoad(ctx context.Context, bales []LoadBaleInput, opt LoadOptions) (LoadAudit, error) {
	if len(bales) == 0 {
		return LoadAudit{}, fmt.Errorf("%w: name the audited bales of the load: stored bales, or pulls files as FILE:KG", ErrUsage)
	}
	load := assess.Load{Bales: opt.Bales, LoadKg: opt.LoadKg}
	if load.Bales == 0 {
		load.Bales = len(bales)
	}
	for _, in := range bales {
		b, err := d.loadBale(in)
		if err != nil {
			return LoadAudit{}, err
		}
		load.Audited = append(load.Audited, b)
	}
	lr, err := assess.AssessLoad(load, assess.Options{Confidence: opt.Confidence})
	if err != nil {
		return LoadAudit{}, err
	}
	out := LoadAudit{Load: load, Result: lr}
	spec := opt.Spec
	if spec == "" {
		spec = DefaultSpec
	}
	if spec != NoSpec {
		s, err := d.LoadSpec(spec)
		if err != nil {
			return out, err
		}
		v, err := assess.JudgeLoad(lr, s)
		if err != nil {
			return out, err
		}
		out.Verdict = &v
	}
	out.Advice = assess.AdviseLoad(lr, out.Verdict, opt.BaleCost)
	out.Report = assess.NewLoadReport(lr, out.Verdict, out.Advice)
	if opt.Yield == nil {
		return out, nil
	}
	rep, mc, err := yield.RunLoad(ctx, lr, *opt.Yield, opt.MC, nil)
	if err != nil {
		return out, err
	}
	run := newYieldRun(lr.BaleKg, *opt.Yield, rep, mc)
	out.Yield = &run
	out.Drivers, err = yield.Sensitivity(lr.Spread, lr.BaleKg, *opt.Yield, opt.MC)
	return out, err
}

// loadBale reads one audited bale.
func (d *Desk) loadBale(in LoadBaleInput) (assess.LoadBale, error) {
	if in.File != "" {
		pulls, err := ReadPullsFile(in.File, 0)
		if err != nil {
			return assess.LoadBale{}, err
		}
		if err := checkBaleKg(pulls, in.Kg, true); err != nil {
			return assess.LoadBale{}, fmt.Errorf("%s: %w", in.File, err)
		}
		return assess.LoadBale{Label: in.File, Audit: assess.Audit{Pulls: pulls, BaleKg: in.Kg}}, nil
	}
	if d == nil {
		return assess.LoadBale{}, fmt.Errorf("%w: %q is not a pulls file; for a stored bale open a store, for a file give FILE:KG", ErrUsage, in.Text)
	}
	st, err := d.Resolve(in.Text, record.KindBale)
	if err != nil {
		return assess.LoadBale{}, err
	}
	cur, err := live(st)
	if err != nil {
		return assess.LoadBale{}, err
	}
	pulls, err := d.st.Pulls(st.ID)
	if err != nil {
		return assess.LoadBale{}, err
	}
	if len(pulls) == 0 {
		return assess.LoadBale{}, fmt.Errorf("%w: bale %s has no pulls yet: audit it, or leave it out of the audited bales", ErrNoPulls, st.ID)
	}
	a, _, err := auditOf(*cur.Bale, pulls)
	if err != nil {
		return assess.LoadBale{}, err
	}
	label := cur.Bale.Tag
	if label == "" {
		s := st.ID.String()
		label = s[len(s)-8:]
	}
	return assess.LoadBale{Label: label, Audit: a}, nil
}
