package keyloom_test

import (
	"context"
	"fmt"
	"os"
	"path/filepath"
	"strings"

	"github.com/keyloom/keyloom"
	"github.com/keyloom/keyloom/internal/bundle"
)

// buildNotes writes a small model from a few invented notes and returns its path.
func buildNotes(dir string) string {
	notes := `See you at the shed on Saturday. See you at the shed at ten.
Bring the blue ladder to the shed. The blue ladder is back.
Thanks for the help. Thanks for the ladder.`
	_, data, err := bundle.Build(context.Background(), []bundle.Source{{Name: "notes", R: strings.NewReader(notes)}}, bundle.BuildOptions{Order: 3})
	if err != nil {
		panic(err)
	}
	path := filepath.Join(dir, "notes.klm")
	if err := os.WriteFile(path, data, 0o644); err != nil {
		panic(err)
	}
	return path
}

func words(s []keyloom.Suggestion) []string {
	out := make([]string, len(s))
	for i, x := range s {
		out[i] = x.Word
	}
	return out
}

// Example builds a tiny model, opens it and asks for the next word.
func Example() {
	dir, _ := os.MkdirTemp("", "keyloom-example")
	defer os.RemoveAll(dir)
	eng, err := keyloom.Open(buildNotes(dir), keyloom.Options{Suggestions: 2})
	if err != nil {
		fmt.Println(err)
		return
	}
	defer eng.Close()
	res, _ := eng.Suggest("Bring the blue ")
	fmt.Println(words(res.Predictions))
	// "ladder" always follows "the blue"; "the" is next because, in
	// Kneser-Ney, a word that follows many different words ranks high.
	// Output: [ladder the]
}

// ExampleOpen opens a model file; a file that is not a model is refused.
func ExampleOpen() {
	dir, _ := os.MkdirTemp("", "keyloom-example")
	defer os.RemoveAll(dir)
	bad := filepath.Join(dir, "notes.txt")
	os.WriteFile(bad, []byte("just some notes"), 0o644)
	_, err := keyloom.Open(bad, keyloom.Options{})
	fmt.Println(err != nil)
	eng, err := keyloom.Open(buildNotes(dir), keyloom.Options{})
	if err != nil {
		fmt.Println(err)
		return
	}
	defer eng.Close()
	fmt.Println(eng.Info().Order)
	// Output:
	// true
	// 3
}

// ExampleEngine_Suggest shows completions while a word is typed (in the
// typed casing) and predictions after a space.
func ExampleEngine_Suggest() {
	dir, _ := os.MkdirTemp("", "keyloom-example")
	defer os.RemoveAll(dir)
	eng, _ := keyloom.Open(buildNotes(dir), keyloom.Options{Suggestions: 1})
	defer eng.Close()
	res, _ := eng.Suggest("see you at the Sh")
	fmt.Println(res.Prefix, words(res.Completions))
	// "help" and "ladder" each follow "for the" once; "ladder" wins because
	// it follows more different words ("blue", "the").
	res, _ = eng.Suggest("thanks for the ")
	fmt.Println(words(res.Predictions))
	// Output:
	// Sh [Shed]
	// [ladder]
}

// ExampleEngine_Learn teaches the engine a new word; it becomes suggestible
// once it has been typed twice.
func ExampleEngine_Learn() {
	dir, _ := os.MkdirTemp("", "keyloom-example")
	defer os.RemoveAll(dir)
	eng, _ := keyloom.Open(buildNotes(dir), keyloom.Options{Suggestions: 1})
	defer eng.Close()
	eng.Learn("Meet me by the quince tree.")
	res, _ := eng.Suggest("by the qu")
	fmt.Println(words(res.Completions))
	eng.Learn("The quince tree is in bloom.")
	res, _ = eng.Suggest("by the qu")
	fmt.Println(words(res.Completions))
	// Output:
	// []
	// [quince]
}
