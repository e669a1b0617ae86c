/* SPDX-License-Identifier: GPL-3.0-or-later */
/* triplets.c - a growing list of matrix entries; see triplets.h. */
#include "ilp.h"

#include <stdlib.h>
#include <string.h>

#include "alloc.h"

void keel_triplets_put(keel_triplets *t, int row, int col, double val)
{
    if (col == 0)
        return; /* no such variable: the pair is not allowed */
    if (t->n + 2 > t->cap) {
        size_t cap = t->cap ? 2 * t->cap : 256;
        int *ia = keel_reallocarray(t->ia, cap, sizeof *ia);
        if (ia)
            t->ia = ia;
        int *ja = keel_reallocarray(t->ja, cap, sizeof *ja);
        if (ja)
            t->ja = ja;
        double *ar = keel_reallocarray(t->ar, cap, sizeof *ar);
        if (ar)
            t->ar = ar;
        if (!ia || !ja || !ar) {
            t->nomem = true;
            return;
        }
        t->cap = cap;
    }
    t->n++;
    t->ia[t->n] = row;
    t->ja[t->n] = col;
    t->ar[t->n] = val;
}

void keel_triplets_fini(keel_triplets *t)
{
    free(t->ia);
    free(t->ja);
    free(t->ar);
    memset(t, 0, sizeof *t);
}
