/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * rule_cover.c - break_cover: during each kept cover of the break plan
 * (workload_cover.c), the nurse on break and the nurse who holds her
 * patients then hold at most the limit together at every moment of the
 * break; a break nobody is free to cover is kept as "she holds nobody".
 *
 *   rows (kept):    per kept cover and moment of its break:
 *                   sum of the nurse's columns + sum of the cover's <= limit
 *                   (0 without a cover)
 *   rows (weighed): the same minus e, e >= 0 whole, at 80 a patient over a
 *                   limit the table sets, else 50
 */
#include <stdlib.h>
#include <string.h>

#include "alloc.h"
#include "finding_list.h"
#include "keel/law.h"
#include "rule.h"
#include "workload_internal.h"

#define COVER_SEVERITY 50 /* a patient over a limit the table does not set */

/* The most the nurse and her cover may hold together during c. */
static int bound_of(const keel_cover *c)
{
    return c->cover < 0 ? 0 : c->limit;
}

static bool during(const keel_cover *c, size_t m)
{
    return c->kept && c->first_moment <= (int)m && (int)m < c->last_moment;
}

static bool binds(const keel_workload *w)
{
    return w->nkept > 0;
}

static const char *breaks(const keel_tally *t, size_t p, size_t n, size_t m)
{
    (void)p;
    const keel_workload *w = t->w;
    if (!w->covered[n])
        return NULL;
    size_t nm = w->nmoments;
    for (size_t i = 0; i < w->ncovers; i++) {
        const keel_cover *c = &w->covers[i];
        if (!during(c, m) || (c->nurse != n && c->cover != (int)n))
            continue;
        int held = t->count[c->nurse * nm + m] + (c->cover >= 0 ? t->count[c->cover * nm + m] : 0);
        if (held + 1 > bound_of(c))
            return keel_rule_break_cover.name;
    }
    return NULL;
}

/* Patients nurse n holds at moment m under the plan. */
static int held_at(const keel_rule_plan *c, int n, size_t m)
{
    const keel_workload *w = c->w;
    int count = 0;
    for (size_t q = 0; n >= 0 && q < w->npatients; q++)
        count += c->nurse_of[q] == n && w->first_moment[q] <= (int)m && (int)m < w->last_moment[q];
    return count;
}

static keel_status check(const keel_rule_plan *c, size_t n, size_t m, const size_t *mine, size_t k,
                         keel_findings *out)
{
    const keel_workload *w = c->w;
    const keel_roster *r = c->r;
    keel_status rc = KEEL_OK;
    for (size_t i = 0; i < w->ncovers && !rc; i++) {
        const keel_cover *cv = &w->covers[i];
        if (cv->nurse != n || !during(cv, m))
            continue;
        int together = (int)k + held_at(c, cv->cover, m);
        if (together <= bound_of(cv))
            continue;
        const char *id = r->nurses[n].id;
        char *msg;
        if (cv->cover < 0) {
            msg = keel_asprintf("%s is on break holding %zu patient%s and nobody is free to "
                                "cover her (no buddy, no relief nurse)",
                                id, k, k == 1 ? "" : "s");
        } else if (w->law_limit != KEEL_ABSENT) {
            char table[KEEL_LAW_CITE_SIZE];
            keel_law_cite(r->policy.ratio_table, table, sizeof table);
            msg = keel_asprintf("%s is on break and %s (%s) holds %d patients with hers: exceeds "
                                "the limit of 1:%d for %s in %s, which holds during breaks",
                                id, r->nurses[cv->cover].id, cv->relief ? "relief" : "buddy",
                                together, w->law_limit, r->unit.type, table);
        } else {
            msg = keel_asprintf("%s is on break and %s (%s) holds %d patients with hers; "
                                "the limit during the break is %d",
                                id, r->nurses[cv->cover].id, cv->relief ? "relief" : "buddy",
                                together, cv->limit);
        }
        rc = keel_rule_finding_add(c, keel_rule_break_cover.name, mine, k, n, msg, out);
    }
    return rc;
}

static void rows(const keel_rows *R)
{
    const keel_workload *w = R->w;
    if (!binds(w) || R->moment < 0 || !w->covered[R->n])
        return;
    int severity = w->law_limit != KEEL_ABSENT ? keel_rule_law_limit.severity : COVER_SEVERITY;
    for (size_t i = 0; i < w->ncovers; i++) {
        const keel_cover *c = &w->covers[i];
        if (c->nurse != R->n || !during(c, (size_t)R->moment))
            continue;
        int row = keel_lp_row(R->lp, KEEL_LP_UP, 0.0, bound_of(c));
        for (size_t j = 0; j < R->ncols; j++)
            keel_lp_put(R->lp, row, R->col[j], 1.0);
        size_t nother = c->cover >= 0 ? R->others(R, (size_t)c->cover) : 0;
        for (size_t j = 0; j < nother; j++)
            keel_lp_put(R->lp, row, R->ocol[j], 1.0);
        if (R->soft)
            keel_lp_put(R->lp, row, keel_lp_col(R->lp, KEEL_LP_INTEGER, 0.0, R->census, severity),
                        -1.0);
    }
}

static bool touches(const keel_workload *w, size_t p)
{
    for (size_t i = 0; i < w->ncovers; i++) {
        const keel_cover *c = &w->covers[i];
        if (c->kept && w->first_moment[p] < c->last_moment && c->first_moment < w->last_moment[p])
            return true;
    }
    return false;
}

static void relax(keel_workload *copy, const keel_rule_spare *spare)
{
    (void)spare;
    copy->nkept = 0;
}

static size_t pieces(const keel_workload *w)
{
    return w->ncovers;
}

/* Piece i is cover i: dropping it leaves the break unplanned in the copy. */
static bool keep_piece(keel_workload *copy, size_t i, bool keep, const keel_rule_spare *spare)
{
    if (copy->covers != spare->covers) {
        memcpy(spare->covers, copy->covers, copy->ncovers * sizeof *copy->covers);
        copy->covers = spare->covers;
    }
    bool was = copy->covers[i].kept;
    if (was != keep) {
        copy->covers[i].kept = keep;
        copy->nkept = keep ? copy->nkept + 1 : copy->nkept - 1;
    }
    return was;
}

static char *say(const keel_roster *r, const keel_workload *w)
{
    (void)r;
    (void)w;
    return keel_strdup("cover within the limit for every break");
}

/* Patients on the unit at moment m, and the most that nurses other than a
 * and b, on then, may hold. */
static void room_at(const keel_workload *w, size_t m, size_t a, int b, long *present, long *others)
{
    *present = 0;
    *others = 0;
    for (size_t q = 0; q < w->npatients; q++)
        *present += w->first_moment[q] <= (int)m && (int)m < w->last_moment[q];
    int t = w->moment_start[m];
    for (size_t n = 0; n < w->nnurses; n++)
        if (n != a && (int)n != b && w->nurse_start[n] <= t && t < w->nurse_end[n])
            *others += w->max_patients[n];
}

/* The first kept cover that the count alone rules out: at some moment of
 * its break more patients are on the unit than the other nurses and the
 * limit together allow. */
static const keel_cover *ruled_out(const keel_workload *w, size_t *at, long *least)
{
    for (size_t i = 0; i < w->ncovers; i++) {
        const keel_cover *c = &w->covers[i];
        for (int m = c->first_moment; c->kept && m < c->last_moment; m++) {
            long present, others;
            room_at(w, (size_t)m, c->nurse, c->cover, &present, &others);
            if (present - others > bound_of(c)) {
                *at = (size_t)m;
                *least = present - others;
                return c;
            }
        }
    }
    return NULL;
}

/* "E01's break 11:00-11:30 (buddy E02)" for each kept cover of the kind
 * asked (without a cover, or with one), "; "-joined; NULL when memory ran
 * out. */
static char *list_covers(const keel_roster *r, const keel_workload *w, bool without, size_t *n)
{
    char *text = keel_strdup("");
    *n = 0;
    for (size_t i = 0; text && i < w->ncovers; i++) {
        const keel_cover *c = &w->covers[i];
        if (!c->kept || (c->cover < 0) != without)
            continue;
        char from[KEEL_TIME_SIZE], to[KEEL_TIME_SIZE];
        keel_roster_clock_text(r, c->start, from);
        keel_roster_clock_text(r, c->end, to);
        char *more = c->cover < 0
                         ? keel_asprintf("%s%s%s's break %s-%s", text, *n ? ", " : "",
                                         r->nurses[c->nurse].id, from, to)
                         : keel_asprintf("%s%s%s's break %s-%s (%s %s)", text, *n ? ", " : "",
                                         r->nurses[c->nurse].id, from, to,
                                         c->relief ? "relief" : "buddy", r->nurses[c->cover].id);
        free(text);
        text = more;
        (*n)++;
    }
    return text;
}

static char *conflict(const keel_roster *r, const keel_workload *w, const char *tail,
                      size_t nothers)
{
    size_t m = 0, n = 0;
    long least = 0;
    const keel_cover *c = ruled_out(w, &m, &least);
    if (c && !nothers) {
        char from[KEEL_TIME_SIZE], to[KEEL_TIME_SIZE], at[KEEL_TIME_SIZE];
        keel_roster_clock_text(r, c->start, from);
        keel_roster_clock_text(r, c->end, to);
        keel_roster_clock_text(r, w->moment_start[m], at);
        const char *id = r->nurses[c->nurse].id;
        if (c->cover < 0)
            return keel_asprintf("%s's break %s-%s has no cover: no buddy or relief nurse is "
                                 "free then, and at %s the other nurses on may hold only so many "
                                 "that she would keep %ld patient%s; add a relief nurse, name a "
                                 "buddy or move the break",
                                 id, from, to, at, least, least == 1 ? "" : "s");
        return keel_asprintf("%s's break %s-%s cannot be covered within the limit: at %s the "
                             "other nurses on may hold only so many that %s and %s (%s) would "
                             "hold %ld patients together, limit %d; add a relief nurse or move "
                             "the break",
                             id, from, to, at, id, r->nurses[c->cover].id,
                             c->relief ? "relief" : "buddy", least, c->limit);
    }
    char *none = list_covers(r, w, true, &n);
    if (!none || n) {
        char *text = none ? keel_asprintf("no buddy or relief nurse is free to cover %s, and "
                                          "no assignment leaves %s without patients then%s; "
                                          "add a relief nurse, name a buddy or move the break",
                                          none, n == 1 ? "her" : "them", tail)
                          : NULL;
        free(none);
        return text;
    }
    free(none);
    char *some = list_covers(r, w, false, &n);
    char *text = some ? keel_asprintf("no assignment keeps %s on break and her cover within the "
                                      "limit during %s%s; add a relief nurse or move %s",
                                      n == 1 ? "the nurse" : "each nurse", some, tail,
                                      n == 1 ? "the break" : "one of these breaks")
                      : NULL;
    free(some);
    return text;
}

static bool nurses_alike(const keel_workload *w, size_t a, size_t b)
{
    return a == b || w->nkept == 0 || (!w->covered[a] && !w->covered[b]);
}

static bool held_alike(const keel_tally *t, size_t a, size_t b)
{
    return nurses_alike(t->w, a, b);
}

const keel_rule keel_rule_break_cover = {
    .name = "break_cover",
    .staffing = true,
    .scope = KEEL_SCOPE_UNIT,
    .severity = COVER_SEVERITY,
    .binds = binds,
    .breaks = breaks,
    .check = check,
    .rows = rows,
    .touches = touches,
    .relax = relax,
    .say = say,
    .conflict = conflict,
    .pieces = pieces,
    .keep_piece = keep_piece,
    .nurses_alike = nurses_alike,
    .held_alike = held_alike,
};
