/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * stage_keep.c - stage 3 "continuity": the most patients kept with their
 * previous nurse, within the balance tolerance of stages 1 and 2
 * (keel_measure_windows()):
 *
 *   care(n) <= floor((U* + t) capacity(n)) - duty(n)
 *   care(n) >= ceil((L* - t) capacity(n)) - duty(n)
 *
 * computed exactly (U*, L* are fractions of whole minutes, t is kept in
 * millionths).  From the assignment it is given, greedy moves and swaps
 * toward the previous nurse; then, with the exact method, GLPK (the KEEP
 * goal of answer_ilp.c) with its share of the time.  What the tolerance
 * bought is measured too: the continuity optimum at zero tolerance, from the
 * balanced assignment, first.
 */
#include <limits.h>
#include <stdlib.h>
#include <string.h>

#include "alloc.h"
#include "answer.h"
#include "budget.h"
#include "rule.h"
#include "sort.h"
#include "stage.h"
#include "tally.h"

/* Moves and swaps toward the previous nurse that keep every rule and window;
 * each one keeps one more patient, so the loop ends. */
static keel_status greedy_keep(const keel_workload *w, const long long *lo, const long long *hi,
                               int *nurse_of, keel_error *err)
{
    keel_tally t;
    if (keel_tally_init(&t, w))
        return keel_error_add(err, KEEL_ERR_NOMEM, NULL, 0, 0, NULL, "out of memory");
    keel_tally_fill(&t, nurse_of);
    bool changed = true;
    while (changed) {
        changed = false;
        for (size_t p = 0; p < w->npatients; p++) {
            int v = w->previous[p], a = nurse_of[p];
            if (v < 0 || a == v || !keel_workload_eligible(w, p, (size_t)v))
                continue;
            size_t to = (size_t)v, from = (size_t)a;
            long long c = w->care_minutes[p];
            if (t.care[to] + c <= hi[to] && t.care[from] - c >= lo[from] &&
                keelRuleMinMayGive(&t, from) && keelRuleAdmits(&t, p, to)) {
                keel_tally_remove(&t, p, from);
                keel_tally_add(&t, p, to);
                nurse_of[p] = v;
                changed = true;
                continue;
            }
            /* Swap with a patient of v that v does not keep. */
            for (size_t q = 0; q < w->npatients; q++) {
                if (nurse_of[q] != v || w->previous[q] == v || w->previous[q] == a ||
                    !keel_workload_eligible(w, q, from))
                    continue;
                long long d = c - w->care_minutes[q];
                if (t.care[to] + d > hi[to] || t.care[to] + d < lo[to] ||
                    t.care[from] - d > hi[from] || t.care[from] - d < lo[from])
                    continue;
                if (!keelRuleAdmitsInstead(&t, p, q, to) || !keelRuleAdmitsInstead(&t, q, p, from))
                    continue;
                keel_tally_remove(&t, p, from);
                keel_tally_remove(&t, q, to);
                keel_tally_add(&t, p, to);
                keel_tally_add(&t, q, from);
                nurse_of[p] = v;
                nurse_of[q] = a;
                changed = true;
                break;
            }
        }
    }
    keel_tally_free(&t);
    return KEEL_OK;
}

/* A simple upper limit on the patients kept: per previous nurse v, her
 * patients she may take, the lightest first, as many as fit her window
 * hi[v] and (without the clock) her patient limit; cares has room for
 * every patient. */
static long long keep_ceiling(const keel_workload *w, const long long *hi, long long *cares)
{
    long long total = 0;
    for (size_t v = 0; v < w->nnurses; v++) {
        size_t k = 0;
        for (size_t p = 0; p < w->npatients; p++)
            if (w->previous[p] == (int)v && keel_workload_eligible(w, p, v))
                cares[k++] = w->care_minutes[p];
        qsort(cares, k, sizeof *cares, keelSortCompareLongLong);
        long long sum = 0, most = keel_workload_counted(w, v) ? hi[v] : LLONG_MAX;
        size_t fit = 0;
        while (fit < k && sum + cares[fit] <= most &&
               (w->clocked || fit < (size_t)w->max_patients[v]))
            sum += cares[fit++];
        total += (long long)fit;
    }
    return total;
}

/* Asks GLPK for the most patients kept inside the windows, from best;
 * adopts its answer when it keeps more and tightens *bound by its proof. */
static keel_status ask_glpk(const keel_workload *w, const long long *lo, const long long *hi,
                            long long deadline_ms, int *best, int *trial, long long *bound,
                            int *calls, keel_error *err)
{
    long long left = deadline_ms - keel_budget_now();
    if (left <= 0 || keel_measure_kept(w, best) >= *bound)
        return KEEL_OK; /* out of time, or at the ceiling already */
    keel_question q = {.w = w, .lo = lo, .hi = hi, .start = best};
    keel_goal_result res;
    (*calls)++;
    keel_status rc = keel_answer_ilp_goal(&q, KEEL_GOAL_KEEP, 0, (long)left, trial, &res, err);
    if (rc || res.answer != KEEL_ANSWER_YES)
        return rc;
    if (res.bound < *bound)
        *bound = res.bound;
    if (keel_measure_kept(w, trial) > keel_measure_kept(w, best))
        memcpy(best, trial, w->npatients * sizeof *best);
    return KEEL_OK;
}

keel_status keel_stage_keep(const keel_workload *w, bool exact, const keel_ratio *level,
                            keel_ratio lift, long long deadline_ms, int *nurse_of, keel_stage *st,
                            keel_solution *sol, long long *kept, keel_error *err)
{
    size_t nn = w->nnurses, np = w->npatients;
    long long started = keel_budget_now();
    long long *lo = keel_calloc(nn ? nn : 1, sizeof *lo);
    long long *hi = keel_calloc(nn ? nn : 1, sizeof *hi);
    int *trial = keel_calloc(np ? np : 1, sizeof *trial);
    int *balanced = keel_calloc(np ? np : 1, sizeof *balanced);
    long long *cares = keel_calloc(np ? np : 1, sizeof *cares);
    keel_status rc = KEEL_OK;
    if (!lo || !hi || !trial || !balanced || !cares) {
        rc = keel_error_add(err, KEEL_ERR_NOMEM, NULL, 0, 0, NULL, "out of memory");
        goto out;
    }
    memcpy(balanced, nurse_of, np * sizeof *balanced);
    int calls = 0;
    sol->continuity.applies = true;
    sol->continuity.candidates = (long)w->ncontinuity;
    sol->continuity.kept_at_zero = -1;
    /* At zero tolerance first, from the balanced assignment. */
    keel_measure_windows(w, level, lift, 0, lo, hi);
    long long zero_bound = keep_ceiling(w, hi, cares);
    if (w->tolerance > 0 && exact) {
        long long mid = keel_budget_until(KEEL_SHARE_KEEP_ZERO, started, deadline_ms, 0);
        if ((rc = greedy_keep(w, lo, hi, balanced, err)) ||
            (rc = ask_glpk(w, lo, hi, mid, balanced, trial, &zero_bound, &calls, err)))
            goto out;
        sol->continuity.kept_at_zero = (long)keel_measure_kept(w, balanced);
        sol->continuity.zero_proven = sol->continuity.kept_at_zero == zero_bound;
    }
    keel_measure_windows(w, level, lift, w->tolerance, lo, hi);
    long long bound = keep_ceiling(w, hi, cares);
    if (w->tolerance > 0 && exact)
        memcpy(nurse_of, balanced, np * sizeof *balanced);
    if ((rc = greedy_keep(w, lo, hi, nurse_of, err)))
        goto out;
    if (exact && (rc = ask_glpk(w, lo, hi, deadline_ms, nurse_of, trial, &bound, &calls, err)))
        goto out;
    *kept = keel_measure_kept(w, nurse_of);
    if (w->tolerance == 0) {
        sol->continuity.kept_at_zero = (long)*kept;
        sol->continuity.zero_proven = *kept == bound;
    }
    sol->continuity.kept = (long)*kept;
    *st = (keel_stage){.name = "continuity",
                       .status = *kept == bound ? KEEL_SOLVE_OPTIMAL
                                 : exact        ? KEEL_SOLVE_TIME_LIMIT
                                                : KEEL_SOLVE_HEURISTIC,
                       .value = (double)*kept,
                       .bound = (double)bound,
                       .gap = keel_gap((double)*kept, (double)bound),
                       .solver_calls = calls,
                       .seconds = (double)(keel_budget_now() - started) / 1000.0};
out:
    free(lo);
    free(hi);
    free(trial);
    free(balanced);
    free(cares);
    return rc;
}
