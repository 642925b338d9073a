// Package pgtest gives tests a fresh PostgreSQL database on the server
// that scripts/pgtest.sh starts (make test does): BALEASSAY_PG_DSN names
// it. Without the variable a test is skipped with the command to run, and
// fails when the environment variable CI is set, because a database test
// that skips in CI is a failure.
package pgtest

import (
	"context"
	"crypto/rand"
	"encoding/hex"
	"net/url"
	"os"
	"strings"
	"testing"
	"time"

	"github.com/jackc/pgx/v5"
)

// EnvDSN names the test server.
const EnvDSN = "BALEASSAY_PG_DSN"

// InCI reports whether the tests run in CI, where a missing server or
// PostGIS must fail the test.
func InCI() bool { return os.Getenv("CI") != "" }

// SkipOrFail skips the test with msg, or fails it in CI.
func SkipOrFail(t testing.TB, msg string) {
	t.Helper()
	if InCI() {
		t.Fatal(msg + "; CI is set: a database test may not skip")
	}
	t.Skip(msg)
}

// ServerDSN returns the test server's DSN, or skips (fails in CI).
func ServerDSN(t testing.TB) string {
	t.Helper()
	dsn := os.Getenv(EnvDSN)
	if dsn == "" {
		msg := EnvDSN + " is not set: run the database tests with 'make test', or 'bash scripts/pgtest.sh run -- go test ./data/publish/'"
		if InCI() {
			t.Fatal(msg)
		}
		t.Skip(msg)
	}
	return dsn
}

// DSN creates an empty database for this test and returns its DSN; the
// database is dropped when the test ends.
func DSN(t testing.TB) string {
	t.Helper()
	base := ServerDSN(t)
	ctx, cancel := context.WithTimeout(context.Background(), time.Minute)
	defer cancel()
	admin, err := pgx.Connect(ctx, base)
	if err != nil {
		t.Fatalf("connect to the test server (%s): %v", EnvDSN, err)
	}
	defer admin.Close(ctx)
	var b [6]byte
	_, _ = rand.Read(b[:])
	name := "bale_test_" + hex.EncodeToString(b[:])
	if _, err := admin.Exec(ctx, "CREATE DATABASE "+name); err != nil {
		t.Fatalf("create test database: %v", err)
	}
	t.Cleanup(func() {
		ctx, cancel := context.WithTimeout(context.Background(), time.Minute)
		defer cancel()
		c, err := pgx.Connect(ctx, base)
		if err != nil {
			t.Errorf("drop test database %s: %v", name, err)
			return
		}
		defer c.Close(ctx)
		if _, err := c.Exec(ctx, "DROP DATABASE "+name+" WITH (FORCE)"); err != nil {
			t.Errorf("drop test database %s: %v", name, err)
		}
	})
	return WithDatabase(t, base, name)
}

// WithDatabase returns dsn with its database replaced by name; dsn may be
// a URL (postgres://…) or keyword=value pairs.
func WithDatabase(t testing.TB, dsn, name string) string {
	t.Helper()
	if strings.HasPrefix(dsn, "postgres://") || strings.HasPrefix(dsn, "postgresql://") {
		u, err := url.Parse(dsn)
		if err != nil {
			t.Fatalf("%s: %v", EnvDSN, err)
		}
		u.Path = "/" + name
		return u.String()
	}
	return dsn + " dbname=" + name
}

// Conn connects to a fresh database for this test; both are closed and
// dropped when the test ends.
func Conn(t testing.TB) *pgx.Conn {
	t.Helper()
	dsn := DSN(t)
	ctx, cancel := context.WithTimeout(context.Background(), time.Minute)
	defer cancel()
	c, err := pgx.Connect(ctx, dsn)
	if err != nil {
		t.Fatalf("connect to the test database: %v", err)
	}
	t.Cleanup(func() { c.Close(context.Background()) })
	return c
}
