package main

import (
	"fmt"
	"io"
	"strings"
	"time"

	"github.com/charmbracelet/lipgloss"
	"github.com/charmbracelet/x/ansi"
	"github.com/keyloom/keyloom"
)

// padLook holds the playground's styles. Its colours are the project's
// chart palette (palette.go): teal for the line, amber for the suggestion
// numbers, plum for corrections, slate for the status bar.
type padLook struct {
	prompt, past, cursor, label, badge, word, fix, fixTag, status, statusOn, statusOff, help, note lipgloss.Style
}

// newPadLook returns the styles for output w; colours are dropped when w is
// not a colour terminal (tests, pipes).
func newPadLook(w io.Writer) padLook {
	r := lipgloss.NewRenderer(w)
	const (
		teal  = lipgloss.Color("#1b6f6a")
		mint  = lipgloss.Color("#7cc7bf")
		amber = lipgloss.Color("#d08a1e")
		plum  = lipgloss.Color("#7a3b6e")
		slate = lipgloss.Color("#4a5568")
		paper = lipgloss.Color("#f3efe6")
		ink   = lipgloss.Color("#1d1f24")
	)
	return padLook{
		prompt:    r.NewStyle().Foreground(mint).Bold(true),
		past:      r.NewStyle().Foreground(slate).Italic(true),
		cursor:    r.NewStyle().Reverse(true),
		label:     r.NewStyle().Foreground(mint),
		badge:     r.NewStyle().Background(amber).Foreground(ink).Bold(true),
		word:      r.NewStyle().Foreground(paper),
		fix:       r.NewStyle().Background(plum).Foreground(paper).Bold(true),
		fixTag:    r.NewStyle().Foreground(plum).Bold(true),
		status:    r.NewStyle().Background(slate).Foreground(paper),
		statusOn:  r.NewStyle().Background(teal).Foreground(paper).Bold(true),
		statusOff: r.NewStyle().Background(plum).Foreground(paper).Bold(true),
		help:      r.NewStyle().Foreground(slate),
		note:      r.NewStyle().Foreground(amber),
	}
}

// View implements tea.Model: finished lines, the line, the suggestion
// strip, the correction row, the status bar and the key help.
func (p *pad) View() string {
	var rows []string
	for _, d := range p.done {
		rows = append(rows, p.look.past.Render("  ┊ "+printable(d)))
	}
	rows = append(rows, p.lineRow(), p.stripRow(), p.fixRow())
	if p.quitting {
		rows = append(rows, p.statusRow())
	} else {
		rows = append(rows, p.statusRow(), p.look.help.Render(p.keyHelp()))
	}
	for i, r := range rows {
		rows[i] = ansi.Truncate(r, max(p.width, 20), "…")
	}
	return strings.Join(rows, "\n") + "\n"
}

// lineRow draws the line with the cursor, scrolled so the cursor stays visible.
func (p *pad) lineRow() string {
	room := max(p.width-6, 10)
	from := 0
	if p.cursor > room {
		from = p.cursor - room
	}
	var b strings.Builder
	b.WriteString(p.look.prompt.Render("  » "))
	if from > 0 {
		b.WriteString("…")
	}
	b.WriteString(printable(string(p.line[from:p.cursor])))
	if p.cursor < len(p.line) {
		b.WriteString(p.look.cursor.Render(printable(string(p.line[p.cursor]))))
		b.WriteString(printable(string(p.line[p.cursor+1:])))
	} else {
		b.WriteString(p.look.cursor.Render(" "))
	}
	return b.String()
}

// stripRow draws the numbered suggestions.
func (p *pad) stripRow() string {
	list, completing := p.shown()
	label := "next "
	if completing {
		label = "word "
	}
	var b strings.Builder
	b.WriteString("    " + p.look.label.Render(label) + " ")
	if len(list) == 0 {
		b.WriteString(p.look.help.Render("—"))
	}
	for i, s := range list {
		if i > 0 {
			b.WriteString("  ")
		}
		b.WriteString(p.look.badge.Render(fmt.Sprintf(" %d", i+1)) + " " + p.look.word.Render(s.Word))
	}
	return b.String()
}

// fixRow draws the correction proposal, the one just applied, or a note.
func (p *pad) fixRow() string {
	switch {
	case p.undo != nil:
		return p.fixLine("fixed", p.undo.fix, fmt.Sprintf("Backspace keeps %q", p.undo.fix.Typed))
	case p.offer != nil:
		return p.fixLine("fix? ", p.offer.fix, "Ctrl+R takes it")
	case p.offeredFix() != nil:
		c := p.offeredFix()
		how := "Ctrl+R takes it"
		if c.Apply {
			how = "Space makes it · Ctrl+R now"
		}
		return p.fixLine("fix? ", c, how)
	case p.note != "":
		return "    " + p.look.note.Render(p.note)
	}
	return ""
}

// fixLine draws one correction with its confidence, alternatives and key.
func (p *pad) fixLine(tag string, c *keyloom.Correction, how string) string {
	tail := fmt.Sprintf("  %.0f%%", 100*c.Confidence)
	if len(c.Alternatives) > 0 {
		tail += " · or " + strings.Join(c.Alternatives, ", ")
	}
	return "    " + p.look.fixTag.Render(tag) + " " + p.look.fix.Render(" "+printable(c.Typed)+" → "+printable(c.Replacement)+" ") +
		p.look.help.Render(tail+" · "+how)
}

// statusRow draws the model, learning state, what was learned and the latency.
func (p *pad) statusRow() string {
	learn := p.look.statusOn.Render(" learning on ")
	if !p.learning {
		learn = p.look.statusOff.Render(" learning off ")
	}
	lines := "lines"
	if p.lines == 1 {
		lines = "line"
	}
	tail := fmt.Sprintf(" %d words learned (%d %s) · overlay %d n-grams · last answer %s ",
		p.words, p.lines, lines, p.eng.UserEntries(), micros(p.latency))
	if p.err != nil {
		tail += "· error: " + p.err.Error() + " "
	}
	return "  " + p.look.status.Render(" "+p.name+" ") + learn + p.look.status.Render(tail)
}

// keyHelp is the one-line key map.
func (p *pad) keyHelp() string {
	pick := "Alt+1 / F1 pick"
	if p.slots > 1 {
		pick = fmt.Sprintf("Alt+1..%d / F1..F%d pick", p.slots, p.slots)
	}
	return "  Tab first · " + pick + " · Ctrl+R fix · Enter learn line · Ctrl+L learning · Esc quit"
}

// micros formats a duration in microseconds.
func micros(d time.Duration) string {
	return fmt.Sprintf("%.1f µs", float64(d)/float64(time.Microsecond))
}

// printable shows line breaks and tabs inside the line as visible marks.
func printable(s string) string {
	return strings.NewReplacer("\n", "⏎", "\r", "⏎", "\t", "→").Replace(s)
}
