/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * heur_near.c - a local search for stage 4 (proximity): fewer zones per
 * nurse in all, then fewer rooms, within the balance windows and keeping
 * stage 3's count of patients with their previous nurse.
 *
 * The cost of a plan is (census + 1) Z + R, with Z = sum over the nurses
 * of the distinct zones among her patients and R the same for rooms; R is
 * at most the census, so a zone always outweighs every room.  From a plan
 * that keeps every rule and window, each step moves one patient to
 * another nurse or swaps two patients of two nurses, keeping every rule
 * (the tally checks it) and at least min_kept patients with their
 * previous nurse.  A step may take a counted nurse's care outside her
 * window lo[n]..hi[n], at a price: ZONE_MINUTES minutes outside cost as
 * much as one zone more, so the search can pass through plans that are
 * out of balance to reach ones that are not (tighter prices left it stuck
 * on the benchmark rosters, looser ones far outside).  It takes the
 * cheapest step even when it costs more, except one that puts a patient
 * back with a nurse it left in the last few steps (a tabu search), unless
 * the step reaches a new best plan inside every window.  Ties go to a
 * fixed-seed coin.  It ends at the deadline, at the given floor, or after
 * STALL_STEPS steps without a new best plan, and returns the best plan
 * inside the windows it saw.  Not used with the clock.
 */
#include <stdlib.h>
#include <string.h>

#include "alloc.h"
#include "budget.h"
#include "heur.h"
#include "measure.h"
#include "rule.h"
#include "tally.h"
#include "workload_internal.h"

#define TABU_MIN 5
#define TABU_SPREAD 8
/* Tabu entries alive at once: two a step, for the longest tenure. */
#define TABU_ENTRIES (2 * (TABU_MIN + TABU_SPREAD))
/* Steps without a new lowest cost after which the search gives up (on
 * the quick benchmark set the last new low came within 300 steps). */
#define STALL_STEPS 2000
/* Minutes outside the windows that weigh as much as one zone more. */
#define ZONE_MINUTES 10

typedef struct near {
    const keel_workload *w;
    const long long *lo, *hi;
    int *nurse_of;
    keel_tally t;
    int *zone_count; /* [nnurses * nzones]: n's patients in each zone */
    int *room_count; /* [nnurses * nrooms] */
    keel_tabu tabu;
    long long weight;       /* of a zone against a room's 1, and of a minute outside a
                               window against zone_minutes' zone: census + 1 */
    long long zone_minutes; /* scale of the proximity cost against the penalty */
    long long excess;       /* minutes outside the windows */
    long long kept, min_kept;
    long step;
    unsigned long long coin;
} near;

static unsigned long long flip(near *S)
{
    return keel_measure_coin(&S->coin);
}

/* The change in cost when nurse n loses patient p (out) or gains it. */
static long long cost_out(const near *S, size_t p, size_t n)
{
    const keel_workload *w = S->w;
    long long d = 0;
    if (w->zone[p] >= 0 && S->zone_count[n * w->nzones + (size_t)w->zone[p]] == 1)
        d -= S->weight;
    if (w->room[p] >= 0 && S->room_count[n * w->nrooms + (size_t)w->room[p]] == 1)
        d -= 1;
    return d;
}

static long long cost_in(const near *S, size_t p, size_t n)
{
    const keel_workload *w = S->w;
    long long d = 0;
    if (w->zone[p] >= 0 && S->zone_count[n * w->nzones + (size_t)w->zone[p]] == 0)
        d += S->weight;
    if (w->room[p] >= 0 && S->room_count[n * w->nrooms + (size_t)w->room[p]] == 0)
        d += 1;
    return d;
}

/* The change in cost when nurse n gives p and takes q instead. */
static long long cost_instead(const near *S, size_t p, size_t q, size_t n)
{
    const keel_workload *w = S->w;
    long long d = 0;
    int zp = w->zone[p], zq = w->zone[q], rp = w->room[p], rq = w->room[q];
    if (zp != zq) {
        if (zp >= 0 && S->zone_count[n * w->nzones + (size_t)zp] == 1)
            d -= S->weight;
        if (zq >= 0 && S->zone_count[n * w->nzones + (size_t)zq] == 0)
            d += S->weight;
    }
    if (rp != rq) {
        if (rp >= 0 && S->room_count[n * w->nrooms + (size_t)rp] == 1)
            d -= 1;
        if (rq >= 0 && S->room_count[n * w->nrooms + (size_t)rq] == 0)
            d += 1;
    }
    return d;
}

static long long off(const near *S, size_t n, long long c)
{
    return keel_measure_window_off(S->w, S->lo, S->hi, n, c);
}

/* The change in the windows' penalty when a's care changes by da and b's
 * by db: weight per minute outside. */
static long long penalty(const near *S, size_t a, long long da, size_t b, long long db)
{
    long long ca = S->t.care[a], cb = S->t.care[b];
    return S->weight * (off(S, a, ca + da) - off(S, a, ca) + off(S, b, cb + db) - off(S, b, cb));
}

/* Patients kept with their previous nurse gained when p goes from a to b. */
static long long kept_change(const near *S, size_t p, size_t a, size_t b)
{
    int v = S->w->previous[p];
    return (v == (int)b) - (v == (int)a);
}

static bool allowed(const near *S, size_t p, size_t n, bool aspire)
{
    return aspire || keel_measure_tabu_allows(&S->tabu, p, n, S->step);
}

typedef struct step {
    long long delta;
    long long pen; /* the windows' part of delta */
    size_t p;
    long q; /* -1: p moves; else p and q swap */
    size_t to;
    unsigned long long tie;
} step;

/* Keeps s when it is cheaper than *best (ties by the coin); the rules are
 * checked only for a step that would be kept. */
static void consider(near *S, step *best, bool *have, step s)
{
    if (*have && s.delta > best->delta)
        return;
    s.tie = flip(S);
    if (*have && s.delta == best->delta && s.tie >= best->tie)
        return;
    size_t a = (size_t)S->nurse_of[s.p];
    if (s.q < 0) {
        if (!keelRuleMinMayGive(&S->t, a) || !keelRuleAdmits(&S->t, s.p, s.to))
            return;
    } else if (!keelRuleAdmitsInstead(&S->t, s.p, (size_t)s.q, s.to) ||
               !keelRuleAdmitsInstead(&S->t, (size_t)s.q, s.p, a)) {
        return;
    }
    *best = s;
    *have = true;
}

/* True when a swap of p (of nurse a) and q (of b) could bring zones
 * together: same zone, or one nurse holds the other patient's zone
 * already.  Other swaps only trade zones, and are left out to keep each
 * step quick on large units. */
static bool related(const near *S, size_t p, size_t q, size_t a, size_t b)
{
    const keel_workload *w = S->w;
    int zp = w->zone[p], zq = w->zone[q];
    return zp == zq || zp < 0 || zq < 0 || S->zone_count[b * w->nzones + (size_t)zp] > 0 ||
           S->zone_count[a * w->nzones + (size_t)zq] > 0;
}

/* The cheapest allowed step; total is the cost now, record the lowest
 * cost of a plan within the windows. */
static bool choose(near *S, long long total, long long record, step *best)
{
    const keel_workload *w = S->w;
    size_t np = w->npatients, nn = w->nnurses;
    bool have = false;
    for (size_t p = 0; p < np; p++) {
        int ap = S->nurse_of[p];
        if (ap < 0)
            continue;
        size_t a = (size_t)ap;
        long long c = w->care_minutes[p], out = cost_out(S, p, a);
        for (size_t b = 0; b < nn; b++) {
            if (b == a || !keel_workload_eligible(w, p, b))
                continue;
            long long pen = penalty(S, a, -c, b, c);
            long long d = S->zone_minutes * (out + cost_in(S, p, b)) + pen;
            bool aspire = S->excess * S->weight + pen == 0 && total + d < record;
            if (S->kept + kept_change(S, p, a, b) < S->min_kept || !allowed(S, p, b, aspire))
                continue;
            consider(S, best, &have, (step){.delta = d, .pen = pen, .p = p, .q = -1, .to = b});
        }
        for (size_t q = p + 1; q < np; q++) {
            int bq = S->nurse_of[q];
            if (bq < 0 || bq == ap || (w->zone[p] == w->zone[q] && w->room[p] == w->room[q]))
                continue;
            size_t b = (size_t)bq;
            if (!keel_workload_eligible(w, p, b) || !keel_workload_eligible(w, q, a) ||
                !related(S, p, q, a, b))
                continue;
            long long dc = w->care_minutes[q] - c, pen = penalty(S, a, dc, b, -dc);
            long long d =
                S->zone_minutes * (cost_instead(S, p, q, a) + cost_instead(S, q, p, b)) + pen;
            bool aspire = S->excess * S->weight + pen == 0 && total + d < record;
            if (S->kept + kept_change(S, p, a, b) + kept_change(S, q, b, a) < S->min_kept ||
                !allowed(S, p, b, aspire) || !allowed(S, q, a, aspire))
                continue;
            consider(S, best, &have, (step){.delta = d, .pen = pen, .p = p, .q = (long)q, .to = b});
        }
    }
    return have;
}

static void place(near *S, size_t p, size_t n, int sign)
{
    const keel_workload *w = S->w;
    if (sign > 0)
        keel_tally_add(&S->t, p, n);
    else
        keel_tally_remove(&S->t, p, n);
    if (w->zone[p] >= 0)
        S->zone_count[n * w->nzones + (size_t)w->zone[p]] += sign;
    if (w->room[p] >= 0)
        S->room_count[n * w->nrooms + (size_t)w->room[p]] += sign;
}

static void apply(near *S, const step *s)
{
    size_t from = (size_t)S->nurse_of[s->p];
    long tenure = TABU_MIN + (long)(flip(S) % TABU_SPREAD);
    S->kept += kept_change(S, s->p, from, s->to);
    place(S, s->p, from, -1);
    if (s->q >= 0) {
        size_t q = (size_t)s->q;
        S->kept += kept_change(S, q, s->to, from);
        place(S, q, s->to, -1);
        place(S, q, from, +1);
        S->nurse_of[q] = (int)from;
        keel_measure_tabu_set(&S->tabu, q, s->to, S->step + tenure);
    }
    place(S, s->p, s->to, +1);
    S->nurse_of[s->p] = (int)s->to;
    keel_measure_tabu_set(&S->tabu, s->p, from, S->step + tenure);
}

keel_status keel_heur_near(const keel_workload *w, const long long *lo, const long long *hi,
                            long long min_kept, long long floor, long long deadline_ms,
                            int *nurse_of)
{
    size_t np = w->npatients, nn = w->nnurses;
    if (w->clocked || np == 0 || nn < 2)
        return KEEL_OK;
    near S = {.w = w,
              .lo = lo,
              .hi = hi,
              .weight = (long long)np + 1,
              .zone_minutes = ZONE_MINUTES,
              .min_kept = min_kept,
              .coin = 0x2545f4914f6cdd1dULL};
    S.nurse_of = keel_calloc(np, sizeof *S.nurse_of);
    S.zone_count = keel_calloc(nn * (w->nzones ? w->nzones : 1), sizeof *S.zone_count);
    S.room_count = keel_calloc(nn * (w->nrooms ? w->nrooms : 1), sizeof *S.room_count);
    bool tabu = keel_measure_tabu_init(&S.tabu, np, TABU_ENTRIES);
    keel_status rc = keel_tally_init(&S.t, w);
    if (rc || !S.nurse_of || !S.zone_count || !S.room_count || !tabu) {
        rc = KEEL_ERR_NOMEM;
        goto out;
    }
    memcpy(S.nurse_of, nurse_of, np * sizeof *nurse_of);
    for (size_t p = 0; p < np; p++)
        if (nurse_of[p] >= 0)
            place(&S, p, (size_t)nurse_of[p], +1);
    S.kept = keel_measure_kept(w, nurse_of);
    long long zones, rooms;
    keel_measure_spread(w, nurse_of, &zones, &rooms);
    long long total = S.zone_minutes * (S.weight * zones + rooms), record = total;
    long since = 0;
    while (record > S.zone_minutes * floor && since < STALL_STEPS &&
           ((S.step & 15) != 0 || keel_budget_now() < deadline_ms)) {
        step best;
        if (!choose(&S, total, record, &best))
            break; /* every step is tabu or breaks a rule */
        apply(&S, &best);
        total += best.delta;
        S.excess += best.pen / S.weight;
        S.step++;
        since++;
        if (S.excess == 0 && total < record) {
            record = total;
            since = 0;
            memcpy(nurse_of, S.nurse_of, np * sizeof *nurse_of);
        }
    }
out:
    free(S.nurse_of);
    free(S.zone_count);
    free(S.room_count);
    keel_measure_tabu_free(&S.tabu);
    keel_tally_free(&S.t);
    return rc;
}
