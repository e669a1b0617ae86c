/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * heur.h - the heuristics (internal; src/solve/, beside the answerers and
 * the bounds): quick plans that keep every rule, never proofs.
 *
 *   heur_greedy.c  heaviest patient first (Graham's LPT rule in
 *                  utilisation), chains of ejections, improving moves and
 *                  swaps, raising the lightest
 *   heur_homes.c   a home zone per nurse when max_zones strands patients
 *   heur_near.c    a tabu search for fewer zones and rooms (proximity)
 */
#ifndef KEEL_SOLVE_HEUR_H
#define KEEL_SOLVE_HEUR_H

#include <stdbool.h>

#include "keel/error.h"
#include "workload_internal.h"

/* heur_greedy.c: heaviest patient first to the eligible nurse with room
 * whose utilisation after taking it is lowest (Graham's LPT rule in
 * utilisation).  *placed_all is false when some patient found no nurse with
 * room (nurse_of is then partial).  Statuses: KEEL_OK, KEEL_ERR_NOMEM. */
keel_status keel_heur_greedy_place(const keel_workload *w, int *nurse_of, bool *placed_all);

/* heur_greedy.c: improving moves and swaps between pairs of nurses until
 * none lowers the heavier utilisation of the pair, or the deadline
 * (keel_budget_now()'s clock; LLONG_MAX: none) passes.  Keeps every rule.
 * Statuses: KEEL_OK, KEEL_ERR_NOMEM. */
keel_status keel_heur_greedy_improve(const keel_workload *w, int *nurse_of, long long deadline_ms);

/* heur_greedy.c: raises the lightest counted nurse by moves and swaps that
 * keep every nurse's care within hi[] and every rule.  Statuses: KEEL_OK,
 * KEEL_ERR_NOMEM. */
keel_status keel_heur_greedy_lift(const keel_workload *w, const long long *hi, int *nurse_of);

/* heur_homes.c: a home zone for each counted nurse (home[n], -1 for none),
 * chosen so that each zone has nurses for its patients: every home-zone
 * placement is then within policy.max_zones.  A heuristic for the greedy
 * placement when the zones leave patients without a nurse.  False when
 * memory ran out. */
bool keel_heur_homes(const keel_workload *w, int *home);

/* heur_near.c: lowers (census + 1) zones + rooms of nurse_of (which keeps
 * every rule, the windows lo/hi and min_kept patients with their previous
 * nurse) by a local search that keeps the rules and min_kept (it may leave
 * the windows on the way), until the cost reaches floor, the search stalls
 * or deadline_ms passes; nurse_of becomes the cheapest plan seen inside the
 * windows.  Does nothing with the clock.  Statuses: KEEL_OK,
 * KEEL_ERR_NOMEM. */
keel_status keel_heur_near(const keel_workload *w, const long long *lo, const long long *hi,
                           long long min_kept, long long floor, long long deadline_ms,
                           int *nurse_of);

#endif
