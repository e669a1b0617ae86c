/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * solve_exact.c - the "ilp" method: proves the best balance by asking
 * yes/no questions about a finite list of candidate utilisations.
 *
 * Loads are whole minutes, so a nurse's utilisation can only take the values
 * (duty + s) / capacity where s is a sum of care minutes of at most limit(n)
 * patients the nurse may take (with the clock, of any parts she may take); a small dynamic
 * programme per nurse lists those sums.  Stage 1 ("peak") sorts the candidate values between the
 * proven floor and the incumbent and asks, at a candidate t, "is there an assignment in which every
 * nurse's care stays within the largest reachable sum that keeps the nurse at or under t?".  Yes
 * gives a better incumbent; a proven no moves the proven bound past t.  When bound and incumbent
 * meet, the optimum is proven, without waiting for an LP relaxation to close the gap.  Stage 2
 * ("lift") asks the same upwards for the lightest utilisation with every budget of stage 1 held.
 *
 * Each question goes to the dedicated search (solve_fit.c) for a quick
 * look, then to the local search (solve_local.c) for at most a fifth of
 * its time, back to the dedicated search until half of its time, and to
 * GLPK (solve_ilp.c) for the rest: the local search finds tight packings,
 * the dedicated search finds and refutes them where GLPK's relaxation
 * cannot, and GLPK answers the questions its relaxation decides.
 * Questions are time-boxed while the search narrows the range, so one hard
 * question cannot stall it; at the end the decisive question (just below
 * the incumbent) gets all the time that is left.  On pooled units with one
 * zone per nurse, stage 1 first skips the candidates the zone-split floor
 * (solve_split.c) rules out.  Stage 1 may use most of the time limit;
 * stage 2 the rest.
 */
#include <limits.h>
#include <stdlib.h>
#include <string.h>

#include "alloc.h"
#include "solve_internal.h"

/* Nodes of the dedicated search's first, quick look at a question (about
 * 20 ms): most questions end there. */
#define QUICK_NODES 200000L
/* Share of the time left that one question gets while the range narrows. */
#define QUESTION_SHARE 5
/* Share of the time limit stage 1 may use (in tenths). */
#define PEAK_SHARE_TENTHS 7

/* Per counted nurse: which care sums up to smax the nurse can carry with
 * at most the limit of eligible patients. */
typedef struct sums {
    long long smax;
    bool *reach; /* [smax + 1] */
} sums;

typedef struct search {
    const keel_workload *w;
    sums *sums;    /* [nnurses] */
    long long *lo; /* windows of care minutes asked about */
    long long *hi;
    long long *peak_hi;   /* stage 1's budgets, held in stage 2 */
    int *trial;           /* the assignment an answer "yes" comes with */
    const int *incumbent; /* the best assignment so far: where the local search starts */
    keel_ratio *cand;     /* candidate utilisations, sorted, unique */
    size_t ncand;
    long long care_total;
    int calls; /* questions GLPK answered in this stage */
} search;

static keel_status reachable_sums(const keel_workload *w, size_t n, long long smax, sums *out)
{
    if (smax < 0)
        smax = -1;
    out->smax = smax;
    size_t size = (size_t)(smax + 1) + 1;
    out->reach = keel_calloc(size, sizeof *out->reach);
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
    /* With the clock the limit holds per moment, not on the parts over the
     * shift: any number of parts may add up. */
    int most = w->clocked ? INT_MAX - 1 : w->max_patients[n];
    for (long long s = 0; s <= smax; s++)
        out->reach[s] = fewest[s] <= most;
    free(fewest);
    return KEEL_OK;
}

/* Largest reachable sum s of nurse n with (duty + s) / capacity <= t, or -1. */
static long long budget_below(const search *S, size_t n, keel_ratio t)
{
    const keel_workload *w = S->w;
    for (long long s = S->sums[n].smax; s >= 0; s--) {
        keel_ratio u = {w->duty_minutes[n] + s, w->capacity_minutes[n]};
        if (S->sums[n].reach[s] && keel_ratio_cmp(u, t) <= 0)
            return s;
    }
    return -1;
}

/* Smallest reachable sum s <= limit of nurse n with (duty + s) / capacity >= t,
 * or -1. */
static long long budget_above(const search *S, size_t n, keel_ratio t, long long limit)
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

/* Lists every value (duty + s) / capacity with s reachable and s <= limit[n],
 * between from and to inclusive, sorted and unique. */
static keel_status collect_candidates(search *S, const long long *limit, keel_ratio from,
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

/* Index of the first candidate >= t (ncand when none). */
static size_t first_at_least(const search *S, keel_ratio t)
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

/* True when the patients whose eligible nurses all lie within the eligible
 * nurses of some patient q need more care than those nurses' windows hold
 * (a competency group that cannot fit: no assignment exists). */
static bool group_overflows(const search *S)
{
    const keel_workload *w = S->w;
    size_t np = w->npatients, nn = w->nnurses;
    for (size_t q = 0; q < np; q++) {
        const bool *set = &w->eligible[q * nn];
        long long room = 0, need = 0;
        for (size_t n = 0; n < nn; n++)
            if (set[n])
                room += S->hi[n];
        for (size_t p = 0; p < np; p++) {
            bool inside = true;
            for (size_t n = 0; n < nn && inside; n++)
                inside = !w->eligible[p * nn + n] || set[n];
            if (inside)
                need += w->care_minutes[p];
        }
        if (need > room)
            return true;
    }
    return false;
}

/* Asks whether an assignment fits the windows S->lo..S->hi, answering by
 * the cheap sums, the competency groups, the dedicated and local searches
 * (until half the time is gone) or GLPK, in that order. */
static keel_status ask(search *S, long long deadline_ms, keel_ilp_answer *answer, keel_error *err)
{
    const keel_workload *w = S->w;
    long long low = 0, high = 0;
    for (size_t n = 0; n < w->nnurses; n++) {
        if (!keel_workload_counted(w, n))
            continue;
        if (S->lo[n] < 0 || S->hi[n] < 0 || S->lo[n] > S->hi[n]) {
            *answer = KEEL_ILP_INFEASIBLE;
            return KEEL_OK;
        }
        low += S->lo[n];
        high += S->hi[n];
    }
    if (S->care_total < low || S->care_total > high || group_overflows(S)) {
        *answer = KEEL_ILP_INFEASIBLE;
        return KEEL_OK;
    }
    long long now = keel_clock_ms();
    keel_status rc = keel_fit_search(w, S->lo, S->hi, QUICK_NODES, deadline_ms, S->trial, answer);
    if (!rc && *answer == KEEL_ILP_UNKNOWN)
        rc = keel_fit_local(w, S->lo, S->hi, S->incumbent, now + (deadline_ms - now) / 5, S->trial,
                            answer);
    if (!rc && *answer == KEEL_ILP_UNKNOWN)
        rc = keel_fit_search(w, S->lo, S->hi, LONG_MAX, now + (deadline_ms - now) / 2, S->trial,
                             answer);
    if (rc)
        return keel_error_add(err, rc, NULL, 0, 0, NULL, "out of memory");
    if (*answer != KEEL_ILP_UNKNOWN)
        return KEEL_OK;
    long long left = deadline_ms - keel_clock_ms();
    if (left <= 0)
        return KEEL_OK;
    S->calls++;
    return keel_ilp_fit(w, S->lo, S->hi, left > LONG_MAX ? LONG_MAX : (long)left, S->trial, answer,
                        err);
}

/* One direction of search.  Position i (0 = most wanted) maps to a
 * candidate; set_windows() frames the question "can the stage reach the
 * candidate at position i?"; position_of() says where an assignment's own
 * value stands. */
typedef struct direction {
    void (*set_windows)(search *S, size_t i);
    size_t (*position_of)(const search *S, const int *assignment);
    bool improve; /* run the greedy improvement on each new incumbent */
} direction;

/* Narrows [lo, hi] (lo: the best position not yet ruled out; hi: the
 * incumbent's) until they meet or time runs out.  Sets *proven_lo. */
static keel_status descend(search *S, const direction *d, size_t lo, size_t hi,
                           long long deadline_ms, int *best, size_t *proven_lo, keel_error *err)
{
    const keel_workload *w = S->w;
    size_t soft = lo; /* below soft, questions were left unanswered */
    S->incumbent = best;
    keel_status rc = KEEL_OK;
    while (lo < hi) {
        long long now = keel_clock_ms();
        if (now >= deadline_ms)
            break;
        bool decisive = soft >= hi;
        size_t q = decisive ? hi - 1 : soft + (hi - soft) / 2;
        long long limit = decisive ? deadline_ms : now + (deadline_ms - now) / QUESTION_SHARE + 1;
        keel_ilp_answer answer;
        d->set_windows(S, q);
        rc = ask(S, limit, &answer, err);
        if (rc)
            break;
        if (answer == KEEL_ILP_FEASIBLE) {
            if (d->improve) {
                rc = keel_greedy_improve(w, S->trial);
                if (rc) {
                    keel_error_add(err, rc, NULL, 0, 0, NULL, "out of memory");
                    break;
                }
            }
            memcpy(best, S->trial, w->npatients * sizeof *best);
            hi = d->position_of(S, best);
            if (soft > hi)
                soft = hi;
        } else if (answer == KEEL_ILP_INFEASIBLE) {
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

/* Stage 1 positions: candidate i itself, smallest first. */
static void peak_windows(search *S, size_t i)
{
    for (size_t n = 0; n < S->w->nnurses; n++) {
        S->lo[n] = 0;
        if (keel_workload_counted(S->w, n))
            S->hi[n] = budget_below(S, n, S->cand[i]);
    }
}

static size_t peak_position(const search *S, const int *assignment)
{
    return first_at_least(S, keel_solve_peak(S->w, assignment));
}

/* Stage 2 positions: candidate ncand - 1 - i, largest first. */
static void lift_windows(search *S, size_t i)
{
    keel_ratio t = S->cand[S->ncand - 1 - i];
    for (size_t n = 0; n < S->w->nnurses; n++) {
        if (!keel_workload_counted(S->w, n))
            continue;
        S->hi[n] = S->peak_hi[n];
        S->lo[n] = budget_above(S, n, t, S->peak_hi[n]);
    }
}

static size_t lift_position(const search *S, const int *assignment)
{
    size_t i = first_at_least(S, keel_solve_lift(S->w, assignment));
    return S->ncand - 1 - (i < S->ncand ? i : S->ncand - 1);
}

static void finish_stage(keel_stage *st, keel_ratio value, keel_ratio bound, bool proven, int calls,
                         long long started)
{
    st->value = keel_ratio_value(value);
    st->bound = keel_ratio_value(proven ? value : bound);
    st->gap = proven ? 0.0 : keel_gap(st->value, st->bound);
    st->status = proven ? KEEL_SOLVE_OPTIMAL : KEEL_SOLVE_TIME_LIMIT;
    st->solver_calls = calls;
    st->seconds = (double)(keel_clock_ms() - started) / 1000.0;
}

/* The first candidate below position hi that the zone-split floor
 * (solve_split.c) does not rule out; candidates before it are proven out. */
static keel_status split_start(const search *S, size_t hi, size_t *lo)
{
    size_t a = 0, b = hi; /* the first possible position is in [a, b] */
    *lo = 0;
    if (!keel_one_zone_each(S->w))
        return KEEL_OK;
    while (a < b) {
        size_t mid = a + (b - a) / 2;
        bool possible = true;
        keel_status rc = keel_split_possible(S->w, S->cand[mid], &possible);
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

static keel_status stage_peak(search *S, long long deadline_ms, int *best, keel_stage *st,
                              keel_error *err)
{
    static const direction down = {peak_windows, peak_position, true};
    const keel_workload *w = S->w;
    long long started = keel_clock_ms();
    keel_ratio incumbent = keel_solve_peak(w, best), floor = keel_solve_peak_floor(w);
    for (size_t n = 0; n < w->nnurses; n++) {
        S->lo[n] = 0;
        S->hi[n] = -1;
        if (!keel_workload_counted(w, n))
            continue;
        /* No nurse carries more than the incumbent's peak allows. */
        long long smax =
            incumbent.num * w->capacity_minutes[n] / incumbent.den - w->duty_minutes[n];
        if (reachable_sums(w, n, smax, &S->sums[n]))
            return keel_error_add(err, KEEL_ERR_NOMEM, NULL, 0, 0, NULL, "out of memory");
        S->hi[n] = S->sums[n].smax;
    }
    if (collect_candidates(S, S->hi, floor, incumbent))
        return keel_error_add(err, KEEL_ERR_NOMEM, NULL, 0, 0, NULL, "out of memory");
    S->calls = 0;
    size_t proven_lo = 0, hi = S->ncand ? peak_position(S, best) : 0;
    size_t lo = 0;
    keel_status rc = split_start(S, hi, &lo);
    if (rc)
        return keel_error_add(err, rc, NULL, 0, 0, NULL, "out of memory");
    rc = descend(S, &down, lo, hi, deadline_ms, best, &proven_lo, err);
    if (rc)
        return rc;
    keel_ratio value = keel_solve_peak(w, best);
    bool proven = S->ncand == 0 || keel_ratio_cmp(S->cand[proven_lo], value) >= 0;
    finish_stage(st, value, S->ncand ? S->cand[proven_lo] : floor, proven, S->calls, started);
    /* Hold stage 1: the budgets at the best peak found. */
    for (size_t n = 0; n < w->nnurses; n++)
        S->peak_hi[n] = keel_workload_counted(w, n) ? budget_below(S, n, value) : -1;
    return KEEL_OK;
}

static keel_status stage_lift(search *S, long long deadline_ms, int *best, keel_stage *st,
                              keel_error *err)
{
    static const direction up = {lift_windows, lift_position, false};
    const keel_workload *w = S->w;
    long long started = keel_clock_ms();
    if (keel_greedy_lift(w, S->peak_hi, best))
        return keel_error_add(err, KEEL_ERR_NOMEM, NULL, 0, 0, NULL, "out of memory");
    keel_ratio incumbent = keel_solve_lift(w, best), ceiling = keel_solve_lift_ceiling(w);
    if (collect_candidates(S, S->peak_hi, incumbent, ceiling))
        return keel_error_add(err, KEEL_ERR_NOMEM, NULL, 0, 0, NULL, "out of memory");
    S->calls = 0;
    size_t proven_lo = 0, hi = S->ncand ? lift_position(S, best) : 0;
    keel_status rc = descend(S, &up, 0, hi, deadline_ms, best, &proven_lo, err);
    if (rc)
        return rc;
    keel_ratio value = keel_solve_lift(w, best);
    keel_ratio bound = S->ncand ? S->cand[S->ncand - 1 - proven_lo] : ceiling;
    finish_stage(st, value, bound, keel_ratio_cmp(bound, value) <= 0, S->calls, started);
    return KEEL_OK;
}

/* The search state of one workload: allocated here, freed by search_fini(). */
static keel_status search_init(search *S, const keel_workload *w)
{
    size_t nn = w->nnurses;
    *S = (search){.w = w};
    S->sums = keel_calloc(nn ? nn : 1, sizeof *S->sums);
    S->lo = keel_calloc(nn ? nn : 1, sizeof *S->lo);
    S->hi = keel_calloc(nn ? nn : 1, sizeof *S->hi);
    S->peak_hi = keel_calloc(nn ? nn : 1, sizeof *S->peak_hi);
    S->trial = keel_calloc(w->npatients ? w->npatients : 1, sizeof *S->trial);
    if (!S->sums || !S->lo || !S->hi || !S->peak_hi || !S->trial)
        return KEEL_ERR_NOMEM;
    for (size_t p = 0; p < w->npatients; p++)
        S->care_total += w->care_minutes[p];
    return KEEL_OK;
}

static void search_fini(search *S)
{
    for (size_t n = 0; S->sums && n < S->w->nnurses; n++)
        free(S->sums[n].reach);
    free(S->sums);
    free(S->lo);
    free(S->hi);
    free(S->peak_hi);
    free(S->trial);
    free(S->cand);
}

keel_status keel_exact_lift_under(const keel_workload *w, keel_ratio cap, long long deadline_ms,
                                  int *nurse_of, keel_stage *st, keel_error *err)
{
    search S;
    keel_status rc = search_init(&S, w);
    for (size_t n = 0; !rc && n < w->nnurses; n++) {
        S.peak_hi[n] = -1;
        if (!keel_workload_counted(w, n))
            continue;
        long long smax = cap.num * w->capacity_minutes[n] / cap.den - w->duty_minutes[n];
        rc = reachable_sums(w, n, smax, &S.sums[n]);
        if (!rc)
            S.peak_hi[n] = budget_below(&S, n, cap);
    }
    if (rc)
        rc = keel_error_add(err, KEEL_ERR_NOMEM, NULL, 0, 0, NULL, "out of memory");
    else
        rc = stage_lift(&S, deadline_ms, nurse_of, st, err);
    st->name = "lift";
    search_fini(&S);
    return rc;
}

keel_status keel_exact_squares(const keel_workload *w, long long deadline_ms, int *nurse_of,
                               keel_stage *st, keel_error *err)
{
    size_t nn = w->nnurses, np = w->npatients;
    long long started = keel_clock_ms(), total = 0;
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
    keel_ilp_question q = {.lo = lo, .hi = hi, .goal = KEEL_GOAL_SQUARES, .start = nurse_of};
    keel_ilp_result res;
    rc = keel_ilp_ask(w, &q, (long)(deadline_ms - started), trial, &res, err);
    if (rc)
        goto out;
    double value = keel_solve_squares(w, nurse_of), bound = keel_solve_squares_floor(w);
    if (res.answer == KEEL_ILP_FEASIBLE) {
        if (keel_solve_squares(w, trial) < value) {
            memcpy(nurse_of, trial, np * sizeof *trial);
            value = keel_solve_squares(w, nurse_of);
        }
        if (res.squares_bound > bound)
            bound = res.squares_bound;
    }
    /* GLPK works in floating point: its optimum is taken when it proves one,
     * the bound never above the value. */
    bool proven = res.answer == KEEL_ILP_FEASIBLE && res.proven;
    if (proven || bound > value)
        bound = value;
    *st = (keel_stage){.name = "squares",
                       .status = proven ? KEEL_SOLVE_OPTIMAL : KEEL_SOLVE_TIME_LIMIT,
                       .value = value,
                       .bound = bound,
                       .gap = keel_gap(value, bound),
                       .solver_calls = 1,
                       .seconds = (double)(keel_clock_ms() - started) / 1000.0};
out:
    free(lo);
    free(hi);
    free(trial);
    return rc;
}

keel_status keel_method_ilp(const keel_workload *w, long long deadline_ms, keel_solution *sol,
                            keel_error *err)
{
    if (w->balance == KEEL_BALANCE_SQUARES) {
        sol->nstages = 1;
        return keel_exact_squares(w, deadline_ms, sol->nurse_of, &sol->stages[0], err);
    }
    search S;
    keel_status rc = search_init(&S, w);
    if (rc) {
        rc = keel_error_add(err, KEEL_ERR_NOMEM, NULL, 0, 0, NULL, "out of memory");
        goto out;
    }
    sol->nstages = 2;
    sol->stages[0].name = "peak";
    sol->stages[1].name = "lift";
    long long now = keel_clock_ms();
    long long peak_deadline = now + (deadline_ms - now) * PEAK_SHARE_TENTHS / 10;
    rc = stage_peak(&S, peak_deadline, sol->nurse_of, &sol->stages[0], err);
    if (!rc)
        rc = stage_lift(&S, deadline_ms, sol->nurse_of, &sol->stages[1], err);
out:
    search_fini(&S);
    return rc;
}
