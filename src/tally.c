/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * tally.c - per-nurse counts behind the rules that join patients; see
 * tally.h.
 */
#include "tally.h"

#include <stdlib.h>
#include <string.h>

#include "alloc.h"
#include "workload_internal.h"

keel_status keel_tally_init(keel_tally *t, const keel_workload *w)
{
    size_t slots = (w->nnurses ? w->nnurses : 1) * w->nmoments;
    memset(t, 0, sizeof *t);
    t->w = w;
    t->count = keel_calloc(slots, sizeof *t->count);
    t->care = keel_calloc(w->nnurses ? w->nnurses : 1, sizeof *t->care);
    t->high = keel_calloc(slots, sizeof *t->high);
    t->sides = keel_calloc(slots * 3, sizeof *t->sides);
    t->zones = keel_calloc(slots, sizeof *t->zones);
    t->in_zone = keel_calloc(slots * (w->nzones ? w->nzones : 1), sizeof *t->in_zone);
    t->at_ratio = keel_calloc(slots * (w->npatients + 1), sizeof *t->at_ratio);
    t->nurse_of = keel_malloc((w->npatients ? w->npatients : 1) * sizeof *t->nurse_of);
    if (!t->count || !t->care || !t->high || !t->sides || !t->zones || !t->in_zone ||
        !t->at_ratio || !t->nurse_of) {
        keel_tally_free(t);
        return KEEL_ERR_NOMEM;
    }
    for (size_t p = 0; p < w->npatients; p++)
        t->nurse_of[p] = -1;
    return KEEL_OK;
}

void keel_tally_free(keel_tally *t)
{
    free(t->count);
    free(t->care);
    free(t->high);
    free(t->sides);
    free(t->zones);
    free(t->in_zone);
    free(t->at_ratio);
    free(t->nurse_of);
    memset(t, 0, sizeof *t);
}

void keel_tally_fill(keel_tally *t, const int *nurse_of)
{
    const keel_workload *w = t->w;
    size_t nn = w->nnurses, slots = nn * w->nmoments;
    memset(t->count, 0, slots * sizeof *t->count);
    memset(t->care, 0, nn * sizeof *t->care);
    memset(t->high, 0, slots * sizeof *t->high);
    memset(t->sides, 0, slots * 3 * sizeof *t->sides);
    memset(t->zones, 0, slots * sizeof *t->zones);
    memset(t->in_zone, 0, slots * w->nzones * sizeof *t->in_zone);
    memset(t->at_ratio, 0, slots * (w->npatients + 1) * sizeof *t->at_ratio);
    for (size_t p = 0; p < w->npatients; p++)
        t->nurse_of[p] = -1;
    for (size_t p = 0; p < w->npatients; p++)
        if (nurse_of[p] >= 0)
            keel_tally_add(t, p, (size_t)nurse_of[p]);
}

static void change(keel_tally *t, size_t p, size_t n, int d)
{
    const keel_workload *w = t->w;
    t->care[n] += d * w->care_minutes[p];
    t->nurse_of[p] = d > 0 ? (int)n : -1;
    for (int m = w->first_moment[p]; m < w->last_moment[p]; m++) {
        size_t slot = n * w->nmoments + (size_t)m;
        t->count[slot] += d;
        t->high[slot] += d * w->high_acuity[p];
        t->sides[slot * 3 + (size_t)w->side[p]] += d;
        t->at_ratio[slot * (w->npatients + 1) + (size_t)w->ratio_limit[p]] += d;
        if (w->zone[p] >= 0) {
            int *in = &t->in_zone[slot * w->nzones + (size_t)w->zone[p]];
            if ((*in == 0 && d > 0) || (*in == 1 && d < 0))
                t->zones[slot] += d;
            *in += d;
        }
    }
}

void keel_tally_add(keel_tally *t, size_t p, size_t n)
{
    change(t, p, n, 1);
}

void keel_tally_remove(keel_tally *t, size_t p, size_t n)
{
    change(t, p, n, -1);
}

int keel_tally_tightest(const keel_tally *t, size_t n, size_t m)
{
    const keel_workload *w = t->w;
    const int *at = &t->at_ratio[(n * w->nmoments + m) * (w->npatients + 1)];
    for (size_t r = 1; r < w->npatients; r++)
        if (at[r] > 0)
            return (int)r;
    return (int)w->npatients;
}

int keel_tally_most(const keel_tally *t, size_t n)
{
    int most = 0;
    for (size_t m = 0; m < t->w->nmoments; m++)
        if (t->count[n * t->w->nmoments + m] > most)
            most = t->count[n * t->w->nmoments + m];
    return most;
}
