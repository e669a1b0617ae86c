/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * fuzz_solve.c - libFuzzer harness: any bytes as a roster, and, when the
 * loader accepts it, the whole job: workload, solve with a tiny time
 * limit, the course of the shift and every report format.  Never a crash,
 * a leak, a hang past the time limit or undefined behaviour.
 */
#include <stddef.h>
#include <stdint.h>
#include <stdio.h>

#include "keel/keel.h"

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size);

/* A roster with many patients would spend the fuzzer's time in the
 * solver; the loader is fuzzed on its own (fuzz_roster.c). */
#define MAX_PEOPLE 40

static void write_reports(const keel_roster *r, const keel_workload *w, keel_solution *s)
{
    keel_metrics *m = NULL;
    keel_course *c = NULL;
    keel_error err;
    keel_error_init(&err);
    if (keel_metrics_compute(w, s->nurse_of, &m, &err) == KEEL_OK &&
        keel_course_compute(r, w, s->nurse_of, 3, &c, &err) == KEEL_OK) {
        keel_report rep = {.kind = KEEL_REPORT_ASSIGN,
                           .roster = r,
                           .workload = w,
                           .nurse_of = s->status == KEEL_SOLVE_INFEASIBLE && !s->best_effort
                                           ? NULL
                                           : s->nurse_of,
                           .metrics = m,
                           .solution = s,
                           .course = c};
        FILE *sink = fopen("/dev/null", "w");
        for (size_t i = 0; sink && i < keel_report_nformats(); i++)
            keel_report_write(keel_report_format_name(i), &rep, sink, &err);
        if (sink)
            fclose(sink);
    }
    keel_course_free(c);
    keel_metrics_free(m);
    keel_error_fini(&err);
}

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size)
{
    keel_error err;
    keel_error_init(&err);
    keel_roster *r = NULL;
    keel_workload *w = NULL;
    keel_solution *s = NULL;
    if (keel_roster_parse("fuzz.yaml", (const char *)data, size, &r, &err) != KEEL_OK)
        goto out;
    if (r->npatients > MAX_PEOPLE || r->nnurses > MAX_PEOPLE)
        goto out;
    if (keel_workload_compute(r, &w, &err) != KEEL_OK)
        goto out;
    keel_solve_options o = {.time_limit_ms = 50, .best_effort = size % 2 == 0};
    if (keel_solve(r, w, &o, &s, &err) == KEEL_OK)
        write_reports(r, w, s);
out:
    keel_solution_free(s);
    keel_workload_free(w);
    keel_roster_free(r);
    keel_error_fini(&err);
    return 0;
}
