package correct

import (
	"math/rand/v2"
	"testing"
)

// TestClassPosMatchesLoop checks classPos.of against its definition, the
// union of the typed positions of each class in the set taken one class at
// a time (the loop the bounds used before the table), for typed words
// covering every class of belowBit (letters, apostrophe, hyphen, other
// bytes) and sets drawn at random, including bits above the 29 classes.
func TestClassPosMatchesLoop(t *testing.T) {
	tests := []struct {
		name, typed string
	}{
		{"eight letters", "recieved"},
		{"all classes", "abcdefghijklmnopqrstuvwxyz'-é1"},
		{"one class", "aaaa"},
		{"last classes", "yz'-yz'-\x01"},
		{"long", "pneumonoultramicroscopicsilicovolcanoconiosis"},
	}
	rng := rand.New(rand.NewPCG(13, 4))
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			var pos [29]uint64
			for k := 0; k < len(tc.typed); k++ {
				pos[bitIndex(belowBit(tc.typed[k]))] |= 1 << k
			}
			var p classPos
			p.fill(&pos)
			sets := []uint32{0, belowAll, ^uint32(0), 1, 1 << 28, 1 << 25}
			for range 2000 {
				sets = append(sets, rng.Uint32())
			}
			for _, set := range sets {
				var want uint64
				for b := range pos {
					if set&(1<<b) != 0 {
						want |= pos[b]
					}
				}
				if got := p.of(set); got != want {
					t.Fatalf("of(%#x) = %#x, want %#x", set, got, want)
				}
			}
		})
	}
}
