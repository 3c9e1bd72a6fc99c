//go:build !linux

package keyloom

import "os"

func fadviseDontNeed(f *os.File) error { return nil }
