/*
 * klm_test.c — checks the C interface of libkeyloom against keyloom.h.
 *
 * usage: klm_test MODEL INPUTS EXPECTED EXPECTED_CORRECT TMPDIR
 *   MODEL             a model file (testdata/models/demo-v1.klm)
 *   INPUTS            the shared input table (testdata/routes/inputs.txt): one JSON string per line
 *   EXPECTED          the Go facade's Suggest answer per input line, as JSON (written by the Go test)
 *   EXPECTED_CORRECT  the Go facade's Correct answer per input line, as JSON (written by the Go test)
 *   TMPDIR            a writable directory for overlay files
 *
 * Prints one line per failed check and "klm_test: N checks, M failed"; exits 1 on any failure.
 */
#include <pthread.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <time.h>

#include "keyloom.h"

static int checks, failures;

#define CHECK(cond, ...)                                                   \
	do {                                                                   \
		checks++;                                                          \
		if (!(cond)) {                                                     \
			failures++;                                                    \
			fprintf(stderr, "FAIL %s:%d: %s: ", __FILE__, __LINE__, #cond); \
			fprintf(stderr, __VA_ARGS__);                                  \
			fputc('\n', stderr);                                           \
		}                                                                  \
	} while (0)

enum { MAX_LINES = 256, MAX_LINE = 4096 };

/* read_file returns the whole file in a malloc'd, NUL-terminated buffer. */
static char *read_file(const char *path, size_t *len) {
	FILE *f = fopen(path, "rb");
	if (!f) return NULL;
	size_t cap = 1 << 16, n = 0;
	char *b = malloc(cap);
	for (;;) {
		if (n + 1 >= cap) b = realloc(b, cap *= 2);
		size_t r = fread(b + n, 1, cap - n - 1, f);
		if (r == 0) break;
		n += r;
	}
	fclose(f);
	b[n] = 0;
	if (len) *len = n;
	return b;
}

/* split_lines splits s in place at '\n' and returns the number of lines. */
static int split_lines(char *s, char **lines, int max) {
	int n = 0;
	while (*s && n < max) {
		lines[n++] = s;
		char *nl = strchr(s, '\n');
		if (!nl) break;
		*nl = 0;
		s = nl + 1;
	}
	return n;
}

static int hex4(const char *p, unsigned *v) {
	*v = 0;
	for (int i = 0; i < 4; i++) {
		char c = p[i];
		*v <<= 4;
		if (c >= '0' && c <= '9') *v |= c - '0';
		else if (c >= 'a' && c <= 'f') *v |= c - 'a' + 10;
		else if (c >= 'A' && c <= 'F') *v |= c - 'A' + 10;
		else return 0;
	}
	return 1;
}

static char *put_utf8(char *o, unsigned cp) {
	if (cp < 0x80) *o++ = (char)cp;
	else if (cp < 0x800) { *o++ = (char)(0xC0 | cp >> 6); *o++ = (char)(0x80 | (cp & 0x3F)); }
	else if (cp < 0x10000) {
		*o++ = (char)(0xE0 | cp >> 12); *o++ = (char)(0x80 | ((cp >> 6) & 0x3F)); *o++ = (char)(0x80 | (cp & 0x3F));
	} else {
		*o++ = (char)(0xF0 | cp >> 18); *o++ = (char)(0x80 | ((cp >> 12) & 0x3F));
		*o++ = (char)(0x80 | ((cp >> 6) & 0x3F)); *o++ = (char)(0x80 | (cp & 0x3F));
	}
	return o;
}

/* json_string decodes one JSON string literal (RFC 8259 section 7) into out,
 * which must hold strlen(in) bytes. It returns 0 on malformed input. */
static int json_string(const char *in, char *out) {
	const char *p = in;
	while (*p == ' ' || *p == '\t' || *p == '\r') p++;
	if (*p++ != '"') return 0;
	char *o = out;
	for (;;) {
		char c = *p++;
		if (c == 0) return 0;
		if (c == '"') break;
		if (c != '\\') { *o++ = c; continue; }
		c = *p++;
		switch (c) {
		case '"': case '\\': case '/': *o++ = c; break;
		case 'b': *o++ = '\b'; break;
		case 'f': *o++ = '\f'; break;
		case 'n': *o++ = '\n'; break;
		case 'r': *o++ = '\r'; break;
		case 't': *o++ = '\t'; break;
		case 'u': {
			unsigned cp, lo;
			if (!hex4(p, &cp)) return 0;
			p += 4;
			if (cp >= 0xD800 && cp < 0xDC00 && p[0] == '\\' && p[1] == 'u' && hex4(p + 2, &lo) && lo >= 0xDC00 && lo < 0xE000) {
				cp = 0x10000 + ((cp - 0xD800) << 10) + (lo - 0xDC00);
				p += 6;
			}
			o = put_utf8(o, cp);
			break;
		}
		default: return 0;
		}
	}
	*o = 0;
	return 1;
}

/* suggest returns the answer for before in a malloc'd string, growing the
 * buffer as the size convention of keyloom.h says. NULL on error. */
static char *suggest(klm_handle h, const char *before) {
	size_t cap = 64;
	char *buf = malloc(cap);
	for (;;) {
		int64_t n = klm_suggest(h, before, buf, cap);
		if (n < 0) { free(buf); return NULL; }
		if ((size_t)n < cap) return buf;
		cap = (size_t)n + 1;
		buf = realloc(buf, cap);
	}
}

/* correct returns klm_correct's answer in a malloc'd string, NULL on error. */
static char *correct(klm_handle h, const char *before) {
	int64_t n = klm_correct(h, before, NULL, 0);
	if (n < 0) return NULL;
	char *buf = malloc((size_t)n + 1);
	if (klm_correct(h, before, buf, (size_t)n + 1) != n) { free(buf); return NULL; }
	return buf;
}

/* completes reports whether the completions for before include word. */
static int completes(klm_handle h, const char *before, const char *word) {
	char *js = suggest(h, before);
	if (!js) return 0;
	char want[256];
	snprintf(want, sizeof want, "{\"word\":\"%s\"", word);
	char *c = strstr(js, "\"completions\":");
	char *p = strstr(js, "\"predictions\":");
	char *w = c ? strstr(c, want) : NULL;
	int ok = w && (!p || p < c || w < p);
	free(js);
	return ok;
}

static void last_error(klm_handle h, char *buf, size_t cap) {
	if (klm_last_error(h, buf, cap) < 0) snprintf(buf, cap, "(no handle)");
}

struct table {
	int n;
	char *input[MAX_LINES];
	char *want[MAX_LINES];
};

struct worker {
	klm_handle h;
	const struct table *t;
	int rounds, mismatches, errors;
};

static void *work(void *arg) {
	struct worker *w = arg;
	for (int r = 0; r < w->rounds; r++) {
		for (int i = 0; i < w->t->n; i++) {
			char *got = suggest(w->h, w->t->input[i]);
			if (!got) { w->errors++; continue; }
			if (strcmp(got, w->t->want[i]) != 0) w->mismatches++;
			free(got);
		}
	}
	return NULL;
}

struct closer {
	klm_handle h;
	int ok, closed, other;
};

/* hammer calls klm_suggest until the handle is closed under it. */
static void *hammer(void *arg) {
	struct closer *c = arg;
	char buf[4096];
	for (int i = 0; i < 100000; i++) {
		int64_t n = klm_suggest(c->h, "see you at the ", buf, sizeof buf);
		if (n == KLM_ERR_HANDLE) { c->closed++; break; }
		if (n > 0 && (size_t)n < sizeof buf) c->ok++;
		else c->other++;
	}
	return NULL;
}

int main(int argc, char **argv) {
	if (argc != 6) {
		fprintf(stderr, "usage: klm_test MODEL INPUTS EXPECTED EXPECTED_CORRECT TMPDIR\n");
		return 2;
	}
	const char *model = argv[1], *inputs = argv[2], *expected = argv[3], *expcorr = argv[4], *tmp = argv[5];
	char errbuf[512], path[1024], msg[512];

	CHECK(klm_abi_version() == KLM_ABI_VERSION, "abi %d", (int)klm_abi_version());

	/* Opening: error paths. */
	snprintf(path, sizeof path, "%s/no-such-model.klm", tmp);
	klm_handle bad = klm_open(path, 0, 0, errbuf, sizeof errbuf);
	CHECK(bad == 0, "opened a missing file");
	CHECK(errbuf[0] != 0, "no message for a missing file");
	bad = klm_open(NULL, 0, 0, errbuf, sizeof errbuf);
	CHECK(bad == 0 && errbuf[0] != 0, "NULL path: handle %lu", (unsigned long)bad);
	bad = klm_open(path, 0, 0, NULL, 0); /* no error buffer: must not crash */
	CHECK(bad == 0, "opened a missing file without errbuf");
	bad = klm_open(model, -1, 0, errbuf, sizeof errbuf);
	CHECK(bad == 0 && errbuf[0] != 0, "negative suggestion count accepted");
	bad = klm_open(model, 33, 0, errbuf, sizeof errbuf);
	CHECK(bad == 0 && errbuf[0] != 0, "33 suggestions accepted (keyloom.h: at most 32)");
	bad = klm_open_bytes(NULL, 5, 0, 0, errbuf, sizeof errbuf);
	CHECK(bad == 0 && errbuf[0] != 0, "NULL model bytes accepted");
	const char junk[] = "this is not a model file, just some words in a row";
	bad = klm_open_bytes(junk, sizeof junk, 0, 0, errbuf, sizeof errbuf);
	CHECK(bad == 0 && errbuf[0] != 0, "opened junk bytes");
	char tiny[4];
	bad = klm_open(path, 0, 0, tiny, sizeof tiny);
	CHECK(bad == 0 && tiny[0] == 0, "too small errbuf must hold an empty string, got %.3s", tiny);

	/* Opening for real. */
	klm_handle h = klm_open(model, 0, KLM_VERIFY_CHECKSUMS, errbuf, sizeof errbuf);
	CHECK(h != 0, "klm_open(%s): %s", model, errbuf);
	if (h == 0) goto done;
	CHECK(errbuf[0] == 0, "errbuf not cleared on success: %s", errbuf);

	/* Predictions after a space are non-empty. */
	char *js = suggest(h, "see you at the ");
	CHECK(js != NULL, "suggest failed");
	if (js) {
		CHECK(strstr(js, "\"predictions\":[{\"word\":\"") != NULL, "no predictions: %s", js);
		CHECK(strstr(js, "\"prefix\":\"\"") != NULL, "prefix not empty: %s", js);

		/* The size convention (C99 7.21.6.5 snprintf semantics, as keyloom.h documents). */
		size_t full = strlen(js);
		CHECK(klm_suggest(h, "see you at the ", NULL, 0) == (int64_t)full, "size query");
		char small[8];
		memset(small, 'x', sizeof small);
		int64_t n = klm_suggest(h, "see you at the ", small, sizeof small);
		CHECK(n == (int64_t)full, "too small buffer: got %lld, want %zu", (long long)n, full);
		CHECK(small[0] == 0, "too small buffer not emptied");
		char *exact = malloc(full + 1);
		n = klm_suggest(h, "see you at the ", exact, full); /* no room for the NUL */
		CHECK(n == (int64_t)full && exact[0] == 0, "cap == n must report too small");
		n = klm_suggest(h, "see you at the ", exact, full + 1);
		CHECK(n == (int64_t)full && strcmp(exact, js) == 0, "cap == n+1 must succeed");
		free(exact);
		free(js);
	}

	/* Completions while a word is typed. */
	js = suggest(h, "see you at the o");
	CHECK(js && strstr(js, "\"prefix\":\"o\"") && strstr(js, "\"completions\":[{\"word\":\"o"), "completions of o: %s", js ? js : "(null)");
	free(js);

	/* Correction of a finished word. "agian" -> "again" is a pair of the
	 * Wikipedia list of common misspellings (corpora/misspellings-dev.tsv);
	 * "the" is correctly spelled and must be left alone (null). */
	js = correct(h, "we can meet agian ");
	CHECK(js && strstr(js, "\"typed\":\"agian\"") && strstr(js, "\"replacement\":\"again\""), "correct agian: %s", js ? js : "(error)");
	free(js);
	js = correct(h, "see you at the ");
	CHECK(js && strcmp(js, "null") == 0, "correct of a correct word: %s", js ? js : "(error)");
	free(js);
	CHECK(klm_correct(h, NULL, errbuf, sizeof errbuf) == KLM_ERR_ARG, "NULL correct text");
	CHECK(klm_correct(0, "agian ", errbuf, sizeof errbuf) == KLM_ERR_HANDLE, "handle 0 correct");
	{
		char small[4] = "xyz";
		int64_t need = klm_correct(h, "we can meet agian ", small, sizeof small);
		CHECK(need >= (int64_t)sizeof small && small[0] == 0, "correct into a small buffer: %lld", (long long)need);
	}

	/* Info. */
	char infobuf[1024];
	int64_t n = klm_info(h, infobuf, sizeof infobuf);
	CHECK(n > 0 && (size_t)n < sizeof infobuf && strstr(infobuf, "\"order\":3"), "info: %s", infobuf);

	/* Bad arguments on a good handle. */
	CHECK(klm_suggest(h, NULL, errbuf, sizeof errbuf) == KLM_ERR_ARG, "NULL text");
	last_error(h, msg, sizeof msg);
	CHECK(msg[0] != 0, "no last error after NULL text");
	CHECK(klm_learn(h, NULL) == KLM_ERR_ARG, "NULL learn text");
	CHECK(klm_save_overlay(h, NULL) == KLM_ERR_ARG, "NULL save path");
	CHECK(klm_load_overlay_bytes(h, NULL, 5) == KLM_ERR_ARG, "NULL overlay bytes");

	/* NULL (0) and forged handles. */
	CHECK(klm_suggest(0, "hi", errbuf, sizeof errbuf) == KLM_ERR_HANDLE, "handle 0 suggest");
	CHECK(klm_learn(0, "hi") == KLM_ERR_HANDLE, "handle 0 learn");
	CHECK(klm_info(0, infobuf, sizeof infobuf) == KLM_ERR_HANDLE, "handle 0 info");
	CHECK(klm_last_error(0, msg, sizeof msg) == KLM_ERR_HANDLE, "handle 0 last error");
	CHECK(klm_close(0) == KLM_ERR_HANDLE, "handle 0 close");
	CHECK(klm_suggest(h + 7919, "hi", errbuf, sizeof errbuf) == KLM_ERR_HANDLE, "forged handle");

	/* Learning an invented word: unseen before, completed after. */
	const char *word = "quorvex";
	CHECK(!completes(h, "meet at the quorv", word), "%s completed before learning", word);
	for (int i = 0; i < 3; i++)
		CHECK(klm_learn(h, "we meet at the quorvex on Friday") == KLM_OK, "learn");
	CHECK(completes(h, "meet at the quorv", word), "%s not completed after learning", word);

	/* Learning off: nothing is learned. */
	CHECK(klm_set_learning(h, 0) == KLM_OK, "learning off");
	for (int i = 0; i < 3; i++) klm_learn(h, "the plimbrous lamp");
	CHECK(!completes(h, "the plimbr", "plimbrous"), "learned while learning was off");
	CHECK(klm_set_learning(h, 1) == KLM_OK, "learning on");

	/* Overlay to a file and back into a fresh engine. */
	char ovl[1024];
	snprintf(ovl, sizeof ovl, "%s/user.overlay", tmp);
	CHECK(klm_save_overlay(h, ovl) == KLM_OK, "save overlay");
	klm_handle h2 = klm_open(model, 0, 0, errbuf, sizeof errbuf);
	CHECK(h2 != 0 && h2 != h, "second open");
	CHECK(!completes(h2, "meet at the quorv", word), "fresh engine knows %s", word);
	CHECK(klm_load_overlay(h2, ovl) == KLM_OK, "load overlay");
	CHECK(completes(h2, "meet at the quorv", word), "loaded overlay lacks %s", word);
	CHECK(klm_load_overlay(h2, path) == KLM_ERR_IO, "missing overlay file");
	CHECK(klm_load_overlay(h2, model) == KLM_ERR_FORMAT, "a model is not an overlay");
	last_error(h2, msg, sizeof msg);
	CHECK(msg[0] != 0, "no last error after bad overlay");
	CHECK(completes(h2, "meet at the quorv", word), "failed load must keep the overlay");

	/* Overlay through memory. */
	int64_t need = klm_overlay_bytes(h, NULL, 0);
	CHECK(need > 0, "overlay size %lld", (long long)need);
	if (need > 0) {
		char *ob = malloc((size_t)need);
		CHECK(klm_overlay_bytes(h, ob, (size_t)need) == need, "overlay bytes");
		klm_handle h3 = klm_open(model, 0, 0, errbuf, sizeof errbuf);
		CHECK(klm_load_overlay_bytes(h3, ob, (size_t)need) == KLM_OK, "load overlay bytes");
		free(ob); /* the library copied them */
		CHECK(completes(h3, "meet at the quorv", word), "overlay bytes lack %s", word);
		CHECK(klm_load_overlay_bytes(h3, junk, sizeof junk) == KLM_ERR_FORMAT, "junk overlay bytes");
		CHECK(klm_close(h3) == KLM_OK, "close h3");
	}
	CHECK(klm_close(h2) == KLM_OK, "close h2");

	/* The shared input table: answers equal the Go facade's. */
	char *inbuf = read_file(inputs, NULL), *wantbuf = read_file(expected, NULL), *corrbuf = read_file(expcorr, NULL);
	CHECK(inbuf && wantbuf && corrbuf, "read %s / %s / %s", inputs, expected, expcorr);
	if (inbuf && wantbuf && corrbuf) {
		static struct table t;
		char *in[MAX_LINES], *want[MAX_LINES], *wantcorr[MAX_LINES];
		int ni = split_lines(inbuf, in, MAX_LINES), nw = split_lines(wantbuf, want, MAX_LINES);
		int nc = split_lines(corrbuf, wantcorr, MAX_LINES);
		CHECK(ni > 0 && ni == nw && ni == nc, "%d inputs, %d expected answers, %d expected corrections", ni, nw, nc);
		size_t modellen;
		char *modelbytes = read_file(model, &modellen);
		klm_handle fresh = klm_open(model, 0, 0, errbuf, sizeof errbuf);
		klm_handle mem = klm_open_bytes(modelbytes, modellen, 0, 0, errbuf, sizeof errbuf);
		free(modelbytes); /* copied by klm_open_bytes */
		CHECK(fresh != 0 && mem != 0, "open for the table: %s", errbuf);
		for (int i = 0; i < ni && i < nw; i++) {
			char *text = malloc(strlen(in[i]) + 1);
			CHECK(json_string(in[i], text), "line %d of %s is not a JSON string", i + 1, inputs);
			char *got = suggest(fresh, text), *gotmem = suggest(mem, text);
			CHECK(got && strcmp(got, want[i]) == 0, "klm_suggest(%s) = %s, want %s", in[i], got ? got : "(error)", want[i]);
			CHECK(gotmem && got && strcmp(got, gotmem) == 0, "klm_open_bytes answer differs for %s", in[i]);
			free(got);
			free(gotmem);
			if (i < nc) {
				char *gotcorr = correct(fresh, text);
				CHECK(gotcorr && strcmp(gotcorr, wantcorr[i]) == 0, "klm_correct(%s) = %s, want %s", in[i], gotcorr ? gotcorr : "(error)", wantcorr[i]);
				free(gotcorr);
			}
			t.input[t.n] = text;
			t.want[t.n] = want[i];
			t.n++;
		}
		/* The same answers from several threads sharing one handle. */
		enum { THREADS = 4 };
		pthread_t th[THREADS];
		struct worker w[THREADS];
		for (int i = 0; i < THREADS; i++) {
			w[i] = (struct worker){.h = fresh, .t = &t, .rounds = 50};
			pthread_create(&th[i], NULL, work, &w[i]);
		}
		for (int i = 0; i < THREADS; i++) {
			pthread_join(th[i], NULL);
			CHECK(w[i].errors == 0 && w[i].mismatches == 0, "thread %d: %d errors, %d mismatches", i, w[i].errors, w[i].mismatches);
		}
		for (int i = 0; i < t.n; i++) free(t.input[i]);
		klm_close(fresh);
		klm_close(mem);
	}
	free(inbuf);
	free(wantbuf);
	free(corrbuf);

	/* Closing while other threads use the handle: each call either answers
	 * or reports KLM_ERR_HANDLE (keyloom.h, THREAD SAFETY). */
	{
		enum { THREADS = 3 };
		struct closer c[THREADS];
		pthread_t th[THREADS];
		klm_handle hc = klm_open(model, 0, 0, errbuf, sizeof errbuf);
		CHECK(hc != 0, "open for the close race: %s", errbuf);
		for (int i = 0; i < THREADS; i++) {
			c[i] = (struct closer){.h = hc};
			pthread_create(&th[i], NULL, hammer, &c[i]);
		}
		struct timespec pause = {0, 20 * 1000 * 1000}; /* let them run 20 ms before closing */
		nanosleep(&pause, NULL);
		CHECK(klm_close(hc) == KLM_OK, "close under load");
		for (int i = 0; i < THREADS; i++) {
			pthread_join(th[i], NULL);
			CHECK(c[i].other == 0 && c[i].closed == 1, "thread %d: %d answers, %d closed, %d other results", i, c[i].ok, c[i].closed, c[i].other);
		}
	}

	/* Closing. */
	CHECK(klm_close(h) == KLM_OK, "close");
	CHECK(klm_close(h) == KLM_ERR_HANDLE, "double close");
	CHECK(klm_suggest(h, "hi", errbuf, sizeof errbuf) == KLM_ERR_HANDLE, "suggest after close");
	CHECK(klm_last_error(h, msg, sizeof msg) == KLM_ERR_HANDLE, "last error after close");

done:
	printf("klm_test: %d checks, %d failed\n", checks, failures);
	return failures ? 1 : 0;
}
