/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * rule_pair.c - the rules on one patient-nurse pair: skill (every
 * competency the patient needs, its own and its precaution's), lock (a
 * locked patient stays with its nurse), avoid (never a nurse on the
 * patient's avoid list) and role_acuity (never a patient above the acuity
 * the nurse's role takes, policy.roles.<role>.max_acuity).  workload.c removes such pairs up front (its
 * eligibility), so the searches and the integer programmes never see them;
 * these entries say what a plan written by people breaks, and how much the
 * best-effort plan pays for a pair it has to use.
 */
#include <string.h>

#include "alloc.h"
#include "finding_list.h"
#include "rule.h"
#include "workload_internal.h"

#define PAIR_SEVERITY 100 /* a patient given against a competency, lock, avoid list or role */

/* The i-th competency patient pat needs: its own needs, then its
 * precaution's (policy.isolation_needs). */
static const char *need_at(const keel_roster *r, const keel_patient *pat, size_t i)
{
    return i < pat->nneeds ? pat->needs[i]
                           : r->policy.isolation_needs[pat->isolation][i - pat->nneeds];
}

static size_t nneeds(const keel_roster *r, const keel_patient *pat)
{
    return pat->nneeds + r->policy.nisolation_needs[pat->isolation];
}

static bool lacks_skill(const keel_roster *r, const keel_workload *w, size_t p, size_t n)
{
    const keel_patient *pat = &r->patients[w->patient[p]];
    for (size_t i = 0; i < nneeds(r, pat); i++)
        if (!keel_nurse_has_skill(&r->nurses[n], need_at(r, pat, i)))
            return true;
    return false;
}

static keel_status check_skill(const keel_rule_plan *c, size_t n, size_t m, const size_t *mine,
                               size_t k, keel_findings *out)
{
    (void)m;
    (void)k;
    const keel_roster *r = c->r;
    size_t p = (size_t)c->w->patient[mine[0]];
    const keel_patient *pat = &r->patients[p];
    for (size_t i = 0; i < nneeds(r, pat); i++) {
        const char *need = need_at(r, pat, i);
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
    return KEEL_OK;
}

/* The pair rules together decide eligibility: nurses a and b are alike to
 * them when they may take the same parts. */
static bool nurses_alike(const keel_workload *w, size_t a, size_t b)
{
    return keel_workload_same_column(w, a, b);
}

const keel_rule keel_rule_skill = {
    .name = "skill",
    .scope = KEEL_SCOPE_PAIR,
    .severity = PAIR_SEVERITY,
    .check = check_skill,
    .pair_breaks = lacks_skill,
    .nurses_alike = nurses_alike,
};

/* True when part p is the first of a locked patient and n is not its nurse. */
static bool breaks_lock(const keel_roster *r, const keel_workload *w, size_t p, size_t n)
{
    const keel_patient *pat = &r->patients[w->patient[p]];
    bool first = keel_workload_first_open(r, w, (size_t)w->patient[p]) == (int)p;
    return first && pat->lock && pat->nurse && strcmp(pat->nurse, r->nurses[n].id) != 0;
}

static keel_status check_lock(const keel_rule_plan *c, size_t n, size_t m, const size_t *mine,
                              size_t k, keel_findings *out)
{
    (void)m;
    (void)k;
    const keel_roster *r = c->r;
    if (!breaks_lock(r, c->w, mine[0], n))
        return KEEL_OK;
    size_t p = (size_t)c->w->patient[mine[0]];
    const keel_patient *pat = &r->patients[p];
    char *msg = keel_asprintf("%s is locked to %s but the plan gives the patient to %s", pat->id,
                              pat->nurse, r->nurses[n].id);
    return keel_findings_add(out, "lock", &p, 1, &n, 1, msg);
}

const keel_rule keel_rule_lock = {
    .name = "lock",
    .scope = KEEL_SCOPE_PAIR,
    .severity = PAIR_SEVERITY,
    .check = check_lock,
    .pair_breaks = breaks_lock,
};

/* How many times nurse n is on the avoid list of part p's patient. */
static size_t avoided(const keel_roster *r, const keel_workload *w, size_t p, size_t n)
{
    const keel_patient *pat = &r->patients[w->patient[p]];
    size_t times = 0;
    for (size_t i = 0; i < pat->navoid; i++)
        times += strcmp(pat->avoid[i], r->nurses[n].id) == 0;
    return times;
}

static bool breaks_avoid(const keel_roster *r, const keel_workload *w, size_t p, size_t n)
{
    return avoided(r, w, p, n) > 0;
}

static keel_status check_avoid(const keel_rule_plan *c, size_t n, size_t m, const size_t *mine,
                               size_t k, keel_findings *out)
{
    (void)m;
    (void)k;
    const keel_roster *r = c->r;
    size_t p = (size_t)c->w->patient[mine[0]];
    keel_status rc = KEEL_OK;
    for (size_t i = avoided(r, c->w, mine[0], n); i > 0 && !rc; i--) {
        char *msg = keel_asprintf("%s must not be cared for by %s (avoid list)",
                                  r->patients[p].id, r->nurses[n].id);
        rc = keel_findings_add(out, "avoid", &p, 1, &n, 1, msg);
    }
    return rc;
}

bool keel_rule_pair_over_role_acuity(const keel_roster *r, const keel_patient *p,
                                     const keel_nurse *n)
{
    int cap = r->policy.roles[n->role].max_acuity;
    return cap != KEEL_ABSENT && p->acuity != KEEL_ABSENT && p->acuity > cap;
}

/* True when part p's patient is above the acuity nurse n's role takes. */
static bool breaks_role_acuity(const keel_roster *r, const keel_workload *w, size_t p, size_t n)
{
    return keel_rule_pair_over_role_acuity(r, &r->patients[w->patient[p]], &r->nurses[n]);
}

static keel_status check_role_acuity(const keel_rule_plan *c, size_t n, size_t m,
                                     const size_t *mine, size_t k, keel_findings *out)
{
    (void)m;
    (void)k;
    const keel_roster *r = c->r;
    if (!breaks_role_acuity(r, c->w, mine[0], n))
        return KEEL_OK;
    size_t p = (size_t)c->w->patient[mine[0]];
    const keel_nurse *nu = &r->nurses[n];
    const char *role = keel_role_name(nu->role);
    char *msg = keel_asprintf("%s is acuity %d; %s is a %s nurse, and %s nurses take patients up "
                              "to acuity %d (policy.roles.%s.max_acuity)",
                              r->patients[p].id, r->patients[p].acuity, nu->id, role, role,
                              r->policy.roles[nu->role].max_acuity, role);
    return keel_findings_add(out, "role_acuity", &p, 1, &n, 1, msg);
}

const keel_rule keel_rule_role_acuity = {
    .name = "role_acuity",
    .scope = KEEL_SCOPE_PAIR,
    .severity = PAIR_SEVERITY,
    .check = check_role_acuity,
    .pair_breaks = breaks_role_acuity,
};

const keel_rule keel_rule_avoid = {
    .name = "avoid",
    .scope = KEEL_SCOPE_PAIR,
    .severity = PAIR_SEVERITY,
    .check = check_avoid,
    .pair_breaks = breaks_avoid,
};
