/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * keel/error.h - status codes and the error value every keel call fills in.
 *
 * Library calls never print and never exit.  A call that fails returns a
 * keel_status other than KEEL_OK and, when the caller passed a keel_error,
 * records one or more problems in it.  An input problem carries the file,
 * the 1-based line and column, the key path (e.g. "patients[3].acuity") and
 * a message; the error owns copies of all of them, so it outlives the input.
 */
#ifndef KEEL_ERROR_H
#define KEEL_ERROR_H

#include "keel/api.h"

#include <stddef.h>

#ifdef __cplusplus
extern "C" {
#endif

/* One status enum for the whole library; 0 means success. */
typedef enum keel_status {
    KEEL_OK = 0,         /* success */
    KEEL_ERR_USAGE = 1,  /* the caller passed an invalid argument or option */
    KEEL_ERR_INPUT = 2,  /* the input is malformed or breaks the roster schema */
    KEEL_ERR_IO = 3,     /* a file could not be read or written */
    KEEL_ERR_NOMEM = 4,  /* an allocation failed */
    KEEL_ERR_SOLVER = 5, /* the solver failed in a way it should not */
} keel_status;

/* One problem: where it is and what is wrong.  line and column are 1-based;
 * 0 means "no position" (e.g. the file could not be opened).  file and key
 * may be NULL. */
typedef struct keel_problem {
    char *file;
    int line;
    int column;
    char *key;
    char *message;
} keel_problem;

/* The error value.  Initialise with keel_error_init() (or zero it), release
 * with keel_error_fini().  status is the first failing status recorded. */
typedef struct keel_error {
    keel_status status;
    size_t nproblems;
    keel_problem *problems;
} keel_error;

/* Sets err to "no error".  err must not be NULL. */
KEEL_API void keel_error_init(keel_error *err);

/* Frees every problem in err and sets it back to "no error".  NULL-safe. */
KEEL_API void keel_error_fini(keel_error *err);

/* Records a problem; the message is printf-formatted.  Returns status, so a
 * caller can write `return keel_error_add(err, KEEL_ERR_INPUT, ...)`.  err
 * may be NULL (nothing is recorded).  If memory runs out while recording,
 * err->status becomes KEEL_ERR_NOMEM and the problem is dropped. */
KEEL_API keel_status keel_error_add(keel_error *err, keel_status status, const char *file, int line,
                           int column, const char *key, const char *fmt, ...)
#if defined(__GNUC__)
    __attribute__((format(printf, 7, 8)))
#endif
    ;

/* Writes problem p as "file:line:column: key: message" (parts that are
 * absent are left out) into buf, always NUL-terminated when size > 0.
 * Returns the length the full text needs, like snprintf. */
KEEL_API int keel_problem_format(const keel_problem *p, char *buf, size_t size);

/* A short, static, human-readable name of a status ("bad input", ...). */
KEEL_API const char *keel_status_string(keel_status status);

/* For a message's "did you mean": the word of words[0..nwords) that word is
 * most likely a typo of.  One that differs only in ASCII case wins; else the
 * closest by edit distance (a letter added, dropped, changed, or two
 * neighbours swapped), when that distance is at most 2 and at most a third
 * of the longer word's length; the first of equals.  NULL when none is that
 * close (or word is NULL).  Borrowed: the result is one of words. */
KEEL_API const char *keel_error_suggest(const char *word, const char *const *words, size_t nwords);

#ifdef __cplusplus
}
#endif
#endif
