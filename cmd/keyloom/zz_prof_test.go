package main

import (
	"context"
	"io"
	"os"
	"testing"
	"time"
)

func TestZZProf(t *testing.T) {
	raw, err := os.ReadFile("/tmp/syn10m.klm")
	if err != nil {
		t.Skip()
	}
	e := &env{stdout: io.Discard, stderr: io.Discard}
	st := time.Now()
	s, err := newPruneSearch(context.Background(), e, raw)
	if err != nil {
		t.Fatal(err)
	}
	t.Logf("load+score %v", time.Since(st))
	s.minBits, s.maxBits, s.minVocab = 4, 8, 1000
	st = time.Now()
	rep, err := s.fit(10_000_000)
	t.Logf("fit %v trials %d %v", time.Since(st), rep.Trials, err)
}
