package store

import (
	"syscall"

	bolt "go.etcd.io/bbolt"
)

// releaseMapped drops the store file's pages from this process's
// mapping (madvise MADV_DONTNEED on a read-only shared file mapping:
// the pages stay in the kernel's page cache and are read back from there
// on the next touch; nothing is lost or written). bbolt reads the file
// through one mapping, and copy-on-write moves every changed page to a
// new place, so over a long import the mapping would come to hold every
// page ever read, stale copies included, and the process's resident set
// would grow with the file instead of with the work in hand. Called with
// the store's write lock held, inside a read transaction, so bbolt
// cannot remap the file meanwhile.
func releaseMapped(db *bolt.DB, tx *bolt.Tx) {
	size := uintptr(tx.Size())
	if size == 0 {
		return
	}
	_, _, _ = syscall.Syscall(syscall.SYS_MADVISE, db.Info().Data, size, syscall.MADV_DONTNEED)
}
