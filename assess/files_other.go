//go:build !unix

package assess

// openNonblock: no FIFOs to block on.
const openNonblock = 0
