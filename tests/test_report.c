/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * test_report.c - the writers: the yaml report reads back as the same
 * roster, every key kept, with every patient's nurse filled in; json and text carry their
 * fields and the caution.
 */
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>

#include <cmocka.h>

#include "alloc.h"
#include "testutil.h"
#include "workload_internal.h"

static const char *examples = "examples";
static const char *data = "tests/data";

typedef struct run {
    keel_roster *roster;
    keel_workload *w;
    keel_solution *s;
    keel_metrics *m;
    keel_report rep;
} run;

static void run_roster(run *r, const char *dir, const char *file)
{
    char path[1024];
    snprintf(path, sizeof path, "%s/%s", dir, file);
    keel_solve_options opt = {.method = "greedy"};
    assert_int_equal(keel_roster_load(path, &r->roster, NULL), KEEL_OK);
    assert_int_equal(keel_workload_compute(r->roster, &r->w, NULL), KEEL_OK);
    assert_int_equal(keel_solve(r->roster, r->w, &opt, &r->s, NULL), KEEL_OK);
    assert_int_equal(keel_metrics_compute(r->w, r->s->nurse_of, &r->m, NULL), KEEL_OK);
    r->rep = (keel_report){.kind = KEEL_REPORT_ASSIGN,
                           .roster = r->roster,
                           .workload = r->w,
                           .nurse_of = r->s->nurse_of,
                           .metrics = r->m,
                           .solution = r->s};
}

static void run_example(run *r, const char *file)
{
    run_roster(r, examples, file);
}

static void run_fini(run *r)
{
    keel_metrics_free(r->m);
    keel_solution_free(r->s);
    keel_workload_free(r->w);
    keel_roster_free(r->roster);
}

static char *write_to_memory(const char *format, const keel_report *rep)
{
    char *buf = NULL;
    size_t len = 0;
    FILE *out = open_memstream(&buf, &len);
    assert_non_null(out);
    assert_int_equal(keel_report_write(format, rep, out, NULL), KEEL_OK);
    fclose(out);
    return buf;
}

static void assert_same_strings(char *const *a, size_t na, char *const *b, size_t nb)
{
    assert_int_equal(na, nb);
    for (size_t i = 0; i < na; i++)
        assert_string_equal(a[i], b[i]);
}

static void assert_same_optional(const char *a, const char *b)
{
    if (!a || !b)
        assert_true(a == b);
    else
        assert_string_equal(a, b);
}

static void test_yaml_report_reads_back_as_the_same_roster_with_nurses(void **state)
{
    (void)state;
    /* The examples, and a roster that sets every key a plan keeps without
     * the clock: each must come back as it was. */
    const char *dirs[] = {examples, examples, data};
    const char *files[] = {"medsurg-day.yaml", "icu-night.yaml", "every-key.yaml"};
    for (size_t f = 0; f < 3; f++) {
        run r = {0};
        run_roster(&r, dirs[f], files[f]);
        char *text = write_to_memory("yaml", &r.rep);
        keel_roster *back = NULL;
        keel_error err;
        keel_error_init(&err);
        keel_status rc = keel_roster_parse("written.yaml", text, strlen(text), &back, &err);
        if (rc)
            fprintf(stderr, "%s\n", err.nproblems ? err.problems[0].message : "?");
        assert_int_equal(rc, KEEL_OK);
        keel_error_fini(&err);
        const keel_roster *a = r.roster;
        assert_same_optional(a->unit.name, back->unit.name);
        assert_same_optional(a->unit.type, back->unit.type);
        assert_same_optional(a->shift.label, back->shift.label);
        assert_same_optional(a->shift.date, back->shift.date);
        assert_int_equal(a->shift.start_minute, back->shift.start_minute);
        assert_int_equal(a->shift.minutes, back->shift.minutes);
        assert_int_equal(a->shift.break_minutes, back->shift.break_minutes);
        assert_int_equal(a->policy.max_patients, back->policy.max_patients);
        assert_int_equal(a->policy.nacuity, back->policy.nacuity);
        assert_int_equal(a->policy.nextras, back->policy.nextras);
        for (size_t i = 0; i < a->policy.nacuity; i++) {
            assert_int_equal(a->policy.acuity_minutes[i].level,
                             back->policy.acuity_minutes[i].level);
            assert_int_equal(a->policy.acuity_minutes[i].minutes,
                             back->policy.acuity_minutes[i].minutes);
        }
        for (size_t i = 0; i < a->policy.nextras; i++) {
            assert_string_equal(a->policy.extra_minutes[i].name,
                                back->policy.extra_minutes[i].name);
            assert_int_equal(a->policy.extra_minutes[i].minutes,
                             back->policy.extra_minutes[i].minutes);
        }
        for (size_t i = 0; i < KEEL_NROLES; i++) {
            assert_int_equal(a->policy.roles[i].max_patients, back->policy.roles[i].max_patients);
            assert_int_equal(a->policy.roles[i].duty_minutes, back->policy.roles[i].duty_minutes);
            assert_int_equal(a->policy.roles[i].max_acuity, back->policy.roles[i].max_acuity);
        }
        assert_ptr_equal(a->policy.ratio_table, back->policy.ratio_table);
        assert_int_equal(a->policy.high_acuity.level, back->policy.high_acuity.level);
        assert_int_equal(a->policy.high_acuity.max_per_nurse,
                         back->policy.high_acuity.max_per_nurse);
        assert_int_equal(a->policy.isolation_separation, back->policy.isolation_separation);
        for (size_t i = 0; i < KEEL_NISOLATION; i++)
            assert_same_strings(a->policy.isolation_needs[i], a->policy.nisolation_needs[i],
                                back->policy.isolation_needs[i], back->policy.nisolation_needs[i]);
        assert_int_equal(a->policy.max_zones, back->policy.max_zones);
        assert_int_equal(a->policy.balance_tolerance, back->policy.balance_tolerance);
        assert_int_equal(a->policy.min_patients, back->policy.min_patients);
        assert_int_equal(a->policy.max_utilisation, back->policy.max_utilisation);
        assert_int_equal(a->policy.balance, back->policy.balance);
        assert_int_equal(a->nnurses, back->nnurses);
        for (size_t n = 0; n < a->nnurses; n++) {
            const keel_nurse *x = &a->nurses[n], *y = &back->nurses[n];
            assert_string_equal(x->id, y->id);
            assert_same_optional(x->name, y->name);
            assert_same_strings(x->skills, x->nskills, y->skills, y->nskills);
            assert_int_equal(x->max_patients, y->max_patients);
            assert_int_equal(x->min_patients, y->min_patients);
            assert_int_equal(x->minutes, y->minutes);
            assert_int_equal(x->break_minutes, y->break_minutes);
            assert_int_equal(x->duty_minutes, y->duty_minutes);
            assert_int_equal(x->role, y->role);
            assert_int_equal(x->licence, y->licence);
            assert_same_optional(x->preceptor, y->preceptor);
        }
        assert_int_equal(a->npatients, back->npatients);
        for (size_t p = 0; p < a->npatients; p++) {
            const keel_patient *x = &a->patients[p], *y = &back->patients[p];
            assert_string_equal(x->id, y->id);
            assert_same_optional(x->bed, y->bed);
            assert_same_optional(x->name, y->name);
            assert_int_equal(x->acuity, y->acuity);
            assert_int_equal(x->care_minutes, y->care_minutes);
            assert_same_strings(x->extras, x->nextras, y->extras, y->nextras);
            assert_same_strings(x->needs, x->nneeds, y->needs, y->nneeds);
            assert_string_equal(y->nurse, a->nurses[r.s->nurse_of[p]].id);
            assert_int_equal(x->lock, y->lock);
            assert_int_equal(x->sitter, y->sitter);
            assert_same_strings(x->avoid, x->navoid, y->avoid, y->navoid);
            assert_int_equal(x->ratio, y->ratio);
            assert_int_equal(x->isolation, y->isolation);
            assert_same_optional(x->room, y->room);
            assert_same_optional(x->zone, y->zone);
            assert_same_optional(x->previous_nurse, y->previous_nurse);
            assert_same_strings(x->nas, x->nnas, y->nas, y->nnas);
        }
        keel_roster_free(back);
        free(text);
        run_fini(&r);
    }
}

static void test_json_report_carries_the_contract_fields(void **state)
{
    (void)state;
    run r = {0};
    run_example(&r, "medsurg-day.yaml");
    char *text = write_to_memory("json", &r.rep);
    const char *fields[] = {"\"status\": \"",
                            "\"nurses\": [",
                            "\"load_minutes\": ",
                            "\"capacity_minutes\": ",
                            "\"utilisation\": ",
                            "\"imbalance\": {",
                            "\"max_utilisation\": ",
                            "\"min_utilisation\": ",
                            "\"spread\": ",
                            "\"peak_to_mean\": ",
                            "\"cv\": ",
                            "\"jain\": ",
                            "\"gini\": ",
                            "\"bound\": {",
                            "\"gap\": ",
                            "\"diagnosis\": [",
                            "\"caution\": "};
    for (size_t i = 0; i < sizeof fields / sizeof fields[0]; i++)
        assert_non_null(strstr(text, fields[i]));
    free(text);
    run_fini(&r);
}

static void test_text_report_ends_with_the_caution(void **state)
{
    (void)state;
    run r = {0};
    run_example(&r, "icu-night.yaml");
    char *text = write_to_memory("text", &r.rep);
    size_t len = strlen(text), clen = strlen(KEEL_CAUTION);
    assert_true(len > clen + 1);
    assert_string_equal(text + len - clen - 1, KEEL_CAUTION "\n");
    free(text);
    run_fini(&r);
}

static void test_unknown_format_is_a_usage_error(void **state)
{
    (void)state;
    run r = {0};
    run_example(&r, "icu-night.yaml");
    keel_error err;
    keel_error_init(&err);
    assert_int_equal(keel_report_write("pdf", &r.rep, stdout, &err), KEEL_ERR_USAGE);
    assert_int_equal(err.nproblems, 1);
    keel_error_fini(&err);
    run_fini(&r);
}

/* Runs the whole pipeline once; returns the first status that is not OK. */
static keel_status run_pipeline(const char *path)
{
    keel_roster *roster = NULL;
    keel_workload *w = NULL;
    keel_solution *s = NULL;
    keel_metrics *m = NULL;
    keel_error err;
    keel_error_init(&err);
    keel_solve_options opt = {.time_limit_ms = 20000, .best_effort = true};
    keel_status rc = keel_roster_load(path, &roster, &err);
    if (!rc)
        rc = keel_workload_compute(roster, &w, &err);
    if (!rc)
        rc = keel_solve(roster, w, &opt, &s, &err);
    if (!rc)
        rc = keel_metrics_compute(w, s->nurse_of, &m, &err);
    keel_explanation *e = NULL;
    keel_staffing st;
    if (!rc && s->status != KEEL_SOLVE_INFEASIBLE)
        rc = keel_explain(roster, w, s->nurse_of, &e, &err);
    if (!rc)
        rc = keel_staffing_compute(roster, w, &st, &err);
    if (!rc) {
        keel_report rep = {.kind = KEEL_REPORT_ASSIGN,
                           .roster = roster,
                           .workload = w,
                           .nurse_of = s->nurse_of,
                           .metrics = m,
                           .solution = s,
                           .staffing = &st,
                           .explanation = e};
        char *buf = NULL;
        size_t len = 0;
        FILE *out = open_memstream(&buf, &len);
        assert_non_null(out);
        rc = keel_report_write("json", &rep, out, &err);
        fclose(out);
        free(buf);
    }
    if (rc)
        assert_true(err.status != KEEL_OK);
    keel_explanation_free(e);
    keel_metrics_free(m);
    keel_solution_free(s);
    keel_workload_free(w);
    keel_roster_free(roster);
    keel_error_fini(&err);
    return rc;
}

static void test_every_failed_allocation_ends_in_a_clean_error(void **state)
{
    (void)state;
    char path[1024];
    /* Small rosters with every rule on reach every stage in milliseconds;
     * the second has no valid assignment (diagnosis, best-effort plan). */
    static const char *const cases[] = {"every-rule.yaml", "every-rule-infeasible.yaml"};
    for (size_t c = 0; c < sizeof cases / sizeof cases[0]; c++) {
        snprintf(path, sizeof path, "%s/%s", data, cases[c]);
        for (long n = 1;; n++) {
            keel_alloc_fail_at(n);
            keel_status rc = run_pipeline(path);
            long made = keel_alloc_fail_at(0);
            if (made < n) {
                assert_int_equal(rc, KEEL_OK); /* no failure was injected */
                break;
            }
            assert_int_equal(rc, KEEL_ERR_NOMEM);
        }
    }
}

int main(int argc, char **argv)
{
    if (argc > 1)
        examples = argv[1];
    if (argc > 2)
        data = argv[2];
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(test_yaml_report_reads_back_as_the_same_roster_with_nurses),
        cmocka_unit_test(test_json_report_carries_the_contract_fields),
        cmocka_unit_test(test_text_report_ends_with_the_caution),
        cmocka_unit_test(test_unknown_format_is_a_usage_error),
        cmocka_unit_test(test_every_failed_allocation_ends_in_a_clean_error),
    };
    return cmocka_run_group_tests_name("report", tests, NULL, NULL);
}
