/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * answer_local.c - a local search for the window question: is there an
 * assignment in which every counted nurse n carries between lo[n] and
 * hi[n] minutes of care?  It can only answer yes.
 *
 * From the question's start (an assignment that keeps every rule), it moves one patient to
 * another nurse or swaps two patients of two nurses, always keeping every
 * rule (the tally checks each step), and drives the excess down: the care
 * above hi[n] plus the care missing below lo[n], summed over the counted
 * nurses.  Each step takes the best move or swap that touches a nurse
 * outside her window, even when it makes the excess worse, except one that
 * puts a patient back with a nurse it left in the last few steps (a tabu
 * search).  Ties go to a fixed-seed coin, so runs are repeatable for the
 * same number of steps.  It gives up at the deadline (read before each
 * nurse a step looks at) or after STALL_STEPS steps without a new lowest
 * excess.  Not used with the clock, nor without a start.
 */
#include <stdlib.h>
#include <string.h>

#include "alloc.h"
#include "answer.h"
#include "budget.h"
#include "measure.h"
#include "rule.h"
#include "tally.h"
#include "workload_internal.h"

/* Steps for which a patient may not go back to a nurse it left. */
#define TABU_MIN 7
#define TABU_SPREAD 10
/* Tabu entries alive at once: two a step, for the longest tenure. */
#define TABU_ENTRIES (2 * (TABU_MIN + TABU_SPREAD))
/* Steps without a new lowest excess after which the search gives up (on
 * the quick benchmark set the longest such run before success was about
 * 1 700 steps). */
#define STALL_STEPS 10000

typedef struct local {
    const keel_workload *w;
    const long long *lo, *hi;
    int *nurse_of;
    keel_tally t;
    keel_tabu tabu;
    long step;
    unsigned long long coin; /* xorshift state */
} local;

static unsigned long long flip(local *L)
{
    return keel_measure_coin(&L->coin);
}

/* How far care c is from nurse n's window. */
static long long off(const local *L, size_t n, long long c)
{
    return keel_measure_window_off(L->w, L->lo, L->hi, n, c);
}

static long long excess(const local *L)
{
    long long e = 0;
    for (size_t n = 0; n < L->w->nnurses; n++)
        e += off(L, n, L->t.care[n]);
    return e;
}

/* A candidate step: p goes to nurse to; when q >= 0, q goes to p's nurse. */
typedef struct step {
    long long delta;
    size_t p;
    long q;
    size_t to;
    unsigned long long tie;
} step;

static bool allowed(const local *L, size_t p, size_t n, bool aspire)
{
    return aspire || keel_measure_tabu_allows(&L->tabu, p, n, L->step);
}

static void consider(local *L, step *best, bool *have, step s)
{
    s.tie = flip(L);
    if (!*have || s.delta < best->delta || (s.delta == best->delta && s.tie < best->tie)) {
        *best = s;
        *have = true;
    }
}

/* The best step that moves a patient of a away, or swaps one with a
 * patient of another nurse (for a nurse above or below her window).  total is the excess now; a
 * step that would reach zero is taken even when tabu. */
static void steps_from(local *L, size_t a, long long total, step *best, bool *have)
{
    const keel_workload *w = L->w;
    size_t np = w->npatients, nn = w->nnurses;
    for (int i = keel_tally_first(&L->t, a); i >= 0; i = keel_tally_next(&L->t, (size_t)i)) {
        size_t p = (size_t)i;
        long long c = w->care_minutes[p], ca = L->t.care[a];
        bool may_give = keelRuleMinMayGive(&L->t, a);
        for (size_t b = 0; b < nn && may_give; b++) {
            if (b == a || !keelRuleAdmits(&L->t, p, b))
                continue;
            long long cb = L->t.care[b];
            long long d = off(L, a, ca - c) - off(L, a, ca) + off(L, b, cb + c) - off(L, b, cb);
            if (allowed(L, p, b, total + d == 0))
                consider(L, best, have, (step){.delta = d, .p = p, .q = -1, .to = b});
        }
        for (size_t q = 0; q < np; q++) {
            int bq = L->nurse_of[q];
            if (bq < 0 || bq == (int)a || w->care_minutes[q] == c)
                continue;
            size_t b = (size_t)bq;
            long long cb = L->t.care[b], dq = c - w->care_minutes[q];
            long long d = off(L, a, ca - dq) - off(L, a, ca) + off(L, b, cb + dq) - off(L, b, cb);
            if (!allowed(L, p, b, total + d == 0) || !allowed(L, q, a, total + d == 0))
                continue;
            if (!keelRuleAdmitsInstead(&L->t, p, q, b) ||
                !keelRuleAdmitsInstead(&L->t, q, p, a))
                continue;
            consider(L, best, have, (step){.delta = d, .p = p, .q = (long)q, .to = b});
        }
    }
}

/* The best step that brings a patient to a, a nurse below her window. */
static void steps_to(local *L, size_t a, long long total, step *best, bool *have)
{
    const keel_workload *w = L->w;
    for (size_t p = 0; p < w->npatients; p++) {
        int b = L->nurse_of[p];
        if (b < 0 || b == (int)a || !keelRuleMinMayGive(&L->t, (size_t)b) ||
            !keelRuleAdmits(&L->t, p, a))
            continue;
        long long c = w->care_minutes[p], ca = L->t.care[a], cb = L->t.care[b];
        long long d =
            off(L, a, ca + c) - off(L, a, ca) + off(L, (size_t)b, cb - c) - off(L, (size_t)b, cb);
        if (allowed(L, p, a, total + d == 0))
            consider(L, best, have, (step){.delta = d, .p = p, .q = -1, .to = a});
    }
}

static void apply(local *L, const step *s)
{
    size_t from = (size_t)L->nurse_of[s->p];
    long tenure = TABU_MIN + (long)(flip(L) % TABU_SPREAD);
    keel_tally_remove(&L->t, s->p, from);
    if (s->q >= 0) {
        size_t q = (size_t)s->q;
        keel_tally_remove(&L->t, q, s->to);
        keel_tally_add(&L->t, q, from);
        L->nurse_of[q] = (int)from;
        keel_measure_tabu_set(&L->tabu, q, s->to, L->step + tenure);
    }
    keel_tally_add(&L->t, s->p, s->to);
    L->nurse_of[s->p] = (int)s->to;
    keel_measure_tabu_set(&L->tabu, s->p, from, L->step + tenure);
}

keel_status keel_answer_local(const keel_question *q, long long deadline_ms, int *nurse_of,
                              keel_answer *answer, keel_error *err)
{
    const keel_workload *w = q->w;
    const long long *lo = q->lo, *hi = q->hi;
    const int *start = q->start;
    size_t np = w->npatients, nn = w->nnurses;
    *answer = KEEL_ANSWER_UNKNOWN;
    if (w->clocked || !start)
        return KEEL_OK;
    local L = {.w = w, .lo = lo, .hi = hi, .coin = 0x9e3779b97f4a7c15ULL};
    L.nurse_of = keel_calloc(np ? np : 1, sizeof *L.nurse_of);
    bool tabu = keel_measure_tabu_init(&L.tabu, np, TABU_ENTRIES);
    keel_status rc = keel_tally_init(&L.t, w);
    if (rc || !L.nurse_of || !tabu) {
        rc = KEEL_ERR_NOMEM;
        goto out;
    }
    memcpy(L.nurse_of, start, np * sizeof *L.nurse_of);
    keel_tally_fill(&L.t, L.nurse_of);
    long long total = excess(&L), record = total;
    long since = 0; /* steps since the excess was last at a new low */
    while (total > 0) {
        if (since >= STALL_STEPS)
            goto out;
        step best;
        bool have = false;
        for (size_t n = 0; n < nn; n++) {
            if (off(&L, n, L.t.care[n]) == 0)
                continue;
            /* On a large unit one step looks at many nurses: the clock is
             * read before each. */
            if (keel_budget_now() >= deadline_ms)
                goto out;
            steps_from(&L, n, total, &best, &have);
            if (L.t.care[n] < lo[n])
                steps_to(&L, n, total, &best, &have);
        }
        if (!have)
            goto out; /* every step is tabu or breaks a rule */
        apply(&L, &best);
        total += best.delta;
        L.step++;
        since = total < record ? 0 : since + 1;
        record = total < record ? total : record;
    }
    memcpy(nurse_of, L.nurse_of, np * sizeof *nurse_of);
    *answer = KEEL_ANSWER_YES;
out:
    free(L.nurse_of);
    keel_measure_tabu_free(&L.tabu);
    keel_tally_free(&L.t);
    if (rc)
        keel_error_add(err, rc, NULL, 0, 0, NULL, "out of memory");
    return rc;
}
