/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * test_nas.c - the Nursing Activities Score module of src/nas.c against
 * the instrument: every weight, the largest possible score, the rules of
 * scoring (one level per item, each item once), the conversion of a score
 * to care minutes and its rounding, and the messages a loader reports.
 */
#include <limits.h>
#include <setjmp.h>
#include <stdarg.h>
#include <stdbool.h>
#include <stddef.h>
#include <stdio.h>
#include <string.h>

#include <cmocka.h>

#include "keel/nas.h"

#define ARRAY_LEN(a) (sizeof(a) / sizeof((a)[0]))

/* Items of the instrument that are scored by level. */
static const int levelled_items[] = {1, 4, 6, 7, 8};

typedef struct weight {
    const char *code;
    int tenths;
} weight;

/* Source: Miranda et al., Crit Care Med 2003, item weights as listed in
 * sources.md ("Workload instruments that convert to nursing time"; read,
 * two sources), except 7a and 7b, listed there from memory and checked in
 * stored secondary sources (see src/nas.c): 7a 4.0, 7b 32.0. */
static const weight published[] = {
    {"1a", 45},  {"1b", 121}, {"1c", 196}, {"2", 43},   {"3", 56},   {"4a", 41}, {"4b", 165},
    {"4c", 200}, {"5", 18},   {"6a", 55},  {"6b", 124}, {"6c", 170}, {"7a", 40}, {"7b", 320},
    {"8a", 42},  {"8b", 232}, {"8c", 300}, {"9", 14},   {"10", 18},  {"11", 44}, {"12", 12},
    {"13", 25},  {"14", 17},  {"15", 71},  {"16", 77},  {"17", 70},  {"18", 16}, {"19", 13},
    {"20", 28},  {"21", 13},  {"22", 28},  {"23", 19},
};

static bool is_levelled(int item)
{
    for (size_t i = 0; i < ARRAY_LEN(levelled_items); i++)
        if (levelled_items[i] == item)
            return true;
    return false;
}

static void test_every_weight_matches_the_published_instrument(void **state)
{
    (void)state;
    /* Both directions: every published weight is in the table, and the
     * table holds nothing else. */
    assert_int_equal(keel_nas_ntable(), ARRAY_LEN(published));
    for (size_t i = 0; i < ARRAY_LEN(published); i++) {
        const keel_nas_item *line = keel_nas_find(published[i].code);
        assert_non_null(line);
        assert_string_equal(line->code, published[i].code);
        assert_int_equal(line->weight_tenths, published[i].tenths);
    }
    assert_null(keel_nas_table_at(keel_nas_ntable()));
}

static void test_the_table_has_23_items_levels_only_where_the_instrument_has_them(void **state)
{
    (void)state;
    /* Source: Miranda et al., Crit Care Med 2003 (sources.md): 23 items;
     * items 1, 4, 6, 7 and 8 are scored by level (a, b, c; item 7 has a and b). */
    int lines_of[KEEL_NAS_NITEMS + 1] = {0};
    for (size_t i = 0; i < keel_nas_ntable(); i++) {
        const keel_nas_item *line = keel_nas_table_at(i);
        assert_non_null(line);
        assert_in_range(line->item, 1, KEEL_NAS_NITEMS);
        lines_of[line->item]++;
        assert_non_null(line->label);
        assert_true(strlen(line->label) > 0 && strlen(line->label) <= 48); /* short */
        if (is_levelled(line->item))
            assert_true(line->level >= 'a' && line->level <= 'c');
        else
            assert_int_equal(line->level, '\0');
    }
    for (int item = 1; item <= KEEL_NAS_NITEMS; item++)
        assert_int_equal(lines_of[item], item == 7 ? 2 : is_levelled(item) ? 3 : 1);
}

static void test_the_largest_score_is_176_8(void **state)
{
    (void)state;
    /* The largest level of each levelled item plus every other item. */
    int largest[KEEL_NAS_NITEMS + 1] = {0};
    for (size_t i = 0; i < keel_nas_ntable(); i++) {
        const keel_nas_item *line = keel_nas_table_at(i);
        if (line->weight_tenths > largest[line->item])
            largest[line->item] = line->weight_tenths;
    }
    int total = 0;
    for (int item = 1; item <= KEEL_NAS_NITEMS; item++)
        total += largest[item];
    /* Source: sources.md, NAS maximum 176.8 (derived from the weights). */
    assert_int_equal(total, 1768);

    /* The same through the scoring API, with the largest level of each item. */
    char *codes[] = {"1c", "2",  "3",  "4c", "5",  "6c", "7b", "8c", "9",  "10", "11", "12",
                     "13", "14", "15", "16", "17", "18", "19", "20", "21", "22", "23"};
    assert_int_equal(ARRAY_LEN(codes), KEEL_NAS_NITEMS);
    assert_int_equal(keel_nas_score(codes, ARRAY_LEN(codes)), 1768);
}

static void test_100_points_are_one_nurse_for_the_whole_shift(void **state)
{
    (void)state;
    /* Source: Miranda et al., Crit Care Med 2003 (sources.md): the score is
     * the percentage of one nurse's time over 24 h; 1 point = 14.4 min per
     * 24 h. */
    assert_int_equal(keel_nas_shift_minutes(1000, KEEL_NAS_DAY_MINUTES), 1440);
    assert_int_equal(keel_nas_shift_minutes(1000, 480), 480);
    assert_int_equal(keel_nas_shift_minutes(1000, 720), 720);
    /* Source: same: 1 point = 14.4 min per 24 h, 4.8 min per 8-h shift; whole
     * minutes round up (keel's loads are whole minutes). */
    assert_int_equal(keel_nas_shift_minutes(10, KEEL_NAS_DAY_MINUTES), 15); /* 14.4 */
    assert_int_equal(keel_nas_shift_minutes(10, 480), 5);                   /* 4.8 */
    assert_int_equal(keel_nas_shift_minutes(50, 480), 24);                  /* 24.0 exactly */
}

static void test_a_score_of_55_6_is_about_800_minutes_a_day(void **state)
{
    (void)state;
    /* A list whose weights (sources.md, read) add up to 55.6 points:
     * 12.1 + 4.3 + 5.6 + 4.1 + 12.4 + 1.4 + 1.8 + 4.4 + 7.0 + 2.5. */
    char *codes[] = {"1b", "2", "3", "4a", "6b", "9", "10", "11", "17", "13"};
    int score = keel_nas_score(codes, ARRAY_LEN(codes));
    assert_int_equal(score, 556);
    /* Source: Campagner et al., Rev Bras Ter Intensiva 2014 (sources.md): NAS
     * 55.6 is about 800 minutes per 24 h; 55.6 * 14.4 = 800.64, rounded up. */
    assert_int_equal(keel_nas_shift_minutes(score, KEEL_NAS_DAY_MINUTES), 801);
    /* The 8-hour share: 55.6 * 4.8 = 266.88. */
    assert_int_equal(keel_nas_shift_minutes(score, 480), 267);
}

static void test_minutes_round_up_and_refuse_bad_arguments(void **state)
{
    (void)state;
    assert_int_equal(keel_nas_shift_minutes(0, 480), 0);
    assert_int_equal(keel_nas_shift_minutes(1, 480), 1);  /* 0.48 */
    assert_int_equal(keel_nas_shift_minutes(12, 480), 6); /* 5.76 */
    assert_int_equal(keel_nas_shift_minutes(1768, 0), 0);
    assert_int_equal(keel_nas_shift_minutes(-1, 480), -1);
    assert_int_equal(keel_nas_shift_minutes(100, -480), -1);
    /* 176.8 points of a shift of INT_MAX minutes do not fit an int; 100 do. */
    assert_int_equal(keel_nas_shift_minutes(1768, INT_MAX), -1);
    assert_int_equal(keel_nas_shift_minutes(1000, INT_MAX), INT_MAX);
}

static void test_two_levels_of_one_item_are_an_error(void **state)
{
    (void)state;
    /* Source: Miranda et al., Crit Care Med 2003: in items 1, 4, 6, 7 and 8
     * only one level may be scored. */
    char *codes[] = {"2", "1a", "12", "1b"};
    size_t bad = 99, earlier = 99;
    assert_int_equal(keel_nas_validate(codes, ARRAY_LEN(codes), &bad, &earlier),
                     KEEL_NAS_ALTERNATIVE);
    assert_int_equal(bad, 3);
    assert_int_equal(earlier, 1);
    assert_int_equal(keel_nas_score(codes, ARRAY_LEN(codes)), -1);

    /* Every pair of levels of every levelled item, in both orders. */
    for (size_t i = 0; i < keel_nas_ntable(); i++)
        for (size_t j = 0; j < keel_nas_ntable(); j++) {
            const keel_nas_item *a = keel_nas_table_at(i), *b = keel_nas_table_at(j);
            if (i == j || a->item != b->item)
                continue;
            char *pair[] = {(char *)a->code, (char *)b->code};
            assert_int_equal(keel_nas_validate(pair, 2, &bad, &earlier), KEEL_NAS_ALTERNATIVE);
            assert_int_equal(bad, 1);
            assert_int_equal(earlier, 0);
        }

    /* Levels of different items go together. */
    char *mixed[] = {"1c", "4b", "6a", "7a", "8b"};
    assert_int_equal(keel_nas_validate(mixed, ARRAY_LEN(mixed), &bad, &earlier), KEEL_NAS_OK);
    assert_int_equal(keel_nas_score(mixed, ARRAY_LEN(mixed)), 196 + 165 + 55 + 40 + 232);
}

static void test_an_item_is_scored_once(void **state)
{
    (void)state;
    char *codes[] = {"12", "4b", "12"};
    size_t bad = 99, earlier = 99;
    assert_int_equal(keel_nas_validate(codes, ARRAY_LEN(codes), &bad, &earlier),
                     KEEL_NAS_DUPLICATE);
    assert_int_equal(bad, 2);
    assert_int_equal(earlier, 0);
    char *levels[] = {"6b", "6b"};
    assert_int_equal(keel_nas_validate(levels, 2, &bad, &earlier), KEEL_NAS_DUPLICATE);
    assert_int_equal(bad, 1);
    assert_int_equal(earlier, 0);
}

static void test_unknown_codes_are_named(void **state)
{
    (void)state;
    const char *unknown[] = {"", "0", "24", "1d", "7c", "1A", " 1a", "1a ", "01", "12a", "x"};
    for (size_t i = 0; i < ARRAY_LEN(unknown); i++) {
        assert_null(keel_nas_find(unknown[i]));
        char *codes[] = {"3", (char *)unknown[i]};
        size_t bad = 99, earlier = 99;
        assert_int_equal(keel_nas_validate(codes, 2, &bad, &earlier), KEEL_NAS_UNKNOWN);
        assert_int_equal(bad, 1);
        assert_int_equal(earlier, 1); /* no earlier entry involved: its own index */
    }
    assert_null(keel_nas_find(NULL));
    char *with_null[] = {NULL};
    assert_int_equal(keel_nas_validate(with_null, 1, NULL, NULL), KEEL_NAS_UNKNOWN);

    /* The bare number of a levelled item asks for the level. */
    for (size_t i = 0; i < ARRAY_LEN(levelled_items); i++) {
        char number[4];
        snprintf(number, sizeof number, "%d", levelled_items[i]);
        char *codes[] = {number};
        assert_int_equal(keel_nas_validate(codes, 1, NULL, NULL), KEEL_NAS_NEEDS_LEVEL);
    }
}

static void test_the_sheet_reports_every_bad_entry_and_scores_the_rest(void **state)
{
    (void)state;
    const char *codes[] = {"1a", "1b", "99", "2", "2", "4", "7b"};
    const keel_nas_problem expected[] = {KEEL_NAS_OK, KEEL_NAS_ALTERNATIVE, KEEL_NAS_UNKNOWN,
                                         KEEL_NAS_OK, KEEL_NAS_DUPLICATE,   KEEL_NAS_NEEDS_LEVEL,
                                         KEEL_NAS_OK};
    const size_t earlier_of[] = {0, 0, 2, 3, 3, 5, 6};
    keel_nas_sheet sheet;
    keel_nas_sheet_init(&sheet);
    for (size_t i = 0; i < ARRAY_LEN(codes); i++) {
        size_t earlier = 99;
        assert_int_equal(sheet.nentries, i);
        assert_int_equal(keel_nas_sheet_add(&sheet, codes[i], &earlier), expected[i]);
        assert_int_equal(earlier, earlier_of[i]);
    }
    assert_int_equal(sheet.nentries, ARRAY_LEN(codes));
    assert_int_equal(sheet.score_tenths, 45 + 43 + 320); /* 1a, 2, 7b */
    char *none[] = {NULL};
    assert_int_equal(keel_nas_score(none, 0), 0);
}

static void test_messages_say_what_is_wrong_and_what_was_expected(void **state)
{
    (void)state;
    char buf[256];
    int n = keel_nas_problem_format(KEEL_NAS_ALTERNATIVE, "1b", "1a", buf, sizeof buf);
    assert_string_equal(
        buf, "\"1a\" and \"1b\" are two levels of NAS item 1; expected one level per item");
    assert_int_equal(n, (int)strlen(buf));
    keel_nas_problem_format(KEEL_NAS_NEEDS_LEVEL, "4", NULL, buf, sizeof buf);
    assert_string_equal(buf, "NAS item 4 is scored by level; expected 4a, 4b or 4c");
    keel_nas_problem_format(KEEL_NAS_NEEDS_LEVEL, "7", NULL, buf, sizeof buf);
    assert_string_equal(buf, "NAS item 7 is scored by level; expected 7a or 7b");
    keel_nas_problem_format(KEEL_NAS_DUPLICATE, "12", "12", buf, sizeof buf);
    assert_string_equal(buf, "NAS item \"12\" is listed twice; expected each item once");
    keel_nas_problem_format(KEEL_NAS_UNKNOWN, "1d", NULL, buf, sizeof buf);
    assert_non_null(strstr(buf, "\"1d\" is not a NAS item; expected "));

    /* snprintf contract: the needed length, truncated text, NUL-terminated. */
    char small[8];
    n = keel_nas_problem_format(KEEL_NAS_DUPLICATE, "12", "12", small, sizeof small);
    assert_int_equal(n, (int)strlen("NAS item \"12\" is listed twice; expected each item once"));
    assert_string_equal(small, "NAS ite");
    assert_int_equal(keel_nas_problem_format(KEEL_NAS_DUPLICATE, "12", "12", NULL, 0), n);
}

static void test_the_note_says_the_figure_is_an_approximation(void **state)
{
    (void)state;
    assert_non_null(strstr(keel_nas_note(), "approximation"));
    assert_non_null(strstr(keel_nas_note(), "past 24 hours"));
    assert_string_equal(keel_nas_problem_name(KEEL_NAS_OK), "ok");
    assert_string_equal(keel_nas_problem_name(KEEL_NAS_ALTERNATIVE), "two levels of one item");
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(test_every_weight_matches_the_published_instrument),
        cmocka_unit_test(test_the_table_has_23_items_levels_only_where_the_instrument_has_them),
        cmocka_unit_test(test_the_largest_score_is_176_8),
        cmocka_unit_test(test_100_points_are_one_nurse_for_the_whole_shift),
        cmocka_unit_test(test_a_score_of_55_6_is_about_800_minutes_a_day),
        cmocka_unit_test(test_minutes_round_up_and_refuse_bad_arguments),
        cmocka_unit_test(test_two_levels_of_one_item_are_an_error),
        cmocka_unit_test(test_an_item_is_scored_once),
        cmocka_unit_test(test_unknown_codes_are_named),
        cmocka_unit_test(test_the_sheet_reports_every_bad_entry_and_scores_the_rest),
        cmocka_unit_test(test_messages_say_what_is_wrong_and_what_was_expected),
        cmocka_unit_test(test_the_note_says_the_figure_is_an_approximation),
    };
    return cmocka_run_group_tests_name("nas", tests, NULL, NULL);
}
