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

/* True when nurse n is on throughout part q. */
static bool on_for(const keel_workload *w, size_t q, int n)
{
    return n >= 0 && w->nurse_start[n] <= w->part_start[q] && w->nurse_end[n] >= w->part_end[q];
}

bool keel_plan_from_roster(const keel_roster *r, const keel_workload *w, int *nurse_of)
{
    bool complete = true;
    for (size_t p = 0; p < r->npatients; p++) {
        const keel_patient *pat = &r->patients[p];
        size_t next = 0; /* the next planned hand-off */
        int n = pat->nurse ? keel_roster_find_nurse(r, pat->nurse) : -1;
        for (int q = w->first_part[p]; q < w->first_part[p + 1]; q++) {
            if (q > w->first_part[p] && n >= 0 && !on_for(w, (size_t)q, n))
                n = next < pat->nhandoffs ? keel_roster_find_nurse(r, pat->handoffs[next++]) : -1;
            nurse_of[q] = n;
            complete = complete && n >= 0;
        }
    }
    return complete;
}

/* Roster patient of each part in parts[0..k), into out (for findings). */
static void to_patients(const keel_workload *w, const size_t *parts, size_t k, size_t *out)
{
    for (size_t i = 0; i < k; i++)
        out[i] = (size_t)w->patient[parts[i]];
}

/* True when part q starts a stretch with a new nurse (the patient's first
 * part, or a hand-off). */
static bool starts_stretch(const keel_workload *w, const int *nurse_of, size_t q)
{
    return w->first_part[w->patient[q]] == (int)q || nurse_of[q - 1] != nurse_of[q];
}

static keel_status check_skills(const keel_roster *r, const keel_workload *w, const int *nurse_of,
                                keel_findings *out)
{
    for (size_t q = 0; q < w->npatients; q++) {
        if (nurse_of[q] < 0 || !starts_stretch(w, nurse_of, q))
            continue;
        size_t n = (size_t)nurse_of[q], p = (size_t)w->patient[q];
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
 * nurse), patients' own ratios, high acuity, isolation separation, zones.
 * mine[0..k) are parts; who[0..k) their roster patients. */
static keel_status check_nurse(const keel_roster *r, const keel_workload *w, size_t n,
                               const size_t *mine, const size_t *who, size_t k, keel_findings *out)
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
        rc = keel_findings_add(out, law ? "law_limit" : "patient_limit", who, k, &n, 1, msg);
    }
    for (size_t i = 0; i < k && !rc; i++) {
        const keel_patient *pat = &r->patients[who[i]];
        if (pat->ratio == KEEL_ABSENT || (long)k <= pat->ratio)
            continue;
        char *msg = keel_asprintf("%s is a 1:%d patient, but %s has %zu patients", pat->id,
                                  pat->ratio, id, k);
        rc = keel_findings_add(out, "patient_ratio", who, k, &n, 1, msg);
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
        rc = keel_findings_add(out, "high_acuity", who, k, &n, 1, msg);
    }
    if (!rc && sides[KEEL_SIDE_PROTECTIVE] && sides[KEEL_SIDE_INFECTIOUS]) {
        char *msg =
            keel_asprintf("%s has %zu protective-isolation patient%s and %zu on contact, "
                          "droplet or airborne precautions; the unit's policy keeps "
                          "them apart",
                          id, sides[KEEL_SIDE_PROTECTIVE],
                          sides[KEEL_SIDE_PROTECTIVE] == 1 ? "" : "s", sides[KEEL_SIDE_INFECTIOUS]);
        rc = keel_findings_add(out, "isolation", who, k, &n, 1, msg);
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
            rc = keel_findings_add(out, "zones", who, k, &n, 1, msg);
        }
    }
    return rc;
}

/* True when rule is one of the count limits, named moment_limit with the
 * clock. */
static bool counts(const char *rule)
{
    return strcmp(rule, "law_limit") == 0 || strcmp(rule, "patient_limit") == 0 ||
           strcmp(rule, "patient_ratio") == 0;
}

/* Moves the findings of one moment into out: each rule once per nurse
 * (the first moment it breaks), with the time said when there is a clock. */
static keel_status keep_new(const keel_roster *r, const keel_workload *w, size_t m,
                            keel_findings *found, keel_findings *out, size_t from)
{
    keel_status rc = KEEL_OK;
    for (size_t i = 0; i < found->n && !rc; i++) {
        const keel_finding *f = &found->items[i];
        const char *rule = w->clocked && counts(f->rule) ? "moment_limit" : f->rule;
        bool seen = false;
        for (size_t j = from; w->clocked && j < out->n && !seen; j++)
            seen = strcmp(out->items[j].rule, rule) == 0;
        if (seen)
            continue;
        char at[KEEL_TIME_SIZE], until[KEEL_TIME_SIZE];
        keel_time_text(r, w->moment_start[m], at);
        keel_time_text(r, w->moment_start[m + 1], until);
        char *msg = w->clocked ? keel_asprintf("from %s to %s, %s", at, until, f->message)
                               : keel_strdup(f->message);
        rc = keel_findings_add(out, rule, f->patients, f->npatients, f->nurses, f->nnurses, msg);
    }
    keel_findings_fini(found);
    return rc;
}

static keel_status check_limits(const keel_roster *r, const keel_workload *w, const int *nurse_of,
                                keel_findings *out)
{
    size_t np = w->npatients ? w->npatients : 1;
    size_t *mine = keel_malloc(np * sizeof *mine);
    size_t *who = keel_malloc(np * sizeof *who);
    keel_status rc = mine && who ? KEEL_OK : KEEL_ERR_NOMEM;
    for (size_t n = 0; n < r->nnurses && !rc; n++) {
        size_t from = out->n;
        for (size_t m = 0; m < w->nmoments && !rc; m++) {
            size_t k = 0;
            for (size_t q = 0; q < w->npatients; q++)
                if (nurse_of[q] == (int)n && w->first_moment[q] <= (int)m &&
                    (int)m < w->last_moment[q])
                    mine[k++] = q;
            if (k == 0)
                continue;
            to_patients(w, mine, k, who);
            keel_findings found = {0};
            rc = check_nurse(r, w, n, mine, who, k, &found);
            if (rc)
                keel_findings_fini(&found);
            else
                rc = keep_new(r, w, m, &found, out, from);
        }
    }
    free(mine);
    free(who);
    return rc;
}

/* policy.max_utilisation and the fewest patients, on the whole plan. */
static keel_status check_bounds(const keel_roster *r, const keel_workload *w, const int *nurse_of,
                                keel_findings *out)
{
    keel_status rc = KEEL_OK;
    for (size_t n = 0; n < w->nnurses && !rc; n++) {
        long long care = 0;
        int count = 0;
        for (size_t q = 0; q < w->npatients; q++) {
            if (nurse_of[q] != (int)n)
                continue;
            care += w->care_minutes[q];
            count += starts_stretch(w, nurse_of, q);
        }
        const char *id = r->nurses[n].id;
        if (care > w->max_care[n]) {
            char *msg = keel_asprintf("%s carries %lld min of care; policy.max_utilisation "
                                      "allows %lld",
                                      id, care, w->max_care[n]);
            rc = keel_findings_add(out, "capacity", NULL, 0, &n, 1, msg);
        }
        if (!rc && count < w->min_patients[n]) {
            char *msg = keel_asprintf("%s has %d patient%s; she takes at least %d (min_patients)",
                                      id, count, count == 1 ? "" : "s", w->min_patients[n]);
            rc = keel_findings_add(out, "min_patients", NULL, 0, &n, 1, msg);
        }
    }
    return rc;
}

/* With the clock: each patient has a nurse on duty while present, and the
 * planned hand-offs happen when a nurse leaves. */
static keel_status check_cover(const keel_roster *r, const keel_workload *w, const int *nurse_of,
                               keel_findings *out)
{
    keel_status rc = KEEL_OK;
    for (size_t p = 0; p < r->npatients && !rc; p++) {
        const keel_patient *pat = &r->patients[p];
        size_t used = 0;
        for (int q = w->first_part[p]; q < w->first_part[p + 1] && !rc; q++) {
            int n = nurse_of[q];
            used += q > w->first_part[p] && n >= 0 && n != nurse_of[q - 1];
            if (n < 0 || on_for(w, (size_t)q, n))
                continue;
            char from[KEEL_TIME_SIZE], to[KEEL_TIME_SIZE];
            keel_time_text(r, w->part_start[q], from);
            keel_time_text(r, w->part_end[q], to);
            size_t nn = (size_t)n;
            char *msg = keel_asprintf("%s is with %s from %s to %s, but %s is not on then", pat->id,
                                      r->nurses[n].id, from, to, r->nurses[n].id);
            rc = keel_findings_add(out, "hand_off", &p, 1, &nn, 1, msg);
        }
        if (!rc && pat->nhandoffs > used) {
            char *msg = keel_asprintf("%s lists %zu planned hand-off%s, but only %zu happen%s: "
                                      "a patient changes nurse only when the nurse leaves",
                                      pat->id, pat->nhandoffs, pat->nhandoffs == 1 ? "" : "s", used,
                                      used == 1 ? "s" : "");
            rc = keel_findings_add(out, "hand_off", &p, 1, NULL, 0, msg);
        }
    }
    return rc;
}

/* A locked patient must stay with its nurse; nobody gets a patient who
 * must avoid them. */
static keel_status check_restrictions(const keel_roster *r, const keel_workload *w,
                                      const int *nurse_of, keel_findings *out)
{
    keel_status rc = KEEL_OK;
    for (size_t q = 0; q < w->npatients && !rc; q++) {
        if (nurse_of[q] < 0 || !starts_stretch(w, nurse_of, q))
            continue;
        size_t n = (size_t)nurse_of[q], p = (size_t)w->patient[q];
        const keel_patient *pat = &r->patients[p];
        bool first = w->first_part[p] == (int)q;
        if (first && pat->lock && pat->nurse && strcmp(pat->nurse, r->nurses[n].id) != 0) {
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
    keel_status rc = check_skills(r, w, nurse_of, out);
    if (!rc)
        rc = check_limits(r, w, nurse_of, out);
    if (!rc)
        rc = check_restrictions(r, w, nurse_of, out);
    if (!rc && w->bounds_rule)
        rc = check_bounds(r, w, nurse_of, out);
    if (!rc && w->clocked)
        rc = check_cover(r, w, nurse_of, out);
    if (rc)
        keel_error_add(err, rc, NULL, 0, 0, NULL, "out of memory");
    return rc;
}
