package trie

import (
	"bytes"
	"testing"

	"github.com/blevesearch/vellum"
)

func TestExpSizes(t *testing.T) {
	c := loadCorpus(t, subtlexPath)
	for _, reg := range []int{10000, 100000, 1000000} {
		for _, zero := range []bool{false, true} {
			var buf bytes.Buffer
			bld, _ := vellum.New(&buf, &vellum.BuilderOpts{Encoder: 1, RegistryTableSize: reg, RegistryMRUSize: 2})
			for i, w := range c.words {
				v := uint64(i)
				if zero {
					v = 0
				}
				bld.Insert([]byte(w), v)
			}
			bld.Close()
			t.Logf("reg %d zero %v: %d bytes %.2f B/word", reg, zero, buf.Len(), float64(buf.Len())/float64(len(c.words)))
		}
	}
}
