package main

import (
	"os"
	"runtime/debug"
)

// importMemory is the soft memory limit of an import (Go's GC memory
// limit, runtime/debug.SetMemoryLimit): without it the collector lets the
// heap grow to twice what is live before it collects, and the runtime
// returns freed memory to the system only slowly, so a long merge's
// resident set drifts up with the number of files. With it the heap stays
// near what one file's write needs (about 40 MB live) for some 8 % more
// CPU (DEVELOPERS.md, "The lab's merge at scale"). GOMEMLIMIT, when set,
// wins.
const importMemory = 96 << 20

// limitImportMemory sets the limit and returns the function that puts
// the previous one back.
func limitImportMemory() func() {
	if os.Getenv("GOMEMLIMIT") != "" {
		return func() {}
	}
	prev := debug.SetMemoryLimit(importMemory)
	return func() { debug.SetMemoryLimit(prev) }
}
