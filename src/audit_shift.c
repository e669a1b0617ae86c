/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * audit_shift.c - one past shift judged after the fact (keel/audit.h): the
 * plan its roster records, its figures (keel_metrics_compute()), every rule
 * it broke (keel_plan_check(), and the break covers keel_course_compute()
 * flags) with the times each holds, the best heaviest utilisation the same
 * rules allowed (stage 1 of keel_solve()), continuity kept, and the shares
 * of "the most" of each measure.  Safe to run for different rosters in
 * different threads.
 */
#include <stdint.h>
#include <stdlib.h>
#include <string.h>

#include "alloc.h"
#include "audit_internal.h"
#include "keel/course.h"
#include "keel/metrics.h"
#include "keel/plan.h"
#include "keel/solve.h"
#include "keel/workload.h"
#include "roster_internal.h"
#include "workload_internal.h"

const char *keel_audit_measure_name(keel_audit_measure m)
{
    static const char *const names[KEEL_AUDIT_MEASURES] = {"heaviest", "high_acuity", "isolation",
                                                           "zones"};
    return m < KEEL_AUDIT_MEASURES ? names[m] : "";
}

static char *copy_or_null(const char *s, bool *nomem)
{
    if (!s)
        return NULL;
    char *c = keel_strdup(s);
    *nomem = *nomem || !c;
    return c;
}

/* Copies the ids of the roster's patients (or nurses) listed by index. */
static char **ids_of(const keel_roster *r, const size_t *idx, size_t n, bool patients, bool *nomem)
{
    char **ids = keel_calloc(n ? n : 1, sizeof *ids);
    if (!ids) {
        *nomem = true;
        return NULL;
    }
    for (size_t i = 0; i < n; i++)
        ids[i] = copy_or_null(patients ? r->patients[idx[i]].id : r->nurses[idx[i]].id, nomem);
    return ids;
}

/* A plan check finding under the clock starts "from HH:MM to HH:MM, "
 * (keel/plan.h); that stretch is its interval. */
static void read_interval(const char *message, keel_audit_violation *v, bool *nomem)
{
    if (strncmp(message, "from ", 5) != 0 || strlen(message) < 19 ||
        strncmp(message + 10, " to ", 4) != 0 || message[19] != ',')
        return;
    v->intervals = keel_calloc(1, sizeof *v->intervals);
    if (!v->intervals) {
        *nomem = true;
        return;
    }
    memcpy(v->intervals[0].from, message + 5, 5);
    memcpy(v->intervals[0].to, message + 14, 5);
    v->nintervals = 1;
}

static keel_audit_violation *add_violation(keel_audit_shift *s, bool *nomem)
{
    keel_audit_violation *grown =
        keel_reallocarray(s->violations, s->nviolations + 1, sizeof *grown);
    if (!grown) {
        *nomem = true;
        return NULL;
    }
    s->violations = grown;
    keel_audit_violation *v = &s->violations[s->nviolations++];
    *v = (keel_audit_violation){0};
    return v;
}

static void take_findings(const keel_roster *r, const keel_workload *w, const keel_findings *f,
                          keel_audit_shift *s, bool *nomem)
{
    for (size_t i = 0; i < f->n && !*nomem; i++) {
        const keel_finding *fi = &f->items[i];
        keel_audit_violation *v = add_violation(s, nomem);
        if (!v)
            return;
        v->rule = copy_or_null(fi->rule, nomem);
        v->patients = ids_of(r, fi->patients, fi->npatients, true, nomem);
        v->npatients = v->patients ? fi->npatients : 0;
        v->nurses = ids_of(r, fi->nurses, fi->nnurses, false, nomem);
        v->nnurses = v->nurses ? fi->nnurses : 0;
        v->message = copy_or_null(fi->message, nomem);
        if (w->clocked)
            read_interval(fi->message, v, nomem);
    }
}

/* Every timed break whose cover keel_course_compute() flags. */
static void take_breaks(const keel_roster *r, const keel_course *c, keel_audit_shift *s,
                        bool *nomem)
{
    for (size_t i = 0; i < c->nbreaks && !*nomem; i++) {
        const keel_break_cover *b = &c->breaks[i];
        if (!b->rule)
            continue;
        keel_audit_violation *v = add_violation(s, nomem);
        if (!v)
            return;
        size_t nurses[2] = {b->nurse, b->cover >= 0 ? (size_t)b->cover : 0};
        v->rule = copy_or_null("break_cover", nomem);
        v->patients = ids_of(r, b->patients, b->npatients, true, nomem);
        v->npatients = v->patients ? b->npatients : 0;
        v->nurses = ids_of(r, nurses, b->cover >= 0 ? 2 : 1, false, nomem);
        v->nnurses = v->nurses ? (b->cover >= 0 ? 2u : 1u) : 0;
        v->intervals = keel_calloc(1, sizeof *v->intervals);
        if (!v->intervals) {
            *nomem = true;
            return;
        }
        char at[KEEL_TIME_SIZE], until[KEEL_TIME_SIZE];
        keel_roster_clock_text(r, b->at, at);
        keel_roster_clock_text(r, b->at + b->minutes, until);
        memcpy(v->intervals[0].from, at, 5);
        memcpy(v->intervals[0].to, until, 5);
        v->nintervals = 1;
        const char *who = b->cover >= 0 ? r->nurses[b->cover].id : NULL;
        if (strcmp(b->rule, "no_cover") == 0)
            v->message =
                keel_asprintf("from %s to %s, %s's break has nobody to hold her %d "
                              "patient%s",
                              at, until, r->nurses[b->nurse].id, b->most, b->most == 1 ? "" : "s");
        else
            v->message =
                keel_asprintf("from %s to %s, %s holds %d patients while covering %s's "
                              "break, over the limit of %d (%s)",
                              at, until, who, b->most, r->nurses[b->nurse].id, b->limit, b->rule);
        *nomem = *nomem || !v->message;
    }
}

/* Her amount of each measure: distinct high-acuity and isolation patients,
 * distinct zones, over the parts she held. */
static void count_amounts(const keel_roster *r, const keel_workload *w, const int *nurse_of,
                          keel_audit_shift *s, bool *nomem)
{
    size_t nparts = keel_workload_nparts(w);
    unsigned char *seen = keel_calloc(r->npatients + w->nzones + 1, 1);
    if (!seen) {
        *nomem = true;
        return;
    }
    for (size_t n = 0; n < s->nnurses; n++) {
        memset(seen, 0, r->npatients + w->nzones + 1);
        keel_audit_nurse *an = &s->nurses[n];
        for (size_t q = 0; q < nparts; q++) {
            if (nurse_of[q] != (int)n)
                continue;
            size_t p = (size_t)w->patient[q];
            if (!seen[p]) {
                seen[p] = 1;
                an->amount[KEEL_AUDIT_HIGH_ACUITY] += w->high_acuity[q];
                an->amount[KEEL_AUDIT_ISOLATION] += r->patients[p].isolation != KEEL_ISOLATION_NONE;
            }
            if (w->zone[q] >= 0 && !seen[r->npatients + (size_t)w->zone[q]]) {
                seen[r->npatients + (size_t)w->zone[q]] = 1;
                an->amount[KEEL_AUDIT_ZONES]++;
            }
        }
    }
    free(seen);
}

/* a/b > c/d for capacities above 0, in exact integers. */
static int compare_use(const keel_audit_nurse *x, const keel_audit_nurse *y)
{
    long long l = (long long)x->load_minutes * y->capacity_minutes;
    long long rr = (long long)y->load_minutes * x->capacity_minutes;
    return (l > rr) - (l < rr);
}

/* The shares of the most, per measure (keel/audit.h). */
static void share_the_most(keel_audit_shift *s)
{
    for (int m = 0; m < KEEL_AUDIT_MEASURES; m++) {
        size_t top = SIZE_MAX, ties = 0;
        for (size_t n = 0; n < s->nnurses; n++) {
            const keel_audit_nurse *an = &s->nurses[n];
            if (!an->counted)
                continue;
            int c = top == SIZE_MAX            ? 1
                    : m == KEEL_AUDIT_HEAVIEST ? compare_use(an, &s->nurses[top])
                                               : (an->amount[m] > s->nurses[top].amount[m]) -
                                                     (an->amount[m] < s->nurses[top].amount[m]);
            if (c > 0) {
                top = n;
                ties = 1;
            } else if (c == 0) {
                ties++;
            }
        }
        if (top == SIZE_MAX)
            continue;
        const keel_audit_nurse *t = &s->nurses[top];
        if (m == KEEL_AUDIT_HEAVIEST ? t->load_minutes == 0 : t->amount[m] == 0)
            continue; /* nothing to be the most of: not at stake */
        for (size_t n = 0; n < s->nnurses; n++) {
            keel_audit_nurse *an = &s->nurses[n];
            int c = m == KEEL_AUDIT_HEAVIEST
                        ? compare_use(an, t)
                        : (an->amount[m] > t->amount[m]) - (an->amount[m] < t->amount[m]);
            if (an->counted && c == 0)
                an->share[m] = 1.0 / (double)ties;
        }
    }
}

/* The best heaviest utilisation the rules allowed: stage 1 of a solve of
 * the roster without what only the later stages read (previous nurses for
 * continuity; rooms, and zones unless policy.max_zones makes them a rule,
 * for proximity), so that the time goes to the balance.  Called last: it
 * changes the roster. */
static keel_status solve_best(keel_roster *r, const keel_audit_options *o, keel_audit_shift *s,
                              keel_error *err)
{
    for (size_t p = 0; p < r->npatients; p++) {
        keel_patient *pa = &r->patients[p];
        free(pa->previous_nurse);
        free(pa->room);
        pa->previous_nurse = pa->room = NULL;
        if (r->policy.max_zones == KEEL_ABSENT) {
            free(pa->zone);
            pa->zone = NULL;
        }
    }
    keel_workload *w = NULL;
    keel_status rc = keel_workload_compute(r, &w, err);
    if (rc)
        return rc;
    keel_solve_options so = {.time_limit_ms = o->time_limit_ms};
    keel_solution *sol = NULL;
    rc = keel_solve(r, w, &so, &sol, err);
    keel_workload_free(w);
    if (rc)
        return rc;
    s->best_status = keel_solve_status_name(sol->status);
    for (size_t i = 0; i < sol->nstages; i++)
        if (sol->status != KEEL_SOLVE_INFEASIBLE && strcmp(sol->stages[i].name, "peak") == 0) {
            s->best_known = true;
            s->best_status = keel_solve_status_name(sol->stages[i].status);
            s->best_max_utilisation = sol->stages[i].value;
            s->best_bound = sol->stages[i].bound;
            s->excess = s->max_utilisation - s->best_max_utilisation;
        }
    keel_solution_free(sol);
    return KEEL_OK;
}

static void continuity(const keel_roster *r, keel_audit_shift *s)
{
    for (size_t p = 0; p < r->npatients; p++) {
        const keel_patient *pa = &r->patients[p];
        if (!pa->previous_nurse || keel_roster_find_nurse(r, pa->previous_nurse) < 0)
            continue;
        s->continuity_candidates++;
        s->continuity_kept += pa->nurse && strcmp(pa->nurse, pa->previous_nurse) == 0;
    }
}

static char *table_note(const keel_roster *r, bool *nomem)
{
    const keel_law_table *t = r->policy.ratio_table;
    if (!t || !r->shift.date || strcmp(t->encoded, r->shift.date) <= 0)
        return NULL;
    char cite[KEEL_LAW_CITE_SIZE];
    keel_law_cite(t, cite, sizeof cite);
    char *note = keel_asprintf("the ratio table was encoded on %s, after this shift (%s): its "
                               "limits are the text as encoded then, which may differ from the "
                               "rule in force on the shift's date; table %s",
                               t->encoded, r->shift.date, cite);
    *nomem = *nomem || !note;
    return note;
}

keel_status keel_audit_shift_compute(keel_roster *r, size_t index, size_t document,
                                     const keel_audit_options *o, keel_audit_shift *s,
                                     keel_error *err)
{
    keel_workload *w = NULL;
    keel_metrics *m = NULL;
    keel_course *course = NULL;
    keel_findings found = {0};
    int *plan = NULL;
    bool nomem = false;
    *s = (keel_audit_shift){.index = index, .document = document, .best_status = "skipped"};
    r->policy.balance = KEEL_BALANCE_PEAK; /* the best possible is the lowest peak */
    keel_status rc = keel_workload_compute(r, &w, err);
    if (rc)
        goto out;
    size_t nparts = keel_workload_nparts(w);
    plan = keel_calloc(nparts ? nparts : 1, sizeof *plan);
    s->nurses = keel_calloc(r->nnurses ? r->nnurses : 1, sizeof *s->nurses);
    s->source = copy_or_null(r->path, &nomem);
    s->date = copy_or_null(r->shift.date, &nomem);
    s->label = copy_or_null(r->shift.label, &nomem);
    if (!plan || !s->nurses || nomem)
        goto nomem;
    s->weekday = keel_audit_stats_weekday(r->shift.date);
    s->npatients = r->npatients;
    s->nnurses = r->nnurses;
    keel_plan_from_roster(r, w, plan);
    for (size_t p = 0; p < r->npatients; p++) {
        bool missing = false;
        for (int q = w->first_part[p]; q < w->first_part[p + 1]; q++)
            missing = missing || plan[q] < 0;
        s->nunassigned += missing;
    }
    rc = keel_metrics_compute(w, plan, &m, err);
    if (!rc)
        rc = keel_plan_check(r, w, plan, &found, err);
    if (!rc)
        rc = keel_course_compute(r, w, plan, 0, &course, err);
    if (rc)
        goto out;
    for (size_t n = 0; n < r->nnurses; n++) {
        keel_audit_nurse *an = &s->nurses[n];
        const keel_nurse_metrics *nm = &m->nurses[n];
        an->id = copy_or_null(r->nurses[n].id, &nomem);
        an->counted = nm->counted;
        an->npatients = nm->npatients;
        an->load_minutes = nm->load_minutes;
        an->capacity_minutes = nm->capacity_minutes;
        an->utilisation = nm->utilisation;
    }
    s->ncounted = m->ncounted;
    s->max_utilisation = m->max_utilisation;
    s->min_utilisation = m->min_utilisation;
    s->mean_utilisation = m->mean_utilisation;
    s->spread = m->spread;
    s->peak_to_mean = m->peak_to_mean;
    s->cv = m->cv;
    s->jain = m->jain;
    s->gini = m->gini;
    count_amounts(r, w, plan, s, &nomem);
    share_the_most(s);
    take_findings(r, w, &found, s, &nomem);
    take_breaks(r, course, s, &nomem);
    continuity(r, s);
    s->table_note = table_note(r, &nomem);
    if (nomem)
        goto nomem;
    if (!o->no_best)
        rc = solve_best(r, o, s, err);
    goto out;
nomem:
    rc = keel_error_add(err, KEEL_ERR_NOMEM, NULL, 0, 0, NULL, "out of memory");
out:
    keel_findings_fini(&found);
    keel_course_free(course);
    keel_metrics_free(m);
    free(plan);
    keel_workload_free(w);
    return rc;
}

void keel_audit_shift_fini(keel_audit_shift *s)
{
    if (!s)
        return;
    for (size_t n = 0; n < s->nnurses && s->nurses; n++)
        free(s->nurses[n].id);
    free(s->nurses);
    for (size_t i = 0; i < s->nviolations; i++) {
        keel_audit_violation *v = &s->violations[i];
        for (size_t k = 0; k < v->npatients; k++)
            free(v->patients[k]);
        free(v->patients);
        for (size_t k = 0; k < v->nnurses; k++)
            free(v->nurses[k]);
        free(v->nurses);
        free(v->intervals);
        free(v->message);
        free(v->rule);
    }
    free(s->violations);
    free(s->source);
    free(s->date);
    free(s->label);
    free(s->table_note);
    *s = (keel_audit_shift){0};
}
