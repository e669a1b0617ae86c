/* SPDX-License-Identifier: GPL-3.0-or-later */
/* sort.c - a stable merge sort of indices with a context, and repeated
 * strings found with it (see sort.h). */
#include "sort.h"

#include <stdlib.h>
#include <string.h>

#include "alloc.h"

bool keelSortIndices(size_t *idx, size_t n, keel_index_cmp cmp, const void *ctx)
{
    if (n < 2)
        return true;
    size_t *tmp = keel_malloc(n * sizeof *tmp);
    if (!tmp)
        return false;
    /* Bottom-up: runs of width 1, 2, 4, ... merged from idx into tmp and back. */
    size_t *from = idx, *to = tmp;
    for (size_t width = 1; width < n; width *= 2) {
        for (size_t lo = 0; lo < n; lo += 2 * width) {
            size_t mid = lo + width < n ? lo + width : n;
            size_t hi = lo + 2 * width < n ? lo + 2 * width : n;
            size_t i = lo, j = mid, k = lo;
            while (i < mid && j < hi)
                to[k++] = cmp(ctx, from[j], from[i]) < 0 ? from[j++] : from[i++];
            while (i < mid)
                to[k++] = from[i++];
            while (j < hi)
                to[k++] = from[j++];
        }
        size_t *swap = from;
        from = to;
        to = swap;
    }
    if (from != idx)
        memcpy(idx, from, n * sizeof *idx);
    free(tmp);
    return true;
}

static int compare_texts(const void *ctx, size_t a, size_t b)
{
    const char *const *texts = ctx;
    return strcmp(texts[a], texts[b]);
}

bool keelSortFirstSame(const char *const *texts, size_t n, size_t *first)
{
    size_t *order = keel_malloc((n ? n : 1) * sizeof *order), given = 0;
    if (!order)
        return false;
    for (size_t i = 0; i < n; i++) {
        first[i] = i;
        if (texts[i])
            order[given++] = i;
    }
    bool ok = keelSortIndices(order, given, compare_texts, texts);
    for (size_t k = 1; ok && k < given; k++) /* stable: a run's head is its earliest */
        if (strcmp(texts[order[k - 1]], texts[order[k]]) == 0)
            first[order[k]] = first[order[k - 1]];
    free(order);
    return ok;
}

int keelSortCompareLongLong(const void *a, const void *b)
{
    long long x = *(const long long *)a, y = *(const long long *)b;
    return (x > y) - (x < y);
}
