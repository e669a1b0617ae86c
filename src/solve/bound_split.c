/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * bound_split.c - a proven floor for pooled units where each nurse works in
 * one zone (policy.max_zones 1, every patient in a zone, no clock).
 *
 * There the nurses who take patients split into the zones of their
 * patients, and in each zone the heaviest utilisation is at least the
 * zone's average, (care of its patients + duty of its nurses) / capacity
 * of its nurses.  So no assignment has a heaviest utilisation below t
 * unless some split of the nurses (some nurses in no zone) gives every
 * zone z
 *
 *   sum over its nurses of (t capacity(n) - duty(n)) >= care(z)
 *   sum over its nurses of limit(n)                   >= patients(z)
 *   sum over its nurses of min(limit(n), high)        >= high-acuity patients(z)
 *
 * (high: policy.high_acuity's max_per_nurse).  Skills and the other rules
 * are left out, which keeps the floor a floor.  Nurses alike in capacity,
 * duty and limit form a class; a table over the zones, indexed by how many
 * nurses of each class are spoken for, answers whether a split exists,
 * taking for each zone only the fewest-nurse ways to meet its three sums.
 * Past SPLIT_CLASSES_MAX classes or SPLIT_STATES_MAX table entries the
 * question is left open (answered "possible").
 */
#include <stdlib.h>

#include "alloc.h"
#include "bound.h"
#include "measure.h"
#include "workload_internal.h"

#define SPLIT_CLASSES_MAX 8
#define SPLIT_STATES_MAX (1L << 18)
/* Table entries times ways per zone beyond which the table is not filled. */
#define SPLIT_WORK_MAX 50000000L

typedef struct split {
    size_t nclasses;
    long long capacity[SPLIT_CLASSES_MAX], duty[SPLIT_CLASSES_MAX];
    int limit[SPLIT_CLASSES_MAX], high[SPLIT_CLASSES_MAX], count[SPLIT_CLASSES_MAX];
    long stride[SPLIT_CLASSES_MAX];
    long nstates;
    /* the zone being filled, and the threshold a / b */
    long long need_care, need_places, need_high, a, b;
    long *ways; /* [nstates]: the fewest-nurse ways of this zone, as state indices */
    long nways;
} split;

/* True when k nurses of each class meet the zone's three sums. */
static bool meets(const split *S, const int *k)
{
    long long care = 0, places = 0, high = 0;
    for (size_t c = 0; c < S->nclasses; c++) {
        care += k[c] * (S->a * S->capacity[c] - S->b * S->duty[c]);
        places += (long long)k[c] * S->limit[c];
        high += (long long)k[c] * S->high[c];
    }
    return care >= S->b * S->need_care && places >= S->need_places && high >= S->need_high;
}

/* Lists in S->ways every k that meets the sums but would not with one nurse
 * fewer of any class. */
static void list_ways(split *S, int *k, size_t c)
{
    if (c == S->nclasses) {
        if (!meets(S, k))
            return;
        for (size_t d = 0; d < S->nclasses; d++) {
            if (k[d] == 0)
                continue;
            k[d]--;
            bool still = meets(S, k);
            k[d]++;
            if (still)
                return;
        }
        long index = 0;
        for (size_t d = 0; d < S->nclasses; d++)
            index += k[d] * S->stride[d];
        S->ways[S->nways++] = index;
        return;
    }
    for (k[c] = 0; k[c] <= S->count[c]; k[c]++) {
        list_ways(S, k, c + 1);
        if (meets(S, k))
            break; /* met without the later classes: more of class c is never fewest */
    }
    k[c] = 0;
}

/* True when state s plus way v stays within the class counts. */
static bool fits(const split *S, long s, long v)
{
    for (size_t c = 0; c < S->nclasses; c++)
        if ((s / S->stride[c]) % (S->count[c] + 1) + (v / S->stride[c]) % (S->count[c] + 1) >
            S->count[c])
            return false;
    return true;
}

keel_status keel_bound_split_possible(const keel_workload *w, keel_ratio t, bool *possible)
{
    *possible = true;
    if (!keel_measure_one_zone_each(w))
        return KEEL_OK;
    split S = {.a = t.num, .b = t.den};
    for (size_t n = 0; n < w->nnurses; n++) {
        if (!keel_workload_counted(w, n))
            continue;
        int high = w->max_high_acuity == KEEL_ABSENT || w->max_high_acuity > w->max_patients[n]
                       ? w->max_patients[n]
                       : w->max_high_acuity;
        size_t c = 0;
        while (c < S.nclasses &&
               (S.capacity[c] != w->capacity_minutes[n] || S.duty[c] != w->duty_minutes[n] ||
                S.limit[c] != w->max_patients[n]))
            c++;
        if (t.num * w->capacity_minutes[n] < (long long)w->duty_minutes[n] * t.den) {
            *possible = false; /* her duty alone is above t */
            return KEEL_OK;
        }
        if (c == S.nclasses) {
            if (c == SPLIT_CLASSES_MAX)
                return KEEL_OK;
            S.capacity[c] = w->capacity_minutes[n];
            S.duty[c] = w->duty_minutes[n];
            S.limit[c] = w->max_patients[n];
            S.high[c] = high;
            S.nclasses++;
        }
        S.count[c]++;
    }
    S.nstates = 1;
    for (size_t c = 0; c < S.nclasses; c++) {
        S.stride[c] = S.nstates;
        if (S.nstates > SPLIT_STATES_MAX / (S.count[c] + 1))
            return KEEL_OK;
        S.nstates *= S.count[c] + 1;
    }
    bool *reach = keel_calloc((size_t)S.nstates, sizeof *reach);
    bool *next = keel_calloc((size_t)S.nstates, sizeof *next);
    S.ways = keel_calloc((size_t)S.nstates, sizeof *S.ways);
    if (!reach || !next || !S.ways) {
        free(reach);
        free(next);
        free(S.ways);
        return KEEL_ERR_NOMEM;
    }
    reach[0] = true;
    bool open = false; /* the table grew too large: no answer */
    for (size_t z = 0; z < w->nzones && *possible && !open; z++) {
        S.need_care = S.need_places = S.need_high = 0;
        for (size_t p = 0; p < w->npatients; p++) {
            if (w->zone[p] != (int)z)
                continue;
            S.need_care += w->care_minutes[p];
            S.need_places++;
            S.need_high += w->high_acuity[p];
        }
        if (S.need_places == 0)
            continue;
        int k[SPLIT_CLASSES_MAX] = {0};
        S.nways = 0;
        list_ways(&S, k, 0);
        if (S.nways > 0 && S.nstates > SPLIT_WORK_MAX / S.nways) {
            open = true;
            break;
        }
        bool any = false;
        for (long s = 0; s < S.nstates; s++)
            next[s] = false;
        for (long s = 0; s < S.nstates; s++) {
            if (!reach[s])
                continue;
            for (long i = 0; i < S.nways; i++) {
                if (fits(&S, s, S.ways[i])) {
                    next[s + S.ways[i]] = true;
                    any = true;
                }
            }
        }
        bool *swap = reach;
        reach = next;
        next = swap;
        *possible = any;
    }
    if (open)
        *possible = true;
    free(reach);
    free(next);
    free(S.ways);
    return KEEL_OK;
}
