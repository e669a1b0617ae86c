/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * answer_fit.c - a dedicated branch and bound for the window question the
 * balance stages ask again and again: is there an assignment in which every
 * counted nurse n carries between lo[n] and hi[n] minutes of care?
 *
 * Patients go heaviest first; each tries the eligible nurses with room, the
 * one with the most room left first.  Two symmetries are cut: patients that
 * are interchangeable (same care, same eligible nurses) take nurses in
 * non-decreasing index order, and of several nurses that are
 * interchangeable for the question and carry the same so far, only the
 * first is tried (with rules that join patients, only when those rules see
 * the two nurses alike too).  The rules are tested through the tally
 * (keelRuleBreaks()) at every step.  A node is cut when the remaining
 * patients outnumber the free places, when the room they could still use is
 * less than their care (a nurse takes at most her free places' worth of the
 * heaviest of them, and with one place left at most the largest that fits),
 * or when the care they must still bring to nurses below their window is
 * more than they have.
 *
 * The search stops after a node budget or at a deadline and answers
 * "unknown"; the chain then tries its other answerers (answer.c).  A yes
 * or no is exact.
 */
#include <stdlib.h>
#include <string.h>

#include "alloc.h"
#include "answer.h"
#include "budget.h"
#include "sort.h"
#include "rule.h"
#include "tally.h"
#include "workload_internal.h"

typedef struct fit {
    const keel_workload *w;
    const long long *lo;
    const long long *hi;
    size_t *order;      /* patients, heaviest first, twins adjacent */
    bool *twin_of_prev; /* [k]: order[k] is interchangeable with order[k - 1] */
    int *group;         /* [nnurses]: nurses with the same group are interchangeable */
    long long *suffix;  /* [k]: care of order[k..] */
    int *high_after;    /* [k]: high-acuity patients among order[k..] */
    int *min_after;     /* [k]: smallest care among order[k..] */
    long long *care;    /* [nnurses]: care so far */
    int *count;         /* [nnurses]: patients so far (the tally's) */
    keel_tally tally;
    int *assign;   /* [npatients] */
    size_t *tried; /* scratch per depth: nurses in trial order */
    long nodes;
    long budget;
    long long deadline_ms; /* give up at this time too (0: no deadline) */
    bool gave_up;
} fit;

static int heavier_first(const void *ctx, size_t i, size_t j)
{
    const keel_workload *w = ctx;
    /* With the clock a patient's parts go together, in time order, so that
     * each part meets the nurse of the part before it. */
    if (w->clocked && w->patient[i] != w->patient[j]) {
        long long ci = keel_workload_patient_care(w, (size_t)w->patient[i]);
        long long cj = keel_workload_patient_care(w, (size_t)w->patient[j]);
        if (ci != cj)
            return ci > cj ? -1 : 1;
        return w->patient[i] < w->patient[j] ? -1 : 1;
    }
    if (w->clocked)
        return (i > j) - (i < j);
    if (w->care_minutes[i] != w->care_minutes[j])
        return w->care_minutes[i] > w->care_minutes[j] ? -1 : 1;
    int c = memcmp(&w->eligible[i * w->nnurses], &w->eligible[j * w->nnurses],
                   w->nnurses * sizeof *w->eligible);
    if (c)
        return c;
    c = keelRuleOrder(w, i, j);
    if (c)
        return c;
    return (i > j) - (i < j);
}

static bool same_for_question(const fit *F, size_t a, size_t b)
{
    const keel_workload *w = F->w;
    return F->lo[a] == F->lo[b] && F->hi[a] == F->hi[b] && keelRuleSameNurses(w, a, b);
}

/* True when the rules that join patients see nurses a and b alike: the
 * patients still to come can go to one exactly when they can go to the
 * other. */
static bool same_state(const fit *F, size_t a, size_t b)
{
    const keel_workload *w = F->w;
    if (!w->joined_rules)
        return true;
    if (w->clocked)
        return false; /* counts per moment: not worth comparing */
    return keelRuleSameHeld(&F->tally, a, b);
}

/* The most care one more patient of order[k..] can bring within room r
 * (they are sorted heaviest first). */
static long long largest_within(const fit *F, size_t k, long long r)
{
    const keel_workload *w = F->w;
    size_t a = k, b = w->npatients; /* the first patient of care <= r is in [a, b] */
    while (a < b) {
        size_t mid = a + (b - a) / 2;
        if (w->care_minutes[F->order[mid]] > r)
            a = mid + 1;
        else
            b = mid;
    }
    return a < w->npatients ? w->care_minutes[F->order[a]] : 0;
}

/* Cheap bounds on the remaining patients order[k..].  With the clock the
 * counts are per moment, so only care is bounded. */
static bool still_possible(const fit *F, size_t k)
{
    const keel_workload *w = F->w;
    size_t np = w->npatients;
    long long left = F->suffix[k], room = 0, owed = 0, high_room = 0, open_places = 0;
    long long smallest = F->min_after[k];
    for (size_t n = 0; n < w->nnurses; n++) {
        if (!keel_workload_counted(w, n))
            continue;
        long long top = F->hi[n] < w->max_care[n] ? F->hi[n] : w->max_care[n];
        long long r = top - F->care[n];
        if (w->clocked) {
            room += r >= smallest ? r : 0;
            owed += F->lo[n] > F->care[n] ? F->lo[n] - F->care[n] : 0;
            continue;
        }
        /* At most the free places' worth of the heaviest patients to come. */
        int free_places = w->max_patients[n] - F->count[n];
        size_t open = free_places > 0 ? (size_t)free_places : 0;
        if (open > np - k)
            open = np - k;
        long long heaviest = F->suffix[k] - F->suffix[k + open];
        if (open == 1)
            heaviest = largest_within(F, k, r);
        if (r >= smallest) {
            room += r < heaviest ? r : heaviest;
            open_places += (long long)open;
        }
        if (w->max_high_acuity != KEEL_ABSENT) {
            int places = w->max_high_acuity - F->tally.high[n];
            high_room += places < free_places ? places : free_places;
        }
        if (F->lo[n] > F->care[n]) {
            if (F->count[n] >= w->max_patients[n])
                return false;
            owed += F->lo[n] - F->care[n];
        }
    }
    /* The nurses short of their fewest patients need that many still to come. */
    if (w->bounds_rule) {
        long long owed_patients = 0;
        for (size_t n = 0; n < w->nnurses; n++) {
            int most = keel_tally_most(&F->tally, n);
            owed_patients += most < w->min_patients[n] ? w->min_patients[n] - most : 0;
        }
        if (owed_patients > (long long)(w->npatients - k))
            return false;
    }
    /* The high-acuity patients still to come need places under the rule. */
    if (!w->clocked && w->max_high_acuity != KEEL_ABSENT && F->high_after[k] > high_room)
        return false;
    return room >= left && owed <= left && (w->clocked || open_places >= (long long)(np - k));
}

static bool search(fit *F, size_t k)
{
    const keel_workload *w = F->w;
    size_t np = w->npatients, nn = w->nnurses;
    if (k == np) {
        for (size_t n = 0; n < nn; n++)
            if (keel_workload_counted(w, n) && F->care[n] < F->lo[n])
                return false;
        return !keelRuleWhole(&F->tally);
    }
    if (++F->nodes > F->budget ||
        (F->deadline_ms && (F->nodes & 1023) == 0 && keel_budget_now() >= F->deadline_ms)) {
        F->gave_up = true;
        return false;
    }
    if (!still_possible(F, k))
        return false;
    size_t p = F->order[k];
    int c = w->care_minutes[p];
    int first = F->twin_of_prev[k] ? F->assign[F->order[k - 1]] : 0;
    size_t *tried = F->tried + k * nn, ntried = 0;
    /* Candidates with room, most room first. */
    for (size_t n = (size_t)first; n < nn; n++) {
        if (F->care[n] + c > F->hi[n] || !keelRuleAdmits(&F->tally, p, n))
            continue;
        bool twin_seen = false;
        for (size_t i = 0; i < ntried && !twin_seen; i++) {
            size_t m = tried[i];
            twin_seen = F->group[m] == F->group[n] && F->care[m] == F->care[n] &&
                        F->count[m] == F->count[n] && same_state(F, m, n);
        }
        if (twin_seen)
            continue;
        size_t at = ntried++;
        while (at > 0 && F->hi[tried[at - 1]] - F->care[tried[at - 1]] < F->hi[n] - F->care[n]) {
            tried[at] = tried[at - 1];
            at--;
        }
        tried[at] = n;
    }
    for (size_t i = 0; i < ntried; i++) {
        size_t n = tried[i];
        F->assign[p] = (int)n;
        F->care[n] += c;
        keel_tally_add(&F->tally, p, n);
        bool found = search(F, k + 1);
        F->care[n] -= c;
        keel_tally_remove(&F->tally, p, n);
        if (found)
            return true;
        if (F->gave_up)
            return false;
    }
    return false;
}

keel_status keel_answer_fit(const keel_question *q, long long deadline_ms, int *nurse_of,
                            keel_answer *answer, keel_error *err)
{
    const keel_workload *w = q->w;
    size_t np = w->npatients, nn = w->nnurses;
    fit F = {.w = w, .lo = q->lo, .hi = q->hi, .budget = q->nodes, .deadline_ms = deadline_ms};
    *answer = KEEL_ANSWER_UNKNOWN;
    F.order = keel_calloc(np, sizeof *F.order);
    F.twin_of_prev = keel_calloc(np, sizeof *F.twin_of_prev);
    F.group = keel_calloc(nn, sizeof *F.group);
    F.suffix = keel_calloc(np + 1, sizeof *F.suffix);
    F.high_after = keel_calloc(np + 1, sizeof *F.high_after);
    F.min_after = keel_calloc(np + 1, sizeof *F.min_after);
    F.care = keel_calloc(nn, sizeof *F.care);
    keel_status rc = keel_tally_init(&F.tally, w);
    F.count = F.tally.count;
    F.assign = keel_calloc(np, sizeof *F.assign);
    F.tried = keel_calloc((np ? np : 1) * (nn ? nn : 1), sizeof *F.tried);
    if (rc || !F.order || !F.twin_of_prev || !F.group || !F.suffix || !F.high_after ||
        !F.min_after || !F.care || !F.assign || !F.tried) {
        rc = KEEL_ERR_NOMEM;
        goto out;
    }
    for (size_t p = 0; p < np; p++)
        F.order[p] = p;
    if (!keelSortIndices(F.order, np, heavier_first, w)) {
        rc = KEEL_ERR_NOMEM;
        goto out;
    }
    for (size_t k = 1; k < np && !w->clocked; k++) {
        size_t a = F.order[k - 1], b = F.order[k];
        F.twin_of_prev[k] =
            w->care_minutes[a] == w->care_minutes[b] &&
            memcmp(&w->eligible[a * nn], &w->eligible[b * nn], nn * sizeof *w->eligible) == 0 &&
            keelRuleOrder(w, a, b) == 0;
    }
    F.min_after[np] = 0;
    for (size_t k = np; k-- > 0;) {
        int c = w->care_minutes[F.order[k]];
        F.suffix[k] = F.suffix[k + 1] + c;
        F.high_after[k] = F.high_after[k + 1] + w->high_acuity[F.order[k]];
        F.min_after[k] = k + 1 < np && F.min_after[k + 1] < c ? F.min_after[k + 1] : c;
    }
    for (size_t n = 0; n < nn; n++) {
        F.group[n] = (int)n;
        for (size_t m = 0; m < n; m++) {
            if (same_for_question(&F, m, n)) {
                F.group[n] = F.group[m];
                break;
            }
        }
    }
    if (search(&F, 0)) {
        memcpy(nurse_of, F.assign, np * sizeof *nurse_of);
        *answer = KEEL_ANSWER_YES;
    } else {
        *answer = F.gave_up ? KEEL_ANSWER_UNKNOWN : KEEL_ANSWER_NO;
    }
out:
    free(F.order);
    free(F.twin_of_prev);
    free(F.group);
    free(F.suffix);
    free(F.high_after);
    free(F.min_after);
    free(F.care);
    keel_tally_free(&F.tally);
    free(F.assign);
    free(F.tried);
    if (rc)
        keel_error_add(err, rc, NULL, 0, 0, NULL, "out of memory");
    return rc;
}
