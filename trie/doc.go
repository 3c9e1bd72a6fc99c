// Package trie holds the word lexicon of a model: a vellum FST that maps
// each folded (lower-cased) word to an id and, walked the other way, each
// id back to its word, and the usual display casing of each word. (Sections
// of layout version 1 also keep a front-coded table from ids to words; they
// are still read.)
//
// Ids are ranks in byte order: the id of a word is the number of words that
// sort before it (as sort.Strings orders them). All words that start with
// a typed prefix therefore have consecutive ids, and [Lexicon.PrefixRange]
// turns a prefix into one id range that the language model can search.
//
//	sec, err := trie.AppendSection(nil, []trie.Entry{
//		{Word: "i", Surface: "I"}, {Word: "in"}, {Word: "london", Surface: "London"},
//	})
//	lex, err := trie.LoadSection(sec)
//	id, ok := lex.ID("london")        // 2, true
//	lo, hi := lex.PrefixRange("i")    // 0, 2: "i" and "in"
//	s := lex.Surface(id)              // "London"
//
// # Lifecycle
//
// A lexicon is written once, as one section of the model file, by
// [AppendSection], from entries sorted by word. [LoadSection] reads the
// section in place (no copy), so a memory-mapped model costs no heap for
// its lexicon; the bytes must stay valid and unchanged while the
// [*Lexicon] is used. The byte layout is in FORMAT.md and layout.go.
//
// # Walking the FST
//
// A weighted search (the corrector's edit-distance search, say) walks the
// FST state by state: [Lexicon.Start], then [Lexicon.Step] for each byte
// (or [Lexicon.AppendTransitions] to list a state's children), adding the
// outputs; [Lexicon.Final] says whether a state ends a word and gives the
// last output, and the sum is the word's id. States are plain ints read
// straight from the section bytes: a step decodes one state, checks every
// offset and allocates nothing. [Lexicon.FST] exposes the same bytes as a
// *vellum.FST for cross-checks with vellum's own automata.
//
// # Safety
//
// LoadSection checks every offset, length and count, walks every FST state
// once and lets vellum replay the walk, so damaged or hostile bytes give an
// error wrapping [ErrCorrupt] (or [ErrVersion]) and never a panic, and no
// later query can index out of range. [Lexicon.Check] goes further and
// enumerates every FST word, comparing it with the word that
// [Lexicon.AppendWord] gives for its id (in version 1, the table's).
//
// # Concurrency
//
// A *Lexicon is immutable; any number of goroutines may call its methods
// at once. Queries keep their scratch memory on the stack.
//
// # Caveats
//
// Words are bytes: the package does not fold case or normalise Unicode;
// the caller gives folded keys. Casing codes use Go's unicode.ToUpper, a
// one-rune-to-one-rune mapping, so a surface such as "STRASSE" for
// "straße" is kept as an exception rather than derived.
package trie
