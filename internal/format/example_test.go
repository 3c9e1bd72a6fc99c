package format_test

import (
	"errors"
	"fmt"

	"github.com/keyloom/keyloom/internal/format"
)

func Example() {
	file, err := format.Append(nil, []format.Section{
		{Kind: format.KindNgrams, Data: []byte{1, 0, 0, 0, 0, 0, 0, 0, 2, 0, 0, 0, 0, 0, 0, 0}},
		{Kind: format.KindMeta, Data: []byte("demo")},
	})
	if err != nil {
		fmt.Println(err)
		return
	}
	f, err := format.Parse(file)
	if err != nil {
		fmt.Println(err)
		return
	}
	for _, s := range f.Sections() {
		fmt.Printf("%s: %d bytes at offset %d\n", s.Kind, s.Length, s.Offset)
	}
	if err := f.Verify(format.KindNgrams); err != nil {
		fmt.Println(err)
		return
	}
	grams, _ := f.Section(format.KindNgrams)
	fmt.Println(format.Uint64s(grams))

	_, err = format.Parse([]byte("plain text, not a model"))
	fmt.Println(errors.Is(err, format.ErrNotModel))
	// Output:
	// meta: 4 bytes at offset 72
	// ngrams: 16 bytes at offset 80
	// [1 2]
	// true
}
