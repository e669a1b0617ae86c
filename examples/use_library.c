/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * use_library.c - a short program that uses libkeel through its public API
 * only (<keel/keel.h>): load a roster, derive its workload, solve it, and
 * print each nurse's load and utilisation, then the caution.  It walks the
 * whole pipeline in order:
 *
 *   roster (load + validate) -> workload -> solve -> metrics -> print
 *
 * Every number printed comes from keel_metrics; the program computes none
 * of its own.  Exit codes follow the keel command: 0 success, 1 usage
 * error, 2 bad input, 3 no valid assignment exists, 4 internal or solver
 * failure.
 *
 * Build against an installed keel:
 *   cc -std=c11 use_library.c $(pkg-config --cflags --libs keel) -o use_library
 * Run:
 *   ./use_library examples/icu-night.yaml
 */
#include <stdio.h>

#include <keel/keel.h>

enum {
    EXIT_USAGE = 1,
    EXIT_INPUT = 2,
    EXIT_INFEASIBLE = 3,
    EXIT_INTERNAL = 4,
};

/* The exit code for a library status, as the keel command maps them. */
static int exit_code(keel_status status)
{
    switch (status) {
    case KEEL_OK:
        return 0;
    case KEEL_ERR_USAGE:
        return EXIT_USAGE;
    case KEEL_ERR_INPUT:
    case KEEL_ERR_IO:
        return EXIT_INPUT;
    case KEEL_ERR_NOMEM:
    case KEEL_ERR_SOLVER:
        return EXIT_INTERNAL;
    }
    return EXIT_INTERNAL;
}

/* Prints every problem the error holds, one per line, on stderr. */
static void print_problems(const keel_error *err)
{
    for (size_t i = 0; i < err->nproblems; i++) {
        char line[1024];
        keel_problem_format(&err->problems[i], line, sizeof line);
        fprintf(stderr, "use_library: %s\n", line);
    }
    if (err->nproblems == 0 && err->status)
        fprintf(stderr, "use_library: %s\n", keel_status_string(err->status));
}

/* Prints why no valid assignment exists: one line per diagnosis. */
static void print_diagnoses(const keel_roster *roster, const keel_solution *solution)
{
    fprintf(stderr, "use_library: %s: no valid assignment exists\n", roster->path);
    for (size_t i = 0; i < solution->diagnoses.n; i++)
        fprintf(stderr, "  [%s] %s\n", solution->diagnoses.items[i].rule,
                solution->diagnoses.items[i].message);
}

/* Prints one line per nurse and the balance over the nurses who take
 * patients.  Names stay out: a nurse is shown by id. */
static void print_loads(const keel_roster *roster, const keel_solution *solution,
                        const keel_metrics *m)
{
    printf("%s: %zu patients, %zu nurses; status %s (method %s)\n",
           roster->unit.name ? roster->unit.name : roster->path, roster->npatients, roster->nnurses,
           keel_solve_status_name(solution->status), solution->method);
    for (size_t n = 0; n < m->nnurses; n++) {
        const keel_nurse_metrics *nm = &m->nurses[n];
        printf("  nurse %s: %d patient%s, load %d of %d min, %.1f %%%s\n", roster->nurses[n].id,
               nm->npatients, nm->npatients == 1 ? "" : "s", nm->load_minutes, nm->capacity_minutes,
               100.0 * nm->utilisation, nm->counted ? "" : " (takes no patients)");
    }
    printf("Over the %zu nurses who take patients: heaviest %.1f %%, lightest %.1f %%\n",
           m->ncounted, 100.0 * m->max_utilisation, 100.0 * m->min_utilisation);
    if (solution->nstages > 0)
        printf("Proven lower limit on the heaviest: %.1f %% (gap %.3f)\n",
               100.0 * solution->stages[0].bound, solution->stages[0].gap);
}

int main(int argc, char **argv)
{
    if (argc != 2) {
        fprintf(stderr, "usage: use_library ROSTER\n");
        return EXIT_USAGE;
    }

    keel_error err;
    keel_roster *roster = NULL;
    keel_workload *workload = NULL;
    keel_solution *solution = NULL;
    keel_metrics *metrics = NULL;
    keel_solve_options options = {0}; /* the defaults: method ilp, a 10-second limit */
    int code = 0;

    keel_error_init(&err);
    keel_status rc = keel_roster_load(argv[1], &roster, &err);
    if (!rc)
        rc = keel_workload_compute(roster, &workload, &err);
    if (!rc)
        rc = keel_solve(roster, workload, &options, &solution, &err);
    if (rc) {
        print_problems(&err);
        code = exit_code(rc);
        goto out;
    }
    if (solution->status == KEEL_SOLVE_INFEASIBLE) {
        print_diagnoses(roster, solution);
        code = EXIT_INFEASIBLE;
        goto out;
    }
    rc = keel_metrics_compute(workload, solution->nurse_of, &metrics, &err);
    if (rc) {
        print_problems(&err);
        code = exit_code(rc);
        goto out;
    }

    print_loads(roster, solution, metrics);
    printf("\n%s\n", KEEL_CAUTION);
    if (fflush(stdout) != 0 || ferror(stdout)) {
        fprintf(stderr, "use_library: cannot write the report\n");
        code = EXIT_INTERNAL;
    }

out:
    keel_metrics_free(metrics);
    keel_solution_free(solution);
    keel_workload_free(workload);
    keel_roster_free(roster);
    keel_error_fini(&err);
    return code;
}
