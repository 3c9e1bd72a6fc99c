//go:build cgo

package main

import (
	"runtime/cgo"
	"sync"

	"github.com/keyloom/keyloom"
)

// box is what a handle refers to: an engine, the lock that lets Close wait
// for calls in progress, and the handle's last error message.
type box struct {
	mu     sync.RWMutex // calls hold it shared, close holds it exclusively
	eng    *keyloom.Engine
	closed bool

	errMu   sync.Mutex
	lastErr string
}

// registry is the set of live handles (see "Package state" in doc.go).
type registry struct {
	mu   sync.RWMutex
	live map[cgo.Handle]struct{}
}

var handles = registry{live: make(map[cgo.Handle]struct{})}

// add registers a new engine and returns its handle.
func (r *registry) add(eng *keyloom.Engine) cgo.Handle {
	h := cgo.NewHandle(&box{eng: eng})
	r.mu.Lock()
	r.live[h] = struct{}{}
	r.mu.Unlock()
	return h
}

// get returns the box of a live handle, or nil. A handle that was never
// issued or was closed is never passed to cgo.Handle.Value, which would
// panic on it.
func (r *registry) get(h cgo.Handle) *box {
	r.mu.RLock()
	defer r.mu.RUnlock()
	if _, ok := r.live[h]; !ok {
		return nil
	}
	return h.Value().(*box)
}

// remove forgets a handle and returns its box, or nil if it was not live.
func (r *registry) remove(h cgo.Handle) *box {
	r.mu.Lock()
	defer r.mu.Unlock()
	if _, ok := r.live[h]; !ok {
		return nil
	}
	delete(r.live, h)
	b := h.Value().(*box)
	h.Delete()
	return b
}

// with runs f on the engine of handle h while holding the box shared, and
// records f's error as the handle's last error. It returns errHandle for a
// dead handle.
func with(h cgo.Handle, f func(*keyloom.Engine) error) error {
	b := handles.get(h)
	if b == nil {
		return errHandle
	}
	b.mu.RLock()
	var err error
	if b.closed {
		err = errHandle
	} else {
		err = f(b.eng)
	}
	b.mu.RUnlock()
	if err != nil {
		b.setErr(err)
	}
	return err
}

func (b *box) setErr(err error) {
	b.errMu.Lock()
	b.lastErr = err.Error()
	b.errMu.Unlock()
}

func (b *box) lastError() string {
	b.errMu.Lock()
	defer b.errMu.Unlock()
	return b.lastErr
}

// close closes the engine after the calls in progress have finished.
func (b *box) close() error {
	b.mu.Lock()
	defer b.mu.Unlock()
	if b.closed {
		return errHandle
	}
	b.closed = true
	return b.eng.Close()
}
