package desk

import (
	"context"

	"baleassay/data/publish"
)

// Publish loads this store into the PostgreSQL database at dsn (a
// postgres:// URL or keyword=value pairs; see package publish): the
// events the database lacks, one transaction per batch, then the audits
// of the bales they changed. It returns where it published (without the
// password) and what it did; after an error the report says how far it
// got, and publishing again resumes there. Errors wrap publish's
// sentinels (publish.ErrConnect, publish.ErrDSN, publish.ErrSchemaNewer,
// ...) and read without a package prefix.
func (d *Desk) Publish(ctx context.Context, dsn string, opt publish.Options) (publish.Target, publish.Report, error) {
	conn, target, err := publish.Connect(ctx, dsn)
	if err != nil {
		return target, publish.Report{}, err
	}
	defer conn.Close(context.WithoutCancel(ctx))
	rep, err := publish.Publish(ctx, conn, d.st, opt)
	return target, rep, err
}
