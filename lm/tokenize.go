package lm

import (
	"bufio"
	"bytes"
	"io"
	"unicode"
	"unicode/utf8"

	"golang.org/x/text/unicode/norm"
)

// Special tokens of the vocabulary. BOS is context only and is never predicted.
const (
	BOS = "<s>"
	EOS = "</s>"
	UNK = "<unk>"
)

// DefaultMaxTokenBytes is the longest token kept when ScanOptions.MaxTokenBytes is zero.
// Longer runs of letters (pasted hashes, keyboard mashing) are dropped, not truncated.
const DefaultMaxTokenBytes = 64

// ScanOptions controls how a Scanner splits text into sentences and tokens.
// The zero value reads running text.
type ScanOptions struct {
	// Pretokenized reads one sentence per line with tokens separated by white
	// space, applying no normalization, folding or filtering at all (the usual
	// format of evaluation corpora). Lines that are empty after trimming are skipped.
	Pretokenized bool
	// MaxTokenBytes drops tokens longer than this many bytes; 0 means DefaultMaxTokenBytes.
	MaxTokenBytes int
}

// Scanner splits text into sentences of tokens.
//
// In running-text mode it normalizes to NFC, keeps words with inner apostrophes
// and hyphens ("don't", "well-known") and numbers with inner separators
// ("3.5", "1,000"), folds case, and ends sentences at '.', '!', '?', '…' and
// blank lines. Other punctuation separates tokens and is dropped. Invalid
// UTF-8 bytes act as separators.
//
// A Scanner is for one goroutine. Token slices are valid until the next Scan.
type Scanner struct {
	r    *bufio.Reader
	opts ScanOptions

	line []byte // current line (normalized)
	pos  int    // next byte of line to read
	eof  bool
	err  error

	folded, surface [][]byte // tokens of the current sentence
	fbuf, sbuf      []byte   // backing storage
	spans           []span
	tmp             []byte
}

type span struct{ f0, f1, s0, s1 int }

// NewScanner returns a Scanner reading from r.
func NewScanner(r io.Reader, opts ScanOptions) *Scanner {
	if opts.MaxTokenBytes <= 0 {
		opts.MaxTokenBytes = DefaultMaxTokenBytes
	}
	return &Scanner{r: bufio.NewReaderSize(r, 1<<16), opts: opts}
}

// Err returns the first read error other than io.EOF.
func (s *Scanner) Err() error { return s.err }

// Tokens returns the folded tokens of the current sentence (valid until the next Scan).
func (s *Scanner) Tokens() [][]byte { return s.folded }

// Surfaces returns the tokens of the current sentence as typed, after NFC
// normalization (valid until the next Scan). In pretokenized mode they equal Tokens.
func (s *Scanner) Surfaces() [][]byte { return s.surface }

// readLine loads the next line into s.line. It returns false at the end of input.
func (s *Scanner) readLine() bool {
	if s.eof {
		return false
	}
	s.tmp = s.tmp[:0]
	for {
		chunk, err := s.r.ReadSlice('\n')
		s.tmp = append(s.tmp, chunk...)
		if err == bufio.ErrBufferFull {
			if len(s.tmp) >= 1<<20 { // hand over very long lines in pieces
				break
			}
			continue
		}
		if err != nil {
			if err != io.EOF {
				s.err = err
			}
			s.eof = true
			if len(s.tmp) == 0 {
				return false
			}
		}
		break
	}
	s.line = s.tmp
	if !s.opts.Pretokenized && !isASCII(s.line) && !norm.NFC.IsNormal(s.line) {
		s.line = norm.NFC.Append(nil, s.line...)
	}
	s.pos = 0
	return true
}

func isASCII(b []byte) bool {
	for _, c := range b {
		if c >= utf8.RuneSelf {
			return false
		}
	}
	return true
}

func (s *Scanner) reset() {
	s.fbuf, s.sbuf, s.spans = s.fbuf[:0], s.sbuf[:0], s.spans[:0]
}

func (s *Scanner) finish() bool {
	if len(s.spans) == 0 {
		return false
	}
	s.folded, s.surface = s.folded[:0], s.surface[:0]
	for _, sp := range s.spans {
		s.folded = append(s.folded, s.fbuf[sp.f0:sp.f1:sp.f1])
		s.surface = append(s.surface, s.sbuf[sp.s0:sp.s1:sp.s1])
	}
	return true
}

// Scan advances to the next sentence with at least one token. It returns false
// at the end of input or on a read error (see Err).
func (s *Scanner) Scan() bool {
	s.reset()
	if s.opts.Pretokenized {
		return s.scanPretokenized()
	}
	for {
		if s.pos >= len(s.line) {
			if !s.readLine() {
				return s.finish()
			}
			if len(bytes.TrimSpace(s.line)) == 0 { // blank line ends a paragraph
				if s.finish() {
					return true
				}
				continue
			}
		}
		if s.scanText() {
			if s.finish() {
				return true
			}
		}
	}
}

func (s *Scanner) scanPretokenized() bool {
	for s.readLine() {
		for _, f := range bytes.Fields(s.line) {
			if string(f) == BOS || string(f) == EOS {
				continue
			}
			f0 := len(s.fbuf)
			s.fbuf = append(s.fbuf, f...)
			s0 := len(s.sbuf)
			s.sbuf = append(s.sbuf, f...)
			s.spans = append(s.spans, span{f0, len(s.fbuf), s0, len(s.sbuf)})
		}
		if s.finish() {
			return true
		}
	}
	return false
}

func wordRune(r rune) bool {
	if r < utf8.RuneSelf {
		return 'a' <= r && r <= 'z' || 'A' <= r && r <= 'Z' || '0' <= r && r <= '9'
	}
	return unicode.IsLetter(r) || unicode.IsDigit(r) || unicode.IsMark(r)
}

func isDigit(r rune) bool {
	if r < utf8.RuneSelf {
		return '0' <= r && r <= '9'
	}
	return unicode.IsDigit(r)
}

func decode(b []byte, i int) (rune, int) {
	if i >= len(b) {
		return -1, 0
	}
	if c := b[i]; c < utf8.RuneSelf {
		return rune(c), 1
	}
	return utf8.DecodeRune(b[i:])
}

// scanText consumes the current line up to a sentence end. It returns true if a
// sentence end was reached.
func (s *Scanner) scanText() bool {
	line := s.line
	i := s.pos
	inTok := false
	var sp span
	var prev rune
	end := func() {
		if !inTok {
			return
		}
		inTok = false
		sp.f1, sp.s1 = len(s.fbuf), len(s.sbuf)
		if sp.s1-sp.s0 > s.opts.MaxTokenBytes {
			s.fbuf, s.sbuf = s.fbuf[:sp.f0], s.sbuf[:sp.s0]
			return
		}
		s.spans = append(s.spans, sp)
	}
	for i < len(line) {
		r, w := decode(line, i)
		if r == utf8.RuneError && w <= 1 {
			end()
			i++
			prev = 0
			continue
		}
		switch {
		case wordRune(r):
			if !inTok {
				inTok = true
				sp = span{f0: len(s.fbuf), s0: len(s.sbuf)}
			}
			s.sbuf = append(s.sbuf, line[i:i+w]...)
			if r < utf8.RuneSelf {
				c := byte(r)
				if 'A' <= c && c <= 'Z' {
					c += 'a' - 'A'
				}
				s.fbuf = append(s.fbuf, c)
			} else {
				s.fbuf = utf8.AppendRune(s.fbuf, unicode.ToLower(r))
			}
			prev = r
			i += w
			continue
		case inTok && (r == '\'' || r == '’' || r == '-' || r == '.' || r == ','):
			next, _ := decode(line, i+w)
			joins := false
			if r == '.' || r == ',' {
				joins = isDigit(prev) && next >= 0 && isDigit(next)
			} else {
				joins = wordRune(prev) && next >= 0 && wordRune(next)
			}
			if joins {
				c := byte(r)
				if r == '’' {
					c = '\''
				}
				s.sbuf = append(s.sbuf, c)
				s.fbuf = append(s.fbuf, c)
				prev = r
				i += w
				continue
			}
		}
		end()
		prev = r
		i += w
		if r == '.' || r == '!' || r == '?' || r == '…' {
			s.pos = i
			return true
		}
	}
	end()
	s.pos = i
	return false
}
