package desk

// Source: invented test inputs (the demo scenario and specs of our own);
// every expected number is what the desk itself answers for the same
// store (computed by our own formula), compared with the database's views.

import (
	"context"
	"fmt"
	"math"
	"testing"

	"baleassay/data/publish"
	"baleassay/data/publish/pgtest"
	"baleassay/data/record"
	"baleassay/data/store"
	"github.com/jackc/pgx/v5"
)

// The published views give what the desk gives 'bale' for the same
// records: per bale its audit (target-PET share, the verdict of the spec
// it names, hazards, labels used twice), per site 'bale sites summary';
// with a spec stored in the records, a pull label used twice on two
// devices, and after the stored spec changes.
func TestPublishMatchesDesk(t *testing.T) {
	dsn := pgtest.DSN(t)
	dir := t.TempDir()
	if _, _, err := MakeDemo(DemoOptions{Dir: dir, Weeks: 3, Seed: 5}); err != nil {
		t.Fatal(err)
	}
	d, err := Open(Location{Dir: dir}, Options{})
	if err != nil {
		t.Fatal(err)
	}
	defer d.Close()
	rows, err := d.Bales(BaleFilter{})
	if err != nil {
		t.Fatal(err)
	}
	// Two devices took a pull labelled P1 of the same bale.
	clashBale := rows[2]
	pulls, err := d.Store().Pulls(clashBale.ID)
	if err != nil {
		t.Fatal(err)
	}
	twin := pulls[0].Pull
	if _, err := d.Store().Save([]record.Event{{Kind: record.KindPull, Pull: &twin}}, store.SaveOptions{Confirm: true}); err != nil {
		t.Fatal(err)
	}
	// The lab keeps its own version of glycol-feed, stricter on PET.
	spec := func(minPET float64) []byte {
		return fmt.Appendf(nil, `{"name": "glycol-feed", "limits": [{"item": "pet", "min": %g}, {"item": "pvc", "max": 0.01}], "zero_tolerance": ["hazard"]}`, minPET)
	}
	if _, _, err := d.SaveSetting(SettingSpec, spec(0.85), "lab spec"); err != nil {
		t.Fatal(err)
	}
	o := publish.Options{}
	if pgtest.InCI() {
		o.PostGIS = publish.PostGISRequire
	}
	ctx := context.Background()
	if _, _, err := d.Publish(ctx, dsn, o); err != nil {
		t.Fatal(err)
	}
	conn, err := pgx.Connect(ctx, dsn)
	if err != nil {
		t.Fatal(err)
	}
	defer conn.Close(ctx)
	compareWithDesk(t, d, conn, clashBale.ID)

	// The lab tightens its spec: the next publish re-judges every bale.
	if _, _, err := d.SaveSetting(SettingSpec, spec(0.90), "lab spec"); err != nil {
		t.Fatal(err)
	}
	_, rep, err := d.Publish(ctx, dsn, o)
	if err != nil {
		t.Fatal(err)
	}
	if rep.New != 1 || rep.Audits < len(rows)/2 {
		t.Fatalf("after the spec changed: %+v", rep)
	}
	compareWithDesk(t, d, conn, clashBale.ID)
	if publish.DefaultSpec != DefaultSpec {
		t.Fatalf("publish judges against %q, the desk against %q", publish.DefaultSpec, DefaultSpec)
	}
}

func compareWithDesk(t *testing.T, d *Desk, conn *pgx.Conn, clashBale record.EntityID) {
	t.Helper()
	ctx := context.Background()
	rows, err := d.Bales(BaleFilter{})
	if err != nil {
		t.Fatal(err)
	}
	verdicts := map[string]int{}
	for _, r := range rows {
		var (
			pet     *float64
			verdict *string
			hazard  *bool
			clash   []string
			errText *string
		)
		err := conn.QueryRow(ctx, `SELECT target_pet, verdict, hazard_found, label_clash, error FROM baleassay.bale_audits WHERE bale = $1`,
			r.ID.String()).Scan(&pet, &verdict, &hazard, &clash, &errText)
		switch r.Audit.State {
		case AuditNoPulls:
			if err != pgx.ErrNoRows {
				t.Errorf("bale %s has no pulls but an audit row (%v)", r.Bale.Tag, err)
			}
			continue
		case AuditFailed:
			if err != nil || errText == nil {
				t.Errorf("bale %s: the desk could not assess it (%v), the database: %v", r.Bale.Tag, r.Audit.Err, err)
			}
			continue
		}
		if err != nil {
			t.Fatalf("bale %s: %v", r.Bale.Tag, err)
		}
		if pet == nil || *pet != r.Audit.TargetPET.Fraction || *hazard != r.Audit.Hazard || fmt.Sprint(clash) != fmt.Sprint(r.Audit.LabelClash) {
			t.Errorf("bale %s: database %v %v %v, desk %v %v %v", r.Bale.Tag, pet, *hazard, clash, r.Audit.TargetPET.Fraction, r.Audit.Hazard, r.Audit.LabelClash)
		}
		want := "<none>"
		if r.Audit.HasVerdict {
			want = r.Audit.Verdict.String()
		}
		got := "<none>"
		if verdict != nil {
			got = *verdict
		}
		if got != want {
			t.Errorf("bale %s verdict: database %s, desk %s", r.Bale.Tag, got, want)
		}
		verdicts[got]++
		if r.ID == clashBale && len(clash) == 0 {
			t.Error("the label used twice is not shown")
		}
	}
	if verdicts["pass"] == 0 || verdicts["fail"] == 0 {
		t.Errorf("verdicts %v: the comparison should see passes and failures", verdicts)
	}
	sites, err := d.Sites()
	if err != nil {
		t.Fatal(err)
	}
	for _, s := range sites {
		_, sum, err := d.SummarizeSite(s.ID.String(), DateRange{})
		if err != nil {
			t.Fatal(err)
		}
		var (
			bales, audited, hazards int
			mean, sd                *float64
		)
		if err := conn.QueryRow(ctx, `SELECT bales, audited, target_pet_mean, target_pet_sd, hazard_bales FROM baleassay.site_quality WHERE site = $1`,
			s.ID.String()).Scan(&bales, &audited, &mean, &sd, &hazards); err != nil {
			t.Fatal(err)
		}
		if bales != sum.Bales || audited != sum.Audited || hazards != len(sum.Hazards) {
			t.Errorf("site %s: database %d bales, %d audited, %d with hazards; desk %d, %d, %d", s.Site.Name, bales, audited, hazards, sum.Bales, sum.Audited, len(sum.Hazards))
		}
		// Summed in another order (SQL avg against Welford): 1e-12.
		if sum.Audited > 0 && (mean == nil || math.Abs(*mean-sum.TargetPET.Mean) > 1e-12) {
			t.Errorf("site %s mean target PET: database %v, desk %v", s.Site.Name, mean, sum.TargetPET.Mean)
		}
		if sum.Audited > 1 && (sd == nil || math.Abs(*sd-sum.TargetPET.SD) > 1e-9) {
			t.Errorf("site %s SD: database %v, desk %v", s.Site.Name, sd, sum.TargetPET.SD)
		}
	}
}
