/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * feas_conflict.c - when no valid assignment exists although eligibility
 * and patient limits allow one, which of the rules that join patients
 * conflict.
 *
 * feas_hall.c settles eligibility and patient limits exactly (b-matching);
 * the joining rules make the question hard in general, so it is answered by
 * the valid chain of answerers (answer.c).  Every rule of the table that
 * can be relaxed and binds is relaxed one at a time (a deletion filter): a
 * rule whose relaxation still leaves no assignment is dropped for good; the
 * rules left conflict with each other and with the eligibility and limits,
 * and relaxing any one of them makes an assignment possible.  A rule made
 * of pieces (break cover: one per kept cover) is then filtered piece by
 * piece, so that its words name only the pieces in conflict.  Each is
 * reported in the rule's own plain words (its entry's conflict()), with
 * what is short when the rule can tell.
 */
#include <limits.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "alloc.h"
#include "answer.h"
#include "budget.h"
#include "feas.h"
#include "finding_list.h"
#include "roster_internal.h"
#include "rule.h"

/* A copy of w with the rules not in keep[] relaxed (borrowing spare's
 * arrays), its switches set afresh. */
static keel_workload relaxed(const keel_workload *w, const bool *keep, const keel_rule_spare *sp)
{
    keel_workload r = *w;
    for (size_t i = 0; i < KEEL_NRULES; i++)
        if (keel_rules[i]->relax && !keep[i])
            keel_rules[i]->relax(&r, sp);
    keelRuleFlags(&r);
    return r;
}

/* Roster patients the rule touches, each once, into idx. */
static size_t touched(const keel_workload *w, const keel_rule *rule, size_t *idx)
{
    size_t k = 0;
    for (size_t p = 0; rule->touches && p < w->npatients; p++) {
        size_t pt = (size_t)w->patient[p]; /* a patient's parts follow each other */
        if (rule->touches(w, p) && (k == 0 || idx[k - 1] != pt))
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
    keel_roster_clock_text(r, w->moment_start[busiest], from);
    keel_roster_clock_text(r, w->moment_start[busiest + 1], to);
    char *msg = keel_asprintf("no plan keeps every patient limit at every moment of the shift "
                              "while each patient keeps a nurse until she leaves; the busiest "
                              "time is %s to %s, with %ld patient%s for %ld place%s",
                              from, to, best_present, best_present == 1 ? "" : "s", best_places,
                              best_places == 1 ? "" : "s");
    return keel_findings_add(out, keel_rules[KEEL_RULE_MOMENT_LIMIT]->name, NULL, 0, NULL, 0,
                             msg);
}

/* The finding's words for rule i: what conflicts, or, when the time limit
 * left the rule undecided, that it could not tell. */
static char *words_for(const keel_roster *r, const keel_workload *w, size_t i, const bool *keep,
                       bool unsure)
{
    const keel_rule *rule = keel_rules[i];
    if (unsure) {
        char *said = rule->say(r, w);
        char *text = said ? keel_asprintf("no assignment keeps %s together with the unit's other "
                                          "rules; within the time limit keel could not tell "
                                          "whether relaxing this rule alone would make one "
                                          "possible",
                                          said)
                          : NULL;
        free(said);
        return text;
    }
    char others[160] = "";
    size_t nothers = 0;
    for (size_t h = 0, used = 0; h < KEEL_NRULES; h++) {
        if (!keep[h] || h == i)
            continue;
        nothers++;
        used += (size_t)snprintf(others + used, sizeof others - used, "%s%s", used ? ", " : "",
                                 keel_rules[h]->name);
        if (used >= sizeof others)
            used = sizeof others - 1;
    }
    char tail[200] = "";
    if (nothers)
        snprintf(tail, sizeof tail, " together with the %s rule%s", others, nothers > 1 ? "s" : "");
    return rule->conflict(r, w, tail, nothers);
}

/* Drops rule i's pieces one at a time from a copy of w with the rules not
 * in keep relaxed; a piece whose dropping still leaves no assignment stays
 * dropped.  *out is that copy (its pieces those in conflict). */
static keel_status filter_pieces(const keel_workload *w, size_t i, const bool *keep,
                                 const keel_rule_spare *sp, long long deadline_ms, int *trial,
                                 keel_workload *out, keel_error *err)
{
    const keel_rule *rule = keel_rules[i];
    keel_workload test = relaxed(w, keep, sp);
    size_t n = rule->pieces(w);
    for (size_t j = 0; j < n; j++) {
        if (!rule->keep_piece(&test, j, false, sp))
            continue; /* not on: nothing to drop */
        keelRuleFlags(&test);
        long long until =
            keel_budget_until(KEEL_SHARE_CONFLICT, keel_budget_now(), deadline_ms, n - j);
        keel_answer answer;
        keel_status rc = keel_answer_valid(&test, until, trial, &answer, err);
        if (rc)
            return rc;
        if (answer != KEEL_ANSWER_NO)
            rule->keep_piece(&test, j, true, sp);
    }
    keelRuleFlags(&test);
    *out = test;
    return KEEL_OK;
}

keel_status keel_feas_conflict(const keel_roster *r, const keel_workload *w, long long deadline_ms,
                               keel_findings *out, keel_error *err)
{
    size_t np = w->npatients, nn = w->nnurses;
    int *census = keel_malloc((np ? np : 1) * sizeof *census);
    signed char *none = keel_calloc(np ? np : 1, sizeof *none);
    int *trial = keel_malloc((np ? np : 1) * sizeof *trial);
    size_t *pidx = keel_malloc((np ? np : 1) * sizeof *pidx);
    size_t *nidx = keel_malloc((nn ? nn : 1) * sizeof *nidx);
    keel_status rc = KEEL_OK;
    keel_rule_spare sp = {census, none, keel_malloc((nn ? nn : 1) * sizeof *sp.no_cap),
                          keel_calloc(nn ? nn : 1, sizeof *sp.no_min),
                          keel_calloc(w->ncovers ? w->ncovers : 1, sizeof *sp.covers)};
    if (!census || !none || !trial || !pidx || !nidx || !sp.no_cap || !sp.no_min || !sp.covers) {
        rc = keel_error_add(err, KEEL_ERR_NOMEM, NULL, 0, 0, NULL, "out of memory");
        goto out;
    }
    for (size_t p = 0; p < np; p++)
        census[p] = (int)np;
    for (size_t n = 0; n < nn; n++)
        sp.no_cap[n] = LLONG_MAX;
    bool keep[KEEL_NRULES], unsure[KEEL_NRULES] = {false};
    size_t left = 0;
    for (size_t i = 0; i < KEEL_NRULES; i++) {
        const keel_rule *rule = keel_rules[i];
        keep[i] = rule->relax && rule->binds && rule->binds(w);
        left += keep[i];
    }
    /* Deletion filter: each test gets an equal share of the time left. */
    for (size_t i = 0; i < KEEL_NRULES; i++) {
        if (!keep[i])
            continue;
        keep[i] = false;
        keel_workload test = relaxed(w, keep, &sp);
        long long until = keel_budget_until(KEEL_SHARE_CONFLICT, keel_budget_now(), deadline_ms,
                                            left--);
        keel_answer answer;
        rc = keel_answer_valid(&test, until, trial, &answer, err);
        if (rc)
            goto out;
        /* Needed for the conflict, or, undecided, kept and said so. */
        keep[i] = answer != KEEL_ANSWER_NO;
        unsure[i] = answer == KEEL_ANSWER_UNKNOWN;
    }
    /* A rule made of pieces, needed for the conflict: its pieces in turn
     * (a deletion filter again), so that its words name only the pieces
     * in conflict. */
    keel_workload named[KEEL_NRULES];
    for (size_t i = 0; i < KEEL_NRULES; i++) {
        named[i] = *w;
        if (keep[i] && !unsure[i] && keel_rules[i]->pieces) {
            rc = filter_pieces(w, i, keep, &sp, deadline_ms, trial, &named[i], err);
            if (rc)
                goto out;
        }
    }
    size_t nkept = 0, k = 0;
    for (size_t i = 0; i < KEEL_NRULES; i++)
        nkept += keep[i];
    for (size_t n = 0; n < nn; n++)
        if (keel_workload_counted(w, n))
            nidx[k++] = n;
    for (size_t i = 0; i < KEEL_NRULES && !rc; i++) {
        if (!keep[i])
            continue;
        char *message = words_for(r, &named[i], i, keep, unsure[i]);
        if (!message) {
            rc = keel_error_add(err, KEEL_ERR_NOMEM, NULL, 0, 0, NULL, "out of memory");
            break;
        }
        size_t npat = touched(w, keel_rules[i], pidx);
        if (keel_findings_add(out, keel_rules[i]->name, pidx, npat, nidx, k, message))
            rc = keel_error_add(err, KEEL_ERR_NOMEM, NULL, 0, 0, NULL, "out of memory");
    }
    if (!rc && nkept == 0 && w->clocked && add_moment_finding(r, w, out))
        rc = keel_error_add(err, KEEL_ERR_NOMEM, NULL, 0, 0, NULL, "out of memory");
out:
    free(census);
    free(none);
    free(sp.no_cap);
    free(sp.no_min);
    free(sp.covers);
    free(trial);
    free(pidx);
    free(nidx);
    return rc;
}
