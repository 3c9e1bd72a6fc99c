// Package corpora hands out the project's own data, compiled into the binary
// with go:embed: an invented demo corpus for personalisation tests and three
// public word lists for building and measuring lexicons, language models and
// correctors.
//
//	for _, d := range corpora.Demo() {
//		fmt.Println(d.Name, len(strings.Fields(d.Text)))
//	}
//	counts := bufio.NewScanner(corpora.WordCounts())
//	for counts.Scan() {
//		line := counts.Text()
//		if strings.HasPrefix(line, "#") {
//			continue
//		}
//		word, count, _ := strings.Cut(line, "\t")
//		// ...
//	}
//
// # The demo corpus
//
// [Demo] returns the files of demo/ (about 25,000 words in four files),
// sorted by name, and [DemoText] returns them joined into one text. The
// corpus is the typing of one invented person over fifteen months, so it has
// the recurring names, places and pet phrases that a per-user model should
// learn. In each file one message, e-mail, list or note is one paragraph, and
// paragraphs are separated by one blank line. Everything in it is made up
// and it is licensed like the project.
//
// # Line formats of the word lists
//
// The readers return the files' bytes unchanged; parsing is left to the
// caller. All three are UTF-8 with "\n" line ends.
//
//   - [WordCounts]: SUBTLEX-US (Brysbaert & New 2009). One comment line that
//     starts with '#', then 74,286 lines "word\tcount", count a positive
//     decimal integer, sorted by count from highest to lowest.
//   - [WordList]: SCOWL, large American English size (Debian
//     wamerican-large). 170,421 lines, one word per line, no comments; it
//     includes proper nouns, possessives and some non-ASCII words.
//   - [Misspellings]: the development half of the English Wikipedia list of
//     common misspellings. One comment line that starts with '#', then 2,173
//     lines "misspelling\tcorrections", where several corrections are
//     separated by commas and a correction may be two words.
//
// Provenance and licences are in README.md beside this file; the SCOWL
// licence notice is scowl-COPYRIGHT.txt.
//
// # Concurrency and cost
//
// All data is read-only and every function may be called from any number of
// goroutines. Each call returns new values: a new reader, or new strings, so
// callers may consume or change them freely. Importing the package adds about
// 2.7 MB of data to a binary, so library code should import it only from
// tests, examples and tools.
package corpora
