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
#include "keel/nas.h"

static int patient_care(const keel_roster *r, const keel_patient *p)
{
    int care = p->care_minutes != KEEL_ABSENT ? p->care_minutes
               : p->nnas > 0
                   ? keel_nas_shift_minutes(keel_nas_score(p->nas, p->nnas), r->shift.minutes)
                   : keel_roster_acuity_minutes(r, p->acuity);
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
static int nurse_limit(const keel_roster *r, const keel_nurse *n, int law)
{
    int limit = (int)r->npatients;
    int given[] = {law, r->policy.max_patients, r->policy.roles[n->role].max_patients,
                   n->max_patients};
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

static bool has_every_need(const keel_roster *r, const keel_nurse *n, const keel_patient *p)
{
    size_t nextra = r->policy.nisolation_needs[p->isolation];
    char **extra = r->policy.isolation_needs[p->isolation];
    for (size_t i = 0; i < p->nneeds; i++)
        if (!keel_nurse_has_skill(n, p->needs[i]))
            return false;
    for (size_t i = 0; i < nextra; i++)
        if (!keel_nurse_has_skill(n, extra[i]))
            return false;
    return true;
}

/* Index of name in names[0..*count), added when new; -1 for NULL. */
static int intern(const char **names, size_t *count, const char *name)
{
    if (!name)
        return -1;
    for (size_t i = 0; i < *count; i++)
        if (strcmp(names[i], name) == 0)
            return (int)i;
    names[*count] = name;
    return (int)(*count)++;
}

static signed char side_of(const keel_roster *r, const keel_patient *p)
{
    if (!r->policy.isolation_separation || p->isolation == KEEL_ISOLATION_NONE)
        return KEEL_SIDE_NONE;
    return p->isolation == KEEL_ISOLATION_PROTECTIVE ? KEEL_SIDE_PROTECTIVE : KEEL_SIDE_INFECTIOUS;
}

/* The rules that join patients: ratio, high acuity, isolation, zones,
 * rooms and continuity. */
static keel_status join_rules(const keel_roster *r, keel_workload *w)
{
    size_t np = r->npatients;
    const char **names = keel_calloc(np ? np : 1, sizeof *names);
    if (!names)
        return KEEL_ERR_NOMEM;
    w->max_high_acuity = r->policy.high_acuity.max_per_nurse;
    w->max_zones = r->policy.max_zones;
    w->tolerance = or_default(r->policy.balance_tolerance, KEEL_TOLERANCE_SCALE / 20);
    bool sides[3] = {false, false, false};
    for (size_t p = 0; p < np; p++) {
        const keel_patient *pt = &r->patients[p];
        w->ratio_limit[p] = pt->ratio != KEEL_ABSENT && pt->ratio < (int)np ? pt->ratio : (int)np;
        w->high_acuity[p] = w->max_high_acuity != KEEL_ABSENT && pt->acuity != KEEL_ABSENT &&
                            pt->acuity >= r->policy.high_acuity.level;
        w->side[p] = side_of(r, pt);
        sides[w->side[p]] = true;
        w->zone[p] = intern(names, &w->nzones, pt->zone);
        w->previous[p] = pt->previous_nurse ? keel_roster_find_nurse(r, pt->previous_nurse) : -1;
        if (w->previous[p] >= 0)
            w->ncontinuity++;
        if (w->ratio_limit[p] < (int)np)
            w->joined_rules = true;
    }
    for (size_t p = 0; p < np; p++)
        w->room[p] = intern(names, &w->nrooms, r->patients[p].room);
    w->isolation_rule = sides[KEEL_SIDE_INFECTIOUS] && sides[KEEL_SIDE_PROTECTIVE];
    w->zones_rule = w->max_zones != KEEL_ABSENT && w->nzones > (size_t)w->max_zones;
    w->joined_rules =
        w->joined_rules || w->max_high_acuity != KEEL_ABSENT || w->isolation_rule || w->zones_rule;
    free(names);
    return KEEL_OK;
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
    return w->max_patients[n] > 0 && has_every_need(r, &r->nurses[n], &r->patients[p]) &&
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
    free(w->ratio_limit);
    free(w->high_acuity);
    free(w->side);
    free(w->zone);
    free(w->room);
    free(w->previous);
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
    w->ratio_limit = keel_calloc(np, sizeof *w->ratio_limit);
    w->high_acuity = keel_calloc(np, sizeof *w->high_acuity);
    w->side = keel_calloc(np, sizeof *w->side);
    w->zone = keel_calloc(np, sizeof *w->zone);
    w->room = keel_calloc(np, sizeof *w->room);
    w->previous = keel_calloc(np, sizeof *w->previous);
    if (!w->care_minutes || !w->capacity_minutes || !w->duty_minutes || !w->max_patients ||
        !w->eligible || !w->ratio_limit || !w->high_acuity || !w->side || !w->zone || !w->room ||
        !w->previous || join_rules(r, w)) {
        rc = keel_error_add(err, KEEL_ERR_NOMEM, NULL, 0, 0, NULL, "out of memory");
        goto out;
    }

    w->law_limit = keel_law_nurse_max(r->policy.ratio_table, r->unit.type);
    if (w->law_limit < 0)
        w->law_limit = KEEL_ABSENT;
    for (size_t n = 0; n < nn; n++) {
        const keel_nurse *nurse = &r->nurses[n];
        int minutes = or_default(nurse->minutes, r->shift.minutes);
        int breaks = or_default(nurse->break_minutes, or_default(r->shift.break_minutes, 0));
        w->capacity_minutes[n] = minutes - breaks;
        w->duty_minutes[n] = or_default(nurse->duty_minutes,
                                        or_default(r->policy.roles[nurse->role].duty_minutes, 0));
        w->max_patients[n] = nurse_limit(r, nurse, w->law_limit);
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
