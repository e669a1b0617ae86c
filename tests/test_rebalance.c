/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * test_rebalance.c - the hand-off frontier (keel/rebalance.h) against
 * exhaustive enumeration: on small random mid-shift rosters (a nurse who
 * has gone, patients locked, new patients, competencies, a high-acuity
 * limit) every option k must be the best plan with at most k hand-offs,
 * peak first and lift second, exactly; never move a locked patient; never
 * make more than k hand-offs besides the forced moves; and the frontier
 * must never worsen as k grows.  The recommendation follows its rule.
 */
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include <cmocka.h>

#include "alloc.h"
#include "keel/keel.h"
#include "solve/measure.h"
#include "testutil.h"
#include "workload_internal.h"

#define MAX_K 3

/* A random mid-shift roster as YAML: 2-4 nurses (the last one sometimes
 * gone: max_patients 0), 3-7 patients with or without a nurse now, some
 * locked, some needing a competency, a high-acuity limit sometimes. */
static size_t random_roster(uint64_t *seed, char *text, size_t size)
{
    int nn = tu_range(seed, 2, 4), np = tu_range(seed, 3, 7);
    bool gone = tu_range(seed, 0, 2) == 0;
    bool high = tu_range(seed, 0, 2) == 0;
    size_t len = 0;
    len += (size_t)snprintf(text + len, size - len,
                            "version: 1\nshift: {minutes: 480}\npolicy:\n"
                            "  acuity_minutes: {1: 40, 2: 70, 3: 100, 4: 150}\n"
                            "  max_patients: %d\n",
                            tu_range(seed, 2, 4));
    if (high)
        len += (size_t)snprintf(text + len, size - len,
                                "  high_acuity: {level: 4, max_per_nurse: 1}\n");
    len += (size_t)snprintf(text + len, size - len, "nurses:\n");
    for (int n = 0; n < nn; n++)
        len += (size_t)snprintf(text + len, size - len, "  - {id: N%d%s%s}\n", n,
                                n % 2 == 0 ? ", skills: [chemo]" : "",
                                gone && n == nn - 1 ? ", max_patients: 0" : "");
    len += (size_t)snprintf(text + len, size - len, "patients:\n");
    for (int p = 0; p < np; p++) {
        int acuity = tu_range(seed, 1, 4), kind = tu_range(seed, 0, 9);
        bool chemo = tu_range(seed, 0, 5) == 0;
        int nurse = tu_range(seed, 0, nn - 1);
        len += (size_t)snprintf(text + len, size - len, "  - {id: P%d, acuity: %d%s", p, acuity,
                                chemo ? ", needs: [chemo]" : "");
        /* kind 0-1: new; 2: locked (to a nurse who may take the patient); else present. */
        if (kind == 2 && !(gone && nurse == nn - 1) && (!chemo || nurse % 2 == 0))
            len += (size_t)snprintf(text + len, size - len, ", nurse: N%d, lock: true", nurse);
        else if (kind >= 2)
            len += (size_t)snprintf(text + len, size - len, ", nurse: N%d", nurse);
        len += (size_t)snprintf(text + len, size - len, "}\n");
    }
    return len;
}

/* The best of every valid plan with at most k hand-offs, for each k. */
typedef struct best {
    bool found[MAX_K + 1];
    keel_ratio peak[MAX_K + 1];
    keel_ratio lift[MAX_K + 1]; /* the best lift among plans at the best peak */
} best;

static int handoffs(const keel_roster *r, const keel_workload *w, const int *nurse_of)
{
    int h = 0;
    for (size_t p = 0; p < r->npatients; p++) {
        const keel_patient *pt = &r->patients[p];
        if (!pt->nurse)
            continue;
        int now = keel_roster_find_nurse(r, pt->nurse);
        size_t q = (size_t)w->first_part[p];
        if (!keel_workload_eligible(w, q, (size_t)now))
            continue; /* forced */
        h += nurse_of[q] != now;
    }
    return h;
}

static void enumerate(const keel_roster *r, const keel_workload *w, int *plan, size_t p, best *b)
{
    if (p == w->npatients) {
        bool valid = false;
        assert_int_equal(keel_measure_validate(w, plan, &valid), KEEL_OK);
        if (!valid)
            return;
        int h = handoffs(r, w, plan);
        keel_ratio peak = keel_measure_peak(w, plan), lift = keel_measure_lift(w, plan);
        for (int k = h; k <= MAX_K; k++) {
            int c = b->found[k] ? keel_ratio_cmp(peak, b->peak[k]) : -1;
            if (c < 0 || (c == 0 && keel_ratio_cmp(lift, b->lift[k]) > 0)) {
                b->found[k] = true;
                b->peak[k] = peak;
                b->lift[k] = lift;
            }
        }
        return;
    }
    for (size_t n = 0; n < w->nnurses; n++) {
        if (!keel_workload_eligible(w, p, n))
            continue;
        plan[p] = (int)n;
        enumerate(r, w, plan, p + 1, b);
    }
}

static void test_every_option_matches_exhaustive_enumeration(void **state)
{
    (void)state;
    uint64_t seed = 1616;
    int planned = 0, moved = 0, forced = 0, placed = 0, locked = 0, none = 0;
    for (int round = 0; round < 1000; round++) {
        char text[4096];
        size_t len = random_roster(&seed, text, sizeof text);
        keel_error err;
        keel_error_init(&err);
        keel_roster *r = NULL;
        keel_rebalance *rb = NULL;
        assert_int_equal(keel_roster_parse("random.yaml", text, len, &r, &err), KEEL_OK);
        keel_rebalance_options o = {.max_handoffs = MAX_K, .min_gain = 0.03};
        assert_int_equal(keel_rebalance_run(r, &o, &rb, &err), KEEL_OK);
        const keel_workload *w = rb->workload;
        int *plan = calloc(w->npatients + 1, sizeof *plan);
        best b = {0};
        enumerate(r, w, plan, 0, &b);
        assert_int_equal(rb->noptions, MAX_K + 1);
        for (int k = 0; k <= MAX_K; k++) {
            const keel_rebalance_option *op = &rb->options[k];
            assert_int_equal(op->handoffs, k);
            assert_int_equal(op->found, b.found[k]);
            if (!op->found) {
                assert_int_equal(op->solution->status, KEEL_SOLVE_INFEASIBLE);
                none++;
                continue;
            }
            const int *nurse_of = op->solution->nurse_of;
            bool valid = false;
            assert_int_equal(keel_measure_validate(w, nurse_of, &valid), KEEL_OK);
            assert_true(valid);
            assert_int_equal(op->solution->status, KEEL_SOLVE_OPTIMAL);
            assert_int_equal(keel_ratio_cmp(keel_measure_peak(w, nurse_of), b.peak[k]), 0);
            assert_int_equal(keel_ratio_cmp(keel_measure_lift(w, nurse_of), b.lift[k]), 0);
            assert_true(op->bound == keel_ratio_value(b.peak[k]) && op->gap == 0.0);
            int h = handoffs(r, w, nurse_of);
            assert_true(h <= k);
            assert_int_equal((int)op->nmoves, h);
            for (size_t p = 0; p < r->npatients; p++)
                if (r->patients[p].lock)
                    assert_int_equal(keel_rebalance_nurse(rb, op, p),
                                     keel_roster_find_nurse(r, r->patients[p].nurse));
            if (k > 0 && rb->options[k - 1].found)
                assert_true(op->max_utilisation <= rb->options[k - 1].max_utilisation);
            planned++;
            moved += op->nmoves > 0;
            forced += op->nforced > 0;
            placed += op->nplaced > 0;
        }
        for (size_t p = 0; p < r->npatients; p++)
            locked += r->patients[p].lock;
        /* The recommendation: the smallest k within min_gain of the best. */
        double lowest = 2.0;
        for (int k = 0; k <= MAX_K; k++)
            if (b.found[k] && keel_ratio_value(b.peak[k]) < lowest)
                lowest = keel_ratio_value(b.peak[k]);
        int want = -1;
        for (int k = MAX_K; k >= 0; k--)
            if (b.found[k] && keel_ratio_value(b.peak[k]) <= lowest + 0.03 + 1e-9)
                want = k;
        assert_int_equal(rb->recommended, want);
        assert_int_equal(rb->status, want < 0 ? KEEL_SOLVE_INFEASIBLE : KEEL_SOLVE_OPTIMAL);
        free(plan);
        keel_rebalance_free(rb);
        keel_roster_free(r);
        keel_error_fini(&err);
    }
    print_message("# %d options with a plan (%d with hand-offs, %d with forced moves, %d placing "
                  "new patients), %d without; %d locked patients\n",
                  planned, moved, forced, placed, none, locked);
    /* The generator must exercise every part of the model. */
    assert_true(moved > 200 && forced > 200 && placed > 200 && none > 50 && locked > 100);
}

/* ---- --at: the rest of the shift, against figures computed by hand ---- */

static keel_rebalance *rebalance_at(const char *text, int at_minute)
{
    keel_error err;
    keel_error_init(&err);
    keel_roster *r = NULL;
    keel_rebalance *rb = NULL;
    assert_int_equal(keel_roster_parse("at.yaml", text, strlen(text), &r, &err), KEEL_OK);
    keel_rebalance_options o = {.max_handoffs = 1, .min_gain = 0.03, .at = true,
                                .at_minute = at_minute};
    assert_int_equal(keel_rebalance_run(r, &o, &rb, &err), KEEL_OK);
    keel_error_fini(&err);
    /* The frontier owns the rest of the shift; the input may go. */
    keel_roster_free(r);
    return rb;
}

static const keel_patient *patient(const keel_roster *r, const char *id)
{
    for (size_t p = 0; p < r->npatients; p++)
        if (strcmp(r->patients[p].id, id) == 0)
            return &r->patients[p];
    return NULL;
}

static long long care_of(const keel_rebalance *rb, const char *id)
{
    const keel_patient *p = patient(rb->roster, id);
    return keel_workload_patient_care(rb->workload, (size_t)(p - rb->roster->patients));
}

/* The worked example of docs/model.md ("The time of the rebalance"):
 * 07:00-19:00 (L = 720, break 60), --at 09:30 (t = 150, L' = 570). */
static void test_at_takes_care_and_capacity_from_then_on(void **state)
{
    (void)state;
    static const char text[] =
        "version: 1\n"
        "shift: {start: \"07:00\", minutes: 720, break_minutes: 60}\n"
        "policy:\n"
        "  acuity_minutes: {1: 60, 2: 120, 3: 240}\n"
        "  extra_minutes: {admission: 60}\n"
        "  max_patients: 4\n"
        "nurses:\n"
        "  - {id: N1}\n"
        "  - {id: N2, end: \"09:30\"}\n"
        "  - {id: N3, end: \"15:00\"}\n"
        "  - {id: N4, start: \"11:00\"}\n"
        "patients:\n"
        "  - {id: P1, acuity: 3, nurse: N1}\n"
        "  - {id: P2, acuity: 2, extras: [admission], nurse: N2}\n"
        "  - {id: P3, acuity: 2, leaves_at: \"09:00\", nurse: N1}\n"
        "  - {id: P4, acuity: 2, extras: [admission], arrives_at: \"10:30\"}\n"
        "  - {id: P5, acuity: 1, nurse: N3}\n"
        "  - {id: P6, acuity: 2, nurse: N1}\n";
    keel_rebalance *rb = rebalance_at(text, 9 * 60 + 30);
    const keel_roster *r = rb->roster;
    const keel_workload *w = rb->workload;
    assert_int_equal(r->shift.start_minute, 9 * 60 + 30);
    assert_int_equal(r->shift.minutes, 570);
    assert_int_equal(r->shift.break_minutes, 48); /* ceil(60 * 570 / 720) */
    /* N1: break ceil(60 * 570 / 720) = 48; N2 has gone; N3 (to 15:00, 480 min
     * on, 330 left): break ceil(60 * 330 / 480) = 42; N4 comes at 11:00. */
    assert_int_equal(w->capacity_minutes[0], 570 - 48);
    assert_int_equal(w->max_patients[1], 0);
    assert_int_equal(w->capacity_minutes[2], 330 - 42);
    assert_int_equal(r->nurses[2].end, 330);
    assert_int_equal(r->nurses[3].start, 90);
    assert_int_equal(w->capacity_minutes[3], 480 - 60);
    /* P3 left at 09:00: discharged.  P1: 240 - ceil(240 * 150 / 720) = 190.
     * P2: 120 - 25 = 95, her admission done.  P4 comes at 10:30: her care
     * over 10:30-19:00, ceil(120 * 510 / 720) = 85, and her admission in
     * full.  P5: 60 - ceil(60 * 150 / 720) = 47. */
    assert_int_equal(rb->discharged, 1);
    assert_null(patient(r, "P3"));
    assert_int_equal(care_of(rb, "P1"), 190);
    assert_int_equal(care_of(rb, "P2"), 95);
    assert_int_equal(patient(r, "P2")->nextras, 0);
    assert_int_equal(care_of(rb, "P4"), 85 + 60);
    assert_int_equal(patient(r, "P4")->arrives_at, 60);
    assert_int_equal(care_of(rb, "P5"), 47);
    assert_int_equal(care_of(rb, "P6"), 95);
    /* P2's nurse has gone: a forced move in every option. */
    assert_int_equal(rb->options[0].nforced, 1);
    assert_string_equal(r->patients[rb->options[0].forced[0].patient].id, "P2");
    keel_rebalance_free(rb);
}

/* A night shift, 19:00-07:00 (L = 720, no break), --at 01:00 (t = 360). */
static void test_at_crosses_midnight(void **state)
{
    (void)state;
    static const char text[] =
        "version: 1\n"
        "shift: {start: \"19:00\", minutes: 720}\n"
        "policy:\n"
        "  acuity_minutes: {1: 60, 2: 120}\n"
        "  extra_minutes: {admission: 60}\n"
        "nurses:\n"
        "  - {id: N1, duty_minutes: 90}\n"
        "  - {id: N2, end: \"23:00\"}\n"
        "  - {id: N3, start: \"03:00\"}\n"
        "patients:\n"
        "  - {id: P1, acuity: 2, leaves_at: \"02:00\", nurse: N1}\n"
        "  - {id: P2, acuity: 1, nurse: N1}\n"
        "  - {id: P3, acuity: 1, nurse: N2, handoffs: [N1]}\n"
        "expected_admissions:\n"
        "  - {id: A1, acuity: 2, extras: [admission], at: \"03:30\"}\n";
    keel_rebalance *rb = rebalance_at(text, 1 * 60);
    const keel_roster *r = rb->roster;
    assert_int_equal(r->shift.start_minute, 60);
    assert_int_equal(r->shift.minutes, 360);
    assert_int_equal(rb->workload->max_patients[1], 0); /* N2 left at 23:00 */
    assert_int_equal(rb->workload->duty_minutes[0], 45); /* ceil(90 * 360 / 720) */
    assert_int_equal(r->nurses[2].start, 120);          /* N3 at 03:00 */
    /* P1 over 19:00-02:00: ceil(120 * 420 / 720) = 70, of which
     * 70 - ceil(70 * 360 / 420) = 10 are left, to 02:00. */
    assert_int_equal(care_of(rb, "P1"), 10);
    assert_int_equal(patient(r, "P1")->leaves_at, 60);
    assert_int_equal(care_of(rb, "P2"), 30);
    /* P3's planned hand-off at 23:00 has happened: N1 has her now. */
    assert_string_equal(patient(r, "P3")->nurse, "N1");
    assert_int_equal(patient(r, "P3")->nhandoffs, 0);
    assert_int_equal(rb->options[0].nforced, 0);
    /* A1 at 03:30: ceil(120 * 210 / 720) = 35 and her admission. */
    assert_true(patient(r, "A1")->expected);
    assert_int_equal(patient(r, "A1")->arrives_at, 150);
    assert_int_equal(care_of(rb, "A1"), 35 + 60);
    keel_rebalance_free(rb);
}

/* ---- Failure paths ------------------------------------------------------ */

/* A small mid-shift roster at a time of the shift, with an expected
 * admission: the frontier, the rest of the shift and the preview. */
static keel_status run_small(const keel_roster *r)
{
    keel_error err;
    keel_error_init(&err);
    keel_rebalance *rb = NULL;
    keel_preview *pv = NULL;
    keel_rebalance_options o = {.max_handoffs = 1, .at = true, .at_minute = 9 * 60};
    keel_status rc = keel_rebalance_run(r, &o, &rb, &err);
    if (!rc && rb->options[0].found)
        rc = keel_preview_compute(rb->roster, rb->workload, rb->options[0].solution->nurse_of,
                                  &pv, &err);
    keel_preview_free(pv);
    keel_rebalance_free(rb);
    keel_error_fini(&err);
    return rc;
}

static void test_every_failed_allocation_ends_in_a_clean_error(void **state)
{
    (void)state;
    static const char text[] =
        "version: 1\n"
        "shift: {start: \"07:00\", minutes: 720, break_minutes: 60}\n"
        "policy:\n"
        "  acuity_minutes: {1: 60, 2: 120}\n"
        "  extra_minutes: {admission: 60}\n"
        "  max_patients: 3\n"
        "nurses:\n"
        "  - {id: N1, skills: [chemo]}\n"
        "  - {id: N2, end: \"08:00\", break_minutes: 0}\n"
        "  - {id: N3, breaks: [{at: \"12:00\", minutes: 30}]}\n"
        "patients:\n"
        "  - {id: P1, acuity: 2, nurse: N1, extras: [admission]}\n"
        "  - {id: P2, acuity: 1, nurse: N2, handoffs: [N3]}\n"
        "  - {id: P3, acuity: 2, leaves_at: \"08:30\", nurse: N1}\n"
        "  - {id: P4, acuity: 1}\n"
        "expected_admissions:\n"
        "  - {id: A1, acuity: 2, needs: [chemo], at: \"13:00\"}\n";
    keel_error err;
    keel_error_init(&err);
    keel_roster *r = NULL;
    assert_int_equal(keel_roster_parse("small.yaml", text, strlen(text), &r, &err), KEEL_OK);
    assert_int_equal(run_small(r), KEEL_OK);
    for (long n = 1;; n++) {
        keel_alloc_fail_at(n);
        keel_status rc = run_small(r);
        long made = keel_alloc_fail_at(0);
        if (made < n) {
            assert_int_equal(rc, KEEL_OK); /* no failure was injected */
            break;
        }
        assert_int_equal(rc, KEEL_ERR_NOMEM);
    }
    keel_roster_free(r);
    keel_error_fini(&err);
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(test_every_option_matches_exhaustive_enumeration),
        cmocka_unit_test(test_at_takes_care_and_capacity_from_then_on),
        cmocka_unit_test(test_at_crosses_midnight),
        cmocka_unit_test(test_every_failed_allocation_ends_in_a_clean_error),
    };
    return cmocka_run_group_tests(tests, NULL, NULL);
}
