/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * answer.h - the window question and the answerers that answer it
 * (internal; src/solve/, above the measures, below the stages).
 *
 * The balance stages reduce everything they prove to one question: is
 * there an assignment that keeps every rule with every counted nurse n
 * carrying between lo[n] and hi[n] minutes of care (duty aside)?  Each
 * answerer answers it its own way behind one signature (keel_answerer):
 *
 *   answer.c          the sums: the windows cannot hold the care (no only),
 *                     and the greedy placement of heur_greedy.c (yes only)
 *   answer_fit.c      a dedicated branch and bound (yes or no)
 *   answer_local.c    a tabu local search from a start (yes only)
 *   answer_ilp.c      GLPK on the class model (yes or no)
 *   answer_severity.c GLPK on the least severity of breaking the rules:
 *                     0 is a yes, a proven least above 0 a no
 *
 * and keel_answer_ask() tries them in one chain, each with its share of the
 * question's time from budget.c's table, until one answers.  A YES comes
 * with an assignment that keeps every rule and the windows; a NO is proven.
 * A question with a hand-off budget (min_kept) is the same question with
 * one more row: only GLPK models that row; a NO of any answerer holds for
 * it (the question without the row has no answer), and the chain takes a
 * YES only when its assignment keeps the budget.
 */
#ifndef KEEL_SOLVE_ANSWER_H
#define KEEL_SOLVE_ANSWER_H

#include <stdbool.h>
#include <stddef.h>

#include "keel/error.h"
#include "keel/roster.h"
#include "workload_internal.h"

typedef enum keel_answer {
    KEEL_ANSWER_YES,     /* an assignment inside the windows (in nurse_of) */
    KEEL_ANSWER_NO,      /* proven: no assignment fits the windows */
    KEEL_ANSWER_UNKNOWN, /* the time or the node budget ran out first */
} keel_answer;

typedef struct keel_question {
    const keel_workload *w;
    const long long *lo; /* [nnurses]: care each counted nurse carries at least */
    const long long *hi; /* [nnurses]: and at most */
    const int *start;    /* a valid assignment to start from (the incumbent), or NULL */
    long nodes;          /* the dedicated search's node budget (set by the chain) */
    int *calls;          /* when not NULL, counts the integer programmes GLPK solved */
    long long min_kept;  /* a rebalance's hand-off budget: at least this many patients kept
                            with their previous (there: current) nurse; 0: no budget */
    const double *weight; /* HISTORY: [nnurses] each nurse's weight; else NULL */
    long long most_near;  /* HISTORY: (census + 1) zones + rooms at most; < 0: not held */
} keel_question;

/* An answerer: answers q by deadline_ms (on keel_budget_now()).  On YES,
 * nurse_of holds an assignment that keeps every rule and the windows.
 * Statuses: KEEL_OK (see *answer), KEEL_ERR_NOMEM, KEEL_ERR_SOLVER. */
typedef keel_status (*keel_answerer)(const keel_question *q, long long deadline_ms, int *nurse_of,
                                     keel_answer *answer, keel_error *err);

/* The answerers (see the head comment). */
keel_status keel_answer_fit(const keel_question *q, long long deadline_ms, int *nurse_of,
                            keel_answer *answer, keel_error *err);
keel_status keel_answer_local(const keel_question *q, long long deadline_ms, int *nurse_of,
                              keel_answer *answer, keel_error *err);
keel_status keel_answer_ilp(const keel_question *q, long long deadline_ms, int *nurse_of,
                            keel_answer *answer, keel_error *err);
keel_status keel_answer_severity(const keel_question *q, long long deadline_ms, int *nurse_of,
                                 keel_answer *answer, keel_error *err);

/* The chains: which answerers a question goes to, in order. */
typedef enum keel_chain {
    KEEL_CHAIN_WINDOW, /* a balance stage's question: sums, a quick dedicated look, the local
                          search from the incumbent, the dedicated search, GLPK */
    KEEL_CHAIN_VALID,  /* any valid assignment (wide windows): the greedy placement, the
                          dedicated search, GLPK, the least severity */
} keel_chain;

/* Asks q of the chain's answerers in turn until one answers or deadline_ms
 * passes.  Statuses: KEEL_OK (see *answer), KEEL_ERR_NOMEM,
 * KEEL_ERR_SOLVER. */
keel_status keel_answer_ask(keel_chain chain, const keel_question *q, long long deadline_ms,
                            int *nurse_of, keel_answer *answer, keel_error *err);

/* Any assignment that keeps every rule, balance aside: the valid chain on
 * windows that hold any care.  Statuses: as keel_answer_ask(). */
keel_status keel_answer_valid(const keel_workload *w, long long deadline_ms, int *nurse_of,
                              keel_answer *answer, keel_error *err);

/* ---- Goals beyond the window question (answer_ilp.c) ------------------- */

typedef enum keel_goal {
    KEEL_GOAL_FIT,     /* any assignment inside the windows */
    KEEL_GOAL_KEEP,    /* the most patients kept with their previous nurse */
    KEEL_GOAL_NEAR,    /* the fewest zones per nurse in all, then the fewest rooms */
    KEEL_GOAL_SQUARES, /* the least sum of load^2 / capacity over counted nurses */
    KEEL_GOAL_HISTORY, /* the least sum of weight x load / capacity over counted nurses,
                          proximity held at most most_near */
} keel_goal;

typedef struct keel_goal_result {
    keel_answer answer;
    long long value;      /* KEEP: patients kept; NEAR: zones in all (YES only) */
    long long rooms;      /* NEAR: rooms in all */
    long long bound;      /* proven limit on value: upper for KEEP, lower for NEAR */
    bool proven;          /* GLPK proved the answer optimal for the goal */
    double squares_bound; /* SQUARES: proven lower limit on the sum of load^2 / capacity */
    double history_bound; /* HISTORY: proven lower limit on the weighted sum */
} keel_goal_result;

/* Solves q (its windows, start and min_kept patients kept with their
 * previous nurse) for the goal with GLPK within time_limit_ms: every
 * patient one eligible nurse, every rule kept.  Statuses: KEEL_OK (see
 * res->answer), KEEL_ERR_NOMEM, KEEL_ERR_SOLVER. */
keel_status keel_answer_ilp_goal(const keel_question *q, keel_goal goal, long long min_kept,
                                 long time_limit_ms, int *nurse_of, keel_goal_result *res,
                                 keel_error *err);

/* ---- The least severity (answer_severity.c) ---------------------------- */

/* The plan that breaks the fewest rules by severity (docs/model.md, "Best
 * effort"), every patient with a nurse who takes patients: *found is false
 * when there is no such nurse or the time ran out first; *severity is the
 * plan's total, *proven true when GLPK proved it the least.  Severity 0 is
 * a valid assignment; a proven severity above 0 shows that none exists.
 * r may be NULL: every ineligible pair then weighs as one broken rule (the
 * feasibility question alone, which then also gets no time beyond
 * deadline_ms; with r, at least KEEL_BUDGET_BEST_EFFORT_MIN_MS).
 * Statuses: KEEL_OK, KEEL_ERR_NOMEM, KEEL_ERR_SOLVER. */
keel_status keel_answer_severity_plan(const keel_roster *r, const keel_workload *w,
                                      long long deadline_ms, int *nurse_of, bool *found,
                                      long *severity, bool *proven, keel_error *err);

#endif
