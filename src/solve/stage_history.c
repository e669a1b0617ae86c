/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * stage_history.c - stage 5 "fairness forward" (keel assign --history):
 * among the plans that keep stages 1-4, the least sum over counted nurses
 * of weight(n) x load(n) / capacity(n), where weight(n) is how heavily the
 * nurse was loaded over the history (keel_audit_history_weights()), so
 * that heavier loads go to nurses who recently carried less.
 *
 * Held: every counted nurse inside the balance windows (the same windows
 * continuity and proximity use), at least min_kept patients with their
 * previous nurse, and proximity's (census + 1) zones + rooms at most what
 * stage 4 reached.  The proven floor without GLPK: each nurse at the
 * bottom of her window.  With the exact method GLPK (the HISTORY goal of
 * answer_ilp.c) starts from the incumbent and gets the rest of the time.
 */
#include <stdlib.h>
#include <string.h>

#include "alloc.h"
#include "answer.h"
#include "budget.h"
#include "stage.h"

/* The objective with every counted nurse at the bottom of her window: a
 * proven floor, the weights being non-negative. */
static double floor_of(const keel_workload *w, const double *weight, const long long *lo)
{
    double sum = 0;
    for (size_t n = 0; n < w->nnurses; n++) {
        if (!keel_workload_counted(w, n))
            continue;
        long long care = lo[n] > 0 ? lo[n] : 0;
        sum += weight[n] * (double)(w->duty_minutes[n] + care) / w->capacity_minutes[n];
    }
    return sum;
}

keel_status keel_stage_history(const keel_workload *w, const double *weight, bool exact,
                               const keel_ratio *level, keel_ratio lift, long long min_kept,
                               long long most_near, long long deadline_ms, int *nurse_of,
                               keel_stage *st, keel_error *err)
{
    size_t nn = w->nnurses, np = w->npatients;
    long long started = keel_budget_now();
    long long *lo = keel_calloc(nn ? nn : 1, sizeof *lo);
    long long *hi = keel_calloc(nn ? nn : 1, sizeof *hi);
    int *trial = keel_calloc(np ? np : 1, sizeof *trial);
    keel_status rc = KEEL_OK;
    if (!lo || !hi || !trial) {
        rc = keel_error_add(err, KEEL_ERR_NOMEM, NULL, 0, 0, NULL, "out of memory");
        goto out;
    }
    keel_measure_windows(w, level, lift, w->tolerance, lo, hi);
    double value = keel_measure_history(w, nurse_of, weight);
    double bound = floor_of(w, weight, lo);
    bool proven = value <= bound + 1e-9;
    int calls = 0;
    long long left = deadline_ms - keel_budget_now();
    if (!proven && exact && left > 0) {
        keel_question q = {.w = w,
                           .lo = lo,
                           .hi = hi,
                           .start = nurse_of,
                           .weight = weight,
                           .most_near = most_near};
        keel_goal_result res;
        calls++;
        rc = keel_answer_ilp_goal(&q, KEEL_GOAL_HISTORY, min_kept, (long)left, trial, &res, err);
        if (rc)
            goto out;
        if (res.answer == KEEL_ANSWER_YES) {
            double found = keel_measure_history(w, trial, weight);
            if (found < value - 1e-9) {
                memcpy(nurse_of, trial, np * sizeof *nurse_of);
                value = found;
            }
            if (res.history_bound > bound)
                bound = res.history_bound;
            proven = res.proven;
        }
        proven = proven || value <= bound + 1e-9;
    }
    *st = (keel_stage){.name = "history",
                       .status = proven  ? KEEL_SOLVE_OPTIMAL
                                 : exact ? KEEL_SOLVE_TIME_LIMIT
                                         : KEEL_SOLVE_HEURISTIC,
                       .value = value,
                       .bound = proven ? value : bound,
                       .solver_calls = calls,
                       .seconds = (double)(keel_budget_now() - started) / 1000.0};
    st->gap = keel_gap(st->value, st->bound);
out:
    free(lo);
    free(hi);
    free(trial);
    return rc;
}
