// Package desk is the one use-case layer of baleassay: what a front end
// does with the records, the audit and the yield. The CLI (cmd/bale)
// parses, calls the desk and prints; the app lays out, calls the desk and
// renders. Neither computes anything of its own.
//
// # Opening
//
//	d, err := desk.Open(desk.Location{}, desk.Options{})            // the user's store
//	d, err := desk.Open(desk.Location{Demo: true}, desk.Options{})  // the demo store (MakeDemo first)
//	d, err := desk.Open(desk.Location{Dir: dir}, desk.Options{Create: true})
//	defer d.Close()
//
// A missing store is a *NoStoreError (ErrNoStore) unless Options.Create.
// A store held by another process fails at once with store.ErrStoreInUse.
//
// # Concurrency
//
// A *Desk is safe for concurrent use by several goroutines: an app may
// run a Monte Carlo yield and an import in the background while the
// screen lists bales. Reads run side by side; writes are serialised by the
// store, each committed and synced before it returns. Long jobs
// (YieldPulls, YieldBale, Import) take a context.Context and stop when it
// is done; they report progress through a func(Progress) called on the
// job's goroutine (post it to the UI loop), with a typed Step.
//
// # What it offers
//
//	records   Sites, AddSite, EditSite, RemoveSite, FindSites (near, within, box);
//	          Bales (joined with site names, pull counts and each audit),
//	          AddBale, EditBale, RemoveBale; Pulls, AddPulls, EditPull, RemovePull;
//	          drafts of a pull being typed: PutDraft, Draft, Drafts, DiscardDraft,
//	          SaveDraft (turns it into a pull, checked like AddPulls)
//	ids       Resolve (full id, event id, unique prefix or suffix of 4 or more
//	          hex digits, bale tag, site name), Find (sites by name, bales by tag),
//	          Show (value, conflict, whole history, a bale's audit), Conflicts
//	          (concurrent edits and pull labels used twice), ResolveConflict
//	audit     AuditBale (stored pulls, the bale's stored or named spec: a stored
//	          spec wins over a built-in one of the same name), AuditPulls (pulls
//	          read with ReadPulls), LoadSpec
//	yield     Plan (stored line or file, flake spec), YieldBale, YieldPulls: one
//	          evaluation plus the Monte Carlo, the overall flake-spec pass, what
//	          sinks with the PET, and the cautions that apply; with
//	          YieldOptions.Sensitivity what drives the spread
//	loads     ParseLoadBale, AuditLoad: a delivery of bales, some audited (stored
//	          bales or pulls files with their masses), by two-stage sampling:
//	          composition, verdict in bales, the advice between more bales and
//	          more pulls, and with a plan its flake and polyol
//	hazards   HazardNotice: what to show when saved pulls hold a hazard
//	summaries SummarizeRegion, SummarizeSite, SummarizeSites: shares across
//	          bales, bales with hazards, with labels used twice, not assessed
//	value     LoadPrices (a price sheet file, or the illustrative built-in
//	          one), ValuePulls, ValueBale, ValueSite (every Monte Carlo draw
//	          priced per tonne of bale, P10/P50/P90 on both routes),
//	          ValueBales, ValueColumns and ValueCells (the value columns of
//	          a bale export)
//	measured  AddMeasured (a batch's flake, moisture, streams and reactor
//	          figures, checked against the bales and the line), Measured,
//	          RemoveMeasured
//	calibrate Calibrate (every measured batch predicted with its line,
//	          agreement per line and per site, proposed line ranges),
//	          SaveCalibratedLine (a new version of the line)
//	settings  Settings, Setting, SaveSetting (checked by the same reader the
//	          audit or the yield uses; the name inside must match)
//	transfer  Key (this device's id and fingerprint), WritePublicKey;
//	          TrustedKeys, CandidateOf + TrustKey (a key shown and
//	          confirmed before it is trusted), TrustAdd (fingerprint, PEM or
//	          bundle), TrustRemove; ExportBundles; BundleFiles, Import (demo
//	          records refused unless ImportOptions.AllowDemo); Inspect (a
//	          bundle as an import into a store would judge it, without
//	          importing: signer and trust, signature, body, authorship,
//	          every event decoded and validated, demo records; the payload
//	          plain and with the field names of bundle.cddl)
//	demo      MakeDemo (refuses a folder of real records; replaces a demo
//	          store only with Force); Generate (a season of any size, into
//	          a store or as the signed bundles of its devices)
//	store     CheckStore (every page, event and index), RescueStore (what
//	          still verifies of a damaged store, into a new one); every
//	          store opens read-only until its first write
//	lab       ImportPaths (folders of bundles: a summary per device, gaps,
//	          every refusal); ReportBale, ReportSites (what data/report
//	          renders as HTML); ExportCSV (bales, pulls, sites), ExportGeoJSON;
//	          WriteFile (synced, never over an existing file unless forced)
//	files     ReadPulls: the pulls CSV from any reader (stdin too), BOM accepted,
//	          UTF-16, semicolons and decimal commas refused with the fix, "did
//	          you mean" for keys, kg or lb, optional total_count (pieces
//	          examined), weighed and taken columns; ReadPullsFile and
//	          AuditPullsOf: pulls for an audit without a store, held to the
//	          bounds of a save (record.ValidatePullValues), and the bale mass
//	          beside them too (ErrBaleMass)
//
// AuditPulls, LoadSpec, Plan and YieldPulls may be called on a nil *Desk
// when no store is open: they then know the built-in specs, lines and
// files only.
//
// # Results and errors
//
// Results are plain structs of typed values; states are enums with
// String() (AuditState, Refusal, Concern, Step, SettingKind, QueryKind,
// Unit, Caution, FingerprintSource; assess.Verdict, assess.Bound,
// assess.Method from the audit; yield.Route, yield.ObsKind,
// yield.CoverageVerdict and record.Method from value and calibration).
// Nothing needs a string compared.
//
// Errors wrap a sentinel of this package (ErrNotFound, ErrAmbiguous,
// ErrWrongKind, ErrDeleted, ErrRefused, ErrNeedsConfirm, ErrNoPulls,
// ErrUsage, ErrNoStore, ErrBadPulls, ErrBaleMass, ErrExists, ...) or of the records; use errors.Is
// and errors.As. Their texts speak to the user: no package prefixes,
// plural forms right, numbers without exponents (Num, Plural help a front
// end do the same). A save the checks find implausible returns a
// *ConfirmError listing typed Checks: show them, and call again with
// SaveOptions{Confirm: true} if the user agrees. A save refused outright
// returns a *RefusedError with its typed Reason (a pull total above the
// bale's gross mass, a pull label the bale already has, an unknown spec, a
// side that looks like centimetres, ...). A refused save writes nothing.
// An ambiguous id returns an *AmbiguousError listing the candidates.
//
// Corrections never overwrite: an edit saves a new value that supersedes
// the old one, a removal saves a tombstone; Show lists the history.
package desk
