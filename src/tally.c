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
    size_t nn = w->nnurses ? w->nnurses : 1;
    memset(t, 0, sizeof *t);
    t->w = w;
    t->count = keel_calloc(nn, sizeof *t->count);
    t->care = keel_calloc(nn, sizeof *t->care);
    t->high = keel_calloc(nn, sizeof *t->high);
    t->sides = keel_calloc(nn * 3, sizeof *t->sides);
    t->zones = keel_calloc(nn, sizeof *t->zones);
    t->in_zone = keel_calloc(nn * (w->nzones ? w->nzones : 1), sizeof *t->in_zone);
    t->at_ratio = keel_calloc(nn * (w->npatients + 1), sizeof *t->at_ratio);
    if (!t->count || !t->care || !t->high || !t->sides || !t->zones || !t->in_zone ||
        !t->at_ratio) {
        keel_tally_free(t);
        return KEEL_ERR_NOMEM;
    }
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
    memset(t, 0, sizeof *t);
}

void keel_tally_fill(keel_tally *t, const int *nurse_of)
{
    const keel_workload *w = t->w;
    size_t nn = w->nnurses;
    memset(t->count, 0, nn * sizeof *t->count);
    memset(t->care, 0, nn * sizeof *t->care);
    memset(t->high, 0, nn * sizeof *t->high);
    memset(t->sides, 0, nn * 3 * sizeof *t->sides);
    memset(t->zones, 0, nn * sizeof *t->zones);
    memset(t->in_zone, 0, nn * w->nzones * sizeof *t->in_zone);
    memset(t->at_ratio, 0, nn * (w->npatients + 1) * sizeof *t->at_ratio);
    for (size_t p = 0; p < w->npatients; p++)
        if (nurse_of[p] >= 0)
            keel_tally_add(t, p, (size_t)nurse_of[p]);
}

static void change(keel_tally *t, size_t p, size_t n, int d)
{
    const keel_workload *w = t->w;
    t->count[n] += d;
    t->care[n] += d * w->care_minutes[p];
    t->high[n] += d * w->high_acuity[p];
    t->sides[n * 3 + (size_t)w->side[p]] += d;
    t->at_ratio[n * (w->npatients + 1) + (size_t)w->ratio_limit[p]] += d;
    if (w->zone[p] >= 0) {
        int *in = &t->in_zone[n * w->nzones + (size_t)w->zone[p]];
        if ((*in == 0 && d > 0) || (*in == 1 && d < 0))
            t->zones[n] += d;
        *in += d;
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

int keel_tally_tightest(const keel_tally *t, size_t n)
{
    const keel_workload *w = t->w;
    const int *at = &t->at_ratio[n * (w->npatients + 1)];
    for (size_t r = 1; r < w->npatients; r++)
        if (at[r] > 0)
            return (int)r;
    return (int)w->npatients;
}

const char *keel_tally_breaks(const keel_tally *t, size_t p, size_t n)
{
    const keel_workload *w = t->w;
    int after = t->count[n] + 1;
    if (!keel_workload_eligible(w, p, n))
        return "skill"; /* eligibility: the caller names the precise reason */
    if (after > w->max_patients[n])
        return w->law_limit != KEEL_ABSENT && w->max_patients[n] == w->law_limit ? "law_limit"
                                                                                 : "patient_limit";
    if (after > w->ratio_limit[p] || after > keel_tally_tightest(t, n))
        return "patient_ratio";
    if (w->high_acuity[p] && w->max_high_acuity != KEEL_ABSENT &&
        t->high[n] + 1 > w->max_high_acuity)
        return "high_acuity";
    if ((w->side[p] == KEEL_SIDE_PROTECTIVE && t->sides[n * 3 + KEEL_SIDE_INFECTIOUS] > 0) ||
        (w->side[p] == KEEL_SIDE_INFECTIOUS && t->sides[n * 3 + KEEL_SIDE_PROTECTIVE] > 0))
        return "isolation";
    if (w->max_zones != KEEL_ABSENT && w->zone[p] >= 0 &&
        t->in_zone[n * w->nzones + (size_t)w->zone[p]] == 0 && t->zones[n] + 1 > w->max_zones)
        return "zones";
    return NULL;
}

bool keel_tally_admits_instead(keel_tally *t, size_t p, size_t q, size_t n)
{
    keel_tally_remove(t, q, n);
    bool ok = keel_tally_admits(t, p, n);
    keel_tally_add(t, q, n);
    return ok;
}
