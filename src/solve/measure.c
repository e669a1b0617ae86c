/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * measure.c - the solver's shared measures (see measure.h): the bottom
 * layer of src/solve/, computed exactly from whole minutes.
 */
#include "measure.h"

#include <stdlib.h>
#include <string.h>

#include "alloc.h"
#include "rule.h"
#include "tally.h"

void keel_measure_loads(const keel_workload *w, const int *nurse_of, long long *load)
{
    for (size_t n = 0; n < w->nnurses; n++)
        load[n] = w->duty_minutes[n];
    for (size_t p = 0; p < w->npatients; p++)
        if (nurse_of[p] >= 0)
            load[nurse_of[p]] += w->care_minutes[p];
}

keel_ratio keel_measure_utilisation(const keel_workload *w, const int *nurse_of, size_t n)
{
    keel_ratio u = {w->duty_minutes[n], w->capacity_minutes[n]};
    for (size_t p = 0; p < w->npatients; p++)
        if (nurse_of[p] == (int)n)
            u.num += w->care_minutes[p];
    return u;
}

/* Heaviest (sign 1) or lightest (sign -1) utilisation of the counted nurses.
 * Sums each nurse's patients in turn so that it needs no memory. */
static keel_ratio extreme(const keel_workload *w, const int *nurse_of, int sign)
{
    keel_ratio best = {0, 1};
    bool any = false;
    for (size_t n = 0; n < w->nnurses; n++) {
        if (!keel_workload_counted(w, n))
            continue;
        keel_ratio u = keel_measure_utilisation(w, nurse_of, n);
        if (!any || keel_ratio_cmp(u, best) * sign > 0)
            best = u;
        any = true;
    }
    return best;
}

keel_ratio keel_measure_peak(const keel_workload *w, const int *nurse_of)
{
    return extreme(w, nurse_of, 1);
}

keel_ratio keel_measure_lift(const keel_workload *w, const int *nurse_of)
{
    return extreme(w, nurse_of, -1);
}

double keel_measure_squares(const keel_workload *w, const int *nurse_of)
{
    double sum = 0;
    for (size_t n = 0; n < w->nnurses; n++) {
        if (!keel_workload_counted(w, n))
            continue;
        long long load = w->duty_minutes[n];
        for (size_t p = 0; nurse_of && p < w->npatients; p++)
            load += nurse_of[p] == (int)n ? w->care_minutes[p] : 0;
        sum += (double)load * (double)load / w->capacity_minutes[n];
    }
    return sum;
}

double keel_measure_history(const keel_workload *w, const int *nurse_of, const double *weight)
{
    double sum = 0;
    for (size_t n = 0; n < w->nnurses; n++) {
        if (!keel_workload_counted(w, n))
            continue;
        long long load = w->duty_minutes[n];
        for (size_t p = 0; p < w->npatients; p++)
            load += nurse_of[p] == (int)n ? w->care_minutes[p] : 0;
        sum += weight[n] * (double)load / w->capacity_minutes[n];
    }
    return sum;
}

keel_status keel_measure_validate(const keel_workload *w, const int *nurse_of, bool *valid)
{
    keel_tally t;
    *valid = false;
    if (keel_tally_init(&t, w))
        return KEEL_ERR_NOMEM;
    /* Every rule only tightens as patients are added, so an assignment
     * keeps them all when each patient is admitted in turn. */
    bool ok = true;
    for (size_t p = 0; p < w->npatients && ok; p++) {
        ok = nurse_of[p] >= 0 && keelRuleAdmits(&t, p, (size_t)nurse_of[p]);
        if (ok)
            keel_tally_add(&t, p, (size_t)nurse_of[p]);
    }
    ok = ok && !keelRuleWhole(&t); /* the fewest patients, on the whole assignment */
    keel_tally_free(&t);
    *valid = ok;
    return KEEL_OK;
}

long long keel_measure_kept(const keel_workload *w, const int *nurse_of)
{
    long long kept = 0;
    for (size_t p = 0; p < w->npatients; p++)
        kept += w->previous[p] >= 0 && nurse_of[p] == w->previous[p];
    return kept;
}

/* Distinct values of key[] among each nurse's patients, summed over nurses. */
static long long distinct_per_nurse(const keel_workload *w, const int *nurse_of, const int *key)
{
    long long total = 0;
    for (size_t p = 0; p < w->npatients; p++) {
        if (key[p] < 0 || nurse_of[p] < 0)
            continue;
        bool seen = false;
        for (size_t q = 0; q < p && !seen; q++)
            seen = key[q] == key[p] && nurse_of[q] == nurse_of[p];
        total += !seen;
    }
    return total;
}

void keel_measure_spread(const keel_workload *w, const int *nurse_of, long long *zones,
                         long long *rooms)
{
    *zones = distinct_per_nurse(w, nurse_of, w->zone);
    *rooms = distinct_per_nurse(w, nurse_of, w->room);
}

bool keel_measure_alike(const keel_workload *w, size_t a, size_t b)
{
    return w->capacity_minutes[a] == w->capacity_minutes[b] &&
           w->duty_minutes[a] == w->duty_minutes[b] && keelRuleSameNurses(w, a, b);
}

bool keel_measure_one_zone_each(const keel_workload *w)
{
    if (w->max_zones != 1 || w->clocked || w->nzones < 2)
        return false;
    for (size_t p = 0; p < w->npatients; p++)
        if (w->zone[p] < 0)
            return false;
    return true;
}

void keel_measure_windows(const keel_workload *w, const keel_ratio *level, keel_ratio lift,
                          long long t, long long *lo, long long *hi)
{
    const long long S = KEEL_TOLERANCE_SCALE;
    for (size_t n = 0; n < w->nnurses; n++) {
        lo[n] = 0;
        hi[n] = -1;
        if (!keel_workload_counted(w, n))
            continue;
        keel_ratio peak = level[n];
        long long cap = w->capacity_minutes[n], duty = w->duty_minutes[n];
        hi[n] = keel_floor_div((peak.num * S + t * peak.den) * cap, peak.den * S) - duty;
        lo[n] = keel_ceil_div((lift.num * S - t * lift.den) * cap, lift.den * S) - duty;
        if (lo[n] < 0)
            lo[n] = 0;
    }
}

void keel_measure_classes_free(keel_classes *c)
{
    free(c->class_of);
    free(c->first);
    free(c->size);
    free(c->care);
    free(c->within);
}

bool keel_measure_classes(const keel_workload *w, keel_classes *c)
{
    size_t np = w->npatients, nn = w->nnurses;
    *c = (keel_classes){0};
    c->class_of = keel_calloc(np ? np : 1, sizeof *c->class_of);
    c->first = keel_calloc(np ? np : 1, sizeof *c->first);
    c->size = keel_calloc(np ? np : 1, sizeof *c->size);
    c->care = keel_calloc(np ? np : 1, sizeof *c->care);
    if (!c->class_of || !c->first || !c->size || !c->care)
        return false;
    for (size_t p = 0; p < np; p++) {
        size_t a = 0;
        while (a < c->k && memcmp(&w->eligible[p * nn], &w->eligible[c->first[a] * nn],
                                  nn * sizeof *w->eligible) != 0)
            a++;
        if (a == c->k)
            c->first[c->k++] = p;
        c->class_of[p] = a;
        c->size[a]++;
        c->care[a] += w->care_minutes[p];
    }
    c->within = keel_calloc(c->k > 0 ? c->k * c->k : 1, sizeof *c->within);
    if (!c->within)
        return false;
    for (size_t a = 0; a < c->k; a++)
        for (size_t b = 0; b < c->k; b++) {
            bool inside = true;
            for (size_t n = 0; n < nn && inside; n++)
                inside = !keel_workload_eligible(w, c->first[a], n) ||
                         keel_workload_eligible(w, c->first[b], n);
            c->within[a * c->k + b] = inside;
        }
    return true;
}

bool keel_measure_tabu_init(keel_tabu *tabu, size_t npatients, size_t size)
{
    tabu->size = size ? size : 1;
    tabu->at = 0;
    tabu->ring = keel_calloc(tabu->size, sizeof *tabu->ring);
    tabu->latest = keel_calloc(npatients ? npatients : 1, sizeof *tabu->latest);
    return tabu->ring && tabu->latest;
}

void keel_measure_tabu_free(keel_tabu *tabu)
{
    free(tabu->ring);
    free(tabu->latest);
    memset(tabu, 0, sizeof *tabu);
}

void keel_measure_tabu_set(keel_tabu *tabu, size_t p, size_t n, long until)
{
    tabu->ring[tabu->at % tabu->size] = (keel_tabu_entry){.p = p, .n = n, .until = until};
    tabu->at++;
    if (until > tabu->latest[p])
        tabu->latest[p] = until;
}

bool keel_measure_tabu_allows(const keel_tabu *tabu, size_t p, size_t n, long step)
{
    if (tabu->latest[p] <= step)
        return true;
    size_t kept = tabu->at < tabu->size ? tabu->at : tabu->size;
    for (size_t k = 1; k <= kept; k++) {
        const keel_tabu_entry *e = &tabu->ring[(tabu->at - k) % tabu->size];
        if (e->p == p && e->n == n)
            return e->until <= step;
    }
    return true;
}
