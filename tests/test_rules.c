/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * test_rules.c - the rules that join patients (patient ratios, high acuity,
 * isolation separation, zones) and the stages after the balance
 * (continuity, proximity), against exhaustive enumeration on small random
 * rosters.  The enumeration checks the rules by their definitions in
 * docs/model.md ("Hard rules"), written here again without keel's tally.
 */
#include <limits.h>
#include <math.h>
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdlib.h>
#include <string.h>

#include <cmocka.h>

#include "solve/answer.h"
#include "solve/bound.h"
#include "solve/budget.h"
#include "solve/heur.h"
#include "solve/measure.h"
#include "solve/zone.h"
#include "keel/plan.h"
#include "lp.h"
#include "rule.h"
#include "testutil.h"
#include "tu_ranks.h"
#include "workload_internal.h"

/* ---- The rules by their definitions ----------------------------------------- */

static bool keeps_rules(const keel_workload *w, const int *a)
{
    for (size_t n = 0; n < w->nnurses; n++) {
        int k = 0, high = 0, sides[3] = {0, 0, 0}, tightest = (int)w->npatients;
        int zones = 0;
        long long care = 0;
        for (size_t p = 0; p < w->npatients; p++) {
            if (a[p] != (int)n)
                continue;
            if (!keel_workload_eligible(w, p, n))
                return false;
            k++;
            care += w->care_minutes[p];
            high += w->high_acuity[p];
            sides[w->side[p]]++;
            if (w->ratio_limit[p] < tightest)
                tightest = w->ratio_limit[p];
            bool seen = w->zone[p] < 0;
            for (size_t q = 0; q < p && !seen; q++)
                seen = a[q] == (int)n && w->zone[q] == w->zone[p];
            zones += !seen;
        }
        if (k > w->max_patients[n] || k > tightest)
            return false;
        if (k < w->min_patients[n] || care > w->max_care[n])
            return false;
        if (w->max_high_acuity != KEEL_ABSENT && high > w->max_high_acuity)
            return false;
        if (sides[KEEL_SIDE_PROTECTIVE] && sides[KEEL_SIDE_INFECTIOUS])
            return false;
        if (w->max_zones != KEEL_ABSENT && zones > w->max_zones)
            return false;
    }
    return true;
}

/* ---- Exhaustive enumeration of the four stages ------------------------------- */

enum pass { PASS_BALANCE, PASS_KEEP, PASS_NEAR, PASS_HISTORY };

typedef struct best {
    const keel_workload *w;
    int *a;
    enum pass pass;
    bool found;
    keel_ratio peak, lift;
    long long *lo, *hi; /* tolerance windows of care, passes KEEP and NEAR */
    long long kept;     /* best kept (KEEP); required kept (NEAR) */
    long long zones, rooms;
    bool near_found;
    const double *weight; /* HISTORY: the weights; zones, rooms and kept are held */
    double history;       /* HISTORY: the least weighted sum found */
    bool history_found;
    tu_plans plans; /* BALANCE: every valid plan's loads, for the ranks */
    tu_ranks ranks; /* the ranks over them (ranks_of()); the windows' levels */
} best;

static bool inside(const best *b)
{
    const keel_workload *w = b->w;
    for (size_t n = 0; n < w->nnurses; n++) {
        if (!keel_workload_counted(w, n))
            continue;
        long long care = 0;
        for (size_t p = 0; p < w->npatients; p++)
            if (b->a[p] == (int)n)
                care += w->care_minutes[p];
        if (care < b->lo[n] || care > b->hi[n])
            return false;
    }
    return true;
}

static void leaf(best *b)
{
    const keel_workload *w = b->w;
    if (!keeps_rules(w, b->a))
        return;
    if (b->pass == PASS_BALANCE) {
        long long load[TU_RANKS_MAX];
        for (size_t n = 0; n < w->nnurses; n++)
            load[n] = w->duty_minutes[n];
        for (size_t p = 0; p < w->npatients; p++)
            load[b->a[p]] += w->care_minutes[p];
        b->plans.nnurses = w->nnurses;
        tu_plans_add(&b->plans, load);
        keel_ratio peak = keel_measure_peak(w, b->a), lift = keel_measure_lift(w, b->a);
        int by_peak = b->found ? keel_ratio_cmp(peak, b->peak) : -1;
        if (by_peak < 0 || (by_peak == 0 && keel_ratio_cmp(lift, b->lift) > 0)) {
            b->peak = peak;
            b->lift = lift;
        }
        b->found = true;
        return;
    }
    if (!inside(b))
        return;
    long long kept = keel_measure_kept(w, b->a);
    if (b->pass == PASS_KEEP) {
        if (kept > b->kept)
            b->kept = kept;
        return;
    }
    long long zones, rooms;
    keel_measure_spread(w, b->a, &zones, &rooms);
    if (b->pass == PASS_HISTORY) {
        long long price = (long long)w->npatients + 1;
        double h = keel_measure_history(w, b->a, b->weight);
        if (kept >= b->kept && price * zones + rooms <= price * b->zones + b->rooms &&
            (!b->history_found || h < b->history)) {
            b->history = h;
            b->history_found = true;
        }
        return;
    }
    if (kept >= b->kept &&
        (!b->near_found || zones < b->zones || (zones == b->zones && rooms < b->rooms))) {
        b->zones = zones;
        b->rooms = rooms;
        b->near_found = true;
    }
}

static void visit(best *b, size_t p)
{
    if (p == b->w->npatients) {
        leaf(b);
        return;
    }
    for (size_t n = 0; n < b->w->nnurses; n++) {
        b->a[p] = (int)n;
        visit(b, p + 1);
    }
}

/* floor and ceil of x / d, d > 0 */
static long long fdiv(long long x, long long d)
{
    return x >= 0 ? x / d : -((-x + d - 1) / d);
}

/* The ranks over the plans PASS_BALANCE found (tu_ranks.h); the lift
 * becomes the one with the ranks held. */
static void ranks_of(best *b)
{
    bool counted[TU_RANKS_MAX];
    for (size_t n = 0; n < b->w->nnurses; n++)
        counted[n] = keel_workload_counted(b->w, n);
    tu_ranks_compute(&b->plans, b->w->capacity_minutes, counted, &b->ranks);
    b->lift = b->ranks.lift;
}

/* The windows of stages 3-5 around each nurse's level and the lift. */
static void windows(best *b, long long t)
{
    const keel_workload *w = b->w;
    const long long S = KEEL_TOLERANCE_SCALE;
    for (size_t n = 0; n < w->nnurses; n++) {
        long long cap = w->capacity_minutes[n], duty = w->duty_minutes[n];
        keel_ratio level = b->ranks.level[n];
        b->hi[n] = fdiv((level.num * S + t * level.den) * cap, level.den * S) - duty;
        b->lo[n] = -fdiv(-((b->lift.num * S - t * b->lift.den) * cap), b->lift.den * S) - duty;
    }
}

/* Sets the derived switches of a hand-made case as the workload does. */
static void derive(tu_case *c)
{
    keelRuleFlags(&c->w);
}

/* ---- Random small rosters with every rule --------------------------------- */

static tu_case *random_rules_case(uint64_t *seed)
{
    size_t nn = (size_t)tu_range(seed, 1, 4), np = (size_t)tu_range(seed, 0, 8);
    tu_case *c = tu_case_new(nn, np);
    keel_workload *w = &c->w;
    for (size_t n = 0; n < nn; n++) {
        w->capacity_minutes[n] = tu_range(seed, 0, 2) == 0 ? 420 : 660;
        w->duty_minutes[n] = tu_range(seed, 0, 3) == 0 ? tu_range(seed, 1, 12) * 10 : 0;
        int kind = tu_range(seed, 0, 9);
        w->max_patients[n] = kind < 4 ? (int)np : kind == 9 ? 0 : tu_range(seed, 1, 4);
        if (tu_range(seed, 0, 4) == 0)
            tu_add_skill(c, n, "chemo");
    }
    w->max_high_acuity = tu_range(seed, 0, 2) ? tu_range(seed, 0, 2) : KEEL_ABSENT;
    w->max_zones = tu_range(seed, 0, 1) ? 1 : KEEL_ABSENT;
    w->nzones = 2;
    w->nrooms = 3;
    w->tolerance = (long long[]){0, 50000, 200000}[tu_range(seed, 0, 2)];
    for (size_t p = 0; p < np; p++) {
        w->care_minutes[p] = tu_range(seed, 1, 14) * 30;
        /* As the workload does: a ratio never above the census. */
        w->ratio_limit[p] = tu_range(seed, 0, 4) == 0 ? tu_range(seed, 1, 3) : (int)np;
        if (w->ratio_limit[p] > (int)np)
            w->ratio_limit[p] = (int)np;
        w->high_acuity[p] = w->max_high_acuity != KEEL_ABSENT && tu_range(seed, 0, 2) == 0;
        w->side[p] =
            (signed char)(tu_range(seed, 0, 3) < 2 ? KEEL_SIDE_NONE : tu_range(seed, 1, 2));
        w->zone[p] = tu_range(seed, -1, 1);
        w->room[p] = tu_range(seed, -1, 2);
        w->previous[p] = tu_range(seed, 0, 2) ? tu_range(seed, -1, (int)nn - 1) : -1;
        w->ncontinuity += w->previous[p] >= 0;
        if (tu_range(seed, 0, 5) == 0)
            tu_add_need(c, p, "chemo");
    }
    /* Sometimes the fewest patients and a cap on utilisation (as the
     * workload derives them: none for nurses who take no patients). */
    bool least = tu_range(seed, 0, 3) == 0, cap = tu_range(seed, 0, 3) == 0;
    for (size_t n = 0; n < nn; n++) {
        if (w->max_patients[n] == 0)
            continue;
        if (least)
            w->min_patients[n] = tu_range(seed, 0, w->max_patients[n] < 2 ? w->max_patients[n] : 2);
        if (cap)
            w->max_care[n] =
                (long long)w->capacity_minutes[n] * tu_range(seed, 6, 12) / 10 - w->duty_minutes[n];
    }
    derive(c);
    tu_refresh(c);
    return c;
}

static keel_solution *solve(tu_case *c)
{
    keel_solution *s = NULL;
    keel_error err;
    keel_error_init(&err);
    keel_solve_options opt = {.method = "ilp", .time_limit_ms = 60000};
    assert_int_equal(keel_solve(&c->roster, &c->w, &opt, &s, &err), KEEL_OK);
    keel_error_fini(&err);
    return s;
}

static void test_every_stage_matches_exhaustive_enumeration(void **state)
{
    (void)state;
    /* Source: exhaustive enumeration of every assignment (all nurses for each
     * patient), each checked against the rules' definitions above. */
    uint64_t seed = 1969;
    int feasible = 0, infeasible = 0, ranked = 0;
    for (int round = 0; round < 1000; round++) {
        tu_case *c = random_rules_case(&seed);
        keel_workload *w = &c->w;
        size_t nn = w->nnurses;
        best b = {.w = w, .pass = PASS_BALANCE};
        b.a = calloc(w->npatients + 1, sizeof *b.a);
        b.lo = calloc(nn, sizeof *b.lo);
        b.hi = calloc(nn, sizeof *b.hi);
        visit(&b, 0);
        keel_solution *s = solve(c);
        if (!b.found) {
            infeasible++;
            assert_int_equal(s->status, KEEL_SOLVE_INFEASIBLE);
            assert_true(s->diagnoses.n > 0);
            for (size_t i = 0; i < s->diagnoses.n; i++)
                assert_non_null(strstr("skill patient_limit law_limit patient_ratio high_acuity "
                                       "isolation zones lock avoid capacity min_patients",
                                       s->diagnoses.items[i].rule));
        } else {
            feasible++;
            assert_int_equal(s->status, KEEL_SOLVE_OPTIMAL);
            assert_int_equal(s->diagnoses.n, 0);
            assert_true(keeps_rules(w, s->nurse_of));
            assert_true(tu_stage(s, "peak")->value == keel_ratio_value(b.peak));
            ranks_of(&b);
            assert_true(tu_ranks_match(&b.ranks, s));
            ranked += s->nranks > 0;
            windows(&b, w->tolerance);
            b.a[0] = 0;
            b.pass = PASS_KEEP;
            b.kept = 0;
            visit(&b, 0);
            if (w->ncontinuity > 0) {
                assert_non_null(tu_stage(s, "continuity"));
                assert_true(tu_stage(s, "continuity")->value == (double)b.kept);
                assert_int_equal(s->continuity.kept, b.kept);
                assert_int_equal(keel_measure_kept(w, s->nurse_of), b.kept);
            } else {
                assert_null(tu_stage(s, "continuity"));
            }
            b.pass = PASS_NEAR;
            visit(&b, 0);
            assert_true(b.near_found);
            long long zones, rooms;
            keel_measure_spread(w, s->nurse_of, &zones, &rooms);
            bool near = false;
            for (size_t p = 0; p < w->npatients; p++)
                near = near || w->zone[p] >= 0 || w->room[p] >= 0;
            if (near) {
                assert_int_equal(s->proximity.zones, b.zones);
                assert_int_equal(s->proximity.rooms, b.rooms);
                assert_int_equal(zones, b.zones);
                assert_int_equal(rooms, b.rooms);
            }
            /* The final plan stays within the tolerance of stages 1 and 2. */
            for (size_t n = 0; n < nn; n++) {
                if (!keel_workload_counted(w, n))
                    continue;
                long long care = 0;
                for (size_t p = 0; p < w->npatients; p++)
                    if (s->nurse_of[p] == (int)n)
                        care += w->care_minutes[p];
                assert_true(care >= b.lo[n] && care <= b.hi[n]);
            }
        }
        keel_solution_free(s);
        free(b.a);
        free(b.plans.load);
        free(b.lo);
        free(b.hi);
        tu_case_free(c);
    }
    /* The generator must exercise both outcomes, and the ranks. */
    print_message("# every stage: %d feasible, %d with ranks\n", feasible, ranked);
    assert_true(ranked > 20);
    assert_true(feasible > 300);
    assert_true(infeasible > 30);
}

/* Stage 5 (fairness forward) against every assignment: with random
 * weights, stages 1-4 reach what the enumeration says, and the history
 * value is the least among the plans that keep every rule, the windows of
 * the tolerance, stage 3's count and stage 4's (census + 1) zones + rooms. */
static void test_history_stage_matches_exhaustive_enumeration(void **state)
{
    (void)state;
    /* Source: exhaustive enumeration of every assignment, as above. */
    uint64_t seed = 1979;
    int checked = 0;
    for (int round = 0; round < 300; round++) {
        tu_case *c = random_rules_case(&seed);
        keel_workload *w = &c->w;
        size_t nn = w->nnurses;
        double *weight = calloc(nn, sizeof *weight);
        for (size_t n = 0; n < nn; n++)
            weight[n] = tu_range(&seed, 30, 110) / 100.0;
        best b = {.w = w, .pass = PASS_BALANCE, .weight = weight};
        b.a = calloc(w->npatients + 1, sizeof *b.a);
        b.lo = calloc(nn, sizeof *b.lo);
        b.hi = calloc(nn, sizeof *b.hi);
        visit(&b, 0);
        if (b.found) {
            ranks_of(&b);
            windows(&b, w->tolerance);
            b.pass = PASS_KEEP;
            visit(&b, 0);
            b.pass = PASS_NEAR;
            visit(&b, 0);
            b.pass = PASS_HISTORY;
            visit(&b, 0);
            assert_true(b.history_found);
            keel_solution *s = NULL;
            keel_error err;
            keel_error_init(&err);
            keel_solve_options opt = {.method = "ilp", .time_limit_ms = 60000, .history = weight};
            assert_int_equal(keel_solve(&c->roster, w, &opt, &s, &err), KEEL_OK);
            keel_error_fini(&err);
            assert_int_equal(s->status, KEEL_SOLVE_OPTIMAL);
            assert_true(keeps_rules(w, s->nurse_of));
            assert_true(tu_stage(s, "peak")->value == keel_ratio_value(b.peak));
            assert_true(tu_ranks_match(&b.ranks, s));
            if (w->ncontinuity > 0)
                assert_true(tu_stage(s, "continuity")->value == (double)b.kept);
            assert_true(tu_stage(s, "proximity")->value == (double)b.zones);
            assert_true(fabs(tu_stage(s, "history")->value - b.history) < 1e-9);
            /* The final plan holds everything the stages before proved. */
            long long zones, rooms, price = (long long)w->npatients + 1;
            keel_measure_spread(w, s->nurse_of, &zones, &rooms);
            assert_true(price * zones + rooms <= price * b.zones + b.rooms);
            assert_true(keel_measure_kept(w, s->nurse_of) >= b.kept);
            memcpy(b.a, s->nurse_of, w->npatients * sizeof *b.a);
            assert_true(inside(&b));
            assert_true(fabs(keel_measure_history(w, s->nurse_of, weight) - b.history) < 1e-9);
            checked++;
            keel_solution_free(s);
        }
        free(weight);
        free(b.a);
        free(b.plans.load);
        free(b.lo);
        free(b.hi);
        tu_case_free(c);
    }
    print_message("# %d of 300 small rosters checked for stage 5\n", checked);
    assert_true(checked > 90);
}

/* Rosters that split by zone (max_zones 1, every patient in a zone, the
 * nurses alike): keel solves stages 1 and 2 zone by zone, and must reach the
 * optima of the enumeration over the whole roster. */
static void test_zone_by_zone_matches_exhaustive_enumeration(void **state)
{
    (void)state;
    /* Source: exhaustive enumeration of every assignment, as above. */
    uint64_t seed = 20261202;
    int split = 0;
    for (int round = 0; round < 400; round++) {
        size_t nn = (size_t)tu_range(&seed, 2, 4), np = (size_t)tu_range(&seed, 2, 8);
        tu_case *c = tu_case_new(nn, np);
        keel_workload *w = &c->w;
        int limit = tu_range(&seed, 2, 4), least = tu_range(&seed, 0, 1);
        long long cap = tu_range(&seed, 0, 1) ? LLONG_MAX : 660 * tu_range(&seed, 5, 10) / 10;
        w->max_zones = 1;
        w->nzones = (size_t)tu_range(&seed, 2, 3);
        for (size_t n = 0; n < nn; n++) {
            w->max_patients[n] = limit;
            w->min_patients[n] = least;
            w->max_care[n] = cap;
        }
        for (size_t p = 0; p < np; p++) {
            w->care_minutes[p] = tu_range(&seed, 1, 14) * 30;
            w->zone[p] = tu_range(&seed, 0, (int)w->nzones - 1);
            w->ratio_limit[p] = tu_range(&seed, 0, 5) == 0 ? 1 : (int)np;
        }
        /* Zones are numbered by the patients who have them, as the workload does. */
        int seen[3] = {-1, -1, -1}, next = 0;
        for (size_t p = 0; p < np; p++) {
            if (seen[w->zone[p]] < 0)
                seen[w->zone[p]] = next++;
            w->zone[p] = seen[w->zone[p]];
        }
        w->nzones = (size_t)next;
        derive(c);
        split += keel_zone_solve_applies(w);
        best b = {.w = w, .pass = PASS_BALANCE};
        b.a = calloc(np + 1, sizeof *b.a);
        b.lo = calloc(nn, sizeof *b.lo);
        b.hi = calloc(nn, sizeof *b.hi);
        visit(&b, 0);
        keel_solution *s = solve(c);
        if (!b.found) {
            assert_int_equal(s->status, KEEL_SOLVE_INFEASIBLE);
        } else {
            assert_int_not_equal(s->status, KEEL_SOLVE_INFEASIBLE);
            assert_true(keeps_rules(w, s->nurse_of));
            assert_int_equal(tu_stage(s, "peak")->status, KEEL_SOLVE_OPTIMAL);
            assert_int_equal(tu_stage(s, "lift")->status, KEEL_SOLVE_OPTIMAL);
            assert_true(tu_stage(s, "peak")->value == keel_ratio_value(b.peak));
            assert_true(tu_stage(s, "lift")->value == keel_ratio_value(b.lift));
        }
        keel_solution_free(s);
        free(b.a);
        free(b.plans.load);
        free(b.lo);
        free(b.hi);
        tu_case_free(c);
    }
    assert_true(split > 200); /* most cases take the zone-by-zone path */
}

/* The least sum of load^2 / capacity over every valid assignment, by
 * enumeration: *least stays negative when there is none. */
static void least_squares(const keel_workload *w, int *a, size_t p, double *least)
{
    if (p < w->npatients) {
        for (size_t n = 0; n < w->nnurses; n++) {
            a[p] = (int)n;
            least_squares(w, a, p + 1, least);
        }
        return;
    }
    if (!keeps_rules(w, a))
        return;
    double sum = 0;
    for (size_t n = 0; n < w->nnurses; n++) {
        if (!keel_workload_counted(w, n))
            continue;
        double load = w->duty_minutes[n];
        for (size_t q = 0; q < w->npatients; q++)
            load += a[q] == (int)n ? w->care_minutes[q] : 0;
        sum += load * load / w->capacity_minutes[n];
    }
    if (*least < 0 || sum < *least)
        *least = sum;
}

/* policy.balance squares: keel's proven least sum of load^2 / capacity is
 * the enumeration's, zone by zone (the dedicated search) or whole (GLPK). */
static void test_squares_match_exhaustive_enumeration(void **state)
{
    (void)state;
    /* Source: exhaustive enumeration of every assignment, as above. */
    uint64_t seed = 4242;
    int by_zone = 0, whole = 0;
    for (int round = 0; round < 300; round++) {
        size_t nn = (size_t)tu_range(&seed, 2, 3), np = (size_t)tu_range(&seed, 2, 7);
        tu_case *c = tu_case_new(nn, np);
        keel_workload *w = &c->w;
        bool zoned = tu_range(&seed, 0, 1);
        int limit = tu_range(&seed, 2, 4), least = tu_range(&seed, 0, 1);
        w->balance = KEEL_BALANCE_SQUARES;
        w->max_zones = zoned ? 1 : KEEL_ABSENT;
        w->nzones = zoned ? 2 : 0;
        for (size_t n = 0; n < nn; n++) {
            w->max_patients[n] = limit;
            w->min_patients[n] = least;
            w->duty_minutes[n] = zoned ? 0 : tu_range(&seed, 0, 2) * 30;
            w->capacity_minutes[n] = zoned ? 660 : tu_range(&seed, 0, 1) ? 420 : 660;
        }
        for (size_t p = 0; p < np; p++) {
            w->care_minutes[p] = tu_range(&seed, 1, 14) * 30;
            w->zone[p] = zoned ? (int)(p % 2) : -1;
        }
        derive(c);
        by_zone += keel_zone_solve_applies(w);
        whole += !zoned;
        int *a = calloc(np + 1, sizeof *a);
        double best = -1;
        least_squares(w, a, 0, &best);
        keel_solution *s = solve(c);
        if (best < 0) {
            assert_int_equal(s->status, KEEL_SOLVE_INFEASIBLE);
        } else {
            assert_true(keeps_rules(w, s->nurse_of));
            assert_string_equal(s->stages[0].name, "squares");
            assert_int_equal(s->stages[0].status, KEEL_SOLVE_OPTIMAL);
            assert_true(fabs(s->stages[0].value - best) <= 1e-9 * (1 + best));
        }
        keel_solution_free(s);
        free(a);
        tu_case_free(c);
    }
    assert_true(by_zone > 50 && whole > 50);
}

/* The bound explanations, on cases worked by hand (the floors of
 * docs/model.md "What sets the bound"). */
static void test_the_bound_is_explained_by_its_reason(void **state)
{
    (void)state;
    /* Four equal patients on two equal nurses: U* = 200/660 = the unit's
     * average 400/1320. */
    tu_case *c = tu_case_new(2, 4);
    for (size_t p = 0; p < 4; p++)
        c->w.care_minutes[p] = 100;
    keel_solution *s = solve(c);
    assert_string_equal(s->bound_reason.kind, "average");
    assert_non_null(strstr(s->bound_reason.text, "over the nurses' 1320 min"));
    keel_solution_free(s);
    tu_case_free(c);

    /* Three chemo patients of 200 min; only N1 of three nurses has chemo:
     * U* = 600/660, the group's floor; the average is only 660/1980. */
    c = tu_case_new(3, 4);
    tu_add_skill(c, 0, "chemo");
    for (size_t p = 0; p < 3; p++) {
        c->w.care_minutes[p] = 200;
        tu_add_need(c, p, "chemo");
    }
    c->w.care_minutes[3] = 60;
    tu_refresh(c);
    s = solve(c);
    assert_string_equal(s->bound_reason.kind, "group");
    assert_non_null(strstr(s->bound_reason.text, "the 3 patients who need chemo"));
    assert_non_null(strstr(s->bound_reason.text, "can only go to N1"));
    keel_solution_free(s);
    tu_case_free(c);

    /* The same three patients, but N2 has chemo too and they are locked to
     * N1: the lock, not the competency, keeps them on N1, and the words say
     * so (a wrong reason once named the competency). */
    c = tu_case_new(3, 4);
    tu_add_skill(c, 0, "chemo");
    tu_add_skill(c, 1, "chemo");
    for (size_t p = 0; p < 3; p++) {
        c->w.care_minutes[p] = 200;
        tu_add_need(c, p, "chemo");
        c->roster.patients[p].lock = true;
    }
    c->w.care_minutes[3] = 60;
    tu_refresh(c);
    for (size_t p = 0; p < 3; p++)
        c->w.eligible[p * 3 + 1] = false; /* locked to N1, as workload.c derives */
    s = solve(c);
    assert_string_equal(s->bound_reason.kind, "group");
    assert_null(strstr(s->bound_reason.text, "need chemo"));
    assert_non_null(strstr(s->bound_reason.text, "the 3 patients locked to N1"));
    keel_solution_free(s);
    tu_case_free(c);

    /* One 600-minute patient and two of 30 on two nurses: U* = 600/660,
     * the patient alone. */
    c = tu_case_new(2, 3);
    c->w.care_minutes[0] = 600;
    c->w.care_minutes[1] = 30;
    c->w.care_minutes[2] = 30;
    s = solve(c);
    assert_string_equal(s->bound_reason.kind, "patient");
    assert_non_null(strstr(s->bound_reason.text, "P1 alone needs 600 min"));
    keel_solution_free(s);
    tu_case_free(c);

    /* Three patients of 300 on two nurses: the average is 900/1320, but
     * whole patients put two on one nurse, 600/660. */
    c = tu_case_new(2, 3);
    for (size_t p = 0; p < 3; p++)
        c->w.care_minutes[p] = 300;
    s = solve(c);
    assert_string_equal(s->bound_reason.kind, "indivisible");
    assert_true(s->stages[0].value == 600.0 / 660.0);
    keel_solution_free(s);
    tu_case_free(c);
}

/* The one rule a diagnosis names, and that relaxing it helps. */
static void assert_diagnosis(tu_case *c, const char *rule)
{
    derive(c);
    keel_solution *s = solve(c);
    assert_int_equal(s->status, KEEL_SOLVE_INFEASIBLE);
    assert_int_equal(s->diagnoses.n, 1);
    assert_string_equal(s->diagnoses.items[0].rule, rule);
    keel_solution_free(s);
}

static void test_each_joining_rule_is_named_when_it_conflicts(void **state)
{
    (void)state;
    /* Isolation: one protective and one infectious patient, one nurse. */
    tu_case *c = tu_case_new(1, 2);
    c->w.care_minutes[0] = c->w.care_minutes[1] = 60;
    c->w.side[0] = KEEL_SIDE_PROTECTIVE;
    c->w.side[1] = KEEL_SIDE_INFECTIOUS;
    assert_diagnosis(c, "isolation");
    tu_case_free(c);

    /* Zones: three zones, two nurses, one zone each. */
    c = tu_case_new(2, 3);
    c->w.nzones = 3;
    c->w.max_zones = 1;
    for (size_t p = 0; p < 3; p++) {
        c->w.care_minutes[p] = 60;
        c->w.zone[p] = (int)p;
    }
    assert_diagnosis(c, "zones");
    tu_case_free(c);

    /* High acuity: three high-acuity patients, one each, two nurses. */
    c = tu_case_new(2, 3);
    c->w.max_high_acuity = 1;
    for (size_t p = 0; p < 3; p++) {
        c->w.care_minutes[p] = 60;
        c->w.high_acuity[p] = true;
    }
    assert_diagnosis(c, "high_acuity");
    tu_case_free(c);

    /* Patient ratio: three 1:1 patients and two nurses. */
    c = tu_case_new(2, 3);
    for (size_t p = 0; p < 3; p++) {
        c->w.care_minutes[p] = 60;
        c->w.ratio_limit[p] = 1;
    }
    assert_diagnosis(c, "patient_ratio");
    tu_case_free(c);

    /* Two rules together: a protective and an infectious patient, each
     * high-acuity at most one per nurse, fit two nurses; a third nurse's
     * zone is closed to them.  Feasible rosters get no diagnosis. */
    c = tu_case_new(2, 2);
    c->w.care_minutes[0] = c->w.care_minutes[1] = 60;
    c->w.side[0] = KEEL_SIDE_PROTECTIVE;
    c->w.side[1] = KEEL_SIDE_INFECTIOUS;
    c->w.max_high_acuity = 1;
    c->w.high_acuity[0] = c->w.high_acuity[1] = true;
    derive(c);
    keel_solution *s = solve(c);
    assert_int_equal(s->status, KEEL_SOLVE_OPTIMAL);
    assert_int_equal(s->diagnoses.n, 0);
    assert_int_not_equal(s->nurse_of[0], s->nurse_of[1]);
    keel_solution_free(s);
    tu_case_free(c);
}

/* ---- Zones on a pooled unit: home zones and zone-by-zone polish ---------- */

/* The three heaviest patients are all in zone 0: heaviest first to the
 * lightest nurse gives each nurse a zone-0 patient and strands zones 1 and
 * 2 (one zone per nurse).  The placement's repairs (chains of ejections,
 * home zones) place every patient, one zone per nurse. */
static void test_placement_recovers_when_heaviest_first_strands_a_zone(void **state)
{
    (void)state;
    tu_case *c = tu_case_new(3, 9);
    keel_workload *w = &c->w;
    static const int care[9] = {400, 390, 380, 100, 90, 80, 70, 60, 50};
    w->max_zones = 1;
    w->nzones = 3;
    for (size_t n = 0; n < 3; n++)
        w->max_patients[n] = 3;
    for (size_t p = 0; p < 9; p++) {
        w->care_minutes[p] = care[p];
        w->zone[p] = (int)p / 3;
    }
    derive(c);
    int nurse_of[9];
    bool placed_all = false;
    assert_int_equal(keel_heur_greedy_place(w, nurse_of, &placed_all), KEEL_OK);
    assert_true(placed_all);
    assert_true(keeps_rules(w, nurse_of));
    for (size_t p = 0; p < 9; p++) /* one nurse per zone */
        assert_int_equal(nurse_of[p], nurse_of[p - p % 3]);
    tu_case_free(c);
}

/* A pooled roster with one zone per nurse and nurses who differ (hours,
 * duty, limits, a skill), with high acuity, ratios and isolation. */
static tu_case *random_pooled_case(uint64_t *seed)
{
    size_t nn = (size_t)tu_range(seed, 2, 4), np = (size_t)tu_range(seed, 2, 8);
    tu_case *c = tu_case_new(nn, np);
    keel_workload *w = &c->w;
    w->max_zones = 1;
    w->nzones = (size_t)tu_range(seed, 2, 3);
    w->max_high_acuity = tu_range(seed, 0, 1) ? 1 : KEEL_ABSENT;
    for (size_t n = 0; n < nn; n++) {
        w->capacity_minutes[n] = tu_range(seed, 0, 2) == 0 ? 420 : 660;
        w->max_patients[n] = tu_range(seed, 1, 4);
        if (tu_range(seed, 0, 2) == 0)
            tu_add_skill(c, n, "chemo");
    }
    for (size_t p = 0; p < np; p++) {
        w->care_minutes[p] = tu_range(seed, 1, 14) * 30;
        w->ratio_limit[p] = tu_range(seed, 0, 5) == 0 ? 2 : (int)np;
        w->high_acuity[p] = w->max_high_acuity != KEEL_ABSENT && tu_range(seed, 0, 3) == 0;
        w->side[p] =
            (signed char)(tu_range(seed, 0, 3) < 3 ? KEEL_SIDE_NONE : tu_range(seed, 1, 2));
        w->zone[p] = tu_range(seed, 0, (int)w->nzones - 1);
        if (tu_range(seed, 0, 4) == 0)
            tu_add_need(c, p, "chemo");
    }
    tu_refresh(c);
    derive(c);
    return c;
}

/* Random pooled rosters with one zone per nurse and nurses who differ
 * (hours, limits, a skill), with high acuity, ratios and isolation: the
 * greedy placement never breaks a rule, and the zone-by-zone polish keeps
 * the rules, never raises the heaviest utilisation and reaches at least
 * the least heaviest utilisation over the assignments that keep each nurse
 * in her zone (trades of nurses between zones can go lower), never below
 * the optimum. */
static void test_zone_polish_reaches_the_best_plan_with_the_zones_kept_or_better(void **state)
{
    (void)state;
    /* Source: exhaustive enumeration of every assignment, as above. */
    uint64_t seed = 77;
    int placed = 0, feasible = 0, traded = 0;
    for (int round = 0; round < 300; round++) {
        tu_case *c = random_pooled_case(&seed);
        keel_workload *w = &c->w;
        size_t nn = w->nnurses, np = w->npatients;
        best whole = {.w = w, .pass = PASS_BALANCE};
        whole.a = calloc(np + 1, sizeof *whole.a);
        visit(&whole, 0);
        int *plan = calloc(np + 1, sizeof *plan);
        bool placed_all = false;
        assert_int_equal(keel_heur_greedy_place(w, plan, &placed_all), KEEL_OK);
        feasible += whole.found;
        placed += placed_all;
        if (placed_all) {
            assert_true(keeps_rules(w, plan));
            assert_int_equal(keel_heur_greedy_improve(w, plan, LLONG_MAX), KEEL_OK);
            keel_ratio before = keel_measure_peak(w, plan);
            int home[4] = {-1, -1, -1, -1};
            for (size_t p = 0; p < np; p++)
                home[plan[p]] = w->zone[p];
            keel_error err;
            keel_error_init(&err);
            assert_int_equal(keel_zone_polish(w, keel_budget_now() + 60000, plan, &err), KEEL_OK);
            keel_error_fini(&err);
            assert_true(keeps_rules(w, plan));
            keel_ratio after = keel_measure_peak(w, plan);
            assert_true(keel_ratio_cmp(after, before) <= 0);
            /* The enumeration with each nurse held to her zone. */
            bool *kept = malloc(np * nn * sizeof *kept);
            memcpy(kept, w->eligible, np * nn * sizeof *kept);
            for (size_t p = 0; p < np; p++)
                for (size_t n = 0; n < nn; n++)
                    w->eligible[p * nn + n] = kept[p * nn + n] && home[n] == w->zone[p];
            best held = {.w = w, .pass = PASS_BALANCE};
            held.a = calloc(np + 1, sizeof *held.a);
            visit(&held, 0);
            memcpy(w->eligible, kept, np * nn * sizeof *kept);
            assert_true(held.found);
            /* At least as good as the best with the split kept (the zones
             * may trade nurses), never below the optimum. */
            assert_true(keel_ratio_cmp(after, held.peak) <= 0);
            assert_true(keel_ratio_cmp(after, whole.peak) >= 0);
            traded += keel_ratio_cmp(after, held.peak) < 0;
            free(held.a);
            free(held.plans.load);
            free(kept);
        }
        free(plan);
        free(whole.a);
        free(whole.plans.load);
        tu_case_free(c);
    }
    print_message("# zone polish: %d of %d feasible rosters placed by the greedy; trades beat "
                  "the split on %d\n",
                  placed, feasible, traded);
    assert_true(placed <= feasible);
    assert_true(placed > feasible / 2);
    assert_true(traded > 0);
}

/* The first assignment of the enumeration's order that keeps every rule
 * (and lies inside b's windows when inside_too). */
static bool first_valid(best *b, size_t p, bool inside_too)
{
    if (p == b->w->npatients)
        return keeps_rules(b->w, b->a) && (!inside_too || inside(b));
    for (size_t n = 0; n < b->w->nnurses; n++) {
        b->a[p] = (int)n;
        if (first_valid(b, p + 1, inside_too))
            return true;
    }
    return false;
}

/* The local search answers only with a plan that keeps every rule and
 * fits the windows, never where no such plan exists, and finds one on
 * most of the questions that have one. */
static void test_local_search_answers_only_with_a_plan_that_fits(void **state)
{
    (void)state;
    /* Source: exhaustive enumeration of every assignment, as above. */
    uint64_t seed = 4242;
    int asked = 0, exists = 0, found = 0;
    for (int round = 0; round < 1500; round++) {
        tu_case *c = random_rules_case(&seed);
        keel_workload *w = &c->w;
        size_t nn = w->nnurses, np = w->npatients;
        best b = {.w = w};
        b.a = calloc(np + 1, sizeof *b.a);
        b.lo = calloc(nn, sizeof *b.lo);
        b.hi = calloc(nn, sizeof *b.hi);
        int *start = calloc(np + 1, sizeof *start), *out = calloc(np + 1, sizeof *out);
        if (first_valid(&b, 0, false)) {
            memcpy(start, b.a, np * sizeof *start);
            long long total = 0;
            for (size_t p = 0; p < np; p++)
                total += w->care_minutes[p];
            long long share = total / (long long)nn;
            for (size_t n = 0; n < nn; n++) { /* windows around an even share */
                b.lo[n] = tu_range(&seed, 0, 1) ? share - tu_range(&seed, 0, (int)share + 1) : 0;
                b.lo[n] = b.lo[n] < 0 ? 0 : b.lo[n];
                b.hi[n] = share + tu_range(&seed, 0, (int)share / 2 + 60);
            }
            keel_answer answer;
            keel_question q = {.w = w, .lo = b.lo, .hi = b.hi, .start = start};
            assert_int_equal(keel_answer_local(&q, keel_budget_now() + 60000, out, &answer, NULL),
                             KEEL_OK);
            assert_true(answer == KEEL_ANSWER_YES || answer == KEEL_ANSWER_UNKNOWN);
            bool any = first_valid(&b, 0, true);
            asked++;
            exists += any;
            if (answer == KEEL_ANSWER_YES) {
                assert_true(any);
                memcpy(b.a, out, np * sizeof *b.a);
                assert_true(keeps_rules(w, b.a));
                assert_true(inside(&b));
                found++;
            }
        }
        free(start);
        free(out);
        free(b.a);
        free(b.plans.load);
        free(b.lo);
        free(b.hi);
        tu_case_free(c);
    }
    print_message("# local search: found %d of %d fitting plans (%d questions)\n", found, exists,
                  asked);
    assert_true(exists > 200 && asked - exists > 200);
    assert_true(found > exists / 2);
}

/* The proximity search (stage 4) keeps every rule, the windows and the
 * patients kept, never ends above its start, never below the optimum, and
 * reaches the optimum on most rosters. */
static void test_proximity_search_keeps_the_rules_and_reaches_the_best(void **state)
{
    (void)state;
    /* Source: exhaustive enumeration of every assignment, as above. */
    uint64_t seed = 8080;
    int asked = 0, improved = 0, reached = 0;
    for (int round = 0; round < 6000; round++) {
        tu_case *c = random_rules_case(&seed);
        keel_workload *w = &c->w;
        size_t nn = w->nnurses, np = w->npatients;
        best b = {.w = w, .pass = PASS_NEAR};
        b.a = calloc(np + 1, sizeof *b.a);
        b.lo = calloc(nn, sizeof *b.lo);
        b.hi = calloc(nn, sizeof *b.hi);
        int *plan = calloc(np + 1, sizeof *plan);
        long long total = 0;
        for (size_t p = 0; p < np; p++)
            total += w->care_minutes[p];
        long long share = total / (long long)nn;
        for (size_t n = 0; n < nn; n++) { /* windows around an even share */
            b.lo[n] = share - tu_range(&seed, 0, (int)share + 1);
            b.lo[n] = b.lo[n] < 0 ? 0 : b.lo[n];
            b.hi[n] = share + tu_range(&seed, 0, (int)share / 2 + 60);
        }
        if (np > 0 && first_valid(&b, 0, true)) {
            memcpy(plan, b.a, np * sizeof *plan);
            b.kept = tu_range(&seed, 0, (int)keel_measure_kept(w, plan));
            long long zones, rooms, start_zones, start_rooms;
            keel_measure_spread(w, plan, &start_zones, &start_rooms);
            visit(&b, 0);
            assert_true(b.near_found);
            assert_int_equal(
                keel_heur_near(w, b.lo, b.hi, b.kept, 0, keel_budget_now() + 60000, plan), KEEL_OK);
            memcpy(b.a, plan, np * sizeof *b.a);
            assert_true(keeps_rules(w, b.a));
            assert_true(inside(&b));
            assert_true(keel_measure_kept(w, plan) >= b.kept);
            keel_measure_spread(w, plan, &zones, &rooms);
            long long weight = (long long)np + 1;
            long long cost = weight * zones + rooms, optimum = weight * b.zones + b.rooms;
            assert_true(cost <= weight * start_zones + start_rooms);
            assert_true(cost >= optimum);
            asked++;
            improved += cost < weight * start_zones + start_rooms;
            reached += cost == optimum;
        }
        free(plan);
        free(b.a);
        free(b.plans.load);
        free(b.lo);
        free(b.hi);
        tu_case_free(c);
    }
    print_message("# proximity search: at the optimum on %d of %d rosters (%d improved)\n", reached,
                  asked, improved);
    assert_true(asked > 300 && improved > 50);
    assert_true(reached > asked * 9 / 10);
}

/* The zone-split floor never rules out the optimum, and the exact method
 * with it still proves the optimum of the enumeration; on some rosters it
 * rules out values above the simple floors. */
static void test_zone_split_floor_never_passes_the_optimum(void **state)
{
    (void)state;
    /* Source: exhaustive enumeration of every assignment, as above. */
    uint64_t seed = 515;
    int feasible = 0, bites = 0;
    for (int round = 0; round < 400; round++) {
        tu_case *c = random_pooled_case(&seed);
        keel_workload *w = &c->w;
        for (size_t n = 0; n < w->nnurses; n++) /* some charge-like duty */
            w->duty_minutes[n] = tu_range(&seed, 0, 3) == 0 ? tu_range(&seed, 1, 12) * 10 : 0;
        best whole = {.w = w, .pass = PASS_BALANCE};
        whole.a = calloc(w->npatients + 1, sizeof *whole.a);
        visit(&whole, 0);
        if (whole.found) {
            feasible++;
            bool possible = false;
            assert_true(keel_measure_one_zone_each(w));
            assert_int_equal(keel_bound_split_possible(w, whole.peak, &possible), KEEL_OK);
            assert_true(possible);
            keel_ratio simple = keel_bound_simple_peak(w);
            if (keel_ratio_cmp(simple, whole.peak) < 0) {
                assert_int_equal(keel_bound_split_possible(w, simple, &possible), KEEL_OK);
                bites += !possible;
            }
            keel_solution *s = solve(c);
            assert_int_equal(s->stages[0].status, KEEL_SOLVE_OPTIMAL);
            assert_true(s->stages[0].value == keel_ratio_value(whole.peak));
            keel_solution_free(s);
        }
        free(whole.a);
        free(whole.plans.load);
        tu_case_free(c);
    }
    print_message("# zone split: rules out the simple floor on %d of %d feasible rosters\n", bites,
                  feasible);
    assert_true(feasible > 150);
    assert_true(bites > 0);
}

/* ---- The table of rules ------------------------------------------------ */

/* Every rule of the table has every part its scope needs, and a rule's
 * name finds it: adding a rule without its test, words or rows fails here. */
static void test_every_rule_has_every_part(void **state)
{
    (void)state;
    for (size_t i = 0; i < KEEL_NRULES; i++) {
        const keel_rule *rule = keel_rules[i];
        assert_non_null(rule);
        assert_non_null(rule->name);
        assert_ptr_equal(keelRuleFind(rule->name), rule);
        bool joins = rule->scope == KEEL_SCOPE_MOMENT || rule->scope == KEEL_SCOPE_SHIFT ||
                     rule->scope == KEEL_SCOPE_UNIT;
        switch (rule->scope) {
        case KEEL_SCOPE_PAIR:
            assert_non_null(rule->check);
            assert_non_null(rule->pair_breaks);
            assert_true(rule->severity > 0);
            break;
        case KEEL_SCOPE_MOMENT:
        case KEEL_SCOPE_SHIFT:
        case KEEL_SCOPE_UNIT:
            assert_non_null(rule->check);
            assert_non_null(rule->rows);
            assert_true(rule->breaks || rule->whole); /* the tally's test */
            assert_true(rule->severity > 0);
            break;
        case KEEL_SCOPE_CLOCK:
            assert_non_null(rule->breaks);
            assert_non_null(rule->check);
            assert_non_null(rule->rows);
            assert_non_null(rule->binds);
            break;
        case KEEL_SCOPE_NAME:
            assert_null(rule->check);
            break;
        }
        /* A joining rule that can be switched on can be relaxed and named
         * by the diagnosis (the patient limit is Hall's, feas_hall.c). */
        if (joins && rule->binds) {
            assert_non_null(rule->relax);
            assert_non_null(rule->say);
            assert_non_null(rule->conflict);
        }
    }
    /* The design's list of rule names, each once. */
    const char *names[] = {"skill",      "patient_limit", "patient_ratio", "law_limit",
                           "high_acuity", "isolation",    "zones",         "lock",
                           "avoid",       "capacity",     "min_patients",  "moment_limit",
                           "break_cover", "hand_off",     "role_acuity"};
    assert_int_equal(sizeof names / sizeof *names, KEEL_NRULES);
    for (size_t i = 0; i < KEEL_NRULES; i++)
        assert_non_null(keelRuleFind(names[i]));
}

/* The rows of every rule over one nurse's patients, each column fixed at 1:
 * the smallest total weight of breaking (soft), or whether they can be kept
 * (hard; 0 kept, 1 not). */
static double rows_verdict(const keel_workload *w, const int *a, size_t n, bool soft)
{
    keel_lp *lp = keel_lp_new(false);
    int col[16];
    size_t part[16];
    double most[16];
    size_t k = 0;
    for (size_t p = 0; p < w->npatients; p++) {
        if (a[p] != (int)n)
            continue;
        col[k] = keel_lp_col(lp, KEEL_LP_INTEGER, 1.0, 1.0, 0.0);
        part[k] = p;
        most[k] = 1.0;
        k++;
    }
    keel_rows R = {.lp = lp, .w = w, .n = n, .moment = -1, .ncols = k, .col = col,
                   .part = part, .most = most, .soft = soft,
                   .census = (double)w->npatients};
    keelRuleRows(&R, KEEL_SCOPE_MOMENT);
    keelRuleRows(&R, KEEL_SCOPE_SHIFT);
    keelRuleRows(&R, KEEL_SCOPE_CLOCK);
    keel_lp_result res;
    keel_error err;
    keel_error_init(&err);
    assert_int_equal(keel_lp_solve(lp, 60000, NULL, &res, &err), KEEL_OK);
    keel_error_fini(&err);
    keel_lp_free(lp);
    if (!soft)
        return res.outcome == KEEL_LP_INFEASIBLE ? 1.0 : 0.0;
    assert_int_equal(res.outcome, KEEL_LP_OPTIMAL);
    return res.value;
}

/* Each rule's parts say the same of every plan: the rules by their
 * definitions (keeps_rules() above), the tally's tests, the plan check,
 * the kept rows and the weighed rows, on random plans of small random
 * rosters with every rule. */
static void test_each_rules_parts_agree_on_every_plan(void **state)
{
    (void)state;
    uint64_t seed = 4242;
    int plans = 0, broken = 0;
    for (int round = 0; round < 250; round++) {
        tu_case *c = random_rules_case(&seed);
        keel_workload *w = &c->w;
        size_t np = w->npatients, nn = w->nnurses;
        for (size_t p = 0; p < np; p++)
            c->roster.patients[p].ratio =
                w->ratio_limit[p] < (int)np ? w->ratio_limit[p] : KEEL_ABSENT;
        int *a = calloc(np + 1, sizeof *a);
        for (int trial = 0; trial < 12; trial++) {
            bool placed = true;
            for (size_t p = 0; p < np && placed; p++) {
                size_t eligible[8], ne = 0;
                for (size_t n = 0; n < nn; n++)
                    if (keel_workload_eligible(w, p, n))
                        eligible[ne++] = n;
                placed = ne > 0;
                if (placed)
                    a[p] = (int)eligible[tu_range(&seed, 0, (int)ne - 1)];
            }
            if (!placed)
                break;
            bool keeps = keeps_rules(w, a), valid = false;
            assert_int_equal(keel_measure_validate(w, a, &valid), KEEL_OK);
            assert_int_equal(valid, keeps);
            keel_findings found = {0};
            keel_error err;
            keel_error_init(&err);
            assert_int_equal(keel_plan_check(&c->roster, w, a, &found, &err), KEEL_OK);
            keel_error_fini(&err);
            assert_int_equal(found.n == 0, keeps);
            keel_findings_fini(&found);
            double hard = 0, soft = 0;
            for (size_t n = 0; n < nn; n++) {
                if (!keel_workload_counted(w, n))
                    continue;
                hard += rows_verdict(w, a, n, false);
                soft += rows_verdict(w, a, n, true);
            }
            assert_int_equal(hard == 0, keeps);
            assert_int_equal(soft < 0.5, keeps);
            plans++;
            broken += !keeps;
        }
        free(a);
        tu_case_free(c);
    }
    print_message("# rule parts: %d plans, %d breaking a rule\n", plans, broken);
    assert_true(broken > plans / 5 && broken < plans - plans / 5);
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(test_every_stage_matches_exhaustive_enumeration),
        cmocka_unit_test(test_history_stage_matches_exhaustive_enumeration),
        cmocka_unit_test(test_zone_by_zone_matches_exhaustive_enumeration),
        cmocka_unit_test(test_squares_match_exhaustive_enumeration),
        cmocka_unit_test(test_the_bound_is_explained_by_its_reason),
        cmocka_unit_test(test_each_joining_rule_is_named_when_it_conflicts),
        cmocka_unit_test(test_placement_recovers_when_heaviest_first_strands_a_zone),
        cmocka_unit_test(test_zone_polish_reaches_the_best_plan_with_the_zones_kept_or_better),
        cmocka_unit_test(test_local_search_answers_only_with_a_plan_that_fits),
        cmocka_unit_test(test_zone_split_floor_never_passes_the_optimum),
        cmocka_unit_test(test_proximity_search_keeps_the_rules_and_reaches_the_best),
        cmocka_unit_test(test_every_rule_has_every_part),
        cmocka_unit_test(test_each_rules_parts_agree_on_every_plan),
    };
    return cmocka_run_group_tests_name("rules", tests, NULL, NULL);
}
