/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * tally.h - what each nurse holds so far, kept up to date as patients come
 * and go, so that the rules that join patients can be checked in a few
 * steps (internal).  Used by the greedy method, the dedicated search, plan
 * checks and diagnosis; every method keeps the same rules through it.
 *
 * A nurse n may take patient p (keel_tally_admits) when the pair is
 * eligible and, with p added:
 *   count(n) <= limit(n)                       patient_limit / law_limit
 *   count(n) <= ratio_limit(q) for each q held  patient_ratio
 *   high-acuity patients <= max_high_acuity     high_acuity
 *   not both sides of isolation separation      isolation
 *   zones <= max_zones                          zones
 *   care(n) <= max_care(n)                      capacity (policy.max_utilisation)
 * The fewest patients per nurse (min_patients) can only be judged on a whole
 * assignment: keel_tally_short() says whether the tally keeps it, and
 * keel_tally_may_give() whether n may give a patient away.
 * With the clock each count is per moment, over the parts that cover it
 * (a count limit broken is then `moment_limit`), and a part keeps the
 * nurse of the part before it while she is on (keel_workload_keeps).
 */
#ifndef KEEL_TALLY_H
#define KEEL_TALLY_H

#include <stdbool.h>
#include <stddef.h>

#include "keel/workload.h"

/* Counts are per nurse and moment: index n * nmoments + m ("slot"). */
typedef struct keel_tally {
    const keel_workload *w;
    int *count;      /* [slots] */
    long long *care; /* [nnurses]: care minutes held (duty not included) */
    int *high;       /* [slots] */
    int *sides;      /* [slots * 3]: patients per KEEL_SIDE_* */
    int *zones;      /* [slots]: distinct zones held */
    int *in_zone;    /* [slots * nzones] */
    int *at_ratio;   /* [slots * (npatients + 1)]: patients per ratio_limit */
    int *nurse_of;   /* [npatients]: the nurse of each part held, or -1 */
} keel_tally;

/* Allocates an empty tally.  Statuses: KEEL_OK, KEEL_ERR_NOMEM. */
keel_status keel_tally_init(keel_tally *t, const keel_workload *w);
void keel_tally_free(keel_tally *t);

/* Empties the tally, then adds every placed patient of nurse_of. */
void keel_tally_fill(keel_tally *t, const int *nurse_of);

void keel_tally_add(keel_tally *t, size_t p, size_t n);
void keel_tally_remove(keel_tally *t, size_t p, size_t n);

/* The smallest ratio_limit among n's patients at moment m (npatients when
 * none). */
int keel_tally_tightest(const keel_tally *t, size_t n, size_t m);

/* The most patients n holds at any one moment. */
int keel_tally_most(const keel_tally *t, size_t n);

/* The rule n would break by taking p (as a rule name, see finding.h), or
 * NULL when n may take p. */
const char *keel_tally_breaks(const keel_tally *t, size_t p, size_t n);

static inline bool keel_tally_admits(const keel_tally *t, size_t p, size_t n)
{
    return keel_tally_breaks(t, p, n) == NULL;
}

/* True when some counted nurse holds fewer than her min_patients. */
bool keel_tally_short(const keel_tally *t);

/* True when n may give one patient away and keep her min_patients. */
static inline bool keel_tally_may_give(const keel_tally *t, size_t n)
{
    return t->w->min_patients[n] == 0 || keel_tally_most(t, n) > t->w->min_patients[n];
}

/* True when n may take p in place of q, which n holds. */
bool keel_tally_admits_instead(keel_tally *t, size_t p, size_t q, size_t n);

#endif
