/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * zone_polish.c - zone by zone with the plan's own nurses.  With
 * policy.max_zones 1 and every patient in a zone, the nurses of a plan
 * split into the zones of their patients; keeping that split, each zone is
 * a problem of its own.  Each is solved by the exact balance stages
 * (stage_balance.c) from its part of the plan, within an equal share of
 * the time left, and its plan kept when it is no worse.  In the time left
 * after that, the zones trade nurses (trade_zones).
 */
#include <limits.h>
#include <stdlib.h>
#include <string.h>

#include "alloc.h"
#include "budget.h"
#include "heur.h"
#include "stage.h"
#include "zone.h"
#include "workload_internal.h"

/* The members of zone z (patients) and its nurses (home[n] == z), with
 * local[n] the index of nurse n among them. */
static void gather(const keel_workload *w, const int *home, int z, size_t *members, size_t *m,
                   size_t *nurses, size_t *k, int *local)
{
    *m = *k = 0;
    for (size_t p = 0; p < w->npatients; p++)
        if (w->zone[p] == z)
            members[(*m)++] = p;
    for (size_t n = 0; n < w->nnurses; n++)
        if (home[n] == z) {
            local[n] = (int)*k;
            nurses[(*k)++] = n;
        }
}

/* Solves zone z with its nurses nurses[0..k) by the exact method from
 * plan (the zone's part of a valid plan, in local nurse indices), within
 * deadline_ms; *valid when the result keeps every rule. */
static keel_status solve_part(const keel_workload *w, const size_t *members, size_t m,
                              const size_t *nurses, size_t k, long long deadline_ms, int *plan,
                              bool *valid, keel_error *err)
{
    keel_workload *sub = keelWorkloadSubset(w, members, m, nurses, 0, k);
    if (!sub)
        return keel_error_add(err, KEEL_ERR_NOMEM, NULL, 0, 0, NULL, "out of memory");
    keel_solution s = {.npatients = m, .nurse_of = plan};
    keel_status rc = keel_stage_balance(sub, true, deadline_ms, &s, NULL, err);
    if (!rc && keel_measure_validate(sub, plan, valid))
        rc = keel_error_add(err, KEEL_ERR_NOMEM, NULL, 0, 0, NULL, "out of memory");
    keel_workload_free(sub);
    return rc;
}

/* The greedy plan of zone z's patients with the nurses nurses[0..k): its
 * heaviest utilisation in *peak, *placed false when it leaves a patient
 * out or breaks a rule. */
static keel_status greedy_part(const keel_workload *w, const size_t *members, size_t m,
                               const size_t *nurses, size_t k, int *plan, keel_ratio *peak,
                               bool *placed)
{
    keel_workload *sub = keelWorkloadSubset(w, members, m, nurses, 0, k);
    if (!sub)
        return KEEL_ERR_NOMEM;
    keel_status rc = keel_heur_greedy_place(sub, plan, placed);
    if (!rc && *placed)
        rc = keel_heur_greedy_improve(sub, plan, LLONG_MAX); /* one zone: small */
    if (!rc && *placed)
        rc = keel_measure_validate(sub, plan, placed);
    *peak = keel_measure_peak(sub, plan);
    keel_workload_free(sub);
    return rc;
}

/* True when, after nurses a and b trade zones, both zones' averages
 * (care and duty over capacity) are below peak: no plan of a zone keeps
 * every nurse below its average. */
static bool averages_below(const keel_workload *w, const int *home, size_t a, size_t b,
                           keel_ratio peak)
{
    for (int i = 0; i < 2; i++) {
        size_t out = i == 0 ? a : b, in = i == 0 ? b : a;
        int z = home[out];
        long long load = w->duty_minutes[in], capacity = w->capacity_minutes[in];
        for (size_t p = 0; p < w->npatients; p++)
            load += w->zone[p] == z ? w->care_minutes[p] : 0;
        for (size_t n = 0; n < w->nnurses; n++)
            if (home[n] == z && n != out) {
                load += w->duty_minutes[n];
                capacity += w->capacity_minutes[n];
            }
        if (keel_ratio_cmp((keel_ratio){load, capacity}, peak) >= 0)
            return false;
    }
    return true;
}

/* The two zones of a trade: patients, nurses (local indices in plan). */
typedef struct trade {
    size_t *members[2], *nurses[2];
    size_t m[2], k[2];
    int *plan[2];
} trade;

/* Places both zones afresh by the greedy method after nurse a trades
 * places with nurse b (of another zone): T holds the zones' plans, *worst
 * the heavier zone's peak, *placed false when a plan leaves a patient out
 * or breaks a rule. */
static keel_status place_trade(const keel_workload *w, int *home, size_t a, size_t b, trade *T,
                               int *local, keel_ratio *worst, bool *placed)
{
    int za = home[a], zb = home[b];
    keel_status rc = KEEL_OK;
    *worst = (keel_ratio){0, 1};
    *placed = true;
    home[a] = home[b] = -2; /* in neither zone while the zones are gathered */
    for (int i = 0; i < 2 && *placed && !rc; i++) {
        gather(w, home, i == 0 ? za : zb, T->members[i], &T->m[i], T->nurses[i], &T->k[i], local);
        T->nurses[i][T->k[i]++] = i == 0 ? b : a;
        keel_ratio part;
        rc = greedy_part(w, T->members[i], T->m[i], T->nurses[i], T->k[i], T->plan[i], &part,
                         placed);
        if (keel_ratio_cmp(part, *worst) > 0)
            *worst = part;
    }
    home[a] = za;
    home[b] = zb;
    return rc;
}

/* A zone can be heavy because of whom it has (say a part-timer as its only
 * nurse with a skill its patients need), which no plan of the zone alone
 * undoes.  So the zone of the heaviest nurse trades one of its nurses for
 * one of another zone (nurses alike in capacity, duty and rules are not
 * traded): each trade is screened by placing both zones afresh with the
 * greedy method; the trade whose heavier zone ends lowest, and below the
 * heaviest nurse, is made, and both zones are then solved by the exact
 * method.  Repeats while a trade gains and time is left.  home is scratch. */
static keel_status trade_zones(const keel_workload *w, long long deadline_ms, int *nurse_of,
                               int *home, keel_error *err)
{
    size_t np = w->npatients, nn = w->nnurses;
    trade T = {0};
    int *local = keel_malloc((nn + 1) * sizeof *local);
    keel_status rc = local ? KEEL_OK : KEEL_ERR_NOMEM;
    for (int i = 0; i < 2; i++) {
        T.members[i] = keel_malloc((np + 1) * sizeof *T.members[i]);
        T.nurses[i] = keel_malloc((nn + 1) * sizeof *T.nurses[i]);
        T.plan[i] = keel_malloc((np + 1) * sizeof *T.plan[i]);
        if (!T.members[i] || !T.nurses[i] || !T.plan[i])
            rc = KEEL_ERR_NOMEM;
    }
    while (!rc && keel_budget_now() < deadline_ms) {
        size_t heavy = nn;
        keel_ratio peak = {0, 1};
        for (size_t n = 0; n < nn; n++) {
            home[n] = -1;
            keel_ratio u = keel_measure_utilisation(w, nurse_of, n);
            if (keel_workload_counted(w, n) && (heavy == nn || keel_ratio_cmp(u, peak) > 0)) {
                heavy = n;
                peak = u;
            }
        }
        for (size_t p = 0; p < np; p++)
            home[nurse_of[p]] = w->zone[p];
        if (heavy == nn || home[heavy] < 0)
            break;
        int zs = home[heavy];
        size_t best_a = nn, best_b = nn;
        keel_ratio best = peak;
        for (size_t a = 0; a < nn && !rc; a++) {
            for (size_t b = 0; b < nn && home[a] == zs && !rc; b++) {
                if (home[b] < 0 || home[b] == zs || keel_measure_alike(w, a, b) ||
                    !averages_below(w, home, a, b, peak))
                    continue;
                if (keel_budget_now() >= deadline_ms)
                    goto out;
                keel_ratio worst;
                bool placed;
                rc = place_trade(w, home, a, b, &T, local, &worst, &placed);
                if (!rc && placed && keel_ratio_cmp(worst, best) < 0) {
                    best = worst;
                    best_a = a;
                    best_b = b;
                }
            }
        }
        if (rc || best_a == nn)
            break;
        /* Make the trade: both zones afresh, then by the exact method. */
        keel_ratio worst;
        bool placed;
        rc = place_trade(w, home, best_a, best_b, &T, local, &worst, &placed);
        for (int i = 0; i < 2 && !rc; i++) {
            bool valid = false;
            rc = solve_part(w, T.members[i], T.m[i], T.nurses[i], T.k[i],
                            keel_budget_until(KEEL_SHARE_TRADE, keel_budget_now(), deadline_ms,
                                              (size_t)(4 - i)),
                            T.plan[i], &valid, err);
            if (!rc && (!placed || !valid))
                goto out; /* cannot happen: the screen placed both */
        }
        for (int i = 0; i < 2 && !rc; i++)
            for (size_t j = 0; j < T.m[i]; j++)
                nurse_of[T.members[i][j]] = (int)T.nurses[i][T.plan[i][j]];
    }
out:
    if (rc == KEEL_ERR_NOMEM && err->status == KEEL_OK)
        rc = keel_error_add(err, KEEL_ERR_NOMEM, NULL, 0, 0, NULL, "out of memory");
    for (int i = 0; i < 2; i++) {
        free(T.members[i]);
        free(T.nurses[i]);
        free(T.plan[i]);
    }
    free(local);
    return rc;
}

keel_status keel_zone_polish(const keel_workload *w, long long deadline_ms, int *nurse_of,
                              keel_error *err)
{
    if (!keel_measure_one_zone_each(w))
        return KEEL_OK;
    size_t np = w->npatients, nn = w->nnurses;
    size_t *members = keel_malloc((np + 1) * sizeof *members);
    size_t *nurses = keel_malloc((nn + 1) * sizeof *nurses);
    int *local = keel_malloc((nn + 1) * sizeof *local);
    int *plan = keel_malloc((np + 1) * sizeof *plan);
    int *home = keel_malloc((nn + 1) * sizeof *home);
    keel_status rc = KEEL_OK;
    if (!members || !nurses || !local || !plan || !home) {
        rc = keel_error_add(err, KEEL_ERR_NOMEM, NULL, 0, 0, NULL, "out of memory");
        goto out;
    }
    for (size_t n = 0; n < nn; n++)
        home[n] = -1;
    for (size_t p = 0; p < np; p++)
        home[nurse_of[p]] = w->zone[p];
    for (size_t z = 0; z < w->nzones && !rc; z++) {
        size_t m, k;
        gather(w, home, (int)z, members, &m, nurses, &k, local);
        if (m == 0)
            continue;
        keel_workload *sub = keelWorkloadSubset(w, members, m, nurses, 0, k);
        if (!sub) {
            rc = keel_error_add(err, KEEL_ERR_NOMEM, NULL, 0, 0, NULL, "out of memory");
            break;
        }
        for (size_t i = 0; i < m; i++)
            plan[i] = local[nurse_of[members[i]]];
        keel_ratio peak = keel_measure_peak(sub, plan), lift = keel_measure_lift(sub, plan);
        keel_solution s = {.npatients = m, .nurse_of = plan};
        rc = keel_stage_balance(
            sub, true,
            keel_budget_until(KEEL_SHARE_ZONE_EACH, keel_budget_now(), deadline_ms, w->nzones - z),
            &s, NULL, err);
        bool valid = false;
        if (!rc && keel_measure_validate(sub, plan, &valid))
            rc = keel_error_add(err, KEEL_ERR_NOMEM, NULL, 0, 0, NULL, "out of memory");
        keel_ratio peak2 = keel_measure_peak(sub, plan), lift2 = keel_measure_lift(sub, plan);
        int better = keel_ratio_cmp(peak2, peak);
        if (!rc && valid && (better < 0 || (better == 0 && keel_ratio_cmp(lift2, lift) >= 0)))
            for (size_t i = 0; i < m; i++)
                nurse_of[members[i]] = (int)nurses[plan[i]];
        keel_workload_free(sub);
    }
    if (!rc)
        rc = trade_zones(w, deadline_ms, nurse_of, home, err);
out:
    free(members);
    free(nurses);
    free(local);
    free(plan);
    free(home);
    return rc;
}
