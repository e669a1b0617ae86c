/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * stage_lift.c - stage 2 "lift": with every counted nurse held at stage 1's
 * budget, raise L, the lightest utilisation.
 *
 * Exact: the greedy lift first (moves and swaps that raise the lightest
 * within the budgets), then the bisection of stage_search.c upwards over
 * the candidates between the incumbent's lightest and the unit's average,
 * each candidate l asked as "every nurse at or over l, at or under her
 * budget".  Greedy: the plan's lightest, with the unit's average as bound.
 */
#include "alloc.h"
#include "bound.h"
#include "budget.h"
#include "heur.h"
#include "stage_search.h"

/* Stage 2 positions: candidate ncand - 1 - i, largest first. */
static void lift_windows(keel_search *S, size_t i)
{
    keel_ratio t = S->cand[S->ncand - 1 - i];
    for (size_t n = 0; n < S->w->nnurses; n++) {
        if (!keel_workload_counted(S->w, n))
            continue;
        S->hi[n] = S->peak_hi[n];
        S->lo[n] = keel_stage_search_above(S, n, t, S->peak_hi[n]);
    }
}

static size_t lift_position(const keel_search *S, const int *assignment)
{
    size_t i = keel_stage_search_first_at_least(S, keel_measure_lift(S->w, assignment));
    return S->ncand - 1 - (i < S->ncand ? i : S->ncand - 1);
}

static keel_status exact_lift(keel_search *S, long long deadline_ms, int *best, keel_stage *st,
                              keel_error *err)
{
    static const keel_direction up = {lift_windows, lift_position, false};
    const keel_workload *w = S->w;
    long long started = keel_budget_now();
    if (S->min_kept == 0 && keel_heur_greedy_lift(w, S->peak_hi, best))
        return keel_error_add(err, KEEL_ERR_NOMEM, NULL, 0, 0, NULL, "out of memory");
    keel_ratio incumbent = keel_measure_lift(w, best), ceiling = keel_bound_simple_lift(w);
    if (keel_stage_search_candidates(S, S->peak_hi, incumbent, ceiling))
        return keel_error_add(err, KEEL_ERR_NOMEM, NULL, 0, 0, NULL, "out of memory");
    S->calls = 0;
    size_t proven_lo = 0, hi = S->ncand ? lift_position(S, best) : 0;
    keel_status rc = keel_stage_search_descend(S, &up, 0, hi, deadline_ms, best, &proven_lo, err);
    if (rc)
        return rc;
    keel_ratio value = keel_measure_lift(w, best);
    keel_ratio bound = S->ncand ? S->cand[S->ncand - 1 - proven_lo] : ceiling;
    keel_stage_search_finish(st, value, bound, keel_ratio_cmp(bound, value) <= 0, S->calls,
                             started);
    return KEEL_OK;
}

keel_status keel_stage_lift(keel_search *S, bool exact, long long deadline_ms, int *nurse_of,
                            keel_stage *st, keel_error *err)
{
    const keel_workload *w = S->w;
    st->name = "lift";
    if (exact)
        return exact_lift(S, deadline_ms, nurse_of, st, err);
    keel_ratio lift = keel_measure_lift(w, nurse_of), ceiling = keel_bound_simple_lift(w);
    double l = keel_ratio_value(lift);
    *st = (keel_stage){
        .name = "lift",
        .status = keel_ratio_cmp(lift, ceiling) >= 0 ? KEEL_SOLVE_OPTIMAL : KEEL_SOLVE_HEURISTIC,
        .value = l,
        .bound = keel_ratio_value(ceiling),
        .gap = keel_gap(l, keel_ratio_value(ceiling))};
    return KEEL_OK;
}

keel_status keel_stage_lift_under(const keel_workload *w, keel_ratio cap, long long deadline_ms,
                                  int *nurse_of, keel_stage *st, keel_error *err)
{
    keel_search *S = keel_stage_search_new(w);
    keel_status rc = S ? KEEL_OK : KEEL_ERR_NOMEM;
    for (size_t n = 0; !rc && n < w->nnurses; n++) {
        S->peak_hi[n] = -1;
        if (!keel_workload_counted(w, n))
            continue;
        long long smax = cap.num * w->capacity_minutes[n] / cap.den - w->duty_minutes[n];
        rc = keel_stage_search_sums(S, n, smax);
        if (!rc)
            S->peak_hi[n] = keel_stage_search_below(S, n, cap);
    }
    if (rc)
        rc = keel_error_add(err, KEEL_ERR_NOMEM, NULL, 0, 0, NULL, "out of memory");
    else
        rc = exact_lift(S, deadline_ms, nurse_of, st, err);
    st->name = "lift";
    keel_stage_search_free(S);
    return rc;
}
