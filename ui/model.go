package ui

import (
	"context"
	"errors"
	"fmt"
	"sort"
	"strings"
	"time"

	"baleassay/assess"
	"baleassay/data/desk"
	"baleassay/data/geo"
	"baleassay/data/record"
	"baleassay/data/transfer"
)

// model is what the app knows of the store: answers of the desk, held on
// the window goroutine. Screens read it; only the app writes it, from
// answers posted to the inbox.
type model struct {
	sites  Latest[[]desk.SiteRow]
	near   Latest[[]geo.Hit]
	site   record.EntityID // the site whose bales are listed
	bales  Latest[[]desk.BaleRow]
	all    Latest[[]desk.BaleRow] // every bale, newest last
	bale   record.EntityID        // the current bale
	pulls  Latest[[]desk.PullRow]
	result Latest[outcome]
	specs  []string

	saveSite Latest[record.EntityID]
	saveBale Latest[record.EntityID]
	savePull Latest[record.EntityID]
	draft    Latest[struct{}]
	restored *record.PullRecord // a draft found at start, for the tally

	dests    Latest[[]desk.ExportDest]
	exported Latest[desk.ExportResult]
	imported Latest[transfer.ImportReport]
	progress desk.Progress
	trusted  Latest[string]

	note string // the latest piece of news, shown on the screens
}

// outcome is a bale's audit and yield, computed together.
type outcome struct {
	Bale     record.EntityID
	Audit    desk.Audit
	AuditErr error
	Yield    desk.YieldRun
	YieldErr error
	Took     time.Duration
}

// draftName is the name of a bale's draft pull in the store.
func draftName(bale record.EntityID) string { return "tally-" + bale.String() }

// baleRow is the current bale's row, when listed.
func (m *model) baleRow() (desk.BaleRow, bool) {
	for _, b := range m.all.Value {
		if b.ID == m.bale {
			return b, true
		}
	}
	return desk.BaleRow{}, false
}

// siteName is a site's name from the list.
func (m *model) siteName(id record.EntityID) string {
	for _, s := range m.sites.Value {
		if s.ID == id {
			return s.Site.Name
		}
	}
	return ""
}

// start loads what the first screen shows and restores a draft pull.
func (a *App) start() {
	d := a.cfg.Desk
	if d == nil {
		return
	}
	a.m.specs = specNames(d)
	a.loadLists()
	a.m.draft.Start(a.owner.do, &a.in, func(context.Context) (struct{}, error) {
		names, err := d.Drafts()
		if err != nil {
			return struct{}{}, err
		}
		for _, n := range names {
			if !strings.HasPrefix(n, "tally-") {
				continue
			}
			p, ok, err := d.Draft(n)
			if err != nil || !ok {
				continue
			}
			a.in.post(func() {
				a.m.restored = &p
				a.setBale(p.Bale)
				a.tally.restore(p)
				a.screen = ScreenTally
				a.m.note = fmt.Sprintf("Pull %s was being typed when the app stopped: it is back as it was.", p.Label)
			})
			break
		}
		return struct{}{}, nil
	}, nil)
}

// loadLists reloads the sites and every bale; the newest bale becomes
// the current one if there is none.
func (a *App) loadLists() {
	d := a.cfg.Desk
	a.m.sites.Start(a.owner.do, &a.in, func(context.Context) ([]desk.SiteRow, error) { return d.Sites() }, nil)
	a.m.all.Start(a.owner.do, &a.in, func(context.Context) ([]desk.BaleRow, error) { return d.Bales(desk.BaleFilter{}) }, func() {
		if a.m.bale.IsZero() && len(a.m.all.Value) > 0 {
			a.setBale(a.m.all.Value[len(a.m.all.Value)-1].ID)
		}
	})
	if !a.m.site.IsZero() {
		a.loadSiteBales()
	}
}

func (a *App) loadSiteBales() {
	d, site := a.cfg.Desk, a.m.site
	a.m.bales.Start(a.owner.do, &a.in, func(context.Context) ([]desk.BaleRow, error) {
		return d.Bales(desk.BaleFilter{Site: site.String()})
	}, nil)
}

// saveSite runs a site's save on the owner; when it succeeds the form
// closes, the site is selected and the lists reload, with note shown.
func (a *App) saveSite(note string, save func() (record.EntityID, error)) {
	a.m.saveSite.Start(a.owner.do, &a.in, func(context.Context) (record.EntityID, error) { return save() }, func() {
		if a.m.saveSite.Err == nil {
			a.sites.form.saved()
			a.m.note = note
			a.m.site = a.m.saveSite.Value
			a.loadLists()
		}
	})
}

// setBale makes a bale current and loads its pulls and outcome.
func (a *App) setBale(id record.EntityID) {
	if id != a.m.bale {
		a.tally.reset()
	}
	a.m.bale = id
	a.loadBale()
}

func (a *App) loadBale() {
	d, bale := a.cfg.Desk, a.m.bale
	if d == nil || bale.IsZero() {
		return
	}
	a.m.pulls.Start(a.owner.do, &a.in, func(context.Context) ([]desk.PullRow, error) {
		_, rows, err := d.Pulls(bale.String())
		return rows, err
	}, nil)
	a.m.result.Start(goRun, &a.in, func(ctx context.Context) (outcome, error) {
		return computeOutcome(ctx, d, bale), nil
	}, nil)
}

// computeOutcome runs the audit and the yield of a bale through the desk.
func computeOutcome(ctx context.Context, d *desk.Desk, bale record.EntityID) outcome {
	t0 := time.Now()
	o := outcome{Bale: bale}
	o.Audit, o.AuditErr = d.AuditBale(bale.String(), desk.AuditOptions{})
	if o.AuditErr == nil {
		// the pulls the audit read, so the store is read once
		plan, err := d.Plan("", "")
		if err == nil {
			o.Yield, err = d.YieldPulls(ctx, o.Audit.Input.Pulls, o.Audit.Record.GrossKg, plan, desk.YieldOptions{}, nil)
		}
		o.YieldErr = err
	}
	o.Took = time.Since(t0)
	return o
}

func (a *App) goTo(s Screen) {
	a.screen = s
	a.help = false
	if d := a.cfg.Desk; s == ScreenTransfer && d != nil {
		a.m.dests.Start(a.owner.do, &a.in, func(context.Context) ([]desk.ExportDest, error) { return d.Destinations() }, nil)
	}
	if s == ScreenTally {
		a.tally.focusFirst = true
	}
	if s == ScreenIntake && a.intake.site.IsZero() {
		// receive at the site chosen on Sites, or the current bale's site
		site := a.m.site
		if row, ok := a.m.baleRow(); ok && site.IsZero() {
			site = row.Bale.Site
		}
		if !site.IsZero() {
			a.intake.setSite(site, a.m.siteName(site))
		}
	}
}

// applyData carries out the actions that read or write the store.
func (a *App) applyData(act Action) {
	d := a.cfg.Desk
	if d == nil {
		return
	}
	switch act := act.(type) {
	case SelectSite:
		a.m.site = act.ID
		a.loadSiteBales()
	case AddSite:
		a.saveSite(fmt.Sprintf("Site %s saved. Receive its first bale when it comes.", act.Site.Name), func() (record.EntityID, error) {
			return d.AddSite(act.Site, desk.SaveOptions{Confirm: act.Confirm})
		})
	case CorrectSite:
		a.saveSite(fmt.Sprintf("Site %s corrected; the earlier value stays in its history.", act.Site.Name), func() (record.EntityID, error) {
			s := act.Site
			id, _, err := d.EditSite(act.ID.String(), desk.SiteEdit{Name: &s.Name, Kind: &s.Kind, Lat: &s.Lat, Lon: &s.Lon}, desk.SaveOptions{Confirm: act.Confirm})
			return id, err
		})
	case FindNear:
		a.m.near.Start(a.owner.do, &a.in, func(context.Context) ([]geo.Hit, error) {
			return d.FindSites(desk.Query{Kind: desk.QueryNear, Lat: act.Lat, Lon: act.Lon, K: 5})
		}, nil)
	case OpenBale:
		a.setBale(act.ID)
		a.goTo(act.Screen)
	case ReceiveAt:
		a.intake.setSite(act.Site, a.m.siteName(act.Site))
		a.goTo(ScreenIntake)
	case SaveBale:
		a.m.saveBale.Start(a.owner.do, &a.in, func(context.Context) (record.EntityID, error) {
			return d.AddBale(act.In, desk.SaveOptions{Confirm: act.Confirm})
		}, func() {
			if a.m.saveBale.Err == nil {
				a.intake.saved()
				a.m.note = fmt.Sprintf("Bale %s received. Tally its pulls now.", act.In.Tag)
				a.m.bale = record.EntityID{}
				a.setBale(a.m.saveBale.Value)
				a.loadLists()
				a.goTo(ScreenTally)
			}
		})
	case KeepDraft:
		a.m.draft.Start(a.owner.do, &a.in, func(context.Context) (struct{}, error) {
			return struct{}{}, d.PutDraft(draftName(act.Bale), act.Bale.String(), act.Pull)
		}, nil)
	case DropDraft:
		a.owner.do(func() { _ = d.DiscardDraft(draftName(act.Bale)) })
		a.tally.reset()
	case SavePull:
		a.m.draft.Cancel()
		a.m.savePull.Start(a.owner.do, &a.in, func(context.Context) (record.EntityID, error) {
			return savePull(d, act)
		}, func() {
			if a.m.savePull.Err == nil {
				a.m.note = fmt.Sprintf("Pull %s saved.", act.Pull.Label)
				if !act.Corrects.IsZero() {
					a.m.note = fmt.Sprintf("Pull %s corrected; the earlier value stays in its history.", act.Pull.Label)
				}
				a.tally.reset()
				a.tally.focusFirst = true
				a.loadBale()
				a.loadLists()
			}
		})
	case ExportTo:
		a.m.exported.Start(a.owner.do, &a.in, func(context.Context) (desk.ExportResult, error) {
			return d.Export(act.Dir, act.Dest)
		}, func() {
			a.m.dests.Start(a.owner.do, &a.in, func(context.Context) ([]desk.ExportDest, error) { return d.Destinations() }, nil)
		})
	case ImportFrom:
		a.m.progress = desk.Progress{}
		a.m.imported.Start(goRun, &a.in, func(ctx context.Context) (transfer.ImportReport, error) {
			paths, err := desk.BundleFiles([]string{act.Dir})
			if err != nil {
				return transfer.ImportReport{}, err
			}
			return d.Import(ctx, paths, desk.ImportOptions{}, func(p desk.Progress) { a.in.post(func() { a.m.progress = p }) })
		}, func() {
			a.loadLists()
			a.loadBale()
		})
	case CancelImport:
		a.m.imported.Cancel()
	case StartOwnStore:
		if a.cfg.StartOwn == nil {
			return
		}
		open := a.cfg.StartOwn
		a.owner.do(func() {
			nd, err := open()
			a.in.post(func() {
				if err != nil {
					a.m.note = "Could not start your own records: " + errText(err)
					return
				}
				old := a.cfg.Desk
				a.cfg.Desk, a.cfg.Demo, a.cfg.StartOwn = nd, false, nil
				a.m = model{}
				a.tally.reset()
				a.intake.setSite(record.EntityID{}, "")
				a.owner.do(func() { old.Close() })
				a.start()
				a.m.note = "Your own records are at " + nd.Dir() + ". Add a site with the bale command line (bale sites add) to begin."
				a.goTo(ScreenSites)
			})
		})
	case TrustSigner:
		a.m.trusted.Start(a.owner.do, &a.in, func(context.Context) (string, error) {
			_, _, err := d.TrustAdd(act.File, act.Name)
			return act.Name, err
		}, nil)
	}
}

// savePull saves a typed pull: a new one through its draft, or a
// correction that supersedes a saved pull.
func savePull(d *desk.Desk, act SavePull) (record.EntityID, error) {
	opt := desk.SaveOptions{Confirm: act.Confirm}
	if !act.Corrects.IsZero() {
		id, err := d.EditPull(act.Corrects.String(), act.Pull, opt)
		if err == nil {
			_ = d.DiscardDraft(draftName(act.Bale))
		}
		return id, err
	}
	if err := d.PutDraft(draftName(act.Bale), act.Bale.String(), act.Pull); err != nil {
		return record.EntityID{}, err
	}
	return d.SaveDraft(draftName(act.Bale), opt)
}

// specNames are the specs a bale can be graded against: the built-in ones
// and those kept in the store.
func specNames(d *desk.Desk) []string {
	names := append([]string(nil), assess.BuiltinSpecNames()...)
	if rows, err := d.Settings(); err == nil {
		for _, r := range rows {
			if r.Kind == desk.SettingSpec {
				names = append(names, r.Name)
			}
		}
	}
	sort.Strings(names)
	return names
}

// isConfirm reports whether err asks the user to confirm checks.
func isConfirm(err error) (*desk.ConfirmError, bool) {
	var ce *desk.ConfirmError
	return ce, errors.As(err, &ce)
}
