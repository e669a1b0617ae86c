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
#include <stdlib.h>
#include <string.h>

#include <cmocka.h>

#include "keel/keel.h"
#include "workload_internal.h"

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
    assert_true(keel_plan_from_roster(l.r, l.w, plan));
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

/* The clock's arithmetic (docs/model.md, "The clock"), hand-computed. */
/* The shift's break goes to a nurse on for at least half the shift; one on
 * for less, without a break of her own, takes none (docs/roster-format.md,
 * "break_minutes"); her own break_minutes always count. */
static void test_a_short_stay_takes_no_break_of_the_shift(void **state)
{
    (void)state;
    loaded l = load("unit: {name: \"Test unit\", type: med-surg}\n"
                    "shift: {start: \"07:00\", minutes: 720, break_minutes: 45}\n"
                    "nurses:\n"
                    "  - {id: N1}\n"
                    "  - {id: N2, end: \"09:30\"}\n"
                    "  - {id: N3, start: \"13:00\"}\n"
                    "  - {id: N4, start: \"13:01\"}\n"
                    "  - {id: N5, end: \"09:30\", break_minutes: 15}\n"
                    "  - {id: N6, minutes: 240}\n"
                    "patients:\n"
                    "  - {id: P1, care_minutes: 60}\n");
    const keel_workload *w = l.w;
    assert_int_equal(w->capacity_minutes[0], 720 - 45);
    assert_int_equal(w->capacity_minutes[1], 150); /* on 150 of 720 min: no break */
    assert_true(keel_workload_no_break(l.r, 1));
    assert_int_equal(w->capacity_minutes[2], 360 - 45); /* exactly half: the break */
    assert_false(keel_workload_no_break(l.r, 2));
    assert_int_equal(w->capacity_minutes[3], 359); /* a minute under half: none */
    assert_int_equal(w->capacity_minutes[4], 150 - 15); /* her own break counts */
    assert_false(keel_workload_no_break(l.r, 4));
    assert_int_equal(w->capacity_minutes[5], 240); /* a part shift by minutes alone */
    unload(&l);
}

static const char *clock_example =
    "unit: {name: \"Test unit\", type: med-surg}\n"
    "shift: {start: \"19:00\", minutes: 720, break_minutes: 60}\n"
    "policy: {max_patients: 2, extra_minutes: {admission: 60}}\n"
    "nurses:\n"
    "  - {id: N1, end: \"03:00\", breaks: [{at: \"23:00\", minutes: 30}]}\n"
    "  - {id: N2}\n"
    "  - {id: N3, start: \"23:00\"}\n"
    "patients:\n"
    "  - {id: P1, care_minutes: 135, arrives_at: \"23:00\", extras: [admission]}\n"
    "  - {id: P2, care_minutes: 100, leaves_at: \"03:00\"}\n"
    "  - {id: P3, care_minutes: 72, leaves_at: \"23:00\"}\n";

static void test_the_clock_cuts_stays_into_parts_and_moments(void **state)
{
    (void)state;
    loaded l = load(clock_example);
    const keel_workload *w = l.w;
    /* Night shift across midnight: 03:00 is minute 480, 23:00 minute 240
     * (common practice, no source: times are read against the shift). */
    assert_int_equal(w->nurse_end[0], 480);
    assert_int_equal(w->nurse_start[2], 240);
    /* Capacity: time on the unit minus her breaks (or the shift's). */
    assert_int_equal(w->capacity_minutes[0], 480 - 30);
    assert_int_equal(w->capacity_minutes[1], 720 - 60);
    assert_int_equal(w->capacity_minutes[2], 480 - 60);
    /* P1 is present 480 of 720 minutes: ceil(135 * 480 / 720) = 90, cut at
     * N1's end (minute 480): 45 and 45; the admission's 60 on the first part. */
    assert_int_equal(w->first_part[1] - w->first_part[0], 2);
    assert_int_equal(w->care_minutes[0], 45 + 60);
    assert_int_equal(w->care_minutes[1], 45);
    assert_int_equal(w->part_start[1], 480);
    /* P2 leaves exactly when N1 does: one part, no hand-off; care
     * ceil(100 * 480 / 720) = 67. */
    assert_int_equal(w->first_part[2] - w->first_part[1], 1);
    assert_int_equal(w->care_minutes[2], 67);
    /* P3 is present 240 minutes: ceil(72 * 240 / 720) = 24. */
    assert_int_equal(w->care_minutes[3], 24);
    /* Moments: 0, 240, 480, 720. */
    assert_int_equal(w->nmoments, 3);
    assert_int_equal(w->moment_start[1], 240);
    assert_true(w->clocked);
    /* N3 is not on for P3 (who leaves when she comes) nor N1 for P1's
     * second part; P1's second part keeps N2 or N3 when they had the first. */
    assert_false(keel_workload_eligible(w, 3, 2));
    assert_false(keel_workload_eligible(w, 1, 0));
    assert_true(keel_workload_keeps(w, 1, 1));
    assert_false(keel_workload_keeps(w, 1, 0));
    assert_false(keel_workload_keeps(w, 0, 1));
    unload(&l);
}

static void test_limits_hold_at_every_moment_not_on_the_total(void **state)
{
    (void)state;
    /* N2 may hold 2 patients: P3 until 23:00, then P1 from 23:00, with P2
     * throughout; three patients over the shift, never more than two at once. */
    loaded l = load(clock_example);
    int plan[5];
    const int nurse_of[] = {1, 1, 1, 1}; /* P1 (two parts), P2, P3 all with N2 */
    memcpy(plan, nurse_of, sizeof nurse_of);
    keel_findings found = {0};
    assert_int_equal(keel_plan_check(l.r, l.w, plan, &found, NULL), KEEL_OK);
    assert_int_equal(found.n, 0);
    /* P3 with N3, who is not on while P3 is here: named as a hand-off problem. */
    plan[3] = 2;
    assert_int_equal(keel_plan_check(l.r, l.w, plan, &found, NULL), KEEL_OK);
    assert_int_equal(found.n, 1);
    assert_string_equal(found.items[0].rule, "hand_off");
    keel_findings_fini(&found);
    unload(&l);
}

static void test_planned_handoffs_follow_the_nurse_who_leaves(void **state)
{
    (void)state;
    static const char *text = "unit: {name: \"Test unit\", type: med-surg}\n"
                              "shift: {start: \"07:00\", minutes: 720}\n"
                              "policy: {max_patients: 2}\n"
                              "nurses:\n"
                              "  - {id: N1, end: \"15:00\"}\n"
                              "  - {id: N2}\n"
                              "  - {id: N3, start: \"11:00\"}\n"
                              "patients:\n"
                              "  - {id: P1, care_minutes: 120, nurse: N1, handoffs: [N3]}\n"
                              "  - {id: P2, care_minutes: 120, nurse: N2}\n"
                              "  - {id: P3, care_minutes: 120, nurse: N2, leaves_at: \"11:00\"}\n"
                              "  - {id: P4, care_minutes: 120, nurse: N2, arrives_at: \"11:00\"}\n";
    loaded l = load(text);
    int plan[8];
    assert_true(keel_plan_from_roster(l.r, l.w, plan));
    /* P1 is with N1 until 15:00, then N3; P2 stays with N2. */
    assert_int_equal(plan[0], 0);
    assert_int_equal(plan[1], 2);
    assert_int_equal(plan[l.w->first_part[1]], 1);
    keel_findings found = {0};
    assert_int_equal(keel_plan_check(l.r, l.w, plan, &found, NULL), KEEL_OK);
    /* N2: P3 leaves at 11:00 and P4 arrives at 11:00, so two at a time under 1:2. */
    assert_int_equal(found.n, 0);
    /* P1 with N2 all shift: three at a time all shift (P3 until 11:00, P4
     * from then), one stretch from 07:00 to 19:00; and the planned hand-off
     * to N3 no longer happens. */
    plan[0] = plan[1] = 1;
    assert_int_equal(keel_plan_check(l.r, l.w, plan, &found, NULL), KEEL_OK);
    assert_int_equal(found.n, 2);
    assert_string_equal(found.items[0].rule, "moment_limit");
    assert_non_null(strstr(found.items[0].message, "from 07:00 to 19:00, N2 has 3 patients"));
    assert_string_equal(found.items[1].rule, "hand_off");
    keel_findings_fini(&found);
    unload(&l);
}

/* A limit broken twice, with a stretch kept between, is listed twice, each
 * stretch whole and worded where the nurse holds the most. */
static void test_every_stretch_of_a_broken_limit_is_listed(void **state)
{
    (void)state;
    static const char *text = "unit: {name: \"Test unit\", type: med-surg}\n"
                              "shift: {start: \"07:00\", minutes: 720}\n"
                              "policy: {max_patients: 2}\n"
                              "nurses:\n"
                              "  - {id: N1}\n"
                              "  - {id: N2}\n"
                              "patients:\n"
                              "  - {id: P1, care_minutes: 60, nurse: N1}\n"
                              "  - {id: P2, care_minutes: 60, nurse: N1}\n"
                              "  - {id: P3, care_minutes: 60, nurse: N1, leaves_at: \"09:00\"}\n"
                              "  - {id: P4, care_minutes: 60, nurse: N1, leaves_at: \"10:00\"}\n"
                              "  - {id: P5, care_minutes: 60, nurse: N1, arrives_at: \"15:00\"}\n";
    loaded l = load(text);
    int plan[8];
    assert_true(keel_plan_from_roster(l.r, l.w, plan));
    keel_findings found = {0};
    assert_int_equal(keel_plan_check(l.r, l.w, plan, &found, NULL), KEEL_OK);
    /* 07:00-09:00 four, 09:00-10:00 three, 10:00-15:00 two, 15:00-19:00 three. */
    assert_int_equal(found.n, 2);
    assert_non_null(strstr(found.items[0].message, "from 07:00 to 10:00, N1 has 4 patients"));
    assert_non_null(strstr(found.items[1].message, "from 15:00 to 19:00, N1 has 3 patients"));
    keel_findings_fini(&found);
    unload(&l);
}

/* A record cuts the stay at its stretch ends; each recorded part is held by
 * its stretch's nurse, then nurse and handoffs follow; a limit broken only
 * in the recorded morning is found there, and a lock binds after it. */
static void test_a_record_holds_the_parts_before_the_rebalance(void **state)
{
    (void)state;
    static const char *text = "shift: {start: \"07:00\", minutes: 720}\n"
                              "policy: {max_patients: 1}\n"
                              "nurses:\n"
                              "  - {id: N1}\n"
                              "  - {id: N2, end: \"09:30\"}\n"
                              "  - {id: N3, end: \"15:00\"}\n"
                              "  - {id: N4, start: \"15:00\"}\n"
                              "patients:\n"
                              "  - id: P1\n"
                              "    care_minutes: 120\n"
                              "    nurse: N3\n"
                              "    lock: true\n"
                              "    handoffs: [N4]\n"
                              "    record:\n"
                              "      - {nurse: N2, from: \"07:00\", to: \"08:00\"}\n"
                              "      - {nurse: N1, from: \"08:00\", to: \"09:00\"}\n"
                              "  - id: P2\n"
                              "    care_minutes: 120\n"
                              "    nurse: N1\n"
                              "    record: [{nurse: N2, from: \"07:00\", to: \"09:30\"}]\n";
    loaded l = load(text);
    /* P1: 07-08 N2, 08-09 N1, then N3 (cut at 09:30 when N2 leaves) until
     * 15:00, then N4; P2: 07-09:30 N2, then N1. */
    assert_int_equal(l.w->first_part[1] - l.w->first_part[0], 5);
    assert_int_equal(l.w->part_end[0], 60);
    assert_int_equal(l.w->part_end[1], 120);
    assert_int_equal(l.w->part_end[2], 150);
    assert_int_equal(l.w->part_end[3], 480);
    int plan[8];
    assert_true(keel_plan_from_roster(l.r, l.w, plan));
    int want[] = {1, 0, 2, 2, 3};
    for (int q = 0; q < 5; q++)
        assert_int_equal(plan[q], want[q]);
    assert_int_equal(plan[l.w->first_part[1]], 1);
    assert_int_equal(plan[l.w->first_part[2] - 1], 0);
    assert_int_equal(keel_workload_first_open(l.r, l.w, 0), 2);
    keel_findings found = {0};
    assert_int_equal(keel_plan_check(l.r, l.w, plan, &found, NULL), KEEL_OK);
    /* N2 held both from 07:00 to 08:00, over her limit of 1; nothing else. */
    assert_int_equal(found.n, 1);
    assert_string_equal(found.items[0].rule, "moment_limit");
    assert_non_null(strstr(found.items[0].message, "from 07:00 to 08:00, N2 has 2 patients"));
    keel_findings_fini(&found);
    unload(&l);
}

/* keel_workload_kinds(): nurses share a kind exactly when their columns of
 * eligible are equal, on random tables with many repeated columns. */
static void test_nurse_kinds_match_the_columns(void **state)
{
    (void)state;
    unsigned long long seed = 7;
    for (int round = 0; round < 200; round++) {
        keel_workload *w = calloc(1, sizeof *w);
        assert_non_null(w);
        seed = seed * 6364136223846793005ULL + 1442695040888963407ULL;
        w->npatients = w->npeople = 1 + (size_t)(seed >> 33) % 12;
        w->nnurses = 1 + (size_t)(seed >> 45) % 9;
        assert_true(keel_workload_alloc(w));
        /* Columns drawn from three patterns, so that many repeat. */
        for (size_t n = 0; n < w->nnurses; n++) {
            seed = seed * 6364136223846793005ULL + 1442695040888963407ULL;
            unsigned pattern = (unsigned)(seed >> 40) % 4;
            for (size_t p = 0; p < w->npatients; p++) {
                seed = seed * 6364136223846793005ULL + 1442695040888963407ULL;
                bool random = (seed >> 50) & 1;
                w->eligible[p * w->nnurses + n] = pattern == 3 ? random : ((p + pattern) % 3 != 0);
            }
        }
        assert_true(keel_workload_kinds(w));
        for (size_t a = 0; a < w->nnurses; a++) {
            assert_true(w->column_kind[a] >= 0 && (size_t)w->column_kind[a] <= a);
            for (size_t b = 0; b < w->nnurses; b++) {
                bool equal = true;
                for (size_t p = 0; p < w->npatients; p++)
                    equal =
                        equal && keel_workload_eligible(w, p, a) == keel_workload_eligible(w, p, b);
                assert_int_equal(keel_workload_same_column(w, a, b), equal);
            }
        }
        keel_workload_free(w);
    }
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
        cmocka_unit_test(test_a_short_stay_takes_no_break_of_the_shift),
        cmocka_unit_test(test_the_clock_cuts_stays_into_parts_and_moments),
        cmocka_unit_test(test_limits_hold_at_every_moment_not_on_the_total),
        cmocka_unit_test(test_planned_handoffs_follow_the_nurse_who_leaves),
        cmocka_unit_test(test_every_stretch_of_a_broken_limit_is_listed),
        cmocka_unit_test(test_a_record_holds_the_parts_before_the_rebalance),
        cmocka_unit_test(test_nurse_kinds_match_the_columns),
    };
    return cmocka_run_group_tests_name("workload", tests, NULL, NULL);
}
