package corpora_test

import (
	"fmt"

	"github.com/keyloom/keyloom/corpora"
)

// ExampleDemo lists the files of the demo corpus in the order DemoText joins
// them.
func ExampleDemo() {
	for _, d := range corpora.Demo() {
		fmt.Println(d.Name)
	}
	// Output:
	// emails.txt
	// lists.txt
	// messages.txt
	// notes.txt
}
