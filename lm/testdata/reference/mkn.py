#!/usr/bin/env python3
"""Reference interpolated modified Kneser-Ney n-gram model (Python stdlib only).

Usage: mkn.py ORDER TRAIN TEST > result.json

TRAIN and TEST hold one pre-tokenized sentence per line, tokens separated by
spaces. The script prints one JSON object (keys are described in README.md).

This is a deliberately plain, unoptimised implementation written to check the
Go package lm against. Method: Chen & Goodman 1998, "An Empirical Study of
Smoothing Techniques for Language Modeling", TR-10-98, Harvard; modified
Kneser-Ney with three discounts (§3.4, in its interpolated form). The
formulas below were transcribed from the project's issue and agree with the
paper as remembered by the author (from memory, not re-checked against a copy).

Convention (the project's, quoted in README.md):

  * Vocabulary V = training word types + "</s>" + "<unk>". "<s>" is only ever
    context; it is never predicted and is not in V.
  * Each training sentence t1..tm becomes  <s> t1 ... tm </s>  and every
    n-gram of orders 1..N inside it is counted (no further padding).
  * Order N uses the raw counts c(u). A lower order k < N uses the
    continuation count N1+(. u) = number of distinct words v with c(v u) > 0,
    except that an n-gram starting with "<s>" keeps its raw count (nothing can
    stand to its left). Call the count used at an order a(u).
  * Discounts per order, from the count-of-counts n_i = #{u : a(u) = i} of
    that order's counts a:
        Y   = n1 / (n1 + 2 n2)
        D1  = 1 - 2 Y n2 / n1
        D2  = 2 - 3 Y n3 / n2
        D3+ = 3 - 4 Y n4 / n3
    D(0) = 0, D(1) = D1, D(2) = D2, D(c >= 3) = D3+.
  * For a context h at order k (len(h) = k - 1), with h' = h minus its first
    word:
        S(h)      = sum_w a(h w)
        gamma(h)  = (D1 N1(h .) + D2 N2(h .) + D3+ N3+(h .)) / S(h)
        p_k(w|h)  = max(a(h w) - D(a(h w)), 0) / S(h) + gamma(h) p_{k-1}(w|h')
    where N1(h .) = #{w : a(h w) = 1}, N2(h .) = #{w : a(h w) = 2},
    N3+(h .) = #{w : a(h w) >= 3}. If S(h) = 0 (unseen context) the context
    backs off fully: p_k(w|h) = p_{k-1}(w|h'). The unigram level (empty h)
    interpolates with the uniform distribution p_0(w) = 1/|V|; at that level
    "<s>" is left out of the counts and "<unk>" has count 0.
  * Scoring a test sentence: each word and the closing "</s>" is an event.
    The context of an event is "<s>" followed by the words before it, cut to
    its last N-1 items; a context of length L < N-1 (near the sentence start)
    is scored with the order L+1 model. A word not in V is scored as "<unk>"
    and so is an out-of-vocabulary word inside a context ("<unk>" is never
    seen in training, so such a context backs off past it).
  * perplexity = exp(-(1/E) sum ln p) over the E events whose word is in V;
    perplexity_with_oov also includes the OOV events, scored as "<unk>".
"""
import json
import math
import sys

BOS = "<s>"
EOS = "</s>"
UNK = "<unk>"


def read_sentences(path):
    """Return the list of token lists, one per non-empty line of path."""
    out = []
    with open(path, encoding="utf-8") as f:
        for line in f:
            tokens = line.split()
            if tokens:
                out.append(tokens)
    return out


class Model:
    """Interpolated modified Kneser-Ney model of order N built from sentences."""

    def __init__(self, order, sentences):
        self.N = order

        # Vocabulary: training word types + </s> + <unk>.
        self.vocab = set()
        for s in sentences:
            self.vocab.update(s)
        self.vocab.add(EOS)
        self.vocab.add(UNK)

        # raw[k][u] = number of times the k-gram u (a tuple) occurs inside
        # the padded training sentences <s> t1 ... tm </s>.
        self.raw = {k: {} for k in range(1, order + 1)}
        for s in sentences:
            padded = [BOS] + s + [EOS]
            for k in range(1, order + 1):
                for i in range(len(padded) - k + 1):
                    u = tuple(padded[i:i + k])
                    self.raw[k][u] = self.raw[k].get(u, 0) + 1

        # a[k][u] = the count used at order k (see module docstring).
        self.a = {}
        self.a[order] = dict(self.raw[order])
        for k in range(order - 1, 0, -1):
            # Continuation counts N1+(. u): one for each distinct (k+1)-gram
            # v u seen in training.
            left = {}
            for vu in self.raw[k + 1]:
                u = vu[1:]
                left[u] = left.get(u, 0) + 1
            self.a[k] = {}
            for u, c in self.raw[k].items():
                if u[0] == BOS:
                    self.a[k][u] = c  # nothing can precede <s>: raw count
                else:
                    self.a[k][u] = left[u]
        # At the unigram level <s> is never predicted: drop it.
        self.a[1].pop((BOS,), None)
        # (<unk> is simply absent from a[1], i.e. has count 0.)

        # Count-of-counts and discounts per order.
        self.count_of_counts = {}
        self.discounts = {}
        for k in range(1, order + 1):
            n = [0, 0, 0, 0, 0]  # n[1..4]
            for c in self.a[k].values():
                if 1 <= c <= 4:
                    n[c] += 1
            self.count_of_counts[k] = n[1:]
            if n[1] == 0 or n[2] == 0 or n[3] == 0:
                raise ValueError(f"order {k}: count-of-counts {n[1:]} has a zero among n1..n3, "
                                 "discounts are undefined")
            y = n[1] / (n[1] + 2 * n[2])
            d1 = 1 - 2 * y * n[2] / n[1]
            d2 = 2 - 3 * y * n[3] / n[2]
            d3 = 3 - 4 * y * n[4] / n[3]
            self.discounts[k] = (d1, d2, d3)

        # Per-context sums at each order: S(h), N1(h.), N2(h.), N3+(h.).
        self.ctx = {k: {} for k in range(1, order + 1)}
        for k in range(1, order + 1):
            for u, c in self.a[k].items():
                h = u[:-1]
                st = self.ctx[k].setdefault(h, [0, 0, 0, 0])
                st[0] += c
                if c == 1:
                    st[1] += 1
                elif c == 2:
                    st[2] += 1
                else:
                    st[3] += 1

    def discount(self, k, c):
        """D(c) at order k."""
        if c == 0:
            return 0.0
        d1, d2, d3 = self.discounts[k]
        if c == 1:
            return d1
        if c == 2:
            return d2
        return d3

    def prob(self, k, h, w):
        """p_k(w | h) with len(h) == k - 1, by the recursion in the docstring."""
        if k == 0:
            return 1.0 / len(self.vocab)  # uniform base distribution
        assert len(h) == k - 1
        lower = self.prob(k - 1, h[1:], w)
        st = self.ctx[k].get(h)
        if st is None or st[0] == 0:
            return lower  # unseen context: back off fully
        s, n1, n2, n3 = st
        d1, d2, d3 = self.discounts[k]
        gamma = (d1 * n1 + d2 * n2 + d3 * n3) / s
        c = self.a[k].get(h + (w,), 0)
        return max(c - self.discount(k, c), 0.0) / s + gamma * lower

    def map_word(self, w):
        """Return w if it is in the vocabulary, <unk> otherwise."""
        return w if w in self.vocab else UNK

    def score(self, context, w):
        """Return (ln p, order used) for word w after the given context.

        context is a list of items starting with <s> (the words before w in
        its sentence); it is cut to the last N-1 items and every item that is
        not <s> and not in V is replaced by <unk>, as is w itself.
        """
        h = tuple(x if x == BOS else self.map_word(x) for x in context[-(self.N - 1):]) \
            if self.N > 1 else ()
        k = len(h) + 1
        return math.log(self.prob(k, h, self.map_word(w))), k


def events(sentences, order):
    """Yield (sentence index, position, context list, word) for every event."""
    for si, s in enumerate(sentences):
        items = [BOS] + s
        for i, w in enumerate(s + [EOS]):
            ctx = items[:i + 1][-(order - 1):] if order > 1 else []
            yield si, i, ctx, w


def choose_sum_check_contexts(m):
    """Pick 20 distinct contexts deterministically, seen and unseen, of every length.

    Length 0 is the empty context (unigram level). The other 19 are shared
    out between the lengths 1..N-1. For each length a few unseen contexts
    come first (an OOV first item, then known words in an order never seen
    in training); the rest are seen contexts: the most frequent one, the most
    frequent one starting with <s>, then contexts spread evenly through the
    sorted list of seen contexts.
    """
    chosen = [()]
    lengths = list(range(1, m.N))
    if not lengths:
        return chosen
    budget = {L: 19 // len(lengths) for L in lengths}
    for L in lengths[len(lengths) - 19 % len(lengths):]:
        budget[L] += 1
    words = sorted(m.vocab - {UNK, EOS})
    for L in lengths:
        k = L + 1
        seen = sorted(h for h, st in m.ctx[k].items() if st[0] > 0)
        want_unseen = max(2, budget[L] // 3)
        unseen = [(UNK,) + seen[len(seen) // 2][1:]]
        for base in seen[::max(1, len(seen) // 7)]:
            if len(unseen) >= want_unseen:
                break
            for w in words:
                h = base[:-1] + (w,)
                if h not in m.ctx[k] and h not in unseen:
                    unseen.append(h)
                    break
        unseen = unseen[:want_unseen]
        candidates = [max(seen, key=lambda h: (m.ctx[k][h][0], h))]
        bos = [h for h in seen if h[0] == BOS]
        if bos:
            candidates.append(max(bos, key=lambda h: (m.ctx[k][h][0], h)))
        stride = max(1, len(seen) // budget[L])
        candidates += seen[::stride] + seen
        picks = []
        for h in candidates:
            if len(picks) + len(unseen) >= budget[L]:
                break
            if h not in picks:
                picks.append(h)
        chosen.extend(picks + unseen)
    return chosen


def sum_check(m):
    """Return [{context, order, sum}] with sum = sum over V of p(w | context)."""
    vocab = sorted(m.vocab)
    out = []
    for h in choose_sum_check_contexts(m):
        k = len(h) + 1
        total = math.fsum(m.prob(k, h, w) for w in vocab)
        st = m.ctx[k].get(h)
        out.append({"context": list(h), "order": k,
                    "seen": st is not None and st[0] > 0, "sum": total})
    return out


def pick_samples(m, test, count=30):
    """Pick count test events deterministically, spread over five kinds."""
    kinds = {"first-word": [], "end": [], "oov-word": [], "oov-context": [], "inner": []}
    for si, i, ctx, w in events(test, m.N):
        if w not in m.vocab:
            kind = "oov-word"
        elif w == EOS:
            kind = "end"
        elif i == 0:
            kind = "first-word"
        elif any(x != BOS and x not in m.vocab for x in ctx):
            kind = "oov-context"
        else:
            kind = "inner"
        kinds[kind].append((si, i, ctx, w))
    picked = []
    per_kind = count // len(kinds)
    for name, evs in kinds.items():
        take = min(per_kind, len(evs))
        for j in range(take):
            picked.append((name, evs[(j * len(evs)) // take]))
    # Fill up from the remaining events of every kind, in test order.
    for name, evs in kinds.items():
        for ev in evs:
            if len(picked) >= count:
                break
            if all(ev is not p[1] for p in picked):
                picked.append((name, ev))
    picked.sort(key=lambda p: (p[1][0], p[1][1]))
    out = []
    for name, (si, i, ctx, w) in picked[:count]:
        lnp, k = m.score(ctx, w)
        out.append({"sentence": si, "position": i, "kind": name,
                    "context": ctx, "word": w, "order_used": k, "ln_p": lnp})
    return out


def main(argv):
    if len(argv) != 4:
        sys.exit("usage: mkn.py ORDER TRAIN TEST")
    order = int(argv[1])
    if order < 1:
        sys.exit("mkn.py: ORDER must be at least 1")
    train = read_sentences(argv[2])
    test = read_sentences(argv[3])
    m = Model(order, train)

    # Perplexity over the test events.
    sum_in, n_in, sum_all, n_all, oov = 0.0, 0, 0.0, 0, 0
    for _, _, ctx, w in events(test, order):
        lnp, _ = m.score(ctx, w)
        n_all += 1
        sum_all += lnp
        if w in m.vocab:
            n_in += 1
            sum_in += lnp
        else:
            oov += 1

    checks = sum_check(m)
    for c in checks:
        if abs(c["sum"] - 1.0) > 1e-9:
            raise AssertionError(f"sum check failed: {c}")

    result = {
        "order": order,
        "train_sentences": len(train),
        "test_sentences": len(test),
        "vocab_size": len(m.vocab),
        "ngrams": [len(m.raw[k]) for k in range(1, order + 1)],
        "count_of_counts": [m.count_of_counts[k] for k in range(1, order + 1)],
        "discounts": [list(m.discounts[k]) for k in range(1, order + 1)],
        "tokens": n_all,
        "oov": oov,
        "scored_events": n_in,
        "perplexity": math.exp(-sum_in / n_in),
        "perplexity_with_oov": math.exp(-sum_all / n_all),
        "sum_check": checks,
        "samples": pick_samples(m, test),
    }
    json.dump(result, sys.stdout, indent=1, ensure_ascii=False)
    sys.stdout.write("\n")


if __name__ == "__main__":
    main(sys.argv)
