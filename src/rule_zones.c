/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * rule_zones.c - zones: with policy.max_zones, a nurse's patients at any
 * moment lie in at most that many zones of the unit.
 *
 *   rows (kept):    per zone k: sum of columns in zone k <= limit(n) z[k]
 *                   (each column alone too when z has a cost), and
 *                   sum_k z[k] <= max_zones; z binary, priced at the
 *                   objective's zone cost (proximity) when there is one
 *   rows (weighed): the same with the census as the big number and
 *                   sum_k z[k] - g <= max_zones, at 10 per zone over
 */
#include <stdlib.h>

#include "alloc.h"
#include "finding_list.h"
#include "rule.h"
#include "workload_internal.h"

#define ZONES_SEVERITY 10

static const char *breaks(const keel_tally *t, size_t p, size_t n, size_t m)
{
    const keel_workload *w = t->w;
    size_t slot = n * w->nmoments + m;
    bool over = w->max_zones != KEEL_ABSENT && w->zone[p] >= 0 &&
                t->in_zone[slot * w->nzones + (size_t)w->zone[p]] == 0 &&
                t->zones[slot] + 1 > w->max_zones;
    return over ? keel_rule_zones.name : NULL;
}

static keel_status check(const keel_rule_plan *c, size_t n, size_t m, const size_t *mine, size_t k,
                         keel_findings *out)
{
    (void)m;
    const keel_workload *w = c->w;
    if (w->max_zones == KEEL_ABSENT)
        return KEEL_OK;
    long zones = 0;
    for (size_t i = 0; i < k; i++) {
        bool seen = w->zone[mine[i]] < 0;
        for (size_t j = 0; j < i && !seen; j++)
            seen = w->zone[mine[j]] == w->zone[mine[i]];
        zones += !seen;
    }
    if (zones <= w->max_zones)
        return KEEL_OK;
    char *msg = keel_asprintf("%s has patients in %ld zones; policy.max_zones is %d",
                              c->r->nurses[n].id, zones, w->max_zones);
    return keel_rule_finding_add(c, "zones", mine, k, n, msg, out);
}

static int zone_of(const keel_workload *w, size_t p)
{
    return w->zone[p];
}

static void rows(const keel_rows *R)
{
    const keel_workload *w = R->w;
    if (R->soft) {
        if (!w->zones_rule)
            return;
        int zones = keel_lp_row(R->lp, KEEL_LP_UP, 0.0, (double)w->max_zones);
        keel_lp_put(R->lp, zones,
                    keel_lp_col(R->lp, KEEL_LP_INTEGER, 0.0, (double)w->nzones, ZONES_SEVERITY),
                    -1.0);
        for (size_t k = 0; k < w->nzones; k++) {
            int z = keel_lp_col(R->lp, KEEL_LP_BINARY, 0.0, 1.0, 0.0);
            int tie = keel_lp_row(R->lp, KEEL_LP_UP, 0.0, 0.0);
            for (size_t i = 0; i < R->ncols; i++)
                if (w->zone[R->part[i]] == (int)k)
                    keel_lp_put(R->lp, tie, R->col[i], 1.0);
            keel_lp_put(R->lp, tie, z, -R->census);
            keel_lp_put(R->lp, zones, z, 1.0);
        }
        return;
    }
    /* Without the rule, the zone binaries still carry the objective's cost
     * (proximity without the clock). */
    if (!w->zones_rule && R->zone_cost <= 0)
        return;
    int row = w->max_zones != KEEL_ABSENT
                  ? keel_lp_row(R->lp, KEEL_LP_UP, 0.0, (double)w->max_zones)
                  : 0;
    for (size_t k = 0; k < w->nzones; k++) {
        int z = keelRuleTie(R, zone_of, (int)k, w->max_patients[R->n], R->zone_cost);
        if (z && row)
            keel_lp_put(R->lp, row, z, 1.0);
    }
}

static bool touches(const keel_workload *w, size_t p)
{
    return w->zone[p] >= 0;
}

static bool binds(const keel_workload *w)
{
    return w->max_zones != KEEL_ABSENT && w->nzones > (size_t)w->max_zones;
}

static void relax(keel_workload *copy, const keel_rule_spare *spare)
{
    (void)spare;
    copy->max_zones = KEEL_ABSENT;
}

static char *say(const keel_roster *r, const keel_workload *w)
{
    (void)r;
    return keel_asprintf("each nurse's patients within %d zone%s", w->max_zones,
                         w->max_zones == 1 ? "" : "s");
}

static char *conflict(const keel_roster *r, const keel_workload *w, const char *tail,
                      size_t nothers)
{
    (void)r;
    (void)nothers;
    return keel_asprintf("no assignment keeps each nurse's patients within %d zone%s%s; "
                         "the patients lie in %zu zones; relaxing policy.max_zones makes one "
                         "possible",
                         w->max_zones, w->max_zones > 1 ? "s" : "", tail, w->nzones);
}

static int order(const keel_workload *w, size_t a, size_t b)
{
    int d = w->zones_rule ? w->zone[a] - w->zone[b] : 0;
    return (d > 0) - (d < 0);
}

static bool held_alike(const keel_tally *t, size_t a, size_t b)
{
    const keel_workload *w = t->w;
    if (w->max_zones == KEEL_ABSENT)
        return true;
    for (size_t k = 0; k < w->nzones; k++)
        if ((t->in_zone[a * w->nzones + k] > 0) != (t->in_zone[b * w->nzones + k] > 0))
            return false;
    return true;
}

const keel_rule keel_rule_zones = {
    .name = "zones",
    .scope = KEEL_SCOPE_MOMENT,
    .severity = ZONES_SEVERITY,
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
