//go:build (linux || darwin || freebsd) && (amd64 || arm64 || riscv64 || ppc64le || s390x || loong64)

package store

// initialMmap reserves address space for the store file's mapping up
// front, so that bbolt does not remap it (copying a write's every changed
// page out of the old mapping first) each time the file doubles below
// 1 GiB. Address space only: nothing is resident until read. (On Windows
// bbolt would grow the file itself to this size, so it is left out
// there; 32-bit platforms keep bbolt's default.)
const initialMmap = 1 << 30
