package format

import (
	"encoding/binary"
	"fmt"
	"reflect"
	"testing"
)

// addr returns the address of the first element of a slice.
func addr(s any) uintptr { return reflect.ValueOf(s).Pointer() }

// seqBytes returns n bytes 1, 2, 3, ... starting on an 8-byte boundary.
func seqBytes(n int) []byte {
	buf := make([]byte, n+8)
	skip := int((8 - addr(buf)%8) % 8)
	b := buf[skip : skip+n : skip+n]
	for i := range b {
		b[i] = byte(i + 1)
	}
	return b
}

// isLittleEndianHost uses encoding/binary's view of the host, a source
// independent of view.go.
func isLittleEndianHost() bool {
	var b [2]byte
	binary.NativeEndian.PutUint16(b[:], 1)
	return b[0] == 1
}

func TestViewsKnownValues(t *testing.T) {
	b := seqBytes(8)
	// Little-endian: the first byte is the least significant (by definition
	// of the byte order; encoding/binary agrees).
	if got := Uint64s(b); len(got) != 1 || got[0] != 0x0807060504030201 {
		t.Errorf("Uint64s(01..08) = %x, want [807060504030201]", got)
	}
	if got := Uint32s(b); len(got) != 2 || got[0] != 0x04030201 || got[1] != 0x08070605 {
		t.Errorf("Uint32s(01..08) = %x, want [4030201 8070605]", got)
	}
	if got := Uint16s(b); len(got) != 4 || got[0] != 0x0201 || got[3] != 0x0807 {
		t.Errorf("Uint16s(01..08) = %x, want [201 403 605 807]", got)
	}
}

// TestViews checks every length and misalignment against encoding/binary,
// and that aligned views alias their input without allocating.
func TestViews(t *testing.T) {
	type view struct {
		name  string
		size  int
		value func(b []byte, i int) uint64 // i-th value of the view of b
		ref   func(b []byte) uint64        // reference decode of one value
		ptr   func(b []byte) uintptr
		n     func(b []byte) int
	}
	views := []view{
		{"Uint64s", 8,
			func(b []byte, i int) uint64 { return Uint64s(b)[i] },
			binary.LittleEndian.Uint64,
			func(b []byte) uintptr { return addr(Uint64s(b)) },
			func(b []byte) int { return len(Uint64s(b)) }},
		{"Uint32s", 4,
			func(b []byte, i int) uint64 { return uint64(Uint32s(b)[i]) },
			func(b []byte) uint64 { return uint64(binary.LittleEndian.Uint32(b)) },
			func(b []byte) uintptr { return addr(Uint32s(b)) },
			func(b []byte) int { return len(Uint32s(b)) }},
		{"Uint16s", 2,
			func(b []byte, i int) uint64 { return uint64(Uint16s(b)[i]) },
			func(b []byte) uint64 { return uint64(binary.LittleEndian.Uint16(b)) },
			func(b []byte) uintptr { return addr(Uint16s(b)) },
			func(b []byte) int { return len(Uint16s(b)) }},
	}
	buf := seqBytes(64)
	for _, v := range views {
		for shift := range 8 {
			for n := range 40 {
				b := buf[shift : shift+n : shift+n]
				name := fmt.Sprintf("%s/shift%d/len%d", v.name, shift, n)
				// Trailing bytes that do not fill a value are ignored.
				if got, want := v.n(b), n/v.size; got != want {
					t.Errorf("%s: %d values, want %d", name, got, want)
					continue
				}
				for i := range n / v.size {
					if got, want := v.value(b, i), v.ref(b[i*v.size:]); got != want {
						t.Errorf("%s: value %d = %x, want %x", name, i, got, want)
					}
				}
				if n < v.size {
					if p := v.ptr(b); p != 0 {
						t.Errorf("%s: non-nil view of too few bytes", name)
					}
					continue
				}
				alias := v.ptr(b) == addr(b)
				wantAlias := isLittleEndianHost() && shift%v.size == 0
				if alias != wantAlias {
					t.Errorf("%s: aliases input = %v, want %v", name, alias, wantAlias)
				}
			}
		}
	}
}

func TestViewsDoNotAllocateWhenAligned(t *testing.T) {
	if !isLittleEndianHost() {
		t.Fatal("this test expects a little-endian host; big-endian hosts always copy")
	}
	b := seqBytes(64)
	tests := []struct {
		name string
		f    func()
	}{
		{"Uint64s", func() { Uint64s(b) }},
		{"Uint32s", func() { Uint32s(b) }},
		{"Uint16s", func() { Uint16s(b) }},
	}
	for _, tt := range tests {
		if a := testing.AllocsPerRun(100, tt.f); a != 0 {
			t.Errorf("%s allocates %v times, want 0", tt.name, a)
		}
	}
	if v := Uint64s(b); cap(v) != len(v) {
		t.Errorf("Uint64s cap %d != len %d", cap(v), len(v))
	}
}

// TestViewsOfSections reads a section written by Append as uint64s.
func TestViewsOfSections(t *testing.T) {
	want := []uint64{0, 1, 1 << 63, 0xDEADBEEFCAFEF00D}
	body := make([]byte, 0, 8*len(want))
	for _, v := range want {
		body = binary.LittleEndian.AppendUint64(body, v)
	}
	b := mustAppend(t, []Section{{Kind: KindMeta, Data: []byte("odd")}, {Kind: KindNgrams, Data: body}})
	f, err := Parse(b)
	if err != nil {
		t.Fatal(err)
	}
	sec, _ := f.Section(KindNgrams)
	got := Uint64s(sec)
	if fmt.Sprint(got) != fmt.Sprint(want) {
		t.Errorf("Uint64s(section) = %v, want %v", got, want)
	}
	if isLittleEndianHost() && addr(got) != addr(sec) {
		t.Errorf("Uint64s(section) copied an aligned section")
	}
}
