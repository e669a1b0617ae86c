/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * stage.h - the stages of the order of objectives (internal; src/solve/,
 * above the chain of answerers, below the zones and the orchestrator).
 *
 *   stage_search.c   the bisection over candidate utilisations that the
 *                    exact peak and lift share (the window questions)
 *   stage_peak.c     stage 1 "peak": the heaviest utilisation
 *   stage_ranks.c    stage "ranks": the nurses pinned at the peak held there,
 *                    the heaviest of the rest as low as it goes, and so on
 *   stage_lift.c     stage 2 "lift": the lightest, the peak and ranks held
 *   stage_squares.c  stage 1 "squares" (policy.balance: squares)
 *   stage_balance.c  the balance stages in order, for the orchestrator and
 *                    the zone methods
 *   stage_keep.c     stage 3 "continuity"
 *   stage_near.c     stage 4 "proximity"
 *
 * Each stage reads whether the method is exact (proves its answer with the
 * chain of answerers and GLPK) or not (the greedy method: heuristics and
 * the simple bounds), and fills its keel_stage: status, value, bound, gap.
 */
#ifndef KEEL_SOLVE_STAGE_H
#define KEEL_SOLVE_STAGE_H

#include <stdbool.h>

#include "keel/error.h"
#include "keel/solve.h"
#include "measure.h"

/* The state the exact peak and lift share (stage_search.c). */
typedef struct keel_search keel_search;

/* stage_search.c: a new search of w, or NULL when memory ran out; free it
 * with keel_stage_search_free(). */
keel_search *keel_stage_search_new(const keel_workload *w);
void keel_stage_search_free(keel_search *S);

/* stage_peak.c: stage 1, the heaviest utilisation, from nurse_of (a valid
 * assignment): exact, by the bisection (its budgets held in S for the
 * lift); else by the local descent with the simple floor as bound.
 * Statuses: KEEL_OK, KEEL_ERR_NOMEM, KEEL_ERR_SOLVER. */
keel_status keel_stage_peak(keel_search *S, bool exact, long long deadline_ms, int *nurse_of,
                            keel_stage *st, keel_error *err);

/* stage_ranks.c: after a proven peak (S as stage 1 left it, nurse_of its
 * plan), the ranks (see stage_ranks.c): level[nnurses] becomes each counted
 * nurse's ceiling (her rank's level when pinned, else the heaviest of the
 * rest's) and S's budgets with them; sol->ranks and st are filled when some
 * nurse is pinned at the peak, else sol->ranks stays NULL and the levels
 * are the peak.  Statuses: as keel_stage_peak(). */
keel_status keel_stage_ranks(keel_search *S, keel_ratio peak, long long deadline_ms, int *nurse_of,
                             keel_ratio *level, keel_stage *st, keel_solution *sol,
                             keel_error *err);

/* stage_lift.c: stage 2, the lightest utilisation with stage 1 held:
 * exact, by the bisection on S's budgets; else what nurse_of has, with the
 * simple ceiling as bound.  Statuses: as keel_stage_peak(). */
keel_status keel_stage_lift(keel_search *S, bool exact, long long deadline_ms, int *nurse_of,
                            keel_stage *st, keel_error *err);

/* stage_lift.c: stage 2 alone with every counted nurse at or under the
 * utilisation cap: raises the lightest utilisation from nurse_of (which
 * must keep every rule and the cap).  Statuses: as keel_stage_peak(). */
keel_status keel_stage_lift_under(const keel_workload *w, keel_ratio cap, long long deadline_ms,
                                  int *nurse_of, keel_stage *st, keel_error *err);

/* stage_squares.c: stage 1 under policy.balance squares: the least sum of
 * load^2 / capacity from nurse_of (a valid assignment), by GLPK when exact,
 * else nurse_of's with the simple floor.  Statuses: as keel_stage_peak(). */
keel_status keel_stage_squares(const keel_workload *w, bool exact, long long deadline_ms,
                               int *nurse_of, keel_stage *st, keel_error *err);

/* stage_balance.c: the balance stages in order on sol->nurse_of (a valid
 * assignment): peak, ranks (exact, with level given) and lift, or squares;
 * fills sol's first stages and, when given, level[nnurses]: each counted
 * nurse's ceiling for the later stages (the plan's peak when no ranks
 * ran).  Statuses: as keel_stage_peak(). */
keel_status keel_stage_balance(const keel_workload *w, bool exact, long long deadline_ms,
                               keel_solution *sol, keel_ratio *level, keel_error *err);

/* stage_keep.c: stage 3, continuity: the most patients kept with their
 * previous nurse, every counted nurse within the balance tolerance of
 * peak and lift (docs/model.md), from nurse_of; exact: also GLPK.  Fills st
 * and sol->continuity; *kept is the count stage 4 must keep.  Statuses: as
 * keel_stage_peak(). */
keel_status keel_stage_keep(const keel_workload *w, bool exact, const keel_ratio *level,
                            keel_ratio lift, long long deadline_ms, int *nurse_of, keel_stage *st,
                            keel_solution *sol, long long *kept, keel_error *err);

/* stage_near.c: stage 4, proximity: the fewest zones per nurse in all, then
 * rooms, within the balance tolerance and keeping min_kept patients with
 * their previous nurse, from nurse_of; exact: also GLPK.  Fills st and
 * sol->proximity.  Statuses: as keel_stage_peak(). */
keel_status keel_stage_near(const keel_workload *w, bool exact, const keel_ratio *level,
                            keel_ratio lift, long long min_kept, long long deadline_ms,
                            int *nurse_of, keel_stage *st, keel_solution *sol, keel_error *err);

/* stage_history.c: stage 5, fairness forward: the least sum over counted
 * nurses of weight[n] x load(n) / capacity(n), within the balance
 * tolerance, keeping min_kept patients with their previous nurse and
 * (most_near >= 0) (census + 1) zones + rooms at most most_near, from
 * nurse_of; exact: GLPK.  Fills st.  Statuses: as keel_stage_peak(). */
keel_status keel_stage_history(const keel_workload *w, const double *weight, bool exact,
                               const keel_ratio *level, keel_ratio lift, long long min_kept,
                               long long most_near, long long deadline_ms, int *nurse_of,
                               keel_stage *st, keel_error *err);

#endif
