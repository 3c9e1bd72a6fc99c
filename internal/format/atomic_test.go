package format

import (
	"bytes"
	"errors"
	"io/fs"
	"os"
	"path/filepath"
	"runtime"
	"testing"
)

// dirNames lists the names in dir.
func dirNames(t *testing.T, dir string) []string {
	t.Helper()
	es, err := os.ReadDir(dir)
	if err != nil {
		t.Fatal(err)
	}
	var names []string
	for _, e := range es {
		names = append(names, e.Name())
	}
	return names
}

func TestWriteFileAtomic(t *testing.T) {
	tests := []struct {
		name string
		perm os.FileMode
		old  []byte // content already at the path, if any
	}{
		{"new file 0600", 0o600, nil},
		{"new file 0644", 0o644, nil},
		{"replace 0600", 0o600, []byte("old content")},
		{"replace 0640", 0o640, []byte("old content that is longer than the new")},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			dir := t.TempDir()
			path := filepath.Join(dir, "user.overlay")
			if tt.old != nil {
				if err := os.WriteFile(path, tt.old, 0o666); err != nil {
					t.Fatal(err)
				}
			}
			data := []byte("new content")
			if err := WriteFileAtomic(path, data, tt.perm); err != nil {
				t.Fatalf("WriteFileAtomic = %v", err)
			}
			got, err := os.ReadFile(path)
			if err != nil || !bytes.Equal(got, data) {
				t.Errorf("content = %q, %v; want %q", got, err, data)
			}
			fi, err := os.Stat(path)
			if err != nil {
				t.Fatal(err)
			}
			if runtime.GOOS != "windows" && fi.Mode().Perm() != tt.perm {
				t.Errorf("mode = %v, want %v", fi.Mode().Perm(), tt.perm)
			}
			if names := dirNames(t, dir); len(names) != 1 || names[0] != "user.overlay" {
				t.Errorf("directory holds %q, want only user.overlay", names)
			}
		})
	}
}

func TestWriteFileAtomicFailureKeepsOld(t *testing.T) {
	errDisk := errors.New("disk full")
	tests := []struct {
		name  string
		write func(f *os.File, data []byte) error
	}{
		{"fails before writing", func(*os.File, []byte) error { return errDisk }},
		{"fails half way", func(f *os.File, data []byte) error {
			if _, err := f.Write(data[:len(data)/2]); err != nil {
				return err
			}
			return errDisk
		}},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			dir := t.TempDir()
			path := filepath.Join(dir, "base.model")
			old := []byte("the old, good model")
			if err := os.WriteFile(path, old, 0o644); err != nil {
				t.Fatal(err)
			}
			err := writeFileAtomic(path, []byte("a new model that never lands"), 0o600, tt.write)
			if !errors.Is(err, errDisk) {
				t.Errorf("writeFileAtomic = %v, want %v", err, errDisk)
			}
			if got, _ := os.ReadFile(path); !bytes.Equal(got, old) {
				t.Errorf("old file now holds %q, want %q", got, old)
			}
			if names := dirNames(t, dir); len(names) != 1 || names[0] != "base.model" {
				t.Errorf("directory holds %q after a failed write, want only base.model", names)
			}
		})
	}
}

func TestWriteFileAtomicMissingDir(t *testing.T) {
	path := filepath.Join(t.TempDir(), "no", "such", "dir", "x.model")
	if err := WriteFileAtomic(path, []byte("x"), 0o600); !errors.Is(err, fs.ErrNotExist) {
		t.Errorf("WriteFileAtomic into a missing directory = %v, want fs.ErrNotExist", err)
	}
}

func TestWriteFileAtomicOverDirectory(t *testing.T) {
	dir := t.TempDir()
	target := filepath.Join(dir, "taken")
	if err := os.Mkdir(target, 0o755); err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(filepath.Join(target, "inside"), nil, 0o644); err != nil {
		t.Fatal(err)
	}
	if err := WriteFileAtomic(target, []byte("x"), 0o600); err == nil {
		t.Fatal("WriteFileAtomic over a non-empty directory succeeded")
	}
	if names := dirNames(t, dir); len(names) != 1 || names[0] != "taken" {
		t.Errorf("directory holds %q after a failed rename, want only taken", names)
	}
}
