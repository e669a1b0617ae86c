/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * stage_search.c - the exact method proves the best balance by asking
 * yes/no questions about a finite list of candidate utilisations.
 *
 * Loads are whole minutes, so a nurse's utilisation can only take the values
 * (duty + s) / capacity where s is a sum of care minutes of at most limit(n)
 * patients the nurse may take (with the clock, of any parts she may take);
 * a small dynamic programme per nurse lists those sums.  Stage 1 ("peak",
 * stage_peak.c) sorts the candidate values between the proven floor and the
 * incumbent and asks, at a candidate t, "is there an assignment in which
 * every nurse's care stays within the largest reachable sum that keeps the
 * nurse at or under t?".  Yes gives a better incumbent; a proven no moves
 * the proven bound past t.  When bound and incumbent meet, the optimum is
 * proven, without waiting for an LP relaxation to close the gap.  Stage 2
 * ("lift", stage_lift.c) asks the same upwards for the lightest
 * utilisation with every budget of stage 1 held.
 *
 * Each question goes to the window chain of answerers (answer.c).
 * Questions are time-boxed while the search narrows the range (budget.c's
 * "question" share), so one hard question cannot stall it; at the end the
 * decisive question (just below the incumbent) gets all the time that is
 * left.
 */
#include "stage_search.h"

#include <limits.h>
#include <stdlib.h>
#include <string.h>

#include "alloc.h"
#include "answer.h"
#include "budget.h"
#include "heur.h"

keel_search *keel_stage_search_new(const keel_workload *w)
{
    size_t nn = w->nnurses;
    keel_search *S = keel_calloc(1, sizeof *S);
    if (!S)
        return NULL;
    S->w = w;
    S->sums = keel_calloc(nn ? nn : 1, sizeof *S->sums);
    S->lo = keel_calloc(nn ? nn : 1, sizeof *S->lo);
    S->hi = keel_calloc(nn ? nn : 1, sizeof *S->hi);
    S->peak_hi = keel_calloc(nn ? nn : 1, sizeof *S->peak_hi);
    S->held = keel_calloc(nn ? nn : 1, sizeof *S->held);
    S->trial = keel_calloc(w->npatients ? w->npatients : 1, sizeof *S->trial);
    if (!S->sums || !S->lo || !S->hi || !S->peak_hi || !S->held || !S->trial) {
        keel_stage_search_free(S);
        return NULL;
    }
    return S;
}

void keel_stage_search_free(keel_search *S)
{
    if (!S)
        return;
    for (size_t n = 0; S->sums && n < S->w->nnurses; n++)
        free(S->sums[n].reach);
    free(S->sums);
    free(S->lo);
    free(S->hi);
    free(S->peak_hi);
    free(S->held);
    free(S->trial);
    free(S->cand);
    free(S);
}

/* True when nurses a and b may take the same patients. */
keel_status keel_stage_search_sums(keel_search *S, size_t n, long long smax)
{
    const keel_workload *w = S->w;
    keel_sums *out = &S->sums[n];
    if (smax < 0)
        smax = -1;
    free(out->reach);
    out->smax = smax;
    size_t size = (size_t)(smax + 1) + 1;
    out->reach = keel_calloc(size, sizeof *out->reach);
    /* With the clock the limit holds per moment, not on the parts over the
     * shift: any number of parts may add up. */
    int most = w->clocked ? INT_MAX - 1 : w->max_patients[n];
    out->most = most;
    if (!out->reach)
        return KEEL_ERR_NOMEM;
    /* A nurse alike (the same patients, the same limit) with sums at least
     * as far: the sums up to smax are hers (each sum's fewest patients
     * depends only on the smaller sums).  A unit has few kinds of nurse. */
    for (size_t m = 0; m < n; m++) {
        const keel_sums *o = &S->sums[m];
        if (o->reach && o->most == most && o->smax >= smax && keel_workload_same_column(w, m, n)) {
            if (smax >= 0)
                memcpy(out->reach, o->reach, (size_t)(smax + 1) * sizeof *out->reach);
            return KEEL_OK;
        }
    }
    int *fewest = keel_malloc(size * sizeof *fewest);
    if (!out->reach || !fewest) {
        free(fewest);
        return KEEL_ERR_NOMEM;
    }
    for (long long s = 0; s <= smax; s++)
        fewest[s] = s == 0 ? 0 : INT_MAX;
    for (size_t p = 0; p < w->npatients; p++) {
        if (!keel_workload_eligible(w, p, n))
            continue;
        long long c = w->care_minutes[p];
        for (long long s = smax; s >= c; s--)
            if (fewest[s - c] != INT_MAX && fewest[s - c] + 1 < fewest[s])
                fewest[s] = fewest[s - c] + 1;
    }
    for (long long s = 0; s <= smax; s++)
        out->reach[s] = fewest[s] <= most;
    free(fewest);
    return KEEL_OK;
}

long long keel_stage_search_below(const keel_search *S, size_t n, keel_ratio t)
{
    const keel_workload *w = S->w;
    for (long long s = S->sums[n].smax; s >= 0; s--) {
        keel_ratio u = {w->duty_minutes[n] + s, w->capacity_minutes[n]};
        if (S->sums[n].reach[s] && keel_ratio_cmp(u, t) <= 0)
            return s;
    }
    return -1;
}

long long keel_stage_search_above(const keel_search *S, size_t n, keel_ratio t, long long limit)
{
    const keel_workload *w = S->w;
    for (long long s = 0; s <= limit && s <= S->sums[n].smax; s++) {
        keel_ratio u = {w->duty_minutes[n] + s, w->capacity_minutes[n]};
        if (S->sums[n].reach[s] && keel_ratio_cmp(u, t) >= 0)
            return s;
    }
    return -1;
}

static int ratio_order(const void *a, const void *b)
{
    return keel_ratio_cmp(*(const keel_ratio *)a, *(const keel_ratio *)b);
}

keel_status keel_stage_search_candidates(keel_search *S, const long long *limit, keel_ratio from,
                                         keel_ratio to)
{
    const keel_workload *w = S->w;
    size_t total = 1;
    for (size_t n = 0; n < w->nnurses; n++)
        if (keel_workload_counted(w, n) && limit[n] >= 0)
            total += (size_t)(limit[n] + 1);
    free(S->cand);
    S->ncand = 0;
    S->cand = keel_malloc(total * sizeof *S->cand);
    if (!S->cand)
        return KEEL_ERR_NOMEM;
    for (size_t n = 0; n < w->nnurses; n++) {
        if (!keel_workload_counted(w, n))
            continue;
        for (long long s = 0; s <= limit[n]; s++) {
            keel_ratio u = {w->duty_minutes[n] + s, w->capacity_minutes[n]};
            if (S->sums[n].reach[s] && keel_ratio_cmp(u, from) >= 0 && keel_ratio_cmp(u, to) <= 0)
                S->cand[S->ncand++] = u;
        }
    }
    qsort(S->cand, S->ncand, sizeof *S->cand, ratio_order);
    size_t k = 0;
    for (size_t i = 0; i < S->ncand; i++)
        if (k == 0 || keel_ratio_cmp(S->cand[i], S->cand[k - 1]) != 0)
            S->cand[k++] = S->cand[i];
    S->ncand = k;
    return KEEL_OK;
}

size_t keel_stage_search_first_at_least(const keel_search *S, keel_ratio t)
{
    size_t a = 0, b = S->ncand;
    while (a < b) {
        size_t m = a + (b - a) / 2;
        if (keel_ratio_cmp(S->cand[m], t) < 0)
            a = m + 1;
        else
            b = m;
    }
    return a;
}

keel_status keel_stage_search_descend(keel_search *S, const keel_direction *d, size_t lo, size_t hi,
                                      long long deadline_ms, int *best, size_t *proven_lo,
                                      keel_error *err)
{
    const keel_workload *w = S->w;
    size_t soft = lo; /* below soft, questions were left unanswered */
    S->incumbent = best;
    keel_status rc = KEEL_OK;
    while (lo < hi) {
        long long now = keel_budget_now();
        if (now >= deadline_ms)
            break;
        bool decisive = soft >= hi;
        size_t q = decisive ? hi - 1 : soft + (hi - soft) / 2;
        long long limit =
            decisive ? deadline_ms : keel_budget_until(KEEL_SHARE_QUESTION, now, deadline_ms, 0);
        keel_answer answer;
        d->set_windows(S, q);
        keel_question question = {.w = w, .lo = S->lo, .hi = S->hi, .start = S->incumbent,
                                  .calls = &S->calls, .min_kept = S->min_kept};
        rc = keel_answer_ask(KEEL_CHAIN_WINDOW, &question, limit, S->trial, &answer, err);
        if (rc)
            break;
        if (answer == KEEL_ANSWER_YES) {
            if (d->improve && S->min_kept == 0) {
                rc = keel_heur_greedy_improve(w, S->trial, deadline_ms);
                if (rc) {
                    keel_error_add(err, rc, NULL, 0, 0, NULL, "out of memory");
                    break;
                }
            }
            memcpy(best, S->trial, w->npatients * sizeof *best);
            hi = d->position_of(S, best);
            if (soft > hi)
                soft = hi;
        } else if (answer == KEEL_ANSWER_NO) {
            lo = q + 1;
            if (soft < lo)
                soft = lo;
        } else if (decisive) {
            break; /* the time limit came first */
        } else {
            soft = q + 1;
        }
    }
    *proven_lo = lo;
    return rc;
}

void keel_stage_search_finish(keel_stage *st, keel_ratio value, keel_ratio bound, bool proven,
                              int calls, long long started)
{
    st->value = keel_ratio_value(value);
    st->bound = keel_ratio_value(proven ? value : bound);
    st->gap = proven ? 0.0 : keel_gap(st->value, st->bound);
    st->status = proven ? KEEL_SOLVE_OPTIMAL : KEEL_SOLVE_TIME_LIMIT;
    st->solver_calls = calls;
    st->seconds = (double)(keel_budget_now() - started) / 1000.0;
}
