/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * alloc.h - the one allocation wrapper of libkeel (internal).
 *
 * Every allocation in the library goes through these functions so that the
 * fault tests can make the Nth one fail and check that each caller returns
 * KEEL_ERR_NOMEM cleanly and leaks nothing.  Memory from them is released
 * with free().
 */
#ifndef KEEL_ALLOC_H
#define KEEL_ALLOC_H

#include <stddef.h>

void *keel_malloc(size_t size);
void *keel_calloc(size_t count, size_t size);
void *keel_realloc(void *ptr, size_t size);
/* Like keel_calloc(count, size) but for growing an array: NULL on overflow. */
void *keel_reallocarray(void *ptr, size_t count, size_t size);
/* A copy of s (NULL gives NULL, which is not a failure: check s first). */
char *keel_strdup(const char *s);
/* A copy of the first len bytes of s, NUL-terminated. */
char *keel_strndup(const char *s, size_t len);
/* A printf-formatted new string, or NULL when memory runs out. */
char *keel_asprintf(const char *fmt, ...)
#if defined(__GNUC__)
    __attribute__((format(printf, 1, 2)))
#endif
    ;

/* Test hook, for the calling thread: its nth allocation from now (1 = the
 * next) fails, and none after it.  n <= 0 turns failures off.  Returns how
 * many allocations the thread made since its last call, so a test can
 * count a call's allocations. */
long keel_alloc_fail_at(long n);

#endif
