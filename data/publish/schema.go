package publish

import (
	"context"
	"embed"
	"errors"
	"fmt"
	"regexp"

	"github.com/jackc/pgx/v5"
	"github.com/jackc/pgx/v5/pgconn"
)

//go:embed sql/*.sql
var sqlFiles embed.FS

// A migration is one step of the schema. Released steps are never edited;
// a change is a new step.
type migration struct {
	version int
	name    string
	file    string
	postgis bool // applied only where PostGIS is available
}

var migrations = []migration{
	{1, "events, fold, audits and views", "sql/001_events.sql", false},
	{2, "PostGIS: geography column and GiST index on site events", "sql/002_postgis.sql", true},
}

// SchemaVersion is the newest schema step this program knows.
var SchemaVersion = migrations[len(migrations)-1].version

// PostGIS says whether publishing uses the PostGIS extension.
type PostGIS int

// PostGIS modes.
const (
	PostGISAuto    PostGIS = iota // use it when the server has it
	PostGISRequire                // fail when it is not available
	PostGISOff                    // never use it
)

var postgisNames = []string{"auto", "require", "off"}

func (m PostGIS) String() string {
	if int(m) >= 0 && int(m) < len(postgisNames) {
		return postgisNames[m]
	}
	return fmt.Sprintf("postgis(%d)", int(m))
}

// ParsePostGIS reads auto, require or off.
func ParsePostGIS(s string) (PostGIS, error) {
	for i, n := range postgisNames {
		if n == s {
			return PostGIS(i), nil
		}
	}
	return 0, fmt.Errorf("PostGIS mode %q: want auto, require or off", s)
}

// SchemaInfo describes the database schema after set-up.
type SchemaInfo struct {
	Name     string
	Versions []int  // schema steps applied, ascending
	Applied  []int  // of which applied by this call
	PostGIS  bool   // geography column and spatial index present
	Note     string // why PostGIS is not used, when it is not
	gisPath  string // schema holding the PostGIS functions
}

var schemaNameRE = regexp.MustCompile(`^[a-z_][a-z0-9_]{0,62}$`)

func checkSchemaName(s string) error {
	if !schemaNameRE.MatchString(s) || s == "public" || s == "pg_catalog" || s == "information_schema" {
		return fmt.Errorf("%w %q: use lower-case letters, digits and _ (not public)", ErrSchemaName, s)
	}
	return nil
}

// lockKey is the advisory lock every publisher of a schema takes inside
// its transactions.
const lockSQL = `SELECT pg_advisory_xact_lock(hashtext('baleassay publish ' || $1))`

// Migrate creates or upgrades the schema in one transaction. A database
// whose schema is newer than this program is refused with ErrSchemaNewer.
func Migrate(ctx context.Context, conn *pgx.Conn, schema string, mode PostGIS) (SchemaInfo, error) {
	info := SchemaInfo{Name: schema}
	if err := checkSchemaName(schema); err != nil {
		return info, err
	}
	err := pgx.BeginFunc(ctx, conn, func(tx pgx.Tx) error {
		if _, err := tx.Exec(ctx, lockSQL, schema); err != nil {
			return err
		}
		q := pgx.Identifier{schema}.Sanitize()
		if _, err := tx.Exec(ctx, "CREATE SCHEMA IF NOT EXISTS "+q); err != nil {
			return fmt.Errorf("create schema %s: %w", schema, err)
		}
		if _, err := tx.Exec(ctx, `CREATE TABLE IF NOT EXISTS `+q+`.schema_version (
			version integer PRIMARY KEY, name text NOT NULL, applied_at timestamptz NOT NULL DEFAULT now())`); err != nil {
			return err
		}
		rows, _ := tx.Query(ctx, `SELECT version FROM `+q+`.schema_version ORDER BY version`)
		have, err := pgx.CollectRows(rows, pgx.RowTo[int])
		if err != nil {
			return err
		}
		if len(have) > 0 && have[len(have)-1] > SchemaVersion {
			return fmt.Errorf("%w: schema %s is at step %d, this program knows up to %d: publish with a newer bale",
				ErrSchemaNewer, schema, have[len(have)-1], SchemaVersion)
		}
		if mode != PostGISOff {
			if err := findPostGIS(ctx, tx, &info); err != nil {
				return err
			}
			if !info.PostGIS && mode == PostGISRequire {
				return fmt.Errorf("%w: %s", ErrNoPostGIS, info.Note)
			}
		} else {
			info.Note = "PostGIS not used (--postgis off)"
		}
		gis := info.PostGIS
		path := q + ", public"
		if info.gisPath != "" {
			path = q + ", " + pgx.Identifier{info.gisPath}.Sanitize() + ", public"
		}
		if _, err := tx.Exec(ctx, "SELECT set_config('search_path', $1, true)", path); err != nil {
			return err
		}
		done := map[int]bool{}
		for _, v := range have {
			done[v] = true
		}
		for _, m := range migrations {
			if done[m.version] || (m.postgis && !gis) {
				continue
			}
			body, err := sqlFiles.ReadFile(m.file)
			if err != nil {
				return err
			}
			if _, err := tx.Exec(ctx, string(body)); err != nil {
				return fmt.Errorf("schema step %d (%s): %w", m.version, m.name, err)
			}
			if _, err := tx.Exec(ctx, `INSERT INTO schema_version (version, name) VALUES ($1, $2)`, m.version, m.name); err != nil {
				return err
			}
			done[m.version] = true
			info.Applied = append(info.Applied, m.version)
		}
		for _, m := range migrations {
			if done[m.version] {
				info.Versions = append(info.Versions, m.version)
			}
		}
		// A schema set up with PostGIS keeps its geography column even
		// when this publish runs with --postgis off.
		info.PostGIS = done[2]
		if info.PostGIS {
			info.Note = ""
		}
		return nil
	})
	return info, err
}

// findPostGIS uses the extension where it is installed, or installs it
// where the server has it and this role may (inside a savepoint, so a
// refusal leaves the transaction usable).
func findPostGIS(ctx context.Context, tx pgx.Tx, info *SchemaInfo) error {
	var ns string
	err := tx.QueryRow(ctx, `SELECT extnamespace::regnamespace::text FROM pg_extension WHERE extname = 'postgis'`).Scan(&ns)
	if err == nil {
		info.PostGIS, info.gisPath = true, ns
		return nil
	}
	if !errors.Is(err, pgx.ErrNoRows) {
		return err
	}
	var avail bool
	if err := tx.QueryRow(ctx, `SELECT EXISTS (SELECT 1 FROM pg_available_extensions WHERE name = 'postgis')`).Scan(&avail); err != nil {
		return err
	}
	if !avail {
		info.Note = "the server has no PostGIS extension (on Debian: apt-get install postgresql-15-postgis-3); sites have lat and lon but no geography column"
		return nil
	}
	sp, err := tx.Begin(ctx)
	if err != nil {
		return err
	}
	if _, err := sp.Exec(ctx, `CREATE EXTENSION IF NOT EXISTS postgis SCHEMA public`); err != nil {
		_ = sp.Rollback(ctx)
		var pe *pgconn.PgError
		if errors.As(err, &pe) {
			info.Note = "PostGIS is installed on the server but could not be enabled (" + pe.Message +
				"): ask the database owner to run CREATE EXTENSION postgis; then publish again"
			return nil
		}
		return err
	}
	if err := sp.Commit(ctx); err != nil {
		return err
	}
	info.PostGIS, info.gisPath = true, "public"
	return nil
}
