/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * feas_hall.c - does any valid assignment exist under eligibility and
 * patient limits, and if not, why not.
 *
 * Ignoring balance, a valid assignment is a b-matching: each patient to one
 * eligible nurse, each nurse at most the nurse's limit.  Augmenting paths find one
 * or stop at a patient that cannot be placed.  The patients and nurses the
 * failed search reached form a proof (Hall's condition): every one of those
 * patients can only go to those nurses, the nurses are full, and the
 * patients outnumber the places.  Each such set becomes a finding in plain
 * words.  The orchestrator asks it first; the solver runs only when this
 * says an assignment exists.
 */
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "alloc.h"
#include "finding_list.h"
#include "feas.h"
#include "rule.h"
#include "workload_internal.h"

typedef struct matcher {
    const keel_workload *w;
    int *nurse_of;
    int *count;
    bool *seen_patient;
    bool *seen_nurse;
} matcher;

static bool augment(matcher *m, size_t p)
{
    const keel_workload *w = m->w;
    m->seen_patient[p] = true;
    /* A nurse with room first: no path to search (and on a roomy unit, no
     * search at all). */
    for (size_t n = 0; n < w->nnurses; n++) {
        if (keel_workload_eligible(w, p, n) && !m->seen_nurse[n] &&
            m->count[n] < w->max_patients[n]) {
            m->seen_nurse[n] = true;
            m->count[n]++;
            m->nurse_of[p] = (int)n;
            return true;
        }
    }
    for (size_t n = 0; n < w->nnurses; n++) {
        if (!keel_workload_eligible(w, p, n) || m->seen_nurse[n])
            continue;
        m->seen_nurse[n] = true;
        if (m->count[n] < w->max_patients[n]) {
            m->count[n]++;
            m->nurse_of[p] = (int)n;
            return true;
        }
        for (size_t q = 0; q < w->npatients; q++) {
            if (m->nurse_of[q] == (int)n && !m->seen_patient[q] && augment(m, q)) {
                m->nurse_of[p] = (int)n;
                return true;
            }
        }
    }
    return false;
}

/* One shortage: the nurses the failed searches reached (empty: no eligible
 * nurse at all), the patients competing for them, and how many are left out. */
typedef struct shortage {
    bool *nurses;   /* [nnurses] */
    bool *patients; /* [npatients] */
    size_t left_out;
    char *needs_key;  /* for "no eligible nurse": what groups such patients, else NULL */
    const char *rule; /* skill, lock, avoid or patient_limit */
} shortage;

static bool same_nurses(const bool *a, const bool *b, size_t n)
{
    return memcmp(a, b, n * sizeof *a) == 0;
}

/* Text "A, B and C" of up to 10 names, then "and N more". */
static char *join_names(char *const *names, size_t n)
{
    size_t cap = 64, len = 0;
    char *s = keel_malloc(cap);
    if (!s)
        return NULL;
    s[0] = '\0';
    size_t shown = n > 10 ? 10 : n;
    for (size_t i = 0; i < shown; i++) {
        const char *sep = i == 0 ? "" : (i + 1 == n ? " and " : ", ");
        size_t need = len + strlen(sep) + strlen(names[i]) + 32;
        if (need > cap) {
            cap = need * 2;
            char *grown = keel_realloc(s, cap);
            if (!grown) {
                free(s);
                return NULL;
            }
            s = grown;
        }
        len += (size_t)sprintf(s + len, "%s%s", sep, names[i]);
    }
    if (n > shown)
        sprintf(s + len, " and %zu more", n - shown);
    return s;
}

/* Skills in p's needs that no nurse who may take patients has, as "a and b". */
static size_t missing_needs(const keel_roster *r, const keel_workload *w, const keel_patient *p,
                            char **out)
{
    size_t k = 0;
    for (size_t i = 0; i < p->nneeds; i++) {
        bool held = false;
        for (size_t n = 0; n < r->nnurses && !held; n++)
            held = w->max_patients[n] > 0 && keel_nurse_has_skill(&r->nurses[n], p->needs[i]);
        if (!held)
            out[k++] = p->needs[i];
    }
    return k;
}

/* Needs shared by every marked patient. */
static size_t common_needs(const keel_roster *r, const bool *patients, char **out)
{
    size_t first = 0;
    while (first < r->npatients && !patients[first])
        first++;
    if (first == r->npatients)
        return 0;
    size_t k = 0;
    const keel_patient *p0 = &r->patients[first];
    for (size_t i = 0; i < p0->nneeds; i++) {
        bool everyone = true;
        for (size_t q = first + 1; q < r->npatients && everyone; q++) {
            if (!patients[q])
                continue;
            bool has = false;
            for (size_t j = 0; j < r->patients[q].nneeds && !has; j++)
                has = strcmp(r->patients[q].needs[j], p0->needs[i]) == 0;
            everyone = has;
        }
        if (everyone)
            out[k++] = p0->needs[i];
    }
    return k;
}

static size_t collect(const bool *marks, size_t n, size_t *idx)
{
    size_t k = 0;
    for (size_t i = 0; i < n; i++)
        if (marks[i])
            idx[k++] = i;
    return k;
}

/* Why patient p has no eligible nurse at all: its lock, competencies, its
 * avoid list, or the acuity the roles take; the rule name, and a key that
 * groups patients with the same reason (each locked, avoiding or capped
 * patient is its own group). */
static const char *unreachable_rule(const keel_roster *r, const keel_workload *w, size_t p,
                                    char **skills)
{
    const keel_patient *pat = &r->patients[p];
    if (pat->lock)
        return "lock";
    if (missing_needs(r, w, pat, skills) > 0)
        return "skill";
    bool avoided = false, capped = false; /* someone could take it but for ... */
    for (size_t n = 0; n < r->nnurses; n++) {
        bool capable = w->max_patients[n] > 0;
        for (size_t i = 0; i < pat->nneeds && capable; i++)
            capable = keel_nurse_has_skill(&r->nurses[n], pat->needs[i]);
        if (!capable)
            continue;
        bool on_list = false;
        for (size_t i = 0; i < pat->navoid && !on_list; i++)
            on_list = strcmp(pat->avoid[i], r->nurses[n].id) == 0;
        avoided = avoided || on_list;
        capped = capped || (!on_list && keel_rule_pair_over_role_acuity(r, pat, &r->nurses[n]));
    }
    return avoided ? "avoid" : capped ? "role_acuity" : "skill";
}

static char *unreachable_key(const keel_roster *r, const keel_workload *w, size_t p, char **skills,
                             const char **rule)
{
    *rule = unreachable_rule(r, w, p, skills);
    if (strcmp(*rule, "skill") != 0)
        return keel_asprintf("%s %s", *rule, r->patients[p].id);
    return join_names(skills, missing_needs(r, w, &r->patients[p], skills));
}

/* "T-1 is locked to R3, who takes no patients" and the like. */
static char *describe_restricted(const keel_roster *r, const keel_workload *w, const shortage *s,
                                 char **skills)
{
    size_t p = 0;
    while (!s->patients[p])
        p++;
    const keel_patient *pat = &r->patients[p];
    if (strcmp(s->rule, "lock") == 0) {
        int n = keel_roster_find_nurse(r, pat->nurse);
        if (n < 0 || w->max_patients[n] == 0)
            return keel_asprintf("%s is locked to %s, who takes no patients on this shift", pat->id,
                                 pat->nurse);
        size_t k = 0;
        for (size_t i = 0; i < pat->nneeds; i++)
            if (!keel_nurse_has_skill(&r->nurses[n], pat->needs[i]))
                skills[k++] = pat->needs[i];
        char *what = join_names(skills, k);
        char *msg = what ? keel_asprintf("%s is locked to %s, who does not have %s", pat->id,
                                         pat->nurse, what)
                         : NULL;
        free(what);
        return msg;
    }
    if (strcmp(s->rule, "role_acuity") == 0)
        return keel_asprintf("%s is acuity %d; no nurse on shift may take it: each one's role "
                             "takes patients only up to a lower acuity "
                             "(policy.roles.<role>.max_acuity)",
                             pat->id, pat->acuity);
    char *avoided = join_names(pat->avoid, pat->navoid);
    char *msg = NULL;
    if (avoided && pat->nneeds == 0)
        msg = keel_asprintf("every nurse on shift who may take patients is on %s's avoid list "
                            "(%s)",
                            pat->id, avoided);
    else if (avoided) {
        char *what = join_names(pat->needs, pat->nneeds);
        if (what)
            msg = keel_asprintf("%s needs %s, and every nurse on shift who has it and may take "
                                "patients is on the patient's avoid list (%s)",
                                pat->id, what, avoided);
        free(what);
    }
    free(avoided);
    return msg;
}

static char *describe_unreachable(const keel_roster *r, const keel_workload *w, const shortage *s,
                                  char **names, size_t npat, char **skills)
{
    size_t k = 0;
    for (size_t p = 0; p < r->npatients; p++)
        if (s->patients[p])
            names[k++] = r->patients[p].id;
    char *who = join_names(names, k);
    const keel_patient *p0 = NULL;
    for (size_t p = 0; p < r->npatients && !p0; p++)
        if (s->patients[p])
            p0 = &r->patients[p];
    size_t nmiss = missing_needs(r, w, p0, skills);
    char *what = NULL, *msg = NULL;
    if (nmiss > 0) {
        what = join_names(skills, nmiss);
        if (who && what)
            msg = keel_asprintf("%zu patient%s (%s) need%s %s; no nurse on shift who may take "
                                "patients has %s",
                                npat, npat == 1 ? "" : "s", who, npat == 1 ? "s" : "", what,
                                nmiss == 1 ? "it" : "them");
    } else if (p0->nneeds == 0) {
        /* No competency stands in the way: nobody takes patients at all, or
         * locks and avoid lists leave nobody. */
        size_t counted = 0;
        for (size_t n = 0; n < w->nnurses; n++)
            counted += keel_workload_counted(w, n);
        if (who)
            msg = counted == 0
                      ? keel_asprintf("%zu patient%s (%s) but no nurse on shift takes patients "
                                      "(every nurse's patient limit is 0)",
                                      npat, npat == 1 ? "" : "s", who)
                      : keel_asprintf("%zu patient%s (%s): locks and avoid lists leave no nurse "
                                      "on shift who may take %s",
                                      npat, npat == 1 ? "" : "s", who, npat == 1 ? "it" : "them");
    } else {
        what = join_names(p0->needs, p0->nneeds);
        if (who && what)
            msg = keel_asprintf("%zu patient%s (%s) need%s %s together; no nurse on shift who "
                                "may take patients has them all",
                                npat, npat == 1 ? "" : "s", who, npat == 1 ? "s" : "", what);
    }
    free(who);
    free(what);
    return msg;
}

static char *describe_shortage(const keel_roster *r, const keel_workload *w, const shortage *s,
                               char **names, char **skills, size_t ncounted)
{
    size_t npat = 0, nnur = 0;
    long places = 0;
    for (size_t p = 0; p < r->npatients; p++)
        if (s->patients[p])
            names[npat++] = r->patients[p].id;
    char *who = join_names(names, npat);
    for (size_t n = 0; n < r->nnurses; n++)
        if (s->nurses[n]) {
            names[nnur++] = r->nurses[n].id;
            places += w->max_patients[n];
        }
    char *nurses = join_names(names, nnur);
    char *msg = NULL;
    char limits[KEEL_LAW_CITE_SIZE + 64] = "their patient limits";
    char table[KEEL_LAW_CITE_SIZE];
    if (strcmp(s->rule, "law_limit") == 0) {
        keel_law_cite(r->policy.ratio_table, table, sizeof table);
        snprintf(limits, sizeof limits, "the limit of 1:%d for %s in %s", w->law_limit,
                 r->unit.type, table);
    }
    if (who && nurses && nnur == ncounted) {
        msg = keel_asprintf(
            "%zu patient%s, but the %zu nurse%s on shift who may take patients "
            "may take %ld in all under %s: %zu more place%s needed (another "
            "nurse%s)",
            r->npatients, r->npatients == 1 ? "" : "s", nnur, nnur == 1 ? "" : "s", places,
            limits, s->left_out, s->left_out == 1 ? " is" : "s are",
            strcmp(s->rule, "law_limit") == 0 ? "" : ", or a higher limit where policy allows");
    } else if (who && nurses) {
        size_t ncommon = common_needs(r, s->patients, skills);
        char *what = ncommon ? join_names(skills, ncommon) : keel_strdup("competencies");
        if (what)
            msg = keel_asprintf(
                "patients %s need %s%s; only %s %s %s, with %ld place%s under %s: %zu more "
                "place%s needed",
                who, what, ncommon ? "" : " that few nurses have", nurses,
                nnur == 1 ? "has" : "have", ncommon ? (ncommon == 1 ? "it" : "them") : "them",
                places, places == 1 ? "" : "s",
                strcmp(s->rule, "law_limit") == 0 ? limits : "the patient limits", s->left_out,
                s->left_out == 1 ? " is" : "s are");
        free(what);
    }
    free(who);
    free(nurses);
    return msg;
}

/* With the clock: every part needs a nurse who may take it and is on
 * throughout it; the rest (limits at every moment, nurses kept until they
 * leave) is settled by search (the valid chain of answer.c). */
static keel_status diagnose_clock(const keel_roster *r, const keel_workload *w, int *nurse_of,
                                  bool *feasible, keel_findings *out)
{
    *feasible = true;
    for (size_t q = 0; q < w->npatients; q++) {
        nurse_of[q] = -1;
        bool any = false, anyone = false;
        size_t p = (size_t)w->patient[q];
        for (size_t n = 0; n < w->nnurses; n++) {
            any = any || keel_workload_eligible(w, q, n);
            anyone = anyone || keel_workload_may_take_at_all(r, w, p, n);
        }
        if (any)
            continue;
        *feasible = false;
        char from[KEEL_TIME_SIZE], to[KEEL_TIME_SIZE];
        keel_roster_clock_text(r, w->part_start[q], from);
        keel_roster_clock_text(r, w->part_end[q], to);
        char *msg = anyone ? keel_asprintf("no nurse who may take %s is on from %s to %s",
                                           r->patients[p].id, from, to)
                           : keel_asprintf("no nurse on the roster may take %s", r->patients[p].id);
        if (!msg || keel_findings_add(out, anyone ? "moment_limit" : "skill", &p, 1, NULL, 0, msg))
            return KEEL_ERR_NOMEM;
    }
    return KEEL_OK;
}

keel_status keel_feas_hall(const keel_roster *r, const keel_workload *w, int *nurse_of,
                          bool *feasible, keel_findings *out)
{
    if (w->clocked)
        return diagnose_clock(r, w, nurse_of, feasible, out);
    keel_status rc = KEEL_OK;
    size_t np = w->npatients, nn = w->nnurses, nshort = 0, ncounted = 0;
    shortage *shorts = NULL;
    matcher m = {.w = w, .nurse_of = nurse_of};
    m.count = keel_calloc(nn, sizeof *m.count);
    m.seen_patient = keel_calloc(np, sizeof *m.seen_patient);
    m.seen_nurse = keel_calloc(nn, sizeof *m.seen_nurse);
    size_t *pidx = keel_calloc(np, sizeof *pidx);
    size_t *nidx = keel_calloc(nn, sizeof *nidx);
    size_t nbig = (np > nn ? np : nn) + 1, nskills = 1;
    for (size_t p = 0; p < np; p++)
        nskills += r->patients[p].nneeds;
    char **names = keel_calloc(nbig, sizeof *names);
    char **skills = keel_calloc(nskills, sizeof *skills);
    if (!m.count || !m.seen_patient || !m.seen_nurse || !pidx || !nidx || !names || !skills) {
        rc = KEEL_ERR_NOMEM;
        goto out;
    }
    for (size_t n = 0; n < nn; n++)
        ncounted += keel_workload_counted(w, n);
    for (size_t p = 0; p < np; p++)
        nurse_of[p] = -1;

    for (size_t p = 0; p < np; p++) {
        memset(m.seen_patient, 0, np * sizeof *m.seen_patient);
        memset(m.seen_nurse, 0, nn * sizeof *m.seen_nurse);
        if (augment(&m, p))
            continue;
        /* Group with an earlier shortage over the same nurses; a patient with
         * no eligible nurse groups with others that have the same reason. */
        bool none = true;
        for (size_t n = 0; n < nn; n++)
            none = none && !m.seen_nurse[n];
        const char *rule = "patient_limit";
        char *key = none ? unreachable_key(r, w, p, skills, &rule) : NULL;
        if (none && !key) {
            rc = KEEL_ERR_NOMEM;
            goto out;
        }
        size_t i;
        for (i = 0; i < nshort; i++)
            if (same_nurses(shorts[i].nurses, m.seen_nurse, nn) &&
                (!none || strcmp(key, shorts[i].needs_key) == 0))
                break;
        if (i < nshort) {
            free(key);
        } else {
            shortage *grown = keel_reallocarray(shorts, nshort + 1, sizeof *grown);
            if (!grown) {
                free(key);
                rc = KEEL_ERR_NOMEM;
                goto out;
            }
            shorts = grown;
            shortage *s = &shorts[nshort++];
            *s = (shortage){.needs_key = key, .rule = rule};
            s->nurses = keel_calloc(nn, sizeof *s->nurses);
            s->patients = keel_calloc(np, sizeof *s->patients);
            if (!s->nurses || !s->patients) {
                rc = KEEL_ERR_NOMEM;
                goto out;
            }
            memcpy(s->nurses, m.seen_nurse, nn * sizeof *s->nurses);
        }
        for (size_t q = 0; q < np; q++)
            shorts[i].patients[q] = shorts[i].patients[q] || m.seen_patient[q];
        shorts[i].left_out++;
    }

    *feasible = nshort == 0;
    for (size_t i = 0; i < nshort && !rc; i++) {
        shortage *s = &shorts[i];
        size_t kp = collect(s->patients, np, pidx), kn = collect(s->nurses, nn, nidx);
        /* Patients all locked to the one nurse they compete for: the locks
         * are what cannot hold. */
        bool all_locked = kn == 1;
        for (size_t j = 0; j < kp && all_locked; j++)
            all_locked = r->patients[pidx[j]].lock;
        if (all_locked)
            s->rule = "lock";
        /* Every nurse short of places is held by the ratio table's number. */
        bool by_law = kn > 0 && !all_locked && w->law_limit != KEEL_ABSENT;
        for (size_t j = 0; j < kn && by_law; j++)
            by_law = w->max_patients[nidx[j]] == w->law_limit;
        if (by_law)
            s->rule = "law_limit";
        char *msg = all_locked ? keel_asprintf("%zu patient%s locked to %s, whose patient "
                                               "limit is %d",
                                               kp, kp == 1 ? " is" : "s are",
                                               r->nurses[nidx[0]].id, w->max_patients[nidx[0]])
                    : kn > 0   ? describe_shortage(r, w, s, names, skills, ncounted)
                    : strcmp(s->rule, "skill") == 0
                        ? describe_unreachable(r, w, s, names, kp, skills)
                        : describe_restricted(r, w, s, skills);
        bool everyone = kn == ncounted && kn > 0;
        /* Nobody takes patients: the patient limits, not a competency. */
        const char *rule = ncounted == 0 ? "patient_limit" : s->rule;
        rc = keel_findings_add(out, rule, pidx, everyone ? 0 : kp, nidx, kn, msg);
    }
out:
    for (size_t i = 0; i < nshort; i++) {
        free(shorts[i].nurses);
        free(shorts[i].patients);
        free(shorts[i].needs_key);
    }
    free(shorts);
    free(m.count);
    free(m.seen_patient);
    free(m.seen_nurse);
    free(pidx);
    free(nidx);
    free(names);
    free(skills);
    return rc;
}
