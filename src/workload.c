/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * workload.c - derives care minutes, capacity, duty, patient limits and
 * eligible pairs from a validated roster (second stage of the pipeline).
 * Defaults are applied here and nowhere else; see keel/workload.h for the
 * arithmetic.
 */
#include "keel/workload.h"

#include <stdlib.h>
#include <string.h>

#include "alloc.h"

static int patient_care(const keel_roster *r, const keel_patient *p)
{
    int care =
        p->care_minutes != KEEL_ABSENT ? p->care_minutes : keel_roster_acuity_minutes(r, p->acuity);
    if (care == KEEL_ABSENT)
        care = 0; /* unreachable for a validated roster */
    for (size_t i = 0; i < p->nextras; i++) {
        int extra = keel_roster_extra_minutes(r, p->extras[i]);
        if (extra != KEEL_ABSENT)
            care += extra;
    }
    return care;
}

/* The smallest of the unit's limit, the role's and the nurse's own.  An
 * orientee shares the preceptor's assignment, so takes none of her own. */
static int nurse_limit(const keel_roster *r, const keel_nurse *n)
{
    int limit = (int)r->npatients;
    int given[] = {r->policy.max_patients, r->policy.roles[n->role].max_patients, n->max_patients};
    if (n->role == KEEL_ROLE_ORIENTEE)
        return 0;
    for (size_t i = 0; i < sizeof given / sizeof given[0]; i++)
        if (given[i] != KEEL_ABSENT && given[i] < limit)
            limit = given[i];
    return limit;
}

static int or_default(int value, int fallback)
{
    return value != KEEL_ABSENT ? value : fallback;
}

static bool has_every_need(const keel_nurse *n, const keel_patient *p)
{
    for (size_t i = 0; i < p->nneeds; i++)
        if (!keel_nurse_has_skill(n, p->needs[i]))
            return false;
    return true;
}

/* The patient's own restrictions: a locked patient stays with the nurse
 * who has it; a patient never goes to a nurse on its avoid list. */
static bool patient_allows(const keel_patient *p, const keel_nurse *n)
{
    if (p->lock && p->nurse && strcmp(p->nurse, n->id) != 0)
        return false;
    for (size_t i = 0; i < p->navoid; i++)
        if (strcmp(p->avoid[i], n->id) == 0)
            return false;
    return true;
}

bool keel_workload_may_take(const keel_roster *r, const keel_workload *w, size_t p, size_t n)
{
    return w->max_patients[n] > 0 && has_every_need(&r->nurses[n], &r->patients[p]) &&
           patient_allows(&r->patients[p], &r->nurses[n]);
}

void keel_workload_free(keel_workload *w)
{
    if (!w)
        return;
    free(w->care_minutes);
    free(w->capacity_minutes);
    free(w->duty_minutes);
    free(w->max_patients);
    free(w->eligible);
    free(w);
}

keel_status keel_workload_compute(const keel_roster *r, keel_workload **out, keel_error *err)
{
    keel_status rc = KEEL_OK;
    size_t np = r->npatients, nn = r->nnurses;
    keel_workload *w = keel_calloc(1, sizeof *w);
    *out = NULL;
    if (!w)
        return keel_error_add(err, KEEL_ERR_NOMEM, NULL, 0, 0, NULL, "out of memory");
    w->npatients = np;
    w->nnurses = nn;
    w->care_minutes = keel_calloc(np, sizeof *w->care_minutes);
    w->capacity_minutes = keel_calloc(nn, sizeof *w->capacity_minutes);
    w->duty_minutes = keel_calloc(nn, sizeof *w->duty_minutes);
    w->max_patients = keel_calloc(nn, sizeof *w->max_patients);
    w->eligible = keel_calloc(np * nn, sizeof *w->eligible);
    if (!w->care_minutes || !w->capacity_minutes || !w->duty_minutes || !w->max_patients ||
        !w->eligible) {
        rc = keel_error_add(err, KEEL_ERR_NOMEM, NULL, 0, 0, NULL, "out of memory");
        goto out;
    }

    for (size_t n = 0; n < nn; n++) {
        const keel_nurse *nurse = &r->nurses[n];
        int minutes = or_default(nurse->minutes, r->shift.minutes);
        int breaks = or_default(nurse->break_minutes, or_default(r->shift.break_minutes, 0));
        w->capacity_minutes[n] = minutes - breaks;
        w->duty_minutes[n] = or_default(nurse->duty_minutes,
                                        or_default(r->policy.roles[nurse->role].duty_minutes, 0));
        w->max_patients[n] = nurse_limit(r, nurse);
        if (w->max_patients[n] > 0 && w->capacity_minutes[n] <= 0)
            rc = keel_error_add(err, KEEL_ERR_INPUT, r->path, nurse->mark.line, nurse->mark.column,
                                "nurses",
                                "nurse %s has %d minutes and %d "
                                "break minutes, so no time for patients; expected breaks "
                                "shorter than the time on the unit",
                                nurse->id, minutes, breaks);
    }
    if (rc)
        goto out;
    for (size_t p = 0; p < np; p++) {
        w->care_minutes[p] = patient_care(r, &r->patients[p]);
        for (size_t n = 0; n < nn; n++)
            w->eligible[p * nn + n] = keel_workload_may_take(r, w, p, n);
    }
out:
    if (rc)
        keel_workload_free(w);
    else
        *out = w;
    return rc;
}
