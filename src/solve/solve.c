/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * solve.c - the orchestrator, the top of src/solve/: is any valid
 * assignment possible (feas_hall.c, then the valid chain), the greedy
 * incumbent, then the stages in the order of objectives, all under one time
 * limit shared as budget.c's table says.  When none is possible, why
 * (feas_hall.c, feas_conflict.c), and with --best-effort the plan that
 * breaks the fewest rules.
 *
 * A method is a row of data that the orchestrator reads: whether it proves
 * its stages (exact), whether it tries the zone methods first, whether it
 * polishes large pooled units zone by zone, whether it looks for a second
 * starting plan.  Nothing here asks which method it is.
 */
#include "keel/solve.h"

#include <stdlib.h>
#include <string.h>

#include "alloc.h"
#include "answer.h"
#include "bound.h"
#include "budget.h"
#include "feas.h"
#include "heur.h"
#include "lp.h"
#include "measure.h"
#include "stage.h"
#include "zone.h"

/* Patients above which a pooled unit with one zone per nurse is first
 * solved zone by zone with the plan's own nurses (keel_zone_polish): there
 * the whole unit's search rarely improves the greedy plan in time. */
#define POLISH_FROM 100

/* A method: its properties, read by the orchestrator. */
typedef struct keel_method {
    const char *name;
    bool exact;        /* proves each stage (the chain of answerers, GLPK) */
    bool zones_first;  /* tries stages 1-2 by zone when the unit splits by zone */
    bool polish;       /* polishes large pooled units zone by zone before the stages */
    bool second_start; /* with rules that join patients, a second starting plan */
} keel_method;

static const keel_method methods[] = {
    {.name = "ilp", .exact = true, .zones_first = true, .polish = true, .second_start = true},
    {.name = "greedy"},
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

void keel_solution_free(keel_solution *s)
{
    if (!s)
        return;
    free(s->nurse_of);
    free(s->ranks);
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
static keel_status second_start(const keel_workload *w, long long deadline_ms, int *nurse_of,
                                keel_error *err)
{
    size_t np = w->npatients, nn = w->nnurses;
    long long *lo = keel_calloc(nn + 1, sizeof *lo), *hi = keel_calloc(nn + 1, sizeof *hi);
    int *other = keel_calloc(np + 1, sizeof *other);
    keel_status rc = KEEL_OK;
    if (!lo || !hi || !other) {
        rc = keel_error_add(err, KEEL_ERR_NOMEM, NULL, 0, 0, NULL, "out of memory");
        goto out;
    }
    long long total = 0;
    for (size_t p = 0; p < np; p++)
        total += w->care_minutes[p];
    for (size_t n = 0; n < nn; n++)
        hi[n] = total;
    keel_question q = {.w = w, .lo = lo, .hi = hi, .nodes = KEEL_NODES_SECOND_START};
    keel_answer answer = KEEL_ANSWER_UNKNOWN;
    rc = keel_answer_fit(&q, deadline_ms, other, &answer, err);
    if (!rc && answer == KEEL_ANSWER_YES && keel_heur_greedy_improve(w, other, deadline_ms))
        rc = keel_error_add(err, KEEL_ERR_NOMEM, NULL, 0, 0, NULL, "out of memory");
    if (!rc && answer == KEEL_ANSWER_YES &&
        keel_ratio_cmp(keel_measure_peak(w, other), keel_measure_peak(w, nurse_of)) < 0)
        memcpy(nurse_of, other, np * sizeof *nurse_of);
out:
    free(lo);
    free(hi);
    free(other);
    return rc;
}

/* The incumbent: a valid assignment to start from.  Without rules that
 * join patients, the greedy placement (or, when it gets stuck on patient
 * limits, the one feas_hall.c found, already in nurse_of); with them, the
 * valid chain.  *answer says whether one exists. */
static keel_status incumbent(const keel_workload *w, long long deadline_ms, int *nurse_of,
                             keel_answer *answer, keel_error *err)
{
    *answer = KEEL_ANSWER_YES;
    if (w->joined_rules)
        return keel_answer_valid(w, deadline_ms, nurse_of, answer, err);
    int *greedy = keel_calloc(w->npatients ? w->npatients : 1, sizeof *greedy);
    if (!greedy)
        return keel_error_add(err, KEEL_ERR_NOMEM, NULL, 0, 0, NULL, "out of memory");
    bool placed_all = false;
    keel_status rc = keel_heur_greedy_place(w, greedy, &placed_all);
    if (!rc && placed_all)
        memcpy(nurse_of, greedy, w->npatients * sizeof *greedy);
    free(greedy);
    if (rc)
        keel_error_add(err, rc, NULL, 0, 0, NULL, "out of memory");
    return rc;
}

/* Stages 3 (continuity) and 4 (proximity) after the balance stages, within
 * the balance tolerance: continuity gets its share of the time (all of it
 * when proximity does not follow), proximity the rest and keeps
 * continuity's count.  deadline_ms is theirs: stage 5 follows them. */
static keel_status follow_near(const keel_workload *w, bool exact, const keel_ratio *level,
                               long long deadline_ms, keel_solution *sol, keel_error *err)
{
    bool keep = w->ncontinuity > 0, near = w->nzones > 0 || w->nrooms > 0;
    if (!keep && !near)
        return KEEL_OK;
    sol->continuity.tolerance = (double)w->tolerance / KEEL_TOLERANCE_SCALE;
    keel_ratio lift = keel_measure_lift(w, sol->nurse_of);
    long long kept = 0;
    keel_status rc = KEEL_OK;
    if (keep) {
        long long now = keel_budget_now();
        long long until = near ? keel_budget_until(KEEL_SHARE_KEEP, now, deadline_ms, 0) : deadline_ms;
        rc = keel_stage_keep(w, exact, level, lift, until, sol->nurse_of,
                             &sol->stages[sol->nstages++], sol, &kept, err);
    }
    if (rc || !near)
        return rc;
    rc = keel_stage_near(w, exact, level, lift, kept, deadline_ms, sol->nurse_of,
                         &sol->stages[sol->nstages++], sol, err);
    if (rc || !keep)
        return rc;
    /* Stage 4 keeps at least stage 3's count and may find a plan that keeps
     * more (when stage 3 was not proven): report the plan's. */
    long long now_kept = keel_measure_kept(w, sol->nurse_of);
    if (now_kept > kept) {
        keel_stage *st = &sol->stages[sol->nstages - 2];
        sol->continuity.kept = (long)now_kept;
        if (w->tolerance == 0) { /* the same windows */
            sol->continuity.kept_at_zero = (long)now_kept;
            sol->continuity.zero_proven = now_kept == (long long)st->bound;
        }
        st->value = (double)now_kept;
        st->gap = keel_gap(st->value, st->bound);
        st->status = now_kept == (long long)st->bound ? KEEL_SOLVE_OPTIMAL : st->status;
    }
    return KEEL_OK;
}

/* Stages 3 and 4 (follow_near()), then with history weights stage 5,
 * fairness forward, holding the windows of the balance stages (each
 * nurse's ceiling level[n]), the count kept and the proximity reached;
 * stages 3-4 get their share of the time first when it follows. */
static keel_status follow(const keel_workload *w, const double *history, bool exact,
                          const keel_ratio *level, long long deadline_ms, keel_solution *sol,
                          keel_error *err)
{
    if (!history)
        return follow_near(w, exact, level, deadline_ms, sol, err);
    sol->continuity.tolerance = (double)w->tolerance / KEEL_TOLERANCE_SCALE;
    keel_ratio lift = keel_measure_lift(w, sol->nurse_of);
    long long near_deadline = keel_budget_until(KEEL_SHARE_NEAR, keel_budget_now(), deadline_ms, 0);
    keel_status rc = follow_near(w, exact, level, near_deadline, sol, err);
    if (rc)
        return rc;
    long long kept = w->ncontinuity > 0 ? keel_measure_kept(w, sol->nurse_of) : 0;
    long long most_near = -1;
    if (w->nzones > 0 || w->nrooms > 0) {
        long long zones, rooms;
        keel_measure_spread(w, sol->nurse_of, &zones, &rooms);
        most_near = ((long long)w->npatients + 1) * zones + rooms;
    }
    return keel_stage_history(w, history, exact, level, lift, kept, most_near, deadline_ms,
                              sol->nurse_of, &sol->stages[sol->nstages++], err);
}

/* Stages 1 and 2 from a valid incumbent in s->nurse_of: a second starting
 * plan and the zone polish first, when the method has them. */
static keel_status balance(const keel_workload *w, const keel_method *method,
                           long long balance_deadline, long long deadline, keel_solution *s,
                           keel_ratio *level, keel_error *err)
{
    keel_status rc = keel_heur_greedy_improve(w, s->nurse_of, balance_deadline);
    if (rc)
        return keel_error_add(err, rc, NULL, 0, 0, NULL, "out of memory");
    if (method->second_start && w->joined_rules &&
        (rc = second_start(w, deadline, s->nurse_of, err)))
        return rc;
    /* On a large pooled unit with one zone per nurse, each zone alone. */
    if (method->polish && w->zones_rule && w->npatients > POLISH_FROM) {
        rc = keel_zone_polish(
            w, keel_budget_until(KEEL_SHARE_POLISH, keel_budget_now(), balance_deadline, 0),
            s->nurse_of, err);
        if (rc)
            return rc;
    }
    return keel_stage_balance(w, method->exact, balance_deadline, s, level, err);
}

keel_status keel_solve(const keel_roster *roster, const keel_workload *w,
                       const keel_solve_options *options, keel_solution **out, keel_error *err)
{
    keel_status rc = KEEL_OK;
    keel_ratio *level = NULL; /* each counted nurse's ceiling after the balance stages */
    long long started = keel_budget_now();
    const char *name = options && options->method ? options->method : "ilp";
    long limit =
        options && options->time_limit_ms > 0 ? options->time_limit_ms : KEEL_BUDGET_DEFAULT_MS;
    const keel_method *method = find_method(name);
    *out = NULL;
    if (!method)
        return keel_error_add(err, KEEL_ERR_USAGE, NULL, 0, 0, NULL,
                              "unknown method '%s'; expected ilp or greedy", name);

    keel_solution *s = keel_calloc(1, sizeof *s);
    if (!s)
        return keel_error_add(err, KEEL_ERR_NOMEM, NULL, 0, 0, NULL, "out of memory");
    keel_lp_set_memory(options ? options->solver_memory_mb : 0);
    s->method = method->name;
    s->npatients = w->npatients;
    s->nurse_of = keel_calloc(w->npatients, sizeof *s->nurse_of);
    level = keel_calloc(w->nnurses ? w->nnurses : 1, sizeof *level);
    if (!s->nurse_of || !level) {
        rc = keel_error_add(err, KEEL_ERR_NOMEM, NULL, 0, 0, NULL, "out of memory");
        goto out;
    }

    bool feasible = false;
    rc = keel_feas_hall(roster, w, s->nurse_of, &feasible, &s->diagnoses);
    if (rc) {
        keel_error_add(err, rc, NULL, 0, 0, NULL, "out of memory");
        goto out;
    }
    long long deadline = started + limit;
    if (!feasible)
        goto infeasible;
    /* The later stages, when they apply, get the last part of the time. */
    const double *history = options ? options->history : NULL;
    bool follows = w->ncontinuity > 0 || w->nzones > 0 || w->nrooms > 0 || history;
    long long balance_deadline =
        follows ? keel_budget_until(KEEL_SHARE_BALANCE, started, deadline, 0) : deadline;
    bool by_zone = false;
    if (method->zones_first && keel_zone_solve_applies(w)) {
        rc = keel_zone_solve(w, balance_deadline, s, &by_zone, err);
        if (rc)
            goto out;
    }
    if (!by_zone) {
        keel_answer answer;
        rc = incumbent(w, deadline, s->nurse_of, &answer, err);
        if (rc)
            goto out;
        if (answer == KEEL_ANSWER_NO) {
            rc = keel_feas_conflict(roster, w, deadline, &s->diagnoses, err);
            if (rc)
                goto out;
            goto infeasible;
        }
        if (answer != KEEL_ANSWER_YES) {
            rc = keel_error_add(err, KEEL_ERR_SOLVER, NULL, 0, 0, NULL,
                                "within the time limit, keel found no assignment that keeps "
                                "every rule and could not show why none exists; try a longer "
                                "--time-limit");
            goto out;
        }
        rc = balance(w, method, balance_deadline, deadline, s, level, err);
        if (rc)
            goto out;
    } else {
        keel_ratio peak = keel_measure_peak(w, s->nurse_of);
        for (size_t n = 0; n < w->nnurses; n++)
            level[n] = peak;
    }
    if (w->balance == KEEL_BALANCE_PEAK && keel_bound_words(roster, w, s->stages[0].bound, s)) {
        rc = keel_error_add(err, KEEL_ERR_NOMEM, NULL, 0, 0, NULL, "out of memory");
        goto out;
    }
    rc = follow(w, history, method->exact, level, deadline, s, err);
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
        rc = keel_answer_severity_plan(roster, w, deadline, s->nurse_of, &found, &s->severity,
                                       &proven, err);
        s->best_effort = !rc && found;
        if (!s->best_effort)
            for (size_t p = 0; p < w->npatients; p++)
                s->nurse_of[p] = -1;
    }
out:
    free(level);
    keel_lp_set_memory(0);
    s->seconds = (double)(keel_budget_now() - started) / 1000.0;
    if (rc)
        keel_solution_free(s);
    else
        *out = s;
    return rc;
}
