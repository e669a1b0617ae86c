/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * rebalance.c - the hand-off frontier (keel/rebalance.h), an orchestrator
 * beside solve.c: it derives the roster's workload with each patient's
 * current nurse in place of the previous one, then solves option k = 0, 1,
 * ... with the stages in the order of objectives, every question carrying
 * the budget "at least (present patients not forced) - k patients kept with
 * their current nurse" (stage_search.h, answer.h).
 *
 * Invariants: option k's plan keeps every rule and makes at most k
 * hand-offs besides the forced moves; it starts from option k - 1's plan,
 * so its heaviest utilisation is never above that of option k - 1.
 */
#include "keel/rebalance.h"

#include <stdlib.h>
#include <string.h>

#include "alloc.h"
#include "answer.h"
#include "budget.h"
#include "measure.h"
#include "rebalance_at.h"
#include "rule.h"
#include "tally.h"
#include "stage.h"
#include "stage_search.h"
#include "workload_internal.h"

void keel_rebalance_free(keel_rebalance *rb)
{
    if (!rb)
        return;
    for (size_t k = 0; rb->options && k < rb->noptions; k++) {
        keel_rebalance_option *o = &rb->options[k];
        keel_solution_free(o->solution);
        free(o->moves);
        free(o->forced);
        free(o->placed);
    }
    free(rb->options);
    keel_workload_free(rb->workload);
    keel_roster_free(rb->rest);
    free(rb->index);
    free(rb);
}

int keel_rebalance_nurse(const keel_rebalance *rb, const keel_rebalance_option *option, size_t p)
{
    const keel_workload *w = rb->workload;
    if (!option->found || p >= w->npeople || w->first_part[p] == w->first_part[p + 1])
        return -1;
    return option->solution->nurse_of[w->first_part[p]];
}

/* Roster patient p's nurse now: its index, -1 for a nurse not on the
 * roster; *present says whether p has one at all. */
static int current(const keel_roster *r, size_t p, bool *present)
{
    const keel_patient *pt = &r->patients[p];
    *present = pt->nurse && !pt->expected;
    return *present ? keel_roster_find_nurse(r, pt->nurse) : -1;
}

/* True when present patient p must leave its nurse now. */
static bool forced(const keel_roster *r, const keel_workload *w, size_t p)
{
    bool present;
    int n = current(r, p, &present);
    int q = w->first_part[p];
    return present && q < w->first_part[p + 1] &&
           (n < 0 || !keel_workload_eligible(w, (size_t)q, (size_t)n));
}

/* The workload of the rebalance: continuity is with the current nurse, at
 * zero tolerance.  *keepable counts the present patients not forced. */
static keel_status derive(const keel_roster *r, keel_rebalance *rb, long long *keepable,
                          keel_error *err)
{
    keel_status rc = keel_workload_compute(r, &rb->workload, err);
    if (rc)
        return rc;
    keel_workload *w = rb->workload;
    if (w->balance == KEEL_BALANCE_SQUARES)
        return keel_error_add(err, KEEL_ERR_USAGE, NULL, 0, 0, NULL,
                              "keel rebalance balances the heaviest utilisation; a roster with "
                              "policy.balance: squares cannot be rebalanced yet");
    for (size_t q = 0; q < w->npatients; q++)
        w->previous[q] = -1;
    w->ncontinuity = 0;
    w->tolerance = 0;
    *keepable = 0;
    for (size_t p = 0; p < w->npeople; p++) {
        bool present;
        int n = current(r, p, &present), q = w->first_part[p];
        if (q == w->first_part[p + 1])
            continue;
        rb->npresent += present;
        rb->nnew += !present;
        w->previous[q] = n;
        w->ncontinuity += n >= 0;
        *keepable += present && !forced(r, w, p);
    }
    return KEEL_OK;
}

/* The greedy start: every patient who keeps her nurse with her (each later
 * part too while that nurse is on), then the others heaviest first, each to
 * the eligible nurse the rules admit whose utilisation after is lowest.
 * *placed is false when one found no nurse.  Statuses: KEEL_OK,
 * KEEL_ERR_NOMEM. */
static keel_status greedy_start(const keel_workload *w, int *nurse_of, bool *placed)
{
    size_t np = w->npatients, nn = w->nnurses;
    size_t *order = keel_malloc((np ? np : 1) * sizeof *order);
    keel_tally t;
    keel_status rc = keel_tally_init(&t, w);
    *placed = false;
    if (!rc && (!order || keel_workload_order(w, order)))
        rc = KEEL_ERR_NOMEM;
    if (rc)
        goto out;
    for (size_t q = 0; q < np; q++) {
        int v = w->previous[q];
        bool first = w->first_part[w->patient[q]] == (int)q;
        nurse_of[q] = first ? (v >= 0 && keel_workload_eligible(w, q, (size_t)v) ? v : -1)
                      : keel_workload_keeps(w, q, nurse_of[q - 1]) ? nurse_of[q - 1]
                                                                  : -1;
    }
    keel_tally_fill(&t, nurse_of);
    *placed = true;
    for (size_t i = 0; i < np && *placed; i++) {
        size_t q = order[i];
        if (nurse_of[q] >= 0)
            continue;
        int best = -1;
        keel_ratio lowest = {0, 1};
        for (size_t n = 0; n < nn; n++) {
            if (!keel_workload_counted(w, n) || !keel_workload_eligible(w, q, n) ||
                !keelRuleAdmits(&t, q, n))
                continue;
            keel_ratio u = {w->duty_minutes[n] + t.care[n] + w->care_minutes[q],
                            w->capacity_minutes[n]};
            if (best < 0 || keel_ratio_cmp(u, lowest) < 0) {
                best = (int)n;
                lowest = u;
            }
        }
        *placed = best >= 0;
        if (best >= 0) {
            nurse_of[q] = best;
            keel_tally_add(&t, q, (size_t)best);
        }
    }
out:
    keel_tally_free(&t);
    free(order);
    return rc;
}

/* The first plan within the budget: the greedy start when it places
 * everyone within every rule and the budget, else GLPK on the bare question
 * with the budget's row.  *answer says whether there is one. */
static keel_status first_plan(const keel_workload *w, long long min_kept, long long deadline_ms,
                              int *nurse_of, keel_answer *answer, keel_error *err)
{
    size_t nn = w->nnurses;
    long long *lo = keel_calloc(nn ? nn : 1, sizeof *lo), *hi = keel_calloc(nn ? nn : 1, sizeof *hi);
    keel_status rc = KEEL_OK;
    *answer = KEEL_ANSWER_UNKNOWN;
    if (!lo || !hi) {
        rc = keel_error_add(err, KEEL_ERR_NOMEM, NULL, 0, 0, NULL, "out of memory");
        goto out;
    }
    long long total = 0;
    for (size_t p = 0; p < w->npatients; p++)
        total += w->care_minutes[p];
    for (size_t n = 0; n < nn; n++)
        hi[n] = total;
    bool placed = false, valid = false;
    if ((rc = greedy_start(w, nurse_of, &placed)) ||
        (placed && (rc = keel_measure_validate(w, nurse_of, &valid)))) {
        rc = keel_error_add(err, rc, NULL, 0, 0, NULL, "out of memory");
        goto out;
    }
    if (valid && keel_measure_kept(w, nurse_of) >= min_kept) {
        *answer = KEEL_ANSWER_YES;
        goto out;
    }
    keel_question q = {.w = w, .lo = lo, .hi = hi, .min_kept = min_kept};
    rc = keel_answer_ilp(&q, deadline_ms, nurse_of, answer, err);
out:
    free(lo);
    free(hi);
    return rc;
}

/* Continuity with the current nurse, then proximity, at zero tolerance
 * around the option's peak (an option has no stage "ranks"): continuity
 * gets its share of the time when proximity follows. */
static keel_status follow(const keel_workload *w, long long deadline_ms, keel_solution *s,
                          keel_error *err)
{
    bool near = w->nzones > 0 || w->nrooms > 0;
    keel_ratio lift = keel_measure_lift(w, s->nurse_of);
    keel_ratio *level = keel_calloc(w->nnurses ? w->nnurses : 1, sizeof *level);
    if (!level)
        return keel_error_add(err, KEEL_ERR_NOMEM, NULL, 0, 0, NULL, "out of memory");
    keel_ratio peak = keel_measure_peak(w, s->nurse_of);
    for (size_t n = 0; n < w->nnurses; n++)
        level[n] = peak;
    long long kept = keel_measure_kept(w, s->nurse_of);
    keel_status rc = KEEL_OK;
    if (w->ncontinuity > 0) {
        long long until = near ? keel_budget_until(KEEL_SHARE_KEEP, keel_budget_now(),
                                                   deadline_ms, 0)
                               : deadline_ms;
        rc = keel_stage_keep(w, true, level, lift, until, s->nurse_of, &s->stages[s->nstages++], s,
                             &kept, err);
    }
    if (!rc && near)
        rc = keel_stage_near(w, true, level, lift, kept, deadline_ms, s->nurse_of,
                             &s->stages[s->nstages++], s, err);
    if (!rc && w->ncontinuity > 0)
        s->continuity.kept = (long)keel_measure_kept(w, s->nurse_of);
    free(level);
    return rc;
}

/* Stages 1 and 2 under the budget, then the stages that follow. */
static keel_status stages(const keel_workload *w, long long min_kept, long long started,
                          long long deadline_ms, keel_solution *s, keel_error *err)
{
    bool follows = w->ncontinuity > 0 || w->nzones > 0 || w->nrooms > 0;
    long long balance_deadline =
        follows ? keel_budget_until(KEEL_SHARE_BALANCE, started, deadline_ms, 0) : deadline_ms;
    keel_search *S = keel_stage_search_new(w);
    if (!S)
        return keel_error_add(err, KEEL_ERR_NOMEM, NULL, 0, 0, NULL, "out of memory");
    S->min_kept = min_kept;
    s->nstages = 2;
    long long peak_deadline =
        keel_budget_until(KEEL_SHARE_PEAK, keel_budget_now(), balance_deadline, 0);
    keel_status rc = keel_stage_peak(S, true, peak_deadline, s->nurse_of, &s->stages[0], err);
    if (!rc)
        rc = keel_stage_lift(S, true, balance_deadline, s->nurse_of, &s->stages[1], err);
    keel_stage_search_free(S);
    if (!rc)
        rc = follow(w, deadline_ms, s, err);
    s->status = KEEL_SOLVE_OPTIMAL;
    for (size_t i = 0; i < s->nstages; i++)
        if (s->stages[i].status > s->status)
            s->status = s->stages[i].status;
    return rc;
}

/* Adds a move to a list of at most npeople. */
static void add_move(keel_rebalance_move *list, size_t *n, size_t p, int from, int to)
{
    list[(*n)++] = (keel_rebalance_move){.patient = p, .from = from, .to = to};
}

/* The option's moves, forced moves and placements, and its figures. */
static keel_status describe(const keel_roster *r, const keel_rebalance *rb,
                            keel_rebalance_option *o)
{
    const keel_workload *w = rb->workload;
    size_t np = w->npeople ? w->npeople : 1;
    o->moves = keel_calloc(np, sizeof *o->moves);
    o->forced = keel_calloc(np, sizeof *o->forced);
    o->placed = keel_calloc(np, sizeof *o->placed);
    if (!o->moves || !o->forced || !o->placed)
        return KEEL_ERR_NOMEM;
    if (!o->found)
        return KEEL_OK;
    for (size_t p = 0; p < w->npeople; p++) {
        bool present;
        int from = current(r, p, &present), to = keel_rebalance_nurse(rb, o, p);
        if (to < 0)
            continue;
        if (!present)
            add_move(o->placed, &o->nplaced, p, -1, to);
        else if (forced(r, w, p))
            add_move(o->forced, &o->nforced, p, from, to);
        else if (to != from)
            add_move(o->moves, &o->nmoves, p, from, to);
    }
    o->max_utilisation = keel_ratio_value(keel_measure_peak(w, o->solution->nurse_of));
    o->min_utilisation = keel_ratio_value(keel_measure_lift(w, o->solution->nurse_of));
    o->bound = o->solution->stages[0].bound;
    o->gap = o->solution->stages[0].gap;
    return KEEL_OK;
}

/* Option k: from the plan of option k - 1 (prev, NULL when it has none),
 * else from the first plan within the budget. */
static keel_status solve_option(const keel_roster *r, keel_rebalance *rb, size_t k,
                                long long keepable, const int *prev, long long deadline_ms,
                                keel_error *err)
{
    const keel_workload *w = rb->workload;
    keel_rebalance_option *o = &rb->options[k];
    long long started = keel_budget_now();
    long long min_kept = keepable > (long long)k ? keepable - (long long)k : 0;
    o->handoffs = (int)k;
    keel_solution *s = o->solution = keel_calloc(1, sizeof *s);
    if (!s || !(s->nurse_of = keel_calloc(w->npatients ? w->npatients : 1, sizeof *s->nurse_of)))
        return keel_error_add(err, KEEL_ERR_NOMEM, NULL, 0, 0, NULL, "out of memory");
    s->method = "ilp";
    s->npatients = w->npatients;
    keel_status rc = KEEL_OK;
    o->found = true;
    if (prev) {
        memcpy(s->nurse_of, prev, w->npatients * sizeof *prev);
    } else {
        keel_answer answer;
        rc = first_plan(w, min_kept, deadline_ms, s->nurse_of, &answer, err);
        if (rc)
            return rc;
        if (answer != KEEL_ANSWER_YES) {
            o->found = false;
            s->status = answer == KEEL_ANSWER_NO ? KEEL_SOLVE_INFEASIBLE : KEEL_SOLVE_TIME_LIMIT;
            for (size_t q = 0; q < w->npatients; q++)
                s->nurse_of[q] = -1;
        }
    }
    if (o->found)
        rc = stages(w, min_kept, started, deadline_ms, s, err);
    if (!rc && describe(r, rb, o))
        rc = keel_error_add(err, KEEL_ERR_NOMEM, NULL, 0, 0, NULL, "out of memory");
    s->seconds = (double)(keel_budget_now() - started) / 1000.0;
    return rc;
}

/* With --at: the roster of the rest of the shift becomes the frontier's. */
static keel_status rest_of_shift(const keel_roster *r, keel_rebalance *rb, keel_error *err)
{
    int day = 24 * 60;
    if (r->shift.start_minute == KEEL_ABSENT)
        return keel_error_add(err, KEEL_ERR_USAGE, NULL, 0, 0, NULL,
                              "--at needs the shift's start (shift.start in the roster)");
    int t = ((rb->at_minute - r->shift.start_minute) % day + day) % day;
    if (t <= 0 || t >= r->shift.minutes) {
        int end = (r->shift.start_minute + r->shift.minutes) % day;
        return keel_error_add(err, KEEL_ERR_USAGE, NULL, 0, 0, NULL,
                              "--at %02d:%02d is not inside the shift, which runs from %02d:%02d "
                              "to %02d:%02d",
                              rb->at_minute / 60, rb->at_minute % 60,
                              r->shift.start_minute / 60, r->shift.start_minute % 60, end / 60,
                              end % 60);
    }
    for (size_t p = 0; p < r->npatients; p++) {
        const keel_patient *pt = &r->patients[p];
        int end = pt->nrecord ? pt->record[pt->nrecord - 1].to : 0;
        if (end <= t)
            continue;
        int clock = (r->shift.start_minute + end) % day;
        return keel_error_add(err, KEEL_ERR_USAGE, NULL, 0, 0, NULL,
                              "--at %02d:%02d is before %02d:%02d, where the record of %s ends "
                              "(the time of the last rebalance); expected a time from then on",
                              rb->at_minute / 60, rb->at_minute % 60, clock / 60, clock % 60,
                              pt->id);
    }
    rb->at_offset = t;
    keel_workload *w = NULL;
    keel_status rc = keel_workload_compute(r, &w, err);
    if (!rc)
        rc = keel_rebalance_at(r, w, t, &rb->rest, &rb->discharged, rb->index, err);
    keel_workload_free(w);
    return rc;
}

/* Without a time: the roster as given, or without its records. */
static keel_status as_given(const keel_roster *r, keel_rebalance *rb, keel_error *err)
{
    bool recorded = false;
    for (size_t p = 0; p < r->npatients; p++) {
        rb->index[p] = (int)p;
        recorded = recorded || r->patients[p].nrecord > 0;
    }
    if (!recorded)
        return KEEL_OK;
    return keel_rebalance_at_unrecorded(r, &rb->rest, &rb->discharged, rb->index, err);
}

/* The smallest k within min_gain of the lowest heaviest utilisation. */
static int recommend(const keel_rebalance *rb)
{
    double best = 0.0;
    bool any = false;
    for (size_t k = 0; k < rb->noptions; k++) {
        const keel_rebalance_option *o = &rb->options[k];
        if (o->found && (!any || o->max_utilisation < best))
            best = o->max_utilisation;
        any = any || o->found;
    }
    for (size_t k = 0; k < rb->noptions; k++)
        if (rb->options[k].found && rb->options[k].max_utilisation <= best + rb->min_gain + 1e-9)
            return (int)k;
    return -1;
}

/* OPTIMAL when every option is proven, INFEASIBLE when none has a plan. */
static keel_solve_status overall(const keel_rebalance *rb)
{
    keel_solve_status st = KEEL_SOLVE_OPTIMAL;
    for (size_t k = 0; k < rb->noptions; k++) {
        keel_solve_status s = rb->options[k].solution->status;
        if (s != KEEL_SOLVE_OPTIMAL && s != KEEL_SOLVE_INFEASIBLE)
            st = KEEL_SOLVE_TIME_LIMIT;
    }
    return rb->recommended < 0 ? KEEL_SOLVE_INFEASIBLE : st;
}

keel_status keel_rebalance_run(const keel_roster *roster, const keel_rebalance_options *options,
                               keel_rebalance **out, keel_error *err)
{
    long long started = keel_budget_now();
    long limit = options && options->time_limit_ms > 0 ? options->time_limit_ms
                                                        : KEEL_BUDGET_DEFAULT_MS;
    int most = options && options->max_handoffs >= 0 ? options->max_handoffs
                                                     : KEEL_REBALANCE_MAX_HANDOFFS;
    *out = NULL;
    keel_rebalance *rb = keel_calloc(1, sizeof *rb);
    if (!rb)
        return keel_error_add(err, KEEL_ERR_NOMEM, NULL, 0, 0, NULL, "out of memory");
    rb->min_gain = options && options->min_gain >= 0 ? options->min_gain : KEEL_REBALANCE_MIN_GAIN;
    rb->noptions = (size_t)most + 1;
    rb->at_minute = options && options->at ? options->at_minute : -1;
    rb->at_offset = -1;
    rb->shift = roster;
    keel_status rc = KEEL_OK;
    if (!(rb->index = keel_calloc(roster->npatients ? roster->npatients : 1, sizeof *rb->index)))
        rc = keel_error_add(err, KEEL_ERR_NOMEM, NULL, 0, 0, NULL, "out of memory");
    else
        rc = rb->at_minute >= 0 ? rest_of_shift(roster, rb, err) : as_given(roster, rb, err);
    if (rc)
        goto out;
    rb->roster = rb->rest ? rb->rest : roster;
    roster = rb->roster;
    long long keepable = 0;
    rc = derive(roster, rb, &keepable, err);
    if (rc)
        goto out;
    rb->options = keel_calloc(rb->noptions, sizeof *rb->options);
    if (!rb->options) {
        rc = keel_error_add(err, KEEL_ERR_NOMEM, NULL, 0, 0, NULL, "out of memory");
        goto out;
    }
    long long deadline = started + limit;
    const int *prev = NULL;
    for (size_t k = 0; !rc && k < rb->noptions; k++) {
        long long until =
            keel_budget_until(KEEL_SHARE_FRONTIER, keel_budget_now(), deadline, rb->noptions - k);
        rc = solve_option(roster, rb, k, keepable, prev, until, err);
        prev = rb->options[k].found ? rb->options[k].solution->nurse_of : NULL;
    }
    if (rc)
        goto out;
    rb->recommended = recommend(rb);
    rb->status = overall(rb);
out:
    rb->seconds = (double)(keel_budget_now() - started) / 1000.0;
    if (rc)
        keel_rebalance_free(rb);
    else
        *out = rb;
    return rc;
}
