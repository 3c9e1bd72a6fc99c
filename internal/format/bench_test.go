package format

import (
	"fmt"
	"testing"
)

// benchFile returns a file of about size bytes in four sections.
func benchFile(b *testing.B, size int) []byte {
	b.Helper()
	body := make([]byte, size/4)
	for i := range body {
		body[i] = byte(i * 7)
	}
	file, err := Append(nil, []Section{
		{Kind: KindMeta, Data: body[:min(len(body), 100)]},
		{Kind: KindLexicon, Data: body},
		{Kind: KindNgrams, Data: body},
		{Kind: KindOverlay, Data: body},
	})
	if err != nil {
		b.Fatal(err)
	}
	return file
}

var benchSizes = []int{1 << 10, 1 << 20, 10 << 20}

// BenchmarkParse measures opening a file: header and table only, so the
// time should not grow with the file's size.
func BenchmarkParse(b *testing.B) {
	for _, size := range benchSizes {
		file := benchFile(b, size)
		b.Run(fmt.Sprintf("size=%dKiB", size>>10), func(b *testing.B) {
			b.ReportAllocs()
			for b.Loop() {
				if _, err := Parse(file); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}

// BenchmarkVerifyAll measures CRC-32C throughput over every section.
func BenchmarkVerifyAll(b *testing.B) {
	for _, size := range benchSizes {
		file := benchFile(b, size)
		f, err := Parse(file)
		if err != nil {
			b.Fatal(err)
		}
		b.Run(fmt.Sprintf("size=%dKiB", size>>10), func(b *testing.B) {
			b.SetBytes(int64(len(file)))
			b.ReportAllocs()
			for b.Loop() {
				if err := f.VerifyAll(); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}

// BenchmarkAppend measures framing sections into a file.
func BenchmarkAppend(b *testing.B) {
	file := benchFile(b, 10<<20)
	f, err := Parse(file)
	if err != nil {
		b.Fatal(err)
	}
	var sections []Section
	for _, s := range f.Sections() {
		data, _ := f.Section(s.Kind)
		sections = append(sections, Section{Kind: s.Kind, Data: data})
	}
	buf := make([]byte, 0, len(file))
	b.SetBytes(int64(len(file)))
	b.ReportAllocs()
	for b.Loop() {
		if _, err := Append(buf[:0], sections); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkUint64s measures making a view of a 1 MiB aligned section.
func BenchmarkUint64s(b *testing.B) {
	file := benchFile(b, 4<<20)
	f, err := Parse(file)
	if err != nil {
		b.Fatal(err)
	}
	sec, _ := f.Section(KindLexicon)
	b.ReportAllocs()
	var n int
	for b.Loop() {
		n += len(Uint64s(sec))
	}
	b.ReportMetric(float64(n)/float64(b.N), "values/op")
}
