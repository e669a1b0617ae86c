/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * rule_min.c - min_patients: a nurse who takes patients takes at least
 * min(n) of them (her own min_patients, else the policy's).  Judged on a
 * whole plan, so the tally cannot test it patient by patient: a search
 * asks keelRuleWhole() of a finished plan and keelRuleMinMayGive() before
 * it takes a patient from a nurse.
 *
 *   rows (kept):    sum of the nurse's columns >= min(n) (without the clock;
 *                   with it the plan is checked after the search)
 *   rows (weighed): sum + s >= min(n), at 50 per patient short
 */
#include "alloc.h"
#include "finding_list.h"
#include "rule.h"
#include "workload_internal.h"

#define MIN_SEVERITY 50

static bool short_of(const keel_tally *t)
{
    for (size_t n = 0; n < t->w->nnurses; n++)
        if (keel_tally_most(t, n) < t->w->min_patients[n])
            return true;
    return false;
}

bool keelRuleMinMayGive(const keel_tally *t, size_t n)
{
    return t->w->min_patients[n] == 0 || keel_tally_most(t, n) > t->w->min_patients[n];
}

/* True when part q starts a stretch with a new nurse (the patient's first
 * part, or a hand-off). */
static bool starts_stretch(const keel_workload *w, const int *nurse_of, size_t q)
{
    return w->first_part[w->patient[q]] == (int)q || nurse_of[q - 1] != nurse_of[q];
}

static keel_status check(const keel_rule_plan *c, size_t n, size_t m, const size_t *mine, size_t k,
                         keel_findings *out)
{
    (void)m;
    const keel_workload *w = c->w;
    int count = 0;
    for (size_t i = 0; i < k; i++)
        count += starts_stretch(w, c->nurse_of, mine[i]);
    if (count >= w->min_patients[n])
        return KEEL_OK;
    char *msg = keel_asprintf("%s has %d patient%s; she takes at least %d (min_patients)",
                              c->r->nurses[n].id, count, count == 1 ? "" : "s",
                              w->min_patients[n]);
    return keel_findings_add(out, "min_patients", NULL, 0, &n, 1, msg);
}

static void rows(const keel_rows *R)
{
    const keel_workload *w = R->w;
    int least = w->min_patients[R->n];
    if (least <= 0 || (!R->soft && w->clocked))
        return;
    int row = keel_lp_row(R->lp, KEEL_LP_LO, (double)least, 0.0);
    for (size_t i = 0; i < R->ncols; i++)
        keel_lp_put(R->lp, row, R->col[i], 1.0);
    if (R->soft)
        keel_lp_put(R->lp, row, keel_lp_col(R->lp, KEEL_LP_INTEGER, 0.0, least, MIN_SEVERITY),
                    1.0);
}

static bool binds(const keel_workload *w)
{
    for (size_t n = 0; n < w->nnurses; n++)
        if (w->min_patients[n] > 0)
            return true;
    return false;
}

static void relax(keel_workload *copy, const keel_rule_spare *spare)
{
    copy->min_patients = spare->no_min;
}

static char *say(const keel_roster *r, const keel_workload *w)
{
    (void)r;
    (void)w;
    return keel_strdup("every nurse's fewest patients (min_patients)");
}

static char *conflict(const keel_roster *r, const keel_workload *w, const char *tail,
                      size_t nothers)
{
    (void)r;
    (void)w;
    (void)nothers;
    return keel_asprintf("no assignment gives every nurse who takes patients her fewest "
                         "patients (min_patients)%s; relaxing it makes one possible",
                         tail);
}

static bool nurses_alike(const keel_workload *w, size_t a, size_t b)
{
    return w->min_patients[a] == w->min_patients[b];
}

const keel_rule keel_rule_min_patients = {
    .name = "min_patients",
    .scope = KEEL_SCOPE_SHIFT,
    .severity = MIN_SEVERITY,
    .binds = binds,
    .whole = short_of,
    .check = check,
    .rows = rows,
    .relax = relax,
    .say = say,
    .conflict = conflict,
    .nurses_alike = nurses_alike,
};
