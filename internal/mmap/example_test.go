package mmap_test

import (
	"fmt"
	"os"
	"path/filepath"

	"github.com/keyloom/keyloom/internal/format"
	"github.com/keyloom/keyloom/internal/mmap"
)

// ExampleOpen writes a model file, maps it and reads a section in place.
func ExampleOpen() {
	dir, err := os.MkdirTemp("", "mmap-example")
	if err != nil {
		fmt.Println(err)
		return
	}
	defer os.RemoveAll(dir)
	path := filepath.Join(dir, "demo.model")

	file, err := format.Append(nil, []format.Section{{Kind: format.KindMeta, Data: []byte("hello")}})
	if err == nil {
		err = format.WriteFileAtomic(path, file, 0o644)
	}
	if err != nil {
		fmt.Println(err)
		return
	}

	r, err := mmap.Open(path)
	if err != nil {
		fmt.Println(err)
		return
	}
	defer r.Close()
	f, err := format.Parse(r.Bytes())
	if err != nil {
		fmt.Println(err)
		return
	}
	meta, _ := f.Section(format.KindMeta) // valid until r.Close
	fmt.Printf("%s %v\n", meta, f.Verify(format.KindMeta))
	// Output: hello <nil>
}
