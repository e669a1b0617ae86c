/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * stage_near.c - stage 4 "proximity": the fewest zones per nurse in all,
 * then the fewest rooms, within the balance tolerance and keeping stage 3's
 * count of patients with their previous nurse.
 *
 * The local search of heur_near.c first, for a share of the stage
 * (budget.c's "near.local"); then, with the exact method and unless the
 * plan already meets the simple floors, GLPK (the NEAR goal of
 * answer_ilp.c) with the rest.  The simple floors: every zone and room
 * with patients needs a nurse, and when every patient has one, every nurse
 * who must take patients (min_patients, or a window above zero) holds one.
 * Zones and rooms are proven together, by GLPK or by those floors.
 */
#include <stdlib.h>
#include <string.h>

#include "alloc.h"
#include "answer.h"
#include "budget.h"
#include "heur.h"
#include "stage.h"

/* A proven floor on the distinct values of key[] per nurse, summed. */
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

keel_status keel_stage_near(const keel_workload *w, bool exact, const keel_ratio *level,
                            keel_ratio lift, long long min_kept, long long deadline_ms,
                            int *nurse_of, keel_stage *st, keel_solution *sol, keel_error *err)
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
    long long zones, rooms;
    int calls = 0;
    keel_measure_windows(w, level, lift, w->tolerance, lo, hi);
    long long bound = distinct(w, w->zone, w->nzones, lo);
    long long room_bound = distinct(w, w->room, w->nrooms, lo);
    long long weight = (long long)np + 1;
    rc = keel_heur_near(w, lo, hi, min_kept, weight * bound + room_bound,
                        keel_budget_until(KEEL_SHARE_NEAR_LOCAL, started, deadline_ms, 0),
                        nurse_of);
    if (rc) {
        rc = keel_error_add(err, rc, NULL, 0, 0, NULL, "out of memory");
        goto out;
    }
    keel_measure_spread(w, nurse_of, &zones, &rooms);
    bool proven = zones == bound && rooms == room_bound; /* at the simple floors */
    long long left = deadline_ms - keel_budget_now();
    if (!proven && exact && left > 0) {
        keel_question q = {.w = w, .lo = lo, .hi = hi, .start = nurse_of};
        keel_goal_result res;
        calls++;
        rc = keel_answer_ilp_goal(&q, KEEL_GOAL_NEAR, min_kept, (long)left, trial, &res, err);
        if (rc)
            goto out;
        if (res.answer == KEEL_ANSWER_YES) {
            long long trial_zones, trial_rooms;
            keel_measure_spread(w, trial, &trial_zones, &trial_rooms);
            if (trial_zones < zones || (trial_zones == zones && trial_rooms < rooms))
                memcpy(nurse_of, trial, np * sizeof *nurse_of);
            if (res.bound > bound)
                bound = res.bound;
            proven = res.proven;
        }
        keel_measure_spread(w, nurse_of, &zones, &rooms);
        proven = proven || (zones == bound && rooms == room_bound);
    }
    sol->proximity.applies = true;
    sol->proximity.zones = (long)zones;
    sol->proximity.rooms = (long)rooms;
    *st = (keel_stage){.name = "proximity",
                       .status = proven  ? KEEL_SOLVE_OPTIMAL
                                 : exact ? KEEL_SOLVE_TIME_LIMIT
                                         : KEEL_SOLVE_HEURISTIC,
                       .value = (double)zones,
                       .bound = (double)(proven ? zones : bound),
                       .solver_calls = calls,
                       .seconds = (double)(keel_budget_now() - started) / 1000.0};
    st->gap = keel_gap(st->value, st->bound);
out:
    free(lo);
    free(hi);
    free(trial);
    return rc;
}
