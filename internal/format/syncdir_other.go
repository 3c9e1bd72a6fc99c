//go:build !unix

package format

// syncDir does nothing: Windows, Plan 9, js and wasip1 offer no way to
// flush a directory entry, and a rename there is as durable as it gets.
func syncDir(dir string) error { return nil }
