/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * alloc.c - the allocation wrapper with a fault-injection hook for tests.
 * The hook's counters are per thread: a fault test counts and fails the
 * allocations of its own thread only, and threads solving rosters at once
 * share no state here.
 */
#include "alloc.h"

#include <stdarg.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

static _Thread_local long fail_at; /* 0: never fail; otherwise the countdown to the failing call */
static _Thread_local long made;    /* allocations since the last keel_alloc_fail_at() */

static int should_fail(void)
{
    made++;
    if (fail_at <= 0)
        return 0;
    if (--fail_at == 0)
        return 1;
    return 0;
}

long keel_alloc_fail_at(long n)
{
    long before = made;
    made = 0;
    fail_at = n > 0 ? n : 0;
    return before;
}

void *keel_malloc(size_t size)
{
    if (should_fail())
        return NULL;
    return malloc(size ? size : 1);
}

void *keel_calloc(size_t count, size_t size)
{
    if (should_fail())
        return NULL;
    if (count == 0 || size == 0)
        return calloc(1, 1);
    return calloc(count, size);
}

void *keel_realloc(void *ptr, size_t size)
{
    if (should_fail())
        return NULL;
    return realloc(ptr, size ? size : 1);
}

void *keel_reallocarray(void *ptr, size_t count, size_t size)
{
    if (size && count > SIZE_MAX / size)
        return NULL;
    return keel_realloc(ptr, count * size);
}

char *keel_strndup(const char *s, size_t len)
{
    char *copy = keel_malloc(len + 1);
    if (!copy)
        return NULL;
    memcpy(copy, s, len);
    copy[len] = '\0';
    return copy;
}

char *keel_strdup(const char *s)
{
    if (!s)
        return NULL;
    return keel_strndup(s, strlen(s));
}

char *keel_asprintf(const char *fmt, ...)
{
    va_list ap;
    va_start(ap, fmt);
    int len = vsnprintf(NULL, 0, fmt, ap);
    va_end(ap);
    if (len < 0)
        return NULL;
    char *s = keel_malloc((size_t)len + 1);
    if (!s)
        return NULL;
    va_start(ap, fmt);
    vsnprintf(s, (size_t)len + 1, fmt, ap);
    va_end(ap);
    return s;
}
