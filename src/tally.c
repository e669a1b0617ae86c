/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * tally.c - per-nurse counts behind the rules that join patients; see
 * tally.h.
 */
#include "tally.h"

#include <stdlib.h>
#include <string.h>

#include "alloc.h"

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

/* True when taking part p from nurse n would split p from the nurse of the
 * part before it, or the part after it from n, while that nurse is on. */
static bool splits(const keel_tally *t, size_t p, size_t n)
{
    const keel_workload *w = t->w;
    size_t first = (size_t)w->first_part[w->patient[p]];
    size_t end = (size_t)w->first_part[w->patient[p] + 1];
    if (p > first) {
        int before = t->nurse_of[p - 1];
        if (before >= 0 && before != (int)n && keel_workload_keeps(w, p, before))
            return true;
    }
    if (p + 1 < end) {
        int after = t->nurse_of[p + 1];
        if (after >= 0 && after != (int)n && keel_workload_keeps(w, p + 1, (int)n))
            return true;
    }
    return false;
}

/* The count limit n would break at moment m by taking p, or NULL. */
static const char *breaks_at(const keel_tally *t, size_t p, size_t n, size_t m)
{
    const keel_workload *w = t->w;
    size_t slot = n * w->nmoments + m;
    int after = t->count[slot] + 1;
    if (after > w->max_patients[n])
        return w->clocked ? "moment_limit"
               : w->law_limit != KEEL_ABSENT && w->max_patients[n] == w->law_limit
                   ? "law_limit"
                   : "patient_limit";
    if (after > w->ratio_limit[p] || after > keel_tally_tightest(t, n, m))
        return w->clocked ? "moment_limit" : "patient_ratio";
    if (w->high_acuity[p] && w->max_high_acuity != KEEL_ABSENT &&
        t->high[slot] + 1 > w->max_high_acuity)
        return "high_acuity";
    if ((w->side[p] == KEEL_SIDE_PROTECTIVE && t->sides[slot * 3 + KEEL_SIDE_INFECTIOUS] > 0) ||
        (w->side[p] == KEEL_SIDE_INFECTIOUS && t->sides[slot * 3 + KEEL_SIDE_PROTECTIVE] > 0))
        return "isolation";
    if (w->max_zones != KEEL_ABSENT && w->zone[p] >= 0 &&
        t->in_zone[slot * w->nzones + (size_t)w->zone[p]] == 0 && t->zones[slot] + 1 > w->max_zones)
        return "zones";
    return NULL;
}

const char *keel_tally_breaks(const keel_tally *t, size_t p, size_t n)
{
    const keel_workload *w = t->w;
    if (!keel_workload_eligible(w, p, n))
        return "skill"; /* eligibility: the caller names the precise reason */
    if (w->clocked && splits(t, p, n))
        return "hand_off";
    if (t->care[n] + w->care_minutes[p] > w->max_care[n])
        return "capacity";
    for (int m = w->first_moment[p]; m < w->last_moment[p]; m++) {
        const char *rule = breaks_at(t, p, n, (size_t)m);
        if (rule)
            return rule;
    }
    return NULL;
}

bool keel_tally_short(const keel_tally *t)
{
    for (size_t n = 0; n < t->w->nnurses; n++)
        if (keel_tally_most(t, n) < t->w->min_patients[n])
            return true;
    return false;
}

bool keel_tally_admits_instead(keel_tally *t, size_t p, size_t q, size_t n)
{
    keel_tally_remove(t, q, n);
    bool ok = keel_tally_admits(t, p, n);
    keel_tally_add(t, q, n);
    return ok;
}
