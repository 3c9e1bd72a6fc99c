package trie_test

import (
	"fmt"

	"github.com/keyloom/keyloom/trie"
)

// Example builds a lexicon of five words, loads it and asks it for an id,
// a prefix range, the words of that range and a display form.
func Example() {
	sec, err := trie.AppendSection(nil, []trie.Entry{
		{Word: "i", Surface: "I"},
		{Word: "in"},
		{Word: "inn"},
		{Word: "london", Surface: "London"},
		{Word: "nasa", Surface: "NASA"},
	})
	if err != nil {
		fmt.Println(err)
		return
	}
	lex, err := trie.LoadSection(sec)
	if err != nil {
		fmt.Println(err)
		return
	}
	id, ok := lex.ID("london")
	fmt.Println(id, ok, lex.Surface(id))
	lo, hi := lex.PrefixRange("in")
	for id := lo; id < hi; id++ {
		fmt.Println(id, lex.Word(id))
	}
	fmt.Println(lex.Surface(4), lex.Surface(0))
	// Output:
	// 3 true London
	// 1 in
	// 2 inn
	// NASA I
}

// ExampleLexicon_Step walks the FST byte by byte and adds the outputs to
// get the id, as a weighted search does.
func ExampleLexicon_Step() {
	sec, _ := trie.AppendSection(nil, []trie.Entry{{Word: "cat"}, {Word: "cod"}, {Word: "cot"}})
	lex, _ := trie.LoadSection(sec)
	state, sum := lex.Start(), uint64(0)
	for _, b := range []byte("cot") {
		next, out, ok := lex.Step(state, b)
		if !ok {
			fmt.Println("no word")
			return
		}
		state, sum = next, sum+out
	}
	if final, out := lex.Final(state); final {
		fmt.Println("cot has id", sum+out)
	}
	// Output: cot has id 2
}
