package trie

import (
	"bytes"
	"errors"
	"fmt"
	"sync"

	"github.com/blevesearch/vellum"
)

// errCodes is returned (wrapped) when vellum's encoder does not behave as
// this package expects. It marks a bug or an incompatible vellum version,
// not bad input.
var errCodes = errors.New("trie: cannot derive vellum byte codes")

// byteCodes holds, for each 6-bit code 1..63 that a vellum single-transition
// state may carry in its top byte, the input byte it stands for (code 0
// means the byte is stored in full). The table is not copied from vellum: it
// is read back, once, from a small FST that vellum itself encodes, so it
// always matches the vellum version the module is built with. It never
// changes after it is built.
var byteCodes = sync.OnceValues(deriveByteCodes)

// deriveByteCodes builds an FST with the 256 keys {c, c} and reads the
// single-transition state reached after the first byte of each key: its top
// byte holds the code vellum uses for c, or 0 when c is stored in full.
func deriveByteCodes() (*[64]byte, error) {
	var buf bytes.Buffer
	bld, err := vellum.New(&buf, nil)
	if err != nil {
		return nil, fmt.Errorf("%w: %v", errCodes, err)
	}
	for c := 0; c < 256; c++ {
		if err := bld.Insert([]byte{byte(c), byte(c)}, 0); err != nil {
			return nil, fmt.Errorf("%w: %v", errCodes, err)
		}
	}
	if err := bld.Close(); err != nil {
		return nil, fmt.Errorf("%w: %v", errCodes, err)
	}
	d := buf.Bytes()
	root, err := fstRoot(d)
	if err != nil {
		return nil, fmt.Errorf("%w: %v", errCodes, err)
	}
	var codes [64]byte
	var seen [64]bool
	s, ok := decodeState(d, &codes, root)
	if !ok || s.single || s.n != 256 {
		return nil, fmt.Errorf("%w: unexpected root state", errCodes)
	}
	for i := 0; i < s.n; i++ {
		c, next, _, ok := s.transition(d, i)
		if !ok || int(c) != i || !fstBody(d, next, next+1) {
			return nil, fmt.Errorf("%w: unexpected transition %d", errCodes, i)
		}
		top := d[next]
		if top&topSingle == 0 || top&topNext != 0 {
			return nil, fmt.Errorf("%w: byte %d: unexpected state", errCodes, c)
		}
		code := top & topLowBits
		if code == 0 {
			if !fstBody(d, next-1, next) || d[next-1] != c {
				return nil, fmt.Errorf("%w: byte %d: not stored in full", errCodes, c)
			}
			continue
		}
		if seen[code] {
			return nil, fmt.Errorf("%w: code %d used twice", errCodes, code)
		}
		seen[code] = true
		codes[code] = c
	}
	for code := 1; code < 64; code++ {
		if !seen[code] {
			return nil, fmt.Errorf("%w: code %d unused", errCodes, code)
		}
	}
	return &codes, nil
}

// fstRoot checks the vellum header and footer of d and returns the root
// address. It does not decode the root state.
func fstRoot(d []byte) (int, error) {
	if len(d) < fstHeaderLen+fstFooterLen {
		return 0, fmt.Errorf("fst of %d bytes is shorter than its header and footer", len(d))
	}
	if v := readPacked(d[0:8]); v != fstVersion {
		return 0, fmt.Errorf("fst encoding version %d, want %d", v, fstVersion)
	}
	if t := readPacked(d[8:16]); t != 0 {
		return 0, fmt.Errorf("fst type %d, want 0", t)
	}
	root := readPacked(d[len(d)-8:])
	if root != emptyState && (root < fstHeaderLen || root >= uint64(len(d)-fstFooterLen)) {
		return 0, fmt.Errorf("fst root address %d outside the fst body", root)
	}
	return int(root), nil
}
