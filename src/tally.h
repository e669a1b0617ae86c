/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * tally.h - what each nurse holds so far, kept up to date as patients come
 * and go, so that the rules that join patients can be tested in a few
 * steps (internal).  The tally only counts: per nurse and moment, her
 * patients, high-acuity patients, patients per isolation side, zones and
 * patients per ratio; per nurse, her care minutes; per part, its nurse.
 * The tests themselves are the rules' (rule.h, keelRuleBreaks()), so every
 * method that keeps the rules through the tally keeps the same rules.
 * With the clock each count is per moment, over the parts that cover it.
 * It also keeps each nurse's parts in index order, so that a search that
 * looks at one nurse's patients walks a handful, not the whole census.
 */
#ifndef KEEL_TALLY_H
#define KEEL_TALLY_H

#include <stdbool.h>
#include <stddef.h>

#include "workload_internal.h"

/* Counts are per nurse and moment: index n * nmoments + m ("slot"). */
typedef struct keel_tally {
    const keel_workload *w;
    int *count;      /* [slots] */
    long long *care; /* [nnurses]: care minutes held (duty not included) */
    int *high;       /* [slots] */
    int *sides;      /* [slots * 3]: patients per KEEL_SIDE_* */
    int *zones;      /* [slots]: distinct zones held */
    int *in_zone;    /* [slots * nzones] */
    int *at_ratio;   /* [slots * nratios]: patients per ratio class */
    int *nurse_of;   /* [npatients]: the nurse of each part held, or -1 */
    int *first;      /* [nnurses]: her lowest-index part, or -1 (keel_tally_first()) */
    int *last;       /* [nnurses]: her highest-index part, or -1 */
    int *next;       /* [npatients]: the next part of the same nurse, or -1 */
    int *prev;       /* [npatients] */
    /* The ratios patients give, so that the counts per ratio grow with the
     * ratios in use, not with the census: ratio[c] ascending, and each
     * part's class (-1: no ratio of its own). */
    size_t nratios;
    int *ratio;       /* [nratios] */
    int *ratio_class; /* [npatients] */
} keel_tally;

/* Allocates an empty tally.  Statuses: KEEL_OK, KEEL_ERR_NOMEM. */
keel_status keel_tally_init(keel_tally *t, const keel_workload *w);
void keel_tally_free(keel_tally *t);

/* Empties the tally, then adds every placed patient of nurse_of. */
void keel_tally_fill(keel_tally *t, const int *nurse_of);

void keel_tally_add(keel_tally *t, size_t p, size_t n);
void keel_tally_remove(keel_tally *t, size_t p, size_t n);

/* Nurse n's parts in index order: for (int p = keel_tally_first(t, n); p >= 0;
 * p = keel_tally_next(t, p)).  Moving a part to another nurse ends the
 * walk; a part removed and added back (keelRuleAdmitsInstead()) keeps its
 * place. */
static inline int keel_tally_first(const keel_tally *t, size_t n)
{
    return t->first[n];
}

static inline int keel_tally_next(const keel_tally *t, size_t p)
{
    return t->next[p];
}

/* The smallest ratio_limit among n's patients at moment m (npatients when
 * none). */
int keel_tally_tightest(const keel_tally *t, size_t n, size_t m);

/* The most patients n holds at any one moment. */
int keel_tally_most(const keel_tally *t, size_t n);

#endif
