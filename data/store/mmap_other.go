//go:build !((linux || darwin || freebsd) && (amd64 || arm64 || riscv64 || ppc64le || s390x || loong64))

package store

// initialMmap: bbolt's default (see mmap_64.go).
const initialMmap = 0
