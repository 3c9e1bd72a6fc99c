package mmap

import (
	"bytes"
	"errors"
	"io/fs"
	"os"
	"path/filepath"
	"reflect"
	"testing"
)

// writeTemp writes data to a new file under t.TempDir and returns its path.
func writeTemp(t testing.TB, data []byte) string {
	t.Helper()
	path := filepath.Join(t.TempDir(), "f.model")
	if err := os.WriteFile(path, data, 0o600); err != nil {
		t.Fatal(err)
	}
	return path
}

func TestOpen(t *testing.T) {
	big := make([]byte, 3*65536+17) // spans several pages, not a multiple of the page size
	for i := range big {
		big[i] = byte(i*31 + i>>8)
	}
	tests := []struct {
		name string
		data []byte
	}{
		{"one byte", []byte{42}},
		{"text", []byte("hello, region\n")},
		{"several pages", big},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			r, err := Open(writeTemp(t, tt.data))
			if err != nil {
				t.Fatalf("Open = %v", err)
			}
			defer r.Close()
			if got := r.Bytes(); !bytes.Equal(got, tt.data) {
				t.Errorf("Bytes() = %d bytes, want the %d written", len(got), len(tt.data))
			}
			if r.Mapped() != canMap {
				t.Errorf("Mapped() = %v, want %v in this build", r.Mapped(), canMap)
			}
			// A mapping starts on a page boundary; a heap copy of 8 bytes or
			// more on an 8-byte one. Either way 8-byte views are aligned.
			if p := reflect.ValueOf(r.Bytes()).Pointer(); len(tt.data) >= 8 && p%8 != 0 {
				t.Errorf("Bytes() starts at %#x, not 8-byte aligned", p)
			}
			if r.Mapped() {
				if p := reflect.ValueOf(r.Bytes()).Pointer(); p%uintptr(os.Getpagesize()) != 0 {
					t.Errorf("mapping starts at %#x, not on a page boundary", p)
				}
			}
		})
	}
}

func TestOpenEmpty(t *testing.T) {
	r, err := Open(writeTemp(t, nil))
	if err != nil {
		t.Fatalf("Open(empty file) = %v", err)
	}
	if b := r.Bytes(); b == nil || len(b) != 0 {
		t.Errorf("Bytes() = %v, want empty non-nil", b)
	}
	if r.Mapped() {
		t.Errorf("an empty file reports Mapped")
	}
	if err := r.Close(); err != nil {
		t.Errorf("Close = %v", err)
	}
}

func TestOpenErrors(t *testing.T) {
	dir := t.TempDir()
	tests := []struct {
		name string
		path string
		want error
	}{
		{"missing", filepath.Join(dir, "nope"), fs.ErrNotExist},
		{"directory", dir, ErrNotRegular},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			r, err := Open(tt.path)
			if !errors.Is(err, tt.want) {
				t.Errorf("Open(%s) = %v, %v; want %v", tt.path, r, err, tt.want)
			}
		})
	}
}

func TestCloseIdempotent(t *testing.T) {
	r, err := Open(writeTemp(t, []byte("some bytes")))
	if err != nil {
		t.Fatal(err)
	}
	for i := range 3 {
		if err := r.Close(); err != nil {
			t.Errorf("Close #%d = %v", i+1, err)
		}
		if b := r.Bytes(); b != nil {
			t.Errorf("Bytes() after Close = %q, want nil", b)
		}
	}
}

// TestReplaceWhileOpen replaces the file by rename, as the project writes
// files, while it is open: the region keeps the old bytes.
func TestReplaceWhileOpen(t *testing.T) {
	old := bytes.Repeat([]byte("old!"), 5000)
	path := writeTemp(t, old)
	r, err := Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer r.Close()
	tmp := path + ".new"
	if err := os.WriteFile(tmp, bytes.Repeat([]byte("NEW?"), 100), 0o600); err != nil {
		t.Fatal(err)
	}
	if err := os.Rename(tmp, path); err != nil {
		t.Fatal(err)
	}
	if !bytes.Equal(r.Bytes(), old) {
		t.Errorf("region changed after the file was replaced by rename")
	}
}

// BenchmarkOpenClose measures Open and Close of a 4 KiB and a 10 MiB file.
// Mapping should cost about the same at either size; the keyloom_nommap fallback
// reads every byte.
func BenchmarkOpenClose(b *testing.B) {
	sizes := []struct {
		name string
		n    int
	}{{"size=4KiB", 4 << 10}, {"size=10MiB", 10 << 20}}
	for _, s := range sizes {
		path := writeTemp(b, make([]byte, s.n))
		b.Run(s.name, func(b *testing.B) {
			b.ReportAllocs()
			for b.Loop() {
				r, err := Open(path)
				if err != nil {
					b.Fatal(err)
				}
				if err := r.Close(); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}
