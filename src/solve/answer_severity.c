/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * answer_severity.c - the least severity of breaking the rules: the
 * best-effort plan (`--best-effort`) for a roster with no valid assignment,
 * and, with severity 0 a valid assignment and a proven least above 0 a
 * proof that none exists, the last answerer of the valid chain.
 *
 * Each patient goes to one counted nurse who is on throughout it, x[p, n]
 * binary, every such pair allowed; a pair that breaks a competency, a lock
 * or an avoid list costs those rules' severities (keelRulePairSeverity()).
 * Every other rule adds its rows weighed (rule_*.c, R->soft): its slack
 * costs the rule's severity per unit broken (docs/model.md, "Best effort").
 * Far below any rule, 0.1 times the heaviest utilisation U, so that among
 * plans of equal severity the most even is taken:
 *
 *   minimise  sum severity + 0.1 U
 *   sum_n x[p, n] = 1
 *   the rules' weighed rows, per nurse (and moment)
 *   duty(n) + sum_p care(p) x[p, n] <= U capacity(n)
 *
 * With the clock a part goes only to a nurse on throughout it and keeps the
 * nurse of the part before it while she is on (the hand_off rows are kept,
 * not weighed).
 */
#include <limits.h>
#include <stdlib.h>
#include <string.h>

#include "alloc.h"
#include "answer.h"
#include "budget.h"
#include "lp.h"
#include "measure.h"
#include "rule.h"

#define EVENNESS_WEIGHT 0.1

typedef struct best_model {
    const keel_roster *r;
    const keel_workload *w;
    keel_lp *lp;
    int *col;      /* [npatients * nnurses]: column of x[p, n], or 0 */
    int *rcol;     /* [npatients]: one nurse's columns, for the rules' rows */
    size_t *rpart; /* [npatients] */
    double *rmost; /* [npatients]: all 1 */
    int *ocol;     /* [npatients]: another nurse's columns, for the UNIT rules' rows */
} best_model;

/* True when nurse n is on throughout part p. */
static bool on_throughout(const keel_workload *w, size_t p, size_t n)
{
    return w->nurse_start[n] <= w->part_start[p] && w->nurse_end[n] >= w->part_end[p];
}

/* Nurse n's columns of parts covering moment mo (-1: every part) into
 * col (and, when given, the parts into part and 1 into most); returns how
 * many. */
static size_t columns(const best_model *m, size_t n, int mo, int *col, size_t *part, double *most)
{
    const keel_workload *w = m->w;
    size_t k = 0;
    for (size_t p = 0; p < w->npatients; p++) {
        int j = m->col[p * w->nnurses + n];
        if (!j || (mo >= 0 && (w->first_moment[p] > mo || mo >= w->last_moment[p])))
            continue;
        col[k] = j;
        if (part) {
            part[k] = p;
            most[k] = 1.0;
        }
        k++;
    }
    return k;
}

static size_t other_columns(const keel_rows *R, size_t n)
{
    return columns(R->model, n, R->moment, R->ocol, NULL, NULL);
}

/* Nurse n's columns of parts covering moment mo (-1: every part). */
static keel_rows nurse_rows(best_model *m, size_t n, int mo)
{
    const keel_workload *w = m->w;
    size_t k = columns(m, n, mo, m->rcol, m->rpart, m->rmost);
    return (keel_rows){.lp = m->lp,
                       .w = w,
                       .n = n,
                       .moment = mo,
                       .ncols = k,
                       .col = m->rcol,
                       .part = m->rpart,
                       .most = m->rmost,
                       .soft = true,
                       .census = (double)w->npatients,
                       .others = other_columns,
                       .ocol = m->ocol,
                       .model = m};
}

/* Builds the model; returns the column of U. */
static int build(best_model *m)
{
    const keel_workload *w = m->w;
    keel_lp *lp = m->lp;
    size_t np = w->npatients, nn = w->nnurses;
    for (size_t p = 0; p < np; p++)
        for (size_t n = 0; n < nn; n++)
            m->col[p * nn + n] =
                keel_workload_counted(w, n) && on_throughout(w, p, n)
                    ? keel_lp_col(lp, KEEL_LP_BINARY, 0.0, 1.0, keelRulePairSeverity(m->r, w, p, n))
                    : 0;
    for (size_t n = 0; n < nn; n++) {
        keel_rows all = nurse_rows(m, n, -1);
        keelRuleRows(&all, KEEL_SCOPE_CLOCK);
    }
    int peak = keel_lp_col(lp, KEEL_LP_CONTINUOUS, 0.0, 1e6, EVENNESS_WEIGHT);
    for (size_t p = 0; p < np; p++) {
        int once = keel_lp_row(lp, KEEL_LP_FX, 1.0, 1.0);
        for (size_t n = 0; n < nn; n++)
            keel_lp_put(lp, once, m->col[p * nn + n], 1.0);
    }
    for (size_t n = 0; n < nn; n++) {
        if (!keel_workload_counted(w, n))
            continue;
        for (size_t mo = 0; mo < w->nmoments; mo++) {
            keel_rows R = nurse_rows(m, n, w->clocked ? (int)mo : -1);
            keelRuleRows(&R, KEEL_SCOPE_MOMENT);
            keelRuleRows(&R, KEEL_SCOPE_UNIT);
        }
        keel_rows all = nurse_rows(m, n, -1);
        keelRuleRows(&all, KEEL_SCOPE_SHIFT);
        int load = keel_lp_row(lp, KEEL_LP_UP, 0.0, -(double)w->duty_minutes[n]);
        for (size_t p = 0; p < np; p++)
            keel_lp_put(lp, load, m->col[p * nn + n], (double)w->care_minutes[p]);
        keel_lp_put(lp, load, peak, -(double)w->capacity_minutes[n]);
    }
    return peak;
}

keel_status keel_answer_severity_plan(const keel_roster *r, const keel_workload *w,
                                      long long deadline_ms, int *nurse_of, bool *found,
                                      long *severity, bool *proven, keel_error *err)
{
    size_t np = w->npatients, nn = w->nnurses;
    *found = false;
    *proven = false;
    bool any = false;
    for (size_t n = 0; n < nn; n++)
        any = any || keel_workload_counted(w, n);
    long long left = deadline_ms - keel_budget_now();
    if (!any || np == 0)
        return KEEL_OK;
    if (left < 1 && !r)
        return KEEL_OK; /* a feasibility question out of time stays open */
    long time_limit_ms = left < KEEL_BUDGET_BEST_EFFORT_MIN_MS ? KEEL_BUDGET_BEST_EFFORT_MIN_MS
                         : left > LONG_MAX                     ? LONG_MAX
                                                               : (long)left;
    best_model m = {.r = r, .w = w};
    m.lp = keel_lp_new(false);
    m.col = keel_calloc(np * nn, sizeof *m.col);
    m.rcol = keel_calloc(np, sizeof *m.rcol);
    m.rpart = keel_calloc(np, sizeof *m.rpart);
    m.rmost = keel_calloc(np, sizeof *m.rmost);
    m.ocol = keel_calloc(np, sizeof *m.ocol);
    keel_status rc = KEEL_OK;
    if (!m.lp || !m.col || !m.rcol || !m.rpart || !m.rmost || !m.ocol) {
        rc = keel_error_add(err, KEEL_ERR_NOMEM, NULL, 0, 0, NULL, "out of memory");
        goto out;
    }
    int peak = build(&m);
    keel_lp_result res;
    rc = keel_lp_solve(m.lp, time_limit_ms, NULL, &res, err);
    if (rc || (res.outcome != KEEL_LP_OPTIMAL && res.outcome != KEEL_LP_FEASIBLE))
        goto out;
    for (size_t p = 0; p < np; p++) {
        nurse_of[p] = -1;
        for (size_t n = 0; n < nn; n++)
            if (m.col[p * nn + n] && keel_lp_value(m.lp, m.col[p * nn + n]) > 0.5)
                nurse_of[p] = (int)n;
    }
    *found = true;
    *severity = (long)(res.value - EVENNESS_WEIGHT * keel_lp_value(m.lp, peak) + 0.5);
    *proven = res.outcome == KEEL_LP_OPTIMAL;
out:
    keel_lp_free(m.lp);
    free(m.col);
    free(m.rcol);
    free(m.rpart);
    free(m.rmost);
    free(m.ocol);
    return rc;
}

keel_status keel_answer_severity(const keel_question *q, long long deadline_ms, int *nurse_of,
                                 keel_answer *answer, keel_error *err)
{
    bool found = false, proven = false, valid = false;
    long severity = 0;
    *answer = KEEL_ANSWER_UNKNOWN;
    keel_status rc = keel_answer_severity_plan(NULL, q->w, deadline_ms, nurse_of, &found,
                                               &severity, &proven, err);
    if (!rc && found && severity == 0 && keel_measure_validate(q->w, nurse_of, &valid))
        rc = keel_error_add(err, KEEL_ERR_NOMEM, NULL, 0, 0, NULL, "out of memory");
    if (!rc && found && severity == 0 && valid)
        *answer = KEEL_ANSWER_YES;
    else if (!rc && proven && severity > 0)
        *answer = KEEL_ANSWER_NO;
    return rc;
}
