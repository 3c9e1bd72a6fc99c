//go:build unix

package format

import (
	"os"
	"path/filepath"
	"syscall"
	"testing"
)

// TestWriteFileAtomicIgnoresUmask checks that the mode is exactly perm under
// umasks that would otherwise clear or keep bits. It changes the process
// umask, so it must not run in parallel.
func TestWriteFileAtomicIgnoresUmask(t *testing.T) {
	tests := []struct {
		umask int
		perm  os.FileMode
	}{
		{0o077, 0o644},
		{0o022, 0o600},
		{0o000, 0o600},
		{0o277, 0o640},
	}
	for _, tt := range tests {
		old := syscall.Umask(tt.umask)
		path := filepath.Join(t.TempDir(), "f")
		err := WriteFileAtomic(path, []byte("x"), tt.perm)
		syscall.Umask(old)
		if err != nil {
			t.Fatalf("umask %o: WriteFileAtomic = %v", tt.umask, err)
		}
		fi, err := os.Stat(path)
		if err != nil {
			t.Fatal(err)
		}
		if fi.Mode().Perm() != tt.perm {
			t.Errorf("umask %o: mode = %v, want %v", tt.umask, fi.Mode().Perm(), tt.perm)
		}
	}
}
