package correct

import "strings"

// Over-regularised verbs: a writer who does not know a verb's irregular
// past gives it the regular ending ("teached" for taught, "shrinked" for
// shrunk, "payed" for paid). The typed word is then one or two letters
// from the base form and several from the form meant, beyond the letter
// model, so addIrregular offers the irregular forms of the verb whose base
// the typed word extends by -ed at a per-word cost learned from the
// training pairs (Backoff.Irregular). Over-regularisation is the classic
// error of children and learners with English irregular pasts (Marcus
// et al. 1992, "Overregularization in language acquisition", from memory).

// irregularForms maps the base of an English irregular verb to its simple
// past and past participle (one form when they agree, alternatives after a
// space). The list holds common verbs, written down from general
// knowledge of English grammar (from memory), not from the development
// misspellings; verbs whose regular past is also standard ("burned",
// "dreamed") or whose regular-looking form is another word ("seed",
// "singed", "ringed", "costed", "putted") are left out, so that no
// correct word is taken for an over-regularisation. It is immutable.
var irregularForms = map[string]string{
	"arise": "arose arisen", "bear": "bore borne born", "beat": "beat beaten", "become": "became",
	"begin": "began begun", "bind": "bound", "bite": "bit bitten", "bleed": "bled",
	"blow": "blew blown", "break": "broke broken", "breed": "bred", "bring": "brought",
	"build": "built", "buy": "bought", "catch": "caught", "choose": "chose chosen", "cling": "clung",
	"come": "came", "deal": "dealt", "dig": "dug", "do": "did done", "draw": "drew drawn",
	"drink": "drank drunk", "drive": "drove driven", "eat": "ate eaten", "fall": "fell fallen",
	"feed": "fed", "feel": "felt", "fight": "fought", "find": "found", "flee": "fled",
	"fling": "flung", "fly": "flew flown", "forbid": "forbade forbidden",
	"forget": "forgot forgotten", "forgive": "forgave forgiven", "freeze": "froze frozen",
	"get": "got gotten", "give": "gave given", "go": "went gone", "grind": "ground",
	"grow": "grew grown", "have": "had", "hear": "heard", "hide": "hid hidden", "hit": "hit",
	"hold": "held", "hurt": "hurt", "keep": "kept", "know": "knew known", "lay": "laid",
	"leave": "left", "lend": "lent", "let": "let", "lose": "lost", "make": "made", "mean": "meant",
	"meet": "met", "overcome": "overcame", "pay": "paid", "read": "read", "ride": "rode ridden",
	"rise": "rose risen", "run": "ran", "say": "said", "seek": "sought", "sell": "sold",
	"send": "sent", "set": "set", "shake": "shook shaken", "shoot": "shot", "shrink": "shrank shrunk",
	"shut": "shut", "sink": "sank sunk", "sit": "sat", "sleep": "slept", "slide": "slid",
	"speak": "spoke spoken", "spend": "spent", "spread": "spread", "spring": "sprang sprung",
	"stand": "stood", "steal": "stole stolen", "stick": "stuck", "sting": "stung",
	"stink": "stank stunk", "stride": "strode", "strike": "struck", "swear": "swore sworn",
	"sweep": "swept", "swim": "swam swum", "take": "took taken", "teach": "taught", "tell": "told",
	"think": "thought", "throw": "threw thrown", "tread": "trod trodden", "understand": "understood",
	"undertake": "undertook undertaken", "wear": "wore worn", "weep": "wept", "win": "won",
	"withdraw": "withdrew withdrawn", "wring": "wrung", "write": "wrote written",
}

// irregularOf returns the irregular forms (space-separated) of the verb
// whose base typed (lower-case) extends by the regular past ending: base
// + "ed" ("teached"), base ending in e + "d" ("arised"), base with its
// last consonant doubled + "ed" ("runned"), or base ending in y with
// "ied" ("flied"); "" when there is none. A base ending in one vowel and
// a consonant doubles it before the ending as English spelling does
// ("sitted"), so "sited" and "wined" are taken for site and wine, not
// for sit and win. It does not allocate.
func irregularOf(typed string) string {
	if len(typed) < 4 || !strings.HasSuffix(typed, "ed") {
		return ""
	}
	n := len(typed)
	if f, ok := irregularForms[typed[:n-2]]; ok && !doublesLast(typed[:n-2]) {
		return f
	}
	if f, ok := irregularForms[typed[:n-1]]; ok {
		return f
	}
	if n >= 5 && typed[n-3] == typed[n-4] {
		if f, ok := irregularForms[typed[:n-3]]; ok {
			return f
		}
	}
	if n >= 5 && typed[n-3] == 'i' {
		var buf [maxTyped]byte
		if n-2 <= len(buf) {
			b := append(buf[:0], typed[:n-3]...)
			b = append(b, 'y')
			if f, ok := irregularForms[string(b)]; ok { // no allocation: map look-up by converted bytes
				return f
			}
		}
	}
	return ""
}

// doublesLast reports whether the final consonant of the base b doubles
// before -ed: b ends in consonant, vowel, consonant other than w, x or y
// ("sit", "begin", but not "beat", "eat" or "pay"). Stress, which also
// decides it ("visited"), is not looked at: the bases it is asked about
// are those of irregularForms, where the rule holds.
func doublesLast(b string) bool {
	n := len(b)
	if n < 3 {
		return false
	}
	last, mid, first := b[n-1], b[n-2], b[n-3]
	return !isVowel(last) && last != 'w' && last != 'x' && isVowel(mid) && mid != 'y' && !isVowel(first)
}

// isIrregularError reports whether typed (lower-case) is an
// over-regularised form of a verb whose irregular form intended is.
func isIrregularError(typed, intended string) bool {
	for f := range strings.FieldsSeq(irregularOf(typed)) {
		if f == intended {
			return true
		}
	}
	return false
}

// addIrregular offers to rk the irregular forms the lexicon knows of the
// verb lower (the typed word, lower-case) over-regularises, at cost each.
// Cost: a few map look-ups and one lexicon look-up per form.
func (c *Corrector) addIrregular(rk *ranker, lower string, cost float32) {
	forms := irregularOf(lower)
	for forms != "" {
		var f string
		f, forms, _ = strings.Cut(forms, " ")
		if id, ok := c.lex.ID(f); ok {
			rk.addMin(id, cost)
		}
	}
}
