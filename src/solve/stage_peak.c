/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * stage_peak.c - stage 1 "peak": minimise U, the heaviest utilisation of
 * the counted nurses.
 *
 * Exact: the bisection of stage_search.c over the candidate utilisations
 * between the proven floor and the incumbent, each candidate t asked as
 * the window question "every nurse at or under t" (each nurse's window is
 * the largest care sum she can reach at or under t).  On pooled units with
 * one zone per nurse, the candidates the zone-split floor (bound_split.c)
 * rules out are skipped first.  The budgets at the best peak found are
 * kept in the search for stage 2.
 *
 * Greedy: the local descent, which asks the local search (answer_local.c)
 * again and again for every counted nurse strictly below the plan's peak,
 * for a share of the time (budget.c's "descent"); the bound is the simple
 * floor (bound_simple.c).
 */
#include <stdlib.h>
#include <string.h>

#include "alloc.h"
#include "answer.h"
#include "bound.h"
#include "budget.h"
#include "stage_search.h"

/* Stage 1 positions: candidate i itself, smallest first. */
static void peak_windows(keel_search *S, size_t i)
{
    for (size_t n = 0; n < S->w->nnurses; n++) {
        S->lo[n] = 0;
        if (keel_workload_counted(S->w, n))
            S->hi[n] = keel_stage_search_below(S, n, S->cand[i]);
    }
}

static size_t peak_position(const keel_search *S, const int *assignment)
{
    return keel_stage_search_first_at_least(S, keel_measure_peak(S->w, assignment));
}

/* The first candidate below position hi that the zone-split floor does not
 * rule out; candidates before it are proven out. */
static keel_status split_start(const keel_search *S, size_t hi, size_t *lo)
{
    size_t a = 0, b = hi; /* the first possible position is in [a, b] */
    *lo = 0;
    if (!keel_measure_one_zone_each(S->w))
        return KEEL_OK;
    while (a < b) {
        size_t mid = a + (b - a) / 2;
        bool possible = true;
        keel_status rc = keel_bound_split_possible(S->w, S->cand[mid], &possible);
        if (rc)
            return rc;
        if (possible)
            b = mid;
        else
            a = mid + 1;
    }
    *lo = a;
    return KEEL_OK;
}

static keel_status exact_peak(keel_search *S, long long deadline_ms, int *best, keel_stage *st,
                              keel_error *err)
{
    static const keel_direction down = {peak_windows, peak_position, true};
    const keel_workload *w = S->w;
    long long started = keel_budget_now();
    keel_ratio incumbent = keel_measure_peak(w, best), floor = keel_bound_simple_peak(w);
    for (size_t n = 0; n < w->nnurses; n++) {
        S->lo[n] = 0;
        S->hi[n] = -1;
        if (!keel_workload_counted(w, n))
            continue;
        /* No nurse carries more than the incumbent's peak allows. */
        long long smax =
            incumbent.num * w->capacity_minutes[n] / incumbent.den - w->duty_minutes[n];
        if (keel_stage_search_sums(S, n, smax))
            return keel_error_add(err, KEEL_ERR_NOMEM, NULL, 0, 0, NULL, "out of memory");
        S->hi[n] = S->sums[n].smax;
    }
    if (keel_stage_search_candidates(S, S->hi, floor, incumbent))
        return keel_error_add(err, KEEL_ERR_NOMEM, NULL, 0, 0, NULL, "out of memory");
    S->calls = 0;
    size_t proven_lo = 0, hi = S->ncand ? peak_position(S, best) : 0;
    size_t lo = 0;
    keel_status rc = split_start(S, hi, &lo);
    if (rc)
        return keel_error_add(err, rc, NULL, 0, 0, NULL, "out of memory");
    rc = keel_stage_search_descend(S, &down, lo, hi, deadline_ms, best, &proven_lo, err);
    if (rc)
        return rc;
    keel_ratio value = keel_measure_peak(w, best);
    bool proven = S->ncand == 0 || keel_ratio_cmp(S->cand[proven_lo], value) >= 0;
    keel_stage_search_finish(st, value, S->ncand ? S->cand[proven_lo] : floor, proven, S->calls,
                             started);
    /* Hold stage 1: the budgets at the best peak found. */
    for (size_t n = 0; n < w->nnurses; n++)
        S->peak_hi[n] = keel_workload_counted(w, n) ? keel_stage_search_below(S, n, value) : -1;
    return KEEL_OK;
}

/* Lowers the heaviest utilisation of nurse_of (which keeps every rule) by
 * the local search, asking each time for every counted nurse strictly below
 * the plan's peak, until it finds none or deadline_ms passes. */
static keel_status descent(const keel_workload *w, long long deadline_ms, int *nurse_of,
                           keel_error *err)
{
    size_t np = w->npatients, nn = w->nnurses;
    long long *lo = keel_calloc(nn ? nn : 1, sizeof *lo),
              *hi = keel_calloc(nn ? nn : 1, sizeof *hi);
    int *trial = keel_calloc(np ? np : 1, sizeof *trial);
    keel_status rc = lo && hi && trial ? KEEL_OK : KEEL_ERR_NOMEM;
    if (rc)
        keel_error_add(err, rc, NULL, 0, 0, NULL, "out of memory");
    keel_answer answer = KEEL_ANSWER_YES;
    while (!rc && answer == KEEL_ANSWER_YES && keel_budget_now() < deadline_ms) {
        /* Every counted nurse strictly below the plan's heaviest utilisation. */
        keel_ratio peak = keel_measure_peak(w, nurse_of);
        for (size_t n = 0; n < nn; n++) {
            long long cap = w->capacity_minutes[n];
            hi[n] = keel_workload_counted(w, n)
                        ? (peak.num * cap + peak.den - 1) / peak.den - 1 - w->duty_minutes[n]
                        : 0;
        }
        keel_question q = {.w = w, .lo = lo, .hi = hi, .start = nurse_of};
        rc = keel_answer_local(&q, deadline_ms, trial, &answer, err);
        if (!rc && answer == KEEL_ANSWER_YES)
            memcpy(nurse_of, trial, np * sizeof *nurse_of);
    }
    free(lo);
    free(hi);
    free(trial);
    return rc;
}

keel_status keel_stage_peak(keel_search *S, bool exact, long long deadline_ms, int *nurse_of,
                            keel_stage *st, keel_error *err)
{
    const keel_workload *w = S->w;
    st->name = "peak";
    if (exact)
        return exact_peak(S, deadline_ms, nurse_of, st, err);
    long long now = keel_budget_now();
    keel_status rc =
        descent(w, keel_budget_until(KEEL_SHARE_DESCENT, now, deadline_ms, 0), nurse_of, err);
    if (rc)
        return rc;
    keel_ratio peak = keel_measure_peak(w, nurse_of), floor = keel_bound_simple_peak(w);
    double u = keel_ratio_value(peak);
    *st = (keel_stage){.name = "peak",
                       .status = keel_ratio_cmp(peak, floor) <= 0 ? KEEL_SOLVE_OPTIMAL
                                                                  : KEEL_SOLVE_HEURISTIC,
                       .value = u,
                       .bound = keel_ratio_value(floor),
                       .gap = keel_gap(u, keel_ratio_value(floor))};
    return KEEL_OK;
}
