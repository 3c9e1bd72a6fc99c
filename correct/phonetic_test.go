package correct

import (
	"strings"
	"testing"
)

func TestSoundKeyRules(t *testing.T) {
	// Each case is one rule of Metaphone as Philips (1990) describes it
	// (recalled from memory); the expected codes apply those rules by hand.
	tests := []struct {
		name, word, want string
	}{
		{"ph sounds f", "phone", "FN"},
		{"initial kn drops k", "knot", "NT"},
		{"initial wr drops w", "wrap", "RP"},
		{"initial x sounds s", "xylem", "SLM"},
		{"tion sounds sh", "nation", "NXN"},
		{"th is theta", "thin", "0N"},
		{"soft c before e", "cent", "SNT"},
		{"hard c elsewhere", "cat", "KT"},
		{"ck is one k", "back", "BK"},
		{"soft g before i", "giant", "JNT"},
		{"gh silent before a consonant", "night", "NT"},
		{"dge sounds j", "edge", "AJ"},
		{"mb at the end drops b", "lamb", "LM"},
		{"v sounds f", "vase", "FS"},
		{"x sounds ks", "box", "BKS"},
		{"w before a vowel kept", "wet", "WT"},
		{"y not before a vowel dropped", "day", "T"},
		{"doubled letter coded once", "butter", "BTR"},
		{"vowels only at the start", "area", "AR"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			if got := string(soundKey(nil, []byte(tc.word))); got != tc.want {
				t.Errorf("soundKey(%q) = %q, want %q", tc.word, got, tc.want)
			}
		})
	}
}

func TestSoundKeyHomophones(t *testing.T) {
	// Pairs that sound alike and pairs that do not, in ordinary English
	// pronunciation (common knowledge, from memory; no outside list).
	tests := []struct {
		name string
		a, b string
		same bool
	}{
		{"night knight", "night", "knight", true},
		{"write right", "write", "right", true},
		{"which witch", "which", "witch", true},
		{"cent sent", "cent", "sent", true},
		{"phase faze", "phase", "faze", true},
		{"know no", "know", "no", true},
		{"their there", "their", "there", true},
		{"cat bat", "cat", "bat", false},
		{"ship sip", "ship", "sip", false},
		{"thin tin", "thin", "tin", false},
		{"gem get", "gem", "get", false},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			ka, kb := string(soundKey(nil, []byte(tc.a))), string(soundKey(nil, []byte(tc.b)))
			if (ka == kb) != tc.same {
				t.Errorf("soundKey(%q) = %q, soundKey(%q) = %q, want same = %v", tc.a, ka, tc.b, kb, tc.same)
			}
		})
	}
}

func TestSoundKeyBadInput(t *testing.T) {
	tests := []struct {
		name, word string
	}{
		{"empty", ""},
		{"no letters", "'-09"},
		{"invalid utf-8", "\xff\xfe"},
		{"non-latin", "слово"},
		{"long", strings.Repeat("ab", 5000)},
		{"one letter", "x"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			k := soundKey(nil, []byte(tc.word))
			if len(k) > 2*64 {
				t.Errorf("soundKey(%q...) has %d bytes, want at most %d", tc.word[:min(len(tc.word), 8)], len(k), 2*64)
			}
		})
	}
}

func BenchmarkSoundKey(b *testing.B) {
	w := []byte("pronunciation")
	var dst []byte
	b.ReportAllocs()
	for b.Loop() {
		dst = soundKey(dst[:0], w)
	}
}
