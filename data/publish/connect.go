package publish

import (
	"context"
	"fmt"
	"strings"

	"github.com/jackc/pgx/v5"
)

// Target says where a connection goes, without the password.
type Target struct {
	Host     string // host name, or the folder of a Unix socket
	Port     uint16
	Database string
	User     string
}

func (t Target) String() string {
	where := t.Host
	if strings.HasPrefix(t.Host, "/") {
		where = "socket " + t.Host
	} else {
		where = fmt.Sprintf("%s:%d", t.Host, t.Port)
	}
	return fmt.Sprintf("database %q as %s on %s", t.Database, t.User, where)
}

// Connect opens a connection from a PostgreSQL address: a URL
// (postgres://user@host:5432/db?sslmode=require) or keyword=value pairs
// (host=/run/postgresql dbname=lab), with libpq's environment variables
// (PGHOST, PGPASSWORD, …) and ~/.pgpass filling what the address leaves
// out. Errors wrap ErrDSN or ErrConnect and never contain the password.
func Connect(ctx context.Context, dsn string) (*pgx.Conn, Target, error) {
	cfg, err := pgx.ParseConfig(dsn)
	if err != nil {
		return nil, Target{}, fmt.Errorf("%w: %v (give postgres://USER@HOST/DATABASE or \"host=/path/to/socket/folder dbname=DATABASE\")", ErrDSN, err)
	}
	t := Target{Host: cfg.Host, Port: cfg.Port, Database: cfg.Database, User: cfg.User}
	cfg.RuntimeParams["application_name"] = "bale publish"
	conn, err := pgx.ConnectConfig(ctx, cfg)
	if err != nil {
		return nil, t, fmt.Errorf("%w (%s): %v; check the address, that the server runs, and the password (PGPASSWORD or ~/.pgpass rather than the address)",
			ErrConnect, t, err)
	}
	return conn, t, nil
}
