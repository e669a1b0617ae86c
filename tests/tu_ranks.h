/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * tu_ranks.h - the peak, the ranks beyond it and the lift over every valid
 * plan of a small roster, by their definitions (docs/model.md, "Stage
 * ranks"), for the exhaustive tests: the enumerations collect each valid
 * plan's loads, this header does the rest.
 *
 * Source: exhaustive enumeration of every valid plan, read by the
 * definition in docs/model.md "Stage ranks" (the sorted utilisations
 * lexicographically smallest rank by rank while the nurses at each level
 * are pinned; leximax order as in Ogryczak and Tamir, Information
 * Processing Letters 85, 2003, from memory).
 */
#ifndef KEEL_TU_RANKS_H
#define KEEL_TU_RANKS_H

#include <stdbool.h>
#include <stdlib.h>
#include <string.h>

#include "keel/solve.h"
#include "solve/measure.h"

#define TU_RANKS_MAX 16 /* nurses */

/* Every valid plan's loads (duty + care), nnurses each. */
typedef struct tu_plans {
    size_t nnurses, nplans, cap;
    long long *load;
} tu_plans;

static inline void tu_plans_add(tu_plans *p, const long long *load)
{
    if (p->nplans == p->cap) {
        p->cap = p->cap ? 2 * p->cap : 1024;
        p->load = realloc(p->load, p->cap * p->nnurses * sizeof *p->load);
    }
    memcpy(&p->load[p->nplans++ * p->nnurses], load, p->nnurses * sizeof *load);
}

typedef struct tu_ranks {
    keel_ratio peak; /* the least heaviest */
    size_t nranks;   /* nurses pinned, in rank order */
    int nurse[TU_RANKS_MAX];
    keel_ratio at[TU_RANKS_MAX]; /* each one's level */
    bool rest;                   /* a last rank: the heaviest of the others */
    keel_ratio rest_level;
    keel_ratio level[TU_RANKS_MAX]; /* each counted nurse's ceiling afterwards */
    keel_ratio lift;                /* the most lightest with every level held */
} tu_ranks;

static inline keel_ratio tu_plan_u(const tu_plans *p, const int *cap, size_t i, size_t n)
{
    return (keel_ratio){p->load[i * p->nnurses + n], cap[n]};
}

/* The heaviest of plan i over the nurses with only[n]. */
static inline keel_ratio tu_plan_top(const tu_plans *p, const int *cap, const bool *only, size_t i)
{
    keel_ratio top = {0, 1};
    for (size_t n = 0; n < p->nnurses; n++)
        if (only[n] && keel_ratio_cmp(tu_plan_u(p, cap, i, n), top) > 0)
            top = tu_plan_u(p, cap, i, n);
    return top;
}

/* U* the least heaviest over the counted nurses; while two or more nurses
 * are free, those free nurses every kept plan has at the level V are
 * pinned there; none: stop; else V becomes the least heaviest of the free
 * nurses over the kept plans, and only the plans that keep it stay kept.
 * The last rank is the heaviest of the free nurses (when some nurse was
 * pinned and some are free); the lift the most lightest over the kept
 * plans.  p has at least one plan. */
static inline void tu_ranks_compute(const tu_plans *p, const int *cap, const bool *counted,
                                    tu_ranks *r)
{
    size_t nn = p->nnurses, nfree = 0;
    bool *kept = calloc(p->nplans, sizeof *kept), free_[TU_RANKS_MAX];
    memset(r, 0, sizeof *r);
    for (size_t n = 0; n < nn; n++) {
        free_[n] = counted[n];
        nfree += counted[n];
    }
    keel_ratio v = {0, 1};
    for (size_t i = 0; i < p->nplans; i++)
        if (i == 0 || keel_ratio_cmp(tu_plan_top(p, cap, counted, i), v) < 0)
            v = tu_plan_top(p, cap, counted, i);
    r->peak = v;
    for (size_t i = 0; i < p->nplans; i++)
        kept[i] = keel_ratio_cmp(tu_plan_top(p, cap, counted, i), v) <= 0;
    for (size_t n = 0; n < nn; n++)
        r->level[n] = v;
    while (nfree > 1) {
        size_t first = r->nranks;
        for (size_t n = 0; n < nn; n++) {
            bool pinned = free_[n];
            for (size_t i = 0; pinned && i < p->nplans; i++)
                pinned = !kept[i] || keel_ratio_cmp(tu_plan_u(p, cap, i, n), v) == 0;
            if (pinned) {
                r->nurse[r->nranks] = (int)n;
                r->at[r->nranks++] = v;
            }
        }
        if (r->nranks == first)
            break;
        for (size_t k = first; k < r->nranks; k++) {
            free_[r->nurse[k]] = false;
            nfree--;
        }
        if (nfree == 0)
            break;
        bool any = false;
        for (size_t i = 0; i < p->nplans; i++)
            if (kept[i] && (!any || keel_ratio_cmp(tu_plan_top(p, cap, free_, i), v) < 0)) {
                v = tu_plan_top(p, cap, free_, i);
                any = true;
            }
        for (size_t i = 0; i < p->nplans; i++)
            kept[i] = kept[i] && keel_ratio_cmp(tu_plan_top(p, cap, free_, i), v) <= 0;
        for (size_t n = 0; n < nn; n++)
            if (free_[n])
                r->level[n] = v;
    }
    if (r->nranks > 0 && nfree > 0) {
        r->rest = true;
        r->rest_level = v;
    }
    bool any = false;
    for (size_t i = 0; i < p->nplans; i++) {
        if (!kept[i])
            continue;
        keel_ratio low = {0, 1};
        bool some = false;
        for (size_t n = 0; n < nn; n++)
            if (counted[n] && (!some || keel_ratio_cmp(tu_plan_u(p, cap, i, n), low) < 0)) {
                low = tu_plan_u(p, cap, i, n);
                some = true;
            }
        if (!any || keel_ratio_cmp(low, r->lift) > 0)
            r->lift = low;
        any = true;
    }
    free(kept);
}

/* The stage of s with this name, or NULL. */
static inline const keel_stage *tu_stage(const keel_solution *s, const char *name)
{
    for (size_t i = 0; i < s->nstages; i++)
        if (strcmp(s->stages[i].name, name) == 0)
            return &s->stages[i];
    return NULL;
}

/* keel's stage "ranks" against the enumeration's: every pinned nurse at
 * her level, the last rank, the stage present exactly when some nurse is
 * pinned; and the lift. */
static inline bool tu_ranks_match(const tu_ranks *e, const keel_solution *s)
{
    size_t expect = e->nranks + e->rest;
    if (s->nranks != expect || (tu_stage(s, "ranks") != NULL) != (expect > 0))
        return false;
    for (size_t k = 0; k < e->nranks; k++) {
        bool found = false;
        for (size_t j = 0; j < s->nranks; j++)
            found = found || (s->ranks[j].pinned && s->ranks[j].nurse == e->nurse[k] &&
                              s->ranks[j].utilisation == keel_ratio_value(e->at[k]));
        if (!found)
            return false;
    }
    if (e->rest) {
        const keel_rank *last = &s->ranks[s->nranks - 1];
        if (last->pinned || last->nurse != -1 || last->status != KEEL_SOLVE_OPTIMAL ||
            last->utilisation != keel_ratio_value(e->rest_level) ||
            tu_stage(s, "ranks")->value != keel_ratio_value(e->rest_level))
            return false;
    }
    const keel_stage *lift = tu_stage(s, "lift");
    return lift && lift->value == keel_ratio_value(e->lift);
}

#endif
