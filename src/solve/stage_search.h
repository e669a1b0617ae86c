/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * stage_search.h - the bisection over candidate utilisations that the
 * exact peak and lift share (internal to stage_search.c, stage_peak.c and
 * stage_lift.c; see stage_search.c).
 */
#ifndef KEEL_SOLVE_STAGE_SEARCH_H
#define KEEL_SOLVE_STAGE_SEARCH_H

#include <stdbool.h>

#include "keel/error.h"
#include "keel/solve.h"
#include "measure.h"
#include "stage.h"

/* Per counted nurse: which care sums up to smax the nurse can carry with
 * at most the limit of eligible patients. */
typedef struct keel_sums {
    long long smax;
    bool *reach;        /* [smax + 1] */
    int most;           /* the patients she may hold, as the sums count them */
} keel_sums;

struct keel_search {
    const keel_workload *w;
    keel_sums *sums;      /* [nnurses] */
    long long *lo;        /* windows of care minutes asked about */
    long long *hi;
    long long *peak_hi;   /* stage 1's budgets (after the ranks, each nurse's level's), held in
                             stage 2 */
    bool *held;           /* [nnurses]: the ranks: held at her level (peak_hi) for good */
    int *trial;           /* the assignment an answer "yes" comes with */
    const int *incumbent; /* the best assignment so far: where the local search starts */
    keel_ratio *cand;     /* candidate utilisations, sorted, unique */
    size_t ncand;
    int calls; /* questions GLPK answered in this stage */
    long long min_kept; /* a rebalance's hand-off budget, asked with every question (answer.h);
                           0: none.  With a budget the greedy steps that ignore it are off. */
};

/* One direction of search.  Position i (0 = most wanted) maps to a
 * candidate; set_windows() frames the question "can the stage reach the
 * candidate at position i?"; position_of() says where an assignment's own
 * value stands. */
typedef struct keel_direction {
    void (*set_windows)(keel_search *S, size_t i);
    size_t (*position_of)(const keel_search *S, const int *assignment);
    bool improve; /* run the greedy improvement on each new incumbent */
} keel_direction;

/* Lists the care sums up to smax nurse n can reach into S->sums[n]. */
keel_status keel_stage_search_sums(keel_search *S, size_t n, long long smax);

/* Largest reachable sum s of nurse n with (duty + s) / capacity <= t, or -1;
 * smallest reachable sum s <= limit with (duty + s) / capacity >= t, or -1. */
long long keel_stage_search_below(const keel_search *S, size_t n, keel_ratio t);
long long keel_stage_search_above(const keel_search *S, size_t n, keel_ratio t, long long limit);

/* Lists every value (duty + s) / capacity with s reachable and s <= limit[n],
 * between from and to inclusive, sorted and unique, into S->cand. */
keel_status keel_stage_search_candidates(keel_search *S, const long long *limit, keel_ratio from,
                                         keel_ratio to);

/* Index of the first candidate >= t (ncand when none). */
size_t keel_stage_search_first_at_least(const keel_search *S, keel_ratio t);

/* Narrows [lo, hi] (lo: the best position not yet ruled out; hi: the
 * incumbent's) until they meet or time runs out, asking the window chain;
 * best becomes the best assignment found.  Sets *proven_lo. */
keel_status keel_stage_search_descend(keel_search *S, const keel_direction *d, size_t lo, size_t hi,
                                      long long deadline_ms, int *best, size_t *proven_lo,
                                      keel_error *err);

/* Fills a stage from its value and bound (proven: the bound is the value). */
void keel_stage_search_finish(keel_stage *st, keel_ratio value, keel_ratio bound, bool proven,
                              int calls, long long started);

#endif
