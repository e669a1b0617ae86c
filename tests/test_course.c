/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * test_course.c - the course of the shift (keel/course.h): each nurse's
 * patient count over the shift, who covers each timed break and whether the
 * cover stays within the limit that holds at all times, how many relief
 * nurses the breaks need, and the order in which nurses take the next
 * admissions.  Rosters are YAML text; the plan is the roster's own `nurse`
 * and `handoffs` keys.  Every nurse, patient and unit here is invented.
 */
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdlib.h>
#include <string.h>

#include <cmocka.h>

#include "alloc.h"
#include "keel/course.h"
#include "keel/keel.h"
#include "workload_internal.h"

typedef struct loaded {
    keel_roster *r;
    keel_workload *w;
    int *nurse_of;
    keel_course *c;
} loaded;

/* Loads the roster, takes its plan and computes the course with an
 * admission order of nadmissions picks. */
static loaded load(const char *text, size_t nadmissions)
{
    loaded l = {0};
    keel_error err;
    keel_error_init(&err);
    keel_status rc = keel_roster_parse("course.yaml", text, strlen(text), &l.r, &err);
    for (size_t i = 0; i < err.nproblems; i++)
        print_message("%s: %s\n", err.problems[i].key ? err.problems[i].key : "",
                      err.problems[i].message);
    assert_int_equal(rc, KEEL_OK);
    assert_int_equal(keel_workload_compute(l.r, &l.w, &err), KEEL_OK);
    l.nurse_of = calloc(l.w->npatients ? l.w->npatients : 1, sizeof *l.nurse_of);
    assert_non_null(l.nurse_of);
    assert_true(keel_plan_from_roster(l.r, l.w, l.nurse_of));
    assert_int_equal(keel_course_compute(l.r, l.w, l.nurse_of, nadmissions, &l.c, &err), KEEL_OK);
    keel_error_fini(&err);
    return l;
}

static void unload(loaded *l)
{
    keel_course_free(l->c);
    free(l->nurse_of);
    keel_workload_free(l->w);
    keel_roster_free(l->r);
}

static size_t nurse(const loaded *l, const char *id)
{
    int n = keel_roster_find_nurse(l->r, id);
    assert_true(n >= 0);
    return (size_t)n;
}

static size_t patient(const loaded *l, const char *id)
{
    for (size_t p = 0; p < l->r->npatients; p++)
        if (strcmp(l->r->patients[p].id, id) == 0)
            return p;
    fail_msg("no patient %s", id);
    return 0;
}

/* The cover of nurse id's first break. */
static const keel_break_cover *break_of(const loaded *l, const char *id)
{
    size_t n = nurse(l, id);
    for (size_t i = 0; i < l->c->nbreaks; i++)
        if (l->c->breaks[i].nurse == n && l->c->breaks[i].brk == 0)
            return &l->c->breaks[i];
    fail_msg("no break of %s", id);
    return NULL;
}

static void assert_timeline(const loaded *l, const char *id, const keel_course_change *want,
                            size_t nwant)
{
    const keel_course_timeline *t = &l->c->timelines[nurse(l, id)];
    assert_int_equal(t->nchanges, nwant);
    for (size_t i = 0; i < nwant; i++) {
        assert_int_equal(t->changes[i].at, want[i].at);
        assert_int_equal(t->changes[i].patients, want[i].patients);
    }
}

#define HOUR 60

/* A medical-surgical day shift under the California table. */
#define CALIFORNIA_HEAD                                                                            \
    "unit: {name: \"Test unit\", type: med-surg}\n"                                                \
    "shift: {start: \"07:00\", minutes: 720}\n"                                                    \
    "policy:\n"                                                                                    \
    "  ratio_table: california\n"                                                                  \
    "  acuity_minutes: {1: 60, 2: 90}\n"

/* ------------------------------------------------------------------ */
/* Break cover                                                         */
/* ------------------------------------------------------------------ */

static void test_buddy_left_with_eight_med_surg_patients_breaks_the_law_limit(void **state)
{
    (void)state;
    /* Source: California Code of Regulations, Title 22, section 70217(a) (CDPH AFL 08-07,
     * 2008): medical-surgical 1:5 at all times (sources.md, read); the ratio holds during
     * breaks (sources.md, secondary).  N1 breaks 11:00-11:30 holding four patients; her
     * buddy N2 holds four of her own: eight at once, over the five of the table. */
    loaded l = load(CALIFORNIA_HEAD "nurses:\n"
                                    "  - {id: N1, breaks: [{at: \"11:00\", minutes: 30}]}\n"
                                    "  - {id: N2, covers: N1}\n"
                                    "patients:\n"
                                    "  - {id: P1, acuity: 1, nurse: N1}\n"
                                    "  - {id: P2, acuity: 1, nurse: N2}\n"
                                    "  - {id: P3, acuity: 1, nurse: N1}\n"
                                    "  - {id: P4, acuity: 1, nurse: N2}\n"
                                    "  - {id: P5, acuity: 2, nurse: N1}\n"
                                    "  - {id: P6, acuity: 2, nurse: N2}\n"
                                    "  - {id: P7, acuity: 2, nurse: N1}\n"
                                    "  - {id: P8, acuity: 2, nurse: N2}\n",
                    0);
    assert_int_equal(l.w->law_limit, 5);
    assert_int_equal(l.c->nbreaks, 1);
    const keel_break_cover *b = break_of(&l, "N1");
    assert_int_equal(b->at, 4 * HOUR);
    assert_int_equal(b->minutes, 30);
    assert_int_equal(b->cover, (int)nurse(&l, "N2"));
    assert_false(b->relief);
    assert_int_equal(b->most, 8);
    assert_int_equal(b->limit, 5);
    assert_non_null(b->rule);
    assert_string_equal(b->rule, "law_limit");
    /* Her four patients are handed over, in roster order. */
    assert_int_equal(b->npatients, 4);
    assert_int_equal(b->patients[0], patient(&l, "P1"));
    assert_int_equal(b->patients[1], patient(&l, "P3"));
    assert_int_equal(b->patients[2], patient(&l, "P5"));
    assert_int_equal(b->patients[3], patient(&l, "P7"));
    /* No buddy can cover within the law: the break needs a relief nurse, and there is none. */
    assert_true(b->needs_relief);
    assert_int_equal(l.c->relief_needed, 1);
    assert_int_equal(l.c->relief_on_roster, 0);
    unload(&l);
}

static void test_buddy_within_the_law_limit_is_not_flagged(void **state)
{
    (void)state;
    /* Source: California Code of Regulations, Title 22, section 70217(a): medical-surgical
     * 1:5 (sources.md, read).  Two plus three is five: at the limit, not over it. */
    loaded l = load(CALIFORNIA_HEAD "nurses:\n"
                                    "  - {id: N1, breaks: [{at: \"11:00\", minutes: 30}]}\n"
                                    "  - {id: N2, covers: N1}\n"
                                    "patients:\n"
                                    "  - {id: P1, acuity: 1, nurse: N1}\n"
                                    "  - {id: P2, acuity: 1, nurse: N1}\n"
                                    "  - {id: P3, acuity: 1, nurse: N2}\n"
                                    "  - {id: P4, acuity: 1, nurse: N2}\n"
                                    "  - {id: P5, acuity: 1, nurse: N2}\n",
                    0);
    const keel_break_cover *b = break_of(&l, "N1");
    assert_int_equal(b->cover, (int)nurse(&l, "N2"));
    assert_int_equal(b->most, 5);
    assert_int_equal(b->limit, 5);
    assert_null(b->rule);
    assert_false(b->needs_relief);
    assert_int_equal(l.c->relief_needed, 0);
    unload(&l);
}

static void test_buddy_one_over_the_law_limit_is_flagged(void **state)
{
    (void)state;
    /* Source: California Code of Regulations, Title 22, section 70217(a): medical-surgical
     * 1:5 (sources.md, read).  Three plus three is six, one over. */
    loaded l = load(CALIFORNIA_HEAD "nurses:\n"
                                    "  - {id: N1, breaks: [{at: \"11:00\", minutes: 30}]}\n"
                                    "  - {id: N2, covers: N1}\n"
                                    "patients:\n"
                                    "  - {id: P1, acuity: 1, nurse: N1}\n"
                                    "  - {id: P2, acuity: 1, nurse: N1}\n"
                                    "  - {id: P3, acuity: 1, nurse: N1}\n"
                                    "  - {id: P4, acuity: 1, nurse: N2}\n"
                                    "  - {id: P5, acuity: 1, nurse: N2}\n"
                                    "  - {id: P6, acuity: 1, nurse: N2}\n",
                    0);
    const keel_break_cover *b = break_of(&l, "N1");
    assert_int_equal(b->most, 6);
    assert_string_equal(b->rule, "law_limit");
    unload(&l);
}

static void test_law_limit_not_the_unit_limit_holds_during_a_break(void **state)
{
    (void)state;
    /* Source: California Code of Regulations, Title 22, section 70217(a): medical-surgical
     * 1:5 (sources.md, read).  With a table the law's number is the limit that holds at all
     * times: N2's own limit of 3 is a planning figure, and 2 + 2 = 4 during the break is
     * within the law's 5. */
    loaded l = load(CALIFORNIA_HEAD "nurses:\n"
                                    "  - {id: N1, breaks: [{at: \"11:00\", minutes: 30}]}\n"
                                    "  - {id: N2, covers: N1, max_patients: 3}\n"
                                    "patients:\n"
                                    "  - {id: P1, acuity: 1, nurse: N1}\n"
                                    "  - {id: P2, acuity: 1, nurse: N1}\n"
                                    "  - {id: P3, acuity: 1, nurse: N2}\n"
                                    "  - {id: P4, acuity: 1, nurse: N2}\n",
                    0);
    const keel_break_cover *b = break_of(&l, "N1");
    assert_int_equal(b->most, 4);
    assert_int_equal(b->limit, 5);
    assert_null(b->rule);
    unload(&l);
}

static void test_cover_counts_only_the_moments_of_the_break(void **state)
{
    (void)state;
    /* Source: California Code of Regulations, Title 22, section 70217(a): medical-surgical
     * 1:5 (sources.md, read).  N1's fourth patient leaves at 11:00, before her 12:00 break:
     * during the break N2 holds 3 + 2 = 5, where 4 + 2 = 6 before 11:00 would be too many. */
    loaded l = load(CALIFORNIA_HEAD "nurses:\n"
                                    "  - {id: N1, breaks: [{at: \"12:00\", minutes: 30}]}\n"
                                    "  - {id: N2, covers: N1}\n"
                                    "patients:\n"
                                    "  - {id: P1, acuity: 1, nurse: N1}\n"
                                    "  - {id: P2, acuity: 1, nurse: N1}\n"
                                    "  - {id: P3, acuity: 1, nurse: N1}\n"
                                    "  - {id: P4, acuity: 1, nurse: N2}\n"
                                    "  - {id: P5, acuity: 1, nurse: N2}\n"
                                    "  - {id: P6, acuity: 1, nurse: N1, leaves_at: \"11:00\"}\n",
                    0);
    const keel_break_cover *b = break_of(&l, "N1");
    assert_int_equal(b->most, 5);
    assert_null(b->rule);
    /* P6 left before the break: not handed over. */
    assert_int_equal(b->npatients, 3);
    assert_int_equal(b->patients[2], patient(&l, "P3"));
    unload(&l);
}

static void test_patient_limit_applies_without_a_table(void **state)
{
    (void)state;
    /* No ratio table: the buddy's own patient limit (policy.max_patients 4) holds. */
    loaded l = load("shift: {start: \"07:00\", minutes: 720}\n"
                    "policy: {max_patients: 4, acuity_minutes: {1: 60}}\n"
                    "nurses:\n"
                    "  - {id: N1, breaks: [{at: \"11:00\", minutes: 30}]}\n"
                    "  - {id: N2, covers: N1}\n"
                    "patients:\n"
                    "  - {id: P1, acuity: 1, nurse: N1}\n"
                    "  - {id: P2, acuity: 1, nurse: N1}\n"
                    "  - {id: P3, acuity: 1, nurse: N2}\n"
                    "  - {id: P4, acuity: 1, nurse: N2}\n"
                    "  - {id: P5, acuity: 1, nurse: N2}\n",
                    0);
    const keel_break_cover *b = break_of(&l, "N1");
    assert_int_equal(b->most, 5);
    assert_int_equal(b->limit, 4);
    assert_string_equal(b->rule, "patient_limit");
    unload(&l);
}

static void test_relief_nurse_covers_a_break_without_a_buddy(void **state)
{
    (void)state;
    /* N1 has no buddy; R is a relief nurse (no patients of her own).  Without a table the
     * relief stands in for N1, so N1's limit of 4 applies: three patients, not flagged. */
    loaded l = load("shift: {start: \"07:00\", minutes: 720}\n"
                    "policy: {max_patients: 4, acuity_minutes: {1: 60}}\n"
                    "nurses:\n"
                    "  - {id: N1, breaks: [{at: \"11:00\", minutes: 30}]}\n"
                    "  - {id: N2}\n"
                    "  - {id: R, role: relief}\n"
                    "patients:\n"
                    "  - {id: P1, acuity: 1, nurse: N1}\n"
                    "  - {id: P2, acuity: 1, nurse: N1}\n"
                    "  - {id: P3, acuity: 1, nurse: N1}\n"
                    "  - {id: P4, acuity: 1, nurse: N2}\n",
                    0);
    const keel_break_cover *b = break_of(&l, "N1");
    assert_int_equal(b->cover, (int)nurse(&l, "R"));
    assert_true(b->relief);
    assert_int_equal(b->most, 3);
    assert_int_equal(b->limit, 4);
    assert_null(b->rule);
    assert_true(b->needs_relief);
    assert_int_equal(l.c->relief_needed, 1);
    assert_int_equal(l.c->relief_on_roster, 1);
    unload(&l);
}

static void test_buddy_who_leaves_during_the_break_cannot_cover(void **state)
{
    (void)state;
    /* N2 covers N1 but leaves at 11:15, inside N1's 11:00-11:30 break; nobody else. */
    loaded l = load("shift: {start: \"07:00\", minutes: 720}\n"
                    "policy: {acuity_minutes: {1: 60}}\n"
                    "nurses:\n"
                    "  - {id: N1, breaks: [{at: \"11:00\", minutes: 30}]}\n"
                    "  - {id: N2, covers: N1, end: \"11:15\"}\n"
                    "patients:\n"
                    "  - {id: P1, acuity: 1, nurse: N1}\n",
                    0);
    const keel_break_cover *b = break_of(&l, "N1");
    assert_int_equal(b->cover, -1);
    assert_string_equal(b->rule, "no_cover");
    assert_int_equal(b->npatients, 1);
    assert_int_equal(l.c->relief_needed, 1);
    unload(&l);
}

static void test_two_overlapping_uncovered_breaks_need_two_relief_nurses(void **state)
{
    (void)state;
    /* N1 and N2 are each other's buddies but break at overlapping times, so neither can
     * cover the other.  Breaks get covers in time order: the one relief nurse takes N2's
     * (11:00) and N1's (11:15) has no cover; N5's at 12:00 is covered by the relief again,
     * once she is free.  N3's break has a buddy within the limit and needs no relief, so at
     * 11:15 two breaks (N1's, N2's) need one, not three. */
    loaded l = load("shift: {start: \"07:00\", minutes: 720}\n"
                    "policy: {acuity_minutes: {1: 60}}\n"
                    "nurses:\n"
                    "  - {id: N1, covers: N2, breaks: [{at: \"11:15\", minutes: 30}]}\n"
                    "  - {id: N2, covers: N1, breaks: [{at: \"11:00\", minutes: 30}]}\n"
                    "  - {id: N3, breaks: [{at: \"11:00\", minutes: 30}]}\n"
                    "  - {id: N4, covers: N3}\n"
                    "  - {id: N5, breaks: [{at: \"12:00\", minutes: 30}]}\n"
                    "  - {id: R, role: relief}\n"
                    "patients:\n"
                    "  - {id: P1, acuity: 1, nurse: N1}\n"
                    "  - {id: P2, acuity: 1, nurse: N2}\n"
                    "  - {id: P3, acuity: 1, nurse: N3}\n"
                    "  - {id: P4, acuity: 1, nurse: N5}\n",
                    0);
    const keel_break_cover *b1 = break_of(&l, "N1"), *b2 = break_of(&l, "N2"),
                           *b3 = break_of(&l, "N3"), *b5 = break_of(&l, "N5");
    assert_int_equal(b2->cover, (int)nurse(&l, "R"));
    assert_true(b2->relief);
    assert_null(b2->rule);
    assert_int_equal(b1->cover, -1);
    assert_string_equal(b1->rule, "no_cover");
    assert_int_equal(b3->cover, (int)nurse(&l, "N4"));
    assert_false(b3->relief);
    assert_false(b3->needs_relief);
    assert_int_equal(b5->cover, (int)nurse(&l, "R"));
    assert_null(b5->rule);
    assert_true(b1->needs_relief && b2->needs_relief && b5->needs_relief);
    assert_int_equal(l.c->relief_needed, 2);
    assert_int_equal(l.c->relief_on_roster, 1);
    unload(&l);
}

static void test_break_holding_no_patients_needs_no_cover(void **state)
{
    (void)state;
    loaded l = load("shift: {start: \"07:00\", minutes: 720}\n"
                    "policy: {acuity_minutes: {1: 60}}\n"
                    "nurses:\n"
                    "  - {id: N1, breaks: [{at: \"11:00\", minutes: 30}]}\n"
                    "  - {id: N2}\n"
                    "patients:\n"
                    "  - {id: P1, acuity: 1, nurse: N2}\n",
                    0);
    const keel_break_cover *b = break_of(&l, "N1");
    assert_int_equal(b->cover, -1);
    assert_null(b->rule);
    assert_false(b->needs_relief);
    assert_int_equal(b->npatients, 0);
    assert_int_equal(l.c->relief_needed, 0);
    unload(&l);
}

/* ------------------------------------------------------------------ */
/* Timelines                                                           */
/* ------------------------------------------------------------------ */

/* The break plan, worked by hand from its two passes (docs/model.md,
 * "Break cover"): at 11:00 E5 (no buddy) and E1 (buddy E2) both break;
 * the relief nurse R goes first to E5, who has nobody else, so E2 covers
 * E1; at 11:30 R is free again and takes E2's break although E2's buddy E1
 * is back.  Under the table (1:5), with six patients, only E1's cover by
 * E2 can bind: R takes no patients of her own. */
static void test_break_plan_gives_the_relief_nurse_to_the_break_without_a_buddy(void **state)
{
    (void)state;
    loaded l = load(CALIFORNIA_HEAD
                    "nurses:\n"
                    "  - {id: E1, breaks: [{at: \"11:00\", minutes: 30}], covers: E2}\n"
                    "  - {id: E2, breaks: [{at: \"11:30\", minutes: 30}], covers: E1}\n"
                                    "  - {id: E5, breaks: [{at: \"11:00\", minutes: 30}]}\n"
                                    "  - {id: R, role: relief, start: \"09:00\", end: \"17:00\"}\n"
                                    "patients:\n"
                                    "  - {id: P1, acuity: 1, nurse: E1}\n"
                                    "  - {id: P2, acuity: 1, nurse: E2}\n"
                                    "  - {id: P3, acuity: 1, nurse: E5}\n"
                                    "  - {id: P4, acuity: 1, nurse: E1}\n"
                                    "  - {id: P5, acuity: 1, nurse: E2}\n"
                                    "  - {id: P6, acuity: 1, nurse: E5}\n",
                    0);
    const keel_break_cover *e1 = break_of(&l, "E1"), *e2 = break_of(&l, "E2"),
                           *e5 = break_of(&l, "E5");
    assert_int_equal(e5->cover, (int)nurse(&l, "R"));
    assert_true(e5->relief);
    assert_int_equal(e1->cover, (int)nurse(&l, "E2"));
    assert_false(e1->relief);
    assert_int_equal(e2->cover, (int)nurse(&l, "R"));
    assert_true(e2->relief);
    /* Kept: E1's cover by E2 (5 + 5 > 5); not R's (she holds nobody). */
    assert_int_equal(l.w->nkept, 1);
    for (size_t k = 0; k < l.w->ncovers; k++)
        assert_int_equal(l.w->covers[k].kept, l.w->covers[k].nurse == nurse(&l, "E1"));
    /* The kept break's edges are moments of the clock. */
    assert_true(l.w->clocked);
    unload(&l);
}

/* A roster that names no buddy and no relief nurse plans no cover: its
 * breaks are read off the plan (flagged), never kept by the assignment. */
static void test_no_cover_is_kept_when_the_roster_plans_none(void **state)
{
    (void)state;
    loaded l = load(CALIFORNIA_HEAD "nurses:\n"
                                    "  - {id: N1, breaks: [{at: \"11:00\", minutes: 30}]}\n"
                                    "  - {id: N2}\n"
                                    "patients:\n"
                                    "  - {id: P1, acuity: 1, nurse: N1}\n",
                    0);
    assert_int_equal(l.w->nkept, 0);
    assert_false(l.w->clocked);
    const keel_break_cover *b = break_of(&l, "N1");
    assert_int_equal(b->cover, -1);
    assert_string_equal(b->rule, "no_cover");
    unload(&l);
}

static void test_timeline_follows_a_discharge_and_an_admission(void **state)
{
    (void)state;
    /* P1 is discharged at 11:00, A1 is admitted at 14:00: N1 holds 3, then 2, then 3. */
    loaded l = load("shift: {start: \"07:00\", minutes: 720}\n"
                    "policy: {acuity_minutes: {1: 60}}\n"
                    "nurses:\n"
                    "  - {id: N1}\n"
                    "  - {id: N2}\n"
                    "patients:\n"
                    "  - {id: P1, acuity: 1, nurse: N1, leaves_at: \"11:00\"}\n"
                    "  - {id: P2, acuity: 1, nurse: N1}\n"
                    "  - {id: P3, acuity: 1, nurse: N1}\n"
                    "  - {id: P4, acuity: 1, nurse: N2}\n"
                    "expected_admissions:\n"
                    "  - {id: A1, at: \"14:00\", acuity: 1, nurse: N1}\n",
                    0);
    const keel_course_change n1[] = {{0, 3}, {4 * HOUR, 2}, {7 * HOUR, 3}};
    const keel_course_change n2[] = {{0, 1}};
    assert_timeline(&l, "N1", n1, 3);
    assert_timeline(&l, "N2", n2, 1);
    unload(&l);
}

static void test_timeline_shows_a_nurse_leaving_at_fifteen_hundred(void **state)
{
    (void)state;
    /* N1 leaves at 15:00 and hands P1 and P2 to N2; N3 comes on at 11:00. */
    loaded l = load("shift: {start: \"07:00\", minutes: 720}\n"
                    "policy: {acuity_minutes: {1: 60}}\n"
                    "nurses:\n"
                    "  - {id: N1, end: \"15:00\"}\n"
                    "  - {id: N2}\n"
                    "  - {id: N3, start: \"11:00\"}\n"
                    "patients:\n"
                    "  - {id: P1, acuity: 1, nurse: N1, handoffs: [N2]}\n"
                    "  - {id: P2, acuity: 1, nurse: N1, handoffs: [N2]}\n"
                    "  - {id: P3, acuity: 1, nurse: N2}\n"
                    "  - {id: P4, acuity: 1, nurse: N3, arrives_at: \"12:00\"}\n",
                    0);
    const keel_course_change n1[] = {{0, 2}, {8 * HOUR, KEEL_COURSE_OFF}};
    const keel_course_change n2[] = {{0, 1}, {8 * HOUR, 3}};
    const keel_course_change n3[] = {{4 * HOUR, 0}, {5 * HOUR, 1}};
    assert_timeline(&l, "N1", n1, 2);
    assert_timeline(&l, "N2", n2, 2);
    assert_timeline(&l, "N3", n3, 2);
    unload(&l);
}

/* ------------------------------------------------------------------ */
/* Admission order                                                     */
/* ------------------------------------------------------------------ */

static void test_admission_order_by_hand(void **state)
{
    (void)state;
    /* Taking the next admission by the lowest utilisation it leaves, with the unit's mean
     * care per patient as the admission's care (common practice, no source).
     * Care 180 + 180 + 120 + 60 + 60 = 600 over 5 patients: 120 per admission.
     * Capacity 720 - 60 = 660 each.  Loads N1 360, N2 180, N3 60 (N3 may hold 2).
     *   1st: N1 480, N2 300, N3 180 -> N3 180/660; N3 is now full.
     *   2nd: N1 480, N2 300        -> N2 300/660.
     *   3rd: N1 480, N2 420        -> N2 420/660 (a nurse may be picked twice).
     * The relief nurse R is not counted and never picked. */
    loaded l = load("shift: {start: \"07:00\", minutes: 720, break_minutes: 60}\n"
                    "policy: {max_patients: 4, acuity_minutes: {1: 60, 2: 120, 3: 180}}\n"
                    "nurses:\n"
                    "  - {id: R, role: relief}\n"
                    "  - {id: N1}\n"
                    "  - {id: N2}\n"
                    "  - {id: N3, max_patients: 2}\n"
                    "patients:\n"
                    "  - {id: P1, acuity: 3, nurse: N1}\n"
                    "  - {id: P2, acuity: 3, nurse: N1}\n"
                    "  - {id: P3, acuity: 2, nurse: N2}\n"
                    "  - {id: P4, acuity: 1, nurse: N2}\n"
                    "  - {id: P5, acuity: 1, nurse: N3}\n",
                    3);
    assert_int_equal(l.c->admission_minutes, 120);
    assert_int_equal(l.c->npicks, 3);
    const size_t want[] = {nurse(&l, "N3"), nurse(&l, "N2"), nurse(&l, "N2")};
    const int loads[] = {180, 300, 420};
    for (size_t i = 0; i < 3; i++) {
        assert_int_equal(l.c->picks[i].nurse, want[i]);
        assert_int_equal(l.c->picks[i].load_minutes, loads[i]);
        assert_float_equal(l.c->picks[i].utilisation, loads[i] / 660.0, 1e-12);
    }
    unload(&l);
}

static void test_admission_order_ties_go_to_the_lower_nurse_index(void **state)
{
    (void)state;
    /* Equal loads: N1 first, then N2 (N1 is heavier by then), then N1 again.  Care 60 each,
     * 60 per admission; capacity 660; loads 180 each, then 240, 240, 300. */
    loaded l = load("shift: {start: \"07:00\", minutes: 720, break_minutes: 60}\n"
                    "policy: {acuity_minutes: {1: 60}}\n"
                    "nurses:\n"
                    "  - {id: N1}\n"
                    "  - {id: N2}\n"
                    "patients:\n"
                    "  - {id: P1, acuity: 1, nurse: N1}\n"
                    "  - {id: P2, acuity: 1, nurse: N2}\n"
                    "  - {id: P3, acuity: 1, nurse: N1}\n"
                    "  - {id: P4, acuity: 1, nurse: N2}\n"
                    "  - {id: P5, acuity: 1, nurse: N1}\n"
                    "  - {id: P6, acuity: 1, nurse: N2}\n",
                    3);
    assert_int_equal(l.c->admission_minutes, 60);
    assert_int_equal(l.c->npicks, 3);
    assert_int_equal(l.c->picks[0].nurse, nurse(&l, "N1"));
    assert_int_equal(l.c->picks[1].nurse, nurse(&l, "N2"));
    assert_int_equal(l.c->picks[2].nurse, nurse(&l, "N1"));
    assert_int_equal(l.c->picks[1].load_minutes, 240);
    assert_int_equal(l.c->picks[2].load_minutes, 300);
    unload(&l);
}

static void test_admission_room_is_counted_at_the_nurses_last_moment(void **state)
{
    (void)state;
    /* N1 may hold 2: she holds 2 until P1's discharge at 11:00, then 1, so at her last
     * moment she has room for one.  N2 holds 2 of 2 to the end: no room.  After N1's pick
     * nobody has room, so only one of three picks is made.
     * P1 [0, 240): ceil(72 * 240 / 720) = 24; the others 72 each.  Mean
     * ceil(240 / 4) = 60; N1 24 + 72 + 60 = 156 of 660. */
    loaded l = load("shift: {start: \"07:00\", minutes: 720, break_minutes: 60}\n"
                    "policy: {max_patients: 2, acuity_minutes: {1: 72}}\n"
                    "nurses:\n"
                    "  - {id: N1}\n"
                    "  - {id: N2}\n"
                    "patients:\n"
                    "  - {id: P1, acuity: 1, nurse: N1, leaves_at: \"11:00\"}\n"
                    "  - {id: P2, acuity: 1, nurse: N1}\n"
                    "  - {id: P3, acuity: 1, nurse: N2}\n"
                    "  - {id: P4, acuity: 1, nurse: N2}\n",
                    3);
    assert_int_equal(l.c->admission_minutes, 60);
    assert_int_equal(l.c->npicks, 1);
    assert_int_equal(l.c->picks[0].nurse, nurse(&l, "N1"));
    assert_int_equal(l.c->picks[0].load_minutes, 156);
    unload(&l);
}

static void test_admission_room_keeps_the_ratio_of_patients_held(void **state)
{
    (void)state;
    /* N1 is the lightest but holds P1, whose nurse may have 2 patients ("1:2"), and P2:
     * no room.  N2 takes the admission and is then at her limit of 4.
     * Mean care ceil((60 + 60 + 3 * 101) / 5) = ceil(84.6) = 85; N2 303 + 85 = 388. */
    loaded l = load("shift: {start: \"07:00\", minutes: 720, break_minutes: 60}\n"
                    "policy: {max_patients: 4, acuity_minutes: {1: 60, 2: 101}}\n"
                    "nurses:\n"
                    "  - {id: N1}\n"
                    "  - {id: N2}\n"
                    "patients:\n"
                    "  - {id: P1, acuity: 1, nurse: N1, ratio: \"1:2\"}\n"
                    "  - {id: P2, acuity: 1, nurse: N1}\n"
                    "  - {id: P3, acuity: 2, nurse: N2}\n"
                    "  - {id: P4, acuity: 2, nurse: N2}\n"
                    "  - {id: P5, acuity: 2, nurse: N2}\n",
                    3);
    assert_int_equal(l.c->admission_minutes, 85);
    assert_int_equal(l.c->npicks, 1);
    assert_int_equal(l.c->picks[0].nurse, nurse(&l, "N2"));
    assert_int_equal(l.c->picks[0].load_minutes, 388);
    unload(&l);
}

/* ------------------------------------------------------------------ */
/* Failure paths                                                       */
/* ------------------------------------------------------------------ */

static void test_course_survives_every_failed_allocation(void **state)
{
    (void)state;
    loaded l = load("shift: {start: \"07:00\", minutes: 720}\n"
                    "policy: {acuity_minutes: {1: 60}}\n"
                    "nurses:\n"
                    "  - {id: N1, end: \"15:00\", breaks: [{at: \"11:00\", minutes: 30}]}\n"
                    "  - {id: N2, covers: N1}\n"
                    "  - {id: R, role: relief}\n"
                    "patients:\n"
                    "  - {id: P1, acuity: 1, nurse: N1, handoffs: [N2]}\n"
                    "  - {id: P2, acuity: 1, nurse: N2, leaves_at: \"12:00\"}\n",
                    0);
    long made = 0;
    for (long n = 1;; n++) {
        keel_error err;
        keel_error_init(&err);
        keel_course *c = NULL;
        keel_alloc_fail_at(n);
        keel_status rc = keel_course_compute(l.r, l.w, l.nurse_of, 3, &c, &err);
        keel_alloc_fail_at(0);
        keel_error_fini(&err);
        if (rc == KEEL_OK) {
            assert_non_null(c);
            keel_course_free(c);
            made = n;
            break;
        }
        assert_int_equal(rc, KEEL_ERR_NOMEM);
        assert_null(c);
    }
    assert_true(made > 1);
    unload(&l);
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(test_buddy_left_with_eight_med_surg_patients_breaks_the_law_limit),
        cmocka_unit_test(test_buddy_within_the_law_limit_is_not_flagged),
        cmocka_unit_test(test_buddy_one_over_the_law_limit_is_flagged),
        cmocka_unit_test(test_law_limit_not_the_unit_limit_holds_during_a_break),
        cmocka_unit_test(test_cover_counts_only_the_moments_of_the_break),
        cmocka_unit_test(test_patient_limit_applies_without_a_table),
        cmocka_unit_test(test_relief_nurse_covers_a_break_without_a_buddy),
        cmocka_unit_test(test_buddy_who_leaves_during_the_break_cannot_cover),
        cmocka_unit_test(test_two_overlapping_uncovered_breaks_need_two_relief_nurses),
        cmocka_unit_test(test_break_holding_no_patients_needs_no_cover),
        cmocka_unit_test(test_timeline_follows_a_discharge_and_an_admission),
        cmocka_unit_test(test_timeline_shows_a_nurse_leaving_at_fifteen_hundred),
        cmocka_unit_test(test_admission_order_by_hand),
        cmocka_unit_test(test_admission_order_ties_go_to_the_lower_nurse_index),
        cmocka_unit_test(test_admission_room_is_counted_at_the_nurses_last_moment),
        cmocka_unit_test(test_admission_room_keeps_the_ratio_of_patients_held),
        cmocka_unit_test(test_break_plan_gives_the_relief_nurse_to_the_break_without_a_buddy),
        cmocka_unit_test(test_no_cover_is_kept_when_the_roster_plans_none),
        cmocka_unit_test(test_course_survives_every_failed_allocation),
    };
    return cmocka_run_group_tests_name("course", tests, NULL, NULL);
}
