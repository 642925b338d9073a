//go:build unix

package assess

import "syscall"

// openNonblock makes opening a FIFO return at once instead of waiting
// for a writer.
const openNonblock = syscall.O_NONBLOCK
