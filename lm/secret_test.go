package lm

import (
	"strings"
	"testing"
)

// Known Luhn answers. "79927398713" is the worked example of the Luhn
// algorithm (ISO/IEC 7812-1 annex B; the same number is used in the
// algorithm's common textbook description); "4111111111111111" and
// "5500000000000004" are the well-known public test card numbers of the
// card networks (from memory); changing one digit must break each.
func TestLuhnValid(t *testing.T) {
	cases := []struct {
		digits string
		want   bool
	}{
		{"79927398713", true},
		{"79927398710", false},
		{"4111111111111111", true},
		{"4111111111111112", false},
		{"5500000000000004", true},
		{"5500000000000005", false},
		{"0", false},
		{"", false},
		{"12a4", false},
	}
	for _, c := range cases {
		t.Run(c.digits, func(t *testing.T) {
			if got := luhnValid([]byte(c.digits)); got != c.want {
				t.Errorf("luhnValid(%q) = %v, want %v", c.digits, got, c.want)
			}
		})
	}
}

// The secret rules are the project's own (documented in secret.go); the
// cases are the examples named in the issue plus ordinary words that must
// stay learnable. Rule of thumb, no outside source.
func TestLooksSecret(t *testing.T) {
	cases := []struct {
		word string
		want bool
	}{
		{"hunter2x", true},
		{"Pa55word", true},
		{"abc123", true},
		{"hunter2", true},
		{"pa55-word", true},
		{"jo.bloggs@example.com", true},
		{"<kit@mail.example.org>", true},
		{"123456", true},
		{"0123456789", true},
		{"4111-1111-1111-1111", true},
		{"12345", false},
		{"2nd", false},
		{"21st", false},
		{"10am", false},
		{"5km", false},
		{"mp3", false},
		{"h2o", false},
		{"win10", false},
		{"10.30", false},
		{"1,000", false},
		{"covid-19", false},
		{"@bob", false},
		{"hello", false},
		{"don't", false},
		{"", false},
	}
	for _, c := range cases {
		t.Run(c.word, func(t *testing.T) {
			if got := LooksSecret(c.word); got != c.want {
				t.Errorf("LooksSecret(%q) = %v, want %v", c.word, got, c.want)
			}
		})
	}
}

func TestSecretSpans(t *testing.T) {
	cases := []struct {
		name, text string
		secrets    []string // the text of each span
	}{
		{"card with spaces", "my card is 4111 1111 1111 1111 thanks", []string{"4111 1111 1111 1111"}},
		{"card with dashes", "use 5500-0000-0000-0004.", []string{"5500-0000-0000-0004"}},
		{"grouped phone", "call 020 7946 0958 today", []string{"020 7946 0958"}},
		{"short numbers", "at 10 30 on the 2nd", nil},
		{"16 digits failing Luhn in short groups", "ref 4111 1111 1111 1112 ok", []string{"4111 1111 1111 1112"}},
		{"code", "the code is 845210, ok", []string{"845210"}},
		{"email and password", "mail me at kit@example.com, pw hunter2x!", []string{"kit@example.com", "hunter2x"}},
		{"comma ends a number run", "rooms 12, 14 and 16", nil},
		{"nothing", "see you at the bakery", nil},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			var got []string
			for _, s := range secretSpans(c.text, nil) {
				got = append(got, c.text[s[0]:s[1]])
			}
			if strings.Join(got, "|") != strings.Join(c.secrets, "|") {
				t.Errorf("secretSpans(%q) = %q, want %q", c.text, got, c.secrets)
			}
		})
	}
}

func FuzzSecretSpans(f *testing.F) {
	f.Add("my card is 4111 1111 1111 1111 thanks")
	f.Add("kit@example.com hunter2x 2nd")
	f.Add("\xff@\xfe.")
	f.Fuzz(func(t *testing.T, text string) {
		prev := 0
		for _, s := range secretSpans(text, nil) {
			if s[0] < prev || s[1] <= s[0] || s[1] > len(text) {
				t.Fatalf("secretSpans(%q): bad span %v after %d", text, s, prev)
			}
			prev = s[1]
		}
	})
}
