/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * sort.h - sorting indices by a comparison that needs context (internal).
 * qsort() passes no context, so a comparison that reads a workload would
 * need a global, which two threads solving at once would share.  Also the
 * plain ascending comparison of long longs, for qsort().
 */
#ifndef KEEL_SORT_H
#define KEEL_SORT_H

#include <stdbool.h>
#include <stddef.h>

/* Negative, zero or positive as index a comes before, with or after b. */
typedef int (*keel_index_cmp)(const void *ctx, size_t a, size_t b);

/* Sorts idx[0..n) by cmp, stably (a merge sort).  False when memory ran
 * out (idx is then unchanged). */
bool keelSortIndices(size_t *idx, size_t n, keel_index_cmp cmp, const void *ctx);

/* For each of the n strings, the index of the first equal one in first[i]
 * (i itself when none comes before it; NULL strings stay alone): one
 * stable sort, so that finding repeated ids costs n log n, not n squared.
 * False when memory ran out (first is then unset). */
bool keelSortFirstSame(const char *const *texts, size_t n, size_t *first);

/* qsort() comparison of two long longs, ascending. */
int keelSortCompareLongLong(const void *a, const void *b);

#endif
