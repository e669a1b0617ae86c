/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * stage_balance.c - the balance stages in the order of objectives, on one
 * workload: under policy.balance peak, stage 1 "peak" (budget.c's "peak"
 * share of the time), then, with the exact method and a proven peak, stage
 * "ranks" (its share of what is left) and stage 2 "lift" with the peak and
 * the ranks held; under squares, stage 1 "squares" alone.  The
 * orchestrator calls it for the unit (with the levels), the zone methods
 * for each zone alone (without).
 */
#include "budget.h"
#include "stage.h"

/* Every counted nurse's ceiling at the plan's peak. */
static void level_at_peak(const keel_workload *w, const int *nurse_of, keel_ratio *level)
{
    keel_ratio peak = keel_measure_peak(w, nurse_of);
    for (size_t n = 0; level && n < w->nnurses; n++)
        level[n] = peak;
}

keel_status keel_stage_balance(const keel_workload *w, bool exact, long long deadline_ms,
                               keel_solution *sol, keel_ratio *level, keel_error *err)
{
    if (w->balance == KEEL_BALANCE_SQUARES) {
        sol->nstages = 1;
        keel_status rc =
            keel_stage_squares(w, exact, deadline_ms, sol->nurse_of, &sol->stages[0], err);
        level_at_peak(w, sol->nurse_of, level);
        return rc;
    }
    keel_search *S = keel_stage_search_new(w);
    if (!S)
        return keel_error_add(err, KEEL_ERR_NOMEM, NULL, 0, 0, NULL, "out of memory");
    sol->nstages = 0;
    keel_stage *peak = &sol->stages[sol->nstages++];
    peak->name = "peak";
    long long peak_deadline =
        exact ? keel_budget_until(KEEL_SHARE_PEAK, keel_budget_now(), deadline_ms, 0) : deadline_ms;
    keel_status rc = keel_stage_peak(S, exact, peak_deadline, sol->nurse_of, peak, err);
    if (!rc && exact && level && peak->status == KEEL_SOLVE_OPTIMAL) {
        long long ranks_deadline =
            keel_budget_until(KEEL_SHARE_RANKS, keel_budget_now(), deadline_ms, 0);
        rc = keel_stage_ranks(S, keel_measure_peak(w, sol->nurse_of), ranks_deadline, sol->nurse_of,
                              level, &sol->stages[sol->nstages], sol, err);
        sol->nstages += !rc && sol->ranks;
    }
    if (!rc)
        rc = keel_stage_lift(S, exact, deadline_ms, sol->nurse_of, &sol->stages[sol->nstages++],
                             err);
    if (!sol->ranks)
        level_at_peak(w, sol->nurse_of, level);
    keel_stage_search_free(S);
    return rc;
}
