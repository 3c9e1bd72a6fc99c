//go:build cgo

package main

/*
#include <stdint.h>
#include <stddef.h>
#include "keyloom.h"

// Const-qualified aliases, so that the declarations cgo generates match
// keyloom.h exactly (it is included above: a mismatch fails the build).
typedef const char klm_cchar;
typedef const void klm_cvoid;
*/
import "C"

import (
	"encoding/json"
	"fmt"
	"runtime/cgo"
	"unsafe"

	"github.com/keyloom/keyloom"
)

//export klm_abi_version
func klm_abi_version() C.int32_t { return C.KLM_ABI_VERSION }

// options turns the C open arguments into engine options.
func options(suggestions C.int32_t, flags C.uint32_t) (keyloom.Options, error) {
	if suggestions < 0 {
		return keyloom.Options{}, fmt.Errorf("%w: suggestions = %d", errRange, suggestions)
	}
	return keyloom.Options{
		Suggestions:     int(suggestions),
		VerifyChecksums: flags&C.KLM_VERIFY_CHECKSUMS != 0,
		NoLearning:      flags&C.KLM_NO_LEARNING != 0,
	}, nil
}

// opened registers eng or reports err into the caller's error buffer.
func opened(eng *keyloom.Engine, err error, errbuf *C.char, errcap C.size_t) C.klm_handle {
	if err != nil {
		putText(errbuf, errcap, []byte(err.Error()))
		return 0
	}
	putText(errbuf, errcap, nil)
	return C.klm_handle(handles.add(eng))
}

//export klm_open
func klm_open(path *C.klm_cchar, suggestions C.int32_t, flags C.uint32_t, errbuf *C.char, errcap C.size_t) C.klm_handle {
	if path == nil {
		return opened(nil, fmt.Errorf("%w: path", errNilArg), errbuf, errcap)
	}
	opts, err := options(suggestions, flags)
	if err != nil {
		return opened(nil, err, errbuf, errcap)
	}
	eng, err := keyloom.Open(C.GoString((*C.char)(path)), opts)
	return opened(eng, err, errbuf, errcap)
}

//export klm_open_bytes
func klm_open_bytes(data *C.klm_cvoid, n C.size_t, suggestions C.int32_t, flags C.uint32_t, errbuf *C.char, errcap C.size_t) C.klm_handle {
	if data == nil && n > 0 {
		return opened(nil, fmt.Errorf("%w: data", errNilArg), errbuf, errcap)
	}
	opts, err := options(suggestions, flags)
	if err != nil {
		return opened(nil, err, errbuf, errcap)
	}
	b, err := goBytes(data, n)
	if err != nil {
		return opened(nil, err, errbuf, errcap)
	}
	eng, err := keyloom.OpenBytes(b, opts)
	return opened(eng, err, errbuf, errcap)
}

// maxInputBytes bounds the model or overlay bytes accepted from C (1 TiB),
// so that a garbage length is refused before any allocation is tried.
const maxInputBytes = 1 << 40

// goBytes copies n bytes of C memory into Go memory (C.GoBytes would take
// its length as a C int, too small for large models).
func goBytes(data *C.klm_cvoid, n C.size_t) ([]byte, error) {
	if uint64(n) > maxInputBytes {
		return nil, fmt.Errorf("%w: length %d", errRange, uint64(n))
	}
	b := make([]byte, int(n))
	if n > 0 {
		copy(b, unsafe.Slice((*byte)(unsafe.Pointer(data)), int(n)))
	}
	return b, nil
}

//export klm_close
func klm_close(h C.klm_handle) C.int32_t {
	b := handles.remove(cgo.Handle(h))
	if b == nil {
		return C.KLM_ERR_HANDLE
	}
	return code(b.close())
}

//export klm_suggest
func klm_suggest(h C.klm_handle, before *C.klm_cchar, out *C.char, cap C.size_t) C.int64_t {
	var js []byte
	err := with(cgo.Handle(h), func(eng *keyloom.Engine) error {
		if before == nil {
			return fmt.Errorf("%w: before", errNilArg)
		}
		res, err := eng.Suggest(C.GoString((*C.char)(before)))
		if err != nil {
			return err
		}
		js, err = json.Marshal(res)
		return err
	})
	if err != nil {
		return C.int64_t(code(err))
	}
	return putText(out, cap, js)
}

//export klm_correct
func klm_correct(h C.klm_handle, before *C.klm_cchar, out *C.char, cap C.size_t) C.int64_t {
	var js []byte
	err := with(cgo.Handle(h), func(eng *keyloom.Engine) error {
		if before == nil {
			return fmt.Errorf("%w: before", errNilArg)
		}
		c, err := eng.Correct(C.GoString((*C.char)(before)))
		if err != nil {
			return err
		}
		js, err = json.Marshal(c) // a nil *Correction encodes as null
		return err
	})
	if err != nil {
		return C.int64_t(code(err))
	}
	return putText(out, cap, js)
}

//export klm_learn
func klm_learn(h C.klm_handle, text *C.klm_cchar) C.int32_t {
	return code(with(cgo.Handle(h), func(eng *keyloom.Engine) error {
		if text == nil {
			return fmt.Errorf("%w: text", errNilArg)
		}
		return eng.Learn(C.GoString((*C.char)(text)))
	}))
}

//export klm_set_learning
func klm_set_learning(h C.klm_handle, on C.int32_t) C.int32_t {
	return code(with(cgo.Handle(h), func(eng *keyloom.Engine) error {
		eng.SetLearning(on != 0)
		return nil
	}))
}

//export klm_save_overlay
func klm_save_overlay(h C.klm_handle, path *C.klm_cchar) C.int32_t {
	return code(with(cgo.Handle(h), func(eng *keyloom.Engine) error {
		if path == nil {
			return fmt.Errorf("%w: path", errNilArg)
		}
		return eng.Save(C.GoString((*C.char)(path)))
	}))
}

//export klm_load_overlay
func klm_load_overlay(h C.klm_handle, path *C.klm_cchar) C.int32_t {
	return code(with(cgo.Handle(h), func(eng *keyloom.Engine) error {
		if path == nil {
			return fmt.Errorf("%w: path", errNilArg)
		}
		return eng.OpenOverlay(C.GoString((*C.char)(path)))
	}))
}

//export klm_overlay_bytes
func klm_overlay_bytes(h C.klm_handle, out unsafe.Pointer, cap C.size_t) C.int64_t {
	var b []byte
	err := with(cgo.Handle(h), func(eng *keyloom.Engine) error {
		var err error
		b, err = eng.SaveBytes()
		return err
	})
	if err != nil {
		return C.int64_t(code(err))
	}
	return putBytes(out, cap, b)
}

//export klm_load_overlay_bytes
func klm_load_overlay_bytes(h C.klm_handle, data *C.klm_cvoid, n C.size_t) C.int32_t {
	return code(with(cgo.Handle(h), func(eng *keyloom.Engine) error {
		if data == nil && n > 0 {
			return fmt.Errorf("%w: data", errNilArg)
		}
		b, err := goBytes(data, n)
		if err != nil {
			return err
		}
		return eng.LoadOverlayBytes(b)
	}))
}

// info is the JSON klm_info writes.
type info struct {
	Order       int    `json:"order"`
	Words       int    `json:"words"`
	NGrams      []int  `json:"ngrams"`
	QuantBits   int    `json:"quant_bits"`
	Bytes       int    `json:"bytes"`
	Corpus      string `json:"corpus"`
	UserEntries int    `json:"user_entries"`
}

//export klm_info
func klm_info(h C.klm_handle, out *C.char, cap C.size_t) C.int64_t {
	var js []byte
	err := with(cgo.Handle(h), func(eng *keyloom.Engine) error {
		i := eng.Info()
		var err error
		js, err = json.Marshal(info{i.Order, i.Words, i.NGrams, i.QuantBits, i.Bytes, i.Corpus, eng.UserEntries()})
		return err
	})
	if err != nil {
		return C.int64_t(code(err))
	}
	return putText(out, cap, js)
}

//export klm_last_error
func klm_last_error(h C.klm_handle, out *C.char, cap C.size_t) C.int64_t {
	b := handles.get(cgo.Handle(h))
	if b == nil {
		return C.KLM_ERR_HANDLE
	}
	b.mu.RLock()
	closed := b.closed
	b.mu.RUnlock()
	if closed {
		return C.KLM_ERR_HANDLE
	}
	return putText(out, cap, []byte(b.lastError()))
}
