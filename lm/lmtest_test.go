package lm

import (
	"context"
	"os"
	"strings"
	"testing"
)

// built is a model estimated from text, in exact and compact (lossless) form.
type built struct {
	b *Backoff
	m *Model
}

func (x built) lookup(w []byte) (uint32, bool) { return x.b.ID(string(w)) }

func (x built) ids(t testing.TB, words []string) []uint32 {
	t.Helper()
	out := make([]uint32, len(words))
	for i, w := range words {
		id, ok := x.b.ID(w)
		if !ok {
			id, _ = x.b.ID(UNK)
		}
		out[i] = id
	}
	return out
}

func buildText(t testing.TB, text string, order int, opts ScanOptions, qbits int) built {
	t.Helper()
	c, err := NewCounter(order)
	if err != nil {
		t.Fatal(err)
	}
	if err := c.AddText(context.Background(), strings.NewReader(text), opts, nil); err != nil {
		t.Fatal(err)
	}
	b, err := Estimate(context.Background(), c, EstimateOptions{})
	if err != nil {
		t.Fatal(err)
	}
	sec, err := AppendSection(nil, b, LayoutOptions{QuantBits: qbits})
	if err != nil {
		t.Fatal(err)
	}
	m, err := LoadSection(sec)
	if err != nil {
		t.Fatal(err)
	}
	return built{b, m}
}

func readFile(t testing.TB, path string) string {
	t.Helper()
	b, err := os.ReadFile(path)
	if err != nil {
		t.Fatalf("read %s: %v", path, err)
	}
	return string(b)
}
