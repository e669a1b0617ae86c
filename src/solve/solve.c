/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * solve.c - orchestrates a solve: is any valid assignment possible
 * (diagnose), the greedy incumbent, then the chosen method's stages, all
 * under one time limit.  Also the small exact helpers every method shares
 * (loads, heaviest and lightest utilisation, simple proven limits).
 */
#include "keel/solve.h"

#include <stdlib.h>
#include <string.h>
#include <time.h>

#include "alloc.h"
#include "solve_internal.h"
#include "tally.h"

#define DEFAULT_TIME_LIMIT_MS 10000L
/* Share of the time limit (in tenths) after which stages 3 and 4 start. */
#define FOLLOW_START_TENTHS 6
/* Patients above which a pooled unit with one zone per nurse is first
 * solved zone by zone with the plan's own nurses (keel_zones_polish): there
 * the whole unit's search rarely improves the greedy plan in time. */
#define POLISH_FROM 100
/* The greedy method's local search takes at most this share of the
 * balance time (1 s of the default 10 s limit with stages 3 and 4). */
#define GREEDY_SEARCH_SHARE 6
/* Nodes the dedicated search may spend on a second starting plan. */
#define SECOND_START_NODES 20000L

/* A solver plugin: see keel_method_greedy() and keel_method_ilp(). */
typedef struct keel_method {
    const char *name;
    keel_status (*solve)(const keel_workload *w, long long deadline_ms, keel_solution *sol,
                         keel_error *err);
} keel_method;

static const keel_method methods[] = {
    {"ilp", keel_method_ilp},
    {"greedy", keel_method_greedy},
};

size_t keel_solve_nmethods(void)
{
    return sizeof methods / sizeof methods[0];
}

const char *keel_solve_method_name(size_t i)
{
    return i < keel_solve_nmethods() ? methods[i].name : NULL;
}

const char *keel_solve_status_name(keel_solve_status status)
{
    switch (status) {
    case KEEL_SOLVE_OPTIMAL:
        return "optimal";
    case KEEL_SOLVE_TIME_LIMIT:
        return "time_limit";
    case KEEL_SOLVE_HEURISTIC:
        return "heuristic";
    case KEEL_SOLVE_INFEASIBLE:
        return "infeasible";
    }
    return "unknown";
}

long long keel_clock_ms(void)
{
    struct timespec ts;
    clock_gettime(CLOCK_MONOTONIC, &ts);
    return (long long)ts.tv_sec * 1000 + ts.tv_nsec / 1000000;
}

void keel_solve_loads(const keel_workload *w, const int *nurse_of, long long *load)
{
    for (size_t n = 0; n < w->nnurses; n++)
        load[n] = w->duty_minutes[n];
    for (size_t p = 0; p < w->npatients; p++)
        if (nurse_of[p] >= 0)
            load[nurse_of[p]] += w->care_minutes[p];
}

/* Heaviest (sign 1) or lightest (sign -1) utilisation of the counted nurses.
 * Sums each nurse's patients in turn so that it needs no memory. */
static keel_ratio extreme(const keel_workload *w, const int *nurse_of, int sign)
{
    keel_ratio best = {0, 1};
    bool any = false;
    for (size_t n = 0; n < w->nnurses; n++) {
        if (!keel_workload_counted(w, n))
            continue;
        keel_ratio u = {w->duty_minutes[n], w->capacity_minutes[n]};
        for (size_t p = 0; p < w->npatients; p++)
            if (nurse_of[p] == (int)n)
                u.num += w->care_minutes[p];
        if (!any || keel_ratio_cmp(u, best) * sign > 0)
            best = u;
        any = true;
    }
    return best;
}

double keel_solve_squares(const keel_workload *w, const int *nurse_of)
{
    double sum = 0;
    for (size_t n = 0; n < w->nnurses; n++) {
        if (!keel_workload_counted(w, n))
            continue;
        long long load = w->duty_minutes[n];
        for (size_t p = 0; nurse_of && p < w->npatients; p++)
            load += nurse_of[p] == (int)n ? w->care_minutes[p] : 0;
        sum += (double)load * (double)load / w->capacity_minutes[n];
    }
    return sum;
}

double keel_solve_squares_floor(const keel_workload *w)
{
    return keel_solve_squares(w, NULL);
}

keel_ratio keel_solve_peak(const keel_workload *w, const int *nurse_of)
{
    return extreme(w, nurse_of, 1);
}

keel_ratio keel_solve_lift(const keel_workload *w, const int *nurse_of)
{
    return extreme(w, nurse_of, -1);
}

keel_status keel_solve_validate(const keel_workload *w, const int *nurse_of, bool *valid)
{
    keel_tally t;
    *valid = false;
    if (keel_tally_init(&t, w))
        return KEEL_ERR_NOMEM;
    /* Every rule only tightens as patients are added, so an assignment
     * keeps them all when each patient is admitted in turn. */
    bool ok = true;
    for (size_t p = 0; p < w->npatients && ok; p++) {
        ok = nurse_of[p] >= 0 && keel_tally_admits(&t, p, (size_t)nurse_of[p]);
        if (ok)
            keel_tally_add(&t, p, (size_t)nurse_of[p]);
    }
    ok = ok && !keel_tally_short(&t); /* the fewest patients, on the whole assignment */
    keel_tally_free(&t);
    *valid = ok;
    return KEEL_OK;
}

long long keel_solve_kept(const keel_workload *w, const int *nurse_of)
{
    long long kept = 0;
    for (size_t p = 0; p < w->npatients; p++)
        kept += w->previous[p] >= 0 && nurse_of[p] == w->previous[p];
    return kept;
}

/* Distinct values of key[] among each nurse's patients, summed over nurses. */
static long long distinct_per_nurse(const keel_workload *w, const int *nurse_of, const int *key)
{
    long long total = 0;
    for (size_t p = 0; p < w->npatients; p++) {
        if (key[p] < 0 || nurse_of[p] < 0)
            continue;
        bool seen = false;
        for (size_t q = 0; q < p && !seen; q++)
            seen = key[q] == key[p] && nurse_of[q] == nurse_of[p];
        total += !seen;
    }
    return total;
}

void keel_solve_spread(const keel_workload *w, const int *nurse_of, long long *zones,
                       long long *rooms)
{
    *zones = distinct_per_nurse(w, nurse_of, w->zone);
    *rooms = distinct_per_nurse(w, nurse_of, w->room);
}

/* Total work over total capacity of the counted nurses. */
static keel_ratio unit_average(const keel_workload *w)
{
    keel_ratio avg = {0, 0};
    for (size_t p = 0; p < w->npatients; p++)
        avg.num += w->care_minutes[p];
    for (size_t n = 0; n < w->nnurses; n++) {
        if (!keel_workload_counted(w, n))
            continue;
        avg.num += w->duty_minutes[n];
        avg.den += w->capacity_minutes[n];
    }
    if (avg.den == 0)
        avg = (keel_ratio){0, 1};
    return avg;
}

keel_ratio keel_solve_peak_floor(const keel_workload *w)
{
    keel_ratio floor = unit_average(w);
    for (size_t n = 0; n < w->nnurses; n++) {
        keel_ratio duty = {w->duty_minutes[n], w->capacity_minutes[n]};
        if (keel_workload_counted(w, n) && keel_ratio_cmp(duty, floor) > 0)
            floor = duty;
    }
    for (size_t p = 0; p < w->npatients; p++) {
        bool any = false;
        keel_ratio best = {0, 1};
        for (size_t n = 0; n < w->nnurses; n++) {
            if (!keel_workload_eligible(w, p, n))
                continue;
            keel_ratio u = {(long long)w->duty_minutes[n] + w->care_minutes[p],
                            w->capacity_minutes[n]};
            if (!any || keel_ratio_cmp(u, best) < 0)
                best = u;
            any = true;
        }
        if (any && keel_ratio_cmp(best, floor) > 0)
            floor = best;
    }
    return floor;
}

keel_ratio keel_solve_lift_ceiling(const keel_workload *w)
{
    return unit_average(w);
}

void keel_solution_free(keel_solution *s)
{
    if (!s)
        return;
    free(s->nurse_of);
    free(s->bound_reason.text);
    keel_findings_fini(&s->diagnoses);
    free(s);
}

static const keel_method *find_method(const char *name)
{
    for (size_t i = 0; i < keel_solve_nmethods(); i++)
        if (strcmp(methods[i].name, name) == 0)
            return &methods[i];
    return NULL;
}

/* The overall status follows the weakest stage. */
static keel_solve_status overall_status(const keel_solution *s)
{
    keel_solve_status st = KEEL_SOLVE_OPTIMAL;
    for (size_t i = 0; i < s->nstages; i++)
        if (s->stages[i].status > st)
            st = s->stages[i].status;
    return st;
}

/* A second starting plan when rules join patients: the dedicated search's
 * first valid assignment, improved; kept when its heaviest utilisation is
 * lower than that of nurse_of.  (The placements differ in where they get
 * stuck, and the search from the better start proves more.) */
static keel_status second_start(const keel_workload *w, long long deadline_ms, int *nurse_of)
{
    size_t np = w->npatients, nn = w->nnurses;
    long long *lo = keel_calloc(nn + 1, sizeof *lo), *hi = keel_calloc(nn + 1, sizeof *hi);
    int *other = keel_calloc(np + 1, sizeof *other);
    keel_status rc = lo && hi && other ? KEEL_OK : KEEL_ERR_NOMEM;
    long long total = 0;
    for (size_t p = 0; p < np; p++)
        total += w->care_minutes[p];
    for (size_t n = 0; hi && n < nn; n++)
        hi[n] = total;
    keel_ilp_answer answer = KEEL_ILP_UNKNOWN;
    if (!rc)
        rc = keel_fit_search(w, lo, hi, SECOND_START_NODES, deadline_ms, other, &answer);
    if (!rc && answer == KEEL_ILP_FEASIBLE)
        rc = keel_greedy_improve(w, other);
    if (!rc && answer == KEEL_ILP_FEASIBLE &&
        keel_ratio_cmp(keel_solve_peak(w, other), keel_solve_peak(w, nurse_of)) < 0)
        memcpy(nurse_of, other, np * sizeof *nurse_of);
    free(lo);
    free(hi);
    free(other);
    return rc;
}

keel_status keel_solve(const keel_roster *roster, const keel_workload *w,
                       const keel_solve_options *options, keel_solution **out, keel_error *err)
{
    keel_status rc = KEEL_OK;
    long long started = keel_clock_ms();
    const char *name = options && options->method ? options->method : "ilp";
    long limit =
        options && options->time_limit_ms > 0 ? options->time_limit_ms : DEFAULT_TIME_LIMIT_MS;
    const keel_method *method = find_method(name);
    *out = NULL;
    if (!method)
        return keel_error_add(err, KEEL_ERR_USAGE, NULL, 0, 0, NULL,
                              "unknown method '%s'; expected ilp or greedy", name);

    keel_solution *s = keel_calloc(1, sizeof *s);
    if (!s)
        return keel_error_add(err, KEEL_ERR_NOMEM, NULL, 0, 0, NULL, "out of memory");
    s->method = method->name;
    s->npatients = w->npatients;
    s->nurse_of = keel_calloc(w->npatients, sizeof *s->nurse_of);
    if (!s->nurse_of) {
        rc = keel_error_add(err, KEEL_ERR_NOMEM, NULL, 0, 0, NULL, "out of memory");
        goto out;
    }

    bool feasible = false;
    rc = keel_diagnose(roster, w, s->nurse_of, &feasible, &s->diagnoses);
    if (rc) {
        keel_error_add(err, rc, NULL, 0, 0, NULL, "out of memory");
        goto out;
    }
    long long deadline = started + limit;
    if (!feasible)
        goto infeasible;
    /* Stages 3 and 4, when they apply, get the last part of the time. */
    bool follows = w->ncontinuity > 0 || w->nzones > 0 || w->nrooms > 0;
    long long balance_deadline = follows ? started + limit * FOLLOW_START_TENTHS / 10 : deadline;
    bool by_zone = false;
    if (method->solve == keel_method_ilp && keel_zones_apply(w)) {
        rc = keel_zones_solve(w, balance_deadline, s, &by_zone, err);
        if (rc)
            goto out;
        if (by_zone)
            goto balanced;
    }

    /* The greedy placement may get stuck on patient limits even though an
     * assignment exists; then start from the one diagnose found.  With
     * rules that join patients, that one may break them: then search. */
    keel_ilp_answer answer = KEEL_ILP_FEASIBLE;
    if (w->joined_rules) {
        rc = keel_find_valid(w, deadline, s->nurse_of, &answer, err);
        if (rc)
            goto out;
        if (answer == KEEL_ILP_INFEASIBLE) {
            rc = keel_diagnose_rules(roster, w, deadline, &s->diagnoses, err);
            if (rc)
                goto out;
            goto infeasible;
        }
        if (answer != KEEL_ILP_FEASIBLE) {
            rc = keel_error_add(err, KEEL_ERR_SOLVER, NULL, 0, 0, NULL,
                                "within the time limit, keel found no assignment that keeps "
                                "every rule and could not show why none exists; try a longer "
                                "--time-limit");
            goto out;
        }
    } else {
        int *greedy = keel_calloc(w->npatients ? w->npatients : 1, sizeof *greedy);
        if (!greedy) {
            rc = keel_error_add(err, KEEL_ERR_NOMEM, NULL, 0, 0, NULL, "out of memory");
            goto out;
        }
        bool placed_all = false;
        rc = keel_greedy_place(w, greedy, &placed_all);
        if (!rc && placed_all)
            memcpy(s->nurse_of, greedy, w->npatients * sizeof *greedy);
        free(greedy);
        if (rc) {
            keel_error_add(err, rc, NULL, 0, 0, NULL, "out of memory");
            goto out;
        }
    }
    rc = keel_greedy_improve(w, s->nurse_of);
    if (rc) {
        keel_error_add(err, rc, NULL, 0, 0, NULL, "out of memory");
        goto out;
    }
    if (method->solve == keel_method_ilp && w->joined_rules) {
        rc = second_start(w, deadline, s->nurse_of);
        if (rc) {
            keel_error_add(err, rc, NULL, 0, 0, NULL, "out of memory");
            goto out;
        }
    }
    /* On a large pooled unit with one zone per nurse, each zone alone. */
    if (method->solve == keel_method_ilp && w->zones_rule && w->npatients > POLISH_FROM) {
        long long now = keel_clock_ms();
        rc = keel_zones_polish(w, now + (balance_deadline - now) / 2, s->nurse_of, err);
        if (rc)
            goto out;
    }
    rc = method->solve(w, balance_deadline, s, err);
balanced:
    if (!rc && w->balance == KEEL_BALANCE_PEAK &&
        keel_solve_explain_bound(roster, w, s->stages[0].bound, s))
        rc = keel_error_add(err, KEEL_ERR_NOMEM, NULL, 0, 0, NULL, "out of memory");
    if (!rc)
        rc = keel_solve_follow(w, method->solve == keel_method_ilp, deadline, s, err);
    if (rc)
        goto out;
    s->status = overall_status(s);
    goto out;
infeasible:
    s->status = KEEL_SOLVE_INFEASIBLE;
    for (size_t p = 0; p < w->npatients; p++)
        s->nurse_of[p] = -1;
    if (options && options->best_effort) {
        bool found = false;
        bool proven = false;
        rc = keel_best_effort(roster, w, deadline, s->nurse_of, &found, &s->severity, &proven, err);
        s->best_effort = !rc && found;
        if (!s->best_effort)
            for (size_t p = 0; p < w->npatients; p++)
                s->nurse_of[p] = -1;
    }
out:
    s->seconds = (double)(keel_clock_ms() - started) / 1000.0;
    if (rc)
        keel_solution_free(s);
    else
        *out = s;
    return rc;
}

/* The greedy method: the incumbent lowered by the local search, with the
 * simple proven limits. */
keel_status keel_method_greedy(const keel_workload *w, long long deadline_ms, keel_solution *sol,
                               keel_error *err)
{
    long long now = keel_clock_ms();
    if (w->balance == KEEL_BALANCE_PEAK &&
        keel_local_descent(w, now + (deadline_ms - now) / GREEDY_SEARCH_SHARE, sol->nurse_of))
        return keel_error_add(err, KEEL_ERR_NOMEM, NULL, 0, 0, NULL, "out of memory");
    if (w->balance == KEEL_BALANCE_SQUARES) {
        double v = keel_solve_squares(w, sol->nurse_of), b = keel_solve_squares_floor(w);
        sol->nstages = 1;
        sol->stages[0] = (keel_stage){.name = "squares",
                                      .status = v <= b ? KEEL_SOLVE_OPTIMAL : KEEL_SOLVE_HEURISTIC,
                                      .value = v,
                                      .bound = b,
                                      .gap = keel_gap(v, b)};
        return KEEL_OK;
    }
    keel_ratio peak = keel_solve_peak(w, sol->nurse_of);
    keel_ratio lift = keel_solve_lift(w, sol->nurse_of);
    keel_ratio floor = keel_solve_peak_floor(w);
    keel_ratio ceiling = keel_solve_lift_ceiling(w);
    double u = keel_ratio_value(peak), l = keel_ratio_value(lift);
    sol->nstages = 2;
    sol->stages[0] = (keel_stage){.name = "peak",
                                  .status = keel_ratio_cmp(peak, floor) <= 0 ? KEEL_SOLVE_OPTIMAL
                                                                             : KEEL_SOLVE_HEURISTIC,
                                  .value = u,
                                  .bound = keel_ratio_value(floor),
                                  .gap = keel_gap(u, keel_ratio_value(floor))};
    sol->stages[1] = (keel_stage){
        .name = "lift",
        .status = keel_ratio_cmp(lift, ceiling) >= 0 ? KEEL_SOLVE_OPTIMAL : KEEL_SOLVE_HEURISTIC,
        .value = l,
        .bound = keel_ratio_value(ceiling),
        .gap = keel_gap(l, keel_ratio_value(ceiling))};
    return KEEL_OK;
}
