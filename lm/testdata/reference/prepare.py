#!/usr/bin/env python3
"""Split a plain-text book into tokenized training and test sentence files.

Usage: prepare.py SOURCE.txt TRAIN_OUT TEST_OUT

Procedure (see README.md in this directory):
  1. Read the file as UTF-8 and drop blank lines (lines that are empty or only
     whitespace). Nothing else is skipped; the remaining lines are joined with
     "\n", so a sentence may run across line and paragraph breaks.
  2. Lower-case the whole text (Python str.lower).
  3. Split into sentences after every '.', '!' or '?' that is followed by
     whitespace or by the end of the text (the mark itself is dropped).
  4. Tokenize each sentence with the regular expression
         [a-z0-9]+(?:['’-][a-z0-9]+)*
     keeping only the matches, in order. Sentences with no token are dropped.
  5. Number the remaining sentences from 0. Sentence i goes to the test file
     when i % 10 == 9 and to the training file otherwise.
  6. Write one sentence per line, tokens separated by a single space, with a
     final newline after each line.
"""
import re
import sys

SENTENCE_END = re.compile(r"[.!?](?=\s|$)")
TOKEN = re.compile(r"[a-z0-9]+(?:['’-][a-z0-9]+)*")


def sentences(text):
    """Yield the token lists of the non-empty sentences of text."""
    lines = [line for line in text.split("\n") if line.strip() != ""]
    joined = "\n".join(lines).lower()
    for chunk in SENTENCE_END.split(joined):
        tokens = TOKEN.findall(chunk)
        if tokens:
            yield tokens


def main(argv):
    if len(argv) != 4:
        sys.exit("usage: prepare.py SOURCE.txt TRAIN_OUT TEST_OUT")
    with open(argv[1], encoding="utf-8") as f:
        text = f.read()
    train, test = [], []
    for i, tokens in enumerate(sentences(text)):
        (test if i % 10 == 9 else train).append(" ".join(tokens))
    for path, lines in ((argv[2], train), (argv[3], test)):
        with open(path, "w", encoding="utf-8", newline="\n") as f:
            for line in lines:
                f.write(line + "\n")
    print(f"{len(train)} training and {len(test)} test sentences", file=sys.stderr)


if __name__ == "__main__":
    main(sys.argv)
