/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * rule_capacity.c - capacity: with policy.max_utilisation, a counted
 * nurse carries at most max_care(n) = floor(max_utilisation capacity(n)) -
 * duty(n) minutes of care over her shift (workload.c).
 *
 *   rows (kept):    sum of care(c) x column <= max_care(n)
 *   rows (weighed): sum - big o <= max_care(n), o binary at 50 (a nurse over
 *                   her cap), big the unit's care
 */
#include <limits.h>

#include "alloc.h"
#include "finding_list.h"
#include "rule.h"
#include "workload_internal.h"

#define CAPACITY_SEVERITY 50

static const char *breaks(const keel_tally *t, size_t p, size_t n, size_t m)
{
    (void)m;
    const keel_workload *w = t->w;
    return t->care[n] + w->care_minutes[p] > w->max_care[n] ? keel_rule_capacity.name
                                                             : NULL;
}

static keel_status check(const keel_rule_plan *c, size_t n, size_t m, const size_t *mine, size_t k,
                         keel_findings *out)
{
    (void)m;
    const keel_workload *w = c->w;
    long long care = 0;
    for (size_t i = 0; i < k; i++)
        care += w->care_minutes[mine[i]];
    if (care <= w->max_care[n])
        return KEEL_OK;
    char *msg = keel_asprintf("%s carries %lld min of care; policy.max_utilisation allows %lld",
                              c->r->nurses[n].id, care, w->max_care[n]);
    return keel_findings_add(out, "capacity", NULL, 0, &n, 1, msg);
}

static void rows(const keel_rows *R)
{
    const keel_workload *w = R->w;
    long long cap = w->max_care[R->n];
    if (cap == LLONG_MAX)
        return;
    int row = keel_lp_row(R->lp, KEEL_LP_UP, 0.0, (double)cap);
    for (size_t i = 0; i < R->ncols; i++)
        keel_lp_put(R->lp, row, R->col[i], (double)w->care_minutes[R->part[i]]);
    if (R->soft) {
        double big = 0;
        for (size_t p = 0; p < w->npatients; p++)
            big += w->care_minutes[p];
        keel_lp_put(R->lp, row, keel_lp_col(R->lp, KEEL_LP_BINARY, 0.0, 1.0, CAPACITY_SEVERITY),
                    -big);
    }
}

static bool binds(const keel_workload *w)
{
    for (size_t n = 0; n < w->nnurses; n++)
        if (w->max_care[n] != LLONG_MAX)
            return true;
    return false;
}

static void relax(keel_workload *copy, const keel_rule_spare *spare)
{
    copy->max_care = spare->no_cap;
}

static char *say(const keel_roster *r, const keel_workload *w)
{
    (void)r;
    (void)w;
    return keel_strdup("every nurse at or under policy.max_utilisation");
}

static char *conflict(const keel_roster *r, const keel_workload *w, const char *tail,
                      size_t nothers)
{
    (void)w;
    (void)nothers;
    return keel_asprintf("no assignment keeps every nurse at or under policy.max_utilisation "
                         "(%d.%02d of her capacity)%s; relaxing it makes one possible",
                         r->policy.max_utilisation / KEEL_TOLERANCE_SCALE,
                         r->policy.max_utilisation % KEEL_TOLERANCE_SCALE / 10000, tail);
}

static bool nurses_alike(const keel_workload *w, size_t a, size_t b)
{
    return w->max_care[a] == w->max_care[b];
}

const keel_rule keel_rule_capacity = {
    .name = "capacity",
    .staffing = true,
    .scope = KEEL_SCOPE_SHIFT,
    .severity = CAPACITY_SEVERITY,
    .binds = binds,
    .breaks = breaks,
    .check = check,
    .rows = rows,
    .relax = relax,
    .say = say,
    .conflict = conflict,
    .nurses_alike = nurses_alike,
};
