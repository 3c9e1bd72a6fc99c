// Command errtrain regenerates the corrector's built-in spelling-error
// model (correct/errmodel.tsv) from a misspelling list. It is run by
// `go generate` in package correct:
//
//	go run ./internal/errtrain -in ../corpora/misspellings-dev.tsv -out errmodel.tsv
package main

import (
	"bytes"
	"flag"
	"fmt"
	"os"

	"github.com/keyloom/keyloom/correct"
)

func main() {
	in := flag.String("in", "", "misspelling list (TYPED<TAB>WORD[,WORD...])")
	out := flag.String("out", "errmodel.tsv", "table to write")
	flag.Parse()
	if err := run(*in, *out); err != nil {
		fmt.Fprintln(os.Stderr, "errtrain:", err)
		os.Exit(1)
	}
}

func run(in, out string) error {
	f, err := os.Open(in)
	if err != nil {
		return err
	}
	defer f.Close()
	pairs, err := correct.ParsePairs(f)
	if err != nil {
		return err
	}
	m := correct.TrainErrorModel(pairs, correct.TrainOptions{})
	var b bytes.Buffer
	if _, err := m.WriteTo(&b); err != nil {
		return err
	}
	return os.WriteFile(out, b.Bytes(), 0o644)
}
