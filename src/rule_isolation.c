/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * rule_isolation.c - isolation: with policy.isolation_separation (a local
 * policy, not a federal rule), no nurse holds at one moment a patient in
 * protective isolation and one on contact, droplet or airborne precautions.
 *
 *   rows (kept):    sum of protective columns <= limit(n) b,
 *                   sum of infectious columns + limit(n) b <= limit(n), b binary
 *   rows (weighed): the same with the census as the big number and a binary
 *                   "both" at 40 that lets a nurse hold both sides
 */
#include <stdlib.h>

#include "alloc.h"
#include "finding_list.h"
#include "rule.h"
#include "workload_internal.h"

#define ISOLATION_SEVERITY 40

static const char *breaks(const keel_tally *t, size_t p, size_t n, size_t m)
{
    const keel_workload *w = t->w;
    size_t slot = n * w->nmoments + m;
    bool mixed =
        (w->side[p] == KEEL_SIDE_PROTECTIVE && t->sides[slot * 3 + KEEL_SIDE_INFECTIOUS] > 0) ||
        (w->side[p] == KEEL_SIDE_INFECTIOUS && t->sides[slot * 3 + KEEL_SIDE_PROTECTIVE] > 0);
    return mixed ? keel_rule_isolation.name : NULL;
}

static keel_status check(const keel_rule_plan *c, size_t n, size_t m, const size_t *mine, size_t k,
                         keel_findings *out)
{
    (void)m;
    const keel_workload *w = c->w;
    size_t sides[3] = {0, 0, 0};
    for (size_t i = 0; i < k; i++)
        sides[w->side[mine[i]]]++;
    if (!sides[KEEL_SIDE_PROTECTIVE] || !sides[KEEL_SIDE_INFECTIOUS])
        return KEEL_OK;
    char *msg = keel_asprintf("%s has %zu protective-isolation patient%s and %zu on contact, "
                              "droplet or airborne precautions; the unit's policy keeps "
                              "them apart",
                              c->r->nurses[n].id, sides[KEEL_SIDE_PROTECTIVE],
                              sides[KEEL_SIDE_PROTECTIVE] == 1 ? "" : "s",
                              sides[KEEL_SIDE_INFECTIOUS]);
    return keel_rule_finding_add(c, "isolation", mine, k, n, msg, out);
}

static int side_of(const keel_workload *w, size_t p)
{
    return w->side[p];
}

static void rows(const keel_rows *R)
{
    const keel_workload *w = R->w;
    if (R->soft) {
        if (!w->isolation_rule)
            return;
        double census = R->census;
        int b = keel_lp_col(R->lp, KEEL_LP_BINARY, 0.0, 1.0, 0.0);
        int both = keel_lp_col(R->lp, KEEL_LP_BINARY, 0.0, 1.0, ISOLATION_SEVERITY);
        int prot = keel_lp_row(R->lp, KEEL_LP_UP, 0.0, 0.0);
        int inf = keel_lp_row(R->lp, KEEL_LP_UP, 0.0, census);
        for (size_t i = 0; i < R->ncols; i++) {
            if (w->side[R->part[i]] == KEEL_SIDE_PROTECTIVE)
                keel_lp_put(R->lp, prot, R->col[i], 1.0);
            if (w->side[R->part[i]] == KEEL_SIDE_INFECTIOUS)
                keel_lp_put(R->lp, inf, R->col[i], 1.0);
        }
        keel_lp_put(R->lp, prot, b, -census);
        keel_lp_put(R->lp, inf, b, census);
        keel_lp_put(R->lp, inf, both, -census);
        return;
    }
    bool sides[3] = {false, false, false};
    for (size_t i = 0; i < R->ncols; i++)
        sides[w->side[R->part[i]]] = true;
    if (!sides[KEEL_SIDE_PROTECTIVE] || !sides[KEEL_SIDE_INFECTIOUS])
        return;
    double limit = w->max_patients[R->n];
    int b = keelRuleTie(R, side_of, KEEL_SIDE_PROTECTIVE, limit, 0.0);
    int row = keel_lp_row(R->lp, KEEL_LP_UP, 0.0, limit);
    for (size_t i = 0; i < R->ncols; i++)
        if (w->side[R->part[i]] == KEEL_SIDE_INFECTIOUS)
            keel_lp_put(R->lp, row, R->col[i], 1.0);
    keel_lp_put(R->lp, row, b, limit);
}

static bool touches(const keel_workload *w, size_t p)
{
    return w->side[p] != KEEL_SIDE_NONE;
}

static bool binds(const keel_workload *w)
{
    bool sides[3] = {false, false, false};
    for (size_t p = 0; p < w->npatients; p++)
        sides[w->side[p]] = true;
    return sides[KEEL_SIDE_INFECTIOUS] && sides[KEEL_SIDE_PROTECTIVE];
}

static void relax(keel_workload *copy, const keel_rule_spare *spare)
{
    copy->side = spare->none;
}

static char *say(const keel_roster *r, const keel_workload *w)
{
    (void)r;
    (void)w;
    return keel_strdup("protective-isolation patients apart from patients on contact, "
                       "droplet or airborne precautions");
}

static char *conflict(const keel_roster *r, const keel_workload *w, const char *tail,
                      size_t nothers)
{
    (void)r;
    (void)w;
    (void)nothers;
    return keel_asprintf("no assignment keeps protective-isolation patients apart from "
                         "patients on contact, droplet or airborne precautions%s (local "
                         "policy: policy.isolation_separation); relaxing it makes one "
                         "possible",
                         tail);
}

static int order(const keel_workload *w, size_t a, size_t b)
{
    int d = w->isolation_rule ? w->side[a] - w->side[b] : 0;
    return (d > 0) - (d < 0);
}

static bool held_alike(const keel_tally *t, size_t a, size_t b)
{
    for (size_t s = 1; s < 3; s++)
        if ((t->sides[a * 3 + s] > 0) != (t->sides[b * 3 + s] > 0))
            return false;
    return true;
}

const keel_rule keel_rule_isolation = {
    .name = "isolation",
    .scope = KEEL_SCOPE_MOMENT,
    .severity = ISOLATION_SEVERITY,
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
