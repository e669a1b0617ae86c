/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * keel/solve.h - turns a workload into an assignment, following the order
 * of objectives of the design:
 *
 *   stage 1 "peak": minimise U, the heaviest utilisation of the counted nurses
 *   stage 2 "lift": with U held at its optimum, raise L, the lightest one
 *   stage 3 "continuity": keep the most patients with their previous nurse
 *   stage 4 "proximity": fewest zones per nurse in all, then fewest rooms
 *
 * Stages 3 and 4 run only when the roster has previous nurses, or zones and
 * rooms; they may trade balance within policy.balance_tolerance: every
 * counted nurse stays at or under U + tolerance and at or over L - tolerance
 * of stages 1 and 2, and stage 4 keeps stage 3's count.
 *
 * Methods are rows of one table of properties: "greedy" (heaviest patient
 * first to the least-utilised eligible nurse, then improving moves and
 * swaps) and "ilp" (greedy incumbent, then exact search with GLPK over the
 * finitely many values a utilisation can take in whole minutes).
 * keel_solve() may run in several threads at once (keel/keel.h, "Threads").
 * The time limit covers the whole solve, shared by the stages.  A solution
 * is called optimal only when every stage is proven; otherwise it carries
 * its proven bound and gap.
 */
#ifndef KEEL_SOLVE_H
#define KEEL_SOLVE_H

#include "keel/api.h"

#include <stdbool.h>
#include <stddef.h>

#include "keel/error.h"
#include "keel/finding.h"
#include "keel/roster.h"
#include "keel/workload.h"

#ifdef __cplusplus
extern "C" {
#endif

typedef enum keel_solve_status {
    KEEL_SOLVE_OPTIMAL,    /* every stage proven optimal */
    KEEL_SOLVE_TIME_LIMIT, /* the time limit ended the search; bound and gap say how far */
    KEEL_SOLVE_HEURISTIC,  /* the greedy method's answer; only the simple bound is known */
    KEEL_SOLVE_INFEASIBLE, /* no valid assignment exists; see diagnoses */
} keel_solve_status;

/* Name used in every output format: "optimal", "time_limit", "heuristic",
 * "infeasible". */
KEEL_API const char *keel_solve_status_name(keel_solve_status status);

typedef struct keel_solve_options {
    const char *method; /* "ilp" (default when NULL) or "greedy" */
    long time_limit_ms; /* whole solve; <= 0 means the default, 10 000 ms */
    bool best_effort;   /* when no valid assignment exists, find the plan that breaks the
                           fewest rules by severity (status stays INFEASIBLE) */
    int solver_memory_mb; /* the most memory one GLPK solve may use, in MiB; <= 0: the
                             default, 2048.  Reaching it fails the solve with
                             KEEL_ERR_SOLVER, saying so */
    const double *history; /* [nnurses of the roster]: each nurse's weight for stage 5,
                              fairness forward (keel_audit_history_weights()); NULL: no
                              stage 5.  Borrowed for the call */
} keel_solve_options;

/* What one stage achieved.  For "peak", "ranks" and "lift" value and bound
 * are utilisations: for "peak" the bound is a proven lower limit on U, for
 * "ranks" on the heaviest of the nurses not pinned, for "lift" a proven
 * upper limit on L.  For "continuity" they count patients
 * (bound: a proven upper limit on those kept), for "proximity" zones (bound:
 * a proven lower limit on the zones of all nurses together), for "history"
 * the sum over counted nurses of weight x utilisation (bound: a proven lower
 * limit).
 * gap = |value - bound| / max(|value|, |bound|): 0 when proven, the usual
 * relative MIP gap. */
/* Every stage a solve may run, in the order they run.  A solution lists
 * the stages that ran, in this order: "peak", "ranks" (when a nurse is
 * pinned at a proven peak) and "lift" under policy.balance peak or
 * "squares" under squares, then "continuity" and "proximity" when they
 * apply, then "history" with keel_solve_options.history. */
typedef enum keel_stage_kind {
    KEEL_STAGE_PEAK,
    KEEL_STAGE_RANKS,
    KEEL_STAGE_LIFT,
    KEEL_STAGE_SQUARES,
    KEEL_STAGE_CONTINUITY,
    KEEL_STAGE_PROXIMITY,
    KEEL_STAGE_HISTORY,
    KEEL_STAGE_KINDS /* the number of kinds: no solve runs more stages */
} keel_stage_kind;

typedef struct keel_stage {
    const char *name;         /* "peak", "ranks", "lift", "squares", "continuity",
                                 "proximity" or "history" */
    keel_solve_status status; /* OPTIMAL, TIME_LIMIT or HEURISTIC */
    double value;
    double bound;
    double gap;
    int solver_calls; /* integer programmes solved in this stage */
    double seconds;   /* wall time spent in this stage */
} keel_stage;

/* One rank of the sorted utilisations that stage "ranks" holds: a nurse
 * pinned at her level (every valid plan that keeps the ranks above has her
 * there), or, last, the heaviest of the nurses not pinned (the least that
 * heaviest can be, with the ranks above held). */
typedef struct keel_rank {
    int nurse;                /* index on the roster; -1 for the last rank (not pinned: which
                                 of the others carries it is a choice) */
    double utilisation;       /* her level */
    bool pinned;              /* pinned there; false for the last rank */
    keel_solve_status status; /* OPTIMAL when proven, else TIME_LIMIT (last rank only) */
} keel_rank;

typedef struct keel_solution {
    keel_solve_status status;
    const char *method; /* the method that ran */
    size_t npatients;
    int *nurse_of; /* [npatients]: nurse index, -1 when infeasible */
    size_t nstages;
    keel_stage stages[KEEL_STAGE_KINDS];
    size_t nranks;
    keel_rank *ranks; /* stage "ranks", heaviest first; NULL when it did not run */
    struct {
        bool applies;      /* some patient's previous nurse is on the roster */
        long kept;         /* patients kept with their previous nurse */
        long candidates;   /* patients whose previous nurse is on the roster */
        long kept_at_zero; /* the best found at zero tolerance; -1 when not sought */
        bool zero_proven;  /* kept_at_zero is proven the most at zero tolerance */
        double tolerance;  /* policy.balance_tolerance, in points (stage 3 or 4) */
    } continuity;
    struct {
        bool applies; /* some patient has a zone or a room */
        long zones;   /* zones per nurse, summed over nurses */
        long rooms;   /* rooms per nurse, summed over nurses */
    } proximity;
    struct {
        const char *kind;    /* "duty", "patient", "average", "group", "indivisible"; NULL: none */
        double floor;        /* the largest simple floor on the heaviest utilisation */
        char *text;          /* what sets the bound on the heaviest load, in plain words */
    } bound_reason;          /* what sets stage 1's bound (not for INFEASIBLE) */
    double seconds;          /* wall time of the whole solve */
    keel_findings diagnoses; /* why no assignment exists (INFEASIBLE only) */
    bool best_effort;        /* INFEASIBLE with a best-effort plan in nurse_of */
    long severity;           /* the best-effort plan's total severity */
} keel_solution;

/* Solves the workload of roster.  On KEEL_OK, *out is a new solution whose
 * status may be INFEASIBLE (a status, not an error: diagnoses say why).
 * The caller owns *out; free it with keel_solution_free().  Statuses:
 * KEEL_OK, KEEL_ERR_USAGE (unknown method), KEEL_ERR_NOMEM, KEEL_ERR_SOLVER.
 * Borrowed: roster and w must outlive the call only. */
KEEL_API keel_status keel_solve(const keel_roster *roster, const keel_workload *w,
                       const keel_solve_options *options, keel_solution **out, keel_error *err);

/* Frees the solution.  NULL-safe. */
KEEL_API void keel_solution_free(keel_solution *solution);

/* Number of methods and their names, for help texts. */
KEEL_API size_t keel_solve_nmethods(void);
KEEL_API const char *keel_solve_method_name(size_t i);

#ifdef __cplusplus
}
#endif
#endif
