package main

import (
	"baleassay/data/desk"
	"os"
	"runtime/debug"
)

// The soft memory limit of an import (Go's GC memory limit,
// runtime/debug.SetMemoryLimit). Without it the collector lets the heap
// grow to twice what is live before it collects, and the runtime gives
// freed memory back to the system slowly, so a long merge's resident set
// drifts up with the number of files; with it the heap stays near what
// one file's write needs (about 40 MB live for a 4 MiB part) for some 8 %
// more CPU. One file is written in one transaction, which holds about
// importMemoryPerByte times the file's size, so the limit is never set
// below that: a limit under what is live would keep the collector
// running without end (DEVELOPERS.md, "The lab's merge at scale").
// GOMEMLIMIT, when set, wins.
const (
	importMemory        = 96 << 20
	importMemoryPerByte = 24
)

// limitImportMemory sets the limit for importing the bundle files that
// paths name (files and folders) and returns the function that puts the
// previous one back.
func limitImportMemory(paths []string) func() {
	if os.Getenv("GOMEMLIMIT") != "" {
		return func() {}
	}
	files, _ := desk.BundleFiles(paths)
	var largest int64
	for _, f := range files {
		if st, err := os.Stat(f); err == nil {
			largest = max(largest, st.Size())
		}
	}
	prev := debug.SetMemoryLimit(max(importMemory, importMemoryPerByte*largest))
	return func() { debug.SetMemoryLimit(prev) }
}
