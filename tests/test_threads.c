/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * test_threads.c - several rosters loaded, solved and measured in threads
 * at once give what they give one at a time (keel/keel.h, "Threads").
 *
 * Public API only, linked against the shared library.  Each roster is first
 * solved alone; then every thread takes a different roster, all at the same
 * time, twice round, and each answer must equal the lone one: the status,
 * every stage's value and bound, the assignment, the diagnoses and the
 * best-effort severity.  The time limit is far above what the rosters need,
 * so no answer depends on timing; a stage that did not finish proven would
 * make the comparison meaningless and fails the test.
 *
 * The suite "threads" also runs this program under Valgrind's Helgrind,
 * which reports any data race between the threads (tests/meson.build).
 *
 * Usage: test_threads ROSTER.yaml...
 */
#include <pthread.h>
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include <cmocka.h>

#include <keel/keel.h>

#define MAX_ROSTERS 16
#define ROUNDS 2
#define TIME_LIMIT_MS 120000L

/* What one solve of one roster gave, kept to compare. */
typedef struct answer {
    keel_status status;
    keel_solve_status solve_status;
    size_t nparts;
    int *nurse_of;
    size_t nstages;
    double value[KEEL_STAGE_KINDS], bound[KEEL_STAGE_KINDS];
    keel_solve_status stage_status[KEEL_STAGE_KINDS];
    size_t ndiagnoses;
    long severity;
    double max_utilisation, min_utilisation;
} answer;

static const char *paths[MAX_ROSTERS];
static size_t npaths;

/* Loads, derives, solves and measures the roster at path into *a. */
static void solve_one(const char *path, answer *a)
{
    *a = (answer){.status = KEEL_OK};
    keel_error err;
    keel_error_init(&err);
    keel_roster *roster = NULL;
    keel_workload *w = NULL;
    keel_solution *s = NULL;
    keel_metrics *m = NULL;
    a->status = keel_roster_load(path, &roster, &err);
    if (a->status != KEEL_OK) {
        keel_error_fini(&err);
        return;
    }
    a->status = keel_workload_compute(roster, &w, &err);
    if (a->status == KEEL_OK) {
        keel_solve_options options = {.method = "ilp", .time_limit_ms = TIME_LIMIT_MS,
                                      .best_effort = true};
        a->status = keel_solve(roster, w, &options, &s, &err);
    }
    if (a->status == KEEL_OK) {
        a->solve_status = s->status;
        a->nparts = keel_workload_nparts(w);
        a->nurse_of = malloc((a->nparts ? a->nparts : 1) * sizeof *a->nurse_of);
        if (a->nurse_of)
            memcpy(a->nurse_of, s->nurse_of, a->nparts * sizeof *a->nurse_of);
        a->nstages = s->nstages;
        for (size_t i = 0; i < s->nstages; i++) {
            a->value[i] = s->stages[i].value;
            a->bound[i] = s->stages[i].bound;
            a->stage_status[i] = s->stages[i].status;
        }
        a->ndiagnoses = s->diagnoses.n;
        a->severity = s->severity;
        if (s->status != KEEL_SOLVE_INFEASIBLE || s->best_effort)
            a->status = keel_metrics_compute(w, s->nurse_of, &m, &err);
        if (m) {
            a->max_utilisation = m->max_utilisation;
            a->min_utilisation = m->min_utilisation;
        }
    }
    keel_metrics_free(m);
    keel_solution_free(s);
    keel_workload_free(w);
    keel_roster_free(roster);
    keel_error_fini(&err);
}

/* Checks that b, from a thread, equals a, from the lone solve. */
static void assert_same(const char *path, const answer *a, const answer *b)
{
    print_message("# %s\n", path);
    assert_int_equal(a->status, KEEL_OK);
    assert_int_equal(b->status, a->status);
    assert_int_equal(b->solve_status, a->solve_status);
    assert_int_equal(b->nparts, a->nparts);
    assert_non_null(a->nurse_of);
    assert_non_null(b->nurse_of);
    assert_memory_equal(b->nurse_of, a->nurse_of, a->nparts * sizeof *a->nurse_of);
    assert_int_equal(b->nstages, a->nstages);
    for (size_t i = 0; i < a->nstages; i++) {
        assert_int_equal(a->stage_status[i], KEEL_SOLVE_OPTIMAL);
        assert_int_equal(b->stage_status[i], KEEL_SOLVE_OPTIMAL);
        assert_true(b->value[i] == a->value[i]);
        assert_true(b->bound[i] == a->bound[i]);
    }
    assert_int_equal(b->ndiagnoses, a->ndiagnoses);
    assert_int_equal(b->severity, a->severity);
    assert_true(b->max_utilisation == a->max_utilisation);
    assert_true(b->min_utilisation == a->min_utilisation);
}

typedef struct job {
    const char *path;
    answer got;
} job;

static void *run_job(void *arg)
{
    job *j = arg;
    solve_one(j->path, &j->got);
    return NULL;
}

/* Every roster in a thread of its own, all at once, ROUNDS times; each
 * round starts the rosters in a different order. */
static void test_threads_match_serial(void **state)
{
    (void)state;
    answer alone[MAX_ROSTERS];
    for (size_t i = 0; i < npaths; i++)
        solve_one(paths[i], &alone[i]);
    for (int round = 0; round < ROUNDS; round++) {
        job jobs[MAX_ROSTERS];
        pthread_t threads[MAX_ROSTERS];
        for (size_t t = 0; t < npaths; t++) {
            jobs[t].path = paths[(t + (size_t)round) % npaths];
            assert_int_equal(pthread_create(&threads[t], NULL, run_job, &jobs[t]), 0);
        }
        for (size_t t = 0; t < npaths; t++)
            assert_int_equal(pthread_join(threads[t], NULL), 0);
        for (size_t t = 0; t < npaths; t++) {
            size_t i = (t + (size_t)round) % npaths;
            assert_same(paths[i], &alone[i], &jobs[t].got);
            free(jobs[t].got.nurse_of);
        }
    }
    for (size_t i = 0; i < npaths; i++)
        free(alone[i].nurse_of);
}

int main(int argc, char **argv)
{
    if (argc < 3 || argc - 1 > MAX_ROSTERS) {
        fprintf(stderr, "usage: test_threads ROSTER.yaml ROSTER.yaml... (2 to %d)\n",
                MAX_ROSTERS);
        return 2;
    }
    for (int i = 1; i < argc; i++)
        paths[npaths++] = argv[i];
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(test_threads_match_serial),
    };
    return cmocka_run_group_tests(tests, NULL, NULL);
}
