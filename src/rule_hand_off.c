/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * rule_hand_off.c - hand_off: with the clock, a patient changes nurse only
 * when the nurse leaves: a part keeps the nurse of the part before it
 * while she is on (keel_workload_keeps()), and a patient is always with a
 * nurse who is on.
 *
 *   rows (kept, in both models): y[q - 1, n] <= y[q, n] for each part q
 *                   that must keep n
 */
#include "alloc.h"
#include "finding_list.h"
#include "roster_internal.h"
#include "rule.h"
#include "workload_internal.h"

/* True when taking part p from nurse n would split p from the nurse of the
 * part before it, or the part after it from n, while that nurse is on. */
static bool splits(const keel_tally *t, size_t p, size_t n)
{
    const keel_workload *w = t->w;
    size_t first = (size_t)w->first_part[w->patient[p]];
    size_t end = (size_t)w->first_part[w->patient[p] + 1];
    if (p > first) {
        int before = t->nurse_of[p - 1];
        if (before >= 0 && before != (int)n && keel_workload_keeps(w, p, before))
            return true;
    }
    if (p + 1 < end) {
        int after = t->nurse_of[p + 1];
        if (after >= 0 && after != (int)n && keel_workload_keeps(w, p + 1, (int)n))
            return true;
    }
    return false;
}

static const char *breaks(const keel_tally *t, size_t p, size_t n, size_t m)
{
    (void)m;
    return t->w->clocked && splits(t, p, n) ? keel_rule_hand_off.name : NULL;
}

/* True when nurse n is on throughout part q. */
static bool on_for(const keel_workload *w, size_t q, int n)
{
    return n >= 0 && w->nurse_start[n] <= w->part_start[q] && w->nurse_end[n] >= w->part_end[q];
}

/* mine[0..k) are the parts of one patient, in time order. */
static keel_status check(const keel_rule_plan *c, size_t n, size_t m, const size_t *mine, size_t k,
                         keel_findings *out)
{
    (void)n;
    (void)m;
    const keel_workload *w = c->w;
    const keel_roster *r = c->r;
    size_t p = (size_t)w->patient[mine[0]];
    const keel_patient *pat = &r->patients[p];
    keel_status rc = KEEL_OK;
    size_t used = 0; /* hand-offs after the record, where `handoffs` applies */
    int open = keel_workload_first_open(r, w, p);
    for (size_t i = 0; i < k && !rc; i++) {
        size_t q = mine[i];
        int nurse = c->nurse_of[q];
        used += (int)q > open && nurse >= 0 && nurse != c->nurse_of[mine[i - 1]];
        if (nurse < 0 || on_for(w, q, nurse))
            continue;
        char from[KEEL_TIME_SIZE], to[KEEL_TIME_SIZE];
        keel_roster_clock_text(r, w->part_start[q], from);
        keel_roster_clock_text(r, w->part_end[q], to);
        size_t nn = (size_t)nurse;
        char *msg = keel_asprintf("%s is with %s from %s to %s, but %s is not on then", pat->id,
                                  r->nurses[nurse].id, from, to, r->nurses[nurse].id);
        rc = keel_findings_add(out, "hand_off", &p, 1, &nn, 1, msg);
    }
    if (!rc && pat->nhandoffs > used) {
        char *msg = keel_asprintf("%s lists %zu planned hand-off%s, but only %zu happen%s: "
                                  "a patient changes nurse only when the nurse leaves",
                                  pat->id, pat->nhandoffs, pat->nhandoffs == 1 ? "" : "s", used,
                                  used == 1 ? "s" : "");
        rc = keel_findings_add(out, "hand_off", &p, 1, NULL, 0, msg);
    }
    return rc;
}

/* The nurse's columns are one per part she may take (a part cut from a
 * patient is a class of its own); each that must keep her is tied to the
 * part before it. */
static void rows(const keel_rows *R)
{
    const keel_workload *w = R->w;
    if (!w->clocked)
        return;
    for (size_t i = 0; i < R->ncols; i++) {
        size_t q = R->part[i];
        if (!keel_workload_keeps(w, q, (int)R->n))
            continue;
        for (size_t j = 0; j < R->ncols; j++) {
            if (R->part[j] != q - 1)
                continue;
            int row = keel_lp_row(R->lp, KEEL_LP_UP, 0.0, 0.0);
            keel_lp_put(R->lp, row, R->col[j], 1.0);
            keel_lp_put(R->lp, row, R->col[i], -1.0);
        }
    }
}

static bool binds(const keel_workload *w)
{
    return w->clocked;
}

const keel_rule keel_rule_hand_off = {
    .name = "hand_off",
    .scope = KEEL_SCOPE_CLOCK,
    .binds = binds,
    .breaks = breaks,
    .check = check,
    .rows = rows,
};
