/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * heur_greedy.c - the greedy placement: heaviest patient first to the eligible
 * nurse with room whose utilisation after taking the patient is lowest
 * (Graham's LPT rule, in utilisation), then improving moves and swaps.
 *
 * A patient left without a nurse is then placed by a chain of ejections
 * (an augmenting path, as in bipartite matching, each step checked by the
 * tally).  When patients are still left and policy.max_zones binds, the
 * placement starts over with a home zone chosen for each nurse first
 * (heur_homes.c) and each zoned patient placed within its zone's nurses.
 *
 * It gives the incumbent the exact method starts from, the start of
 * `--method greedy`, and a check in tests.  Every placement, move and swap
 * keeps every rule (keelRuleBreaks() tests each step through the tally).
 * Improvement accepts a move or swap between nurses a and b only when it
 * lowers max(u_a, u_b) strictly, so the sorted vector of utilisations falls
 * lexicographically and the search ends.
 */
#include <stdlib.h>

#include "alloc.h"
#include "budget.h"
#include "heur.h"
#include "measure.h"
#include "rule.h"
#include "tally.h"
#include "workload_internal.h"

/* Places each unplaced patient of order, as in the file's head comment;
 * with home, only with a nurse whose home is the patient's zone (unzoned
 * patients with anyone). */
static void place(const keel_workload *w, keel_tally *t, const size_t *order, size_t count,
                  const int *home, long long *load, int *nurse_of)
{
    for (size_t k = 0; k < count; k++) {
        size_t p = order[k];
        if (nurse_of[p] >= 0)
            continue;
        int best = -1;
        keel_ratio best_u = {0, 1};
        for (size_t n = 0; n < w->nnurses; n++) {
            if (home && w->zone[p] >= 0 && home[n] != w->zone[p])
                continue;
            if (!keelRuleAdmits(t, p, n))
                continue;
            keel_ratio u = {load[n] + w->care_minutes[p], w->capacity_minutes[n]};
            if (best < 0 || keel_ratio_cmp(u, best_u) < 0) {
                best = (int)n;
                best_u = u;
            }
        }
        if (best < 0)
            continue;
        nurse_of[p] = best;
        load[best] += w->care_minutes[p];
        keel_tally_add(t, p, (size_t)best);
    }
}

/* Finds a nurse for patient x by a chain of ejections (an augmenting path
 * as in bipartite matching, every step checked by the tally): some nurse
 * takes x directly, or takes x in place of a patient q for whom the same
 * search goes on.  Each nurse is tried once per search (seen).  True when
 * x has a nurse; the tally, loads and nurse_of then hold the whole chain. */
static bool chain_for(const keel_workload *w, keel_tally *t, size_t x, bool *seen, long long *load,
                      int *nurse_of)
{
    for (size_t n = 0; n < w->nnurses; n++)
        if (!seen[n] && keelRuleAdmits(t, x, n)) {
            keel_tally_add(t, x, n);
            load[n] += w->care_minutes[x];
            nurse_of[x] = (int)n;
            return true;
        }
    for (size_t n = 0; n < w->nnurses; n++) {
        if (seen[n] || !keel_workload_eligible(w, x, n))
            continue;
        seen[n] = true;
        for (size_t q = 0; q < w->npatients; q++) {
            if (nurse_of[q] != (int)n || !keelRuleAdmitsInstead(t, x, q, n))
                continue;
            keel_tally_remove(t, q, n);
            keel_tally_add(t, x, n);
            nurse_of[q] = -1;
            if (chain_for(w, t, q, seen, load, nurse_of)) {
                load[n] += w->care_minutes[x] - w->care_minutes[q];
                nurse_of[x] = (int)n;
                return true;
            }
            keel_tally_remove(t, x, n);
            keel_tally_add(t, q, n);
            nurse_of[q] = (int)n;
        }
    }
    return false;
}

/* Places what it can of the unplaced patients, directly or (without the
 * clock, where parts are tied to the nurse before them) by chains of
 * ejections. */
static bool repair(const keel_workload *w, keel_tally *t, const size_t *order, long long *load,
                   int *nurse_of)
{
    place(w, t, order, w->npatients, NULL, load, nurse_of);
    if (w->clocked)
        return true;
    bool *seen = keel_malloc((w->nnurses + 1) * sizeof *seen);
    if (!seen)
        return false;
    for (size_t k = 0; k < w->npatients; k++) {
        if (nurse_of[order[k]] >= 0)
            continue;
        for (size_t n = 0; n < w->nnurses; n++)
            seen[n] = false;
        chain_for(w, t, order[k], seen, load, nurse_of);
    }
    free(seen);
    return true;
}

static void start_over(const keel_workload *w, keel_tally *t, long long *load, int *nurse_of)
{
    for (size_t p = 0; p < w->npatients; p++)
        nurse_of[p] = -1;
    for (size_t n = 0; n < w->nnurses; n++)
        load[n] = w->duty_minutes[n];
    keel_tally_fill(t, nurse_of);
}

static bool all_placed(const keel_workload *w, const int *nurse_of)
{
    for (size_t p = 0; p < w->npatients; p++)
        if (nurse_of[p] < 0)
            return false;
    return true;
}

keel_status keel_heur_greedy_place(const keel_workload *w, int *nurse_of, bool *placed_all)
{
    size_t np = w->npatients, nn = w->nnurses;
    size_t *order = keel_malloc((np ? np : 1) * sizeof *order);
    long long *load = keel_calloc(nn + 1, sizeof *load);
    int *home = keel_malloc((nn + 1) * sizeof *home);
    keel_tally t;
    keel_status rc = keel_tally_init(&t, w);
    *placed_all = false;
    if (rc)
        goto out;
    if (!order || !load || !home || keel_workload_order(w, order)) {
        rc = KEEL_ERR_NOMEM;
        goto free_tally;
    }
    start_over(w, &t, load, nurse_of);
    bool ok = repair(w, &t, order, load, nurse_of);
    /* Stuck on the zones: choose each nurse's zone first, then place. */
    if (ok && !all_placed(w, nurse_of) && w->zones_rule) {
        ok = keel_heur_homes(w, home);
        if (ok) {
            start_over(w, &t, load, nurse_of);
            place(w, &t, order, np, home, load, nurse_of);
            ok = repair(w, &t, order, load, nurse_of);
        }
    }
    *placed_all = all_placed(w, nurse_of);
    if (!ok)
        rc = KEEL_ERR_NOMEM;
free_tally:
    keel_tally_free(&t);
out:
    free(order);
    free(load);
    free(home);
    return rc;
}

static keel_ratio worse(keel_ratio a, keel_ratio b)
{
    return keel_ratio_cmp(a, b) >= 0 ? a : b;
}

/* Tries every move of one of a's patients to b; applies the first that
 * lowers the pair's peak.  Returns true when it applied one. */
static bool try_move(const keel_workload *w, int *nurse_of, long long *load, keel_tally *t,
                     size_t a, size_t b)
{
    keel_ratio before = worse((keel_ratio){load[a], w->capacity_minutes[a]},
                              (keel_ratio){load[b], w->capacity_minutes[b]});
    if (!keelRuleMinMayGive(t, a))
        return false;
    for (int i = keel_tally_first(t, a); i >= 0; i = keel_tally_next(t, (size_t)i)) {
        size_t p = (size_t)i;
        if (!keelRuleAdmits(t, p, b))
            continue;
        int c = w->care_minutes[p];
        keel_ratio after = worse((keel_ratio){load[a] - c, w->capacity_minutes[a]},
                                 (keel_ratio){load[b] + c, w->capacity_minutes[b]});
        if (keel_ratio_cmp(after, before) < 0) {
            nurse_of[p] = (int)b;
            load[a] -= c;
            load[b] += c;
            keel_tally_remove(t, p, a);
            keel_tally_add(t, p, b);
            return true;
        }
    }
    return false;
}

/* Tries every swap of a patient of a with a patient of b; applies the first
 * that lowers the pair's peak. */
static bool try_swap(const keel_workload *w, int *nurse_of, long long *load, keel_tally *t,
                     size_t a, size_t b)
{
    keel_ratio before = worse((keel_ratio){load[a], w->capacity_minutes[a]},
                              (keel_ratio){load[b], w->capacity_minutes[b]});
    for (int i = keel_tally_first(t, a); i >= 0; i = keel_tally_next(t, (size_t)i)) {
        size_t p = (size_t)i;
        if (!keel_workload_eligible(w, p, b))
            continue;
        for (int j = keel_tally_first(t, b); j >= 0; j = keel_tally_next(t, (size_t)j)) {
            size_t q = (size_t)j;
            if (!keel_workload_eligible(w, q, a))
                continue;
            long long d = (long long)w->care_minutes[p] - w->care_minutes[q];
            if (d == 0)
                continue;
            if (w->joined_rules &&
                (!keelRuleAdmitsInstead(t, p, q, b) || !keelRuleAdmitsInstead(t, q, p, a)))
                continue;
            keel_ratio after = worse((keel_ratio){load[a] - d, w->capacity_minutes[a]},
                                     (keel_ratio){load[b] + d, w->capacity_minutes[b]});
            if (keel_ratio_cmp(after, before) < 0) {
                nurse_of[p] = (int)b;
                nurse_of[q] = (int)a;
                load[a] -= d;
                load[b] += d;
                keel_tally_remove(t, p, a);
                keel_tally_remove(t, q, b);
                keel_tally_add(t, p, b);
                keel_tally_add(t, q, a);
                return true;
            }
        }
    }
    return false;
}

keel_status keel_heur_greedy_improve(const keel_workload *w, int *nurse_of, long long deadline_ms)
{
    size_t nn = w->nnurses;
    long long *load = keel_calloc(nn, sizeof *load);
    keel_tally t;
    if (!load || keel_tally_init(&t, w)) {
        free(load);
        return KEEL_ERR_NOMEM;
    }
    keel_measure_loads(w, nurse_of, load);
    keel_tally_fill(&t, nurse_of);
    bool improved = true;
    while (improved) {
        improved = false;
        for (size_t a = 0; a < nn; a++) {
            if (!keel_workload_counted(w, a))
                continue;
            if (keel_budget_now() >= deadline_ms) {
                improved = false; /* out of time: the plan so far keeps every rule */
                break;
            }
            for (size_t b = 0; b < nn; b++) {
                if (a == b || !keel_workload_counted(w, b))
                    continue;
                /* Only the heavier of the pair can give work away usefully. */
                if (keel_ratio_cmp((keel_ratio){load[a], w->capacity_minutes[a]},
                                   (keel_ratio){load[b], w->capacity_minutes[b]}) <= 0)
                    continue;
                while (try_move(w, nurse_of, load, &t, a, b) ||
                       try_swap(w, nurse_of, load, &t, a, b))
                    improved = true;
            }
        }
    }
    free(load);
    keel_tally_free(&t);
    return KEEL_OK;
}

/* Tries to raise the lightest counted nurse b: a move of one patient to b,
 * or a swap that gives b more care, keeping every nurse within hi[] and
 * every rule, and leaving both nurses above b's old utilisation.  Returns
 * true when it applied one. */
static bool lift_once(const keel_workload *w, const long long *hi, int *nurse_of, long long *load,
                      keel_tally *t)
{
    size_t nn = w->nnurses, b = nn;
    for (size_t n = 0; n < nn; n++)
        if (keel_workload_counted(w, n) &&
            (b == nn || keel_ratio_cmp((keel_ratio){load[n], w->capacity_minutes[n]},
                                       (keel_ratio){load[b], w->capacity_minutes[b]}) < 0))
            b = n;
    if (b == nn)
        return false;
    keel_ratio low = {load[b], w->capacity_minutes[b]};
    for (size_t p = 0; p < w->npatients; p++) {
        int a = nurse_of[p];
        if (a < 0 || (size_t)a == b || !keel_workload_eligible(w, p, b))
            continue;
        long long c = w->care_minutes[p];
        keel_ratio after_a = {load[a] - c, w->capacity_minutes[a]};
        if (t->care[b] + c <= hi[b] && keel_ratio_cmp(after_a, low) > 0 &&
            keelRuleMinMayGive(t, (size_t)a) && keelRuleAdmits(t, p, b)) {
            nurse_of[p] = (int)b;
            load[a] -= c;
            load[b] += c;
            keel_tally_remove(t, p, (size_t)a);
            keel_tally_add(t, p, b);
            return true;
        }
        for (int j = keel_tally_first(t, b); j >= 0; j = keel_tally_next(t, (size_t)j)) {
            size_t q = (size_t)j;
            long long d = c - w->care_minutes[q];
            if (d <= 0 || !keel_workload_eligible(w, q, (size_t)a))
                continue;
            keel_ratio swapped_a = {load[a] - d, w->capacity_minutes[a]};
            if (t->care[b] + d > hi[b] || keel_ratio_cmp(swapped_a, low) <= 0)
                continue;
            if (!keelRuleAdmitsInstead(t, p, q, b) ||
                !keelRuleAdmitsInstead(t, q, p, (size_t)a))
                continue;
            nurse_of[p] = (int)b;
            nurse_of[q] = a;
            load[a] -= d;
            load[b] += d;
            keel_tally_remove(t, p, (size_t)a);
            keel_tally_remove(t, q, b);
            keel_tally_add(t, p, b);
            keel_tally_add(t, q, (size_t)a);
            return true;
        }
    }
    return false;
}

keel_status keel_heur_greedy_lift(const keel_workload *w, const long long *hi, int *nurse_of)
{
    long long *load = keel_calloc(w->nnurses ? w->nnurses : 1, sizeof *load);
    keel_tally t;
    if (!load || keel_tally_init(&t, w)) {
        free(load);
        return KEEL_ERR_NOMEM;
    }
    keel_measure_loads(w, nurse_of, load);
    keel_tally_fill(&t, nurse_of);
    /* Each step raises the lowest utilisation or the number of nurses at
     * it falls, so the sorted vector rises and the loop ends. */
    while (lift_once(w, hi, nurse_of, load, &t))
        ;
    free(load);
    keel_tally_free(&t);
    return KEEL_OK;
}
