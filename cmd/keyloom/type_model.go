package main

import (
	"fmt"
	"slices"
	"strings"
	"time"
	"unicode"
	"unicode/utf8"

	tea "github.com/charmbracelet/bubbletea"
	"github.com/keyloom/keyloom"
)

// maxTypeSlots is the largest --k the key map can reach (Alt+1..Alt+9).
const maxTypeSlots = 9

// functionKeys returns the keys F1 to F9, which pick suggestions 1 to 9.
func functionKeys() []tea.KeyType {
	return []tea.KeyType{tea.KeyF1, tea.KeyF2, tea.KeyF3, tea.KeyF4, tea.KeyF5, tea.KeyF6, tea.KeyF7, tea.KeyF8, tea.KeyF9}
}

// typeHistory is how many finished lines stay on screen above the line.
const typeHistory = 4

// pad is the state of the playground: one line being edited, the engine's
// answer for the text before the cursor, and what was learned so far.
// It is a bubbletea model; Update never blocks on anything but the engine.
type pad struct {
	eng   *keyloom.Engine
	name  string // model name shown in the status line
	slots int    // suggestions shown (--k)
	look  padLook

	line   []rune // the line being edited
	cursor int    // rune index of the cursor in line

	res     keyloom.Result // engine answer for the text before the cursor
	resFor  string         // the text res answers
	latency time.Duration  // time taken by the last Suggest
	err     error          // last engine error, shown in the status line

	// fixFor returns the engine's decision on the last word of before when
	// the user finishes it with a space or punctuation (nil: leave the
	// word). Tests may replace it.
	fixFor func(before string) *keyloom.Correction
	// undo is set right after a correction was applied, so that a Backspace
	// as the very next key can take it back.
	undo *padUndo
	// offer is set right after a word was finished for which the engine
	// proposes a correction it does not make itself (Ctrl+R takes it).
	offer *padUndo

	learning bool
	lines    int // finished lines learned
	words    int // words in them
	done     []string
	note     string // one-off message ("learned …", "kept …")
	width    int
	quitting bool
}

// padUndo remembers a correction made (or offered) when a word was finished.
type padUndo struct {
	fix *keyloom.Correction
	end rune // the space or punctuation that finished the word
	at  int  // cursor right after end
}

// newPad returns a playground over eng showing slots suggestions.
func newPad(eng *keyloom.Engine, name string, slots int, learning bool, look padLook) *pad {
	p := &pad{eng: eng, name: name, slots: slots, look: look, learning: learning, width: 80}
	p.fixFor = p.engineFix
	eng.SetLearning(learning)
	p.refresh()
	return p
}

// Init implements tea.Model.
func (p *pad) Init() tea.Cmd { return nil }

// Update implements tea.Model: it applies one key (or a resize).
func (p *pad) Update(msg tea.Msg) (tea.Model, tea.Cmd) {
	switch msg := msg.(type) {
	case tea.WindowSizeMsg:
		if msg.Width > 0 {
			p.width = msg.Width
		}
		return p, nil
	case tea.KeyMsg:
		return p, p.key(msg)
	}
	return p, nil
}

// key applies one key press and returns tea.Quit when the user leaves.
func (p *pad) key(k tea.KeyMsg) tea.Cmd {
	undo, offer := p.undo, p.offer
	p.undo, p.offer = nil, nil
	p.note = ""
	if k.Paste {
		// Pasted text is inserted as is: no correction is made on its spaces.
		p.insert(string(k.Runes))
		p.refresh()
		return nil
	}
	switch k.Type {
	case tea.KeyEsc, tea.KeyCtrlC, tea.KeyCtrlD:
		p.quitting = true
		return tea.Quit
	case tea.KeyEnter:
		p.finish()
	case tea.KeyCtrlL:
		p.learning = !p.learning
		p.eng.SetLearning(p.learning)
	case tea.KeyTab:
		p.pick(0)
	case tea.KeyF1, tea.KeyF2, tea.KeyF3, tea.KeyF4, tea.KeyF5, tea.KeyF6, tea.KeyF7, tea.KeyF8, tea.KeyF9:
		p.pick(slices.Index(functionKeys(), k.Type))
	case tea.KeyCtrlR:
		if offer != nil && offer.at == p.cursor {
			p.cursor--
			p.replaceWord(offer.fix.Typed, offer.fix.Replacement)
			p.cursor++
		} else if c := p.offeredFix(); c != nil {
			p.replaceWord(c.Typed, c.Replacement)
		}
	case tea.KeySpace:
		p.finishWord(' ')
	case tea.KeyBackspace:
		if undo != nil && undo.at == p.cursor && strings.HasSuffix(p.before(), undo.fix.Replacement+string(undo.end)) {
			p.takeBack(undo)
			break
		}
		if p.cursor > 0 {
			p.line = append(p.line[:p.cursor-1], p.line[p.cursor:]...)
			p.cursor--
		}
	case tea.KeyDelete:
		if p.cursor < len(p.line) {
			p.line = append(p.line[:p.cursor], p.line[p.cursor+1:]...)
		}
	case tea.KeyCtrlW:
		p.deleteWord()
	case tea.KeyCtrlU:
		p.line, p.cursor = p.line[p.cursor:], 0
	case tea.KeyLeft:
		p.cursor = max(p.cursor-1, 0)
	case tea.KeyRight:
		p.cursor = min(p.cursor+1, len(p.line))
	case tea.KeyHome, tea.KeyCtrlA:
		p.cursor = 0
	case tea.KeyEnd, tea.KeyCtrlE:
		p.cursor = len(p.line)
	case tea.KeyRunes:
		if k.Alt {
			if len(k.Runes) == 1 && k.Runes[0] >= '1' && k.Runes[0] <= '9' {
				p.pick(int(k.Runes[0] - '1'))
			}
			break
		}
		// Fast typing can arrive as several runes in one message.
		for _, r := range k.Runes {
			if strings.ContainsRune(wordEnders, r) {
				p.finishWord(r)
				continue
			}
			p.insert(string(r))
		}
	default:
		return nil
	}
	p.refresh()
	return nil
}

// before returns the text before the cursor.
func (p *pad) before() string { return string(p.line[:p.cursor]) }

// insert puts s at the cursor.
func (p *pad) insert(s string) {
	r := []rune(s)
	rest := append(r, p.line[p.cursor:]...)
	p.line = append(p.line[:p.cursor], rest...)
	p.cursor += len(r)
}

// refresh asks the engine about the text before the cursor.
func (p *pad) refresh() {
	b := p.before()
	start := time.Now()
	res, err := p.eng.Suggest(b)
	p.latency = time.Since(start)
	p.res, p.resFor, p.err = res, b, err
}

// shown returns the suggestions on the strip and whether they complete the
// word being typed (else they predict the next word).
func (p *pad) shown() (list []keyloom.Suggestion, completing bool) {
	if p.res.Prefix != "" {
		list, completing = p.res.Completions, true
	} else {
		list = p.res.Predictions
	}
	if len(list) > p.slots {
		list = list[:p.slots]
	}
	return list, completing
}

// pick accepts suggestion i: it replaces the word being typed (or fills the
// empty slot after a space) and adds a space.
func (p *pad) pick(i int) {
	list, _ := p.shown()
	if i < 0 || i >= len(list) {
		return
	}
	prefix := []rune(p.res.Prefix)
	if n := len(prefix); n <= p.cursor && string(p.line[p.cursor-n:p.cursor]) == p.res.Prefix {
		p.line = append(p.line[:p.cursor-n], p.line[p.cursor:]...)
		p.cursor -= n
	}
	p.insert(list[i].Word + " ")
}

// engineFix is the default fixFor: the engine's decision on the last word.
func (p *pad) engineFix(before string) *keyloom.Correction {
	c, err := p.eng.Correct(before)
	if err != nil {
		p.err = err
		return nil
	}
	return c
}

// offeredFix returns the correction proposed for the word being typed, if any.
func (p *pad) offeredFix() *keyloom.Correction {
	c := p.res.Correction
	if c == nil || c.Typed == "" || !strings.HasSuffix(p.before(), c.Typed) {
		return nil
	}
	return c
}

// wordEnders are the keys besides space that finish a word and so let the
// engine correct it.
const wordEnders = ".,;:!?"

// finishWord types end (a space or punctuation). When it ends a word, the
// engine decides on that word first: a safe correction is made (and can be
// taken back with Backspace), another is offered until the next key.
func (p *pad) finishWord(end rune) {
	b := p.before()
	last, _ := utf8.DecodeLastRuneInString(b)
	if b == "" || !(unicode.IsLetter(last) || unicode.IsDigit(last) || unicode.IsMark(last)) {
		p.insert(string(end))
		return
	}
	c := p.fixFor(b)
	if c == nil || c.Typed == "" || c.Typed == c.Replacement || !strings.HasSuffix(b, c.Typed) {
		p.insert(string(end))
		return
	}
	if c.Apply {
		p.replaceWord(c.Typed, c.Replacement)
	}
	p.insert(string(end))
	u := &padUndo{fix: c, end: end, at: p.cursor}
	if c.Apply {
		p.undo = u
	} else {
		p.offer = u
	}
}

// replaceWord replaces typed, which ends right before the cursor, with repl.
func (p *pad) replaceWord(typed, repl string) {
	n := utf8.RuneCountInString(typed)
	if n > p.cursor || string(p.line[p.cursor-n:p.cursor]) != typed {
		return
	}
	p.line = append(p.line[:p.cursor-n], p.line[p.cursor:]...)
	p.cursor -= n
	p.insert(repl)
}

// takeBack undoes an applied correction (the space or punctuation stays)
// and tells the engine not to offer it again.
func (p *pad) takeBack(u *padUndo) {
	p.cursor-- // before the word's end
	p.replaceWord(u.fix.Replacement, u.fix.Typed)
	p.cursor++
	if err := p.eng.Reject(u.fix.Typed, u.fix.Replacement); err != nil {
		p.err = err
	}
	p.note = fmt.Sprintf("kept %q; it will not be corrected to %q again", u.fix.Typed, u.fix.Replacement)
}

// deleteWord removes the word (and the spaces after it) before the cursor.
func (p *pad) deleteWord() {
	i := p.cursor
	for i > 0 && unicode.IsSpace(p.line[i-1]) {
		i--
	}
	for i > 0 && !unicode.IsSpace(p.line[i-1]) {
		i--
	}
	p.line = append(p.line[:i], p.line[p.cursor:]...)
	p.cursor = i
}

// finish ends the line: it is learned (when learning is on) and moves up
// into the history.
func (p *pad) finish() {
	text := strings.TrimSpace(string(p.line))
	p.line, p.cursor = p.line[:0], 0
	if text == "" {
		return
	}
	if p.learning {
		if err := p.eng.Learn(text); err != nil {
			p.err = err
			return
		}
		p.lines++
		n := countWords(text)
		p.words += n
		p.note = fmt.Sprintf("learned %d words", n)
	} else {
		p.note = "not learned (learning is off)"
	}
	p.done = append(p.done, text)
	if len(p.done) > typeHistory {
		p.done = p.done[len(p.done)-typeHistory:]
	}
}

// isTypedWordRune reports whether r can be part of a word being typed.
func isTypedWordRune(r rune) bool {
	return unicode.IsLetter(r) || unicode.IsDigit(r) || unicode.IsMark(r) || r == '\'' || r == '’' || r == '-'
}

// countWords counts the runs of letters and digits in s.
func countWords(s string) int {
	return len(strings.FieldsFunc(s, func(r rune) bool { return !isTypedWordRune(r) }))
}
