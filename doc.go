// Package keyloom is offline next-word prediction, word completion and
// autocorrect for text fields on phones and small devices, with
// personalisation that stays on the device.
//
// A model is one file (built with the keyloom command or [Build]) that holds
// a lexicon, a quantized modified Kneser-Ney n-gram model and, optionally, a
// user overlay. [Open] maps it read-only; [Engine.Suggest] answers each
// keystroke with completions of the word being typed, next-word predictions
// and, when the last word looks mistyped, a correction.
//
//	eng, err := keyloom.Open("en.klm", keyloom.Options{})
//	if err != nil { ... }
//	defer eng.Close()
//	res, err := eng.Suggest("see you at the sh")
//	// res.Completions: "shed", "shop", …
//
// # Concurrency
//
// An Engine is safe for concurrent use by any number of goroutines. The base
// model is immutable; the user overlay publishes new snapshots so that
// Suggest never waits on Learn.
//
// # Caveats
//
// Suggestions and corrections can change what the user means; an app should
// let users see and undo every automatic change. Typed text is personal data:
// nothing in this package sends it anywhere, logs it or writes it outside
// the files the caller names.
package keyloom
