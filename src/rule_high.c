/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * rule_high.c - high_acuity: at most policy.high_acuity.max_per_nurse
 * patients at or above policy.high_acuity.level per nurse at every moment,
 * so that the sickest patients are spread out.
 *
 *   rows (kept):    sum of high-acuity columns <= max_high_acuity
 *   rows (weighed): sum - h <= max_high_acuity, at 40 per patient over
 */
#include <stdlib.h>

#include "alloc.h"
#include "finding_list.h"
#include "rule.h"
#include "workload_internal.h"

#define HIGH_SEVERITY 40

static const char *breaks(const keel_tally *t, size_t p, size_t n, size_t m)
{
    const keel_workload *w = t->w;
    bool over = w->high_acuity[p] && w->max_high_acuity != KEEL_ABSENT &&
                t->high[n * w->nmoments + m] + 1 > w->max_high_acuity;
    return over ? keel_rule_high_acuity.name : NULL;
}

static keel_status check(const keel_rule_plan *c, size_t n, size_t m, const size_t *mine, size_t k,
                         keel_findings *out)
{
    (void)m;
    const keel_workload *w = c->w;
    const keel_roster *r = c->r;
    size_t high = 0;
    for (size_t i = 0; i < k; i++)
        high += w->high_acuity[mine[i]];
    if (w->max_high_acuity == KEEL_ABSENT || (long)high <= w->max_high_acuity)
        return KEEL_OK;
    char *msg = keel_asprintf("%s has %zu high-acuity patient%s (acuity %d or more); the "
                              "policy allows %d per nurse",
                              r->nurses[n].id, high, high == 1 ? "" : "s",
                              r->policy.high_acuity.level, w->max_high_acuity);
    return keel_rule_finding_add(c, "high_acuity", mine, k, n, msg, out);
}

static void rows(const keel_rows *R)
{
    const keel_workload *w = R->w;
    if (w->max_high_acuity == KEEL_ABSENT)
        return;
    int row = 0;
    if (R->soft)
        row = keel_lp_row(R->lp, KEEL_LP_UP, 0.0, (double)w->max_high_acuity);
    for (size_t i = 0; i < R->ncols; i++) {
        if (!w->high_acuity[R->part[i]])
            continue;
        if (!row)
            row = keel_lp_row(R->lp, KEEL_LP_UP, 0.0, (double)w->max_high_acuity);
        keel_lp_put(R->lp, row, R->col[i], 1.0);
    }
    if (R->soft)
        keel_lp_put(R->lp, row, keel_lp_col(R->lp, KEEL_LP_INTEGER, 0.0, R->census, HIGH_SEVERITY),
                    -1.0);
}

static bool touches(const keel_workload *w, size_t p)
{
    return w->high_acuity[p];
}

static bool binds(const keel_workload *w)
{
    if (w->max_high_acuity == KEEL_ABSENT)
        return false;
    for (size_t p = 0; p < w->npatients; p++)
        if (touches(w, p))
            return true;
    return false;
}

static void relax(keel_workload *copy, const keel_rule_spare *spare)
{
    (void)spare;
    copy->max_high_acuity = KEEL_ABSENT;
}

static char *say(const keel_roster *r, const keel_workload *w)
{
    return keel_asprintf("at most %d high-acuity patient%s (acuity %d or more) per nurse",
                         w->max_high_acuity, w->max_high_acuity == 1 ? "" : "s",
                         r->policy.high_acuity.level);
}

/* Places for high-acuity patients: each nurse who may take one holds at most
 * the smaller of the rule's number and the nurse's limit. */
static long high_places(const keel_workload *w, size_t *nnurses)
{
    long places = 0;
    *nnurses = 0;
    for (size_t n = 0; n < w->nnurses; n++) {
        bool any = false;
        for (size_t p = 0; p < w->npatients && !any; p++)
            any = w->high_acuity[p] && keel_workload_eligible(w, p, n);
        if (!any)
            continue;
        (*nnurses)++;
        places += w->max_high_acuity < w->max_patients[n] ? w->max_high_acuity : w->max_patients[n];
    }
    return places;
}

static char *conflict(const keel_roster *r, const keel_workload *w, const char *tail,
                      size_t nothers)
{
    size_t nhigh = 0; /* patients, not parts: a stay cut by the clock counts once */
    for (size_t p = 0; p < w->npatients; p++)
        nhigh += w->high_acuity[p] && w->first_part[w->patient[p]] == (int)p;
    int level = r->policy.high_acuity.level;
    if (w->max_high_acuity == 0)
        return keel_asprintf("%zu high-acuity patient%s (acuity %d or more), but "
                             "policy.high_acuity.max_per_nurse is 0, so no nurse may take %s",
                             nhigh, nhigh == 1 ? "" : "s", level, nhigh == 1 ? "one" : "them");
    size_t nurses;
    long places = high_places(w, &nurses);
    /* The places add up only without the clock (with it they hold at each
     * moment, over the nurses on then). */
    if (!w->clocked && places < (long)nhigh && !nothers) {
        long per = w->max_high_acuity > 0 ? w->max_high_acuity : 1;
        long more = ((long)nhigh - places + per - 1) / per;
        return keel_asprintf("%zu high-acuity patient%s (acuity %d or more) and at most %d "
                             "per nurse: the %zu nurse%s who may take them can hold %ld; "
                             "%ld more nurse%s who may take them %s needed",
                             nhigh, nhigh == 1 ? "" : "s", level, w->max_high_acuity, nurses,
                             nurses == 1 ? "" : "s", places, more, more > 1 ? "s" : "",
                             more > 1 ? "are" : "is");
    }
    return keel_asprintf("no assignment keeps at most %d high-acuity patient%s (acuity %d or "
                         "more) per nurse%s; relaxing it makes one possible",
                         w->max_high_acuity, w->max_high_acuity == 1 ? "" : "s", level, tail);
}

static int order(const keel_workload *w, size_t a, size_t b)
{
    return (int)w->high_acuity[a] - (int)w->high_acuity[b];
}

static bool held_alike(const keel_tally *t, size_t a, size_t b)
{
    return t->high[a] == t->high[b];
}

const keel_rule keel_rule_high_acuity = {
    .name = "high_acuity",
    .staffing = true,
    .scope = KEEL_SCOPE_MOMENT,
    .severity = HIGH_SEVERITY,
    .binds = binds,
    .breaks = breaks,
    .check = check,
    .rows = rows,
    .touches = touches,
    .relax = relax,
    .say = say,
    .conflict = conflict,
    .order = order,
    .held_alike = held_alike,
};
