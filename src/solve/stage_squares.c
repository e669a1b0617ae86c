/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * stage_squares.c - stage 1 under policy.balance squares: minimise the sum
 * of load^2 / capacity over the counted nurses (a convex measure that
 * pulls every load toward the average, not only the heaviest).
 *
 * Exact: GLPK on the class model with unit segments (answer_ilp.c), from
 * the incumbent; GLPK works in floating point, so its optimum is taken when
 * it proves one and the bound is never above the value.  Greedy: the
 * plan's sum, with every nurse at her duty as the floor.
 */
#include <stdlib.h>
#include <string.h>

#include "alloc.h"
#include "answer.h"
#include "budget.h"
#include "stage.h"

keel_status keel_stage_squares(const keel_workload *w, bool exact, long long deadline_ms,
                               int *nurse_of, keel_stage *st, keel_error *err)
{
    double value = keel_measure_squares(w, nurse_of), bound = keel_measure_squares(w, NULL);
    if (!exact) {
        *st = (keel_stage){.name = "squares",
                           .status = value <= bound ? KEEL_SOLVE_OPTIMAL : KEEL_SOLVE_HEURISTIC,
                           .value = value,
                           .bound = bound,
                           .gap = keel_gap(value, bound)};
        return KEEL_OK;
    }
    size_t nn = w->nnurses, np = w->npatients;
    long long started = keel_budget_now(), total = 0;
    long long *lo = keel_calloc(nn ? nn : 1, sizeof *lo),
              *hi = keel_calloc(nn ? nn : 1, sizeof *hi);
    int *trial = keel_calloc(np ? np : 1, sizeof *trial);
    keel_status rc = KEEL_OK;
    if (!lo || !hi || !trial) {
        rc = keel_error_add(err, KEEL_ERR_NOMEM, NULL, 0, 0, NULL, "out of memory");
        goto out;
    }
    for (size_t p = 0; p < np; p++)
        total += w->care_minutes[p];
    for (size_t n = 0; n < nn; n++)
        hi[n] = total;
    keel_question q = {.w = w, .lo = lo, .hi = hi, .start = nurse_of};
    keel_goal_result res;
    rc = keel_answer_ilp_goal(&q, KEEL_GOAL_SQUARES, 0, (long)(deadline_ms - started), trial, &res,
                              err);
    if (rc)
        goto out;
    if (res.answer == KEEL_ANSWER_YES) {
        if (keel_measure_squares(w, trial) < value) {
            memcpy(nurse_of, trial, np * sizeof *trial);
            value = keel_measure_squares(w, nurse_of);
        }
        if (res.squares_bound > bound)
            bound = res.squares_bound;
    }
    bool proven = res.answer == KEEL_ANSWER_YES && res.proven;
    if (proven || bound > value)
        bound = value;
    *st = (keel_stage){.name = "squares",
                       .status = proven ? KEEL_SOLVE_OPTIMAL : KEEL_SOLVE_TIME_LIMIT,
                       .value = value,
                       .bound = bound,
                       .gap = keel_gap(value, bound),
                       .solver_calls = 1,
                       .seconds = (double)(keel_budget_now() - started) / 1000.0};
out:
    free(lo);
    free(hi);
    free(trial);
    return rc;
}
