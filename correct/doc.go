// Package correct proposes corrections of typed words: a noisy-channel
// corrector that walks the lexicon transducer state by state with a
// weighted Damerau-Levenshtein row, keyboard-aware and trained on real
// spelling errors.
//
//	c, err := correct.New(lexicon, model.LogProb, correct.Options{})
//	cands, dec := c.Correct("Teh,", contextIDs, 3, nil)
//	// cands[0].Word == "The,"; dec.Apply says whether to replace on space.
//
// # Channel
//
// P(typed | intended) mixes two error sources by taking, for each edit, the
// cheaper explanation:
//
//   - keyboard slips: a neighbouring key (probability falling with the
//     distance between key centres of a [Keyboard], see LAYOUT.md), a key hit
//     twice, a letter dropped or two swapped;
//   - spelling errors: rules α→β of up to four bytes a side with learned
//     costs, in the manner of Brill and Moore (2000), trained by
//     [TrainErrorModel] on corpora/misspellings-dev.tsv and shipped as
//     errmodel.tsv (regenerate with `go generate`). Every rule is kept, its
//     count lowered by an absolute discount estimated from the counts of
//     rules seen once and twice; single-letter edits no rule covers back
//     off to class costs.
//     A spelling edit of the first letter (not a swap of the first two)
//     costs 2.26 nats more: writers rarely get the first letter wrong
//     (see leadCost in channel.go).
//
// Four whole-word features stand beside the letter edits. Word families,
// for typed words the lexicon does not know: a stem typed with another
// ending ("examinated" for examined, "oftenly" for often) is usually
// beyond the search budget, so the lexicon words sharing a long prefix
// with the typed word are offered at a learned per-word cost plus a cost
// per edit between the endings (family.go). Over-regularised verbs, for
// any typed word: a verb's base with the regular past ending ("teached",
// "payed") gets the verb's irregular forms (taught, paid) from a table of
// common English irregular verbs, at a per-word cost learned from the
// training pairs like the family cost (irregular.go). Letters moved, for
// typed words the lexicon does not know: the lexicon words obtained by
// moving one typed letter two places ("tath" for that), which the search
// prices as two swaps, are offered at a learned cost per move (moved.go).
// Sound, for typed
// words the lexicon does not know: candidates that sound
// like the typed word (the same code under rules after Philips's 1990
// Metaphone, phonetic.go) gain a small bonus, a pronunciation feature in
// the manner of Toutanova and Moore (2002) (rank.go).
//
// A multi-letter rule counts as one step of the search. With unit costs
// the recurrence is plain optimal-string-alignment distance (tested against
// github.com/agnivade/levenshtein and vellum's Levenshtein automaton).
//
// # Search and ranking
//
// The lexicon is walked depth first carrying one DP row per depth; a
// branch is cut when a lower bound on the cost of any word below it
// exceeds the cost budget. Without more knowledge the bound is the row
// minimum (and a multi-letter rule in progress that could bring it back);
// a lexicon that lists a state's edges at once ([EdgeLister]) also gets a
// table of the letters below each state, built in [New], and the bound
// then charges every typed letter still ahead that no word below can match
// (an A* heuristic that stays admissible: below.go). Such a lexicon has
// every alphabet letter below the state tried; otherwise, and for bytes
// outside the alphabet, only bytes whose substitution, deletion or rule
// cost fits the budget; with the table, a rule's first intended letter
// is tried only where the row entry the rule would start from plus its
// cost fits the budget (rulestart.go). The walk runs in widening passes
// (6, 9, then Options.MaxCost nats) and stops after a pass whose best candidate scores
// at least -16 nats (-17 after the middle pass, LMWeight-scaled); a word the lexicon or Known knows gets only the first
// pass. The passes walk depth first. The widest does not search the whole
// lexicon: it follows only the words whose consonant skeleton (the word
// without a, e, i, o, u, y, h, w and repeats, "restaurant" → rstrnt) is
// within one plain edit of the typed word's, or that are within two plain
// edits of the typed word (skeleton.go). The errors that only the widest
// budget reaches are mostly vowel trouble with at most one consonant
// wrong, scrambled letters and double keyboard slips; the filter keeps
// those and leaves out most of the walk: for the 8-letter misspellings of
// the package's benchmarks (74k words) all passes together examine at
// most 8,968 prefixes (20,733 with the whole lexicon in the widest pass),
// so that a cap of that size or more cuts none of them short (a
// depth-first walk cut short leaves out the alphabetically last
// prefixes). With the letters-below
// table the cap counts prefixes examined (a DP row each, or a bound from
// the parent's row that prunes the child first), without it states
// entered. Without a cap every pass finds exactly the words the row
// minimum alone would find (the widest, those of them the filter keeps). Words
// found are ranked by Score = -Cost + LMWeight × ln P(word | context).
// Missing spaces ("aboutthe" → "about the") are [KindSplit] candidates;
// stray spaces ("ab out") are handled by [Corrector.Merge], which needs the
// previous token.
//
// # Auto-apply
//
// Decision.Confidence is the softmax of the scores over the candidates and
// the typed word itself (scored with its language-model probability when
// the lexicon has it, else with Options.UnknownLogProb). Apply needs
// Confidence ≥ Options.ApplyThreshold. A word the lexicon or the user's
// Known callback knows is replaced only when an alternative out-scores it
// by Options.KnownMargin (10 nats by default): false corrections are worse
// than misses. A rare listed word one edit from a frequent one (about 3 %
// of the development misspellings are themselves list words, mostly
// SCOWL-only) is therefore offered as a suggestion, and applied only
// when the language model makes the frequent word e^10 times likelier.
// Undone corrections reported by Options.Rejected are not offered again.
// Candidates never include the typed word itself.
//
// # Casing, punctuation, bad input
//
// Leading and trailing punctuation are kept and the casing pattern
// (lower, Capitalised, ALL CAPS) is applied to the candidate. One
// character that prose never puts before a word (, ; . / \ = and a lone
// bracket) typed right before it is taken as a neighbouring key hit for a
// letter and searched as part of the word (";erson" → "person"). Input that
// is empty, longer than 48 bytes, invalid UTF-8 or in a non-Latin script
// gets no candidates. Words are lower-cased with [strings.ToLower], which
// must match how the lexicon was folded.
//
// # Concurrency and cost
//
// A Corrector is immutable and safe for concurrent use; per-call scratch
// comes from a sync.Pool. Correct allocates the candidates' Word strings.
// Its cost grows with the number of prefixes whose bound stays within
// budget: see BenchmarkCorrect8 and BENCHMARKS.md.
//
// # Caveats
//
// The search works on bytes: an accented letter typed for another costs two
// byte edits unless an accent rule covers it; words whose letters lie
// outside a–z, apostrophe, hyphen and the typed bytes are reached only
// through rules. The widening passes stop early on a heuristic, so a
// costlier but much more probable word can occasionally be missed.
package correct
