/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * test_census.c - reading a census CSV: fields, quoting, the header
 * mapping, every problem with its line and column, joining a roster.
 */
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include <cmocka.h>

#include "alloc.h"
#include "keel/keel.h"

static keel_census *parse(const char *text, const char *map, keel_status want, keel_error *err)
{
    keel_census *c = NULL;
    keel_error_init(err);
    assert_int_equal(keel_census_parse("census.csv", text, strlen(text), map, &c, err), want);
    return c;
}

/* The problem at index i, formatted as the CLI prints it. */
static const char *problem(const keel_error *err, size_t i, char *buf, size_t size)
{
    assert_true(i < err->nproblems);
    keel_problem_format(&err->problems[i], buf, size);
    return buf;
}

static void test_the_plain_census_header_imports_as_is(void **state)
{
    (void)state;
    keel_error err;
    keel_census *c = parse("bed,patient,acuity,needs,isolation\n"
                           "4W-01,P-1,3,tele,\n"
                           "4W-02,P-2,2,tele;chemo,contact\n"
                           "4W-03,P-3,4,,protective\n",
                           NULL, KEEL_OK, &err);
    assert_int_equal(c->npatients, 3);
    assert_string_equal(c->patients[0].id, "P-1");
    assert_string_equal(c->patients[0].bed, "4W-01");
    assert_int_equal(c->patients[0].acuity, 3);
    assert_int_equal(c->patients[0].nneeds, 1);
    assert_int_equal(c->patients[0].isolation, KEEL_ISOLATION_NONE);
    assert_int_equal(c->patients[1].nneeds, 2);
    assert_string_equal(c->patients[1].needs[1], "chemo");
    assert_int_equal(c->patients[1].isolation, KEEL_ISOLATION_CONTACT);
    assert_int_equal(c->patients[2].isolation, KEEL_ISOLATION_PROTECTIVE);
    assert_int_equal(c->patients[2].nneeds, 0);
    assert_int_equal(c->patients[2].mark.line, 4);
    keel_census_free(c);
    keel_error_fini(&err);
}

static void test_quoting_follows_rfc_4180(void **state)
{
    (void)state;
    /* Source: RFC 4180 (2005), section 2: fields may be enclosed in double
     * quotes; such fields may contain commas and line breaks; a double quote
     * inside is written twice.  Also CRLF line ends and a UTF-8 byte-order
     * mark as spreadsheets write them (common practice, no source). */
    keel_error err;
    keel_census *c = parse("\xEF\xBB\xBF"
                           "Patient , BED,acuity,name\r\n"
                           "P-1,\"4W, east\",2,\"Quennell, \"\"Harry\"\"\"\r\n"
                           "\r\n"
                           "P-2,\"4W\n12\",1,plain\r\n",
                           NULL, KEEL_OK, &err);
    assert_int_equal(c->npatients, 2);
    assert_string_equal(c->patients[0].bed, "4W, east");
    assert_string_equal(c->patients[0].name, "Quennell, \"Harry\"");
    assert_string_equal(c->patients[1].bed, "4W\n12");
    assert_int_equal(c->patients[1].mark.line, 4);
    keel_census_free(c);
    keel_error_fini(&err);
}

static void test_a_mapping_reads_other_headers(void **state)
{
    (void)state;
    keel_error err;
    keel_census *c = parse("MRN,Level,Skills,Room\nX1,2,tele,12\n",
                           "patient=MRN,acuity=Level,needs=Skills", KEEL_OK, &err);
    assert_string_equal(c->patients[0].id, "X1");
    assert_int_equal(c->patients[0].acuity, 2);
    assert_string_equal(c->patients[0].needs[0], "tele");
    assert_string_equal(c->patients[0].room, "12");
    keel_census_free(c);
    keel_error_fini(&err);
    c = parse("MRN\nX1\n", "patient=MRN,acuity", KEEL_ERR_USAGE, &err);
    assert_null(c);
    keel_error_fini(&err);
}

static void test_every_problem_has_its_line_and_column(void **state)
{
    (void)state;
    keel_error err;
    char buf[512];
    keel_census *c = parse("bed,patient,acuity,isolation,ratio\n"
                           "A1,X1,2,,1:2\n"
                           "A2,\"X\n2\",seven,airbone,2:1\n"
                           "A3,X1,1,,\n"
                           "A4,,3,,\n",
                           NULL, KEEL_ERR_INPUT, &err);
    assert_null(c);
    assert_int_equal(err.nproblems, 5);
    /* The second row's quoted id spans two lines; the fields after it are
     * on line 4. */
    assert_string_equal(problem(&err, 0, buf, sizeof buf),
                        "census.csv:4:4: acuity: 'seven' is not a whole number from 0 to 99");
    assert_string_equal(problem(&err, 1, buf, sizeof buf),
                        "census.csv:4:10: isolation: unknown precaution 'airbone'; expected "
                        "contact, droplet, airborne, protective or an empty field");
    assert_string_equal(problem(&err, 2, buf, sizeof buf),
                        "census.csv:4:18: ratio: '2:1' is not a ratio; expected one such as 1:2 "
                        "(1:1 to 1:99)");
    assert_string_equal(problem(&err, 3, buf, sizeof buf),
                        "census.csv:5:4: patient: patient 'X1' is already on line 2; expected "
                        "each patient once");
    assert_string_equal(problem(&err, 4, buf, sizeof buf),
                        "census.csv:6:4: patient: no patient id; every row needs the patient's "
                        "id");
    keel_error_fini(&err);

    c = parse("bed,name\nA1,x\n", NULL, KEEL_ERR_INPUT, &err);
    assert_int_equal(err.nproblems, 2);
    assert_non_null(strstr(problem(&err, 0, buf, sizeof buf), "no patient column"));
    assert_non_null(strstr(problem(&err, 1, buf, sizeof buf), "no acuity or care_minutes"));
    keel_error_fini(&err);

    c = parse("patient,acuity\nX1,2\n\"X2,3\n", NULL, KEEL_ERR_INPUT, &err);
    assert_non_null(strstr(problem(&err, 0, buf, sizeof buf), "census.csv:3:1: a quoted field"));
    keel_error_fini(&err);
}

static void test_a_census_joins_a_roster_that_knows_its_levels(void **state)
{
    (void)state;
    static const char roster[] = "shift: {minutes: 720}\n"
                                 "policy: {acuity_minutes: {1: 60, 2: 100}}\n"
                                 "nurses: [{id: A}]\n"
                                 "patients: [{id: old, acuity: 1}]\n";
    keel_error err;
    keel_roster *r = NULL;
    keel_error_init(&err);
    assert_int_equal(keel_roster_parse("base.yaml", roster, strlen(roster), &r, &err), KEEL_OK);
    keel_census *c = parse("patient,acuity\nX1,2\nX2,5\n", NULL, KEEL_OK, &err);
    char buf[512];
    assert_int_equal(keel_census_into_roster(c, r, &err), KEEL_ERR_INPUT);
    assert_string_equal(problem(&err, 0, buf, sizeof buf),
                        "census.csv:3:1: acuity: patient X2 has acuity 5, which base.yaml's "
                        "policy.acuity_minutes does not give; expected a level of the unit's "
                        "scale");
    assert_int_equal(r->npatients, 1); /* the roster is left as it was */
    keel_census_free(c);
    keel_error_fini(&err);
    c = parse("patient,acuity\nX1,2\nX2,1\n", NULL, KEEL_OK, &err);
    assert_int_equal(keel_census_into_roster(c, r, &err), KEEL_OK);
    assert_int_equal(r->npatients, 2);
    assert_string_equal(r->patients[1].id, "X2");
    assert_int_equal(c->npatients, 0);
    keel_census_free(c);
    keel_roster_free(r);
    keel_error_fini(&err);
}

/* A spreadsheet saved with ';' between the fields: one hint, not a list of
 * missing columns. */
static void test_a_semicolon_separated_census_gets_a_hint(void **state)
{
    (void)state;
    keel_error err;
    char buf[512];
    keel_census *c = parse("bed;patient;acuity\n4W-01;P-1;3\n", NULL, KEEL_ERR_INPUT, &err);
    assert_null(c);
    assert_int_equal(err.nproblems, 1);
    assert_string_equal(problem(&err, 0, buf, sizeof buf),
                        "census.csv:1:1: the header is one column holding ';': the file seems "
                        "to use ';' as separator; keel reads commas (save the sheet as "
                        "comma-separated CSV)");
    keel_error_fini(&err);
    /* A ';' inside one column of a comma-separated file is only a value. */
    c = parse("patient,acuity,needs\nP-1,3,tele;chemo\n", NULL, KEEL_OK, &err);
    assert_int_equal(c->patients[0].nneeds, 2);
    keel_census_free(c);
    keel_error_fini(&err);
}

static const char scale_roster[] = "shift: {minutes: 720}\n"
                                   "policy: {acuity_minutes: {1: 60, 2: 100}, "
                                   "extra_minutes: {admission: 60}}\n"
                                   "nurses: [{id: A}]\n"
                                   "patients: [{id: old, acuity: 1}]\n";

/* Against the unit's roster, a level or extra the unit's scales lack is a
 * problem of its row, at its field, in file order with the file's others. */
static void test_levels_the_unit_lacks_come_with_the_rows_other_problems(void **state)
{
    (void)state;
    keel_error err;
    keel_roster *r = NULL;
    keel_census *c = NULL;
    char buf[512];
    keel_error_init(&err);
    assert_int_equal(keel_roster_parse("base.yaml", scale_roster, strlen(scale_roster), &r, &err),
                     KEEL_OK);
    static const char text[] = "patient,acuity,isolation,extras\n"
                               "X1,5,,\n"
                               "X2,2,airbone,\n"
                               "X3,1,,transfer\n"
                               "X4,two,,\n";
    assert_int_equal(keel_census_parse_for("census.csv", text, strlen(text), NULL, r, &c, &err),
                     KEEL_ERR_INPUT);
    assert_null(c);
    assert_int_equal(err.nproblems, 4);
    assert_string_equal(problem(&err, 0, buf, sizeof buf),
                        "census.csv:2:4: acuity: patient X1 has acuity 5, which base.yaml's "
                        "policy.acuity_minutes does not give; expected a level of the unit's "
                        "scale");
    assert_string_equal(problem(&err, 1, buf, sizeof buf),
                        "census.csv:3:6: isolation: unknown precaution 'airbone'; expected "
                        "contact, droplet, airborne, protective or an empty field");
    assert_string_equal(problem(&err, 2, buf, sizeof buf),
                        "census.csv:4:7: extras: patient X3 lists extra 'transfer', which "
                        "base.yaml's policy.extra_minutes does not give");
    assert_string_equal(problem(&err, 3, buf, sizeof buf),
                        "census.csv:5:4: acuity: 'two' is not a whole number from 0 to 99");
    keel_error_fini(&err);
    /* Without the unit only the file's own problems; care minutes need no level. */
    assert_int_equal(keel_census_parse_for("census.csv", text, strlen(text), NULL, NULL, &c, &err),
                     KEEL_ERR_INPUT);
    assert_int_equal(err.nproblems, 2);
    keel_error_fini(&err);
    static const char fine[] = "patient,acuity,care_minutes\nX1,9,120\nX2,2,\n";
    assert_int_equal(keel_census_parse_for("census.csv", fine, strlen(fine), NULL, r, &c, &err),
                     KEEL_OK);
    assert_int_equal(c->npatients, 2);
    keel_census_free(c);
    keel_roster_free(r);
    keel_error_fini(&err);
}

/* A past shift's census names each patient's nurse: the nurse comes in as
 * the patient's `nurse`, and one the unit does not have is named at its
 * line and column. */
static void test_a_nurse_column_brings_a_past_assignment_in(void **state)
{
    (void)state;
    static const char roster[] = "shift: {minutes: 720}\n"
                                 "policy: {acuity_minutes: {1: 60, 2: 100}}\n"
                                 "nurses: [{id: A}, {id: B}]\n"
                                 "patients: []\n";
    keel_error err;
    keel_roster *r = NULL;
    keel_census *c = NULL;
    char buf[512];
    keel_error_init(&err);
    assert_int_equal(keel_roster_parse("base.yaml", roster, strlen(roster), &r, &err), KEEL_OK);
    static const char text[] = "patient,acuity,nurse\nX1,2,A\nX2,1, C \nX3,1,\n";
    assert_int_equal(keel_census_parse_for("past.csv", text, strlen(text), NULL, r, &c, &err),
                     KEEL_ERR_INPUT);
    assert_int_equal(err.nproblems, 1);
    assert_string_equal(problem(&err, 0, buf, sizeof buf),
                        "past.csv:3:6: nurse: patient X2 has nurse 'C', who is not one of "
                        "base.yaml's nurses; expected the id of a nurse on that roster");
    keel_error_fini(&err);
    static const char fine[] = "patient,acuity,nurse\nX1,2,A\nX2,1,B\nX3,1,\n";
    assert_int_equal(keel_census_parse_for("past.csv", fine, strlen(fine), NULL, r, &c, &err),
                     KEEL_OK);
    assert_string_equal(c->patients[0].nurse, "A");
    assert_string_equal(c->patients[1].nurse, "B");
    assert_null(c->patients[2].nurse); /* an empty field: nobody yet */
    assert_int_equal(keel_census_into_roster(c, r, &err), KEEL_OK);
    assert_string_equal(r->patients[1].nurse, "B");
    keel_census_free(c);
    keel_roster_free(r);
    keel_error_fini(&err);
}

static void test_every_failed_allocation_ends_in_a_clean_error(void **state)
{
    (void)state;
    static const char text[] = "bed,patient,acuity,needs,isolation,extras\n"
                               "A1,X1,2,tele;chemo,contact,admission\n"
                               "\"A,2\",X2,3,,,\n";
    for (long n = 1;; n++) {
        keel_error err;
        keel_census *c = NULL;
        keel_error_init(&err);
        keel_alloc_fail_at(n);
        keel_status rc = keel_census_parse("c.csv", text, strlen(text), NULL, &c, &err);
        long made = keel_alloc_fail_at(0);
        keel_census_free(c);
        keel_error_fini(&err);
        if (made < n) {
            assert_int_equal(rc, KEEL_OK);
            break;
        }
        assert_int_equal(rc, KEEL_ERR_NOMEM);
    }
    /* And against a unit's roster that lacks a level and an extra. */
    keel_error err;
    keel_roster *r = NULL;
    keel_error_init(&err);
    assert_int_equal(keel_roster_parse("base.yaml", scale_roster, strlen(scale_roster), &r, &err),
                     KEEL_OK);
    keel_error_fini(&err);
    static const char lacking[] = "patient,acuity,extras\nX1,5,transfer\nX2,two,\n";
    for (long n = 1;; n++) {
        keel_census *c = NULL;
        keel_error_init(&err);
        keel_alloc_fail_at(n);
        keel_status rc =
            keel_census_parse_for("c.csv", lacking, strlen(lacking), NULL, r, &c, &err);
        long made = keel_alloc_fail_at(0);
        assert_null(c);
        keel_error_fini(&err);
        if (made < n) {
            assert_int_equal(rc, KEEL_ERR_INPUT);
            break;
        }
        assert_int_equal(rc, KEEL_ERR_NOMEM);
    }
    keel_roster_free(r);
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(test_the_plain_census_header_imports_as_is),
        cmocka_unit_test(test_quoting_follows_rfc_4180),
        cmocka_unit_test(test_a_mapping_reads_other_headers),
        cmocka_unit_test(test_every_problem_has_its_line_and_column),
        cmocka_unit_test(test_a_census_joins_a_roster_that_knows_its_levels),
        cmocka_unit_test(test_a_semicolon_separated_census_gets_a_hint),
        cmocka_unit_test(test_levels_the_unit_lacks_come_with_the_rows_other_problems),
        cmocka_unit_test(test_a_nurse_column_brings_a_past_assignment_in),
        cmocka_unit_test(test_every_failed_allocation_ends_in_a_clean_error),
    };
    return cmocka_run_group_tests_name("census", tests, NULL, NULL);
}
