/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * test_audit.c - keel audit's library side: the tail and Holm's
 * adjustment on values worked by hand, weekdays, a stream of rosters, one
 * shift's figures and shares (ties give 1/t), rules broken at a moment of
 * a clocked shift, and a partial result read back to the same report.
 * tests/reference/check_audit.py checks the same against scipy, numpy and
 * the HiGHS model on generated histories.
 */
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include <cmocka.h>

#include "alloc.h"
#include "audit_internal.h"
#include "keel/keel.h"

/* Source: binomial distribution, P(X >= 2) for X ~ Bin(4, 1/2) is
 * (6 + 4 + 1) / 16 (direct count of outcomes, worked by hand). */
static void test_the_tail_of_a_fair_count_is_exact(void **state)
{
    (void)state;
    const double half[4] = {0.5, 0.5, 0.5, 0.5};
    assert_float_equal(keel_audit_stats_tail(half, 4, 2), 11.0 / 16.0, 1e-15);
    assert_float_equal(keel_audit_stats_tail(half, 4, 0), 1.0, 0);
    assert_float_equal(keel_audit_stats_tail(half, 4, 5), 0.0, 0);
    /* Unequal chances, by hand: P(X >= 2) for p = 1/2, 1/3, 1/4 is
     * 1/2*1/3*3/4 + 1/2*2/3*1/4 + 1/2*1/3*1/4 + 1/2*1/3*1/4 = 7/24. */
    const double mixed[3] = {0.5, 1.0 / 3.0, 0.25};
    assert_float_equal(keel_audit_stats_tail(mixed, 3, 2), 7.0 / 24.0, 1e-15);
}

/* Source: Holm, S. (1979), Scand J Stat 6:65-70, the step-down procedure:
 * sorted p (0.01, 0.03, 0.04) times (3, 2, 1) is (0.03, 0.06, 0.04), made
 * monotone (0.03, 0.06, 0.06). */
static void test_holm_adjusts_step_down(void **state)
{
    (void)state;
    const double p[3] = {0.01, 0.04, 0.03};
    double adj[3];
    assert_true(keel_audit_stats_holm(p, 3, adj));
    assert_float_equal(adj[0], 0.03, 1e-15);
    assert_float_equal(adj[1], 0.06, 1e-15);
    assert_float_equal(adj[2], 0.06, 1e-15);
    const double big[2] = {0.7, 0.9};
    assert_true(keel_audit_stats_holm(big, 2, adj));
    assert_float_equal(adj[0], 1.0, 0);
    assert_float_equal(adj[1], 1.0, 0);
}

/* Source: the calendar (2026-03-02 a Monday; 2000-02-29 a Tuesday; 1969-12-31 a Wednesday). */
static void test_weekdays_follow_the_calendar(void **state)
{
    (void)state;
    assert_int_equal(keel_audit_stats_weekday("2026-03-02"), 0);
    assert_int_equal(keel_audit_stats_weekday("2000-02-29"), 1);
    assert_int_equal(keel_audit_stats_weekday("1969-12-31"), 2);
    assert_int_equal(keel_audit_stats_weekday("2026-13-01"), -1);
    assert_int_equal(keel_audit_stats_weekday(NULL), -1);
}

static const char two_shifts[] =
    "shift: {label: day, date: 2026-03-02, minutes: 600}\n"
    "policy: {acuity_minutes: {1: 100, 2: 200}, high_acuity: {level: 2, max_per_nurse: 1}}\n"
    "nurses: [{id: A}, {id: B}, {id: C}]\n"
    "patients:\n"
    "  - {id: p1, acuity: 2, nurse: A}\n"
    "  - {id: p2, acuity: 2, nurse: B}\n"
    "  - {id: p3, acuity: 1, nurse: C, isolation: contact}\n"
    "---\n"
    "shift: {label: night, date: 2026-03-03, minutes: 600}\n"
    "policy: {acuity_minutes: {1: 100, 2: 200}, high_acuity: {level: 2, max_per_nurse: 1}}\n"
    "nurses: [{id: A}, {id: B, skills: [x]}]\n"
    "patients:\n"
    "  - {id: q1, acuity: 2, nurse: A}\n"
    "  - {id: q2, acuity: 2, nurse: A}\n"
    "  - {id: q3, acuity: 1, nurse: A, needs: [x]}\n";

static void compute(const char *text, keel_audit **out, const keel_audit_options *o)
{
    keel_error err;
    keel_error_init(&err);
    keel_roster **rs = NULL;
    size_t n = 0;
    assert_int_equal(keel_roster_parse_stream("h.yaml", text, strlen(text), &rs, &n, &err),
                     KEEL_OK);
    size_t docs[8];
    for (size_t i = 0; i < n; i++)
        docs[i] = i + 1;
    keel_audit_shift *shifts = calloc(n, sizeof *shifts);
    assert_non_null(shifts);
    assert_int_equal(keel_audit_shifts_compute(rs, docs, n, 0, o, shifts, &err), KEEL_OK);
    for (size_t i = 0; i < n; i++)
        keel_roster_free(rs[i]);
    free(rs);
    assert_int_equal(keel_audit_summarise(shifts, n, o, out, &err), KEEL_OK);
    keel_error_fini(&err);
}

/* A tie of t counted nurses at the top gives each 1/t; the shift of one
 * nurse with everything gives her 1; every rule broken is listed. */
static void test_a_tie_at_the_top_shares_the_heaviest_load(void **state)
{
    (void)state;
    keel_audit_options o = {.jobs = 2};
    keel_audit *a = NULL;
    compute(two_shifts, &a, &o);
    assert_int_equal(a->nshifts, 2);
    const keel_audit_shift *s = &a->shifts[0];
    assert_string_equal(s->label, "day");
    assert_int_equal(s->weekday, 0);
    assert_float_equal(s->nurses[0].share[KEEL_AUDIT_HEAVIEST], 0.5, 0);
    assert_float_equal(s->nurses[1].share[KEEL_AUDIT_HEAVIEST], 0.5, 0);
    assert_float_equal(s->nurses[2].share[KEEL_AUDIT_HEAVIEST], 0, 0);
    assert_float_equal(s->nurses[2].share[KEEL_AUDIT_ISOLATION], 1, 0);
    assert_float_equal(s->nurses[0].share[KEEL_AUDIT_ZONES], 0, 0); /* no zones: not at stake */
    assert_int_equal(s->nviolations, 0);
    assert_true(s->best_known);
    assert_float_equal(s->best_max_utilisation, 2.0 / 6.0, 1e-12);
    const keel_audit_shift *t = &a->shifts[1];
    assert_float_equal(t->nurses[0].share[KEEL_AUDIT_HEAVIEST], 1, 0);
    /* q3 needs x, which A lacks; A has two high-acuity patients. */
    bool skill = false, high = false;
    for (size_t v = 0; v < t->nviolations; v++) {
        skill = skill || (strcmp(t->violations[v].rule, "skill") == 0 &&
                          strcmp(t->violations[v].patients[0], "q3") == 0 &&
                          strcmp(t->violations[v].nurses[0], "A") == 0);
        high = high || strcmp(t->violations[v].rule, "high_acuity") == 0;
    }
    assert_true(skill);
    assert_true(high);
    /* A: heaviest 1/2 + 1 over two shifts, not whole: no p-value. */
    assert_string_equal(a->people[0].id, "A");
    assert_float_equal(a->people[0].tally[KEEL_AUDIT_HEAVIEST].count, 1.5, 0);
    assert_false(a->people[0].tally[KEEL_AUDIT_HEAVIEST].whole);
    assert_true(a->people[0].tally[KEEL_AUDIT_HEAVIEST].p_value < 0);
    /* C: one shift, 1/3 chance, count 0: P(X >= 0) = 1. */
    assert_float_equal(a->people[2].tally[KEEL_AUDIT_HEAVIEST].p_value, 1, 0);
    assert_float_equal(a->people[2].tally[KEEL_AUDIT_HEAVIEST].expected, 1.0 / 3.0, 1e-15);
    keel_audit_free(a);
}

/* Under the clock a limit broken for an hour is one violation with its
 * interval, not the whole shift. */
static void test_a_limit_broken_at_one_moment_has_its_interval(void **state)
{
    (void)state;
    static const char clocked[] =
        "shift: {date: 2026-03-04, start: 07:00, minutes: 720}\n"
        "policy: {max_patients: 2, acuity_minutes: {1: 60}}\n"
        "nurses: [{id: A}, {id: B}]\n"
        "patients:\n"
        "  - {id: p1, acuity: 1, nurse: A}\n"
        "  - {id: p2, acuity: 1, nurse: A}\n"
        "  - {id: p3, acuity: 1, nurse: A, arrives_at: '10:00', leaves_at: '11:00'}\n"
        "  - {id: p4, acuity: 1, nurse: B}\n";
    keel_audit_options o = {.no_best = true};
    keel_audit *a = NULL;
    compute(clocked, &a, &o);
    const keel_audit_shift *s = &a->shifts[0];
    assert_int_equal(s->nviolations, 1);
    assert_string_equal(s->violations[0].rule, "moment_limit");
    assert_int_equal(s->violations[0].nintervals, 1);
    assert_string_equal(s->violations[0].intervals[0].from, "10:00");
    assert_string_equal(s->violations[0].intervals[0].to, "11:00");
    assert_string_equal(s->best_status, "skipped");
    keel_audit_free(a);
}

/* A stream's second document is read with its problems at their lines. */
static void test_a_stream_reports_each_documents_problems_at_their_lines(void **state)
{
    (void)state;
    static const char bad[] = "shift: {minutes: 600}\nnurses: [{id: A}]\npatients: []\n---\n"
                              "shift: {minutes: -5}\nnurses: [{id: A}]\npatients: []\n";
    keel_error err;
    keel_error_init(&err);
    keel_roster **rs = NULL;
    size_t n = 7;
    assert_int_equal(keel_roster_parse_stream("h.yaml", bad, strlen(bad), &rs, &n, &err),
                     KEEL_ERR_INPUT);
    assert_null(rs);
    assert_int_equal(n, 0);
    assert_true(err.nproblems >= 1);
    assert_int_equal(err.problems[0].line, 5);
    keel_error_fini(&err);
}

/* Shards written as partials and merged give the single run's report. */
static void test_merged_shards_give_the_single_runs_report(void **state)
{
    (void)state;
    keel_audit_options whole = {.jobs = 1};
    keel_audit *a = NULL;
    compute(two_shifts, &a, &whole);
    char *one = NULL, *merged = NULL;
    size_t lone = 0, lmerged = 0;
    FILE *f = open_memstream(&one, &lone);
    assert_int_equal(keel_audit_write("json", a, f, NULL), KEEL_OK);
    fclose(f);
    keel_audit_free(a);

    char paths[2][64];
    const char *list[2];
    for (size_t k = 1; k <= 2; k++) {
        keel_audit_options o = {.jobs = 1, .shard = k, .nshards = 2};
        keel_error err;
        keel_error_init(&err);
        keel_roster **rs = NULL;
        size_t n = 0, docs[2] = {1, 2};
        assert_int_equal(
            keel_roster_parse_stream("h.yaml", two_shifts, strlen(two_shifts), &rs, &n, &err),
            KEEL_OK);
        keel_audit_shift shifts[2];
        assert_int_equal(keel_audit_shifts_compute(rs, docs, n, 0, &o, shifts, &err), KEEL_OK);
        snprintf(paths[k - 1], sizeof paths[k - 1], "test-audit-partial-%zu.txt", k);
        list[k - 1] = paths[k - 1];
        FILE *pf = fopen(paths[k - 1], "w");
        assert_non_null(pf);
        assert_int_equal(keel_audit_partial_write(shifts, n, &o, pf, &err), KEEL_OK);
        fclose(pf);
        for (size_t i = 0; i < n; i++) {
            keel_audit_shift_fini(&shifts[i]);
            keel_roster_free(rs[i]);
        }
        free(rs);
        keel_error_fini(&err);
    }
    keel_audit_shift *shifts = NULL;
    size_t n = 0;
    keel_error err;
    keel_error_init(&err);
    assert_int_equal(keel_audit_partial_read(list, 1, &shifts, &n, &err), KEEL_ERR_INPUT);
    keel_error_fini(&err);
    assert_int_equal(keel_audit_partial_read(list, 2, &shifts, &n, &err), KEEL_OK);
    assert_int_equal(keel_audit_summarise(shifts, n, &whole, &a, &err), KEEL_OK);
    f = open_memstream(&merged, &lmerged);
    assert_int_equal(keel_audit_write("json", a, f, NULL), KEEL_OK);
    fclose(f);
    assert_int_equal(lone, lmerged);
    assert_memory_equal(one, merged, lone);
    keel_audit_free(a);
    free(one);
    free(merged);
    remove(paths[0]);
    remove(paths[1]);
    keel_error_fini(&err);
}

/* Every allocation of the audit failed in turn (one thread, no solve):
 * each call returns KEEL_ERR_NOMEM cleanly, or everything succeeds. */
static void test_every_failed_allocation_ends_in_a_clean_error(void **state)
{
    (void)state;
    keel_audit_options o = {.no_best = true, .jobs = 1};
    for (long n = 1;; n++) {
        keel_error err;
        keel_error_init(&err);
        keel_roster **rs = NULL;
        size_t nr = 0, docs[2] = {1, 2};
        keel_audit_shift *shifts = NULL;
        keel_audit *a = NULL;
        char *text = NULL;
        size_t len = 0;
        keel_alloc_fail_at(n);
        keel_status rc =
            keel_roster_parse_stream("h.yaml", two_shifts, strlen(two_shifts), &rs, &nr, &err);
        if (!rc) {
            shifts = keel_calloc(nr, sizeof *shifts);
            rc =
                shifts ? keel_audit_shifts_compute(rs, docs, nr, 0, &o, shifts, &err) : KEEL_ERR_NOMEM;
            for (size_t i = 0; rc && shifts && i < nr; i++)
                keel_audit_shift_fini(&shifts[i]);
            if (rc) {
                free(shifts);
                shifts = NULL;
            }
        }
        if (!rc) {
            rc = keel_audit_summarise(shifts, nr, &o, &a, &err);
            shifts = NULL;
        }
        long made = keel_alloc_fail_at(0);
        if (!rc) { /* the text writer allocates too: it writes nothing then */
            FILE *f = open_memstream(&text, &len);
            keel_alloc_fail_at(1);
            assert_int_equal(keel_audit_write("text", a, f, &err), KEEL_ERR_NOMEM);
            keel_alloc_fail_at(0);
            fclose(f);
            assert_int_equal(len, 0);
        }
        free(text);
        keel_audit_free(a);
        for (size_t i = 0; i < nr; i++)
            keel_roster_free(rs[i]);
        free(rs);
        keel_error_fini(&err);
        if (made < n) {
            assert_int_equal(rc, KEEL_OK);
            break;
        }
        assert_int_equal(rc, KEEL_ERR_NOMEM);
    }
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(test_the_tail_of_a_fair_count_is_exact),
        cmocka_unit_test(test_holm_adjusts_step_down),
        cmocka_unit_test(test_weekdays_follow_the_calendar),
        cmocka_unit_test(test_a_tie_at_the_top_shares_the_heaviest_load),
        cmocka_unit_test(test_a_limit_broken_at_one_moment_has_its_interval),
        cmocka_unit_test(test_a_stream_reports_each_documents_problems_at_their_lines),
        cmocka_unit_test(test_merged_shards_give_the_single_runs_report),
        cmocka_unit_test(test_every_failed_allocation_ends_in_a_clean_error),
    };
    return cmocka_run_group_tests(tests, NULL, NULL);
}
