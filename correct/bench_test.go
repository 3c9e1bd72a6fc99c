package correct

import (
	"testing"
)

func BenchmarkCorrectDev(b *testing.B) {
	c, _, _ := devCorrector(b, Options{})
	words := []string{"definately", "acommodate", "recieved", "becuase", "seperate"}
	var buf []Candidate
	var visited, hits int
	for b.Loop() {
		for _, w := range words {
			buf, _ = c.Correct(w, nil, 3, buf)
		}
	}
	sc := c.pool.Get().(*scratch)
	visited, hits = sc.s.visited, len(sc.s.hits)
	b.ReportMetric(float64(visited), "visited")
	b.ReportMetric(float64(hits), "hits")
}
