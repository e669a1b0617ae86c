/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * diagnose_rules.c - a valid assignment under the rules that join patients
 * (patient ratios, high acuity, isolation, zones), and, when none exists,
 * which of those rules conflict.
 *
 * diagnose.c settles eligibility and patient limits exactly (b-matching);
 * the joining rules make the question hard in general, so it is answered by
 * search: the greedy placement, then the dedicated search (solve_fit.c),
 * then GLPK.  When no assignment exists, the rule groups are relaxed one at
 * a time (a deletion filter): a group whose relaxation still leaves no
 * assignment is dropped for good; the groups left conflict with each other
 * and with the eligibility and limits, and relaxing any one of them makes
 * an assignment possible.  Each is reported in plain words with what is
 * short.
 */
#include <limits.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "alloc.h"
#include "finding_list.h"
#include "solve_internal.h"

/* Nodes the dedicated search may spend before GLPK takes the question. */
#define VALID_NODE_BUDGET 1000000L

keel_status keel_find_valid(const keel_workload *w, long long deadline_ms, int *nurse_of,
                            keel_ilp_answer *answer, keel_error *err)
{
    size_t np = w->npatients, nn = w->nnurses;
    bool placed_all = false;
    *answer = KEEL_ILP_UNKNOWN;
    keel_status rc = keel_greedy_place(w, nurse_of, &placed_all);
    if (rc)
        return keel_error_add(err, rc, NULL, 0, 0, NULL, "out of memory");
    bool valid = placed_all;
    if (placed_all && w->bounds_rule && keel_solve_validate(w, nurse_of, &valid))
        return keel_error_add(err, KEEL_ERR_NOMEM, NULL, 0, 0, NULL, "out of memory");
    if (valid) {
        *answer = KEEL_ILP_FEASIBLE;
        return KEEL_OK;
    }
    long long *lo = keel_calloc(nn ? nn : 1, sizeof *lo);
    long long *hi = keel_calloc(nn ? nn : 1, sizeof *hi);
    if (!lo || !hi) {
        free(lo);
        free(hi);
        return keel_error_add(err, KEEL_ERR_NOMEM, NULL, 0, 0, NULL, "out of memory");
    }
    long long total = 0;
    for (size_t p = 0; p < np; p++)
        total += w->care_minutes[p];
    for (size_t n = 0; n < nn; n++)
        hi[n] = total;
    rc = keel_fit_search(w, lo, hi, VALID_NODE_BUDGET, deadline_ms, nurse_of, answer);
    if (rc)
        keel_error_add(err, rc, NULL, 0, 0, NULL, "out of memory");
    /* GLPK on the bare question first, with a third of the time left: it
     * proves most rosters without an assignment quickly.  Then the least
     * severity of breaking the joining rules: 0 is an assignment, a proven
     * least above 0 shows there is none; its objective leads GLPK to
     * assignments faster than the bare question does. */
    long long now = keel_clock_ms();
    if (!rc && *answer == KEEL_ILP_UNKNOWN && deadline_ms > now)
        rc = keel_ilp_fit(w, lo, hi, (long)((deadline_ms - now) / 3 + 1), nurse_of, answer, err);
    if (!rc && *answer == KEEL_ILP_UNKNOWN) {
        bool found = false, proven = false;
        long severity = 0;
        rc = keel_best_effort(NULL, w, deadline_ms, nurse_of, &found, &severity, &proven, err);
        bool valid = false;
        if (!rc && found && severity == 0 && keel_solve_validate(w, nurse_of, &valid))
            rc = keel_error_add(err, KEEL_ERR_NOMEM, NULL, 0, 0, NULL, "out of memory");
        if (!rc && found && severity == 0 && valid)
            *answer = KEEL_ILP_FEASIBLE;
        else if (!rc && proven && severity > 0)
            *answer = KEEL_ILP_INFEASIBLE;
    }
    free(lo);
    free(hi);
    return rc;
}

/* The rule groups that join patients, in the order they are relaxed. */
enum {
    GROUP_RATIO,
    GROUP_HIGH,
    GROUP_ISOLATION,
    GROUP_ZONES,
    GROUP_CAPACITY, /* policy.max_utilisation */
    GROUP_MIN,      /* min_patients */
    NGROUPS
};

static const char *const group_rule[NGROUPS] = {"patient_ratio", "high_acuity", "isolation",
                                                "zones",         "capacity",    "min_patients"};

/* What the relaxed copies of a workload borrow in place of its arrays. */
typedef struct spare {
    int *census;       /* [npatients]: no ratio below the census */
    signed char *none; /* [npatients]: no isolation side */
    long long *no_cap; /* [nnurses]: no care cap */
    int *no_min;       /* [nnurses]: no fewest patients */
} spare;

/* True when the group is switched on in w and touches some patient. */
static bool group_on(const keel_workload *w, int g)
{
    bool sides[3] = {false, false, false};
    for (size_t p = 0; p < w->npatients; p++) {
        if (g == GROUP_RATIO && w->ratio_limit[p] < (int)w->npatients)
            return true;
        if (g == GROUP_HIGH && w->high_acuity[p])
            return true;
        sides[w->side[p]] = true;
    }
    if (g == GROUP_ISOLATION)
        return sides[KEEL_SIDE_INFECTIOUS] && sides[KEEL_SIDE_PROTECTIVE];
    for (size_t n = 0; n < w->nnurses; n++)
        if ((g == GROUP_CAPACITY && w->max_care[n] != LLONG_MAX) ||
            (g == GROUP_MIN && w->min_patients[n] > 0))
            return true;
    return g == GROUP_ZONES && w->max_zones != KEEL_ABSENT;
}

/* A shallow copy of w with the groups not in keep[] switched off; the
 * arrays it replaces are in spare (census limits, no sides). */
static keel_workload relaxed(const keel_workload *w, const bool *keep, const spare *sp)
{
    keel_workload r = *w;
    if (!keep[GROUP_RATIO])
        r.ratio_limit = sp->census;
    if (!keep[GROUP_HIGH])
        r.max_high_acuity = KEEL_ABSENT;
    if (!keep[GROUP_ISOLATION])
        r.side = sp->none;
    if (!keep[GROUP_ZONES])
        r.max_zones = KEEL_ABSENT;
    if (!keep[GROUP_CAPACITY])
        r.max_care = sp->no_cap;
    if (!keep[GROUP_MIN])
        r.min_patients = sp->no_min;
    r.bounds_rule = keep[GROUP_CAPACITY] || keep[GROUP_MIN];
    r.joined_rules = keep[GROUP_RATIO] || keep[GROUP_HIGH] || keep[GROUP_ISOLATION] ||
                     keep[GROUP_ZONES] || r.bounds_rule || w->clocked;
    return r;
}

/* Patients a group touches, and the counted nurses, as index lists. */
static size_t group_patients(const keel_workload *w, int g, size_t *idx)
{
    size_t k = 0;
    for (size_t p = 0; p < w->npatients; p++) {
        bool in = g == GROUP_RATIO       ? w->ratio_limit[p] < (int)w->npatients
                  : g == GROUP_HIGH      ? w->high_acuity[p]
                  : g == GROUP_ISOLATION ? w->side[p] != KEEL_SIDE_NONE
                  : g == GROUP_ZONES     ? w->zone[p] >= 0
                                         : false; /* capacity, min_patients: every patient */
        /* Roster patients, each once (a patient's parts follow each other). */
        size_t pt = (size_t)w->patient[p];
        if (in && (k == 0 || idx[k - 1] != pt))
            idx[k++] = pt;
    }
    return k;
}

/* With the clock, when no joining rule is to blame: the limits at every
 * moment and the nurses kept until they leave.  Names the moment with the
 * most patients for the places of the nurses on. */
static keel_status add_moment_finding(const keel_roster *r, const keel_workload *w,
                                      keel_findings *out)
{
    size_t busiest = 0;
    long best_present = 0, best_places = 1;
    for (size_t m = 0; m < w->nmoments; m++) {
        long present = 0, places = 0;
        for (size_t q = 0; q < w->npatients; q++)
            present += w->first_moment[q] <= (int)m && (int)m < w->last_moment[q];
        for (size_t n = 0; n < w->nnurses; n++)
            if (w->nurse_start[n] <= w->moment_start[m] &&
                w->nurse_end[n] >= w->moment_start[m + 1])
                places += w->max_patients[n];
        if (present * best_places > best_present * (places > 0 ? places : 1) || m == 0) {
            busiest = m;
            best_present = present;
            best_places = places > 0 ? places : 1;
        }
    }
    char from[KEEL_TIME_SIZE], to[KEEL_TIME_SIZE];
    keel_time_text(r, w->moment_start[busiest], from);
    keel_time_text(r, w->moment_start[busiest + 1], to);
    char *msg = keel_asprintf("no plan keeps every patient limit at every moment of the shift "
                              "while each patient keeps a nurse until she leaves; the busiest "
                              "time is %s to %s, with %ld patient%s for %ld place%s",
                              from, to, best_present, best_present == 1 ? "" : "s", best_places,
                              best_places == 1 ? "" : "s");
    if (!msg || keel_findings_add(out, "moment_limit", NULL, 0, NULL, 0, msg))
        return KEEL_ERR_NOMEM;
    return KEEL_OK;
}

/* Places for high-acuity patients: each nurse who may take one holds at most
 * the smaller of the rule's number and the nurse's limit. */
static long high_places(const keel_workload *w, size_t *nnurses)
{
    long places = 0;
    *nnurses = 0;
    for (size_t n = 0; n < w->nnurses; n++) {
        bool any = false;
        for (size_t p = 0; p < w->npatients && !any; p++)
            any = w->high_acuity[p] && keel_workload_eligible(w, p, n);
        if (!any)
            continue;
        (*nnurses)++;
        places += w->max_high_acuity < w->max_patients[n] ? w->max_high_acuity : w->max_patients[n];
    }
    return places;
}

/* Fewest nurses that can hold every patient when a nurse with a patient of
 * ratio 1:r has at most r patients (and at most limit): patients tightest
 * first, each group as large as its tightest member allows.  Taking the
 * tightest patients together is never worse, since a group's size is set by
 * its tightest member. */
static long nurses_for_ratios(const keel_workload *w, int limit)
{
    size_t np = w->npatients;
    long nurses = 0, open = 0; /* places left with the last nurse opened */
    for (int r = 1; r <= (int)np; r++) {
        for (size_t p = 0; p < np; p++) {
            int own = w->ratio_limit[p] < limit ? w->ratio_limit[p] : limit;
            if ((own > 0 ? own : 1) != r)
                continue;
            if (open > 0) {
                open--;
            } else {
                nurses++;
                open = r - 1;
            }
        }
    }
    return nurses;
}

/* A group whose part in the conflict the time limit left open. */
static char *describe_unsure(const keel_roster *r, const keel_workload *w, int g)
{
    char *rule =
        g == GROUP_RATIO ? keel_strdup("every patient's own ratio (\"1:N\")")
        : g == GROUP_HIGH
            ? keel_asprintf("at most %d high-acuity patients (acuity %d or more) per nurse",
                            w->max_high_acuity, r->policy.high_acuity.level)
        : g == GROUP_ISOLATION
            ? keel_strdup("protective-isolation patients apart from patients on contact, "
                          "droplet or airborne precautions")
        : g == GROUP_CAPACITY ? keel_strdup("every nurse at or under policy.max_utilisation")
        : g == GROUP_MIN      ? keel_strdup("every nurse's fewest patients (min_patients)")
                         : keel_asprintf("each nurse's patients within %d zone%s", w->max_zones,
                                         w->max_zones == 1 ? "" : "s");
    char *text = rule ? keel_asprintf("no assignment keeps %s together with the unit's other "
                                      "rules; within the time limit keel could not tell whether "
                                      "relaxing this rule alone would make one possible",
                                      rule)
                      : NULL;
    free(rule);
    return text;
}

static char *describe(const keel_roster *r, const keel_workload *w, int g, const bool *keep,
                      size_t nothers)
{
    char others[128] = "";
    for (int h = 0, used = 0; h < NGROUPS; h++) {
        if (!keep[h] || h == g)
            continue;
        used += snprintf(others + used, sizeof others - (size_t)used, "%s%s", used ? ", " : "",
                         group_rule[h]);
    }
    char tail[192];
    if (nothers)
        snprintf(tail, sizeof tail, " together with the %s rule%s", others, nothers > 1 ? "s" : "");
    else
        tail[0] = '\0';
    size_t counted = 0;
    int staff_limit = 0;
    for (size_t n = 0; n < w->nnurses; n++) {
        if (!keel_workload_counted(w, n))
            continue;
        counted++;
        if (w->max_patients[n] > staff_limit)
            staff_limit = w->max_patients[n];
    }
    size_t nhigh = 0;
    for (size_t p = 0; p < w->npatients; p++)
        nhigh += w->high_acuity[p];
    if (g == GROUP_HIGH) {
        size_t nurses;
        long places = high_places(w, &nurses);
        if (w->max_high_acuity == 0)
            return keel_asprintf("%zu high-acuity patients (acuity %d or more), but "
                                 "policy.high_acuity.max_per_nurse is 0, so no nurse may take "
                                 "them",
                                 nhigh, r->policy.high_acuity.level);
        if (places < (long)nhigh && !nothers) {
            long per = w->max_high_acuity > 0 ? w->max_high_acuity : 1;
            return keel_asprintf("%zu high-acuity patients (acuity %d or more) and at most %d "
                                 "per nurse: the %zu nurses who may take them can hold %ld; "
                                 "%ld more nurse%s who may take them %s needed",
                                 nhigh, r->policy.high_acuity.level, w->max_high_acuity, nurses,
                                 places, ((long)nhigh - places + per - 1) / per,
                                 ((long)nhigh - places + per - 1) / per > 1 ? "s" : "",
                                 ((long)nhigh - places + per - 1) / per > 1 ? "are" : "is");
        }
        return keel_asprintf("no assignment keeps at most %d high-acuity patients (acuity %d or "
                             "more) per nurse%s; relaxing it makes one possible",
                             w->max_high_acuity, r->policy.high_acuity.level, tail);
    }
    if (g == GROUP_RATIO) {
        long need = nurses_for_ratios(w, staff_limit);
        if (need > (long)counted && !nothers)
            return keel_asprintf("the patients' own ratios need at least %ld nurses for %zu "
                                 "patients; %zu nurses take patients: %ld short",
                                 need, w->npatients, counted, need - (long)counted);
        return keel_asprintf("no assignment keeps every patient's own ratio (\"1:N\")%s; "
                             "relaxing it makes one possible",
                             tail);
    }
    if (g == GROUP_CAPACITY)
        return keel_asprintf("no assignment keeps every nurse at or under policy.max_utilisation "
                             "(%d.%02d of her capacity)%s; relaxing it makes one possible",
                             r->policy.max_utilisation / KEEL_TOLERANCE_SCALE,
                             r->policy.max_utilisation % KEEL_TOLERANCE_SCALE / 10000, tail);
    if (g == GROUP_MIN)
        return keel_asprintf("no assignment gives every nurse who takes patients her fewest "
                             "patients (min_patients)%s; relaxing it makes one possible",
                             tail);
    if (g == GROUP_ISOLATION)
        return keel_asprintf("no assignment keeps protective-isolation patients apart from "
                             "patients on contact, droplet or airborne precautions%s (local "
                             "policy: policy.isolation_separation); relaxing it makes one "
                             "possible",
                             tail);
    return keel_asprintf("no assignment keeps each nurse's patients within %d zone%s%s; "
                         "the patients lie in %zu zones; relaxing policy.max_zones makes one "
                         "possible",
                         w->max_zones, w->max_zones > 1 ? "s" : "", tail, w->nzones);
}

keel_status keel_diagnose_rules(const keel_roster *r, const keel_workload *w, long long deadline_ms,
                                keel_findings *out, keel_error *err)
{
    size_t np = w->npatients, nn = w->nnurses;
    int *census = keel_malloc((np ? np : 1) * sizeof *census);
    signed char *none = keel_calloc(np ? np : 1, sizeof *none);
    int *trial = keel_malloc((np ? np : 1) * sizeof *trial);
    size_t *pidx = keel_malloc((np ? np : 1) * sizeof *pidx);
    size_t *nidx = keel_malloc((nn ? nn : 1) * sizeof *nidx);
    keel_status rc = KEEL_OK;
    spare sp = {census, none, keel_malloc((nn ? nn : 1) * sizeof *sp.no_cap),
                keel_calloc(nn ? nn : 1, sizeof *sp.no_min)};
    if (!census || !none || !trial || !pidx || !nidx || !sp.no_cap || !sp.no_min) {
        rc = keel_error_add(err, KEEL_ERR_NOMEM, NULL, 0, 0, NULL, "out of memory");
        goto out;
    }
    for (size_t p = 0; p < np; p++)
        census[p] = (int)np;
    for (size_t n = 0; n < nn; n++)
        sp.no_cap[n] = LLONG_MAX;
    bool keep[NGROUPS], unsure[NGROUPS] = {false};
    int ngroups = 0;
    for (int g = 0; g < NGROUPS; g++) {
        keep[g] = group_on(w, g);
        ngroups += keep[g];
    }
    /* Deletion filter: each test gets an equal share of the time left. */
    for (int g = 0; g < NGROUPS; g++) {
        if (!keep[g])
            continue;
        keep[g] = false;
        keel_workload test = relaxed(w, keep, &sp);
        long long now = keel_clock_ms();
        long long until = now + (deadline_ms - now) / (ngroups > 0 ? ngroups : 1);
        keel_ilp_answer answer;
        rc = keel_find_valid(&test, until, trial, &answer, err);
        if (rc)
            goto out;
        ngroups--;
        /* Needed for the conflict, or, undecided, kept and said so. */
        keep[g] = answer != KEEL_ILP_INFEASIBLE;
        unsure[g] = answer == KEEL_ILP_UNKNOWN;
    }
    size_t nkept = 0;
    for (int g = 0; g < NGROUPS; g++)
        nkept += keep[g];
    size_t k = 0;
    for (size_t n = 0; n < nn; n++)
        if (keel_workload_counted(w, n))
            nidx[k++] = n;
    for (int g = 0; g < NGROUPS; g++) {
        if (!keep[g])
            continue;
        char *message = unsure[g] ? describe_unsure(r, w, g) : describe(r, w, g, keep, nkept - 1);
        if (!message) {
            rc = keel_error_add(err, KEEL_ERR_NOMEM, NULL, 0, 0, NULL, "out of memory");
            goto out;
        }
        size_t npat = group_patients(w, g, pidx);
        if (keel_findings_add(out, group_rule[g], pidx, npat, nidx, k, message)) {
            rc = keel_error_add(err, KEEL_ERR_NOMEM, NULL, 0, 0, NULL, "out of memory");
            goto out;
        }
    }
    if (nkept == 0 && w->clocked && add_moment_finding(r, w, out))
        rc = keel_error_add(err, KEEL_ERR_NOMEM, NULL, 0, 0, NULL, "out of memory");
out:
    free(census);
    free(none);
    free(sp.no_cap);
    free(sp.no_min);
    free(trial);
    free(pidx);
    free(nidx);
    return rc;
}
