/*
 * keyloom.h — C interface to the Keyloom engine (offline word completion,
 * next-word prediction and autocorrect that learns the user's words).
 *
 * Build the shared library from the module root with
 *
 *     go build -buildmode=c-shared -o libkeyloom.so ./capi
 *
 * and link against it (-lkeyloom). This header is written by hand and is the
 * contract; the header cgo writes next to the library is not needed.
 *
 * ABI version 1. Every name starts with klm_ / KLM_.
 *
 * MEMORY OWNERSHIP
 *   - The caller owns every buffer: input strings and byte arrays are read
 *     during the call only (model and overlay bytes are copied), and output
 *     goes into caller-provided buffers. The library never returns a pointer,
 *     never keeps one of the caller's pointers after a call returns, and never
 *     asks the caller to free anything except handles (klm_close).
 *   - A handle is an opaque integer (a runtime/cgo.Handle inside), not a
 *     pointer. 0 is never a valid handle.
 *
 * STRINGS
 *   Input text is NUL-terminated UTF-8. Invalid UTF-8 never crashes the
 *   library; it is treated as non-letters. Output text is UTF-8 JSON followed
 *   by a NUL.
 *
 * OUTPUT BUFFERS (the "size convention", as C99 snprintf)
 *   Functions that fill a buffer out of capacity cap return n, the length of
 *   the full answer in bytes NOT counting the terminating NUL.
 *     - n < cap:  the whole answer and a NUL were written to out.
 *     - n >= cap: the buffer was too small. Nothing useful was written (if
 *       cap > 0, out[0] is set to NUL). Call again with cap >= n + 1.
 *   out may be NULL when cap is 0, to ask for the size only.
 *   Binary outputs (klm_overlay_bytes) use the same rule without the NUL:
 *   they succeed when n <= cap.
 *
 * ERRORS
 *   Functions returning int64_t or int32_t return a negative KLM_ERR_* code on
 *   failure, and 0 or a byte count on success. The message of the most recent
 *   failure on a handle is kept per handle: read it with klm_last_error.
 *   klm_open and klm_open_bytes return 0 on failure and write their message
 *   to the errbuf they are given (which may be NULL). There is no global
 *   error state. Bad arguments (a NULL string, a 0 or closed handle) return
 *   an error code, never crash.
 *
 * THREAD SAFETY
 *   All functions may be called from any thread. One handle may be used by
 *   several threads at once: suggestions, learning and overlay loads are
 *   safe to mix. klm_close waits for calls in progress on that handle to
 *   finish; calls made after it return KLM_ERR_HANDLE. When several threads
 *   fail on the same handle at once, klm_last_error reports one of their
 *   messages.
 */
#ifndef KEYLOOM_H
#define KEYLOOM_H

#include <stddef.h>
#include <stdint.h>

#ifdef __cplusplus
extern "C" {
#endif

/* KLM_ABI_VERSION is the version of this interface; klm_abi_version returns
 * the version the library was built with. */
#define KLM_ABI_VERSION 1

/* Error codes (negative return values). */
#define KLM_OK 0
#define KLM_ERR_HANDLE (-1)  /* handle is 0, unknown or closed */
#define KLM_ERR_ARG (-2)     /* a required pointer is NULL or an argument is out of range */
#define KLM_ERR_IO (-3)      /* a file could not be read or written */
#define KLM_ERR_FORMAT (-4)  /* not a model/overlay file, unsupported version, checksum or structure damaged */
#define KLM_ERR_OTHER (-5)   /* any other failure; see klm_last_error */

/* Flags for klm_open and klm_open_bytes (bitwise or). */
#define KLM_VERIFY_CHECKSUMS 1 /* check every section's CRC-32C on open (reads the whole file) */
#define KLM_NO_LEARNING 2      /* start with learning off (see klm_set_learning) */

/* klm_handle identifies one opened engine. 0 is never valid. */
typedef uintptr_t klm_handle;

/* klm_abi_version returns KLM_ABI_VERSION of the library. */
int32_t klm_abi_version(void);

/* klm_open maps the model file at path and returns a handle, or 0 on failure.
 * suggestions is how many completions and predictions klm_suggest returns
 * (0 = default 3, at most 32). flags is 0 or KLM_* open flags. On failure a
 * message is written to errbuf under the size convention (errbuf may be
 * NULL). Free the handle with klm_close. */
klm_handle klm_open(const char *path, int32_t suggestions, uint32_t flags, char *errbuf, size_t errcap);

/* klm_open_bytes is klm_open for a model file the caller holds in memory.
 * The len bytes at data are copied: the caller may free them on return. */
klm_handle klm_open_bytes(const void *data, size_t len, int32_t suggestions, uint32_t flags, char *errbuf,
                          size_t errcap);

/* klm_close releases the engine. It waits for calls in progress on h. It
 * returns KLM_OK, or KLM_ERR_HANDLE if h is 0, unknown or already closed.
 * The user overlay is NOT saved: call klm_save_overlay first. */
int32_t klm_close(klm_handle h);

/* klm_suggest answers one keystroke. before is the text before the cursor.
 * The answer is JSON:
 *   {"prefix":"...","completions":[{"word":"...","prob":0.1},...],
 *    "predictions":[...],"correction":{...}}
 * completions are filled while a word is typed (before does not end in a
 * space), predictions after a space; "correction" is present only when the
 * word being typed cannot start any known word and a replacement is likely
 * (fields typed, replacement, confidence, apply). Returns the JSON length
 * under the size convention, or a negative KLM_ERR_* code. */
int64_t klm_suggest(klm_handle h, const char *before, char *out, size_t cap);

/* klm_correct decides what to do with the last word of before when the
 * user finishes it (types a space or punctuation). The answer is the JSON
 * literal null (leave the word alone) or
 *   {"typed":"...","replacement":"...","confidence":0.97,"apply":true,
 *    "alternatives":["...",...]}
 * where apply says replacing automatically is safe (otherwise only offer
 * it) and alternatives may be absent. Returns the JSON length under the size
 * convention, or a negative KLM_ERR_* code. */
int64_t klm_correct(klm_handle h, const char *before, char *out, size_t cap);

/* klm_learn teaches the engine the user's text (held in memory until
 * klm_save_overlay). Text that looks like a secret (long digit runs, card
 * numbers, e-mail addresses) is never learned, and nothing is learned while
 * learning is off. Returns KLM_OK or a negative code. */
int32_t klm_learn(klm_handle h, const char *text);

/* klm_set_learning turns learning on (on != 0) or off, e.g. for password
 * fields. Returns KLM_OK or KLM_ERR_HANDLE. */
int32_t klm_set_learning(klm_handle h, int32_t on);

/* klm_save_overlay writes what the engine has learned to path, atomically
 * and with mode 0600. The base model is never written. */
int32_t klm_save_overlay(klm_handle h, const char *path);

/* klm_load_overlay replaces what the engine has learned with the overlay
 * saved at path. On failure the engine keeps its current overlay. */
int32_t klm_load_overlay(klm_handle h, const char *path);

/* klm_overlay_bytes writes the bytes klm_save_overlay would write into out
 * (binary, no NUL). Returns their length n; they were written only if
 * n <= cap. For apps that keep the overlay elsewhere than in a file. */
int64_t klm_overlay_bytes(klm_handle h, void *out, size_t cap);

/* klm_load_overlay_bytes replaces the overlay with one held in memory (as
 * returned by klm_overlay_bytes). The bytes are copied. */
int32_t klm_load_overlay_bytes(klm_handle h, const void *data, size_t len);

/* klm_info writes a JSON description of the model:
 *   {"order":3,"words":1234,"ngrams":[...],"quant_bits":8,"bytes":56789,
 *    "corpus":"...","user_entries":0}
 * under the size convention. */
int64_t klm_info(klm_handle h, char *out, size_t cap);

/* klm_last_error writes the message of the most recent failed call on h
 * under the size convention ("" if none). For h == 0 or a closed handle it
 * returns KLM_ERR_HANDLE. */
int64_t klm_last_error(klm_handle h, char *out, size_t cap);

#ifdef __cplusplus
}
#endif

#endif /* KEYLOOM_H */
