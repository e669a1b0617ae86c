/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * zone_solve.c - stages 1 and 2 by zone (a method of its own).  When every nurse works in one
 * zone (policy.max_zones 1), every patient has a zone and the nurses who
 * take patients are interchangeable (same capacity, duty, limits, care cap
 * and eligible patients), a plan is a number of nurses k_z for each zone z
 * and, in each zone, a plan of that zone alone.  So:
 *
 *   P(z, k)     the zone's proven best heaviest utilisation with k nurses
 *               (the exact method on the zone alone, every rule kept);
 *   U*          the least t for which numbers k_z with P(z, k_z) <= t add
 *               up to the nurses (all of them when they take at least one
 *               patient each, else at most all);
 *   L(z, k)     the zone's best lightest utilisation with k nurses, every
 *               one at or under U*;
 *   L*          the most l for which numbers k_z with P(z, k_z) <= U* and
 *               L(z, k_z) >= l add up likewise.
 *
 * Both are proven when every zone's figures are.  The numbers that add up
 * are found by a reachability table over the zones (at most nurses + 1
 * sums per zone).
 */
#include <limits.h>
#include <stdlib.h>
#include <string.h>

#include "alloc.h"
#include "answer.h"
#include "budget.h"
#include "heur.h"
#include "rule.h"
#include "sort.h"
#include "bound.h"
#include "stage.h"
#include "zone.h"
#include "workload_internal.h"

/* One zone with k nurses: its plan after stage 1 and after stage 2. */
typedef struct zone_try {
    bool feasible;
    bool peak_proven, lift_proven, squares_proven;
    keel_ratio peak, lift;
    double squares; /* under policy.balance squares: the zone's least sum */
    int *plan;      /* [zone patients]: nurse 0..k-1 of the zone */
} zone_try;

typedef struct zones {
    const keel_workload *w;
    size_t nz;
    size_t *first;   /* [nz + 1]: zone z's patients are members[first[z] .. first[z + 1]) */
    size_t *members; /* [npatients] */
    size_t *counted; /* [ncounted]: the nurses who take patients */
    size_t ncounted;
    bool all_work;   /* every counted nurse must take a patient (min_patients > 0) */
    zone_try *tries; /* [nz * (ncounted + 1)]: zone z with k nurses at z * (ncounted + 1) + k */
    int calls;
} zones;

bool keel_zone_solve_applies(const keel_workload *w)
{
    if (w->clocked || w->max_zones != 1 || w->nzones < 2)
        return false;
    for (size_t p = 0; p < w->npatients; p++)
        if (w->zone[p] < 0)
            return false;
    long first = -1;
    for (size_t n = 0; n < w->nnurses; n++) {
        if (!keel_workload_counted(w, n))
            continue;
        if (first < 0)
            first = (long)n;
        else if (!keel_measure_alike(w, (size_t)first, n))
            return false;
    }
    return first >= 0;
}

/* ---- The least squares of one zone, by a dedicated search ----------------
 * For a zone whose only rules are the patient limits and the care cap (no
 * ratios, high acuity or isolation), with k alike nurses: patients heaviest
 * first, each to a nurse (nurses in the same state tried once); a node is cut
 * when its sum of squares plus the least the patients still to come could
 * add (their care poured over the nurses as water fills, lowest loads
 * first, which convexity makes a floor) reaches the best found.  Sums of
 * squares are whole numbers: (duty + load)^2 summed, over the one capacity. */
typedef struct squares_search {
    const keel_workload *w;
    size_t k, np;
    size_t *order;      /* patients, heaviest first */
    long long *suffix;  /* [np + 1]: care still to come after position i */
    long long *load;    /* [k]: duty + care so far */
    int *count;         /* [k] */
    int *assign, *best; /* [np] */
    long long best_sum; /* LLONG_MAX: none yet */
    long long *scratch; /* [k] */
    size_t *cands;      /* [np * k]: the nurses tried at each depth */
    long nodes, budget;
    bool gave_up;
} squares_search;

/* The least sum of squares after pouring r more minutes over the loads,
 * continuously (a floor for whole patients), rounded down. */
static long long poured(squares_search *S, long long r)
{
    size_t k = S->k;
    memcpy(S->scratch, S->load, k * sizeof *S->scratch);
    qsort(S->scratch, k, sizeof *S->scratch, keelSortCompareLongLong);
    /* Raise the lowest j loads to a common level until r is spent. */
    long long spent = 0;
    size_t j = 1;
    while (j < k && spent + (S->scratch[j] - S->scratch[j - 1]) * (long long)j <= r) {
        spent += (S->scratch[j] - S->scratch[j - 1]) * (long long)j;
        j++;
    }
    double level = (double)S->scratch[j - 1] + (double)(r - spent) / (double)j;
    double sum = (double)j * level * level;
    for (size_t i = j; i < k; i++)
        sum += (double)S->scratch[i] * (double)S->scratch[i];
    return (long long)(sum - 1e-6 * (sum + 1)); /* never above the true floor */
}

static void squares_visit(squares_search *S, size_t i, long long sum)
{
    const keel_workload *w = S->w;
    if (S->gave_up || ++S->nodes > S->budget) {
        S->gave_up = true;
        return;
    }
    if (i == S->np) {
        for (size_t n = 0; n < S->k; n++)
            if (S->count[n] < w->min_patients[0])
                return;
        if (sum < S->best_sum) {
            S->best_sum = sum;
            memcpy(S->best, S->assign, S->np * sizeof *S->best);
        }
        return;
    }
    if (S->best_sum != LLONG_MAX && poured(S, S->suffix[i]) >= S->best_sum)
        return;
    long long short_of = 0;
    for (size_t n = 0; n < S->k; n++)
        short_of += S->count[n] < w->min_patients[0] ? w->min_patients[0] - S->count[n] : 0;
    if (short_of > (long long)(S->np - i))
        return;
    size_t p = S->order[i], *cand = S->cands + i * S->k, ncand = 0;
    long long c = w->care_minutes[p], duty = w->duty_minutes[0];
    /* Nurses with room, lightest first, one of each state (load, count). */
    for (size_t m = 0; m < S->k; m++) {
        if (S->count[m] + 1 > w->max_patients[0] || S->load[m] - duty + c > w->max_care[0] ||
            !keel_workload_eligible(w, p, m))
            continue;
        bool twin = false;
        for (size_t t = 0; t < ncand && !twin; t++)
            twin = S->load[cand[t]] == S->load[m] && S->count[cand[t]] == S->count[m];
        if (twin)
            continue;
        size_t at = ncand++;
        while (at > 0 && S->load[cand[at - 1]] > S->load[m]) {
            cand[at] = cand[at - 1];
            at--;
        }
        cand[at] = m;
    }
    for (size_t t = 0; t < ncand && !S->gave_up; t++) {
        size_t n = cand[t];
        long long before = S->load[n];
        S->load[n] = before + c;
        S->count[n]++;
        S->assign[p] = (int)n;
        squares_visit(S, i + 1, sum - before * before + (before + c) * (before + c));
        S->load[n] = before;
        S->count[n]--;
    }
}

/* True when no rule binds in the zone but the ones squares_visit() keeps
 * itself (the patient limit, the care cap, the fewest patients; the pair
 * rules through eligibility).  The rule table says which bind, so a new
 * rule sends the zone to the chains that read the whole table. */
static bool plain_zone(const keel_workload *sub)
{
    static const keel_rule_id kept_here[] = {KEEL_RULE_PATIENT_LIMIT, KEEL_RULE_CAPACITY,
                                             KEEL_RULE_MIN_PATIENTS};
    return !keelRuleBindsBeyond(sub, kept_here, sizeof kept_here / sizeof *kept_here);
}

/* The least sum of squares of a plain zone: fills plan and *proven (the
 * search ran to the end) and returns true, or false when it found nothing
 * within its nodes. */
static bool squares_exact(const keel_workload *sub, long budget, int *plan, bool *proven)
{
    size_t np = sub->npatients, k = sub->nnurses;
    squares_search S = {.w = sub, .k = k, .np = np, .best_sum = LLONG_MAX, .budget = budget};
    S.order = keel_calloc(np ? np : 1, sizeof *S.order);
    S.suffix = keel_calloc(np + 1, sizeof *S.suffix);
    S.load = keel_calloc(k ? k : 1, sizeof *S.load);
    S.count = keel_calloc(k ? k : 1, sizeof *S.count);
    S.assign = keel_calloc(np ? np : 1, sizeof *S.assign);
    S.best = keel_calloc(np ? np : 1, sizeof *S.best);
    S.scratch = keel_calloc(k ? k : 1, sizeof *S.scratch);
    S.cands = keel_calloc((np ? np : 1) * (k ? k : 1), sizeof *S.cands);
    bool found = false;
    *proven = false;
    if (S.order && S.suffix && S.load && S.count && S.assign && S.best && S.scratch && S.cands &&
        k > 0) {
        if (keel_workload_order(sub, S.order) == KEEL_OK) {
            for (size_t i = np; i-- > 0;)
                S.suffix[i] = S.suffix[i + 1] + sub->care_minutes[S.order[i]];
            for (size_t n = 0; n < k; n++)
                S.load[n] = sub->duty_minutes[0];
            squares_visit(&S, 0, (long long)k * sub->duty_minutes[0] * sub->duty_minutes[0]);
            found = S.best_sum != LLONG_MAX;
            *proven = !S.gave_up;
            if (found)
                memcpy(plan, S.best, np * sizeof *plan);
        }
    }
    free(S.order);
    free(S.suffix);
    free(S.load);
    free(S.count);
    free(S.assign);
    free(S.best);
    free(S.scratch);
    free(S.cands);
    return found;
}

static zone_try *try_at(zones *Z, size_t z, size_t k)
{
    return &Z->tries[z * (Z->ncounted + 1) + k];
}

/* Stage 1 of zone z alone with k nurses, within deadline_ms. */
static keel_status solve_zone(zones *Z, size_t z, size_t k, long long deadline_ms, keel_error *err)
{
    const keel_workload *w = Z->w;
    size_t np = Z->first[z + 1] - Z->first[z];
    zone_try *t = try_at(Z, z, k);
    keel_workload *sub = keelWorkloadSubset(w, Z->members + Z->first[z], np, NULL, Z->counted[0], k);
    t->plan = keel_calloc(np ? np : 1, sizeof *t->plan);
    if (!sub || !t->plan) {
        keel_workload_free(sub);
        return keel_error_add(err, KEEL_ERR_NOMEM, NULL, 0, 0, NULL, "out of memory");
    }
    keel_answer answer;
    keel_status rc = KEEL_OK;
    bool proven = false;
    if (w->balance == KEEL_BALANCE_SQUARES && plain_zone(sub) &&
        squares_exact(sub, KEEL_NODES_ZONE_SQUARES, t->plan, &proven)) {
        t->feasible = true;
        t->squares = keel_measure_squares(sub, t->plan);
        t->squares_proven = t->peak_proven = proven;
        keel_workload_free(sub);
        return KEEL_OK;
    }
    if (proven) { /* the search ran to the end and found nothing: no plan */
        t->peak_proven = true;
        keel_workload_free(sub);
        return KEEL_OK;
    }
    rc = keel_answer_valid(sub, deadline_ms, t->plan, &answer, err);
    if (!rc && answer == KEEL_ANSWER_YES && keel_heur_greedy_improve(sub, t->plan, deadline_ms))
        rc = keel_error_add(err, KEEL_ERR_NOMEM, NULL, 0, 0, NULL, "out of memory");
    if (!rc && answer == KEEL_ANSWER_YES) {
        keel_solution s = {.npatients = np, .nurse_of = t->plan};
        rc = keel_stage_balance(sub, true, deadline_ms, &s, NULL, err);
        t->feasible = true;
        t->peak = keel_measure_peak(sub, t->plan);
        t->peak_proven = s.stages[0].status == KEEL_SOLVE_OPTIMAL;
        t->squares = keel_measure_squares(sub, t->plan);
        t->squares_proven = t->peak_proven; /* stage 1 of the zone is squares then */
        for (size_t i = 0; i < s.nstages; i++)
            Z->calls += s.stages[i].solver_calls;
    }
    t->peak_proven = t->peak_proven || answer == KEEL_ANSWER_NO;
    keel_workload_free(sub);
    return rc;
}

/* Stage 2 of zone z alone with k nurses, every one at or under peak. */
static keel_status lift_zone(zones *Z, size_t z, size_t k, keel_ratio peak, long long deadline_ms,
                             keel_error *err)
{
    size_t np = Z->first[z + 1] - Z->first[z];
    zone_try *t = try_at(Z, z, k);
    keel_workload *sub = keelWorkloadSubset(Z->w, Z->members + Z->first[z], np, NULL, Z->counted[0], k);
    if (!sub)
        return keel_error_add(err, KEEL_ERR_NOMEM, NULL, 0, 0, NULL, "out of memory");
    keel_stage st = {0};
    keel_status rc = keel_stage_lift_under(sub, peak, deadline_ms, t->plan, &st, err);
    t->lift = keel_measure_lift(sub, t->plan);
    t->lift_proven = st.status == KEEL_SOLVE_OPTIMAL;
    Z->calls += st.solver_calls;
    keel_workload_free(sub);
    return rc;
}

/* Numbers k_z with a try that passes keep() in every zone, adding up to all
 * the counted nurses, or, with idle, to at most all (the most that can);
 * fills pick[nz] and returns true when there are some. */
static bool add_up(zones *Z, bool (*keep)(const zone_try *, const void *), const void *ctx,
                   bool idle, size_t *pick)
{
    size_t nc = Z->ncounted, nz = Z->nz;
    /* from[z * (nc + 1) + s]: the k of zone z by which sum s is first reached, or -1 */
    int *from = keel_malloc((nz ? nz : 1) * (nc + 1) * sizeof *from);
    bool *reach = keel_calloc(nc + 1, sizeof *reach), *next = keel_calloc(nc + 1, sizeof *next);
    bool found = false;
    if (!from || !reach || !next)
        goto out;
    reach[0] = true;
    for (size_t z = 0; z < nz; z++) {
        memset(next, 0, (nc + 1) * sizeof *next);
        for (size_t s = 0; s <= nc; s++)
            from[z * (nc + 1) + s] = -1;
        for (size_t k = 1; k <= nc; k++) {
            const zone_try *t = try_at(Z, z, k);
            if (!t->feasible || !keep(t, ctx))
                continue;
            for (size_t s = 0; s + k <= nc; s++) {
                if (!reach[s] || next[s + k])
                    continue;
                next[s + k] = true;
                from[z * (nc + 1) + s + k] = (int)k;
            }
        }
        memcpy(reach, next, (nc + 1) * sizeof *reach);
    }
    size_t total = nc + 1;
    for (size_t s = nc + 1; s-- > 0 && total > nc;)
        if (reach[s] && (idle || s == nc))
            total = s;
    if (total <= nc) {
        found = true;
        for (size_t z = nz; z-- > 0;) {
            pick[z] = (size_t)from[z * (nc + 1) + total];
            total -= pick[z];
        }
    }
out:
    free(from);
    free(reach);
    free(next);
    return found;
}

static bool peak_within(const zone_try *t, const void *ctx)
{
    return keel_ratio_cmp(t->peak, *(const keel_ratio *)ctx) <= 0;
}

typedef struct lift_bar {
    keel_ratio peak, lift;
} lift_bar;

static bool lift_within(const zone_try *t, const void *ctx)
{
    const lift_bar *b = ctx;
    return keel_ratio_cmp(t->peak, b->peak) <= 0 && keel_ratio_cmp(t->lift, b->lift) >= 0;
}

static int ratio_order(const void *a, const void *b)
{
    return keel_ratio_cmp(*(const keel_ratio *)a, *(const keel_ratio *)b);
}

/* The values v(t) of every feasible try, sorted; *n of them. */
static keel_ratio *values(zones *Z, bool lift, size_t *n)
{
    size_t cap = Z->nz * Z->ncounted + 1, k = 0;
    keel_ratio *v = keel_malloc(cap * sizeof *v);
    if (!v)
        return NULL;
    for (size_t z = 0; z < Z->nz; z++)
        for (size_t j = 1; j <= Z->ncounted; j++)
            if (try_at(Z, z, j)->feasible)
                v[k++] = lift ? try_at(Z, z, j)->lift : try_at(Z, z, j)->peak;
    qsort(v, k, sizeof *v, ratio_order);
    *n = k;
    return v;
}

/* The plan of the picked numbers: zone z's nurse j is the counted nurse
 * after those of the zones before it. */
static void assemble(const zones *Z, const size_t *pick, int *nurse_of)
{
    size_t next = 0;
    for (size_t p = 0; p < Z->w->npatients; p++)
        nurse_of[p] = -1;
    for (size_t z = 0; z < Z->nz; z++) {
        const zone_try *t = &Z->tries[z * (Z->ncounted + 1) + pick[z]];
        for (size_t i = Z->first[z]; i < Z->first[z + 1]; i++)
            nurse_of[Z->members[i]] = (int)Z->counted[next + (size_t)t->plan[i - Z->first[z]]];
        next += pick[z];
    }
}

static void stage_from(keel_stage *st, const char *name, keel_ratio value, bool proven,
                       keel_ratio bound, int calls, long long started)
{
    double v = keel_ratio_value(value), b = keel_ratio_value(proven ? value : bound);
    *st = (keel_stage){.name = name,
                       .status = proven ? KEEL_SOLVE_OPTIMAL : KEEL_SOLVE_TIME_LIMIT,
                       .value = v,
                       .bound = b,
                       .gap = proven ? 0.0 : keel_gap(v, b),
                       .solver_calls = calls,
                       .seconds = (double)(keel_budget_now() - started) / 1000.0};
}

/* Under policy.balance squares: the numbers k_z whose zones' sums add up to
 * the least, the nurses left idle (when allowed) adding duty^2 / capacity
 * each; fills pick[] and returns true when any numbers add up. */
static bool least_squares(zones *Z, size_t *pick)
{
    size_t nc = Z->ncounted, nz = Z->nz;
    const keel_workload *w = Z->w;
    double idle = (double)w->duty_minutes[Z->counted[0]] * w->duty_minutes[Z->counted[0]] /
                  w->capacity_minutes[Z->counted[0]];
    double *best = keel_malloc((nz + 1) * (nc + 1) * sizeof *best);
    bool found = false;
    if (!best)
        return false;
    /* best[z * (nc + 1) + s]: least sum of zones 0..z-1 with s nurses (-1: none). */
    for (size_t i = 0; i < (nz + 1) * (nc + 1); i++)
        best[i] = -1;
    best[0] = 0;
    for (size_t z = 0; z < nz; z++)
        for (size_t s = 0; s <= nc; s++) {
            double here = best[z * (nc + 1) + s];
            for (size_t k = 1; here >= 0 && s + k <= nc; k++) {
                const zone_try *t = try_at(Z, z, k);
                double *next = &best[(z + 1) * (nc + 1) + s + k];
                if (t->feasible && (*next < 0 || here + t->squares < *next))
                    *next = here + t->squares;
            }
        }
    size_t total = 0;
    double least = -1;
    for (size_t s = Z->all_work ? nc : 0; s <= nc; s++) {
        double v = best[nz * (nc + 1) + s];
        if (v >= 0 && (least < 0 || v + (double)(nc - s) * idle < least)) {
            least = v + (double)(nc - s) * idle;
            total = s;
        }
    }
    if (least >= 0) {
        found = true;
        for (size_t z = nz; z-- > 0;) {
            for (size_t k = 1; k <= total; k++) {
                const zone_try *t = try_at(Z, z, k);
                double before = best[z * (nc + 1) + total - k];
                if (t->feasible && before >= 0 &&
                    before + t->squares == best[(z + 1) * (nc + 1) + total]) {
                    pick[z] = k;
                    total -= k;
                    break;
                }
            }
        }
    }
    free(best);
    return found;
}

keel_status keel_zone_solve(const keel_workload *w, long long deadline_ms, keel_solution *sol,
                             bool *found, keel_error *err)
{
    zones Z = {.w = w, .nz = w->nzones};
    keel_status rc = KEEL_OK;
    long long started = keel_budget_now();
    size_t np = w->npatients, nn = w->nnurses;
    *found = false;
    Z.first = keel_calloc(Z.nz + 1, sizeof *Z.first);
    Z.members = keel_calloc(np ? np : 1, sizeof *Z.members);
    Z.counted = keel_calloc(nn ? nn : 1, sizeof *Z.counted);
    size_t *pick = keel_calloc(Z.nz ? Z.nz : 1, sizeof *pick);
    keel_ratio *cand = NULL;
    if (!Z.first || !Z.members || !Z.counted || !pick) {
        rc = keel_error_add(err, KEEL_ERR_NOMEM, NULL, 0, 0, NULL, "out of memory");
        goto out;
    }
    for (size_t n = 0; n < nn; n++)
        if (keel_workload_counted(w, n))
            Z.counted[Z.ncounted++] = n;
    Z.all_work = w->min_patients[Z.counted[0]] > 0;
    for (size_t p = 0; p < np; p++)
        Z.first[w->zone[p] + 1]++;
    for (size_t z = 0; z < Z.nz; z++)
        Z.first[z + 1] += Z.first[z];
    for (size_t p = 0; p < np; p++) /* counting sort: zone z's next free place */
        Z.members[pick[w->zone[p]]++ + Z.first[w->zone[p]]] = p;
    memset(pick, 0, Z.nz * sizeof *pick);
    Z.tries = keel_calloc(Z.nz * (Z.ncounted + 1), sizeof *Z.tries);
    if (!Z.tries) {
        rc = keel_error_add(err, KEEL_ERR_NOMEM, NULL, 0, 0, NULL, "out of memory");
        goto out;
    }

    /* Stage 1: every zone with every number of nurses it could have. */
    size_t ntries = 0, done = 0;
    for (size_t z = 0; z < Z.nz; z++)
        ntries +=
            Z.first[z + 1] - Z.first[z] < Z.ncounted ? Z.first[z + 1] - Z.first[z] : Z.ncounted;
    bool proven = true;
    for (size_t z = 0; z < Z.nz && !rc; z++) {
        size_t most = Z.first[z + 1] - Z.first[z];
        for (size_t k = 1; k <= most && k <= Z.ncounted && !rc; k++, done++) {
            /* Most zones are proven at once; a hard one may use a fifth of
             * what is left, so the others still get time. */
            rc = solve_zone(&Z, z, k,
                            keel_budget_until(KEEL_SHARE_ZONE_TRY, keel_budget_now(), deadline_ms,
                                              ntries - done + 1),
                            err);
            proven = proven && try_at(&Z, z, k)->peak_proven;
        }
    }
    if (!rc && w->balance == KEEL_BALANCE_SQUARES) {
        if (!least_squares(&Z, pick))
            goto out;
        assemble(&Z, pick, sol->nurse_of);
        double v = keel_measure_squares(w, sol->nurse_of), b = keel_measure_squares(w, NULL);
        sol->stages[0] = (keel_stage){.name = "squares",
                                      .status = proven ? KEEL_SOLVE_OPTIMAL : KEEL_SOLVE_TIME_LIMIT,
                                      .value = v,
                                      .bound = proven ? v : b,
                                      .gap = proven ? 0.0 : keel_gap(v, b),
                                      .solver_calls = Z.calls,
                                      .seconds = (double)(keel_budget_now() - started) / 1000.0};
        sol->nstages = 1;
        *found = true;
        goto out;
    }
    size_t ncand = 0, at;
    cand = rc ? NULL : values(&Z, false, &ncand);
    if (!rc && !cand)
        rc = keel_error_add(err, KEEL_ERR_NOMEM, NULL, 0, 0, NULL, "out of memory");
    for (at = 0; !rc && at < ncand; at++)
        if (add_up(&Z, peak_within, &cand[at], !Z.all_work, pick))
            break;
    if (rc || at == ncand)
        goto out; /* no numbers add up: the usual search says why */
    keel_ratio peak = cand[at];
    int calls1 = Z.calls;
    stage_from(&sol->stages[0], "peak", peak, proven, keel_bound_simple_peak(w), calls1, started);

    /* Stage 2: each zone's best lightest with every nurse at or under U*. */
    long long lift_started = keel_budget_now();
    bool lifted = true;
    for (size_t z = 0; z < Z.nz && !rc; z++) {
        for (size_t k = 1; k <= Z.ncounted && !rc; k++) {
            zone_try *t = try_at(&Z, z, k);
            if (!t->feasible || keel_ratio_cmp(t->peak, peak) > 0) {
                t->feasible = false; /* no part of a plan at U* */
                continue;
            }
            rc = lift_zone(&Z, z, k, peak,
                           keel_budget_until(KEEL_SHARE_ZONE_LIFT, keel_budget_now(), deadline_ms,
                                             0),
                           err);
            lifted = lifted && t->lift_proven;
        }
    }
    free(cand);
    cand = rc ? NULL : values(&Z, true, &ncand);
    if (!rc && !cand)
        rc = keel_error_add(err, KEEL_ERR_NOMEM, NULL, 0, 0, NULL, "out of memory");
    lift_bar bar = {peak, {0, 1}};
    keel_ratio idle_util = {w->duty_minutes[Z.counted[0]], w->capacity_minutes[Z.counted[0]]};
    bool any = false;
    for (size_t i = ncand; !rc && i-- > 0;) {
        bar.lift = cand[i];
        bool idle = !Z.all_work && keel_ratio_cmp(idle_util, bar.lift) >= 0;
        if (add_up(&Z, lift_within, &bar, idle, pick)) {
            any = true;
            break;
        }
    }
    if (rc || !any)
        goto out;
    assemble(&Z, pick, sol->nurse_of);
    /* Idle nurses (when nobody must work) count in the lightest. */
    keel_ratio lift = keel_measure_lift(w, sol->nurse_of);
    stage_from(&sol->stages[1], "lift", lift, lifted, keel_bound_simple_lift(w), Z.calls - calls1,
               lift_started);
    sol->nstages = 2;
    *found = true;
out:
    for (size_t i = 0; Z.tries && i < Z.nz * (Z.ncounted + 1); i++)
        free(Z.tries[i].plan);
    free(Z.tries);
    free(Z.first);
    free(Z.members);
    free(Z.counted);
    free(pick);
    free(cand);
    return rc;
}

