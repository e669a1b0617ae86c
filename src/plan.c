/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * plan.c - an assignment people wrote (each patient's `nurse:`), and the
 * rules it breaks.  Used by `keel check` to score a charge nurse's own plan.
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
        for (size_t i = 0; i < pat->nneeds; i++) {
            if (keel_nurse_has_skill(&r->nurses[n], pat->needs[i]))
                continue;
            char *msg = keel_asprintf("%s needs %s; %s does not have it", pat->id, pat->needs[i],
                                      r->nurses[n].id);
            keel_status rc = keel_findings_add(out, "skill", &p, 1, &n, 1, msg);
            if (rc)
                return rc;
        }
    }
    return KEEL_OK;
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
        if ((long)k <= w->max_patients[n])
            continue;
        char *msg = keel_asprintf("%s has %zu patients; the patient limit is %d", r->nurses[n].id,
                                  k, w->max_patients[n]);
        rc = keel_findings_add(out, "patient_limit", mine, k, &n, 1, msg);
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
