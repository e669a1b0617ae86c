/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * plan.c - an assignment people wrote (each patient's `nurse:`), and the
 * rules it breaks.  Used by `keel check` to score a charge nurse's own plan.
 * A limit set by a ratio table is reported as "exceeds the limit of <table>
 * as encoded on <date>", never as a judgement that the plan is unlawful.
 */
#include "keel/plan.h"

#include <stdlib.h>
#include <string.h>

#include "alloc.h"
#include "finding_list.h"

bool keel_plan_from_roster(const keel_roster *r, int *nurse_of)
{
    bool complete = true;
    for (size_t p = 0; p < r->npatients; p++) {
        nurse_of[p] = r->patients[p].nurse ? keel_roster_find_nurse(r, r->patients[p].nurse) : -1;
        complete = complete && nurse_of[p] >= 0;
    }
    return complete;
}

static keel_status check_skills(const keel_roster *r, const int *nurse_of, keel_findings *out)
{
    for (size_t p = 0; p < r->npatients; p++) {
        if (nurse_of[p] < 0)
            continue;
        size_t n = (size_t)nurse_of[p];
        const keel_patient *pat = &r->patients[p];
        size_t nextra = r->policy.nisolation_needs[pat->isolation];
        for (size_t i = 0; i < pat->nneeds + nextra; i++) {
            const char *need = i < pat->nneeds
                                   ? pat->needs[i]
                                   : r->policy.isolation_needs[pat->isolation][i - pat->nneeds];
            if (keel_nurse_has_skill(&r->nurses[n], need))
                continue;
            char *msg = i < pat->nneeds
                            ? keel_asprintf("%s needs %s; %s does not have it", pat->id, need,
                                            r->nurses[n].id)
                            : keel_asprintf("%s is on %s precautions, which need %s "
                                            "(policy.isolation_needs); %s does not have it",
                                            pat->id, keel_isolation_name(pat->isolation), need,
                                            r->nurses[n].id);
            keel_status rc = keel_findings_add(out, "skill", &p, 1, &n, 1, msg);
            if (rc)
                return rc;
        }
    }
    return KEEL_OK;
}

/* The rules on what one nurse holds together: limits (law, policy, role,
 * nurse), patients' own ratios, high acuity, isolation separation, zones. */
static keel_status check_nurse(const keel_roster *r, const keel_workload *w, size_t n,
                               const size_t *mine, size_t k, keel_findings *out)
{
    const char *id = r->nurses[n].id;
    keel_status rc = KEEL_OK;
    const keel_law_table *t = r->policy.ratio_table;
    if ((long)k > w->max_patients[n]) {
        bool law = w->law_limit != KEEL_ABSENT && w->max_patients[n] == w->law_limit;
        char *msg = law ? keel_asprintf("%s has %zu patients: exceeds the limit of %s (1:%d for "
                                        "%s) as encoded on %s",
                                        id, k, t->name, w->law_limit, r->unit.type, t->encoded)
                        : keel_asprintf("%s has %zu patients; the patient limit is %d", id, k,
                                        w->max_patients[n]);
        rc = keel_findings_add(out, law ? "law_limit" : "patient_limit", mine, k, &n, 1, msg);
    }
    for (size_t i = 0; i < k && !rc; i++) {
        size_t p = mine[i];
        if (r->patients[p].ratio == KEEL_ABSENT || (long)k <= r->patients[p].ratio)
            continue;
        char *msg = keel_asprintf("%s is a 1:%d patient, but %s has %zu patients",
                                  r->patients[p].id, r->patients[p].ratio, id, k);
        rc = keel_findings_add(out, "patient_ratio", mine, k, &n, 1, msg);
    }
    size_t high = 0, sides[3] = {0, 0, 0};
    for (size_t i = 0; i < k; i++) {
        high += w->high_acuity[mine[i]];
        sides[w->side[mine[i]]]++;
    }
    if (!rc && w->max_high_acuity != KEEL_ABSENT && (long)high > w->max_high_acuity) {
        char *msg = keel_asprintf("%s has %zu high-acuity patients (acuity %d or more); the "
                                  "policy allows %d per nurse",
                                  id, high, r->policy.high_acuity.level, w->max_high_acuity);
        rc = keel_findings_add(out, "high_acuity", mine, k, &n, 1, msg);
    }
    if (!rc && sides[KEEL_SIDE_PROTECTIVE] && sides[KEEL_SIDE_INFECTIOUS]) {
        char *msg =
            keel_asprintf("%s has %zu protective-isolation patient%s and %zu on contact, "
                          "droplet or airborne precautions; the unit's policy keeps "
                          "them apart",
                          id, sides[KEEL_SIDE_PROTECTIVE],
                          sides[KEEL_SIDE_PROTECTIVE] == 1 ? "" : "s", sides[KEEL_SIDE_INFECTIOUS]);
        rc = keel_findings_add(out, "isolation", mine, k, &n, 1, msg);
    }
    if (!rc && w->max_zones != KEEL_ABSENT) {
        long zones = 0;
        for (size_t i = 0; i < k; i++) {
            bool seen = w->zone[mine[i]] < 0;
            for (size_t j = 0; j < i && !seen; j++)
                seen = w->zone[mine[j]] == w->zone[mine[i]];
            zones += !seen;
        }
        if (zones > w->max_zones) {
            char *msg = keel_asprintf("%s has patients in %ld zones; policy.max_zones is %d", id,
                                      zones, w->max_zones);
            rc = keel_findings_add(out, "zones", mine, k, &n, 1, msg);
        }
    }
    return rc;
}

static keel_status check_limits(const keel_roster *r, const keel_workload *w, const int *nurse_of,
                                keel_findings *out)
{
    size_t *mine = keel_malloc((r->npatients ? r->npatients : 1) * sizeof *mine);
    if (!mine)
        return KEEL_ERR_NOMEM;
    keel_status rc = KEEL_OK;
    for (size_t n = 0; n < r->nnurses && !rc; n++) {
        size_t k = 0;
        for (size_t p = 0; p < r->npatients; p++)
            if (nurse_of[p] == (int)n)
                mine[k++] = p;
        rc = check_nurse(r, w, n, mine, k, out);
    }
    free(mine);
    return rc;
}

/* A locked patient must stay with its nurse; nobody gets a patient who
 * must avoid them. */
static keel_status check_restrictions(const keel_roster *r, const int *nurse_of, keel_findings *out)
{
    keel_status rc = KEEL_OK;
    for (size_t p = 0; p < r->npatients && !rc; p++) {
        if (nurse_of[p] < 0)
            continue;
        size_t n = (size_t)nurse_of[p];
        const keel_patient *pat = &r->patients[p];
        if (pat->lock && pat->nurse && strcmp(pat->nurse, r->nurses[n].id) != 0) {
            char *msg = keel_asprintf("%s is locked to %s but the plan gives the patient to %s",
                                      pat->id, pat->nurse, r->nurses[n].id);
            rc = keel_findings_add(out, "lock", &p, 1, &n, 1, msg);
        }
        for (size_t i = 0; i < pat->navoid && !rc; i++) {
            if (strcmp(pat->avoid[i], r->nurses[n].id) != 0)
                continue;
            char *msg = keel_asprintf("%s must not be cared for by %s (avoid list)", pat->id,
                                      r->nurses[n].id);
            rc = keel_findings_add(out, "avoid", &p, 1, &n, 1, msg);
        }
    }
    return rc;
}

keel_status keel_plan_check(const keel_roster *r, const keel_workload *w, const int *nurse_of,
                            keel_findings *out, keel_error *err)
{
    keel_status rc = check_skills(r, nurse_of, out);
    if (!rc)
        rc = check_limits(r, w, nurse_of, out);
    if (!rc)
        rc = check_restrictions(r, nurse_of, out);
    if (rc)
        keel_error_add(err, rc, NULL, 0, 0, NULL, "out of memory");
    return rc;
}
