package desk

import (
	"context"
	"errors"
	"strings"
	"testing"

	"baleassay/data/publish"
)

// Publishing to a server that is not there fails with publish.ErrConnect,
// a message without a package prefix and without the password; the store
// is untouched. (Publishing itself is tested against a real server in
// data/publish and cmd/bale.)
func TestPublishUnreachable(t *testing.T) {
	d, err := Open(Location{Dir: t.TempDir()}, Options{Create: true})
	if err != nil {
		t.Fatal(err)
	}
	defer d.Close()
	_, _, err = d.Publish(context.Background(), "host=/nonexistent/folder dbname=lab password=pw-not-shown connect_timeout=2", publish.Options{})
	if !errors.Is(err, publish.ErrConnect) || strings.HasPrefix(err.Error(), "publish:") || strings.Contains(err.Error(), "pw-not-shown") {
		t.Fatalf("got %v", err)
	}
	if _, _, err := d.Publish(context.Background(), "postgres://lab@host:port/db", publish.Options{}); !errors.Is(err, publish.ErrDSN) {
		t.Fatalf("bad address: got %v", err)
	}
}
