/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * lp.h - a small typed front on GLPK (internal; below the rules and the
 * solver).  lp.c is the only file of keel that includes glpk.h; the rules'
 * rows (rule_*.c) and the models (solve/answer_ilp.c,
 * solve/answer_severity.c) are written against keel_lp and never see GLPK.
 *
 * A model is built in keel's own memory (rows, columns, a sparse matrix of
 * 1-based triplets) and handed to GLPK only by keel_lp_solve(), which runs
 * GLPK on a thread of keel's own.  GLPK keeps its state per thread
 * (glp_config("TLS")), so that thread's environment belongs to keel alone:
 * its terminal output is off, its memory is capped, and it is freed after
 * every solve, whatever happens, without touching a GLPK environment the
 * calling program may have.  A fatal GLPK error becomes KEEL_ERR_SOLVER.
 * Several threads may solve at once.  Without thread-local storage in GLPK
 * (a build of GLPK that lacks it), solves are run one at a time on the
 * calling thread instead (see keel_lp_solve()).
 */
#ifndef KEEL_LP_H
#define KEEL_LP_H

#include <stdbool.h>
#include <stddef.h>

#include "keel/error.h"

typedef enum keel_lp_bound {
    KEEL_LP_UP, /* row <= ub */
    KEEL_LP_LO, /* row >= lb */
    KEEL_LP_DB, /* lb <= row <= ub */
    KEEL_LP_FX, /* row == lb */
} keel_lp_bound;

typedef enum keel_lp_kind {
    KEEL_LP_BINARY,     /* 0 or 1 */
    KEEL_LP_INTEGER,    /* whole, between lb and ub */
    KEEL_LP_CONTINUOUS, /* between lb and ub */
} keel_lp_kind;

typedef enum keel_lp_outcome {
    KEEL_LP_OPTIMAL,    /* a solution, proven best */
    KEEL_LP_FEASIBLE,   /* a solution; the time limit ended the proof */
    KEEL_LP_INFEASIBLE, /* proven: no solution */
    KEEL_LP_UNKNOWN,    /* the time limit came first */
} keel_lp_outcome;

typedef struct keel_lp keel_lp;

/* A new empty model that minimises (maximise: maximises) its objective, or
 * NULL when memory ran out.  Free it with keel_lp_free(). */
keel_lp *keel_lp_new(bool maximise);
void keel_lp_free(keel_lp *lp);

/* Adds a row or a column and returns its 1-based index.  A column's bounds
 * are lb..ub (a binary's are 0..1, given or not).  When memory runs out the
 * index is still returned and keel_lp_nomem() says so. */
int keel_lp_row(keel_lp *lp, keel_lp_bound type, double lb, double ub);
int keel_lp_col(keel_lp *lp, keel_lp_kind kind, double lb, double ub, double cost);

/* Adds a binary x of the given cost to row (coefficient -big): x must be 1
 * whenever the row's other terms are positive.  keel_lp_fill_indicators()
 * sets it from them in a start point.  Returns x. */
int keel_lp_indicator(keel_lp *lp, int row, double big, double cost);

/* In a start point x[1..cols] whose other columns are set (indicators 0),
 * sets each indicator to 1 when the rest of its row is positive.  False
 * when memory ran out. */
bool keel_lp_fill_indicators(const keel_lp *lp, double *x);

/* Sets a column's cost. */
void keel_lp_cost(keel_lp *lp, int col, double cost);

/* Adds value at (row, col) of the matrix; column 0 (no variable) is
 * skipped. */
void keel_lp_put(keel_lp *lp, int row, int col, double value);

/* The number of rows and columns so far. */
int keel_lp_nrows(const keel_lp *lp);
int keel_lp_ncols(const keel_lp *lp);

/* True when memory ran out while the model was built. */
bool keel_lp_nomem(const keel_lp *lp);

typedef struct keel_lp_result {
    keel_lp_outcome outcome;
    double value;    /* the solution's objective (OPTIMAL, FEASIBLE) */
    double bound;    /* the best proven bound on the objective (have_bound) */
    bool have_bound; /* the LP relaxation was solved */
} keel_lp_result;

/* Solves the model within time_limit_ms: the LP relaxation by the simplex
 * method, then branch and bound (GLPK's MIP presolver is left off: in GLPK
 * 5.0 it returned a point outside a double-bounded row in our tests).
 * start, when not NULL, is a feasible point x[1..cols] handed to GLPK once,
 * at its first heuristic call.  The solution's column values are then read
 * with keel_lp_value().  Statuses: KEEL_OK (see res->outcome),
 * KEEL_ERR_NOMEM, KEEL_ERR_SOLVER (GLPK failed: a message in err). */
/* GLPK's memory limit, in MiB, for the solves this thread starts from now
 * on; 0 (or less) restores the default, 2048.  A solve that reaches it
 * fails with KEEL_ERR_SOLVER and says so. */
void keel_lp_set_memory(int mb);

keel_status keel_lp_solve(keel_lp *lp, long time_limit_ms, const double *start,
                          keel_lp_result *res, keel_error *err);

/* Column col's value in the solution of the last keel_lp_solve() (0 when
 * it found none). */
double keel_lp_value(const keel_lp *lp, int col);

/* The GLPK version keel runs with, for reports. */
const char *keel_lp_version(void);

#endif
