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

/* The ratio classes of w's parts (tally.h): a part whose ratio_limit is
 * below the census has the class of its value.  False when memory ran
 * out. */
static bool classify_ratios(keel_tally *t, const keel_workload *w)
{
    size_t np = w->npatients;
    int *class_of = keel_malloc((np + 1) * sizeof *class_of); /* by value */
    t->ratio_class = keel_malloc((np ? np : 1) * sizeof *t->ratio_class);
    if (!class_of || !t->ratio_class) {
        free(class_of);
        return false;
    }
    for (size_t v = 0; v <= np; v++)
        class_of[v] = -1;
    for (size_t p = 0; p < np; p++)
        if (w->ratio_limit[p] < (int)np)
            class_of[w->ratio_limit[p]] = 0;
    for (size_t v = 0; v < np; v++)
        if (class_of[v] == 0)
            class_of[v] = (int)t->nratios++ + 1; /* 1-based while counting */
    t->ratio = keel_malloc((t->nratios ? t->nratios : 1) * sizeof *t->ratio);
    if (t->ratio) {
        for (size_t v = 0; v < np; v++)
            if (class_of[v] > 0)
                t->ratio[--class_of[v]] = (int)v;
        for (size_t p = 0; p < np; p++)
            t->ratio_class[p] = class_of[w->ratio_limit[p]];
    }
    free(class_of);
    return t->ratio != NULL;
}

/* No part held: every nurse's list empty. */
static void empty_lists(keel_tally *t)
{
    const keel_workload *w = t->w;
    for (size_t p = 0; p < w->npatients; p++)
        t->nurse_of[p] = t->next[p] = t->prev[p] = -1;
    for (size_t n = 0; n < w->nnurses; n++)
        t->first[n] = t->last[n] = -1;
}

keel_status keel_tally_init(keel_tally *t, const keel_workload *w)
{
    size_t slots = (w->nnurses ? w->nnurses : 1) * w->nmoments;
    memset(t, 0, sizeof *t);
    t->w = w;
    if (!classify_ratios(t, w)) {
        keel_tally_free(t);
        return KEEL_ERR_NOMEM;
    }
    t->count = keel_calloc(slots, sizeof *t->count);
    t->care = keel_calloc(w->nnurses ? w->nnurses : 1, sizeof *t->care);
    t->high = keel_calloc(slots, sizeof *t->high);
    t->sides = keel_calloc(slots * 3, sizeof *t->sides);
    t->zones = keel_calloc(slots, sizeof *t->zones);
    t->in_zone = keel_calloc(slots * (w->nzones ? w->nzones : 1), sizeof *t->in_zone);
    t->at_ratio = keel_calloc(slots * (t->nratios ? t->nratios : 1), sizeof *t->at_ratio);
    t->nurse_of = keel_malloc((w->npatients ? w->npatients : 1) * sizeof *t->nurse_of);
    t->first = keel_malloc((w->nnurses ? w->nnurses : 1) * sizeof *t->first);
    t->last = keel_malloc((w->nnurses ? w->nnurses : 1) * sizeof *t->last);
    t->next = keel_malloc((w->npatients ? w->npatients : 1) * sizeof *t->next);
    t->prev = keel_malloc((w->npatients ? w->npatients : 1) * sizeof *t->prev);
    if (!t->count || !t->care || !t->high || !t->sides || !t->zones || !t->in_zone ||
        !t->at_ratio || !t->nurse_of || !t->first || !t->last || !t->next || !t->prev) {
        keel_tally_free(t);
        return KEEL_ERR_NOMEM;
    }
    empty_lists(t);
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
    free(t->ratio);
    free(t->ratio_class);
    free(t->first);
    free(t->last);
    free(t->next);
    free(t->prev);
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
    memset(t->at_ratio, 0, slots * t->nratios * sizeof *t->at_ratio);
    empty_lists(t);
    for (size_t p = 0; p < w->npatients; p++)
        if (nurse_of[p] >= 0)
            keel_tally_add(t, p, (size_t)nurse_of[p]);
}

/* Puts part p in nurse n's list at its place by index: at the end (in
 * one step) when it comes after every part she holds, as when the tally
 * is filled in index order. */
static void join_list(keel_tally *t, size_t p, size_t n)
{
    int after = t->last[n];
    while (after >= 0 && (size_t)after > p)
        after = t->prev[after];
    int before = after >= 0 ? t->next[after] : t->first[n];
    t->prev[p] = after;
    t->next[p] = before;
    if (after >= 0)
        t->next[after] = (int)p;
    else
        t->first[n] = (int)p;
    if (before >= 0)
        t->prev[before] = (int)p;
    else
        t->last[n] = (int)p;
}

static void leave_list(keel_tally *t, size_t p, size_t n)
{
    int before = t->prev[p], after = t->next[p];
    if (before >= 0)
        t->next[before] = after;
    else
        t->first[n] = after;
    if (after >= 0)
        t->prev[after] = before;
    else
        t->last[n] = before;
    t->prev[p] = t->next[p] = -1;
}

static void change(keel_tally *t, size_t p, size_t n, int d)
{
    const keel_workload *w = t->w;
    t->care[n] += d * w->care_minutes[p];
    t->nurse_of[p] = d > 0 ? (int)n : -1;
    if (d > 0)
        join_list(t, p, n);
    else
        leave_list(t, p, n);
    for (int m = w->first_moment[p]; m < w->last_moment[p]; m++) {
        size_t slot = n * w->nmoments + (size_t)m;
        t->count[slot] += d;
        t->high[slot] += d * w->high_acuity[p];
        t->sides[slot * 3 + (size_t)w->side[p]] += d;
        if (t->ratio_class[p] >= 0)
            t->at_ratio[slot * t->nratios + (size_t)t->ratio_class[p]] += d;
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
    const int *at = &t->at_ratio[(n * w->nmoments + m) * t->nratios];
    for (size_t c = 0; c < t->nratios; c++)
        if (at[c] > 0)
            return t->ratio[c];
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
