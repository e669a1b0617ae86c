/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * preview.c - the incoming patient preview (keel/preview.h): each expected
 * admission without a nurse tried with each counted nurse, the rest of the
 * plan unchanged, judged by the plan check (plan.c) and measured by the
 * metrics (metrics.c).  After the solve; reads the plan, changes nothing.
 */
#include "keel/preview.h"

#include <stdlib.h>
#include <string.h>

#include "alloc.h"
#include "keel/metrics.h"
#include "keel/plan.h"
#include "workload_internal.h"

void keel_preview_free(keel_preview *pv)
{
    if (!pv)
        return;
    for (size_t i = 0; i < pv->nadmissions; i++)
        free(pv->admissions[i].nurses);
    free(pv->admissions);
    free(pv);
}

static bool names(const size_t *list, size_t count, size_t x)
{
    for (size_t i = 0; i < count; i++)
        if (list[i] == x)
            return true;
    return false;
}

/* The rule that rules nurse n out for admission p: a finding about p that
 * names her, else the first about p, else NULL (the roster's own planned
 * hand-offs that the plan does not follow are not about p). */
static const char *rule_against(const keel_findings *f, size_t p, size_t n)
{
    const char *first = NULL;
    for (size_t i = 0; i < f->n; i++) {
        const keel_finding *x = &f->items[i];
        if (!names(x->patients, x->npatients, p))
            continue;
        if (names(x->nurses, x->nnurses, n))
            return x->rule;
        if (!first)
            first = x->rule;
    }
    return first;
}

/* Allowed first, lightest first; then the others; each by roster order. */
static int by_rank(const void *a, const void *b)
{
    const keel_preview_nurse *x = a, *y = b;
    if (x->allowed != y->allowed)
        return x->allowed ? -1 : 1;
    if (x->allowed && x->utilisation != y->utilisation)
        return x->utilisation < y->utilisation ? -1 : 1;
    return (x->nurse > y->nurse) - (x->nurse < y->nurse);
}

/* Admission p with nurse n: allowed, or the rule against. */
static keel_status try_nurse(const keel_roster *r, const keel_workload *w, size_t p, size_t n,
                             int *plan, keel_preview_nurse *out, keel_error *err)
{
    for (int q = w->first_part[p]; q < w->first_part[p + 1]; q++)
        plan[q] = (int)n;
    keel_findings found = {0};
    keel_metrics *m = NULL;
    keel_status rc = keel_plan_check(r, w, plan, &found, err);
    *out = (keel_preview_nurse){.nurse = (int)n};
    if (!rc)
        out->rule = rule_against(&found, p, n);
    if (!rc && !out->rule)
        rc = keel_metrics_compute(w, plan, &m, err);
    if (!rc && m) {
        out->allowed = true;
        out->utilisation = m->nurses[n].utilisation;
        out->overload = out->utilisation > 1.0;
    }
    keel_metrics_free(m);
    keel_findings_fini(&found);
    return rc;
}

keel_status keel_preview_compute(const keel_roster *r, const keel_workload *w,
                                 const int *nurse_of, keel_preview **out, keel_error *err)
{
    *out = NULL;
    keel_preview *pv = keel_calloc(1, sizeof *pv);
    size_t wanted = 0;
    for (size_t p = 0; p < r->npatients; p++)
        wanted += r->patients[p].expected && !r->patients[p].nurse;
    int *plan = keel_calloc(w->npatients ? w->npatients : 1, sizeof *plan);
    if (pv && wanted)
        pv->admissions = keel_calloc(wanted, sizeof *pv->admissions);
    keel_status rc = KEEL_OK;
    if (!pv || !plan || (wanted && !pv->admissions)) {
        rc = keel_error_add(err, KEEL_ERR_NOMEM, NULL, 0, 0, NULL, "out of memory");
        goto out;
    }
    for (size_t p = 0; !rc && p < r->npatients; p++) {
        if (!r->patients[p].expected || r->patients[p].nurse)
            continue;
        keel_preview_admission *a = &pv->admissions[pv->nadmissions++];
        a->patient = p;
        a->nurses = keel_calloc(w->nnurses ? w->nnurses : 1, sizeof *a->nurses);
        if (!a->nurses) {
            rc = keel_error_add(err, KEEL_ERR_NOMEM, NULL, 0, 0, NULL, "out of memory");
            break;
        }
        memcpy(plan, nurse_of, w->npatients * sizeof *plan);
        for (size_t n = 0; !rc && n < w->nnurses; n++)
            if (keel_workload_counted(w, n))
                rc = try_nurse(r, w, p, n, plan, &a->nurses[a->nnurses++], err);
        qsort(a->nurses, a->nnurses, sizeof *a->nurses, by_rank);
    }
out:
    free(plan);
    if (rc)
        keel_preview_free(pv);
    else
        *out = pv;
    return rc;
}
