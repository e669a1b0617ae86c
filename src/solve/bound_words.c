/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * bound_words.c - says what sets the proven limit on the heaviest load.
 *
 * Each simple reason forces a floor under the heaviest utilisation U of any
 * valid assignment:
 *
 *   duty         a counted nurse's duty minutes alone: duty(n) / capacity(n)
 *   patient      one patient on the nurse it suits best:
 *                min over eligible n of (duty(n) + care(p)) / capacity(n)
 *   average      the unit's work over the nurses' time:
 *                (sum of care + duty of counted nurses) / sum of capacity
 *   group        patients who may only go to the nurses S (a competency
 *                group, locks, avoid lists): (their care + duty of S) /
 *                capacity of S, for S the eligible nurses of some patient
 *
 * The largest floor that reaches the stage-1 bound is the explanation;
 * when the bound is above every floor, it was proven by search: patients
 * are whole (and limits and the rules that join patients hold; with one
 * zone per nurse, the nurses split among the zones, bound_split.c), so the
 * work cannot be split as evenly as the averages allow.
 */
#include <stdlib.h>
#include <string.h>

#include "alloc.h"
#include "bound.h"
#include "measure.h"
#include "workload_internal.h"

/* Utilisations closer than this are the same bound (both come from whole
 * minutes over at most a day's minutes, so distinct ones differ by far more). */
#define BOUND_EPSILON 1e-9

typedef struct floor_found {
    keel_ratio value;
    const char *kind;
    size_t who;     /* the nurse, the patient, or the patient whose group it is */
    long long work; /* minutes behind the floor */
    long long time; /* capacity behind the floor */
    size_t size;    /* patients in the group */
} floor_found;

static void consider(floor_found *best, keel_ratio value, const char *kind, size_t who,
                     long long work, long long time, size_t size)
{
    if (best->kind && keel_ratio_cmp(value, best->value) <= 0)
        return;
    *best = (floor_found){value, kind, who, work, time, size};
}

/* The nurses in the group of patient q, as "A, B and C". */
static char *group_nurses(const keel_roster *r, const keel_workload *w, size_t q)
{
    char *text = keel_strdup("");
    size_t k = 0, total = 0;
    for (size_t n = 0; n < w->nnurses; n++)
        total += keel_workload_eligible(w, q, n);
    for (size_t n = 0; text && n < w->nnurses; n++) {
        if (!keel_workload_eligible(w, q, n))
            continue;
        k++;
        const char *sep = k == 1 ? "" : k == total ? " and " : ", ";
        char *next = keel_asprintf("%s%s%s", text, sep, r->nurses[n].id);
        free(text);
        text = next;
    }
    return text;
}

/* The competencies every patient of q's group needs, as "chemo, tele", or
 * NULL when they share none. */
static char *shared_needs(const keel_roster *r, const keel_workload *w, size_t q,
                          const bool *inside)
{
    const keel_patient *pq = &r->patients[w->patient[q]];
    char *text = NULL;
    for (size_t i = 0; i < pq->nneeds; i++) {
        bool all = true;
        for (size_t p = 0; p < w->npatients && all; p++) {
            if (!inside[p])
                continue;
            bool has = false;
            const keel_patient *pp = &r->patients[w->patient[p]];
            for (size_t j = 0; j < pp->nneeds && !has; j++)
                has = strcmp(pp->needs[j], pq->needs[i]) == 0;
            all = has;
        }
        if (!all)
            continue;
        char *next =
            text ? keel_asprintf("%s and %s", text, pq->needs[i]) : keel_strdup(pq->needs[i]);
        free(text);
        if (!next)
            return NULL;
        text = next;
    }
    return text;
}

/* True when the shared competencies explain the group: every nurse who
 * takes patients and may not take q lacks one of the competencies every
 * patient inside needs.  Otherwise a lock or an avoid list keeps them from
 * her, and "who need ..." would be a wrong reason. */
static bool needs_explain(const keel_roster *r, const keel_workload *w, size_t q,
                          const bool *inside)
{
    const keel_patient *pq = &r->patients[w->patient[q]];
    for (size_t n = 0; n < w->nnurses; n++) {
        if (!keel_workload_counted(w, n) || keel_workload_eligible(w, q, n))
            continue;
        bool lacks = false;
        for (size_t i = 0; i < pq->nneeds && !lacks; i++) {
            bool all = true; /* every patient inside needs it */
            for (size_t p = 0; p < w->npatients && all; p++) {
                if (!inside[p])
                    continue;
                const keel_patient *pp = &r->patients[w->patient[p]];
                bool has = false;
                for (size_t j = 0; j < pp->nneeds && !has; j++)
                    has = strcmp(pp->needs[j], pq->needs[i]) == 0;
                all = has;
            }
            lacks = all && !keel_nurse_has_skill(&r->nurses[n], pq->needs[i]);
        }
        if (!lacks)
            return false;
    }
    return true;
}

/* True when every patient inside is locked to a nurse. */
static bool all_locked(const keel_roster *r, const keel_workload *w, const bool *inside)
{
    for (size_t p = 0; p < w->npatients; p++)
        if (inside[p] && !r->patients[w->patient[p]].lock)
            return false;
    return true;
}

static char *describe(const keel_roster *r, const keel_workload *w, const floor_found *f,
                      double bound, bool below, bool *inside)
{
    double pct = 100.0 * keel_ratio_value(f->value), at = 100.0 * bound;
    if (below) {
        char *simple = describe(r, w, f, bound, false, inside);
        /* With one zone per nurse, the nurses' split among the zones too. */
        bool zones = keel_measure_one_zone_each(w);
        char *text = simple ? keel_asprintf("patients are whole%s: with the patient limits and the "
                                            "unit's rules, no split of whole patients%s brings the "
                                            "heaviest load below %.1f %% (proven by search); the "
                                            "largest simple reason gives %.1f %%: %s",
                                            zones ? " and each nurse works in one zone" : "",
                                            zones ? " and of the nurses among the zones" : "", at,
                                            pct, simple)
                            : NULL;
        free(simple);
        return text;
    }
    if (f->kind[0] == 'd')
        return keel_asprintf("%s's duty minutes alone are %lld of %lld min: %.1f %%",
                             r->nurses[f->who].id, f->work, f->time, pct);
    if (f->kind[0] == 'p')
        return keel_asprintf("%s alone needs %lld min of care: even with the nurse it suits "
                             "best that nurse is at %.1f %%",
                             r->patients[w->patient[f->who]].id, f->work, pct);
    if (f->kind[0] == 'a')
        return keel_asprintf("the unit's work (%lld min of care and duty) over the nurses' %lld "
                             "min is %.1f %%: no plan keeps every nurse below the average",
                             f->work, f->time, pct);
    for (size_t p = 0; p < w->npatients; p++) {
        inside[p] = true;
        for (size_t n = 0; n < w->nnurses && inside[p]; n++)
            inside[p] = !keel_workload_eligible(w, p, n) || keel_workload_eligible(w, f->who, n);
    }
    char *nurses = group_nurses(r, w, f->who), *needs = shared_needs(r, w, f->who, inside);
    char *text = NULL;
    if (nurses && needs && needs_explain(r, w, f->who, inside))
        text = keel_asprintf("the %zu patient%s who need%s %s (%lld min with the nurses' duty) "
                             "can only go to %s (%lld min): %.1f %%",
                             f->size, f->size == 1 ? "" : "s", f->size == 1 ? "s" : "", needs,
                             f->work, nurses, f->time, pct);
    else if (nurses && all_locked(r, w, inside))
        text = keel_asprintf("the %zu patient%s locked to %s (%lld min with the nurses' duty, of "
                             "%lld min): %.1f %%",
                             f->size, f->size == 1 ? "" : "s", nurses, f->work, f->time, pct);
    else if (nurses)
        text = keel_asprintf("%zu patient%s can only go to %s (competencies, locks, avoid "
                             "lists): %lld min of work over %lld min, %.1f %%",
                             f->size, f->size == 1 ? "" : "s", nurses, f->work, f->time, pct);
    free(nurses);
    free(needs);
    return text;
}

keel_status keel_bound_words(const keel_roster *r, const keel_workload *w, double bound,
                                     keel_solution *sol)
{
    size_t np = w->npatients, nn = w->nnurses;
    floor_found best = {.kind = NULL};
    long long work = 0, time = 0;
    keel_classes cl;
    if (!keel_measure_classes(w, &cl)) {
        keel_measure_classes_free(&cl);
        return KEEL_ERR_NOMEM;
    }
    for (size_t p = 0; p < np; p++)
        work += w->care_minutes[p];
    for (size_t n = 0; n < nn; n++) {
        if (!keel_workload_counted(w, n))
            continue;
        work += w->duty_minutes[n];
        time += w->capacity_minutes[n];
        consider(&best, (keel_ratio){w->duty_minutes[n], w->capacity_minutes[n]}, "duty", n,
                 w->duty_minutes[n], w->capacity_minutes[n], 0);
    }
    if (time > 0)
        consider(&best, (keel_ratio){work, time}, "average", 0, work, time, np);
    for (size_t q = 0; q < np; q++) {
        keel_ratio single = {0, 1};
        bool any = false;
        long long set_time = 0, set_work = 0;
        for (size_t n = 0; n < nn; n++) {
            if (!keel_workload_eligible(w, q, n))
                continue;
            keel_ratio u = {(long long)w->duty_minutes[n] + w->care_minutes[q],
                            w->capacity_minutes[n]};
            if (!any || keel_ratio_cmp(u, single) < 0)
                single = u;
            any = true;
            set_time += w->capacity_minutes[n];
            set_work += w->duty_minutes[n];
        }
        if (!any)
            continue;
        consider(&best, single, "patient", q, w->care_minutes[q], single.den, 1);
        /* The patients whose nurses are all q's. */
        size_t size = 0;
        for (size_t a = 0; a < cl.k; a++) {
            if (cl.within[a * cl.k + cl.class_of[q]]) {
                set_work += cl.care[a];
                size += cl.size[a];
            }
        }
        if (set_time < time) /* the whole unit is the average */
            consider(&best, (keel_ratio){set_work, set_time}, "group", q, set_work, set_time, size);
    }
    keel_measure_classes_free(&cl);
    if (!best.kind)
        return KEEL_OK;
    bool *inside = keel_calloc(np ? np : 1, sizeof *inside);
    if (!inside)
        return KEEL_ERR_NOMEM;
    bool below = keel_ratio_value(best.value) < bound - BOUND_EPSILON;
    sol->bound_reason.kind = below ? "indivisible" : best.kind;
    sol->bound_reason.floor = keel_ratio_value(best.value);
    sol->bound_reason.text = describe(r, w, &best, bound, below, inside);
    free(inside);
    return sol->bound_reason.text ? KEEL_OK : KEEL_ERR_NOMEM;
}
