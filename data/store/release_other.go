//go:build !linux

package store

import bolt "go.etcd.io/bbolt"

// releaseMapped is a no-op where madvise is not used (see release_linux.go).
func releaseMapped(db *bolt.DB, tx *bolt.Tx) {}
