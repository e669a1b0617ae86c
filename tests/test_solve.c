/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * test_solve.c - the solver against things no one here wrote: Graham's
 * worst case for LPT, and exhaustive enumeration of every assignment on
 * small random rosters (the peak, the ranks beyond it, the lift, fairness
 * forward).
 */
#include <math.h>
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>

#include <cmocka.h>

#include "solve/answer.h"
#include "solve/bound.h"
#include "solve/budget.h"
#include "solve/heur.h"
#include "solve/measure.h"
#include "testutil.h"
#include "tu_ranks.h"

static keel_solution *solve(tu_case *c, const char *method)
{
    keel_solve_options opt = {.method = method, .time_limit_ms = 20000};
    keel_solution *s = NULL;
    keel_error err;
    keel_error_init(&err);
    assert_int_equal(keel_solve(&c->roster, &c->w, &opt, &s, &err), KEEL_OK);
    keel_error_fini(&err);
    return s;
}

/* Graham's family: m identical machines, 2m+1 jobs 2m-1, 2m-1, 2m-2, 2m-2,
 * ..., m+1, m+1, m, m, m.  The optimum makespan is 3m; LPT gives 4m-1,
 * exactly (4/3 - 1/(3m)) times the optimum.
 * Source: R. L. Graham, "Bounds on multiprocessing timing anomalies",
 * SIAM J. Appl. Math. 17(2), 1969 (the tight example for LPT). */
static tu_case *graham_case(int m)
{
    tu_case *c = tu_case_new((size_t)m, (size_t)(2 * m + 1));
    size_t p = 0;
    for (int len = 2 * m - 1; len > m; len--) {
        c->w.care_minutes[p++] = len;
        c->w.care_minutes[p++] = len;
    }
    c->w.care_minutes[p++] = m;
    c->w.care_minutes[p++] = m;
    c->w.care_minutes[p++] = m;
    for (int n = 0; n < m; n++)
        c->w.capacity_minutes[n] = 1000;
    return c;
}

static void test_plain_lpt_hits_grahams_worst_case(void **state)
{
    (void)state;
    for (int m = 2; m <= 6; m++) {
        tu_case *c = graham_case(m);
        int *nurse_of = calloc(c->w.npatients, sizeof *nurse_of);
        bool placed_all = false;
        assert_int_equal(keel_heur_greedy_place(&c->w, nurse_of, &placed_all), KEEL_OK);
        assert_true(placed_all);
        keel_ratio peak = keel_measure_peak(&c->w, nurse_of);
        assert_int_equal(peak.num, 4 * m - 1);
        free(nurse_of);
        tu_case_free(c);
    }
}

static void test_ilp_reaches_grahams_optimum(void **state)
{
    (void)state;
    for (int m = 2; m <= 6; m++) {
        tu_case *c = graham_case(m);
        keel_solution *s = solve(c, "ilp");
        assert_int_equal(s->status, KEEL_SOLVE_OPTIMAL);
        keel_ratio peak = keel_measure_peak(&c->w, s->nurse_of);
        assert_int_equal(peak.num, 3 * m);
        assert_int_equal(peak.den, 1000);
        keel_solution_free(s);
        tu_case_free(c);
    }
}

static void test_greedy_is_never_worse_than_the_lpt_bound(void **state)
{
    (void)state;
    uint64_t seed = 17;
    for (int round = 0; round < 60; round++) {
        int m = tu_range(&seed, 2, 6);
        int jobs = tu_range(&seed, m + 1, 3 * m + 2);
        tu_case *c = tu_case_new((size_t)m, (size_t)jobs);
        for (int p = 0; p < jobs; p++)
            c->w.care_minutes[p] = tu_range(&seed, 10, 400);
        keel_solution *g = solve(c, "greedy");
        keel_solution *x = solve(c, "ilp");
        assert_int_equal(x->status, KEEL_SOLVE_OPTIMAL);
        double greedy = keel_ratio_value(keel_measure_peak(&c->w, g->nurse_of));
        double best = keel_ratio_value(keel_measure_peak(&c->w, x->nurse_of));
        /* Source: Graham 1969, LPT <= (4/3 - 1/(3m)) OPT on identical machines. */
        assert_true(greedy <= (4.0 / 3.0 - 1.0 / (3.0 * m)) * best + 1e-12);
        assert_true(best <= greedy + 1e-12);
        keel_solution_free(g);
        keel_solution_free(x);
        tu_case_free(c);
    }
}

/* ---- Exhaustive enumeration ------------------------------------------------ */

typedef struct enumeration {
    const keel_workload *w;
    int *nurse_of;
    int *count;
    long long *load;
    bool found;
    keel_ratio best_peak;
    keel_ratio best_lift; /* with the ranks held (ranks_by_enumeration()) */
    tu_plans plans;       /* every valid plan's loads, for the ranks */
    tu_ranks ranks;
    /* Fairness forward: with weight, the least history value among the
     * plans whose counted nurses keep the windows lo..hi of care. */
    const double *weight;
    const long long *lo, *hi;
    bool in_windows;
    double best_history;
} enumeration;

/* A complete plan, for stage 5: inside the windows, its weighted sum. */
static void visit_history(enumeration *e)
{
    const keel_workload *w = e->w;
    double sum = 0;
    for (size_t n = 0; n < w->nnurses; n++) {
        if (!keel_workload_counted(w, n))
            continue;
        long long care = e->load[n] - w->duty_minutes[n];
        if (care < e->lo[n] || care > e->hi[n])
            return;
        sum += e->weight[n] * (double)e->load[n] / w->capacity_minutes[n];
    }
    if (!e->in_windows || sum < e->best_history)
        e->best_history = sum;
    e->in_windows = true;
}

static void visit(enumeration *e, size_t p)
{
    const keel_workload *w = e->w;
    if (p == w->npatients && e->weight) {
        visit_history(e);
        return;
    }
    if (p == w->npatients) {
        e->plans.nnurses = w->nnurses;
        tu_plans_add(&e->plans, e->load);
        e->found = true;
        return;
    }
    for (size_t n = 0; n < w->nnurses; n++) {
        if (!keel_workload_eligible(w, p, n) || e->count[n] >= w->max_patients[n])
            continue;
        e->count[n]++;
        e->load[n] += w->care_minutes[p];
        visit(e, p + 1);
        e->count[n]--;
        e->load[n] -= w->care_minutes[p];
    }
}

/* The ranks over the enumerated plans (tu_ranks.h). */
static void ranks_by_enumeration(enumeration *e)
{
    const keel_workload *w = e->w;
    bool counted[TU_RANKS_MAX];
    for (size_t n = 0; n < w->nnurses; n++)
        counted[n] = keel_workload_counted(w, n);
    tu_ranks_compute(&e->plans, w->capacity_minutes, counted, &e->ranks);
    e->best_peak = e->ranks.peak;
    e->best_lift = e->ranks.lift;
}

static tu_case *random_small_case(uint64_t *seed)
{
    static const char *skills[] = {"tele", "chemo"};
    size_t nn = (size_t)tu_range(seed, 1, 4), np = (size_t)tu_range(seed, 0, 9);
    tu_case *c = tu_case_new(nn, np);
    for (size_t n = 0; n < nn; n++) {
        c->w.capacity_minutes[n] = tu_range(seed, 0, 2) == 0 ? 420 : 660;
        c->w.duty_minutes[n] = tu_range(seed, 0, 3) == 0 ? tu_range(seed, 1, 12) * 10 : 0;
        int kind = tu_range(seed, 0, 9);
        c->w.max_patients[n] = kind < 3 ? (int)np : kind == 9 ? 0 : tu_range(seed, 1, 4);
        for (size_t k = 0; k < 2; k++)
            if (tu_range(seed, 0, 9) < 6)
                tu_add_skill(c, n, skills[k]);
    }
    for (size_t p = 0; p < np; p++) {
        c->w.care_minutes[p] =
            tu_range(seed, 0, 1) ? tu_range(seed, 1, 14) * 30 : tu_range(seed, 20, 400);
        for (size_t k = 0; k < 2; k++)
            if (tu_range(seed, 0, 9) < 2)
                tu_add_need(c, p, skills[k]);
    }
    tu_refresh(c);
    return c;
}

static void test_ilp_matches_exhaustive_enumeration_on_small_rosters(void **state)
{
    (void)state;
    /* Source: exhaustive enumeration of every assignment; the ranks by
     * tu_ranks.h. */
    uint64_t seed = 2026;
    int feasible = 0, ranked = 0;
    for (int round = 0; round < 1000; round++) {
        tu_case *c = random_small_case(&seed);
        enumeration e = {.w = &c->w};
        e.count = calloc(c->w.nnurses, sizeof *e.count);
        e.load = calloc(c->w.nnurses, sizeof *e.load);
        for (size_t n = 0; n < c->w.nnurses; n++)
            e.load[n] = c->w.duty_minutes[n];
        visit(&e, 0);
        if (e.found)
            ranks_by_enumeration(&e);
        keel_solution *s = solve(c, "ilp");
        if (!e.found) {
            assert_int_equal(s->status, KEEL_SOLVE_INFEASIBLE);
            assert_true(s->diagnoses.n > 0);
        } else {
            feasible++;
            assert_int_equal(s->status, KEEL_SOLVE_OPTIMAL);
            assert_int_equal(s->diagnoses.n, 0);
            assert_int_equal(keel_ratio_cmp(keel_measure_peak(&c->w, s->nurse_of), e.best_peak), 0);
            assert_int_equal(keel_ratio_cmp(keel_measure_lift(&c->w, s->nurse_of), e.best_lift), 0);
            assert_true(s->stages[0].value == keel_ratio_value(e.best_peak));
            assert_true(s->stages[0].bound == s->stages[0].value);
            assert_true(tu_ranks_match(&e.ranks, s));
            ranked += s->nranks > 0;
            /* No later stage: the plan keeps every nurse's level. */
            for (size_t n = 0; n < c->w.nnurses; n++)
                if (keel_workload_counted(&c->w, n))
                    assert_true(keel_ratio_cmp(keel_measure_utilisation(&c->w, s->nurse_of, n),
                                               e.ranks.level[n]) <= 0);
            /* Every patient once, eligible, limits kept. */
            int *count = calloc(c->w.nnurses, sizeof *count);
            for (size_t p = 0; p < c->w.npatients; p++) {
                int n = s->nurse_of[p];
                assert_true(n >= 0 && keel_workload_eligible(&c->w, p, (size_t)n));
                count[n]++;
            }
            for (size_t n = 0; n < c->w.nnurses; n++)
                assert_true(count[n] <= c->w.max_patients[n]);
            free(count);
        }
        keel_solution_free(s);
        free(e.count);
        free(e.load);
        free(e.plans.load);
        tu_case_free(c);
    }
    /* The generator must exercise both outcomes, mostly feasible ones, and
     * the ranks. */
    print_message("# %d of 1000 small rosters feasible, %d with ranks\n", feasible, ranked);
    assert_true(ranked >= 20);
    assert_true(feasible >= 600);
    assert_true(feasible < 1000);
}

/* ---- The two answerers of one question ------------------------------------- */

/* Checks that nurse_of answers the window question: every patient one
 * eligible nurse, limits kept, each counted nurse's care inside its window. */
static void assert_fits(const keel_workload *w, const int *nurse_of, const long long *lo,
                        const long long *hi)
{
    long long care[8] = {0};
    int count[8] = {0};
    for (size_t p = 0; p < w->npatients; p++) {
        int n = nurse_of[p];
        assert_true(n >= 0 && keel_workload_eligible(w, p, (size_t)n));
        care[n] += w->care_minutes[p];
        count[n]++;
    }
    for (size_t n = 0; n < w->nnurses; n++) {
        assert_true(count[n] <= w->max_patients[n]);
        if (keel_workload_counted(w, n))
            assert_true(care[n] >= lo[n] && care[n] <= hi[n]);
    }
}

/* The two answerers must agree; the dedicated search is exhaustive on these
 * sizes.  This test caught GLPK 5.0's MIP preprocessor accepting a point
 * outside a double-bounded row (one patient of 158 minutes, windows 45..148
 * and 0..183), which is why lp.c runs without it. */
static void test_glpk_and_the_dedicated_search_agree_on_every_question(void **state)
{
    (void)state;
    uint64_t seed = 99;
    int yes = 0, no = 0;
    for (int round = 0; round < 400; round++) {
        tu_case *c = random_small_case(&seed);
        long long lo[8], hi[8], total = 0;
        for (size_t p = 0; p < c->w.npatients; p++)
            total += c->w.care_minutes[p];
        long long share = c->w.nnurses ? total / (long long)c->w.nnurses : 0;
        for (size_t n = 0; n < c->w.nnurses; n++) {
            /* Windows around an even share, some tight, some loose. */
            lo[n] = tu_range(&seed, 0, 1) ? share - tu_range(&seed, 0, (int)share + 1) : 0;
            lo[n] = lo[n] < 0 ? 0 : lo[n];
            hi[n] = share + tu_range(&seed, 0, (int)share + 60);
        }
        int *a = calloc(c->w.npatients + 1, sizeof *a), *b = calloc(c->w.npatients + 1, sizeof *b);
        keel_answer by_search, by_glpk;
        keel_question q = {.w = &c->w, .lo = lo, .hi = hi, .nodes = 100000000L};
        assert_int_equal(keel_answer_fit(&q, 0, a, &by_search, NULL), KEEL_OK);
        assert_int_equal(keel_answer_ilp(&q, keel_budget_now() + 60000, b, &by_glpk, NULL),
                         KEEL_OK);
        assert_int_not_equal(by_search, KEEL_ANSWER_UNKNOWN);
        assert_int_equal(by_search, by_glpk);
        if (by_glpk == KEEL_ANSWER_YES) {
            assert_fits(&c->w, a, lo, hi);
            assert_fits(&c->w, b, lo, hi);
            yes++;
        } else {
            no++;
        }
        free(a);
        free(b);
        tu_case_free(c);
    }
    /* Both answers must be exercised. */
    assert_true(yes >= 50);
    assert_true(no >= 50);
}

/* ---- Diagnoses ------------------------------------------------------------- */

static void test_diagnosis_names_a_skill_nobody_has(void **state)
{
    (void)state;
    tu_case *c = tu_case_new(3, 5);
    for (size_t p = 0; p < 5; p++)
        c->w.care_minutes[p] = 120;
    tu_add_need(c, 1, "chemo");
    tu_add_need(c, 3, "chemo");
    tu_add_skill(c, 0, "tele");
    tu_refresh(c);
    keel_solution *s = solve(c, "ilp");
    assert_int_equal(s->status, KEEL_SOLVE_INFEASIBLE);
    assert_int_equal(s->diagnoses.n, 1);
    assert_string_equal(s->diagnoses.items[0].rule, "skill");
    assert_int_equal(s->diagnoses.items[0].npatients, 2);
    assert_non_null(strstr(s->diagnoses.items[0].message, "2 patients (P2 and P4) need chemo"));
    assert_non_null(strstr(s->diagnoses.items[0].message, "no nurse on shift"));
    keel_solution_free(s);
    tu_case_free(c);
}

static void test_diagnosis_counts_the_places_a_skill_group_lacks(void **state)
{
    (void)state;
    tu_case *c = tu_case_new(3, 6);
    for (size_t p = 0; p < 6; p++)
        c->w.care_minutes[p] = 120;
    for (size_t p = 0; p < 3; p++)
        tu_add_need(c, p, "chemo");
    tu_add_skill(c, 2, "chemo");
    c->w.max_patients[2] = 2;
    tu_refresh(c);
    keel_solution *s = solve(c, "ilp");
    assert_int_equal(s->status, KEEL_SOLVE_INFEASIBLE);
    assert_int_equal(s->diagnoses.n, 1);
    assert_string_equal(s->diagnoses.items[0].rule, "patient_limit");
    assert_int_equal(s->diagnoses.items[0].nnurses, 1);
    assert_int_equal(s->diagnoses.items[0].nurses[0], 2);
    assert_int_equal(s->diagnoses.items[0].npatients, 3);
    assert_non_null(strstr(s->diagnoses.items[0].message, "1 more place is needed"));
    keel_solution_free(s);
    tu_case_free(c);
}

static void test_diagnosis_says_when_the_census_exceeds_every_limit(void **state)
{
    (void)state;
    tu_case *c = tu_case_new(2, 7);
    for (size_t n = 0; n < 2; n++)
        c->w.max_patients[n] = 3;
    tu_refresh(c);
    keel_solution *s = solve(c, "greedy");
    assert_int_equal(s->status, KEEL_SOLVE_INFEASIBLE);
    assert_int_equal(s->diagnoses.n, 1);
    assert_string_equal(s->diagnoses.items[0].rule, "patient_limit");
    assert_non_null(strstr(s->diagnoses.items[0].message, "may take 6 in all"));
    keel_solution_free(s);
    tu_case_free(c);
}

static void test_greedy_recovers_when_placement_gets_stuck_on_limits(void **state)
{
    (void)state;
    /* The heaviest patient lands on the only nurse the chemo patient can
     * have; placement then gives her to the other nurse (a chain of one
     * ejection), so the chemo patient gets the chemo nurse. */
    tu_case *c = tu_case_new(2, 2);
    c->w.care_minutes[0] = 300;
    c->w.care_minutes[1] = 100;
    c->w.max_patients[0] = 1;
    c->w.max_patients[1] = 1;
    c->w.capacity_minutes[0] = 700;
    tu_add_skill(c, 0, "chemo");
    tu_add_need(c, 1, "chemo");
    tu_refresh(c);
    int nurse_of[2];
    bool placed_all = false;
    assert_int_equal(keel_heur_greedy_place(&c->w, nurse_of, &placed_all), KEEL_OK);
    assert_true(placed_all);
    assert_int_equal(nurse_of[0], 1);
    assert_int_equal(nurse_of[1], 0);
    keel_solution *s = solve(c, "greedy");
    assert_int_equal(s->nurse_of[0], 1);
    assert_int_equal(s->nurse_of[1], 0);
    keel_solution_free(s);
    tu_case_free(c);
}

static void test_unknown_method_is_a_usage_error(void **state)
{
    (void)state;
    tu_case *c = tu_case_new(1, 1);
    keel_solve_options opt = {.method = "magic"};
    keel_solution *s = NULL;
    keel_error err;
    keel_error_init(&err);
    assert_int_equal(keel_solve(&c->roster, &c->w, &opt, &s, &err), KEEL_ERR_USAGE);
    assert_null(s);
    assert_int_equal(err.nproblems, 1);
    keel_error_fini(&err);
    tu_case_free(c);
}

/* Stage 5 (fairness forward) against every plan: stages 1-2 and the ranks
 * as without a history, and the history value the least among the plans
 * inside the windows of the balance tolerance around the enumerated
 * levels (the peak, or each nurse's rank) and L*. */
static void test_history_stage_matches_exhaustive_enumeration(void **state)
{
    (void)state;
    uint64_t seed = 4711;
    int checked = 0;
    for (int round = 0; round < 400; round++) {
        tu_case *c = random_small_case(&seed);
        size_t nn = c->w.nnurses;
        double *weight = calloc(nn, sizeof *weight);
        for (size_t n = 0; n < nn; n++)
            weight[n] = tu_range(&seed, 30, 110) / 100.0;
        enumeration e = {.w = &c->w};
        e.count = calloc(nn, sizeof *e.count);
        e.load = calloc(nn, sizeof *e.load);
        for (size_t n = 0; n < nn; n++)
            e.load[n] = c->w.duty_minutes[n];
        visit(&e, 0);
        if (!e.found) {
            free(weight);
            free(e.count);
            free(e.load);
            tu_case_free(c);
            continue;
        }
        ranks_by_enumeration(&e);
        long long *lo = calloc(nn, sizeof *lo), *hi = calloc(nn, sizeof *hi);
        keel_measure_windows(&c->w, e.ranks.level, e.best_lift, c->w.tolerance, lo, hi);
        e.weight = weight;
        e.lo = lo;
        e.hi = hi;
        visit(&e, 0);
        assert_true(e.in_windows); /* the balance optimum itself is inside */
        keel_solve_options opt = {.method = "ilp", .time_limit_ms = 20000, .history = weight};
        keel_solution *s = NULL;
        keel_error err;
        keel_error_init(&err);
        assert_int_equal(keel_solve(&c->roster, &c->w, &opt, &s, &err), KEEL_OK);
        keel_error_fini(&err);
        assert_int_equal(s->status, KEEL_SOLVE_OPTIMAL);
        assert_int_equal(s->nstages, 3 + (e.ranks.nranks > 0));
        assert_true(s->stages[0].value == keel_ratio_value(e.best_peak));
        assert_true(tu_ranks_match(&e.ranks, s));
        assert_string_equal(s->stages[s->nstages - 1].name, "history");
        assert_true(fabs(s->stages[s->nstages - 1].value - e.best_history) < 1e-9);
        assert_true(fabs(keel_measure_history(&c->w, s->nurse_of, weight) - e.best_history) < 1e-9);
        assert_fits(&c->w, s->nurse_of, lo, hi);
        checked++;
        keel_solution_free(s);
        free(lo);
        free(hi);
        free(weight);
        free(e.count);
        free(e.load);
        free(e.plans.load);
        tu_case_free(c);
    }
    print_message("# %d of 400 small rosters checked for stage 5\n", checked);
    assert_true(checked >= 200);
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(test_plain_lpt_hits_grahams_worst_case),
        cmocka_unit_test(test_ilp_reaches_grahams_optimum),
        cmocka_unit_test(test_greedy_is_never_worse_than_the_lpt_bound),
        cmocka_unit_test(test_ilp_matches_exhaustive_enumeration_on_small_rosters),
        cmocka_unit_test(test_history_stage_matches_exhaustive_enumeration),
        cmocka_unit_test(test_glpk_and_the_dedicated_search_agree_on_every_question),
        cmocka_unit_test(test_diagnosis_names_a_skill_nobody_has),
        cmocka_unit_test(test_diagnosis_counts_the_places_a_skill_group_lacks),
        cmocka_unit_test(test_diagnosis_says_when_the_census_exceeds_every_limit),
        cmocka_unit_test(test_greedy_recovers_when_placement_gets_stuck_on_limits),
        cmocka_unit_test(test_unknown_method_is_a_usage_error),
    };
    return cmocka_run_group_tests_name("solve", tests, NULL, NULL);
}
