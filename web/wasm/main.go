//go:build js && wasm

// Command wasm runs the Keyloom engine inside a web page.
//
// Built with GOOS=js GOARCH=wasm (see web/build.sh), it installs one global
// object, loomBridge, and then waits for calls from JavaScript:
//
//	const h = loomBridge.open(modelBytes)        // Uint8Array of a .klm file
//	h.suggest("see you at the sh")               // {ok: "<Result JSON>"}
//	h.correct("I recieve ")                      // {ok: "<Correction JSON or null>"}
//	h.learn(text); h.commit(word, contextBefore) // {ok: true}
//	h.saveOverlay()                              // {ok: Uint8Array}
//	h.loadOverlay(bytes); h.wipe(); h.close()    // {ok: true}
//
// Every method answers {ok: value} or {err: "message"}; nothing throws, so a
// bad model or overlay never stops the Go program. The page's loom.js wraps
// these into functions that throw ordinary JavaScript errors.
//
// When the bridge is installed the program calls globalThis.loomBridgeReady,
// if the page defined it.
package main

import (
	"encoding/json"
	"errors"
	"fmt"
	"syscall/js"

	"github.com/keyloom/keyloom"
)

// bridgeVersion tells the page which set of methods the bridge has.
const bridgeVersion = 1

// corrector is the engine's correction entry point. The facade may not have
// it yet; the bridge then reports correct as unavailable.
type corrector interface {
	Correct(beforeCursor string) (*keyloom.Correction, error)
}

func main() {
	bridge := js.Global().Get("Object").New()
	bridge.Set("version", bridgeVersion)
	bridge.Set("open", js.FuncOf(open))
	js.Global().Set("loomBridge", bridge)
	if ready := js.Global().Get("loomBridgeReady"); ready.Type() == js.TypeFunction {
		ready.Invoke(bridge)
	}
	select {} // serve calls until the page goes away
}

// ok wraps a successful answer.
func ok(v any) any { return map[string]any{"ok": v} }

// fail wraps an error.
func fail(err error) any { return map[string]any{"err": err.Error()} }

// errArgs is returned when a method is called with the wrong arguments.
var errArgs = errors.New("loom bridge: bad arguments")

// bytesArg copies a Uint8Array (or ArrayBuffer) argument into Go memory.
func bytesArg(v js.Value) ([]byte, error) {
	if v.Type() != js.TypeObject {
		return nil, fmt.Errorf("%w: want Uint8Array", errArgs)
	}
	if v.InstanceOf(js.Global().Get("ArrayBuffer")) {
		v = js.Global().Get("Uint8Array").New(v)
	}
	if !v.InstanceOf(js.Global().Get("Uint8Array")) {
		return nil, fmt.Errorf("%w: want Uint8Array", errArgs)
	}
	b := make([]byte, v.Get("length").Int())
	js.CopyBytesToGo(b, v)
	return b, nil
}

// stringArgs checks that the first n arguments are strings and returns them.
func stringArgs(args []js.Value, n int) ([]string, error) {
	if len(args) < n {
		return nil, fmt.Errorf("%w: want %d string(s), got %d argument(s)", errArgs, n, len(args))
	}
	out := make([]string, n)
	for i := range n {
		if args[i].Type() != js.TypeString {
			return nil, fmt.Errorf("%w: argument %d is %s, want string", errArgs, i+1, args[i].Type())
		}
		out[i] = args[i].String()
	}
	return out, nil
}

// jsonString marshals v for the page.
func jsonString(v any) any {
	b, err := json.Marshal(v)
	if err != nil {
		return fail(err)
	}
	return ok(string(b))
}

// open builds an engine from model bytes and returns a handle object.
func open(_ js.Value, args []js.Value) any {
	if len(args) < 1 {
		return fail(fmt.Errorf("%w: open wants the model bytes", errArgs))
	}
	b, err := bytesArg(args[0])
	if err != nil {
		return fail(err)
	}
	eng, err := keyloom.OpenBytes(b, keyloom.Options{})
	if err != nil {
		return fail(err)
	}
	return ok(newHandle(eng))
}

// method is one handle method: it returns an ok or fail answer.
type method func(args []js.Value) any

// newHandle returns the JavaScript object through which the page uses eng.
// The js.Func values live as long as the handle; close releases them.
func newHandle(eng *keyloom.Engine) js.Value {
	h := js.Global().Get("Object").New()
	var (
		funcs []js.Func
		names []string
	)
	add := func(name string, m method) {
		f := js.FuncOf(func(_ js.Value, args []js.Value) any { return m(args) })
		funcs = append(funcs, f)
		names = append(names, name)
		h.Set(name, f)
	}
	_, canCorrect := any(eng).(corrector)
	h.Set("canCorrect", canCorrect)

	add("info", func([]js.Value) any { return jsonString(eng.Info()) })
	add("suggest", func(args []js.Value) any {
		s, err := stringArgs(args, 1)
		if err != nil {
			return fail(err)
		}
		res, err := eng.Suggest(s[0])
		if err != nil {
			return fail(err)
		}
		return jsonString(res)
	})
	add("correct", func(args []js.Value) any {
		s, err := stringArgs(args, 1)
		if err != nil {
			return fail(err)
		}
		c, has := any(eng).(corrector)
		if !has {
			return ok("null")
		}
		corr, err := c.Correct(s[0])
		if err != nil {
			return fail(err)
		}
		return jsonString(corr)
	})
	add("learn", func(args []js.Value) any {
		s, err := stringArgs(args, 1)
		if err != nil {
			return fail(err)
		}
		if err := eng.Learn(s[0]); err != nil {
			return fail(err)
		}
		return ok(true)
	})
	add("commit", func(args []js.Value) any {
		s, err := stringArgs(args, 2)
		if err != nil {
			return fail(err)
		}
		if err := eng.Commit(s[0], s[1]); err != nil {
			return fail(err)
		}
		return ok(true)
	})
	add("reject", func(args []js.Value) any {
		s, err := stringArgs(args, 2)
		if err != nil {
			return fail(err)
		}
		if err := eng.Reject(s[0], s[1]); err != nil {
			return fail(err)
		}
		return ok(true)
	})
	add("entries", func([]js.Value) any { return ok(eng.UserEntries()) })
	add("saveOverlay", func([]js.Value) any {
		b, err := eng.SaveBytes()
		if err != nil {
			return fail(err)
		}
		u := js.Global().Get("Uint8Array").New(len(b))
		js.CopyBytesToJS(u, b)
		return ok(u)
	})
	add("loadOverlay", func(args []js.Value) any {
		if len(args) < 1 {
			return fail(fmt.Errorf("%w: loadOverlay wants the overlay bytes", errArgs))
		}
		b, err := bytesArg(args[0])
		if err != nil {
			return fail(err)
		}
		if err := eng.LoadOverlayBytes(b); err != nil {
			return fail(err)
		}
		return ok(true)
	})
	add("wipe", func([]js.Value) any {
		if err := eng.Wipe(); err != nil {
			return fail(err)
		}
		return ok(true)
	})
	add("setLearning", func(args []js.Value) any {
		if len(args) < 1 || args[0].Type() != js.TypeBoolean {
			return fail(fmt.Errorf("%w: setLearning wants a boolean", errArgs))
		}
		eng.SetLearning(args[0].Bool())
		return ok(true)
	})
	add("close", func([]js.Value) any {
		err := eng.Close()
		// The page may still hold the handle: remove every method (close
		// included) so that a later call fails in JavaScript instead of
		// reaching a released function, and release them once this call
		// has returned.
		for _, name := range names {
			h.Delete(name)
		}
		release := funcs
		funcs = nil
		go func() {
			for _, f := range release {
				f.Release()
			}
		}()
		if err != nil {
			return fail(err)
		}
		return ok(true)
	})
	return h
}
