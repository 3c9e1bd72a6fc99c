package format

import (
	"fmt"
	"os"
	"path/filepath"
)

// WriteFileAtomic writes data to path so that a crash or error at any point
// leaves either the old file or the new one, never a mix. It writes a
// temporary file in the same directory, sets its mode to exactly perm
// (whatever the umask), syncs it, renames it over path and then syncs the
// directory where the platform allows. On error the temporary file is
// removed and any old file at path is left untouched.
//
// A reader that has mapped the old file keeps seeing the old bytes: the
// rename replaces the directory entry, not the file. If path is a symbolic
// link, the link itself is replaced.
func WriteFileAtomic(path string, data []byte, perm os.FileMode) error {
	return writeFileAtomic(path, data, perm, writeAll)
}

// writeAll writes data to f.
func writeAll(f *os.File, data []byte) error {
	_, err := f.Write(data)
	return err
}

// writeFileAtomic is WriteFileAtomic with the write step supplied, so tests
// can make it fail part way.
func writeFileAtomic(path string, data []byte, perm os.FileMode, write func(*os.File, []byte) error) (err error) {
	dir, base := filepath.Split(path)
	if dir == "" {
		dir = "."
	}
	f, err := os.CreateTemp(dir, "."+base+".tmp-*")
	if err != nil {
		return fmt.Errorf("format: write %s: %w", path, err)
	}
	tmp := f.Name()
	defer func() {
		if err != nil {
			f.Close()
			os.Remove(tmp)
			err = fmt.Errorf("format: write %s: %w", path, err)
		}
	}()
	if err = f.Chmod(perm); err != nil {
		return err
	}
	if err = write(f, data); err != nil {
		return err
	}
	if err = f.Sync(); err != nil {
		return err
	}
	if err = f.Close(); err != nil {
		return err
	}
	if err = os.Rename(tmp, path); err != nil {
		return err
	}
	return syncDir(dir)
}
