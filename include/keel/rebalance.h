/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * keel/rebalance.h - mid-shift: fold in what changed with the fewest
 * hand-offs (keel rebalance).
 *
 * The roster is the current state.  A patient with `nurse` is with that
 * nurse now (present); a patient without one is new and is placed freely
 * (placing a patient is not a hand-off).  A present patient whose nurse is
 * not on the roster, takes no patients, or may no longer have the patient
 * (a competency, the avoid list, the role's acuity, her times) must move:
 * a forced move, listed apart and not counted.  Locked patients never move.
 *
 * The hand-off frontier: for k = 0 .. max_handoffs, option k is the whole
 * order of objectives (keel/solve.h: peak, lift, then continuity with the
 * current nurse, then proximity) with one more rule, the budget
 *
 *   sum over present patients p, not forced, of [nurse(p) != current(p)] <= k
 *
 * (a swap counts two).  The balance stages are exact for each k: every
 * window question carries the budget as one row of GLPK's integer
 * programme; the quicker answerers' "no" still holds and their "yes" is
 * taken only when it keeps the budget.  Inside an option continuity and
 * proximity run at zero balance tolerance: the budget itself is the trade
 * between balance and hand-offs, and a tolerance would let continuity undo
 * the moves the budget bought.  Option k starts from option k - 1's plan
 * (within k hand-offs too); option 0 from the greedy start (every present
 * patient kept, the others placed heaviest first) when it keeps every
 * rule, else from GLPK's first plan within the budget.  The time limit covers the whole frontier:
 * each option still to solve gets an equal share of the time left (budget.c's "frontier" row), then
 * shares it among its stages as keel_solve() does.
 *
 * The recommendation is the smallest k whose heaviest utilisation is
 * within min_gain of the lowest heaviest utilisation of all options.
 *
 * Without the time of the rebalance (at_minute) the roster's figures are
 * the work that remains: no time arithmetic.  With it, the frontier is
 * over the roster of the rest of the shift (docs/model.md, "The time of
 * the rebalance"): what happened before is fixed, care and capacity count
 * from then on.  With the clock, a patient's current nurse is the nurse of
 * its first part.  A patient's record (patients[].record) is history: the
 * time of the rebalance may not be before its end, and the frontier is
 * over the roster without it.
 *
 * policy.balance: squares is not supported (KEEL_ERR_USAGE).
 */
#ifndef KEEL_REBALANCE_H
#define KEEL_REBALANCE_H

#include "keel/api.h"

#include <stdbool.h>
#include <stddef.h>

#include "keel/error.h"
#include "keel/roster.h"
#include "keel/solve.h"
#include "keel/workload.h"

#ifdef __cplusplus
extern "C" {
#endif

/* The default largest budget and the default gain that is worth a hand-off
 * (in utilisation points). */
#define KEEL_REBALANCE_MAX_HANDOFFS 3
#define KEEL_REBALANCE_MIN_GAIN 0.03

typedef struct keel_rebalance_options {
    long time_limit_ms; /* the whole frontier; <= 0: the default, 10 000 ms */
    int max_handoffs;   /* the largest k; < 0: KEEL_REBALANCE_MAX_HANDOFFS */
    double min_gain;    /* < 0: KEEL_REBALANCE_MIN_GAIN */
    bool at;            /* a time of the rebalance is given: at_minute; else the roster's
                           figures are the work that remains */
    int at_minute;      /* the time of the rebalance, minutes after midnight (0-1439), inside
                           the shift, which must have a start */
} keel_rebalance_options;

/* A patient who changes nurse. */
typedef struct keel_rebalance_move {
    size_t patient; /* index into roster->patients */
    int from;       /* nurse index now, or -1: a nurse who is not on the roster */
    int to;         /* nurse index in the option's plan */
} keel_rebalance_move;

typedef struct keel_rebalance_option {
    int handoffs;            /* the budget k */
    bool found;              /* a plan within the budget is in solution->nurse_of */
    keel_solution *solution; /* status (INFEASIBLE: proven, no plan within k hand-offs;
                                TIME_LIMIT without found: none found in time), stages */
    size_t nmoves;           /* hand-offs the plan makes (<= handoffs) */
    keel_rebalance_move *moves;
    size_t nforced; /* the forced moves, where this plan sends them */
    keel_rebalance_move *forced;
    size_t nplaced; /* new patients, where this plan places them (from = -1) */
    keel_rebalance_move *placed;
    double max_utilisation; /* of the plan (found only) */
    double min_utilisation;
    double bound; /* proven lower limit on the heaviest utilisation within k hand-offs */
    double gap;   /* (max_utilisation - bound) / max_utilisation; 0 when proven */
} keel_rebalance_option;

typedef struct keel_rebalance {
    const keel_roster *roster; /* the roster the plans are over: the input, or with --at the
                                  rest of the shift, or the input without its records
                                  (owned by the frontier) */
    keel_roster *rest;         /* that roster when it is not the input (owned), else NULL */
    const keel_roster *shift;  /* the input roster, the whole shift (borrowed) */
    int *index;                /* [shift->npatients]: each patient's index in roster, or -1
                                  when she is not in it (she has left) */
    int at_minute;             /* the time of the rebalance, or -1 */
    int at_offset;             /* the same in minutes after the shift's start, or -1 */
    size_t discharged;         /* patients who left before it (not in roster) */
    keel_workload *workload; /* owned: the roster's workload, each patient's previous nurse
                                replaced by the current one; the options' plans index it */
    keel_solve_status status; /* OPTIMAL: every option proven (a plan, or none within its
                                 budget); INFEASIBLE: no option has a plan; else TIME_LIMIT */
    size_t npresent;          /* patients with a nurse now (locked and forced included) */
    size_t nnew;              /* patients without one */
    size_t noptions;          /* max_handoffs + 1 */
    keel_rebalance_option *options; /* [noptions], option k at index k */
    int recommended;                /* the recommended k, or -1 when no option has a plan */
    double min_gain;
    double seconds; /* wall time of the whole frontier */
} keel_rebalance;

/* Computes the hand-off frontier of roster (a valid roster with
 * patients).  The caller owns *out; free it with keel_rebalance_free().
 * Statuses: KEEL_OK (*out's status may be INFEASIBLE), KEEL_ERR_USAGE
 * (policy.balance: squares; at_minute without a shift start or outside
 * the shift), KEEL_ERR_INPUT (as keel_workload_compute()),
 * KEEL_ERR_NOMEM, KEEL_ERR_SOLVER.  Borrowed: roster must outlive *out. */
KEEL_API keel_status keel_rebalance_run(const keel_roster *roster,
                                        const keel_rebalance_options *options,
                                        keel_rebalance **out, keel_error *err);

/* The whole shift after option k (keel rebalance --format yaml): the
 * input roster with each present patient's nurse from the time of the
 * rebalance on and her planned hand-offs after it as the option's plan
 * has them.  With a time t, each patient's record is who held her up to
 * t as the input has it (its record, then its nurse and planned
 * hand-offs, as keel_plan_from_roster() reads them; where the input names
 * nobody the nurse before goes on), adjacent stretches of one nurse
 * joined; patients who left before t stay, with their record; a new
 * patient (no nurse) who arrived before t, or has no arrival, arrives at
 * t; an expected admission who arrived before t is a patient.  Without a
 * time the records are kept as they are.  The caller owns *out; free it
 * with keel_roster_free().  Statuses: KEEL_OK, KEEL_ERR_USAGE (option k
 * has no plan), KEEL_ERR_NOMEM. */
KEEL_API keel_status keel_rebalance_shift(const keel_rebalance *rb, size_t k, keel_roster **out,
                                          keel_error *err);

/* Frees the frontier.  NULL-safe. */
KEEL_API void keel_rebalance_free(keel_rebalance *rb);

/* Roster patient p's nurse at its start in an option's plan (the nurse of
 * its first part), or -1. */
KEEL_API int keel_rebalance_nurse(const keel_rebalance *rb, const keel_rebalance_option *option,
                                  size_t p);

#ifdef __cplusplus
}
#endif
#endif
