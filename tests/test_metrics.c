/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * test_metrics.c - loads, utilisations and the imbalance indices against
 * their published definitions on vectors whose values are known by hand.
 */
#include <math.h>
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>

#include <cmocka.h>

#include "testutil.h"
#include "workload_internal.h"

/* One patient per nurse with the given care minutes, capacity 600 each, so
 * utilisation n = care[n] / 600. */
static keel_metrics *metrics_of(const int *care, size_t k, tu_case **out)
{
    tu_case *c = tu_case_new(k, k);
    int *nurse_of = calloc(k, sizeof *nurse_of);
    for (size_t i = 0; i < k; i++) {
        c->w.capacity_minutes[i] = 600;
        c->w.care_minutes[i] = care[i];
        nurse_of[i] = (int)i;
    }
    keel_metrics *m = NULL;
    assert_int_equal(keel_metrics_compute(&c->w, nurse_of, &m, NULL), KEEL_OK);
    free(nurse_of);
    *out = c;
    return m;
}

static void test_even_loads_score_perfect_fairness(void **state)
{
    (void)state;
    int care[] = {300, 300, 300, 300};
    tu_case *c;
    keel_metrics *m = metrics_of(care, 4, &c);
    /* Source: Jain, Chiu, Hawe, DEC-TR-301, 1984: J = 1 for equal shares;
     * Gini coefficient (standard definition): G = 0 for equal shares. */
    assert_true(fabs(m->jain - 1.0) < 1e-12);
    assert_true(fabs(m->gini) < 1e-12);
    assert_true(fabs(m->cv) < 1e-12);
    assert_true(fabs(m->spread) < 1e-12);
    assert_true(fabs(m->peak_to_mean - 1.0) < 1e-12);
    keel_metrics_free(m);
    tu_case_free(c);
}

static void test_one_nurse_with_all_the_work_scores_worst(void **state)
{
    (void)state;
    int care[] = {600, 0, 0, 0, 0};
    tu_case *c;
    keel_metrics *m = metrics_of(care, 5, &c);
    /* Source: Jain, Chiu, Hawe, DEC-TR-301, 1984: J = 1/n when one takes all.
     * Gini (standard definition, population form): G = (n - 1) / n. */
    assert_true(fabs(m->jain - 1.0 / 5.0) < 1e-12);
    assert_true(fabs(m->gini - 4.0 / 5.0) < 1e-12);
    assert_true(fabs(m->peak_to_mean - 5.0) < 1e-12);
    /* Population sigma of (1, 0, 0, 0, 0) is 0.4, mean 0.2: CV 2. */
    assert_true(fabs(m->cv - 2.0) < 1e-12);
    keel_metrics_free(m);
    tu_case_free(c);
}

static void test_indices_follow_their_formulas_on_a_mixed_vector(void **state)
{
    (void)state;
    /* Utilisations 0.5, 0.75, 1.0: sum 2.25, sum of squares 1.8125.
     * J = 2.25^2 / (3 * 1.8125) = 0.93103448...
     * G = (2 * (0.25 + 0.5 + 0.25)) / (2 * 9 * 0.75) = 0.148148...
     * CV = sqrt(1.8125/3 - 0.5625) / 0.75 = 0.27216552... */
    int care[] = {300, 450, 600};
    tu_case *c;
    keel_metrics *m = metrics_of(care, 3, &c);
    assert_true(fabs(m->jain - 2.25 * 2.25 / (3 * 1.8125)) < 1e-12);
    assert_true(fabs(m->gini - 2.0 / 13.5) < 1e-12);
    assert_true(fabs(m->cv - sqrt(1.8125 / 3 - 0.5625) / 0.75) < 1e-12);
    assert_true(fabs(m->spread - 0.5) < 1e-12);
    assert_true(fabs(m->max_utilisation - 1.0) < 1e-12);
    assert_true(fabs(m->min_utilisation - 0.5) < 1e-12);
    keel_metrics_free(m);
    tu_case_free(c);
}

static void test_loads_add_duty_and_care(void **state)
{
    (void)state;
    tu_case *c = tu_case_new(2, 3);
    c->w.care_minutes[0] = 200;
    c->w.care_minutes[1] = 100;
    c->w.care_minutes[2] = 50;
    c->w.duty_minutes[0] = 120;
    c->w.max_patients[1] = 0; /* takes no patients: not counted */
    int nurse_of[] = {0, 0, 0};
    keel_metrics *m = NULL;
    assert_int_equal(keel_metrics_compute(&c->w, nurse_of, &m, NULL), KEEL_OK);
    assert_int_equal(m->nurses[0].load_minutes, 470);
    assert_int_equal(m->nurses[0].care_minutes, 350);
    assert_int_equal(m->nurses[0].npatients, 3);
    assert_true(fabs(m->nurses[0].utilisation - 470.0 / 660.0) < 1e-12);
    assert_false(m->nurses[1].counted);
    assert_int_equal(m->ncounted, 1);
    assert_int_equal(m->care_minutes, 350);
    assert_int_equal(m->duty_minutes, 120);
    assert_int_equal(m->capacity_minutes, 660);
    assert_true(fabs(m->nurses_needed - 470.0 / 660.0) < 1e-12);
    keel_metrics_free(m);
    tu_case_free(c);
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(test_even_loads_score_perfect_fairness),
        cmocka_unit_test(test_one_nurse_with_all_the_work_scores_worst),
        cmocka_unit_test(test_indices_follow_their_formulas_on_a_mixed_vector),
        cmocka_unit_test(test_loads_add_duty_and_care),
    };
    return cmocka_run_group_tests_name("metrics", tests, NULL, NULL);
}
