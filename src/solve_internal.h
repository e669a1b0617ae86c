/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * solve_internal.h - what the solver stages share (internal).
 *
 * Utilisations are exact fractions load/capacity of whole minutes, so the
 * stages compare them without rounding: a/b < c/d  <=>  a*d < c*b.
 */
#ifndef KEEL_SOLVE_INTERNAL_H
#define KEEL_SOLVE_INTERNAL_H

#include <stdbool.h>

#include "keel/error.h"
#include "keel/finding.h"
#include "keel/roster.h"
#include "keel/solve.h"
#include "keel/workload.h"

/* An exact utilisation: num minutes of load over den minutes of capacity. */
typedef struct keel_ratio {
    long long num;
    long long den; /* > 0 */
} keel_ratio;

static inline int keel_ratio_cmp(keel_ratio a, keel_ratio b)
{
    long long l = a.num * b.den, r = b.num * a.den;
    return (l > r) - (l < r);
}

static inline double keel_ratio_value(keel_ratio a)
{
    return (double)a.num / (double)a.den;
}

/* Relative gap between a stage's value and its proven limit:
 * |value - bound| / max(|value|, |bound|), 0 when both are 0. */
static inline double keel_gap(double value, double bound)
{
    double a = value < 0 ? -value : value, b = bound < 0 ? -bound : bound;
    double d = value - bound, m = a > b ? a : b;
    return m > 0 ? (d < 0 ? -d : d) / m : 0.0;
}

/* Loads of every nurse under nurse_of (-1 entries ignored) into load[nnurses]. */
void keel_solve_loads(const keel_workload *w, const int *nurse_of, long long *load);

/* Heaviest and lightest utilisation of the counted nurses under nurse_of.
 * With no counted nurse both are 0/1. */
keel_ratio keel_solve_peak(const keel_workload *w, const int *nurse_of);
keel_ratio keel_solve_lift(const keel_workload *w, const int *nurse_of);

/* Sum of load^2 / capacity over the counted nurses under nurse_of, and the
 * same with no patients placed (every nurse at her duty): a floor. */
double keel_solve_squares(const keel_workload *w, const int *nurse_of);
double keel_solve_squares_floor(const keel_workload *w);

/* Proven simple limits: a lower limit on the heaviest utilisation of any
 * valid assignment (each counted nurse's duty, each patient on the nurse
 * that suits it best, the unit's total over the total capacity), and an
 * upper limit on the lightest (the unit's total over the total capacity). */
keel_ratio keel_solve_peak_floor(const keel_workload *w);
keel_ratio keel_solve_lift_ceiling(const keel_workload *w);

/* diagnose.c: looks for any valid assignment, ignoring balance, by
 * augmenting paths (patients to eligible nurses under their limits).
 * Sets *feasible.  When one exists, nurse_of holds it; when not, one
 * finding per shortage is appended to out, naming patients, nurses and what
 * is short.  Statuses: KEEL_OK, KEEL_ERR_NOMEM. */
keel_status keel_diagnose(const keel_roster *r, const keel_workload *w, int *nurse_of,
                          bool *feasible, keel_findings *out);

/* solve_greedy.c: heaviest patient first to the eligible nurse with room
 * whose utilisation after taking it is lowest (Graham's LPT rule in
 * utilisation).  *placed_all is false when some patient found no nurse with
 * room (nurse_of is then partial).  Statuses: KEEL_OK, KEEL_ERR_NOMEM. */
keel_status keel_greedy_place(const keel_workload *w, int *nurse_of, bool *placed_all);

/* solve_homes.c: a home zone for each counted nurse (home[n], -1 for none),
 * chosen so that each zone has nurses for its patients: every home-zone
 * placement is then within policy.max_zones.  A heuristic for the greedy
 * placement when the zones leave patients without a nurse.  False when
 * memory ran out. */
bool keel_zone_homes(const keel_workload *w, int *home);

/* solve_greedy.c: improving moves and swaps between pairs of nurses until
 * none lowers the heavier utilisation of the pair.  Keeps every rule.
 * Statuses: KEEL_OK, KEEL_ERR_NOMEM. */
keel_status keel_greedy_improve(const keel_workload *w, int *nurse_of);

/* solve_greedy.c: raises the lightest counted nurse by moves and swaps that
 * keep every nurse's care within hi[] and every rule.  Statuses: KEEL_OK,
 * KEEL_ERR_NOMEM. */
keel_status keel_greedy_lift(const keel_workload *w, const long long *hi, int *nurse_of);

/* solve_ilp.c: answer of one feasibility search. */
typedef enum keel_ilp_answer {
    KEEL_ILP_FEASIBLE,   /* nurse_of holds an assignment inside the windows */
    KEEL_ILP_INFEASIBLE, /* proven: no assignment fits the windows */
    KEEL_ILP_UNKNOWN,    /* the time limit came first */
} keel_ilp_answer;

/* solve_ilp.c: what an integer programme is asked. */
typedef enum keel_ilp_goal {
    KEEL_GOAL_FIT,     /* any assignment inside the windows */
    KEEL_GOAL_KEEP,    /* the most patients kept with their previous nurse */
    KEEL_GOAL_NEAR,    /* the fewest zones per nurse in all, then the fewest rooms */
    KEEL_GOAL_SQUARES, /* the least sum of load^2 / capacity over counted nurses */
} keel_ilp_goal;

typedef struct keel_ilp_question {
    const long long *lo; /* [nnurses]: care minutes each counted nurse carries at least */
    const long long *hi; /* [nnurses]: and at most */
    keel_ilp_goal goal;
    long long min_kept; /* patients that must stay with their previous nurse (0: none) */
    const int *start;   /* a valid assignment inside the windows to start from, or NULL */
} keel_ilp_question;

typedef struct keel_ilp_result {
    keel_ilp_answer answer;
    long long value;      /* KEEP: patients kept; NEAR: zones in all (FEASIBLE only) */
    long long rooms;      /* NEAR: rooms in all */
    long long bound;      /* proven limit on value: upper for KEEP, lower for NEAR */
    bool proven;          /* GLPK proved the answer optimal for the goal */
    double squares_bound; /* SQUARES: proven lower limit on the sum of load^2 / capacity */
} keel_ilp_result;

/* solve_ilp.c: solves the question with GLPK within time_limit_ms: every
 * patient one eligible nurse, every hard rule kept (limits, ratios, high
 * acuity, isolation, zones), every counted nurse n carrying between lo[n]
 * and hi[n] minutes of care (duty not included), best for the goal.
 * Statuses: KEEL_OK (see res->answer), KEEL_ERR_NOMEM, KEEL_ERR_SOLVER. */
keel_status keel_ilp_ask(const keel_workload *w, const keel_ilp_question *q, long time_limit_ms,
                         int *nurse_of, keel_ilp_result *res, keel_error *err);

/* solve_ilp.c: runs fn(ctx), which may call GLPK, with GLPK's terminal
 * output off and its fatal errors turned into KEEL_ERR_SOLVER (GLPK's
 * memory is then freed whole; fn must keep its own allocations outside).
 * *ret is fn's return value.  Statuses: KEEL_OK, KEEL_ERR_SOLVER. */
keel_status keel_glpk_call(int (*fn)(void *ctx), void *ctx, int *ret, keel_error *err);

/* The feasibility question of keel_ilp_ask() alone. */
keel_status keel_ilp_fit(const keel_workload *w, const long long *lo, const long long *hi,
                         long time_limit_ms, int *nurse_of, keel_ilp_answer *answer,
                         keel_error *err);

/* Sets *valid when nurse_of keeps every hard rule of w (every patient
 * placed).  Statuses: KEEL_OK, KEEL_ERR_NOMEM. */
keel_status keel_solve_validate(const keel_workload *w, const int *nurse_of, bool *valid);

/* Patients of nurse_of kept with their previous nurse; zones and rooms of
 * every nurse in all. */
long long keel_solve_kept(const keel_workload *w, const int *nurse_of);
void keel_solve_spread(const keel_workload *w, const int *nurse_of, long long *zones,
                       long long *rooms);

/* solve_fit.c: the same question as keel_ilp_fit(), answered by a
 * dedicated branch and bound that gives up (KEEL_ILP_UNKNOWN) after
 * node_budget nodes or at deadline_ms on keel_clock_ms() (0: none).
 * Statuses: KEEL_OK, KEEL_ERR_NOMEM. */
keel_status keel_fit_search(const keel_workload *w, const long long *lo, const long long *hi,
                            long node_budget, long long deadline_ms, int *nurse_of,
                            keel_ilp_answer *answer);

/* solve_local.c: the same question answered by a local search from start
 * (an assignment that keeps every rule), until deadline_ms: *answer is
 * KEEL_ILP_FEASIBLE with nurse_of filled, or KEEL_ILP_UNKNOWN (always
 * with the clock).  Statuses: KEEL_OK, KEEL_ERR_NOMEM. */
keel_status keel_fit_local(const keel_workload *w, const long long *lo, const long long *hi,
                           const int *start, long long deadline_ms, int *nurse_of,
                           keel_ilp_answer *answer);

/* solve_zones.c: true when each nurse works in one zone: policy.max_zones
 * 1, every patient in a zone, at least two zones, no clock (where the zone
 * polish and the zone-split floor apply). */
bool keel_one_zone_each(const keel_workload *w);

/* solve_split.c: *possible is false when it is proven that no valid
 * assignment has every counted nurse at or under utilisation t, because no
 * split of the nurses among the zones gives each zone the care, places and
 * high-acuity places it needs; true otherwise (also when the floor does not
 * apply or its table would be too large).  Statuses: KEEL_OK,
 * KEEL_ERR_NOMEM. */
keel_status keel_split_possible(const keel_workload *w, keel_ratio t, bool *possible);

/* solve_local.c: lowers the heaviest utilisation of nurse_of (which keeps
 * every rule) by the local search, asking each time for every counted
 * nurse strictly below the plan's peak, until it finds none or deadline_ms
 * passes.  Statuses: KEEL_OK, KEEL_ERR_NOMEM. */
keel_status keel_local_descent(const keel_workload *w, long long deadline_ms, int *nurse_of);

/* How far care c is from counted nurse n's window lo[n]..hi[n], in
 * minutes (0 for a nurse who is not counted): the local searches' excess. */
static inline long long keel_window_off(const keel_workload *w, const long long *lo,
                                        const long long *hi, size_t n, long long c)
{
    if (!keel_workload_counted(w, n))
        return 0;
    return c > hi[n] ? c - hi[n] : c < lo[n] ? lo[n] - c : 0;
}

/* The fixed-seed coin of the local searches (xorshift64): the next value
 * of *state, which must not be zero. */
static inline unsigned long long keel_coin_flip(unsigned long long *state)
{
    *state ^= *state << 13;
    *state ^= *state >> 7;
    *state ^= *state << 17;
    return *state;
}

/* solve_near.c: lowers (census + 1) zones + rooms of nurse_of (which keeps
 * every rule, the windows lo/hi and min_kept patients with their previous
 * nurse) by a local search that keeps the rules and min_kept (it may leave
 * the windows on the way), until the cost reaches floor, the search stalls
 * or deadline_ms passes; nurse_of becomes the cheapest plan seen inside the
 * windows.  Does nothing with the clock.  Statuses: KEEL_OK,
 * KEEL_ERR_NOMEM. */
keel_status keel_near_local(const keel_workload *w, const long long *lo, const long long *hi,
                            long long min_kept, long long floor, long long deadline_ms,
                            int *nurse_of);

/* The methods.  Each fills the stages of sol, whose nurse_of holds the
 * greedy incumbent on entry, and may replace the assignment with a better
 * one; deadline_ms is on keel_clock_ms().  Statuses: KEEL_OK,
 * KEEL_ERR_NOMEM, KEEL_ERR_SOLVER. */
keel_status keel_method_greedy(const keel_workload *w, long long deadline_ms, keel_solution *sol,
                               keel_error *err); /* solve.c */
keel_status keel_method_ilp(const keel_workload *w, long long deadline_ms, keel_solution *sol,
                            keel_error *err); /* solve_exact.c */

/* solve_exact.c: stage 2 alone with every counted nurse at or under the
 * utilisation peak: raises the
 * lightest utilisation from nurse_of (which must keep every rule and the
 * peak) and fills st.  Statuses: KEEL_OK, KEEL_ERR_NOMEM, KEEL_ERR_SOLVER. */
keel_status keel_exact_lift_under(const keel_workload *w, keel_ratio peak, long long deadline_ms,
                                  int *nurse_of, keel_stage *st, keel_error *err);

/* solve_zones.c: true when w splits by zone: max_zones 1, every patient in
 * a zone, no clock, the nurses who take patients interchangeable. */
bool keel_zones_apply(const keel_workload *w);

/* solve_zones.c: stages 1 and 2 zone by zone (see the file); fills
 * sol->nurse_of and the two stages and sets *found, or leaves *found false
 * when no numbers of nurses per zone add up (the usual search then says
 * why).  Statuses: KEEL_OK, KEEL_ERR_NOMEM, KEEL_ERR_SOLVER. */
/* solve_zones.c: with policy.max_zones 1, no clock and every patient in a
 * zone, improves nurse_of (which keeps every rule) zone by zone, each
 * nurse kept in the zone of her patients: the exact method's stages 1 and
 * 2 on each zone alone, until deadline_ms.  Does nothing otherwise.
 * Statuses: KEEL_OK, KEEL_ERR_NOMEM, KEEL_ERR_SOLVER. */
keel_status keel_zones_polish(const keel_workload *w, long long deadline_ms, int *nurse_of,
                              keel_error *err);

keel_status keel_zones_solve(const keel_workload *w, long long deadline_ms, keel_solution *sol,
                             bool *found, keel_error *err);

/* solve_exact.c: stage 1 under policy.balance squares: the least sum of
 * load^2 / capacity, from nurse_of (a valid assignment), by GLPK within
 * deadline_ms; fills st ("squares").  Statuses: KEEL_OK, KEEL_ERR_NOMEM,
 * KEEL_ERR_SOLVER. */
keel_status keel_exact_squares(const keel_workload *w, long long deadline_ms, int *nurse_of,
                               keel_stage *st, keel_error *err);

/* diagnose_rules.c: an assignment that keeps every rule, balance aside:
 * greedy, then the dedicated search, then GLPK, until deadline_ms.
 * Statuses: KEEL_OK (see *answer), KEEL_ERR_NOMEM, KEEL_ERR_SOLVER. */
keel_status keel_find_valid(const keel_workload *w, long long deadline_ms, int *nurse_of,
                            keel_ilp_answer *answer, keel_error *err);

/* diagnose_rules.c: when eligibility and limits allow an assignment but the
 * rules that join patients do not (proven), finds a smallest set of those
 * rule groups that conflict (relaxing any one makes an assignment possible)
 * and appends one finding per group to out; a group the time limit left
 * undecided stays in the set and its finding says so.  Statuses: KEEL_OK,
 * KEEL_ERR_NOMEM, KEEL_ERR_SOLVER. */
keel_status keel_diagnose_rules(const keel_roster *r, const keel_workload *w, long long deadline_ms,
                                keel_findings *out, keel_error *err);

/* solve_best.c: the plan that breaks the fewest rules by severity
 * (docs/model.md), every patient with a nurse who takes patients; *found
 * is false when there is no such nurse or the time ran out first;
 * *severity is the plan's total, *proven true when GLPK proved it the
 * least.  Severity 0 is a valid assignment; a proven severity above 0 shows
 * that none exists.  r may be NULL: every ineligible pair then weighs as
 * one broken rule (for the feasibility question alone, which then also
 * gets no time beyond deadline_ms).  Statuses: KEEL_OK, KEEL_ERR_NOMEM,
 * KEEL_ERR_SOLVER. */
keel_status keel_best_effort(const keel_roster *r, const keel_workload *w, long long deadline_ms,
                             int *nurse_of, bool *found, long *severity, bool *proven,
                             keel_error *err);

/* solve_follow.c: stages 3 (continuity) and 4 (proximity) after the
 * balance stages, within the balance tolerance, on sol->nurse_of (which
 * must keep every rule); appends their stages and fills sol->continuity
 * and sol->proximity.  exact: also ask GLPK.  Statuses: KEEL_OK,
 * KEEL_ERR_NOMEM, KEEL_ERR_SOLVER. */
keel_status keel_solve_follow(const keel_workload *w, bool exact, long long deadline_ms,
                              keel_solution *sol, keel_error *err);

/* solve_bound.c: fills sol->bound_reason: which simple floor (a nurse's
 * duty, one patient, the unit's average, a group of patients with few
 * nurses) reaches bound, stage 1's proven limit, or, when none does, that
 * whole patients set it.  Statuses: KEEL_OK, KEEL_ERR_NOMEM. */
keel_status keel_solve_explain_bound(const keel_roster *r, const keel_workload *w, double bound,
                                     keel_solution *sol);

/* Monotonic wall clock in milliseconds. */
long long keel_clock_ms(void);

#endif
