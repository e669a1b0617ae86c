/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * test_workload.c - the arithmetic of docs/roster-format.md and
 * docs/model.md: care minutes, capacity, duty and limits with their
 * defaults, and which pairs are eligible (competencies, roles, locks,
 * avoid lists); and the rules a hand-made plan breaks.
 */
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <string.h>

#include <cmocka.h>

#include "keel/keel.h"

typedef struct loaded {
    keel_roster *r;
    keel_workload *w;
} loaded;

static loaded load(const char *text)
{
    loaded l = {0};
    keel_error err;
    keel_error_init(&err);
    keel_status rc = keel_roster_parse("test.yaml", text, strlen(text), &l.r, &err);
    for (size_t i = 0; i < err.nproblems; i++)
        print_message("%s\n", err.problems[i].message);
    assert_int_equal(rc, KEEL_OK);
    assert_int_equal(keel_workload_compute(l.r, &l.w, &err), KEEL_OK);
    keel_error_fini(&err);
    return l;
}

static void unload(loaded *l)
{
    keel_workload_free(l->w);
    keel_roster_free(l->r);
}

static const char *issue_example =
    "unit: {name: \"Test unit\", type: med-surg}\n"
    "shift: {label: day, date: 2026-03-14, start: \"07:00\", minutes: 720, break_minutes: 60}\n"
    "policy:\n"
    "  max_patients: 5\n"
    "  acuity_minutes: {1: 90, 2: 150, 3: 210, 4: 300, 5: 420}\n"
    "  extra_minutes: {admission: 90, discharge: 45, isolation: 30}\n"
    "nurses:\n"
    "  - {id: N1, skills: [tele, chemo], max_patients: 4, minutes: 480, break_minutes: 30,"
    " duty_minutes: 120}\n"
    "  - {id: N2}\n"
    "patients:\n"
    "  - {id: P-1042, bed: 512A, acuity: 3, extras: [admission], needs: [tele]}\n"
    "  - {id: P-1043, acuity: 2, care_minutes: 320, extras: [discharge, isolation]}\n";

static void test_workload_follows_the_documented_arithmetic(void **state)
{
    (void)state;
    loaded l = load(issue_example);
    /* care = acuity_minutes[3] + admission = 210 + 90 */
    assert_int_equal(l.w->care_minutes[0], 300);
    /* care_minutes overrides the level; extras still add: 320 + 45 + 30 */
    assert_int_equal(l.w->care_minutes[1], 395);
    /* capacity = minutes - break_minutes, each defaulting to the shift's */
    assert_int_equal(l.w->capacity_minutes[0], 450);
    assert_int_equal(l.w->capacity_minutes[1], 660);
    assert_int_equal(l.w->duty_minutes[0], 120);
    assert_int_equal(l.w->duty_minutes[1], 0);
    /* limit = the smallest of policy and nurse */
    assert_int_equal(l.w->max_patients[0], 2); /* nurse 4, policy 5, census 2 */
    assert_int_equal(l.w->max_patients[1], 2);
    /* P-1042 needs tele: only N1 */
    assert_true(keel_workload_eligible(l.w, 0, 0));
    assert_false(keel_workload_eligible(l.w, 0, 1));
    assert_true(keel_workload_eligible(l.w, 1, 1));
    unload(&l);
}

static void test_roles_set_default_limits_and_duty(void **state)
{
    (void)state;
    loaded l = load("shift: {minutes: 720, break_minutes: 60}\n"
                    "policy:\n"
                    "  max_patients: 5\n"
                    "  roles: {charge: {max_patients: 2, duty_minutes: 240}, resource: "
                    "{max_patients: 0}}\n"
                    "nurses:\n"
                    "  - {id: C1, role: charge}\n"
                    "  - {id: C2, role: charge, max_patients: 1, duty_minutes: 300}\n"
                    "  - {id: R1, role: resource}\n"
                    "  - {id: S1}\n"
                    "  - {id: O1, role: orientee, preceptor: S1}\n"
                    "patients:\n"
                    "  - {id: P1, care_minutes: 100}\n");
    assert_int_equal(l.w->max_patients[0], 1); /* role 2, census 1 */
    assert_int_equal(l.w->duty_minutes[0], 240);
    assert_int_equal(l.w->max_patients[1], 1);
    assert_int_equal(l.w->duty_minutes[1], 300); /* the nurse's own figure wins */
    assert_int_equal(l.w->max_patients[2], 0);   /* kept free */
    assert_false(keel_workload_counted(l.w, 2));
    assert_int_equal(l.w->max_patients[3], 1);
    assert_int_equal(l.w->max_patients[4], 0); /* shares the preceptor's assignment */
    assert_false(keel_workload_eligible(l.w, 0, 4));
    unload(&l);
}

static void test_locks_and_avoid_lists_remove_pairs(void **state)
{
    (void)state;
    loaded l = load("shift: {minutes: 720}\n"
                    "nurses: [{id: A}, {id: B}, {id: C}]\n"
                    "patients:\n"
                    "  - {id: P1, care_minutes: 100, nurse: B, lock: true}\n"
                    "  - {id: P2, care_minutes: 100, avoid: [A, C]}\n"
                    "  - {id: P3, care_minutes: 100, nurse: A, sitter: true}\n");
    assert_true(l.r->patients[2].sitter);
    assert_false(l.r->patients[0].sitter);
    assert_int_equal(l.w->care_minutes[2], 100); /* a sitter adds no nurse time */
    assert_false(keel_workload_eligible(l.w, 0, 0));
    assert_true(keel_workload_eligible(l.w, 0, 1));
    assert_false(keel_workload_eligible(l.w, 0, 2));
    assert_false(keel_workload_eligible(l.w, 1, 0));
    assert_true(keel_workload_eligible(l.w, 1, 1));
    assert_false(keel_workload_eligible(l.w, 1, 2));
    for (size_t n = 0; n < 3; n++) /* a nurse: without lock is only the current one */
        assert_true(keel_workload_eligible(l.w, 2, n));
    unload(&l);
}

static void test_plan_check_names_every_broken_rule(void **state)
{
    (void)state;
    loaded l = load("shift: {minutes: 720}\n"
                    "policy: {max_patients: 1}\n"
                    "nurses: [{id: A, skills: [tele]}, {id: B}]\n"
                    "patients:\n"
                    "  - {id: P1, care_minutes: 100, needs: [tele], nurse: B}\n"
                    "  - {id: P2, care_minutes: 100, avoid: [B], nurse: B}\n");
    int plan[2];
    assert_true(keel_plan_from_roster(l.r, plan));
    keel_findings found = {0};
    assert_int_equal(keel_plan_check(l.r, l.w, plan, &found, NULL), KEEL_OK);
    assert_int_equal(found.n, 3);
    assert_string_equal(found.items[0].rule, "skill");
    assert_string_equal(found.items[1].rule, "patient_limit");
    assert_string_equal(found.items[2].rule, "avoid");
    assert_string_equal(found.items[2].message, "P2 must not be cared for by B (avoid list)");
    keel_findings_fini(&found);
    unload(&l);
}

static void test_diagnosis_explains_a_lock_that_cannot_hold(void **state)
{
    (void)state;
    loaded l = load("shift: {minutes: 720}\n"
                    "nurses: [{id: A, skills: [tele]}, {id: B}]\n"
                    "patients:\n"
                    "  - {id: P1, care_minutes: 100, needs: [tele], nurse: B, lock: true}\n"
                    "  - {id: P2, care_minutes: 100, avoid: [A, B]}\n");
    keel_solution *s = NULL;
    assert_int_equal(keel_solve(l.r, l.w, NULL, &s, NULL), KEEL_OK);
    assert_int_equal(s->status, KEEL_SOLVE_INFEASIBLE);
    assert_int_equal(s->diagnoses.n, 2);
    assert_string_equal(s->diagnoses.items[0].rule, "lock");
    assert_string_equal(s->diagnoses.items[0].message, "P1 is locked to B, who does not have tele");
    assert_string_equal(s->diagnoses.items[1].rule, "avoid");
    assert_string_equal(s->diagnoses.items[1].message,
                        "every nurse on shift who may take patients is on P2's avoid list "
                        "(A and B)");
    keel_solution_free(s);
    unload(&l);
}

static void test_diagnosis_names_locks_that_exceed_a_limit(void **state)
{
    (void)state;
    loaded l = load("shift: {minutes: 720}\n"
                    "nurses: [{id: A}, {id: B, max_patients: 1}]\n"
                    "patients:\n"
                    "  - {id: P1, care_minutes: 100, nurse: B, lock: true}\n"
                    "  - {id: P2, care_minutes: 100, nurse: B, lock: true}\n");
    keel_solution *s = NULL;
    assert_int_equal(keel_solve(l.r, l.w, NULL, &s, NULL), KEEL_OK);
    assert_int_equal(s->status, KEEL_SOLVE_INFEASIBLE);
    assert_int_equal(s->diagnoses.n, 1);
    assert_string_equal(s->diagnoses.items[0].rule, "lock");
    assert_string_equal(s->diagnoses.items[0].message,
                        "2 patients are locked to B, whose patient limit is 1");
    keel_solution_free(s);
    unload(&l);
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(test_workload_follows_the_documented_arithmetic),
        cmocka_unit_test(test_roles_set_default_limits_and_duty),
        cmocka_unit_test(test_locks_and_avoid_lists_remove_pairs),
        cmocka_unit_test(test_plan_check_names_every_broken_rule),
        cmocka_unit_test(test_diagnosis_explains_a_lock_that_cannot_hold),
        cmocka_unit_test(test_diagnosis_names_locks_that_exceed_a_limit),
    };
    return cmocka_run_group_tests_name("workload", tests, NULL, NULL);
}
