/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * stage_ranks.c - stage "ranks": balance beyond a pinned peak.
 *
 * Stage 1 proves U*, the least heaviest utilisation.  A nurse is pinned at
 * a level V when every valid assignment that keeps the levels already held
 * has her at V (she cannot go lower, and the levels keep her from going
 * higher): a window question with her budget strictly below V and every
 * other nurse at her held level says no.  Then the ranks go down by levels:
 *
 *   V = U*, every counted nurse free, held at most V
 *   repeat:
 *     the free nurses at V in the plan that are pinned there are held at
 *     V for good (ranks 1, 2, ... of the sorted utilisations);
 *     none pinned: stop;
 *     V' = the least heaviest utilisation of the free nurses, the held
 *     ones at their levels (the bisection of stage_search.c, on the free
 *     nurses' candidates); V' = V: stop (no other nurse can be pinned at
 *     V: each free one was asked, or was below V in a plan that keeps the
 *     levels); else V = V'
 *
 * Each held nurse is at her level in every assignment that is
 * lexicographically best on the sorted utilisations down to her rank, so
 * the levels are proven ranks of that order, and V (the heaviest of the
 * free nurses) is proven too: the rank after the held ones.  A level that
 * is not pinned ends the ranks: which free nurse carries V is then a
 * choice, and the free nurses share V as their ceiling.  The ceilings
 * (each held nurse's level, V for the rest) are what stage 2 (lift) and
 * the later stages hold; the search's peak budgets become them.  When the
 * time runs out first (a pin is a proof of "no"), the stage says so
 * (time_limit) rather than "nobody is pinned".
 */
#include <stdlib.h>
#include <string.h>

#include "alloc.h"
#include "answer.h"
#include "budget.h"
#include "stage_search.h"

/* The windows with every free nurse at most v, the held ones at their
 * budgets. */
static void level_windows(keel_search *S, keel_ratio v)
{
    for (size_t n = 0; n < S->w->nnurses; n++) {
        S->lo[n] = 0;
        if (keel_workload_counted(S->w, n))
            S->hi[n] = S->held[n] ? S->peak_hi[n] : keel_stage_search_below(S, n, v);
    }
}

/* Ranks positions: candidate i for the free nurses. */
static void rank_windows(keel_search *S, size_t i)
{
    level_windows(S, S->cand[i]);
}

/* The heaviest utilisation of the free counted nurses under nurse_of. */
static keel_ratio free_peak(const keel_search *S, const int *nurse_of)
{
    keel_ratio top = {0, 1};
    for (size_t n = 0; n < S->w->nnurses; n++) {
        if (!keel_workload_counted(S->w, n) || S->held[n])
            continue;
        keel_ratio u = keel_measure_utilisation(S->w, nurse_of, n);
        if (keel_ratio_cmp(u, top) > 0)
            top = u;
    }
    return top;
}

static size_t rank_position(const keel_search *S, const int *assignment)
{
    return keel_stage_search_first_at_least(S, free_peak(S, assignment));
}

/* The largest reachable care of nurse n that keeps her strictly below v. */
static long long strictly_below(const keel_search *S, size_t n, keel_ratio v)
{
    const keel_workload *w = S->w;
    long long cap = w->capacity_minutes[n];
    keel_ratio under = {keel_ceil_div(v.num * cap, v.den) - 1, cap};
    return under.num < 0 ? -1 : keel_stage_search_below(S, n, under);
}

/* The care of the patients (parts) only nurse n may take: every valid
 * assignment gives them to her. */
static long long only_hers(const keel_workload *w, size_t n)
{
    long long care = 0;
    for (size_t p = 0; p < w->npatients; p++) {
        if (!keel_workload_eligible(w, p, n))
            continue;
        bool alone = true;
        for (size_t k = 0; k < w->nnurses && alone; k++)
            alone = k == n || !keel_workload_eligible(w, p, k);
        care += alone ? w->care_minutes[p] : 0;
    }
    return care;
}

/* Marks the free counted nurses below v under nurse_of (a plan that keeps
 * the levels): none of them is pinned at v. */
static void mark_below(const keel_search *S, const int *nurse_of, keel_ratio v, bool *below)
{
    for (size_t n = 0; n < S->w->nnurses; n++)
        if (keel_workload_counted(S->w, n) && !S->held[n] &&
            keel_ratio_cmp(keel_measure_utilisation(S->w, nurse_of, n), v) < 0)
            below[n] = true;
}

/* Asks whether free nurse n can be below v with the held nurses at their
 * budgets and the other free nurses at most v; *pinned when proven not,
 * *unknown when the time ran out first.  A yes marks in below[] every free
 * nurse its plan has below v. */
static keel_status ask_pinned(keel_search *S, size_t n, keel_ratio v, long long deadline_ms,
                              bool *below, bool *pinned, bool *unknown, keel_error *err)
{
    const keel_workload *w = S->w;
    level_windows(S, v);
    S->hi[n] = strictly_below(S, n, v);
    *pinned = *unknown = false;
    /* She cannot be below v at all, or not with the patients only she may
     * take: no question needed. */
    if (S->hi[n] < 0 || only_hers(w, n) > S->hi[n]) {
        *pinned = true;
        return KEEL_OK;
    }
    keel_question q = {.w = w,
                       .lo = S->lo,
                       .hi = S->hi,
                       .start = S->incumbent,
                       .calls = &S->calls,
                       .min_kept = S->min_kept};
    keel_answer answer;
    keel_status rc = keel_answer_ask(KEEL_CHAIN_WINDOW, &q, deadline_ms, S->trial, &answer, err);
    *pinned = !rc && answer == KEEL_ANSWER_NO;
    *unknown = !rc && answer == KEEL_ANSWER_UNKNOWN;
    if (!rc && answer == KEEL_ANSWER_YES)
        mark_below(S, S->trial, v, below);
    return rc;
}

/* A floor under the heaviest of the free nurses: the care the held ones
 * cannot take (each at most her budget) over the free nurses' time. */
static keel_ratio free_floor(const keel_search *S)
{
    const keel_workload *w = S->w;
    long long work = 0, time = 0;
    for (size_t p = 0; p < w->npatients; p++)
        work += w->care_minutes[p];
    for (size_t n = 0; n < w->nnurses; n++) {
        if (!keel_workload_counted(w, n))
            continue;
        if (S->held[n]) {
            work -= S->peak_hi[n];
        } else {
            work += w->duty_minutes[n];
            time += w->capacity_minutes[n];
        }
    }
    return (keel_ratio){work > 0 ? work : 0, time > 0 ? time : 1};
}

/* The least heaviest utilisation of the free nurses, from best (which
 * keeps every level): first the question just below best's (the level
 * often stays), then the bisection over the candidates from the floor. */
static keel_status next_level(keel_search *S, keel_ratio v, long long deadline_ms, int *best,
                              keel_ratio *value, keel_ratio *bound, bool *proven, keel_error *err)
{
    static const keel_direction down = {rank_windows, rank_position, false};
    const keel_workload *w = S->w;
    for (size_t n = 0; n < w->nnurses; n++)
        S->hi[n] =
            keel_workload_counted(w, n) && !S->held[n] ? keel_stage_search_below(S, n, v) : -1;
    if (keel_stage_search_candidates(S, S->hi, free_floor(S), free_peak(S, best)))
        return keel_error_add(err, KEEL_ERR_NOMEM, NULL, 0, 0, NULL, "out of memory");
    size_t proven_lo = 0, hi = S->ncand ? rank_position(S, best) : 0;
    keel_status rc = KEEL_OK;
    if (hi > 0) /* a no just below best's proves best's level; a yes lowers it */
        rc = keel_stage_search_descend(S, &down, hi - 1, hi, deadline_ms, best, &proven_lo, err);
    if (!rc && hi > 0 && proven_lo < hi)
        rc = keel_stage_search_descend(S, &down, 0, rank_position(S, best), deadline_ms, best,
                                       &proven_lo, err);
    if (rc)
        return rc;
    *value = free_peak(S, best);
    *bound = S->ncand ? S->cand[proven_lo < S->ncand ? proven_lo : S->ncand - 1] : *value;
    *proven = S->ncand == 0 || keel_ratio_cmp(*bound, *value) >= 0;
    return KEEL_OK;
}

/* Appends rank k: nurse n at utilisation u. */
static void add_rank(keel_rank *ranks, size_t *nranks, int n, keel_ratio u, bool pinned,
                     bool proven)
{
    ranks[*nranks] = (keel_rank){.nurse = n,
                                 .utilisation = keel_ratio_value(u),
                                 .pinned = pinned,
                                 .status = proven ? KEEL_SOLVE_OPTIMAL : KEEL_SOLVE_TIME_LIMIT};
    (*nranks)++;
}

keel_status keel_stage_ranks(keel_search *S, keel_ratio peak, long long deadline_ms, int *nurse_of,
                             keel_ratio *level, keel_stage *st, keel_solution *sol, keel_error *err)
{
    const keel_workload *w = S->w;
    size_t nn = w->nnurses;
    long long started = keel_budget_now();
    keel_rank *ranks = keel_calloc(nn ? nn : 1, sizeof *ranks);
    bool *below = keel_calloc(nn ? nn : 1, sizeof *below); /* seen below V: not pinned */
    if (!ranks || !below) {
        free(ranks);
        free(below);
        return keel_error_add(err, KEEL_ERR_NOMEM, NULL, 0, 0, NULL, "out of memory");
    }
    size_t nranks = 0, nfree = 0;
    for (size_t n = 0; n < nn; n++) {
        S->held[n] = false;
        level[n] = peak;
        nfree += keel_workload_counted(w, n);
    }
    S->calls = 0;
    S->incumbent = nurse_of;
    keel_ratio v = peak, bound = peak;
    bool proven = true, cut = false; /* cut: the time ran out before the ranks ended */
    keel_status rc = KEEL_OK;
    while (nfree > 1) {
        if (keel_budget_now() >= deadline_ms) {
            cut = true;
            break;
        }
        /* The free nurses at v that are pinned there are held at v.  One
         * below v in a plan that keeps the levels (the incumbent, or the
         * plan of an earlier yes at this level) is not pinned: not asked. */
        size_t first = nranks;
        memset(below, 0, nn * sizeof *below);
        mark_below(S, nurse_of, v, below);
        for (size_t n = 0; n < nn && !rc && !cut; n++) {
            if (!keel_workload_counted(w, n) || S->held[n] || below[n])
                continue;
            bool pinned = false;
            rc = ask_pinned(S, n, v, deadline_ms, below, &pinned, &cut, err);
            if (pinned)
                add_rank(ranks, &nranks, (int)n, v, true, true);
        }
        if (rc || nranks == first)
            break;
        for (size_t k = first; k < nranks; k++) {
            size_t n = (size_t)ranks[k].nurse;
            S->held[n] = true;
            S->peak_hi[n] = keel_stage_search_below(S, n, v);
            nfree--;
        }
        if (cut || nfree == 0)
            break;
        /* The heaviest of the free nurses, as low as it goes. */
        keel_ratio was = v;
        rc = next_level(S, v, deadline_ms, nurse_of, &v, &bound, &proven, err);
        for (size_t n = 0; n < nn; n++)
            if (!S->held[n])
                level[n] = v;
        /* At the same level no other nurse is pinned: each free one was
         * asked and is not, or was below it in a plan that keeps it. */
        if (rc || !proven || keel_ratio_cmp(v, was) == 0)
            break;
    }
    /* The rank after the held ones: the heaviest of the free nurses (which
     * of them carries it is a choice: no nurse is named).  Cut short, the
     * ranks are reported even with nobody pinned: some nurse may be. */
    if (!rc && (nranks > 0 || cut) && nfree > 0)
        add_rank(ranks, &nranks, -1, v, false, proven && !cut);
    for (size_t n = 0; n < nn; n++)
        if (keel_workload_counted(w, n))
            S->peak_hi[n] = keel_stage_search_below(S, n, level[n]);
    free(below);
    if (rc || nranks == 0) {
        free(ranks);
        return rc;
    }
    sol->ranks = ranks;
    sol->nranks = nranks;
    /* Cut short, the levels found hold (the value is proven when its
     * bound is), but a nurse at the last level may be pinned there. */
    keel_stage_search_finish(st, v, bound, proven, S->calls, started);
    if (cut)
        st->status = KEEL_SOLVE_TIME_LIMIT;
    st->name = "ranks";
    return KEEL_OK;
}
