/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * test_staffing.c - the staffing view of keel/staffing.h: nurses needed by
 * care minutes, by limits (with patients' ratios and the high-acuity rule)
 * and by a ratio table's ward minimum; nurse hours per patient; the
 * sentences.  Rosters are built in memory and read by keel_roster_parse.
 * All units, nurses and patients are invented.
 */
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>
#include <stdio.h>
#include <string.h>

#include <cmocka.h>

#include "alloc.h"
#include "keel/keel.h"
#include "keel/staffing.h"
#include "workload_internal.h"

/* ---------------------------------------------------------------------------
 * Building rosters
 */

typedef struct text {
    char buf[32768];
    size_t len;
} text;

#if defined(__GNUC__)
__attribute__((format(printf, 2, 3)))
#endif
static void
add(text *t, const char *fmt, ...)
{
    va_list ap;
    va_start(ap, fmt);
    int n = vsnprintf(t->buf + t->len, sizeof t->buf - t->len, fmt, ap);
    va_end(ap);
    assert_true(n >= 0 && (size_t)n < sizeof t->buf - t->len);
    t->len += (size_t)n;
}

/* Nurses N<first>..N<first+count-1>, each with the fields in extra ("" for none). */
static void add_nurses(text *t, int first, int count, const char *extra)
{
    for (int i = first; i < first + count; i++)
        add(t, "  - {id: N%d%s%s}\n", i, extra[0] ? ", " : "", extra);
}

/* Patients P<first>..P<first+count-1>, each with the fields in fields. */
static void add_patients(text *t, int first, int count, const char *fields)
{
    for (int i = first; i < first + count; i++)
        add(t, "  - {id: P%d, %s}\n", i, fields);
}

typedef struct loaded {
    keel_roster *r;
    keel_workload *w;
    keel_staffing s;
    char words[2048];
} loaded;

static loaded load(const text *t)
{
    loaded l;
    keel_error err;
    memset(&l, 0, sizeof l);
    keel_error_init(&err);
    keel_status rc = keel_roster_parse("staffing.yaml", t->buf, t->len, &l.r, &err);
    for (size_t i = 0; i < err.nproblems; i++)
        print_message("%d:%d: %s\n", err.problems[i].line, err.problems[i].column,
                      err.problems[i].message);
    assert_int_equal(rc, KEEL_OK);
    assert_int_equal(keel_workload_compute(l.r, &l.w, &err), KEEL_OK);
    assert_int_equal(keel_staffing_compute(l.r, l.w, &l.s, &err), KEEL_OK);
    keel_error_fini(&err);
    int need = keel_staffing_format(&l.s, l.words, sizeof l.words);
    assert_true(need > 0 && (size_t)need < sizeof l.words);
    assert_int_equal(strlen(l.words), need);
    /* keel never calls a roster lawful or unlawful (design.md, Safety). */
    assert_null(strstr(l.words, "lawful"));
    return l;
}

static void unload(loaded *l)
{
    keel_workload_free(l->w);
    keel_roster_free(l->r);
}

/* A med-surg unit under the California table: npatients of 60 care minutes,
 * nnurses on a 12-hour shift with an hour's break. */
static void california_medsurg(text *t, int nnurses, int npatients)
{
    memset(t, 0, sizeof *t);
    add(t, "unit: {name: \"Invented West 3\", type: med-surg}\n"
           "shift: {start: \"07:00\", minutes: 720, break_minutes: 60}\n"
           "policy: {ratio_table: california}\n"
           "nurses:\n");
    add_nurses(t, 1, nnurses, "");
    add(t, "patients:\n");
    add_patients(t, 1, npatients, "care_minutes: 60");
}

/* ---------------------------------------------------------------------------
 * Needs by limits
 */

static void test_california_23_med_surg_patients_need_5_nurses(void **state)
{
    (void)state;
    text t;
    char want[2048], cite[KEEL_LAW_CITE_SIZE];
    california_medsurg(&t, 5, 23);
    loaded l = load(&t);
    const keel_law_table *cal = keel_law_find("california");
    keel_law_cite(cal, cite, sizeof cite);
    /* Source: CCR Title 22 section 70217(a), medical-surgical 1:5 (sources.md, read), with
     * sources.md "Minimum nurses for a census under a 1:N rule": ceil(23 / 5) = 5. */
    assert_int_equal(l.s.staff_limit, 5);
    assert_int_equal(l.s.table_nurse_max, 5);
    assert_int_equal(l.s.by_census, 5);
    assert_int_equal(l.s.by_limits, 5);
    assert_int_equal(l.s.table_minimum, 5);
    assert_int_equal(l.s.ward_minimum, -1); /* a per-nurse maximum, no ward minimum */
    assert_ptr_equal(l.s.table, cal);
    assert_int_equal(l.s.shift_class, KEEL_SHIFT_ANY);
    /* keel's definition, by hand: 23 * 60 = 1380 care minutes over 660 per nurse = 2.09. */
    assert_int_equal(l.s.care_minutes, 1380);
    assert_float_equal(l.s.minutes_nurses, 1380.0 / 660.0, 1e-9);
    assert_int_equal(l.s.by_minutes, 3);
    assert_int_equal(l.s.census, 23);
    assert_int_equal(l.s.ncounted, 5);
    assert_int_equal(l.s.needed, 5);
    assert_int_equal(l.s.binding, KEEL_STAFFING_NEED_LIMITS);
    assert_int_equal(l.s.slack, 0);
    /* 5 nurses x 12 h = 60 h over 23 patients = 2.6 h. */
    snprintf(want, sizeof want,
             "23 patients need at least 5 nurses under %s (at most 5 "
             "patients per nurse); 5 nurses take patients. By care minutes 2.1 "
             "nurses (3), by limits 5; 2.6 nurse hours per patient this shift.",
             cite);
    /* A need is a lower bound: it never says "enough" (the verdict judges a plan). */
    assert_null(strstr(l.words, "enough"));
    assert_null(strstr(l.words, "spare"));
    assert_string_equal(l.words, want);
    unload(&l);

    california_medsurg(&t, 4, 23);
    l = load(&t);
    assert_int_equal(l.s.needed, 5);
    assert_int_equal(l.s.slack, -1);
    snprintf(want, sizeof want,
             "23 patients need at least 5 nurses under %s (at most 5 "
             "patients per nurse); 4 nurses take patients: 1 short. By care minutes 2.1 nurses "
             "(3), by limits 5; 2.1 nurse hours per patient this shift. 23 patients exceed what "
             "4 nurses may hold under %s.",
             cite, cite);
    assert_string_equal(l.words, want);
    unload(&l);
}

static void test_a_one_to_n_rule_needs_the_census_over_n_rounded_up(void **state)
{
    (void)state;
    for (int n = 1; n <= 6; n++) {
        for (int census = 1; census <= 25; census++) {
            text t = {.len = 0};
            add(&t, "shift: {minutes: 720}\npolicy: {max_patients: %d}\nnurses:\n", n);
            add_nurses(&t, 1, 2, "");
            add(&t, "patients:\n");
            add_patients(&t, 1, census, "care_minutes: 10");
            loaded l = load(&t);
            /* Source: sources.md, "Minimum nurses for a census under a 1:N rule:
             * ceil(patients / N) (no averaging)". */
            int want = (census + n - 1) / n;
            assert_int_equal(l.s.staff_limit, n);
            assert_int_equal(l.s.by_census, want);
            assert_int_equal(l.s.by_ratios, want);
            assert_int_equal(l.s.by_limits, want);
            unload(&l);
        }
    }
}

static void test_the_staff_limit_is_the_smallest_given(void **state)
{
    (void)state;
    text t = {.len = 0};
    /* keel's definition (keel/staffing.h): the table's 1:4 for telemetry, the unit's 5 and
     * the staff role's 3 give N = 3; a charge nurse's own limit does not count. */
    add(&t, "unit: {type: telemetry}\n"
            "shift: {minutes: 480}\n"
            "policy: {ratio_table: california, max_patients: 4,"
            " roles: {staff: {max_patients: 3}, charge: {max_patients: 1}}}\n"
            "nurses:\n");
    add_nurses(&t, 1, 3, "");
    add_nurses(&t, 4, 1, "role: charge");
    add(&t, "patients:\n");
    add_patients(&t, 1, 10, "care_minutes: 30");
    loaded l = load(&t);
    assert_int_equal(l.s.staff_limit, 3);
    assert_int_equal(l.s.table_nurse_max, 4);
    assert_int_equal(l.s.by_census, 4);     /* ceil(10 / 3) */
    assert_int_equal(l.s.table_minimum, 3); /* ceil(10 / 4): the table alone */
    assert_non_null(strstr(l.words, "under a limit of 3 patients per nurse"));
    unload(&l);
}

static void test_patients_own_ratios_are_counted(void **state)
{
    (void)state;
    text t = {.len = 0};
    /* Hand-worked example (derived here, not from a source).  10 patients, at most 5 per
     * nurse; P1, P2 are 1:2, P3-P5 are 1:3, P6-P10 have no ratio.  The 1:N rule alone gives
     * ceil(10 / 5) = 2.  Two nurses are not enough: if P1 and P2 had different nurses, each
     * of those nurses would have at most 2 patients, 4 in all, not 10; if they shared one,
     * that nurse has exactly them and the other would need 8 > 5.  Three are enough:
     * {P1, P2}, {P3, P4, P5}, {P6..P10}.  So 3. */
    add(&t, "shift: {minutes: 720, break_minutes: 60}\npolicy: {max_patients: 5}\nnurses:\n");
    add_nurses(&t, 1, 4, "");
    add(&t, "patients:\n");
    add_patients(&t, 1, 2, "care_minutes: 60, ratio: \"1:2\"");
    add_patients(&t, 3, 3, "care_minutes: 60, ratio: \"1:3\"");
    add_patients(&t, 6, 5, "care_minutes: 60");
    loaded l = load(&t);
    assert_int_equal(l.s.by_census, 2);
    assert_int_equal(l.s.by_ratios, 3);
    assert_int_equal(l.s.by_limits, 3);
    assert_int_equal(l.s.needed, 3);
    assert_int_equal(l.s.binding, KEEL_STAFFING_NEED_LIMITS);
    assert_int_equal(l.s.slack, 1);
    assert_non_null(strstr(l.words, "10 patients need at least 3 nurses under the patients' own "
                                    "ratios; 4 nurses take patients."));
    unload(&l);

    /* Hand-worked example (derived here): 8 patients, at most 5 per nurse, P1 is 1:3.  A
     * nurse with P1 and two others, and one with the other five: 2 nurses, which
     * ceil(8 / 5) = 2 shows is the least.  Counting the 1:3 patient's nurse apart from a
     * 1:N split of the rest would say 1 + ceil(7 / 5) = 3. */
    memset(&t, 0, sizeof t);
    add(&t, "shift: {minutes: 720}\npolicy: {max_patients: 5}\nnurses:\n");
    add_nurses(&t, 1, 2, "");
    add(&t, "patients:\n");
    add_patients(&t, 1, 1, "care_minutes: 60, ratio: \"1:3\"");
    add_patients(&t, 2, 7, "care_minutes: 60");
    l = load(&t);
    assert_int_equal(l.s.by_ratios, 2);
    assert_int_equal(l.s.slack, 0);
    unload(&l);
}

/* The fewest groups by trying every grouping: patient i may join a group
 * while the group stays within the smallest limit of its members. */
static void search_groups(const int *limit, int m, int i, int *size, int *least, int ngroups,
                          int *best)
{
    if (ngroups >= *best)
        return;
    if (i == m) {
        *best = ngroups;
        return;
    }
    for (int g = 0; g < ngroups; g++) {
        int cap = least[g] < limit[i] ? least[g] : limit[i];
        if (size[g] + 1 > cap)
            continue;
        int old = least[g];
        size[g]++;
        least[g] = cap;
        search_groups(limit, m, i + 1, size, least, ngroups, best);
        size[g]--;
        least[g] = old;
    }
    size[ngroups] = 1;
    least[ngroups] = limit[i];
    search_groups(limit, m, i + 1, size, least, ngroups + 1, best);
    size[ngroups] = 0;
}

static void test_ratio_count_matches_an_exhaustive_search(void **state)
{
    (void)state;
    uint64_t seed = 20261202;
    for (int trial = 0; trial < 400; trial++) {
        /* A small linear congruential generator keeps the rosters repeatable. */
        seed = seed * 6364136223846793005ULL + 1442695040888963407ULL;
        int m = 1 + (int)((seed >> 33) % 9);
        int n = (int)((seed >> 40) % 6); /* 0: no per-nurse limit */
        int limit[9], size[10] = {0}, least[10] = {0};
        text t = {.len = 0};
        add(&t, "shift: {minutes: 720}\n");
        if (n > 0)
            add(&t, "policy: {max_patients: %d}\n", n);
        add(&t, "nurses:\n");
        add_nurses(&t, 1, 2, "");
        add(&t, "patients:\n");
        for (int p = 0; p < m; p++) {
            seed = seed * 6364136223846793005ULL + 1442695040888963407ULL;
            int ratio = (int)((seed >> 35) % 6); /* 0, 5: none; 1-4: 1:ratio */
            limit[p] = n > 0 && n < m ? n : m;
            if (ratio >= 1 && ratio <= 4) {
                add(&t, "  - {id: P%d, care_minutes: 10, ratio: \"1:%d\"}\n", p + 1, ratio);
                limit[p] = ratio < limit[p] ? ratio : limit[p];
            } else {
                add(&t, "  - {id: P%d, care_minutes: 10}\n", p + 1);
            }
        }
        loaded l = load(&t);
        int best = m + 1;
        search_groups(limit, m, 0, size, least, 0, &best);
        if (l.s.by_ratios != best)
            print_message("trial %d:\n%s", trial, t.buf);
        assert_int_equal(l.s.by_ratios, best);
        unload(&l);
    }
}

static void test_high_acuity_patients_need_their_share_of_nurses(void **state)
{
    (void)state;
    text t = {.len = 0};
    /* keel's definition (keel/staffing.h), by hand: 3 high-acuity patients at most 1 per
     * nurse need ceil(3 / 1) = 3 nurses; the 1:5 rule alone needs ceil(6 / 5) = 2. */
    add(&t, "shift: {minutes: 720, break_minutes: 60}\n"
            "policy: {max_patients: 5, acuity_minutes: {1: 60, 4: 120},"
            " high_acuity: {level: 4, max_per_nurse: 1}}\n"
            "nurses:\n");
    add_nurses(&t, 1, 4, "");
    add(&t, "patients:\n");
    add_patients(&t, 1, 3, "acuity: 4");
    add_patients(&t, 4, 3, "acuity: 1");
    loaded l = load(&t);
    assert_int_equal(l.s.nhigh_acuity, 3);
    assert_int_equal(l.s.max_high_acuity, 1);
    assert_int_equal(l.s.by_high_acuity, 3);
    assert_int_equal(l.s.by_census, 2);
    assert_int_equal(l.s.by_limits, 3);
    assert_int_equal(l.s.needed, 3);
    assert_non_null(strstr(l.words, "6 patients need at least 3 nurses with at most 1 "
                                    "high-acuity patient per nurse; 4 nurses take "
                                    "patients."));
    unload(&l);

    memset(&t, 0, sizeof t);
    add(&t, "shift: {minutes: 720, break_minutes: 60}\n"
            "policy: {max_patients: 5, acuity_minutes: {1: 60, 4: 120},"
            " high_acuity: {level: 4, max_per_nurse: 0}}\n"
            "nurses:\n");
    add_nurses(&t, 1, 4, "");
    add(&t, "patients:\n");
    add_patients(&t, 1, 1, "acuity: 4");
    add_patients(&t, 2, 5, "acuity: 1");
    l = load(&t);
    assert_int_equal(l.s.blocked, KEEL_STAFFING_NO_HIGH_ACUITY);
    assert_int_equal(l.s.by_limits, -1);
    assert_int_equal(l.s.needed, -1);
    assert_int_equal(l.s.slack, 0);
    assert_non_null(strstr(l.words, "No number of nurses can hold these 6 patients: 1 patient "
                                    "is high-acuity and a nurse may have none "
                                    "(policy.high_acuity.max_per_nurse 0); 4 nurses take "
                                    "patients. By care minutes"));
    assert_non_null(strstr(l.words, "by limits none possible;"));
    unload(&l);
}

static void test_a_staff_limit_of_zero_blocks_every_count(void **state)
{
    (void)state;
    text t = {.len = 0};
    add(&t, "shift: {minutes: 720}\n"
            "policy: {roles: {staff: {max_patients: 0}, charge: {max_patients: 2}}}\n"
            "nurses:\n");
    add_nurses(&t, 1, 2, "");
    add_nurses(&t, 3, 1, "role: charge");
    add(&t, "patients:\n");
    add_patients(&t, 1, 2, "care_minutes: 60");
    loaded l = load(&t);
    assert_int_equal(l.s.staff_limit, 0);
    assert_int_equal(l.s.blocked, KEEL_STAFFING_NO_STAFF_LIMIT);
    assert_int_equal(l.s.ncounted, 1); /* the charge nurse */
    assert_int_equal(l.s.needed, -1);
    assert_non_null(strstr(l.words, "No number of staff nurses can hold these 2 patients: a "
                                    "staff nurse may take no patients (limit 0); 1 nurse takes "
                                    "patients."));
    unload(&l);
}

/* ---------------------------------------------------------------------------
 * Needs by care minutes, the ward minimum, hours
 */

static void test_care_minutes_need_reuses_the_metrics_figure(void **state)
{
    (void)state;
    text t = {.len = 0};
    /* keel's definition (keel/staffing.h), by hand: counted nurses N1 (660), N2 (480 - 30 =
     * 450), N4 (660, duty 60); N3 takes no patients, so its 240 duty minutes are left out.
     * Work = 3 * 400 + 60 = 1260; mean capacity = 1770 / 3 = 590; 1260 / 590 = 2.14 -> 3. */
    add(&t, "shift: {minutes: 720, break_minutes: 60}\nnurses:\n"
            "  - {id: N1}\n"
            "  - {id: N2, minutes: 480, break_minutes: 30}\n"
            "  - {id: N3, role: charge, max_patients: 0, duty_minutes: 240}\n"
            "  - {id: N4, duty_minutes: 60}\n"
            "patients:\n");
    add_patients(&t, 1, 3, "care_minutes: 400");
    loaded l = load(&t);
    keel_metrics *m = NULL;
    assert_int_equal(keel_metrics_compute(l.w, NULL, &m, NULL), KEEL_OK);
    assert_float_equal(l.s.minutes_nurses, m->nurses_needed, 1e-12);
    keel_metrics_free(m);
    assert_int_equal(l.s.nnurses, 4);
    assert_int_equal(l.s.ncounted, 3);
    assert_int_equal(l.s.care_minutes, 1200);
    assert_int_equal(l.s.duty_minutes, 60);
    assert_int_equal(l.s.capacity_minutes, 1770);
    assert_float_equal(l.s.mean_capacity_minutes, 590.0, 1e-9);
    assert_float_equal(l.s.minutes_nurses, 1260.0 / 590.0, 1e-9);
    assert_int_equal(l.s.by_minutes, 3);
    assert_int_equal(l.s.by_limits, 1); /* no limit: one nurse could hold them */
    assert_int_equal(l.s.binding, KEEL_STAFFING_NEED_MINUTES);
    assert_int_equal(l.s.slack, 0);
    /* Minutes on the unit, breaks included: 720 + 480 + 720 = 1920 = 32 h over 3 patients. */
    assert_int_equal(l.s.unit_minutes, 1920);
    assert_float_equal(l.s.hours_per_patient, 32.0 / 3.0, 1e-9);
    assert_non_null(strstr(l.words, "3 patients need at least 3 nurses by care minutes (2.1 "
                                    "nurses' worth of care and duty); 3 nurses take "
                                    "patients."));
    unload(&l);
}

static void test_care_minutes_round_up_exactly(void **state)
{
    (void)state;
    /* keel's definition, by hand: 4 * 330 = 1320 = 2 * 660 exactly, so 2 nurses; one more
     * minute of care makes 3. */
    for (int extra = 0; extra <= 1; extra++) {
        text t = {.len = 0};
        add(&t, "shift: {minutes: 720, break_minutes: 60}\nnurses:\n");
        add_nurses(&t, 1, 3, "");
        add(&t, "patients:\n");
        add_patients(&t, 1, 3, "care_minutes: 330");
        add(&t, "  - {id: P4, care_minutes: %d}\n", 330 + extra);
        loaded l = load(&t);
        assert_int_equal(l.s.by_minutes, 2 + extra);
        unload(&l);
    }
}

static void test_with_no_nurse_taking_patients_a_shift_nurse_stands_in(void **state)
{
    (void)state;
    text t = {.len = 0};
    /* keel's definition (keel/staffing.h), by hand: 2 * 500 = 1000 care minutes over a
     * 720 - 60 = 660 minute nurse = 1.52 -> 2. */
    add(&t, "shift: {minutes: 720, break_minutes: 60}\nnurses:\n");
    add_nurses(&t, 1, 2, "max_patients: 0");
    add(&t, "patients:\n");
    add_patients(&t, 1, 2, "care_minutes: 500");
    loaded l = load(&t);
    assert_int_equal(l.s.ncounted, 0);
    assert_float_equal(l.s.mean_capacity_minutes, 660.0, 1e-9);
    assert_int_equal(l.s.by_minutes, 2);
    assert_int_equal(l.s.slack, -2);
    assert_float_equal(l.s.hours_per_patient, 0.0, 0.0);
    assert_non_null(strstr(l.words, "2 patients need at least 2 nurses by care minutes (1.5 "
                                    "nurses' worth of care and duty); 0 nurses take patients: 2 "
                                    "short."));
    unload(&l);
}

/* A Queensland med-surg ward of 28 patients, 6 nurses, 8-hour shifts. */
static loaded queensland_ward(const char *start)
{
    text t = {.len = 0};
    add(&t,
        "unit: {name: \"Invented Ward 7\", type: med-surg}\n"
        "shift: {date: 2026-03-14, start: \"%s\", minutes: 480, break_minutes: 30}\n"
        "policy: {ratio_table: queensland}\n"
        "nurses:\n",
        start);
    add_nurses(&t, 1, 6, "");
    add(&t, "patients:\n");
    add_patients(&t, 1, 28, "care_minutes: 60");
    return load(&t);
}

static void test_queensland_ward_minimum_through_a_roster(void **state)
{
    (void)state;
    const keel_law_table *qld = keel_law_find("queensland");
    char want[2048], cite[KEEL_LAW_CITE_SIZE];
    keel_law_cite(qld, cite, sizeof cite);

    /* Source: Hospital and Health Boards Regulation 2012 (Qld), Part 6A and s 30A (sources.md,
     * read): 1:4 on an afternoon shift (15:00-23:00); the state's worked example gives 28
     * patients 7 nurses by day. */
    loaded l = queensland_ward("15:00");
    assert_ptr_equal(l.s.table, qld);
    assert_int_equal(l.s.shift_class, KEEL_SHIFT_AFTERNOON);
    assert_int_equal(l.s.ward_minimum, 7);
    assert_int_equal(l.s.table_minimum, 7);
    assert_int_equal(l.s.table_nurse_max, -1);
    assert_int_equal(l.s.needed, 7);
    assert_int_equal(l.s.binding, KEEL_STAFFING_NEED_WARD_MINIMUM);
    assert_int_equal(l.s.slack, -1);
    /* By hand: 28 * 60 = 1680 over 450 = 3.73 -> 4; 6 * 8 h = 48 h over 28 = 1.7 h. */
    snprintf(want, sizeof want,
             "28 patients need at least 7 nurses under %s (afternoon "
             "shift); 6 nurses take patients: 1 short. By care minutes 3.7 nurses (4), by "
             "limits 1, by the ward minimum 7; 1.7 nurse hours per patient this shift. 28 "
             "patients exceed what 6 nurses may hold under %s "
             "(afternoon shift).",
             cite, cite);
    assert_string_equal(l.words, want);
    unload(&l);

    /* Source: same, 1:4 on a morning shift (07:00-15:00). */
    l = queensland_ward("07:00");
    assert_int_equal(l.s.shift_class, KEEL_SHIFT_MORNING);
    assert_int_equal(l.s.ward_minimum, 7);
    unload(&l);

    /* Source: same, 1:7 at night (23:00-07:00): the worked example's 4 nurses.  Care
     * minutes also need 4; the tie goes to the ward minimum. */
    l = queensland_ward("23:00");
    assert_int_equal(l.s.shift_class, KEEL_SHIFT_NIGHT);
    assert_int_equal(l.s.ward_minimum, 4);
    assert_int_equal(l.s.by_minutes, 4);
    assert_int_equal(l.s.needed, 4);
    assert_int_equal(l.s.binding, KEEL_STAFFING_NEED_WARD_MINIMUM);
    assert_int_equal(l.s.slack, 2);
    snprintf(want, sizeof want,
             "28 patients need at least 4 nurses under %s (night "
             "shift); 6 nurses take patients.",
             cite);
    assert_non_null(strstr(l.words, want));
    assert_null(strstr(l.words, "enough"));
    unload(&l);
}

static void test_nurse_hours_per_patient_follow_the_textbook_telemetry_unit(void **state)
{
    (void)state;
    text t = {.len = 0};
    /* Source: nursing management textbook, staffing box (sources.md, "Staffing arithmetic",
     * read): a 32-bed telemetry unit at 1:4 with 8-hour shifts works 192 h a day, 192 / 32 =
     * 6.0 nursing hours per patient day.  Per shift: 32 / 4 = 8 nurses x 8 h = 64 h over 32
     * patients = 2.0 h; three such shifts make 6.0.  The 30-minute break is part of the
     * nurse's 8 hours on the unit. */
    add(&t, "unit: {name: \"Invented Telemetry\", type: telemetry}\n"
            "shift: {start: \"07:00\", minutes: 480, break_minutes: 30}\n"
            "policy: {ratio_table: california}\n"
            "nurses:\n");
    add_nurses(&t, 1, 8, "");
    add(&t, "patients:\n");
    add_patients(&t, 1, 32, "care_minutes: 60");
    loaded l = load(&t);
    assert_int_equal(l.s.by_limits, 8);
    assert_int_equal(l.s.needed, 8);
    assert_int_equal(l.s.slack, 0);
    assert_int_equal(l.s.unit_minutes, 8 * 480);
    assert_float_equal(l.s.hours_per_patient, 2.0, 1e-12);
    assert_float_equal(3.0 * l.s.hours_per_patient, 192.0 / 32.0, 1e-12);
    assert_non_null(strstr(l.words, "; 2.0 nurse hours per patient this shift."));
    unload(&l);
}

/* ---------------------------------------------------------------------------
 * Words and failures
 */

static void test_the_sentences_truncate_like_snprintf(void **state)
{
    (void)state;
    text t;
    char small[20], full[2048];
    california_medsurg(&t, 5, 23);
    loaded l = load(&t);
    int need = keel_staffing_format(&l.s, NULL, 0);
    assert_int_equal(keel_staffing_format(&l.s, full, sizeof full), need);
    assert_int_equal(keel_staffing_format(&l.s, small, sizeof small), need);
    assert_int_equal(strlen(small), sizeof small - 1);
    assert_memory_equal(small, full, sizeof small - 1);
    unload(&l);

    keel_staffing none;
    memset(&none, 0, sizeof none);
    none.ncounted = 1;
    need = keel_staffing_format(&none, full, sizeof full);
    assert_int_equal(need, strlen(full));
    assert_string_equal(full, "No patients; 1 nurse takes patients.");
    assert_string_equal(keel_staffing_need_name(KEEL_STAFFING_NEED_WARD_MINIMUM), "ward minimum");
    assert_string_equal(keel_staffing_need_name(KEEL_STAFFING_NEED_MINUTES), "care minutes");
}

/* Fails the 1st, 2nd, ... allocation of one computation until it no longer
 * allocates that many times.  Every failed run returns KEEL_ERR_NOMEM with
 * "out of memory" and a zeroed result (leaks are the sanitizers' to find). */
static void test_a_failed_allocation_gives_a_clean_error(void **state)
{
    (void)state;
    text t;
    california_medsurg(&t, 5, 23);
    loaded l = load(&t);
    long n;
    for (n = 1; n < 1000; n++) {
        keel_error err;
        keel_staffing s;
        keel_error_init(&err);
        memset(&s, 0xff, sizeof s);
        keel_alloc_fail_at(n);
        keel_status rc = keel_staffing_compute(l.r, l.w, &s, &err);
        long made = keel_alloc_fail_at(0);
        if (made < n) {
            assert_int_equal(rc, KEEL_OK);
            assert_int_equal(s.needed, 5);
            keel_error_fini(&err);
            break;
        }
        assert_int_equal(rc, KEEL_ERR_NOMEM);
        assert_true(err.nproblems > 0);
        assert_string_equal(err.problems[err.nproblems - 1].message, "out of memory");
        assert_int_equal(s.census, 0);
        assert_null(s.table);
        keel_error_fini(&err);
    }
    assert_true(n > 2);
    unload(&l);
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(test_california_23_med_surg_patients_need_5_nurses),
        cmocka_unit_test(test_a_one_to_n_rule_needs_the_census_over_n_rounded_up),
        cmocka_unit_test(test_the_staff_limit_is_the_smallest_given),
        cmocka_unit_test(test_patients_own_ratios_are_counted),
        cmocka_unit_test(test_ratio_count_matches_an_exhaustive_search),
        cmocka_unit_test(test_high_acuity_patients_need_their_share_of_nurses),
        cmocka_unit_test(test_a_staff_limit_of_zero_blocks_every_count),
        cmocka_unit_test(test_care_minutes_need_reuses_the_metrics_figure),
        cmocka_unit_test(test_care_minutes_round_up_exactly),
        cmocka_unit_test(test_with_no_nurse_taking_patients_a_shift_nurse_stands_in),
        cmocka_unit_test(test_queensland_ward_minimum_through_a_roster),
        cmocka_unit_test(test_nurse_hours_per_patient_follow_the_textbook_telemetry_unit),
        cmocka_unit_test(test_the_sentences_truncate_like_snprintf),
        cmocka_unit_test(test_a_failed_allocation_gives_a_clean_error),
    };
    return cmocka_run_group_tests_name("staffing", tests, NULL, NULL);
}
