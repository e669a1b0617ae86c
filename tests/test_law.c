/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * test_law.c - the built-in ratio tables of src/law.c against the texts
 * they encode: every shipped entry, the entries deliberately left out, the
 * ward-minimum arithmetic, the shift classes, and how keel cites a table.
 */
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdio.h>
#include <string.h>

#include <cmocka.h>

#include "keel/law.h"

#define HOUR 60

static const keel_law_table *california(void)
{
    const keel_law_table *t = keel_law_find("california");
    assert_non_null(t);
    return t;
}

static const keel_law_table *queensland(void)
{
    const keel_law_table *t = keel_law_find("queensland");
    assert_non_null(t);
    return t;
}

/* The entries a table is expected to hold, each checked in the text. */
typedef struct expected {
    const char *unit_type;
    keel_law_kind kind;
    keel_shift_class shift;
    int patients_per_nurse;
} expected;

/* True when the table holds exactly the expected entries, in any order. */
static void assert_exact_entries(const keel_law_table *t, const expected *want, size_t nwant)
{
    assert_int_equal(t->nentries, nwant);
    for (size_t i = 0; i < nwant; i++) {
        size_t found = 0;
        for (size_t j = 0; j < t->nentries; j++) {
            const keel_law_entry *e = &t->entries[j];
            if (strcmp(e->unit_type, want[i].unit_type) == 0 && e->kind == want[i].kind &&
                e->shift == want[i].shift && e->patients_per_nurse == want[i].patients_per_nurse)
                found++;
        }
        if (found != 1)
            print_message("%s: %s 1:%d found %zu times\n", t->name, want[i].unit_type,
                          want[i].patients_per_nurse, found);
        assert_int_equal(found, 1);
    }
}

static void test_california_maxima_match_title_22(void **state)
{
    (void)state;
    const keel_law_table *t = california();
    /* Source: California Code of Regulations, Title 22, section 70217(a) (CDPH AFL 08-07,
     * 2008): licensed nurse to patient at all times, critical care 1:2, step-down 1:3,
     * telemetry 1:4, medical-surgical 1:5 from 2005-01-01 (sources.md, read). */
    assert_int_equal(keel_law_nurse_max(t, "icu"), 2);
    assert_int_equal(keel_law_nurse_max(t, "step-down"), 3);
    assert_int_equal(keel_law_nurse_max(t, "telemetry"), 4);
    assert_int_equal(keel_law_nurse_max(t, "med-surg"), 5);
    /* A per-nurse maximum is no ward minimum. */
    assert_int_equal(keel_law_ward_minimum(t, "med-surg", KEEL_SHIFT_ANY, 23), -1);
    /* Source: same section: the ratio holds at all times, not by shift (sources.md). */
    assert_int_equal(keel_law_shift_class(t, 7 * HOUR, 8 * HOUR), KEEL_SHIFT_ANY);
    assert_null(t->classes);
}

static void test_only_entries_read_in_the_text_are_shipped(void **state)
{
    (void)state;
    /* Source: CCR Title 22 section 70217(a) as in sources.md (read): these four only. */
    const expected cal[] = {
        {"icu", KEEL_LAW_NURSE_MAX, KEEL_SHIFT_ANY, 2},
        {"step-down", KEEL_LAW_NURSE_MAX, KEEL_SHIFT_ANY, 3},
        {"telemetry", KEEL_LAW_NURSE_MAX, KEEL_SHIFT_ANY, 4},
        {"med-surg", KEEL_LAW_NURSE_MAX, KEEL_SHIFT_ANY, 5},
    };
    /* Source: Hospital and Health Boards Regulation 2012 (Qld), Part 6A (sources.md, read):
     * 1:4 on morning and afternoon shifts, 1:7 at night, as a ward minimum. */
    const expected qld[] = {
        {"med-surg", KEEL_LAW_WARD_MIN, KEEL_SHIFT_MORNING, 4},
        {"med-surg", KEEL_LAW_WARD_MIN, KEEL_SHIFT_AFTERNOON, 4},
        {"med-surg", KEEL_LAW_WARD_MIN, KEEL_SHIFT_NIGHT, 7},
    };
    assert_exact_entries(california(), cal, sizeof cal / sizeof cal[0]);
    assert_exact_entries(queensland(), qld, sizeof qld / sizeof qld[0]);
    assert_int_equal(keel_law_ntables(), 2);
    assert_null(keel_law_table_at(keel_law_ntables()));

    /* Source: sources.md lists California's specialty (oncology) 1:4, pediatrics 1:4 and
     * psychiatric 1:6 as secondary only: not shipped. */
    assert_int_equal(keel_law_nurse_max(california(), "oncology"), -1);
    assert_int_equal(keel_law_nurse_max(california(), "pediatrics"), -1);
    assert_int_equal(keel_law_nurse_max(california(), "psychiatric"), -1);
    assert_false(keel_law_covers(california(), "oncology"));
    /* Source: sources.md, Oregon ORS 441.765: medical-surgical effective date unchecked, so
     * no Oregon table is shipped. */
    assert_null(keel_law_find("oregon"));
    assert_null(keel_law_find(NULL));
}

static void test_queensland_is_a_ward_minimum_not_a_cap(void **state)
{
    (void)state;
    const keel_law_table *t = queensland();
    /* Source: Hospital and Health Boards Regulation 2012 (Qld), Part 6A (sources.md, read):
     * a minimum number of nurses for the ward's census, not a cap on each nurse. */
    assert_int_equal(keel_law_nurse_max(t, "med-surg"), -1);
    assert_true(keel_law_covers(t, "med-surg"));
    /* Source: same: prescribed adult acute medical and surgical wards only. */
    assert_false(keel_law_covers(t, "icu"));
    assert_int_equal(keel_law_ward_minimum(t, "icu", KEEL_SHIFT_MORNING, 28), -1);
}

static void test_queensland_worked_example_28_patients(void **state)
{
    (void)state;
    const keel_law_table *t = queensland();
    /* Source: Queensland's worked example for Part 6A (sources.md, read): 28 patients need
     * 7 nurses by day and 4 at night. */
    assert_int_equal(keel_law_ward_minimum(t, "med-surg", KEEL_SHIFT_MORNING, 28), 7);
    assert_int_equal(keel_law_ward_minimum(t, "med-surg", KEEL_SHIFT_AFTERNOON, 28), 7);
    assert_int_equal(keel_law_ward_minimum(t, "med-surg", KEEL_SHIFT_NIGHT, 28), 4);
}

static void test_ward_minimum_rounds_a_part_nurse_up(void **state)
{
    (void)state;
    const keel_law_table *t = queensland();
    /* Source: sources.md, "Minimum nurses for a census under a 1:N rule: ceil(patients / N)"
     * (the general rule; the regulation's own wording on a part nurse was not read). */
    assert_int_equal(keel_law_ward_minimum(t, "med-surg", KEEL_SHIFT_MORNING, 29), 8);
    assert_int_equal(keel_law_ward_minimum(t, "med-surg", KEEL_SHIFT_NIGHT, 29), 5);
    assert_int_equal(keel_law_ward_minimum(t, "med-surg", KEEL_SHIFT_NIGHT, 1), 1);
    assert_int_equal(keel_law_ward_minimum(t, "med-surg", KEEL_SHIFT_NIGHT, 0), 0);
    for (size_t census = 0; census <= 60; census++) {
        assert_int_equal(keel_law_ward_minimum(t, "med-surg", KEEL_SHIFT_AFTERNOON, census),
                         (int)((census + 3) / 4));
        assert_int_equal(keel_law_ward_minimum(t, "med-surg", KEEL_SHIFT_NIGHT, census),
                         (int)((census + 6) / 7));
    }
}

static void test_shift_classes_follow_section_30a(void **state)
{
    (void)state;
    const keel_law_table *t = queensland();
    /* Source: Hospital and Health Boards Regulation 2012 (Qld), s 30A (sources.md, read):
     * morning mostly 07:00-15:00, afternoon 15:00-23:00, night 23:00-07:00. */
    assert_int_equal(keel_law_shift_class(t, 7 * HOUR, 8 * HOUR), KEEL_SHIFT_MORNING);
    assert_int_equal(keel_law_shift_class(t, 15 * HOUR, 8 * HOUR), KEEL_SHIFT_AFTERNOON);
    assert_int_equal(keel_law_shift_class(t, 23 * HOUR, 8 * HOUR), KEEL_SHIFT_NIGHT);
    /* Source: same, s 30A: a shift split equally between morning and afternoon is an
     * afternoon shift, e.g. 11:00-19:00. */
    assert_int_equal(keel_law_shift_class(t, 11 * HOUR, 8 * HOUR), KEEL_SHIFT_AFTERNOON);
    /* Source: same, "mostly falls": 07:00-19:00 is 8 h morning, 4 h afternoon; 19:00-07:00
     * is 4 h afternoon, 8 h night (worked from the definition). */
    assert_int_equal(keel_law_shift_class(t, 7 * HOUR, 12 * HOUR), KEEL_SHIFT_MORNING);
    assert_int_equal(keel_law_shift_class(t, 19 * HOUR, 12 * HOUR), KEEL_SHIFT_NIGHT);
    /* A shift without a start has no class (keel's rule: the roster must give shift.start). */
    assert_int_equal(keel_law_shift_class(t, -1, 8 * HOUR), KEEL_SHIFT_ANY);
    assert_string_equal(keel_shift_class_name(KEEL_SHIFT_AFTERNOON), "afternoon");
    assert_string_equal(keel_shift_class_name(KEEL_SHIFT_ANY), "any");
}

static void test_shift_class_ties_follow_section_30a_2(void **state)
{
    (void)state;
    const keel_law_table *t = queensland();
    /* Source: Hospital and Health Boards Amendment Regulation (No. 2) 2016 (Qld), s 4,
     * inserting s 30A(2)(c) (read in a reprint of the as-made text): a shift that falls
     * equally across the morning and night periods is a morning shift.  03:00-11:00 is
     * 4 h night, 4 h morning. */
    assert_int_equal(keel_law_shift_class(t, 3 * HOUR, 8 * HOUR), KEEL_SHIFT_MORNING);
    /* Source: same, s 30A(2)(b): a shift that falls equally across the afternoon and night
     * periods is a night shift.  19:00-03:00 is 4 h afternoon, 4 h night. */
    assert_int_equal(keel_law_shift_class(t, 19 * HOUR, 8 * HOUR), KEEL_SHIFT_NIGHT);
}

static void test_tables_say_what_they_encode_and_when(void **state)
{
    (void)state;
    /* Source: sources.md names the texts: CCR Title 22 section 70217(a); Hospital and
     * Health Boards Regulation 2012 (Qld) Part 6A, in force from 2016-07-01. */
    assert_non_null(strstr(california()->citation, "70217(a)"));
    assert_non_null(strstr(queensland()->citation, "Part 6A"));
    assert_non_null(strstr(queensland()->version, "2016-07-01"));
    for (size_t i = 0; i < keel_law_ntables(); i++) {
        const keel_law_table *t = keel_law_table_at(i);
        const char *d = t->encoded;
        assert_ptr_equal(keel_law_find(t->name), t);
        assert_non_null(t->version);
        /* keel's rule: an encoding date is YYYY-MM-DD. */
        assert_int_equal(strlen(d), 10);
        for (size_t j = 0; j < 10; j++)
            assert_true(j == 4 || j == 7 ? d[j] == '-' : d[j] >= '0' && d[j] <= '9');
    }
}

static void test_cite_words_california_as_its_text_says(void **state)
{
    (void)state;
    char buf[KEEL_LAW_CITE_SIZE];
    /* Source: California Code of Regulations, Title 22, section 70217(a) (CDPH AFL 08-07,
     * 2008): medical-surgical 1:5 from 2005-01-01 (sources.md, read).  The date is keel's
     * own, the day the table was encoded. */
    const char *want = "california (California Code of Regulations, Title 22, section 70217(a); "
                       "medical-surgical 1:5 in force from 2005-01-01 (CDPH AFL 08-07, 2008); as "
                       "encoded by keel on 2026-12-02)";
    assert_int_equal(keel_law_cite(california(), buf, sizeof buf), strlen(want));
    assert_string_equal(buf, want);
    assert_null(california()->note);
}

static void test_cite_words_queensland_and_its_note(void **state)
{
    (void)state;
    char buf[KEEL_LAW_CITE_SIZE];
    /* Source: Hospital and Health Boards Regulation 2012 (Qld), Part 6A, in force from
     * 2016-07-01 (sources.md, read). */
    const char *want = "queensland (Hospital and Health Boards Regulation 2012 (Qld), Part 6A; "
                       "Part 6A as in force from 2016-07-01; as encoded by keel on 2026-12-02)";
    assert_int_equal(keel_law_cite(queensland(), buf, sizeof buf), strlen(want));
    assert_string_equal(buf, want);
    assert_non_null(queensland()->note);
    /* (from memory) The 2012 regulation was later replaced; sources.md names no successor
     * and keel has not read one, so the note says so and names none. */
    assert_string_equal(queensland()->note,
                        "This table encodes superseded text: the Hospital and Health Boards "
                        "Regulation 2012 (Qld) was replaced by a later text, and keel has not "
                        "checked the table against that successor.");
}

static void test_cite_is_snprintf_like(void **state)
{
    (void)state;
    char full[KEEL_LAW_CITE_SIZE], small[12];
    for (size_t i = 0; i < keel_law_ntables(); i++) {
        const keel_law_table *t = keel_law_table_at(i);
        int need = keel_law_cite(t, NULL, 0);
        /* keel's rule: KEEL_LAW_CITE_SIZE holds every built-in table. */
        assert_true(need > 0 && need < KEEL_LAW_CITE_SIZE);
        assert_int_equal(keel_law_cite(t, full, sizeof full), need);
        assert_int_equal(strlen(full), need);
        assert_int_equal(keel_law_cite(t, small, sizeof small), need);
        assert_int_equal(strlen(small), sizeof small - 1);
        assert_memory_equal(small, full, sizeof small - 1);
    }
    assert_int_equal(keel_law_cite(NULL, full, sizeof full), 0);
    assert_string_equal(full, "");
}

static void test_a_shift_across_two_classes_says_how_it_is_classed(void **state)
{
    (void)state;
    const keel_law_table *t = queensland();
    char cite[KEEL_LAW_CITE_SIZE], want[2 * KEEL_LAW_CITE_SIZE], note[2 * KEEL_LAW_CITE_SIZE];
    keel_law_cite(t, cite, sizeof cite);
    /* Source: Hospital and Health Boards Regulation 2012 (Qld), s 30A (sources.md, read):
     * afternoon 15:00-23:00, night 23:00-07:00, so 19:00-07:00 is 4 h afternoon and 8 h
     * night, a night shift (worked from the definition). */
    assert_true(keel_law_shift_spans(t, 19 * HOUR, 12 * HOUR));
    snprintf(want, sizeof want,
             "classed as night under %s (the shift spans 240 min of afternoon and 480 min of "
             "night; keel applies the class that holds most of the shift's minutes, a tie "
             "settled as section 30A(2) of the text says)",
             cite);
    int need = keel_law_shift_class_note(t, 19 * HOUR, 12 * HOUR, note, sizeof note);
    assert_string_equal(note, want);
    assert_int_equal(need, strlen(want));
    assert_int_equal(keel_law_shift_class_note(t, 19 * HOUR, 12 * HOUR, NULL, 0), need);
    /* Source: same, s 30A(2)(b) (see the tie test above): 19:00-03:00 is 4 h afternoon and
     * 4 h night, a night shift. */
    keel_law_shift_class_note(t, 19 * HOUR, 8 * HOUR, note, sizeof note);
    assert_non_null(strstr(note, "classed as night under"));
    assert_non_null(strstr(note, "(the shift spans 240 min of afternoon and 240 min of night;"));
    /* Source: same, s 30A: 06:00-16:00 is 1 h night, 8 h morning, 1 h afternoon. */
    keel_law_shift_class_note(t, 6 * HOUR, 10 * HOUR, note, sizeof note);
    assert_non_null(strstr(note, "classed as morning under"));
    assert_non_null(
        strstr(note, "spans 480 min of morning, 60 min of afternoon and 60 min of night;"));
    /* Source: same: 07:00-15:00 lies within the morning: nothing to say. */
    assert_false(keel_law_shift_spans(t, 7 * HOUR, 8 * HOUR));
    strcpy(note, "stale");
    assert_int_equal(keel_law_shift_class_note(t, 7 * HOUR, 8 * HOUR, note, sizeof note), 0);
    assert_string_equal(note, "");
    /* A table without shift classes, or a shift without a start, spans nothing. */
    assert_false(keel_law_shift_spans(california(), 19 * HOUR, 12 * HOUR));
    assert_int_equal(
        keel_law_shift_class_note(california(), 19 * HOUR, 12 * HOUR, note, sizeof note), 0);
    assert_false(keel_law_shift_spans(t, -1, 12 * HOUR));
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(test_california_maxima_match_title_22),
        cmocka_unit_test(test_only_entries_read_in_the_text_are_shipped),
        cmocka_unit_test(test_queensland_is_a_ward_minimum_not_a_cap),
        cmocka_unit_test(test_queensland_worked_example_28_patients),
        cmocka_unit_test(test_ward_minimum_rounds_a_part_nurse_up),
        cmocka_unit_test(test_shift_classes_follow_section_30a),
        cmocka_unit_test(test_shift_class_ties_follow_section_30a_2),
        cmocka_unit_test(test_tables_say_what_they_encode_and_when),
        cmocka_unit_test(test_cite_words_california_as_its_text_says),
        cmocka_unit_test(test_cite_words_queensland_and_its_note),
        cmocka_unit_test(test_cite_is_snprintf_like),
        cmocka_unit_test(test_a_shift_across_two_classes_says_how_it_is_classed),
    };
    return cmocka_run_group_tests_name("law", tests, NULL, NULL);
}
