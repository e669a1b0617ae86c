/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * test_roster.c - tests of the roster loader (src/roster*.c): what a valid
 * roster turns into, every kind of problem a bad one reports, golden
 * messages for the files under tests/data/bad/, the example rosters, and
 * clean failure when any allocation fails.
 *
 * Usage: test_roster [DATA_DIR [EXAMPLES_DIR]].  Without arguments the
 * directories come from $KEEL_TEST_DATA and $KEEL_TEST_EXAMPLES, else
 * "tests/data" and "examples" (run from the source tree).
 */
#include <setjmp.h>
#include <stdarg.h>
#include <stdbool.h>
#include <stddef.h>
#include <stdint.h>

#include <cmocka.h>

#include <dirent.h>
#include <errno.h>
#include <fcntl.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

#include "alloc.h"
#include "keel/roster.h"
#include "roster_internal.h"
#include "workload_internal.h"

static const char *data_dir = "tests/data";
static const char *examples_dir = "examples";

/* The roster of the issue that defined the format, field for field. */
static const char issue_example[] =
    "version: 1\n"
    "unit:    {name: \"5 North\", type: med-surg}\n"
    "shift:   {label: day, date: 2026-03-14, start: \"07:00\", minutes: 720, break_minutes: 60}\n"
    "policy:\n"
    "  max_patients: 5\n"
    "  acuity_minutes: {1: 90, 2: 150, 3: 210, 4: 300, 5: 420}\n"
    "  extra_minutes: {admission: 90, discharge: 45, isolation: 30}\n"
    "  roles: {charge: {max_patients: 2, duty_minutes: 180}, orientee: {max_patients: 0}}\n"
    "nurses:\n"
    "  - id: N1\n"
    "    name: \"Test Nurse One\"\n"
    "    skills: [tele, chemo]\n"
    "    max_patients: 4\n"
    "    minutes: 480\n"
    "    break_minutes: 30\n"
    "    duty_minutes: 120\n"
    "    role: charge\n"
    "    licence: lpn\n"
    "  - {id: N2, role: orientee, preceptor: N1}\n"
    "  - {id: N3}\n"
    "patients:\n"
    "  - id: \"P-1042\"\n"
    "    bed: \"512A\"\n"
    "    name: \"Test Patient\"\n"
    "    acuity: 3\n"
    "    care_minutes: 320\n"
    "    extras: [admission]\n"
    "    needs: [tele]\n"
    "    nurse: N1\n"
    "    lock: true\n"
    "    avoid: [N3, N2]\n";

static keel_status parse(const char *text, keel_roster **out, keel_error *err)
{
    return keel_roster_parse("roster.yaml", text, strlen(text), out, err);
}

/* Problem i of err as keel_problem_format() prints it. */
static const char *problem_text(const keel_error *err, size_t i)
{
    static char buf[1024];
    assert_true(i < err->nproblems);
    keel_problem_format(&err->problems[i], buf, sizeof buf);
    return buf;
}

/* Parses text, which must fail with exactly the expected problems (a
 * NULL-terminated list of formatted lines). */
static void assert_problems(const char *text, const char *const *expected)
{
    keel_error err;
    keel_roster *roster = (keel_roster *)1;
    size_t n = 0;
    keel_error_init(&err);
    assert_int_equal(parse(text, &roster, &err), KEEL_ERR_INPUT);
    assert_null(roster);
    assert_int_equal(err.status, KEEL_ERR_INPUT);
    while (expected[n])
        n++;
    bool same = err.nproblems == n;
    for (size_t i = 0; same && i < n; i++)
        same = strcmp(problem_text(&err, i), expected[i]) == 0;
    for (size_t i = 0; !same && i < err.nproblems; i++)
        print_message("  %s\n", problem_text(&err, i));
    assert_int_equal(err.nproblems, n);
    for (size_t i = 0; i < n; i++)
        assert_string_equal(problem_text(&err, i), expected[i]);
    keel_error_fini(&err);
}

static char *read_text(const char *path)
{
    FILE *f = fopen(path, "rb");
    size_t used = 0, capacity = 4096;
    char *buf = malloc(capacity);
    assert_non_null(f);
    assert_non_null(buf);
    for (size_t got; (got = fread(buf + used, 1, capacity - used - 1, f)) > 0;) {
        used += got;
        if (capacity - used == 1) {
            capacity *= 2;
            buf = realloc(buf, capacity);
            assert_non_null(buf);
        }
    }
    fclose(f);
    buf[used] = '\0';
    return buf;
}

static void test_roster_loads_the_issue_example(void **state)
{
    keel_roster *r = NULL;
    keel_error err;
    (void)state;
    keel_error_init(&err);
    assert_int_equal(parse(issue_example, &r, &err), KEEL_OK);
    assert_int_equal(err.nproblems, 0);
    assert_non_null(r);

    assert_string_equal(r->path, "roster.yaml");
    assert_string_equal(r->unit.name, "5 North");
    assert_string_equal(r->unit.type, "med-surg");
    assert_string_equal(r->shift.label, "day");
    assert_string_equal(r->shift.date, "2026-03-14");
    assert_int_equal(r->shift.start_minute, 7 * 60);
    assert_int_equal(r->shift.minutes, 720);
    assert_int_equal(r->shift.break_minutes, 60);

    assert_int_equal(r->policy.max_patients, 5);
    assert_int_equal(r->policy.nacuity, 5);
    for (int level = 1; level <= 5; level++)
        assert_int_equal(r->policy.acuity_minutes[level - 1].level, level);
    assert_int_equal(keel_roster_acuity_minutes(r, 1), 90);
    assert_int_equal(keel_roster_acuity_minutes(r, 5), 420);
    assert_int_equal(keel_roster_acuity_minutes(r, 6), KEEL_ABSENT);
    assert_int_equal(r->policy.nextras, 3);
    assert_string_equal(r->policy.extra_minutes[0].name, "admission");
    assert_string_equal(r->policy.extra_minutes[2].name, "isolation");
    assert_int_equal(keel_roster_extra_minutes(r, "discharge"), 45);
    assert_int_equal(keel_roster_extra_minutes(r, "transfer"), KEEL_ABSENT);
    assert_int_equal(r->policy.roles[KEEL_ROLE_CHARGE].max_patients, 2);
    assert_int_equal(r->policy.roles[KEEL_ROLE_CHARGE].duty_minutes, 180);
    assert_int_equal(r->policy.roles[KEEL_ROLE_ORIENTEE].max_patients, 0);
    assert_int_equal(r->policy.roles[KEEL_ROLE_ORIENTEE].duty_minutes, KEEL_ABSENT);
    assert_int_equal(r->policy.roles[KEEL_ROLE_STAFF].max_patients, KEEL_ABSENT);
    assert_int_equal(r->policy.roles[KEEL_ROLE_FLOAT].duty_minutes, KEEL_ABSENT);

    assert_int_equal(r->nnurses, 3);
    const keel_nurse *n = &r->nurses[0];
    assert_string_equal(n->id, "N1");
    assert_string_equal(n->name, "Test Nurse One");
    assert_int_equal(n->nskills, 2);
    assert_string_equal(n->skills[0], "tele");
    assert_string_equal(n->skills[1], "chemo");
    assert_int_equal(n->max_patients, 4);
    assert_int_equal(n->minutes, 480);
    assert_int_equal(n->break_minutes, 30);
    assert_int_equal(n->duty_minutes, 120);
    assert_int_equal(n->role, KEEL_ROLE_CHARGE);
    assert_int_equal(n->licence, KEEL_LICENCE_LPN);
    assert_null(n->preceptor);
    assert_int_equal(n->mark.line, 10);
    assert_int_equal(n->mark.column, 5);
    assert_int_equal(r->nurses[1].role, KEEL_ROLE_ORIENTEE);
    assert_int_equal(r->nurses[1].licence, KEEL_LICENCE_RN);
    assert_string_equal(r->nurses[1].preceptor, "N1");
    assert_int_equal(r->nurses[2].role, KEEL_ROLE_STAFF);

    assert_int_equal(r->npatients, 1);
    const keel_patient *p = &r->patients[0];
    assert_string_equal(p->id, "P-1042");
    assert_string_equal(p->bed, "512A");
    assert_string_equal(p->name, "Test Patient");
    assert_int_equal(p->acuity, 3);
    assert_int_equal(p->care_minutes, 320);
    assert_int_equal(p->nextras, 1);
    assert_string_equal(p->extras[0], "admission");
    assert_int_equal(p->nneeds, 1);
    assert_string_equal(p->needs[0], "tele");
    assert_string_equal(p->nurse, "N1");
    assert_true(p->lock);
    assert_int_equal(p->navoid, 2);
    assert_string_equal(p->avoid[0], "N3");
    assert_string_equal(p->avoid[1], "N2");
    assert_int_equal(p->mark.line, 22);

    assert_int_equal(keel_roster_find_nurse(r, "N1"), 0);
    assert_int_equal(keel_roster_find_nurse(r, "N2"), 1);
    assert_int_equal(keel_roster_find_nurse(r, "N4"), -1);
    keel_roster_free(r);
    keel_error_fini(&err);
}

static void test_roster_leaves_unset_fields_absent(void **state)
{
    keel_roster *r = NULL;
    (void)state;
    assert_int_equal(parse("shift: {minutes: 600}\n"
                           "nurses: [{id: A}]\n"
                           "patients: [{id: B, care_minutes: 0}]\n",
                           &r, NULL),
                     KEEL_OK);
    assert_null(r->unit.name);
    assert_null(r->shift.date);
    assert_int_equal(r->shift.start_minute, KEEL_ABSENT);
    assert_int_equal(r->shift.break_minutes, KEEL_ABSENT);
    assert_int_equal(r->policy.max_patients, KEEL_ABSENT);
    assert_int_equal(r->policy.nacuity, 0);
    assert_int_equal(r->nurses[0].max_patients, KEEL_ABSENT);
    assert_int_equal(r->nurses[0].minutes, KEEL_ABSENT);
    assert_int_equal(r->nurses[0].break_minutes, KEEL_ABSENT);
    assert_int_equal(r->nurses[0].duty_minutes, KEEL_ABSENT);
    assert_int_equal(r->nurses[0].nskills, 0);
    assert_null(r->patients[0].name);
    assert_null(r->patients[0].nurse);
    assert_int_equal(r->patients[0].acuity, KEEL_ABSENT);
    assert_int_equal(r->patients[0].care_minutes, 0);
    assert_null(r->unit.type);
    assert_int_equal(r->nurses[0].role, KEEL_ROLE_STAFF);
    assert_int_equal(r->nurses[0].licence, KEEL_LICENCE_RN);
    assert_null(r->nurses[0].preceptor);
    assert_false(r->patients[0].lock);
    assert_int_equal(r->patients[0].navoid, 0);
    assert_null(r->patients[0].avoid);
    for (int role = 0; role < KEEL_NROLES; role++) {
        assert_int_equal(r->policy.roles[role].max_patients, KEEL_ABSENT);
        assert_int_equal(r->policy.roles[role].duty_minutes, KEEL_ABSENT);
    }
    assert_false(r->clock);
    assert_int_equal(r->nurses[0].start, KEEL_ABSENT);
    assert_int_equal(r->nurses[0].end, KEEL_ABSENT);
    assert_int_equal(r->nurses[0].nbreaks, 0);
    assert_null(r->nurses[0].breaks);
    assert_null(r->nurses[0].covers);
    assert_int_equal(r->patients[0].arrives_at, KEEL_ABSENT);
    assert_int_equal(r->patients[0].leaves_at, KEEL_ABSENT);
    assert_false(r->patients[0].expected);
    assert_int_equal(r->patients[0].nhandoffs, 0);
    assert_null(r->patients[0].handoffs);
    keel_roster_free(r);
}

static void test_roster_names_every_role_as_written(void **state)
{
    static const char *const names[KEEL_NROLES] = {"staff", "charge",   "resource",
                                                   "float", "orientee", "relief"};
    (void)state;
    for (int role = 0; role < KEEL_NROLES; role++) {
        char text[256];
        keel_roster *r = NULL;
        assert_string_equal(keel_role_name((keel_role)role), names[role]);
        snprintf(text, sizeof text,
                 "shift: {minutes: 600}\n"
                 "policy: {roles: {%s: {duty_minutes: %d}}}\n"
                 "nurses: [{id: A, role: %s%s}, {id: B}]\n"
                 "patients: [{id: P, care_minutes: 60, lock: false}]\n",
                 names[role], 10 + role, names[role],
                 role == KEEL_ROLE_ORIENTEE ? ", preceptor: B" : "");
        assert_int_equal(parse(text, &r, NULL), KEEL_OK);
        assert_int_equal(r->nurses[0].role, role);
        assert_int_equal(r->policy.roles[role].duty_minutes, 10 + role);
        assert_int_equal(r->policy.roles[role].max_patients, KEEL_ABSENT);
        assert_false(r->patients[0].lock);
        keel_roster_free(r);
    }
    assert_string_equal(keel_role_name((keel_role)KEEL_NROLES), "unknown");
}

static void test_roster_accepts_only_the_documented_unit_types(void **state)
{
    static const char *const types[] = {
        "icu",       "step-down", "telemetry",   "med-surg",       "pediatrics",
        "emergency", "oncology",  "psychiatric", "labor-delivery", "postpartum",
        "pacu",      "burn",      "nicu",        "other"};
    static const char *const expected[] = {
        "roster.yaml:1:14: unit.type: unknown unit type 'telemetri'; did you mean 'telemetry'? "
        "expected one of icu, step-down, telemetry, med-surg, pediatrics, emergency, oncology, "
        "psychiatric, labor-delivery, postpartum, pacu, burn, nicu, other",
        "roster.yaml:2:17: nurses[0].role: found a sequence; expected one of staff, charge, "
        "resource, float, orientee, relief",
        "roster.yaml:2:31: nurses[0].licence: unknown licence 'RN'; did you mean 'rn'? expected "
        "one of rn, lpn",
        "roster.yaml:2:53: nurses[1].licence: 'Tech' names unlicensed staff, who do not belong "
        "under nurses; expected one of rn, lpn",
        "roster.yaml:3:17: policy.roles: found 'none'; expected a mapping from role to its "
        "limits, like {charge: {max_patients: 2}}",
        NULL};
    (void)state;
    for (size_t i = 0; i < sizeof types / sizeof types[0]; i++) {
        char text[256];
        keel_roster *r = NULL;
        snprintf(text, sizeof text,
                 "unit: {type: %s}\nshift: {minutes: 600}\n"
                 "nurses: [{id: A}]\npatients: [{id: P, care_minutes: 60}]\n",
                 types[i]);
        assert_int_equal(parse(text, &r, NULL), KEEL_OK);
        assert_string_equal(r->unit.type, types[i]);
        keel_roster_free(r);
    }
    assert_problems("unit: {type: telemetri}\n"
                    "nurses: [{role: [a], licence: RN, id: A}, {licence: Tech, id: B}]\n"
                    "policy: {roles: none}\n"
                    "shift: {minutes: 600}\n"
                    "patients: [{id: P, care_minutes: 60}]\n",
                    expected);
}

static void test_roster_checks_preceptors_locks_and_avoid_lists(void **state)
{
    static const char *const expected[] = {
        "roster.yaml:2:10: nurses[0].preceptor: missing; an orientee needs a preceptor, the id "
        "of a nurse on this roster who is not an orientee",
        "roster.yaml:3:45: nurses[1].preceptor: nurse 'A' is an orientee too; expected a "
        "preceptor who is not an orientee",
        "roster.yaml:4:29: nurses[2].preceptor: a preceptor is given but the role is resource; "
        "expected role: orientee, or no preceptor",
        "roster.yaml:6:37: patients[0].lock: lock: true without a nurse; a locked patient needs "
        "nurse: the id of the nurse who keeps the patient",
        "roster.yaml:7:38: patients[1].nurse: the patient is locked to 'C', who is on its avoid "
        "list (avoid[1] on line 7); expected a nurse the patient does not avoid",
        "roster.yaml:7:61: patients[1].avoid[0]: no nurse 'Z' on this roster",
        NULL};
    (void)state;
    assert_problems("shift: {minutes: 600}\n"
                    "nurses: [{id: A, role: orientee},\n"
                    "         {id: B, role: orientee, preceptor: A},\n"
                    "         {id: C, preceptor: A, role: resource}]\n"
                    "patients:\n"
                    "  - {id: P, care_minutes: 60, lock: true}\n"
                    "  - {id: Q, care_minutes: 60, nurse: C, lock: true, avoid: [Z, C]}\n",
                    expected);
}

static void test_roster_accepts_unquoted_times(void **state)
{
    static const struct {
        const char *start;
        int minute;
    } cases[] = {{"07:00", 420},  {"7:30", 450},       {"00:00", 0},
                 {"23:59", 1439}, {"\"19:00\"", 1140}, {"'06:45'", 405}};
    (void)state;
    for (size_t i = 0; i < sizeof cases / sizeof cases[0]; i++) {
        char text[256];
        keel_roster *r = NULL;
        snprintf(text, sizeof text,
                 "shift: {start: %s, date: 2028-02-29, minutes: 720}\n"
                 "nurses: [{id: N1}]\npatients: [{id: P1, care_minutes: 60}]\n",
                 cases[i].start);
        assert_int_equal(parse(text, &r, NULL), KEEL_OK);
        assert_int_equal(r->shift.start_minute, cases[i].minute);
        assert_string_equal(r->shift.date, "2028-02-29");
        keel_roster_free(r);
    }
}

static void test_roster_rejects_times_and_dates_that_do_not_exist(void **state)
{
    static const char *const starts[] = {"24:00", "12:60",    "7",    "07:5",
                                         "-1:00", "07:00:00", "noon", "[7, 0]"};
    static const char *const dates[] = {"2026-02-29", "2100-02-29", "2026-04-31", "2026-13-01",
                                        "2026-00-10", "0000-01-01", "26-03-14",   "2026/03/14"};
    (void)state;
    for (size_t i = 0; i < sizeof starts / sizeof starts[0]; i++) {
        char text[256];
        keel_error err;
        keel_roster *r = NULL;
        keel_error_init(&err);
        snprintf(text, sizeof text,
                 "shift: {start: %s, minutes: 720}\n"
                 "nurses: [{id: N1}]\npatients: [{id: P1, care_minutes: 60}]\n",
                 starts[i]);
        assert_int_equal(parse(text, &r, &err), KEEL_ERR_INPUT);
        assert_int_equal(err.nproblems, 1);
        assert_string_equal(err.problems[0].key, "shift.start");
        assert_non_null(strstr(err.problems[0].message, "expected a time of day"));
        keel_error_fini(&err);
    }
    for (size_t i = 0; i < sizeof dates / sizeof dates[0]; i++) {
        char text[256];
        keel_error err;
        keel_roster *r = NULL;
        keel_error_init(&err);
        snprintf(text, sizeof text,
                 "shift: {date: %s, minutes: 720}\n"
                 "nurses: [{id: N1}]\npatients: [{id: P1, care_minutes: 60}]\n",
                 dates[i]);
        assert_int_equal(parse(text, &r, &err), KEEL_ERR_INPUT);
        assert_int_equal(err.nproblems, 1);
        assert_string_equal(err.problems[0].key, "shift.date");
        keel_error_fini(&err);
    }
}

static void test_roster_keeps_numeric_ids_as_text(void **state)
{
    keel_roster *r = NULL;
    (void)state;
    assert_int_equal(parse("shift: {minutes: 720}\n"
                           "nurses: [{id: 12}, {id: 007}]\n"
                           "patients: [{id: 12, bed: 4.10, care_minutes: 30, nurse: 007}]\n",
                           &r, NULL),
                     KEEL_OK);
    assert_string_equal(r->nurses[0].id, "12");
    assert_string_equal(r->nurses[1].id, "007");
    assert_string_equal(r->patients[0].id, "12");
    assert_string_equal(r->patients[0].bed, "4.10");
    assert_int_equal(keel_roster_find_nurse(r, r->patients[0].nurse), 1);
    keel_roster_free(r);
}

static void test_roster_stores_acuity_levels_sorted(void **state)
{
    keel_roster *r = NULL;
    (void)state;
    assert_int_equal(parse("shift: {minutes: 720}\n"
                           "policy: {acuity_minutes: {5: 400, 0: 0, 3: 200, 99: 1440}}\n"
                           "nurses: [{id: N1}]\n"
                           "patients: [{id: P1, acuity: 0}, {id: P2, acuity: 99}]\n",
                           &r, NULL),
                     KEEL_OK);
    assert_int_equal(r->policy.nacuity, 4);
    static const int levels[] = {0, 3, 5, 99}, minutes[] = {0, 200, 400, 1440};
    for (size_t i = 0; i < 4; i++) {
        assert_int_equal(r->policy.acuity_minutes[i].level, levels[i]);
        assert_int_equal(r->policy.acuity_minutes[i].minutes, minutes[i]);
        assert_int_equal(keel_roster_acuity_minutes(r, levels[i]), minutes[i]);
    }
    keel_roster_free(r);
}

static void test_roster_reports_every_problem_in_a_file(void **state)
{
    static const char *const expected[] = {
        "roster.yaml:1:18: shift.minutes: 0 is out of range; expected an integer from 1 to 1440",
        "roster.yaml:4:5: nurses[0].skils: unknown key; did you mean 'skills'?",
        "roster.yaml:5:9: nurses[1].id: nurse id 'N1' is already used on line 3; expected a "
        "unique id",
        "roster.yaml:7:5: patients[0].id: missing; every patient needs a unique id",
        "roster.yaml:7:13: patients[0].acuity: level 7 is not in policy.acuity_minutes (1-3)",
        "roster.yaml:8:5: patients[1].acuity: missing; every patient needs acuity, "
        "care_minutes or nas",
        "roster.yaml:8:21: patients[1].nurse: no nurse 'N9' on this roster",
        NULL};
    (void)state;
    assert_problems("shift: {minutes: 0}\n"
                    "nurses:\n"
                    "  - id: N1\n"
                    "    skils: [tele]\n"
                    "  - id: N1\n"
                    "patients:\n"
                    "  - acuity: 7\n"
                    "  - {id: P2, nurse: N9}\n"
                    "policy: {acuity_minutes: {1: 60, 2: 90, 3: 120}}\n",
                    expected);
}

static void test_roster_suggests_the_nearest_key_only_when_close(void **state)
{
    static const char *const expected[] = {
        "roster.yaml:1:1: shfit: unknown key; did you mean 'shift'?",
        "roster.yaml:1:1: shift: missing; every roster needs a shift with its length in minutes",
        "roster.yaml:2:19: nurses[0].nmae: unknown key; did you mean 'name'?",
        "roster.yaml:2:28: nurses[0].Skills: unknown key; did you mean 'skills'?",
        "roster.yaml:2:40: nurses[0].colour: unknown key; expected one of id, name, skills, "
        "max_patients, min_patients, minutes, break_minutes, duty_minutes, role, licence, "
        "preceptor, start, end, breaks, covers",
        "roster.yaml:3:12: patients[0].acuity: missing; every patient needs acuity, "
        "care_minutes or nas",
        "roster.yaml:3:21: patients[0].acuty: unknown key; did you mean 'acuity'?",
        NULL};
    (void)state;
    assert_problems("shfit: {minutes: 720}\n"
                    "nurses: [{id: N1, nmae: A, Skills: [], colour: blue}]\n"
                    "patients: [{id: P1, acuty: 2}]\n"
                    "policy: {acuity_minutes: {2: 60}}\n",
                    expected);
}

static void test_roster_expects_integers_without_quotes(void **state)
{
    static const char *const expected[] = {
        "roster.yaml:1:19: shift.minutes: found '3.5'; expected an integer",
        "roster.yaml:2:33: nurses[0].max_patients: found 'three'; expected an integer",
        "roster.yaml:2:54: nurses[0].duty_minutes: found 'true'; expected an integer",
        "roster.yaml:3:35: patients[0].care_minutes: found the string \"60\"; expected an integer",
        "roster.yaml:4:35: patients[1].care_minutes: found no value; expected an integer",
        "roster.yaml:5:35: patients[2].care_minutes: found '0x10'; expected an integer",
        NULL};
    (void)state;
    assert_problems("shift: {minutes:  3.5}\n"
                    "nurses: [{id: N1, max_patients: three, duty_minutes: true}]\n"
                    "patients: [{id: P1, care_minutes: \"60\"},\n"
                    "           {id: P2, care_minutes: ~},\n"
                    "           {id: P3, care_minutes: 0x10}]\n",
                    expected);
}

/* One range case: the fragments that replace the defaults, and the key of
 * the one problem expected (NULL: the roster is valid). */
typedef struct range_case {
    const char *shift, *policy, *nurse, *patient, *bad_key;
} range_case;

static void check_range_case(const range_case *c)
{
    char text[512];
    keel_error err;
    keel_roster *r = NULL;
    keel_error_init(&err);
    snprintf(text, sizeof text,
             "shift: {%s}\npolicy: {%s}\nnurses:\n  - {id: N1, %s}\npatients:\n  - {id: P1, %s}\n",
             c->shift ? c->shift : "minutes: 720",
             c->policy ? c->policy : "acuity_minutes: {1: 100}", c->nurse ? c->nurse : "skills: []",
             c->patient ? c->patient : "acuity: 1");
    keel_status rc = parse(text, &r, &err);
    bool as_expected = c->bad_key ? rc == KEEL_ERR_INPUT && err.nproblems == 1 &&
                                        strcmp(err.problems[0].key, c->bad_key) == 0
                                  : rc == KEEL_OK;
    for (size_t i = 0; !as_expected && i < err.nproblems; i++)
        print_message("%s-> %s\n", text, problem_text(&err, i));
    if (!c->bad_key) {
        assert_int_equal(rc, KEEL_OK);
        keel_roster_free(r);
    } else {
        assert_int_equal(rc, KEEL_ERR_INPUT);
        assert_int_equal(err.nproblems, 1);
        assert_string_equal(err.problems[0].key, c->bad_key);
    }
    keel_error_fini(&err);
}

static void test_roster_enforces_the_documented_ranges(void **state)
{
    static const range_case cases[] = {
        {.shift = "minutes: 1"},
        {.shift = "minutes: 1440, break_minutes: 1439"},
        {.shift = "minutes: 0", .bad_key = "shift.minutes"},
        {.shift = "minutes: 1441", .bad_key = "shift.minutes"},
        {.shift = "minutes: -720", .bad_key = "shift.minutes"},
        {.shift = "minutes: 99999999999999999999", .bad_key = "shift.minutes"},
        {.shift = "minutes: 720, break_minutes: 0"},
        {.shift = "minutes: 720, break_minutes: 719"},
        {.shift = "minutes: 720, break_minutes: 720", .bad_key = "shift.break_minutes"},
        {.shift = "minutes: 720, break_minutes: -1", .bad_key = "shift.break_minutes"},
        {.policy = "max_patients: 0, acuity_minutes: {1: 1}"},
        {.policy = "max_patients: 99, acuity_minutes: {1: 1}"},
        {.policy = "max_patients: 100, acuity_minutes: {1: 1}", .bad_key = "policy.max_patients"},
        {.policy = "acuity_minutes: {0: 0, 1: 1440, 99: 5}"},
        {.policy = "acuity_minutes: {1: 1441}", .bad_key = "policy.acuity_minutes.1"},
        {.policy = "acuity_minutes: {1: -1}", .bad_key = "policy.acuity_minutes.1"},
        {.policy = "acuity_minutes: {1: 5, 100: 5}", .bad_key = "policy.acuity_minutes.100"},
        {.policy = "acuity_minutes: {1: 5, -1: 5}", .bad_key = "policy.acuity_minutes.-1"},
        {.policy = "acuity_minutes: {1: 5}, extra_minutes: {a: 0, b: 1440}"},
        {.policy = "acuity_minutes: {1: 5}, extra_minutes: {a: 1441}",
         .bad_key = "policy.extra_minutes.a"},
        {.nurse = "max_patients: 0"},
        {.nurse = "max_patients: 99"},
        {.nurse = "max_patients: 100", .bad_key = "nurses[0].max_patients"},
        {.nurse = "minutes: 1, break_minutes: 0"},
        {.nurse = "minutes: 720"},
        {.nurse = "minutes: 721", .bad_key = "nurses[0].minutes"},
        {.nurse = "minutes: 0", .bad_key = "nurses[0].minutes"},
        {.nurse = "minutes: 60, break_minutes: 59"},
        {.nurse = "minutes: 60, break_minutes: 60", .bad_key = "nurses[0].break_minutes"},
        {.shift = "minutes: 720, break_minutes: 60",
         .nurse = "minutes: 60",
         .bad_key = "nurses[0].minutes"},
        {.shift = "minutes: 720, break_minutes: 60", .nurse = "minutes: 60, break_minutes: 15"},
        {.nurse = "duty_minutes: 0"},
        {.nurse = "minutes: 480, duty_minutes: 480"},
        {.nurse = "minutes: 480, duty_minutes: 481", .bad_key = "nurses[0].duty_minutes"},
        {.nurse = "duty_minutes: 1441", .bad_key = "nurses[0].duty_minutes"},
        {.patient = "acuity: 1, care_minutes: 0"},
        {.patient = "care_minutes: 1440"},
        {.patient = "care_minutes: 1441", .bad_key = "patients[0].care_minutes"},
        {.patient = "acuity: 100", .bad_key = "patients[0].acuity"},
        {.patient = "acuity: -1", .bad_key = "patients[0].acuity"},
        {.patient = "acuity: 2", .bad_key = "patients[0].acuity"},
    };
    (void)state;
    for (size_t i = 0; i < sizeof cases / sizeof cases[0]; i++)
        check_range_case(&cases[i]);
}

/* A night shift that crosses midnight, with every clock key. */
static const char night_example[] =
    "shift: {label: night, start: \"19:00\", minutes: 720, break_minutes: 30}\n"
    "policy: {roles: {relief: {max_patients: 1}}}\n"
    "nurses:\n"
    "  - {id: N1, covers: N2}\n"
    "  - id: N2\n"
    "    start: \"23:00\"\n"
    "    end: 07:00\n"
    "    minutes: 480\n"
    "    covers: N1\n"
    "    breaks: [{at: \"02:00\", minutes: 30}, {at: \"04:30\", minutes: 15}]\n"
    "    break_minutes: 45\n"
    "  - {id: N3, end: \"03:00\", role: relief}\n"
    "patients:\n"
    "  - {id: P1, care_minutes: 120, nurse: N3, handoffs: [N2, N1], leaves_at: \"05:00\"}\n"
    "  - {id: P2, care_minutes: 90, arrives_at: \"02:00\"}\n"
    "expected_admissions:\n"
    "  - {id: A1, at: \"22:15\", care_minutes: 150, needs: [tele]}\n"
    "  - {id: A2, at: \"19:00\", care_minutes: 60, leaves_at: \"07:00\"}\n";

static void test_roster_reads_times_against_a_shift_that_crosses_midnight(void **state)
{
    keel_roster *r = NULL;
    keel_error err;
    (void)state;
    keel_error_init(&err);
    assert_int_equal(parse(night_example, &r, &err), KEEL_OK);
    assert_true(r->clock);
    assert_int_equal(r->policy.roles[KEEL_ROLE_RELIEF].max_patients, 1);

    /* 19:00 + 720 minutes: 23:00 is 240 minutes in, 02:00 is 420, 07:00 the end (720). */
    const keel_nurse *n1 = &r->nurses[0], *n2 = &r->nurses[1], *n3 = &r->nurses[2];
    assert_int_equal(n1->start, KEEL_ABSENT);
    assert_int_equal(n1->end, KEEL_ABSENT);
    assert_string_equal(n1->covers, "N2");
    assert_int_equal(n2->start, 240);
    assert_int_equal(n2->end, 720);
    assert_int_equal(n2->minutes, 480);
    assert_string_equal(n2->covers, "N1");
    assert_int_equal(n2->nbreaks, 2);
    assert_int_equal(n2->breaks[0].at, 420);
    assert_int_equal(n2->breaks[0].minutes, 30);
    assert_int_equal(n2->breaks[0].mark.line, 10);
    assert_int_equal(n2->breaks[1].at, 570);
    assert_int_equal(n2->breaks[1].minutes, 15);
    assert_int_equal(n2->break_minutes, 45);
    assert_int_equal(n3->start, KEEL_ABSENT);
    assert_int_equal(n3->end, 480);
    assert_int_equal(n3->role, KEEL_ROLE_RELIEF);
    assert_string_equal(keel_role_name(KEEL_ROLE_RELIEF), "relief");
    /* Defaults stay absent: the workload module applies them. */
    assert_int_equal(n3->minutes, KEEL_ABSENT);
    assert_int_equal(n3->break_minutes, KEEL_ABSENT);

    /* Expected admissions come after the patients, in file order. */
    assert_int_equal(r->npatients, 4);
    const keel_patient *p1 = &r->patients[0], *p2 = &r->patients[1];
    const keel_patient *a1 = &r->patients[2], *a2 = &r->patients[3];
    assert_false(p1->expected);
    assert_int_equal(p1->arrives_at, KEEL_ABSENT);
    assert_int_equal(p1->leaves_at, 600);
    assert_int_equal(p1->nhandoffs, 2);
    assert_string_equal(p1->handoffs[0], "N2");
    assert_string_equal(p1->handoffs[1], "N1");
    assert_int_equal(p2->arrives_at, 420);
    assert_int_equal(p2->leaves_at, KEEL_ABSENT);
    assert_string_equal(a1->id, "A1");
    assert_true(a1->expected);
    assert_int_equal(a1->arrives_at, 195);
    assert_int_equal(a1->care_minutes, 150);
    assert_string_equal(a1->needs[0], "tele");
    assert_int_equal(a1->mark.line, 17);
    assert_string_equal(a2->id, "A2");
    assert_true(a2->expected);
    assert_int_equal(a2->arrives_at, 0);
    assert_int_equal(a2->leaves_at, 720);
    keel_roster_free(r);
    keel_error_fini(&err);
}

/* The offset of one time key: the shift and the nurse or patient fragment
 * that gives it, and the field to read back. */
typedef struct offset_case {
    const char *shift, *nurse, *patient;
    int start, end, arrives_at, leaves_at; /* expected; KEEL_ABSENT when not given */
} offset_case;

static void test_roster_turns_times_into_minutes_after_the_shift_start(void **state)
{
    static const offset_case cases[] = {
        /* Night shift across midnight. */
        {"start: \"19:00\", minutes: 720", "start: \"02:00\"", NULL, 420, KEEL_ABSENT, KEEL_ABSENT,
         KEEL_ABSENT},
        {"start: \"19:00\", minutes: 720", "end: \"07:00\"", NULL, KEEL_ABSENT, 720, KEEL_ABSENT,
         KEEL_ABSENT},
        {"start: \"19:00\", minutes: 720", "start: \"19:00\", end: \"00:00\"", NULL, 0, 300,
         KEEL_ABSENT, KEEL_ABSENT},
        {"start: \"19:00\", minutes: 720", NULL, "arrives_at: \"23:59\", leaves_at: \"00:01\"",
         KEEL_ABSENT, KEEL_ABSENT, 299, 301},
        /* Day shift, unquoted times. */
        {"start: 07:00, minutes: 720", "start: 11:00, end: 15:30", NULL, 240, 510, KEEL_ABSENT,
         KEEL_ABSENT},
        {"start: 07:00, minutes: 720", NULL, "leaves_at: 19:00", KEEL_ABSENT, KEEL_ABSENT,
         KEEL_ABSENT, 720},
        /* A 24-hour shift: an end-like time at the start time is its end
         * (offset 1440); a start-like one is its start. */
        {"start: \"07:00\", minutes: 1440", "start: \"07:00\", end: \"07:00\"", NULL, 0, 1440,
         KEEL_ABSENT, KEEL_ABSENT},
        {"start: \"07:00\", minutes: 1440", "end: \"06:59\"", NULL, KEEL_ABSENT, 1439, KEEL_ABSENT,
         KEEL_ABSENT},
        {"start: \"07:00\", minutes: 1440", NULL, "arrives_at: \"07:00\", leaves_at: \"07:00\"",
         KEEL_ABSENT, KEEL_ABSENT, 0, 1440},
        /* A shift starting at midnight. */
        {"start: \"00:00\", minutes: 480", "end: \"08:00\"", NULL, KEEL_ABSENT, 480, KEEL_ABSENT,
         KEEL_ABSENT},
    };
    (void)state;
    for (size_t i = 0; i < sizeof cases / sizeof cases[0]; i++) {
        const offset_case *c = &cases[i];
        char text[512];
        keel_error err;
        keel_roster *r = NULL;
        keel_error_init(&err);
        snprintf(text, sizeof text,
                 "shift: {%s}\nnurses: [{id: N1, %s}]\n"
                 "patients: [{id: P1, care_minutes: 60, %s}]\n",
                 c->shift, c->nurse ? c->nurse : "skills: []", c->patient ? c->patient : "bed: B");
        keel_status rc = parse(text, &r, &err);
        for (size_t k = 0; k < err.nproblems; k++)
            print_message("%s-> %s\n", text, problem_text(&err, k));
        assert_int_equal(rc, KEEL_OK);
        assert_true(r->clock);
        assert_int_equal(r->nurses[0].start, c->start);
        assert_int_equal(r->nurses[0].end, c->end);
        assert_int_equal(r->patients[0].arrives_at, c->arrives_at);
        assert_int_equal(r->patients[0].leaves_at, c->leaves_at);
        keel_roster_free(r);
        keel_error_fini(&err);
    }
}

/* The night shift of the clock checks: 19:00 to 07:00. */
#define NIGHT "start: \"19:00\", minutes: 720"

static void test_roster_checks_the_clock_keys(void **state)
{
    static const range_case cases[] = {
        /* Times need shift.start and must lie in the shift. */
        {.nurse = "start: \"08:00\"", .bad_key = "nurses[0].start"},
        {.patient = "acuity: 1, arrives_at: \"08:00\"", .bad_key = "patients[0].arrives_at"},
        {.shift = NIGHT, .nurse = "start: \"07:01\"", .bad_key = "nurses[0].start"},
        {.shift = NIGHT, .nurse = "end: \"18:59\"", .bad_key = "nurses[0].end"},
        {.shift = NIGHT, .nurse = "start: \"24:00\"", .bad_key = "nurses[0].start"},
        {.shift = NIGHT, .nurse = "end: [07, 00]", .bad_key = "nurses[0].end"},
        /* start < end, with the shift's start and end as defaults.  A nurse
         * who starts as the shift ends, or ends as it starts, is not on it
         * (common practice, no source). */
        {.shift = NIGHT, .nurse = "start: \"07:00\"", .bad_key = "nurses[0].start"},
        {.shift = NIGHT, .nurse = "end: \"19:00\"", .bad_key = "nurses[0].end"},
        {.shift = NIGHT, .nurse = "start: \"01:00\", end: \"01:00\"", .bad_key = "nurses[0].end"},
        {.shift = NIGHT, .nurse = "start: \"06:59\""},
        {.shift = NIGHT, .nurse = "end: \"19:01\""},
        /* minutes, when given with start or end, is the time between. */
        {.shift = NIGHT, .nurse = "start: \"23:00\", minutes: 480"},
        {.shift = NIGHT, .nurse = "start: \"23:00\", minutes: 479", .bad_key = "nurses[0].minutes"},
        {.shift = NIGHT, .nurse = "end: \"23:00\", minutes: 240"},
        {.shift = NIGHT, .nurse = "end: \"23:00\", minutes: 720", .bad_key = "nurses[0].minutes"},
        /* The shift's break must still leave her some time. */
        {.shift = NIGHT ", break_minutes: 60",
         .nurse = "start: \"06:00\"",
         .bad_key = "nurses[0].start"},
        {.shift = NIGHT ", break_minutes: 60", .nurse = "start: \"06:00\", break_minutes: 30"},
        {.shift = NIGHT,
         .nurse = "end: \"20:00\", duty_minutes: 61",
         .bad_key = "nurses[0].duty_minutes"},
        /* Breaks: inside [start, end), half-open (common practice, no
         * source); in time order; not overlapping; minutes > 0. */
        {.shift = NIGHT, .nurse = "breaks: [{at: \"19:00\", minutes: 30}]"},
        {.shift = NIGHT, .nurse = "breaks: [{at: \"06:30\", minutes: 30}]"},
        {.shift = NIGHT,
         .nurse = "breaks: [{at: \"06:31\", minutes: 30}]",
         .bad_key = "nurses[0].breaks[0].minutes"},
        {.shift = NIGHT,
         .nurse = "end: \"01:00\", breaks: [{at: \"01:00\", minutes: 1}]",
         .bad_key = "nurses[0].breaks[0].at"},
        {.shift = NIGHT,
         .nurse = "start: \"20:00\", breaks: [{at: \"19:59\", minutes: 1}]",
         .bad_key = "nurses[0].breaks[0].at"},
        {.shift = NIGHT,
         .nurse = "breaks: [{at: \"23:00\", minutes: 30}, {at: \"23:30\", minutes: 30}]"},
        {.shift = NIGHT,
         .nurse = "breaks: [{at: \"23:00\", minutes: 30}, {at: \"23:29\", minutes: 30}]",
         .bad_key = "nurses[0].breaks[1].at"},
        {.shift = NIGHT,
         .nurse = "breaks: [{at: \"01:00\", minutes: 30}, {at: \"23:00\", minutes: 30}]",
         .bad_key = "nurses[0].breaks[1].at"},
        {.shift = NIGHT,
         .nurse = "breaks: [{at: \"01:00\", minutes: 0}]",
         .bad_key = "nurses[0].breaks[0].minutes"},
        {.shift = NIGHT, .nurse = "breaks: [{minutes: 30}]", .bad_key = "nurses[0].breaks[0].at"},
        {.shift = NIGHT,
         .nurse = "breaks: [{at: \"01:00\"}]",
         .bad_key = "nurses[0].breaks[0].minutes"},
        {.shift = NIGHT, .nurse = "breaks: []", .bad_key = "nurses[0].breaks"},
        {.shift = NIGHT,
         .nurse = "breaks: [{at: \"01:00\", minutes: 30, for: lunch}]",
         .bad_key = "nurses[0].breaks[0].for"},
        {.nurse = "breaks: [{at: \"01:00\", minutes: 30}]", .bad_key = "nurses[0].breaks[0].at"},
        /* break_minutes, when given with breaks, is their total. */
        {.shift = NIGHT,
         .nurse = "break_minutes: 45, breaks: [{at: \"23:00\", minutes: 30}, "
                  "{at: \"03:00\", minutes: 15}]"},
        {.shift = NIGHT,
         .nurse = "break_minutes: 30, breaks: [{at: \"23:00\", minutes: 30}, "
                  "{at: \"03:00\", minutes: 15}]",
         .bad_key = "nurses[0].break_minutes"},
        {.shift = NIGHT,
         .nurse = "end: \"19:30\", breaks: [{at: \"19:00\", minutes: 30}]",
         .bad_key = "nurses[0].breaks"},
        /* A buddy is another nurse of the roster. */
        {.nurse = "covers: N1", .bad_key = "nurses[0].covers"},
        {.nurse = "covers: N2", .bad_key = "nurses[0].covers"},
        {.nurse = "covers: \"\"", .bad_key = "nurses[0].covers"},
        /* A patient arrives before leaving; one who arrives as the shift
         * ends or leaves as it starts is not on it (common practice, no
         * source). */
        {.shift = NIGHT, .patient = "acuity: 1, arrives_at: \"23:00\", leaves_at: \"23:01\""},
        {.shift = NIGHT,
         .patient = "acuity: 1, arrives_at: \"23:00\", leaves_at: \"23:00\"",
         .bad_key = "patients[0].leaves_at"},
        {.shift = NIGHT,
         .patient = "acuity: 1, arrives_at: \"07:00\"",
         .bad_key = "patients[0].arrives_at"},
        {.shift = NIGHT,
         .patient = "acuity: 1, leaves_at: \"19:00\"",
         .bad_key = "patients[0].leaves_at"},
        {.shift = NIGHT,
         .patient = "acuity: 1, leaves_at: \"07:01\"",
         .bad_key = "patients[0].leaves_at"},
        /* Hand-offs: nurses of the roster, after the patient's nurse, each
         * to another nurse than the one before. */
        {.patient = "acuity: 1, nurse: N1, handoffs: []"},
        {.patient = "acuity: 1, handoffs: []"},
        {.patient = "acuity: 1, handoffs: [N1]", .bad_key = "patients[0].handoffs"},
        {.patient = "acuity: 1, nurse: N1, handoffs: [N1]", .bad_key = "patients[0].handoffs[0]"},
        {.patient = "acuity: 1, nurse: N1, handoffs: [N2]", .bad_key = "patients[0].handoffs[0]"},
        {.patient = "acuity: 1, nurse: N1, handoffs: N1", .bad_key = "patients[0].handoffs"},
        {.patient = "acuity: 1, nurse: N1, handoffs: [~]", .bad_key = "patients[0].handoffs[0]"},
    };
    (void)state;
    for (size_t i = 0; i < sizeof cases / sizeof cases[0]; i++)
        check_range_case(&cases[i]);
}

static void test_roster_reports_clock_problems_with_their_place(void **state)
{
    static const char *const expected[] = {
        "roster.yaml:3:18: nurses[0].end: 20:00 is not after the nurse's start at 23:00; "
        "expected an end later than the start",
        "roster.yaml:4:27: nurses[1].breaks[0].at: 18:00 is outside the shift (19:00 to 07:00); "
        "expected a time from 19:00 to 07:00",
        "roster.yaml:5:35: nurses[2].covers: no nurse 'N9' on this roster",
        "roster.yaml:7:53: patients[0].handoffs[0]: 'B' is the patient's nurse already; "
        "expected a hand-off to another nurse",
        "roster.yaml:9:27: expected_admissions[0].arrives_at: not used for an expected "
        "admission; expected at: the time it is expected",
        "roster.yaml:10:10: expected_admissions[1].id: patient id 'P1' is already used on line "
        "7; expected a unique id",
        "roster.yaml:10:18: expected_admissions[1].at: 07:30 is outside the shift (19:00 to "
        "07:00); expected a time from 19:00 to 07:00",
        NULL};
    (void)state;
    assert_problems("shift: {start: \"19:00\", minutes: 720}\n"
                    "nurses:\n"
                    "  - {id: A, end: \"20:00\", start: \"23:00\"}\n"
                    "  - {id: B, breaks: [{at: \"18:00\", minutes: 30}]}\n"
                    "  - {id: C, role: relief, covers: N9}\n"
                    "patients:\n"
                    "  - {id: P1, care_minutes: 60, nurse: B, handoffs: [B]}\n"
                    "expected_admissions:\n"
                    "  - {id: A1, at: \"20:00\", arrives_at: \"20:00\", care_minutes: 60}\n"
                    "  - {id: P1, at: \"07:30\", care_minutes: 60}\n",
                    expected);
}

static void test_roster_appends_expected_admissions_wherever_they_are_listed(void **state)
{
    keel_roster *r = NULL;
    (void)state;
    assert_int_equal(parse("expected_admissions: [{id: A1, at: \"10:00\", acuity: 2, nurse: N1}]\n"
                           "policy: {acuity_minutes: {2: 150}}\n"
                           "nurses: [{id: N1}]\n"
                           "patients: [{id: P1, acuity: 2}, {id: P2, care_minutes: 30}]\n"
                           "shift: {start: 07:00, minutes: 720}\n",
                           &r, NULL),
                     KEEL_OK);
    assert_true(r->clock);
    assert_int_equal(r->npatients, 3);
    assert_string_equal(r->patients[0].id, "P1");
    assert_string_equal(r->patients[1].id, "P2");
    assert_string_equal(r->patients[2].id, "A1");
    assert_true(r->patients[2].expected);
    assert_int_equal(r->patients[2].arrives_at, 180);
    assert_int_equal(r->patients[2].acuity, 2);
    assert_string_equal(r->patients[2].nurse, "N1");
    keel_roster_free(r);

    /* An empty list is no admissions, and no clock. */
    assert_int_equal(parse("shift: {minutes: 720}\n"
                           "nurses: [{id: N1}]\n"
                           "patients: [{id: P1, care_minutes: 30}]\n"
                           "expected_admissions: []\n",
                           &r, NULL),
                     KEEL_OK);
    assert_false(r->clock);
    assert_int_equal(r->npatients, 1);
    keel_roster_free(r);

    /* The admissions' own problems carry their own key paths. */
    static const char *const expected[] = {
        "roster.yaml:5:5: expected_admissions[0].at: missing; every expected admission needs "
        "at: the time it is expected",
        "roster.yaml:5:5: expected_admissions[0].acuity: missing; every patient needs acuity, "
        "care_minutes or nas",
        "roster.yaml:5:31: expected_admissions[0].nurse: no nurse 'N7' on this roster",
        "roster.yaml:6:5: expected_admissions[1].id: missing; every expected admission needs a "
        "unique id",
        "roster.yaml:6:34: expected_admissions[1].arival: unknown key; expected one of id, at, "
        "bed, name, acuity, care_minutes, extras, needs, nurse, lock, sitter, avoid, ratio, "
        "isolation, room, zone, previous_nurse, nas, leaves_at, handoffs",
        NULL};
    assert_problems("shift: {start: 07:00, minutes: 720}\n"
                    "nurses: [{id: N1}]\n"
                    "patients: [{id: P1, care_minutes: 30}]\n"
                    "expected_admissions:\n"
                    "  - {id: A1, bed: \"4\", nurse: N7}\n"
                    "  - {care_minutes: 30, at: 9:00, arival: 9:00}\n",
                    expected);
}

/* A unit's roster before keel import fills it: patients: [] or no key at
 * all is no patients; a patients key without a list is still a problem. */
static void test_roster_may_have_no_patients(void **state)
{
    keel_roster *r = NULL;
    (void)state;
    static const char *const rosters[] = {
        "shift: {minutes: 720}\nnurses: [{id: N1}]\npatients: []\n",
        "shift: {minutes: 720}\nnurses: [{id: N1}]\n",
    };
    for (size_t i = 0; i < sizeof rosters / sizeof rosters[0]; i++) {
        assert_int_equal(parse(rosters[i], &r, NULL), KEEL_OK);
        assert_int_equal(r->npatients, 0);
        assert_null(r->patients);
        assert_int_equal(r->nnurses, 1);
        keel_roster_free(r);
    }
    /* Expected admissions alone are patients. */
    assert_int_equal(parse("shift: {start: 07:00, minutes: 720}\nnurses: [{id: N1}]\n"
                           "expected_admissions: [{id: A1, at: \"10:00\", care_minutes: 30}]\n",
                           &r, NULL),
                     KEEL_OK);
    assert_int_equal(r->npatients, 1);
    keel_roster_free(r);
    static const char *const expected[] = {
        "roster.yaml:3:11: patients: found '7'; expected a list of patients ([] for none)", NULL};
    assert_problems("shift: {minutes: 720}\n"
                    "nurses: [{id: N1}]\n"
                    "patients: 7\n",
                    expected);
}

static void test_roster_reports_a_file_that_cannot_be_opened(void **state)
{
    keel_error err;
    keel_roster *r = (keel_roster *)1;
    char expected[256];
    (void)state;
    keel_error_init(&err);
    assert_int_equal(keel_roster_load("no-such-roster.yaml", &r, &err), KEEL_ERR_IO);
    assert_null(r);
    assert_int_equal(err.status, KEEL_ERR_IO);
    assert_int_equal(err.nproblems, 1);
    assert_int_equal(err.problems[0].line, 0);
    snprintf(expected, sizeof expected, "no-such-roster.yaml: cannot open: %s", strerror(ENOENT));
    assert_string_equal(problem_text(&err, 0), expected);
    keel_error_fini(&err);
}

static void test_roster_free_and_lookups_accept_null(void **state)
{
    (void)state;
    keel_roster_free(NULL);
    assert_int_equal(keel_roster_find_nurse(NULL, "N1"), -1);
    assert_int_equal(keel_roster_acuity_minutes(NULL, 1), KEEL_ABSENT);
    assert_int_equal(keel_roster_extra_minutes(NULL, "admission"), KEEL_ABSENT);
}

static int compare_names(const void *a, const void *b)
{
    return strcmp(*(char *const *)a, *(char *const *)b);
}

/* The file names of the golden cases (<case>.yaml), sorted; caller frees. */
static size_t list_cases(const char *dir, char ***names)
{
    DIR *d = opendir(dir);
    size_t n = 0;
    *names = NULL;
    assert_non_null(d);
    for (struct dirent *e; (e = readdir(d)) != NULL;) {
        size_t len = strlen(e->d_name);
        if (len < 6 || strcmp(e->d_name + len - 5, ".yaml") != 0)
            continue;
        *names = realloc(*names, (n + 1) * sizeof **names);
        assert_non_null(*names);
        (*names)[n] = strdup(e->d_name);
        assert_non_null((*names)[n++]);
    }
    closedir(d);
    qsort(*names, n, sizeof **names, compare_names);
    return n;
}

/* Loads one golden case from the current directory and compares every
 * formatted problem with <case>.expected; true when they match. */
static bool check_golden_case(const char *name)
{
    char expected_name[512], line[1024];
    keel_error err;
    keel_roster *r = (keel_roster *)1;
    size_t actual_len = 0, actual_size = 4096;
    char *actual = calloc(1, actual_size);
    assert_non_null(actual);
    snprintf(expected_name, sizeof expected_name, "%.*s.expected", (int)(strlen(name) - 5), name);
    char *expected = read_text(expected_name);

    keel_error_init(&err);
    keel_status rc = keel_roster_load(name, &r, &err);
    for (size_t i = 0; i < err.nproblems; i++) {
        int len = keel_problem_format(&err.problems[i], line, sizeof line);
        while (actual_len + (size_t)len + 2 > actual_size) {
            actual = realloc(actual, actual_size *= 2);
            assert_non_null(actual);
        }
        snprintf(actual + actual_len, actual_size - actual_len, "%s\n", line);
        actual_len += (size_t)len + 1;
    }
    bool ok =
        rc == KEEL_ERR_INPUT && r == NULL && err.nproblems > 0 && strcmp(actual, expected) == 0;
    if (!ok)
        print_message("golden case %s (status %d):\n--- expected\n%s--- actual\n%s", name, rc,
                      expected, actual);
    keel_error_fini(&err);
    free(expected);
    free(actual);
    return ok;
}

static void test_roster_matches_the_golden_bad_inputs(void **state)
{
    char dir[1024];
    char **names;
    size_t failures = 0;
    (void)state;
    snprintf(dir, sizeof dir, "%s/bad", data_dir);
    size_t n = list_cases(dir, &names);
    assert_true(n >= 12);
    int here = open(".", O_RDONLY);
    assert_true(here >= 0);
    assert_int_equal(chdir(dir), 0);
    for (size_t i = 0; i < n; i++) {
        failures += !check_golden_case(names[i]);
        free(names[i]);
    }
    free(names);
    assert_int_equal(fchdir(here), 0);
    close(here);
    assert_int_equal(failures, 0);
}

static void test_roster_loads_the_example_rosters(void **state)
{
    static const char *const names[] = {"medsurg-day.yaml", "icu-night.yaml"};
    (void)state;
    for (size_t i = 0; i < sizeof names / sizeof names[0]; i++) {
        char path[1024];
        keel_error err;
        keel_roster *r = NULL;
        snprintf(path, sizeof path, "%s/%s", examples_dir, names[i]);
        keel_error_init(&err);
        keel_status rc = keel_roster_load(path, &r, &err);
        for (size_t k = 0; k < err.nproblems; k++)
            print_message("%s\n", problem_text(&err, k));
        assert_int_equal(rc, KEEL_OK);
        assert_true(r->nnurses >= 6 && r->nnurses <= 8);
        assert_int_equal(r->shift.minutes, 720);
        for (size_t p = 0; p < r->npatients; p++) {
            int care = r->patients[p].acuity == KEEL_ABSENT
                           ? r->patients[p].care_minutes
                           : keel_roster_acuity_minutes(r, r->patients[p].acuity);
            assert_true(care >= 0);
        }
        keel_roster_free(r);
        keel_error_fini(&err);
    }
}

/* Fails the 1st, 2nd, ... allocation of one load until the load no longer
 * allocates that many times, when it must end with status last.  Every run
 * with a failed allocation must return KEEL_ERR_NOMEM, record it as its last
 * problem, give no roster and (checked by the sanitizers) leak nothing. */
static void run_with_failing_allocations(keel_status (*load)(keel_roster **, keel_error *),
                                         keel_status last)
{
    long n;
    for (n = 1; n < 100000; n++) {
        keel_error err;
        keel_roster *r = (keel_roster *)1;
        keel_error_init(&err);
        keel_alloc_fail_at(n);
        keel_status rc = load(&r, &err);
        long made = keel_alloc_fail_at(0);
        if (made < n) {
            assert_int_equal(rc, last);
            assert_true((r != NULL) == (last == KEEL_OK));
            keel_roster_free(r);
            keel_error_fini(&err);
            break;
        }
        if (rc != KEEL_ERR_NOMEM)
            print_message("allocation %ld failed but the load returned %d\n", n, rc);
        assert_int_equal(rc, KEEL_ERR_NOMEM);
        assert_null(r);
        assert_true(err.status == KEEL_ERR_NOMEM || err.status == KEEL_ERR_INPUT);
        assert_true(err.nproblems > 0);
        assert_string_equal(err.problems[err.nproblems - 1].message, "out of memory");
        keel_error_fini(&err);
    }
    assert_true(n > 20);
}

static const char record_example[] = "shift: {label: night, start: \"19:00\", minutes: 720}\n"
                                     "policy: {acuity_minutes: {1: 60}}\n"
                                     "nurses: [{id: N1}, {id: N2, end: \"01:00\"}]\n"
                                     "patients:\n"
                                     "  - id: P1\n"
                                     "    acuity: 1\n"
                                     "    nurse: N1\n"
                                     "    record:\n"
                                     "      - {nurse: N2, from: \"19:00\", to: \"01:00\"}\n"
                                     "      - {nurse: N1, from: \"01:00\", to: \"02:30\"}\n"
                                     "  - id: P2\n"
                                     "    acuity: 1\n"
                                     "    nurse: N2\n"
                                     "    arrives_at: \"20:00\"\n"
                                     "    leaves_at: \"23:00\"\n"
                                     "    record: [{nurse: N2, from: \"20:00\", to: \"23:00\"}]\n";

static keel_status load_record_example(keel_roster **out, keel_error *err)
{
    return keel_roster_parse("roster.yaml", record_example, strlen(record_example), out, err);
}

/* A record's times are read on the shift's clock, across midnight, and
 * the copy carries them. */
static void test_roster_reads_a_record_on_the_shift_clock(void **state)
{
    (void)state;
    keel_error err;
    keel_roster *r = NULL;
    keel_error_init(&err);
    assert_int_equal(load_record_example(&r, &err), KEEL_OK);
    assert_true(r->clock);
    const keel_patient *p = &r->patients[0];
    assert_int_equal(p->nrecord, 2);
    assert_string_equal(p->record[0].nurse, "N2");
    assert_int_equal(p->record[0].from, 0);
    assert_int_equal(p->record[0].to, 360);
    assert_string_equal(p->record[1].nurse, "N1");
    assert_int_equal(p->record[1].from, 360);
    assert_int_equal(p->record[1].to, 450);
    assert_int_equal(p->record[1].mark.line, 10);
    /* A record may cover the whole stay of a patient who has left. */
    assert_int_equal(r->patients[1].nrecord, 1);
    assert_int_equal(r->patients[1].record[0].to, 240);
    keel_roster *c = keel_roster_copy(r);
    assert_non_null(c);
    assert_int_equal(c->patients[0].nrecord, 2);
    assert_string_equal(c->patients[0].record[1].nurse, "N1");
    assert_ptr_not_equal(c->patients[0].record[1].nurse, p->record[1].nurse);
    assert_int_equal(c->patients[0].record[1].to, 450);
    keel_roster_free(c);
    keel_roster_free(r);
    keel_error_fini(&err);
}

static keel_status load_issue_example(keel_roster **out, keel_error *err)
{
    return keel_roster_parse("roster.yaml", issue_example, strlen(issue_example), out, err);
}

static keel_status load_night_example(keel_roster **out, keel_error *err)
{
    return keel_roster_parse("roster.yaml", night_example, strlen(night_example), out, err);
}

static keel_status load_medsurg_example(keel_roster **out, keel_error *err)
{
    char path[1024];
    snprintf(path, sizeof path, "%s/medsurg-day.yaml", examples_dir);
    return keel_roster_load(path, out, err);
}

static keel_status load_many_problems(keel_roster **out, keel_error *err)
{
    char path[1024];
    snprintf(path, sizeof path, "%s/bad/many-problems.yaml", data_dir);
    return keel_roster_load(path, out, err);
}

static void test_roster_fails_cleanly_when_any_allocation_fails(void **state)
{
    (void)state;
    run_with_failing_allocations(load_issue_example, KEEL_OK);
    run_with_failing_allocations(load_night_example, KEEL_OK);
    run_with_failing_allocations(load_record_example, KEEL_OK);
    run_with_failing_allocations(load_medsurg_example, KEEL_OK);
    run_with_failing_allocations(load_many_problems, KEEL_ERR_INPUT);
}

int main(int argc, char **argv)
{
    if (argc > 1)
        data_dir = argv[1];
    else if (getenv("KEEL_TEST_DATA"))
        data_dir = getenv("KEEL_TEST_DATA");
    if (argc > 2)
        examples_dir = argv[2];
    else if (getenv("KEEL_TEST_EXAMPLES"))
        examples_dir = getenv("KEEL_TEST_EXAMPLES");

    const struct CMUnitTest tests[] = {
        cmocka_unit_test(test_roster_loads_the_issue_example),
        cmocka_unit_test(test_roster_leaves_unset_fields_absent),
        cmocka_unit_test(test_roster_names_every_role_as_written),
        cmocka_unit_test(test_roster_accepts_only_the_documented_unit_types),
        cmocka_unit_test(test_roster_checks_preceptors_locks_and_avoid_lists),
        cmocka_unit_test(test_roster_accepts_unquoted_times),
        cmocka_unit_test(test_roster_rejects_times_and_dates_that_do_not_exist),
        cmocka_unit_test(test_roster_keeps_numeric_ids_as_text),
        cmocka_unit_test(test_roster_stores_acuity_levels_sorted),
        cmocka_unit_test(test_roster_reports_every_problem_in_a_file),
        cmocka_unit_test(test_roster_suggests_the_nearest_key_only_when_close),
        cmocka_unit_test(test_roster_expects_integers_without_quotes),
        cmocka_unit_test(test_roster_enforces_the_documented_ranges),
        cmocka_unit_test(test_roster_reads_times_against_a_shift_that_crosses_midnight),
        cmocka_unit_test(test_roster_turns_times_into_minutes_after_the_shift_start),
        cmocka_unit_test(test_roster_checks_the_clock_keys),
        cmocka_unit_test(test_roster_reports_clock_problems_with_their_place),
        cmocka_unit_test(test_roster_appends_expected_admissions_wherever_they_are_listed),
        cmocka_unit_test(test_roster_may_have_no_patients),
        cmocka_unit_test(test_roster_reports_a_file_that_cannot_be_opened),
        cmocka_unit_test(test_roster_free_and_lookups_accept_null),
        cmocka_unit_test(test_roster_matches_the_golden_bad_inputs),
        cmocka_unit_test(test_roster_loads_the_example_rosters),
        cmocka_unit_test(test_roster_fails_cleanly_when_any_allocation_fails),
        cmocka_unit_test(test_roster_reads_a_record_on_the_shift_clock),
    };
    return cmocka_run_group_tests_name("roster", tests, NULL, NULL);
}
