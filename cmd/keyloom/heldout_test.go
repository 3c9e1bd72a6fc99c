package main

import (
	"io"
	"os"
	"strings"
	"testing"

	"github.com/keyloom/keyloom/corpora"
)

// TestHeldOutSources checks the leave-one-file-out recipe: the demo file
// under test is left out of the text the model learns from and the other
// files stay; a text that is no demo file leaves nothing out.
func TestHeldOutSources(t *testing.T) {
	notes, err := os.ReadFile("../../corpora/demo/notes.txt")
	if err != nil {
		t.Fatal(err)
	}
	tests := []struct {
		name string
		test []byte
		left []string
	}{
		{"notes", notes, []string{"notes.txt"}},
		{"other text", []byte("a text of its own\n"), nil},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			src, left := heldOutSources([][]byte{tc.test})
			if strings.Join(left, ",") != strings.Join(tc.left, ",") {
				t.Fatalf("heldOutSources left out %v, want %v", left, tc.left)
			}
			b, err := io.ReadAll(src[0].R)
			if err != nil {
				t.Fatal(err)
			}
			text := string(b)
			for _, d := range corpora.Demo() {
				first := strings.SplitN(strings.TrimSpace(d.Text), "\n", 2)[0]
				wantIn := !(len(tc.left) > 0 && d.Name == tc.left[0])
				if strings.Contains(text, first) != wantIn {
					t.Errorf("heldOutSources: %s in the training text = %v, want %v", d.Name, !wantIn, wantIn)
				}
			}
			if len(src) != len(defaultSources()) {
				t.Errorf("heldOutSources gave %d sources, want the default recipe's %d", len(src), len(defaultSources()))
			}
		})
	}
	if code, _, _ := runCmd(t, t.TempDir(), "eval", "--noise", "0.08", "--held-out", "--model", "x.klm", "../../corpora/demo/notes.txt"); code != 2 {
		t.Errorf("eval --held-out --model: code %d, want 2 (usage)", code)
	}
}
