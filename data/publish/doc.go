// Package publish loads a records store into PostgreSQL, for a programme
// that has outgrown one lab machine.
//
// The events go in as they are: one row per event, keyed by the event id
// (SHA-256 of its deterministic CBOR, RFC 8949 §4.2), the CBOR bytes in
// raw and decoded columns beside them. Rows are only ever added (INSERT …
// ON CONFLICT DO NOTHING), so publishing twice, or the same events from
// two labs, changes nothing. Beside the events the publisher keeps the
// fold of the records side (package data): supersessions, heads (events
// that no event of the same entity supersedes), the current value of
// every entity, and views of the current sites, bales, pulls, settings
// and conflicts. Audits are computed in Go with package assess (Cochran's
// ratio estimator, as 'bale assess' and 'bale sites summary' compute
// them) and stored keyed by the digest of the records they came from.
// Where the PostGIS extension is available, site events get a geography
// column with a GiST index.
//
// Publishing is incremental: a cursor per publishing store remembers the
// last local sequence number published, each batch asks the database
// which of its events it already holds and sends only the others, and
// each batch is one transaction (events, fold, pending audits and cursor
// together). Publishers take a transaction-level advisory lock, so two
// labs publishing at once are serialised batch by batch.
//
// The schema is described in DEVELOPERS.md; the SQL is in sql/.
package publish
