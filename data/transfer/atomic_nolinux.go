//go:build !linux

package transfer

// renameNoReplace moves tmp to path unless path exists, with a hard link.
func renameNoReplace(tmp, path string) error { return linkNoReplace(tmp, path) }
