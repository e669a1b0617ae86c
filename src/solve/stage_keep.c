/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * solve_follow.c - the stages that follow the balance: continuity (stage 3,
 * the most patients kept with their previous nurse) and proximity (stage 4,
 * the fewest zones per nurse in all, then rooms), both within the balance
 * tolerance of stages 1 and 2:
 *
 *   care(n) <= floor((U* + t) capacity(n)) - duty(n)
 *   care(n) >= ceil((L* - t) capacity(n)) - duty(n)
 *
 * computed exactly (U*, L* are fractions of whole minutes, t is kept in
 * millionths).  Stage 4 also keeps stage 3's count.  Each stage starts from
 * the assignment it is given and improves it: stage 3 by greedy moves and
 * swaps toward the previous nurse, stage 4 by a local search
 * (solve_near.c); then, with the exact method, GLPK (solve_ilp.c) with a
 * share of the time left.  What the tolerance bought is measured too: the
 * continuity optimum at zero tolerance.
 */
#include <stdlib.h>
#include <string.h>

#include "alloc.h"
#include "solve_internal.h"
#include "tally.h"

/* floor(x / d) and ceil(x / d) for d > 0. */
static long long floor_div(long long x, long long d)
{
    return x >= 0 ? x / d : -((-x + d - 1) / d);
}

static long long ceil_div(long long x, long long d)
{
    return -floor_div(-x, d);
}

/* The care windows of every counted nurse for tolerance t (millionths). */
static void tolerance_windows(const keel_workload *w, keel_ratio peak, keel_ratio lift, long long t,
                              long long *lo, long long *hi)
{
    const long long S = KEEL_TOLERANCE_SCALE;
    for (size_t n = 0; n < w->nnurses; n++) {
        lo[n] = 0;
        hi[n] = -1;
        if (!keel_workload_counted(w, n))
            continue;
        long long cap = w->capacity_minutes[n], duty = w->duty_minutes[n];
        hi[n] = floor_div((peak.num * S + t * peak.den) * cap, peak.den * S) - duty;
        lo[n] = ceil_div((lift.num * S - t * lift.den) * cap, lift.den * S) - duty;
        if (lo[n] < 0)
            lo[n] = 0;
    }
}

/* Moves and swaps toward the previous nurse that keep every rule and window;
 * each one keeps one more patient, so the loop ends. */
static keel_status greedy_keep(const keel_workload *w, const long long *lo, const long long *hi,
                               int *nurse_of, keel_error *err)
{
    keel_tally t;
    if (keel_tally_init(&t, w))
        return keel_error_add(err, KEEL_ERR_NOMEM, NULL, 0, 0, NULL, "out of memory");
    keel_tally_fill(&t, nurse_of);
    bool changed = true;
    while (changed) {
        changed = false;
        for (size_t p = 0; p < w->npatients; p++) {
            int v = w->previous[p], a = nurse_of[p];
            if (v < 0 || a == v || !keel_workload_eligible(w, p, (size_t)v))
                continue;
            size_t to = (size_t)v, from = (size_t)a;
            long long c = w->care_minutes[p];
            if (t.care[to] + c <= hi[to] && t.care[from] - c >= lo[from] &&
                keel_tally_may_give(&t, from) && keel_tally_admits(&t, p, to)) {
                keel_tally_remove(&t, p, from);
                keel_tally_add(&t, p, to);
                nurse_of[p] = v;
                changed = true;
                continue;
            }
            /* Swap with a patient of v that v does not keep. */
            for (size_t q = 0; q < w->npatients; q++) {
                if (nurse_of[q] != v || w->previous[q] == v || w->previous[q] == a ||
                    !keel_workload_eligible(w, q, from))
                    continue;
                long long d = c - w->care_minutes[q];
                if (t.care[to] + d > hi[to] || t.care[to] + d < lo[to] ||
                    t.care[from] - d > hi[from] || t.care[from] - d < lo[from])
                    continue;
                if (!keel_tally_admits_instead(&t, p, q, to) ||
                    !keel_tally_admits_instead(&t, q, p, from))
                    continue;
                keel_tally_remove(&t, p, from);
                keel_tally_remove(&t, q, to);
                keel_tally_add(&t, p, to);
                keel_tally_add(&t, q, from);
                nurse_of[p] = v;
                nurse_of[q] = a;
                changed = true;
                break;
            }
        }
    }
    keel_tally_free(&t);
    return KEEL_OK;
}

/* Patients whose previous nurse may take them: a simple upper limit. */
static long long keep_ceiling(const keel_workload *w)
{
    long long n = 0;
    for (size_t p = 0; p < w->npatients; p++)
        n += w->previous[p] >= 0 && keel_workload_eligible(w, p, (size_t)w->previous[p]);
    return n;
}

/* A proven floor on the distinct values of key[] per nurse, summed: every
 * value in use needs a nurse; and when every patient has a value, every
 * nurse who must take patients (min_patients, or a window lo[n] above
 * zero) holds one at least. */
static long long distinct(const keel_workload *w, const int *key, size_t nkeys, const long long *lo)
{
    long long n = 0, working = 0;
    bool everyone = true;
    for (size_t k = 0; k < nkeys; k++) {
        bool used = false;
        for (size_t p = 0; p < w->npatients && !used; p++)
            used = key[p] == (int)k;
        n += used;
    }
    for (size_t p = 0; p < w->npatients; p++)
        everyone = everyone && key[p] >= 0;
    for (size_t m = 0; m < w->nnurses; m++)
        working += w->min_patients[m] > 0 || (keel_workload_counted(w, m) && lo[m] > 0);
    return everyone && working > n ? working : n;
}

typedef struct follow {
    const keel_workload *w;
    long long *lo, *hi;
    int *trial;
    bool exact;
    bool proven; /* GLPK proved its answer to the last question optimal */
} follow;

/* Fills a stage; proven says the whole stage's objective is proven (for
 * proximity, the rooms too: the value and bound are zones only). */
static void finish(keel_stage *st, const char *name, long long value, long long bound, bool proven,
                   bool exact, int calls, long long started)
{
    st->name = name;
    st->value = (double)value;
    st->bound = (double)bound;
    st->gap = keel_gap(st->value, st->bound);
    st->status = proven ? KEEL_SOLVE_OPTIMAL : exact ? KEEL_SOLVE_TIME_LIMIT : KEEL_SOLVE_HEURISTIC;
    st->solver_calls = calls;
    st->seconds = (double)(keel_clock_ms() - started) / 1000.0;
}

/* Asks GLPK for the goal; adopts its answer when it is better.  *bound is
 * tightened by the answer's proven limit. */
static keel_status improve(follow *F, keel_ilp_goal goal, long long min_kept, long long deadline_ms,
                           int *best, long long *bound, int *calls, keel_error *err)
{
    const keel_workload *w = F->w;
    long long left = deadline_ms - keel_clock_ms();
    F->proven = false;
    if (!F->exact || left <= 0)
        return KEEL_OK;
    if (goal == KEEL_GOAL_KEEP && keel_solve_kept(w, best) >= *bound)
        return KEEL_OK; /* at the ceiling already */
    keel_ilp_question q = {
        .lo = F->lo, .hi = F->hi, .goal = goal, .min_kept = min_kept, .start = best};
    keel_ilp_result res;
    (*calls)++;
    keel_status rc = keel_ilp_ask(w, &q, (long)left, F->trial, &res, err);
    if (rc || res.answer != KEEL_ILP_FEASIBLE)
        return rc;
    F->proven = res.proven;
    long long zones, rooms, trial_zones, trial_rooms;
    bool better;
    if (goal == KEEL_GOAL_KEEP) {
        better = keel_solve_kept(w, F->trial) > keel_solve_kept(w, best);
        if (res.bound < *bound)
            *bound = res.bound;
    } else {
        keel_solve_spread(w, best, &zones, &rooms);
        keel_solve_spread(w, F->trial, &trial_zones, &trial_rooms);
        better = trial_zones < zones || (trial_zones == zones && trial_rooms < rooms);
        if (res.bound > *bound)
            *bound = res.bound;
    }
    if (better)
        memcpy(best, F->trial, w->npatients * sizeof *best);
    return KEEL_OK;
}

keel_status keel_solve_follow(const keel_workload *w, bool exact, long long deadline_ms,
                              keel_solution *sol, keel_error *err)
{
    size_t nn = w->nnurses;
    bool keep = w->ncontinuity > 0, near = w->nzones > 0 || w->nrooms > 0;
    if (!keep && !near)
        return KEEL_OK;
    sol->continuity.tolerance = (double)w->tolerance / KEEL_TOLERANCE_SCALE;
    follow F = {.w = w, .exact = exact};
    F.lo = keel_calloc(nn ? nn : 1, sizeof *F.lo);
    F.hi = keel_calloc(nn ? nn : 1, sizeof *F.hi);
    F.trial = keel_calloc(w->npatients ? w->npatients : 1, sizeof *F.trial);
    int *balanced = keel_calloc(w->npatients ? w->npatients : 1, sizeof *balanced);
    keel_status rc = KEEL_OK;
    if (!F.lo || !F.hi || !F.trial || !balanced) {
        rc = keel_error_add(err, KEEL_ERR_NOMEM, NULL, 0, 0, NULL, "out of memory");
        goto out;
    }
    memcpy(balanced, sol->nurse_of, w->npatients * sizeof *balanced);
    keel_ratio peak = keel_solve_peak(w, sol->nurse_of), lift = keel_solve_lift(w, sol->nurse_of);
    long long kept_needed = 0;
    if (keep) {
        long long started = keel_clock_ms();
        long long stage_end = near ? started + (deadline_ms - started) / 2 : deadline_ms;
        long long bound = keep_ceiling(w);
        int calls = 0;
        sol->continuity.applies = true;
        sol->continuity.candidates = (long)w->ncontinuity;
        sol->continuity.kept_at_zero = -1;
        /* At zero tolerance first, from the balanced assignment. */
        tolerance_windows(w, peak, lift, 0, F.lo, F.hi);
        long long zero_bound = bound;
        if (w->tolerance > 0 && exact) {
            long long mid = started + (stage_end - started) / 3;
            if ((rc = greedy_keep(w, F.lo, F.hi, balanced, err)) ||
                (rc = improve(&F, KEEL_GOAL_KEEP, 0, mid, balanced, &zero_bound, &calls, err)))
                goto out;
            sol->continuity.kept_at_zero = (long)keel_solve_kept(w, balanced);
            sol->continuity.zero_proven = sol->continuity.kept_at_zero == zero_bound;
        }
        tolerance_windows(w, peak, lift, w->tolerance, F.lo, F.hi);
        if (w->tolerance > 0 && exact)
            memcpy(sol->nurse_of, balanced, w->npatients * sizeof *balanced);
        if ((rc = greedy_keep(w, F.lo, F.hi, sol->nurse_of, err)) ||
            (rc = improve(&F, KEEL_GOAL_KEEP, 0, stage_end, sol->nurse_of, &bound, &calls, err)))
            goto out;
        kept_needed = keel_solve_kept(w, sol->nurse_of);
        if (w->tolerance == 0) {
            sol->continuity.kept_at_zero = (long)kept_needed;
            sol->continuity.zero_proven = kept_needed == bound;
        }
        sol->continuity.kept = (long)kept_needed;
        finish(&sol->stages[sol->nstages++], "continuity", kept_needed, bound, kept_needed == bound,
               exact, calls, started);
    }
    if (near) {
        long long started = keel_clock_ms();
        long long zones, rooms;
        int calls = 0;
        tolerance_windows(w, peak, lift, w->tolerance, F.lo, F.hi);
        long long bound = distinct(w, w->zone, w->nzones, F.lo);
        long long room_bound = distinct(w, w->room, w->nrooms, F.lo);
        long long weight = (long long)w->npatients + 1;
        /* A local search first, for at most a fifth of the stage's time. */
        if ((rc = keel_near_local(w, F.lo, F.hi, kept_needed, weight * bound + room_bound,
                                  started + (deadline_ms - started) / 5, sol->nurse_of))) {
            rc = keel_error_add(err, rc, NULL, 0, 0, NULL, "out of memory");
            goto out;
        }
        keel_solve_spread(w, sol->nurse_of, &zones, &rooms);
        /* At the simple floors already: nothing for GLPK to improve. */
        bool floor = zones == bound && rooms == room_bound;
        if (!floor)
            rc = improve(&F, KEEL_GOAL_NEAR, kept_needed, deadline_ms, sol->nurse_of, &bound,
                         &calls, err);
        if (rc)
            goto out;
        keel_solve_spread(w, sol->nurse_of, &zones, &rooms);
        sol->proximity.applies = true;
        sol->proximity.zones = (long)zones;
        sol->proximity.rooms = (long)rooms;
        /* Zones and rooms are proven together, by GLPK or by the simple
         * floors (every zone and room with patients needs a nurse, every
         * nurse who must take patients holds one). */
        bool proven = F.proven || (zones == bound && rooms == room_bound);
        finish(&sol->stages[sol->nstages++], "proximity", zones, proven ? zones : bound, proven,
               exact, calls, started);
        /* Stage 4 keeps at least stage 3's count and may find a plan that
         * keeps more (when stage 3 was not proven): report the plan's. */
        long long kept = keel_solve_kept(w, sol->nurse_of);
        if (keep && kept > kept_needed) {
            keel_stage *st = &sol->stages[sol->nstages - 2];
            sol->continuity.kept = (long)kept;
            if (w->tolerance == 0) { /* the same windows */
                sol->continuity.kept_at_zero = (long)kept;
                sol->continuity.zero_proven = kept == (long long)st->bound;
            }
            st->value = (double)kept;
            st->gap = keel_gap(st->value, st->bound);
            st->status = kept == (long long)st->bound ? KEEL_SOLVE_OPTIMAL : st->status;
        }
    }
out:
    free(F.lo);
    free(F.hi);
    free(F.trial);
    free(balanced);
    return rc;
}
