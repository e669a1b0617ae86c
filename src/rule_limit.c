/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * rule_limit.c - patient_limit: a nurse holds at most limit(n) patients at
 * every moment, the smallest of the law's (law_limit, when the unit's ratio
 * table sets it), the policy's, her role's and her own (workload.c).  With
 * the clock, a broken limit is named moment_limit.
 *
 *   rows (kept):    sum of the nurse's columns <= limit(n)
 *   rows (weighed): sum - e <= limit(n), e >= 0 whole, at 80 a patient over
 *                   a limit the table sets (law_limit), else 50
 */
#include <stdlib.h>

#include "alloc.h"
#include "finding_list.h"
#include "keel/law.h"
#include "rule.h"
#include "workload_internal.h"

#define LIMIT_SEVERITY 50 /* a patient over a limit the table does not set */

/* True when n's limit is the one the ratio table sets. */
static bool by_law(const keel_workload *w, size_t n)
{
    return w->law_limit != KEEL_ABSENT && w->max_patients[n] == w->law_limit;
}

static const char *name_for(const keel_workload *w, size_t n)
{
    return w->clocked  ? keel_rule_moment_limit.name
           : by_law(w, n) ? keel_rule_law_limit.name
                          : keel_rule_patient_limit.name;
}

static const char *breaks(const keel_tally *t, size_t p, size_t n, size_t m)
{
    (void)p;
    const keel_workload *w = t->w;
    return t->count[n * w->nmoments + m] + 1 > w->max_patients[n] ? name_for(w, n) : NULL;
}

static keel_status check(const keel_rule_plan *c, size_t n, size_t m, const size_t *mine, size_t k,
                         keel_findings *out)
{
    (void)m;
    const keel_workload *w = c->w;
    const keel_roster *r = c->r;
    if ((long)k <= w->max_patients[n])
        return KEEL_OK;
    const char *id = r->nurses[n].id;
    char table[KEEL_LAW_CITE_SIZE];
    keel_law_cite(r->policy.ratio_table, table, sizeof table);
    char *msg = by_law(w, n)
                    ? keel_asprintf("%s has %zu patient%s: exceeds the limit of 1:%d for %s in %s",
                                    id, k, k == 1 ? "" : "s", w->law_limit, r->unit.type, table)
                    : keel_asprintf("%s has %zu patient%s; the patient limit is %d", id, k,
                                    k == 1 ? "" : "s", w->max_patients[n]);
    return keel_rule_finding_add(c, name_for(w, n), mine, k, n, msg, out);
}

static void rows(const keel_rows *R)
{
    const keel_workload *w = R->w;
    double limit = w->max_patients[R->n];
    int count = keel_lp_row(R->lp, KEEL_LP_UP, 0.0, limit);
    if (R->soft) {
        int severity = by_law(w, R->n) ? keel_rule_law_limit.severity : LIMIT_SEVERITY;
        keel_lp_put(R->lp, count,
                    keel_lp_col(R->lp, KEEL_LP_INTEGER, 0.0, R->census, severity), -1.0);
    }
    for (size_t i = 0; i < R->ncols; i++)
        keel_lp_put(R->lp, count, R->col[i], 1.0);
}

static bool nurses_alike(const keel_workload *w, size_t a, size_t b)
{
    return w->max_patients[a] == w->max_patients[b];
}

const keel_rule keel_rule_patient_limit = {
    .name = "patient_limit",
    .staffing = true,
    .scope = KEEL_SCOPE_MOMENT,
    .severity = LIMIT_SEVERITY,
    .breaks = breaks,
    .check = check,
    .rows = rows,
    .nurses_alike = nurses_alike,
};
