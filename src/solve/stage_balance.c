/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * stage_balance.c - the balance stages in the order of objectives, on one
 * workload: under policy.balance peak, stage 1 "peak" (budget.c's "peak"
 * share of the time) then stage 2 "lift" with the peak held; under
 * squares, stage 1 "squares" alone.  The orchestrator calls it for the
 * unit, the zone methods for each zone alone.
 */
#include "budget.h"
#include "stage.h"

keel_status keel_stage_balance(const keel_workload *w, bool exact, long long deadline_ms,
                               keel_solution *sol, keel_error *err)
{
    if (w->balance == KEEL_BALANCE_SQUARES) {
        sol->nstages = 1;
        return keel_stage_squares(w, exact, deadline_ms, sol->nurse_of, &sol->stages[0], err);
    }
    keel_search *S = keel_stage_search_new(w);
    if (!S)
        return keel_error_add(err, KEEL_ERR_NOMEM, NULL, 0, 0, NULL, "out of memory");
    sol->nstages = 2;
    sol->stages[0].name = "peak";
    sol->stages[1].name = "lift";
    long long peak_deadline =
        exact ? keel_budget_until(KEEL_SHARE_PEAK, keel_budget_now(), deadline_ms, 0) : deadline_ms;
    keel_status rc = keel_stage_peak(S, exact, peak_deadline, sol->nurse_of, &sol->stages[0], err);
    if (!rc)
        rc = keel_stage_lift(S, exact, deadline_ms, sol->nurse_of, &sol->stages[1], err);
    keel_stage_search_free(S);
    return rc;
}
