/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * budget.h - the solver's clock and its one table of time shares
 * (internal; the bottom layer of src/solve/).
 *
 * `--time-limit` covers the whole solve.  Every part of the solver that
 * hands on time asks this table how much: "of the time from now to the
 * deadline, my part gets num/den (or an equal share among the k parts
 * left)".  The table in budget.c says, entry by entry, who gets what and
 * why; docs/architecture.md prints it.  Node budgets of the dedicated
 * searches are in the table too, since they stand in for time.
 */
#ifndef KEEL_SOLVE_BUDGET_H
#define KEEL_SOLVE_BUDGET_H

#include <stddef.h>

/* The time limit when the caller gives none. */
#define KEEL_BUDGET_DEFAULT_MS 10000L

typedef enum keel_share_id {
    KEEL_SHARE_BALANCE,     /* stages 1-3 of the limit when later stages follow */
    KEEL_SHARE_POLISH,      /* large pooled units: the zone polish before the stages */
    KEEL_SHARE_PEAK,        /* stage 1 (peak) of the balance time */
    KEEL_SHARE_RANKS,       /* stage ranks, of the balance time the peak leaves */
    KEEL_SHARE_DESCENT,     /* the greedy method's local descent, of the balance time */
    KEEL_SHARE_QUESTION,    /* one question while the bisection narrows its range */
    KEEL_SHARE_CHAIN_LOCAL, /* window chain: the local search, of the question's time */
    KEEL_SHARE_CHAIN_FIT,   /* window chain: the dedicated search, until this much */
    KEEL_SHARE_VALID_ILP,   /* valid chain: GLPK on the bare question, of what is left */
    KEEL_SHARE_CONFLICT,    /* diagnosis: each relaxed rule group, equally */
    KEEL_SHARE_KEEP,        /* stage continuity, of the time after the balance */
    KEEL_SHARE_KEEP_ZERO,   /* continuity at zero tolerance, of stage continuity */
    KEEL_SHARE_NEAR_LOCAL,  /* stage proximity: its local search first */
    KEEL_SHARE_NEAR,        /* stages 3-4 of the time after the balance when stage 5 follows */
    KEEL_SHARE_ZONE_TRY,    /* by zone: one zone with k nurses, stage 1 */
    KEEL_SHARE_ZONE_LIFT,   /* by zone: one zone with k nurses, its lift */
    KEEL_SHARE_ZONE_EACH,   /* zone polish: each zone in turn, equally */
    KEEL_SHARE_TRADE,       /* zone trades: the first zone of a trade (the second: EACH) */
    KEEL_SHARE_FRONTIER,    /* a rebalance: each option of the hand-off frontier left, equally */
    KEEL_NSHARES
} keel_share_id;

/* One row of the table: the part of the time from now to the deadline. */
typedef struct keel_share {
    const char *name;  /* a short name, for docs and tests */
    int num, den;      /* num/den of the time left; den 0: 1/k of it for the k parts left */
    int most_parts;    /* with den 0: never less than 1/most_parts (0: no such cap) */
    long plus_ms;      /* added to the share (every share is at least 1 ms) */
    const char *why;   /* the reason, in a line */
} keel_share;

/* The table (keel_budget_shares[id]). */
extern const keel_share keel_budget_shares[KEEL_NSHARES];

/* Node budgets of the dedicated searches (they stop at the deadline too). */
enum {
    KEEL_NODES_QUICK = 200000,       /* window chain: the dedicated search's first look */
    KEEL_NODES_VALID = 1000000,      /* valid chain: the dedicated search */
    KEEL_NODES_SECOND_START = 20000, /* the second starting plan */
    KEEL_NODES_ZONE_SQUARES = 2000000, /* by zone: one zone's least squares */
};

/* Monotonic wall clock in milliseconds. */
long long keel_budget_now(void);

/* The best-effort plan is wanted even when the limit is spent: it gets at
 * least this long (docs/model.md, "Best effort"). */
#define KEEL_BUDGET_BEST_EFFORT_MIN_MS 1000L

/* The deadline of share id taken at from_ms of the time up to deadline_ms:
 * from + max(1, (deadline - from) * num / den + plus_ms), where den 0
 * divides by k (or by most_parts when that is smaller).  k is read only by
 * shares with den 0. */
long long keel_budget_until(keel_share_id id, long long from_ms, long long deadline_ms, size_t k);

#endif
