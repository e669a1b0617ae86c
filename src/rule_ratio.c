/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * rule_ratio.c - patient_ratio: a patient's own ratio ("1:N", `ratio`)
 * caps the patients of its nurse at N while she holds it (ratio_limit(p);
 * the census when the patient has none).  With the clock, a broken ratio
 * is named moment_limit.
 *
 *   rows (kept):    per ratio value r below limit(n) among the columns:
 *                   sum of columns of ratio r <= limit(n) a,
 *                   sum of all columns + (limit(n) - r) a <= limit(n), a binary
 *   rows (weighed): per patient p of ratio r below limit(n):
 *                   sum of columns + (census - r) x[p] - f <= census, at 60 per
 *                   unit of f (a patient over a patient's own ratio)
 */
#include <stdlib.h>
#include <string.h>

#include "alloc.h"
#include "finding_list.h"
#include "rule.h"
#include "workload_internal.h"

#define RATIO_SEVERITY 60

static const char *name_for(const keel_workload *w)
{
    return w->clocked ? keel_rule_moment_limit.name
                      : keel_rule_patient_ratio.name;
}

static const char *breaks(const keel_tally *t, size_t p, size_t n, size_t m)
{
    const keel_workload *w = t->w;
    int after = t->count[n * w->nmoments + m] + 1;
    return after > w->ratio_limit[p] || after > keel_tally_tightest(t, n, m) ? name_for(w) : NULL;
}

static keel_status check(const keel_rule_plan *c, size_t n, size_t m, const size_t *mine, size_t k,
                         keel_findings *out)
{
    (void)m;
    const keel_workload *w = c->w;
    const keel_roster *r = c->r;
    keel_status rc = KEEL_OK;
    for (size_t i = 0; i < k && !rc; i++) {
        const keel_patient *pat = &r->patients[w->patient[mine[i]]];
        if (pat->ratio == KEEL_ABSENT || (long)k <= pat->ratio)
            continue;
        char *msg = keel_asprintf("%s is a 1:%d patient, but %s has %zu patients", pat->id,
                                  pat->ratio, r->nurses[n].id, k);
        rc = keel_rule_finding_add(c, name_for(w), mine, k, n, msg, out);
    }
    return rc;
}

static int ratio_of(const keel_workload *w, size_t p)
{
    return w->ratio_limit[p];
}

static void rows(const keel_rows *R)
{
    const keel_workload *w = R->w;
    int limit = w->max_patients[R->n];
    for (size_t i = 0; i < R->ncols; i++) {
        int v = w->ratio_limit[R->part[i]];
        if (v >= limit)
            continue;
        if (R->soft) {
            int row = keel_lp_row(R->lp, KEEL_LP_UP, 0.0, R->census);
            for (size_t j = 0; j < R->ncols; j++)
                keel_lp_put(R->lp, row, R->col[j], j == i ? 1.0 + R->census - v : 1.0);
            keel_lp_put(R->lp, row,
                        keel_lp_col(R->lp, KEEL_LP_INTEGER, 0.0, R->census, RATIO_SEVERITY), -1.0);
            continue;
        }
        bool first = true;
        for (size_t j = 0; j < i && first; j++)
            first = w->ratio_limit[R->part[j]] != v;
        if (!first)
            continue;
        int a = keelRuleTie(R, ratio_of, v, limit, 0.0);
        int row = keel_lp_row(R->lp, KEEL_LP_UP, 0.0, limit);
        for (size_t j = 0; j < R->ncols; j++)
            keel_lp_put(R->lp, row, R->col[j], 1.0);
        keel_lp_put(R->lp, row, a, limit - v);
    }
}

static bool touches(const keel_workload *w, size_t p)
{
    return w->ratio_limit[p] < (int)w->npatients;
}

static bool binds(const keel_workload *w)
{
    for (size_t p = 0; p < w->npatients; p++)
        if (touches(w, p))
            return true;
    return false;
}

static void relax(keel_workload *copy, const keel_rule_spare *spare)
{
    copy->ratio_limit = spare->census;
}

static char *say(const keel_roster *r, const keel_workload *w)
{
    (void)r;
    (void)w;
    return keel_strdup("every patient's own ratio (\"1:N\")");
}

/* Fewest nurses that can hold every patient when a nurse with a patient of
 * ratio 1:r has at most r patients (and at most limit): patients tightest
 * first, each group as large as its tightest member allows.  Taking the
 * tightest patients together is never worse, since a group's size is set by
 * its tightest member. */
static long nurses_for_ratios(const keel_workload *w, int limit)
{
    size_t np = w->npatients;
    long nurses = 0, open = 0; /* places left with the last nurse opened */
    for (int r = 1; r <= (int)np; r++) {
        for (size_t p = 0; p < np; p++) {
            int own = w->ratio_limit[p] < limit ? w->ratio_limit[p] : limit;
            if ((own > 0 ? own : 1) != r)
                continue;
            if (open > 0) {
                open--;
            } else {
                nurses++;
                open = r - 1;
            }
        }
    }
    return nurses;
}

static char *conflict(const keel_roster *r, const keel_workload *w, const char *tail,
                      size_t nothers)
{
    (void)r;
    size_t counted = 0;
    int staff_limit = 0;
    for (size_t n = 0; n < w->nnurses; n++) {
        if (!keel_workload_counted(w, n))
            continue;
        counted++;
        if (w->max_patients[n] > staff_limit)
            staff_limit = w->max_patients[n];
    }
    long need = nurses_for_ratios(w, staff_limit);
    if (need > (long)counted && !nothers)
        return keel_asprintf("the patients' own ratios need at least %ld nurse%s for %zu "
                             "patient%s; %zu nurse%s take%s patients: %ld short",
                             need, need == 1 ? "" : "s", w->npatients,
                             w->npatients == 1 ? "" : "s", counted, counted == 1 ? "" : "s",
                             counted == 1 ? "s" : "", need - (long)counted);
    return keel_asprintf("no assignment keeps every patient's own ratio (\"1:N\")%s; "
                         "relaxing it makes one possible",
                         tail);
}

static int order(const keel_workload *w, size_t a, size_t b)
{
    int d = w->ratio_limit[a] - w->ratio_limit[b];
    return (d > 0) - (d < 0);
}

static bool held_alike(const keel_tally *t, size_t a, size_t b)
{
    return keel_tally_tightest(t, a, 0) == keel_tally_tightest(t, b, 0);
}

const keel_rule keel_rule_patient_ratio = {
    .name = "patient_ratio",
    .staffing = true,
    .scope = KEEL_SCOPE_MOMENT,
    .severity = RATIO_SEVERITY,
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
