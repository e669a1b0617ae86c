/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * answer_ilp.c - the integer programme of the window question and of the
 * goals the later stages ask (continuity, proximity, least squares),
 * solved by GLPK through lp.h.
 *
 * Patients that no rule tells apart (same care minutes, same eligible
 * nurses, alike to every rule, keelRuleOrder(); for continuity the same
 * previous nurse, for proximity the same zone and room) form one class with
 * an integer count y[c, n] per nurse instead of one binary per patient and
 * nurse; sum_n y[c, n] = |c|.  Per counted nurse n:
 *
 *   lo(n) <= sum_c care(c) y[c, n] <= hi(n)
 *   the rows of every rule (rule_*.c), kept, over n's columns: at each
 *   moment for the rules that count what she holds (with her break cover's
 *   columns for break_cover), once for her shift
 *
 * With the clock a part of a patient cut into several is a class of its
 * own.  A hand-off budget (the question's min_kept, a rebalance's) is one
 * row: at least min_kept patients with their previous nurse; classes then
 * also share the previous nurse, and nurses are not interchangeable.
 * Continuity maximises the patients with their previous nurse;
 * proximity minimises (census + 1) sum z + sum g over zone and room
 * binaries, which puts zones before rooms (without the clock the zones
 * rule's own binaries carry the zone price).  Fairness forward (HISTORY)
 * minimises sum_n weight(n) care(c) y[c, n] / capacity(n) over counted
 * nurses (plus the constant of their duty) and holds proximity's sum, at
 * its prices, in one row instead.  Counted nurses that are
 * interchangeable (same capacity, duty, rules and window) are asked, in the
 * feasibility and squares questions, for loads in non-increasing order,
 * which removes their symmetric copies.
 */
#include <limits.h>
#include <math.h>
#include <stdlib.h>
#include <string.h>

#include "alloc.h"
#include "answer.h"
#include "budget.h"
#include "lp.h"
#include "measure.h"
#include "rule.h"

typedef struct model {
    const keel_workload *w;
    const keel_question *q;
    keel_goal goal;
    long long min_kept;
    size_t nclasses;
    size_t *class_of;    /* [npatients] */
    size_t *class_size;  /* [nclasses] */
    size_t *class_first; /* [nclasses]: a member */
    int *col;            /* [nclasses * nnurses]: column of y[c, n], or 0 */
    int *next_twin;      /* [nnurses]: the next interchangeable nurse, or -1 */
    int *left;           /* [nclasses * nnurses]: members still to hand out */
    int ny;              /* columns 1..ny are the y */
    keel_lp *lp;
    int *seg_first;      /* [nnurses]: SQUARES: first column of n's unit segments, or 0 */
    int *seg_count;      /* [nnurses]: how many */
    double squares_zero; /* SQUARES: sum of duty^2 / capacity, the objective's constant */
    double history_zero; /* HISTORY: sum of weight x duty / capacity, the objective's constant */
    int near_row;        /* HISTORY with proximity held: its row, else 0 */
    /* The columns of one nurse, for the rules' rows (keel_rows). */
    int *rcol;
    size_t *rpart;
    double *rmost;
    int *ocol; /* another nurse's columns, for the UNIT rules' rows */
} model;

/* True when part p is its patient's only part. */
static bool alone(const keel_workload *w, size_t p)
{
    int pt = w->patient[p];
    return w->first_part[pt + 1] - w->first_part[pt] == 1;
}

/* True when the model counts proximity: the NEAR goal minimises it, the
 * HISTORY goal holds it. */
static bool near_counted(const model *m)
{
    return m->goal == KEEL_GOAL_NEAR || (m->goal == KEEL_GOAL_HISTORY && m->q->most_near >= 0);
}

static bool same_patients(const model *m, size_t a, size_t b)
{
    const keel_workload *w = m->w;
    keel_goal goal = m->goal;
    return w->care_minutes[a] == w->care_minutes[b] && keelRuleOrder(w, a, b) == 0 &&
           (!near_counted(m) || (w->zone[a] == w->zone[b] && w->room[a] == w->room[b])) &&
           ((goal == KEEL_GOAL_FIT && m->min_kept <= 0) || w->previous[a] == w->previous[b]) &&
           (!w->clocked ||
            (alone(w, a) && alone(w, b) && w->first_moment[a] == w->first_moment[b] &&
             w->last_moment[a] == w->last_moment[b])) &&
           memcmp(&w->eligible[a * w->nnurses], &w->eligible[b * w->nnurses],
                  w->nnurses * sizeof *w->eligible) == 0;
}

static bool same_nurses(const model *m, size_t a, size_t b)
{
    const keel_workload *w = m->w;
    const long long *lo = m->q->lo, *hi = m->q->hi;
    return w->capacity_minutes[a] == w->capacity_minutes[b] &&
           w->duty_minutes[a] == w->duty_minutes[b] && lo[a] == lo[b] && hi[a] == hi[b] &&
           keelRuleSameNurses(w, a, b);
}

static void group(model *m)
{
    const keel_workload *w = m->w;
    m->nclasses = 0;
    for (size_t p = 0; p < w->npatients; p++) {
        size_t c;
        for (c = 0; c < m->nclasses; c++)
            if (same_patients(m, m->class_first[c], p))
                break;
        if (c == m->nclasses) {
            m->class_first[c] = p;
            m->class_size[c] = 0;
            m->nclasses++;
        }
        m->class_of[p] = c;
        m->class_size[c]++;
    }
    for (size_t n = 0; n < w->nnurses; n++) {
        m->next_twin[n] = -1;
        /* A hand-off budget tells nurses apart by whom they keep. */
        if (!keel_workload_counted(w, n) ||
            (m->goal != KEEL_GOAL_FIT && m->goal != KEEL_GOAL_SQUARES) || m->min_kept > 0)
            continue;
        for (size_t k = n + 1; k < w->nnurses; k++) {
            if (keel_workload_counted(w, k) && same_nurses(m, n, k)) {
                m->next_twin[n] = (int)k;
                break;
            }
        }
    }
}

/* Nurse n's columns of classes covering moment mo (-1: every class) into
 * col (and, when given, a member and the class's size into part and
 * most); returns how many. */
static size_t columns(const model *m, size_t n, int mo, int *col, size_t *part, double *most)
{
    const keel_workload *w = m->w;
    size_t k = 0;
    for (size_t c = 0; c < m->nclasses; c++) {
        int j = m->col[c * w->nnurses + n];
        size_t p = m->class_first[c];
        if (!j || (mo >= 0 && (w->first_moment[p] > mo || mo >= w->last_moment[p])))
            continue;
        col[k] = j;
        if (part) {
            part[k] = p;
            most[k] = (double)m->class_size[c];
        }
        k++;
    }
    return k;
}

static size_t other_columns(const keel_rows *R, size_t n)
{
    return columns(R->model, n, R->moment, R->ocol, NULL, NULL);
}

/* Nurse n's columns of classes covering moment mo (-1: every class), for
 * the rules' rows. */
static keel_rows nurse_rows(model *m, size_t n, int mo)
{
    const keel_workload *w = m->w;
    size_t k = columns(m, n, mo, m->rcol, m->rpart, m->rmost);
    /* Proximity without the clock: the zones rule's binaries carry the zone
     * price. */
    bool near = near_counted(m) && !w->clocked;
    return (keel_rows){.lp = m->lp,
                       .w = w,
                       .n = n,
                       .moment = mo,
                       .ncols = k,
                       .col = m->rcol,
                       .part = m->rpart,
                       .most = m->rmost,
                       .census = (double)w->npatients,
                       .zone_cost = near ? (double)w->npatients + 1 : 0.0,
                       .near_row = m->near_row,
                       .others = other_columns,
                       .ocol = m->ocol,
                       .model = m};
}

static int zone_of(const keel_workload *w, size_t p)
{
    return w->zone[p];
}

static int room_of(const keel_workload *w, size_t p)
{
    return w->room[p];
}

/* Proximity's zone and room binaries of nurse n over R's columns (with the
 * clock over her whole shift, big the census; without it the zones rule
 * adds the zone binaries at each moment and only rooms come here). */
static void add_proximity(const keel_rows *R, bool zones, double big)
{
    const keel_workload *w = R->w;
    for (size_t k = 0; zones && k < w->nzones; k++)
        keelRuleTie(R, zone_of, (int)k, big, (double)w->npatients + 1);
    for (size_t k = 0; k < w->nrooms; k++)
        keelRuleTie(R, room_of, (int)k, big, 1.0);
}

/* The least squares: care(n) = sum of unit segments s[n, k] in [0, 1], the
 * k-th costing f(k) - f(k - 1) with f(x) = (duty + x)^2 / capacity.  f is
 * convex, so the segments fill in order and the cost is f(care) - f(0),
 * exact at whole minutes. */
static void add_squares(model *m, size_t n)
{
    const keel_workload *w = m->w;
    size_t nn = w->nnurses;
    long long most = 0;
    for (size_t c = 0; c < m->nclasses; c++)
        if (m->col[c * nn + n])
            most += (long long)m->class_size[c] * w->care_minutes[m->class_first[c]];
    if (m->q->hi[n] < most)
        most = m->q->hi[n];
    if (w->max_care[n] < most)
        most = w->max_care[n];
    double d = w->duty_minutes[n], cap = w->capacity_minutes[n];
    m->squares_zero += d * d / cap;
    if (most <= 0)
        return;
    int row = keel_lp_row(m->lp, KEEL_LP_FX, 0.0, 0.0);
    for (size_t c = 0; c < m->nclasses; c++)
        if (m->col[c * nn + n])
            keel_lp_put(m->lp, row, m->col[c * nn + n],
                        (double)w->care_minutes[m->class_first[c]]);
    for (int k = 1; k <= (int)most; k++) {
        int j = keel_lp_col(m->lp, KEEL_LP_CONTINUOUS, 0.0, 1.0, (2.0 * (d + k) - 1.0) / cap);
        if (k == 1)
            m->seg_first[n] = j;
        keel_lp_put(m->lp, row, j, -1.0);
    }
    m->seg_count[n] = (int)most;
}

static void build(model *m)
{
    const keel_workload *w = m->w;
    const keel_question *q = m->q;
    keel_lp *lp = m->lp;
    size_t nn = w->nnurses;
    group(m);
    /* The y columns first (1..ny), so a start can be given by column. */
    for (size_t c = 0; c < m->nclasses; c++) {
        for (size_t n = 0; n < nn; n++) {
            size_t p = m->class_first[c];
            m->col[c * nn + n] = 0;
            if (!keel_workload_eligible(w, p, n))
                continue;
            size_t most = m->class_size[c];
            if ((size_t)w->max_patients[n] < most)
                most = (size_t)w->max_patients[n];
            double cost = m->goal == KEEL_GOAL_KEEP && w->previous[p] == (int)n ? 1.0 : 0.0;
            if (m->goal == KEEL_GOAL_HISTORY && keel_workload_counted(w, n))
                cost = q->weight[n] * (double)w->care_minutes[p] / w->capacity_minutes[n];
            int j = keel_lp_col(lp, KEEL_LP_INTEGER, 0.0, (double)most, cost);
            m->col[c * nn + n] = j;
            m->ny = j;
        }
    }
    if (m->goal == KEEL_GOAL_HISTORY && q->most_near >= 0)
        m->near_row = keel_lp_row(lp, KEEL_LP_UP, 0.0, (double)q->most_near);
    for (size_t n = 0; m->goal == KEEL_GOAL_HISTORY && n < nn; n++)
        if (keel_workload_counted(w, n))
            m->history_zero += q->weight[n] * (double)w->duty_minutes[n] / w->capacity_minutes[n];
    for (size_t c = 0; c < m->nclasses; c++) {
        double size = (double)m->class_size[c];
        int row = keel_lp_row(lp, KEEL_LP_FX, size, size);
        for (size_t n = 0; n < nn; n++)
            keel_lp_put(lp, row, m->col[c * nn + n], 1.0);
    }
    for (size_t n = 0; n < nn; n++) {
        if (!keel_workload_counted(w, n))
            continue;
        int care = q->hi[n] < q->lo[n]  ? keel_lp_row(lp, KEEL_LP_FX, -1.0, -1.0) /* cannot be met */
                   : q->lo[n] == q->hi[n] ? keel_lp_row(lp, KEEL_LP_FX, (double)q->hi[n], (double)q->hi[n])
                                          : keel_lp_row(lp, KEEL_LP_DB, (double)q->lo[n],
                                                        (double)q->hi[n]);
        for (size_t c = 0; c < m->nclasses; c++)
            keel_lp_put(lp, care, m->col[c * nn + n], (double)w->care_minutes[m->class_first[c]]);
        for (size_t mo = 0; mo < w->nmoments; mo++) {
            keel_rows R = nurse_rows(m, n, w->clocked ? (int)mo : -1);
            keelRuleRows(&R, KEEL_SCOPE_MOMENT);
            keelRuleRows(&R, KEEL_SCOPE_UNIT);
            if (near_counted(m) && !w->clocked)
                add_proximity(&R, false, (double)w->max_patients[n]);
        }
        keel_rows all = nurse_rows(m, n, -1);
        keelRuleRows(&all, KEEL_SCOPE_SHIFT);
        keelRuleRows(&all, KEEL_SCOPE_CLOCK);
        if (near_counted(m) && w->clocked)
            add_proximity(&all, true, (double)w->npatients);
    }
    for (size_t n = 0; m->goal == KEEL_GOAL_SQUARES && n < nn; n++)
        if (keel_workload_counted(w, n))
            add_squares(m, n);
    /* Load order of interchangeable nurses: load(n) - load(next twin) >= 0. */
    for (size_t n = 0; n < nn; n++) {
        if (m->next_twin[n] < 0)
            continue;
        int order = keel_lp_row(lp, KEEL_LP_LO, 0.0, 0.0);
        size_t t = (size_t)m->next_twin[n];
        for (size_t c = 0; c < m->nclasses; c++) {
            double care = (double)w->care_minutes[m->class_first[c]];
            keel_lp_put(lp, order, m->col[c * nn + n], care);
            keel_lp_put(lp, order, m->col[c * nn + t], -care);
        }
    }
    if (m->min_kept > 0) {
        int row = keel_lp_row(lp, KEEL_LP_LO, (double)m->min_kept, 0.0);
        for (size_t c = 0; c < m->nclasses; c++) {
            int prev = w->previous[m->class_first[c]];
            if (prev >= 0)
                keel_lp_put(lp, row, m->col[c * nn + (size_t)prev], 1.0);
        }
    }
}

/* The start assignment as a point of the model: the y by class, each
 * indicator from its row, the unit segments of each nurse's care full.
 * NULL when memory ran out. */
static double *start_point(const model *m)
{
    const keel_workload *w = m->w;
    size_t nn = w->nnurses;
    int ncols = keel_lp_ncols(m->lp);
    double *x = keel_calloc((size_t)ncols + 1, sizeof *x);
    if (!x)
        return NULL;
    for (size_t p = 0; p < w->npatients; p++) {
        int n = m->q->start[p];
        int j = n >= 0 ? m->col[m->class_of[p] * nn + (size_t)n] : 0;
        if (j)
            x[j] += 1.0;
    }
    if (!keel_lp_fill_indicators(m->lp, x)) {
        free(x);
        return NULL;
    }
    for (size_t n = 0; m->seg_first && n < nn; n++) {
        long long care = 0;
        for (size_t p = 0; p < w->npatients; p++)
            care += m->q->start[p] == (int)n ? w->care_minutes[p] : 0;
        for (int k = 0; k < m->seg_count[n]; k++)
            x[m->seg_first[n] + k] = k < care ? 1.0 : 0.0;
    }
    return x;
}

/* Hands out each class's members by the counts of the solution. */
static void hand_out(model *m, int *nurse_of)
{
    const keel_workload *w = m->w;
    size_t nn = w->nnurses;
    for (size_t c = 0; c < m->nclasses; c++)
        for (size_t n = 0; n < nn; n++) {
            int j = m->col[c * nn + n];
            m->left[c * nn + n] = j ? (int)(keel_lp_value(m->lp, j) + 0.5) : 0;
        }
    for (size_t p = 0; p < w->npatients; p++) {
        size_t c = m->class_of[p];
        nurse_of[p] = -1;
        for (size_t n = 0; n < nn && nurse_of[p] < 0; n++) {
            if (m->left[c * nn + n] > 0) {
                m->left[c * nn + n]--;
                nurse_of[p] = (int)n;
            }
        }
    }
}

/* True when nurse_of keeps the windows of the question and its kept count
 * (the rules are checked by keel_measure_validate()). */
static bool fits(const model *m, const int *nurse_of)
{
    const keel_workload *w = m->w;
    for (size_t n = 0; n < w->nnurses; n++) {
        long long care = 0;
        for (size_t p = 0; p < w->npatients; p++)
            if (nurse_of[p] == (int)n)
                care += w->care_minutes[p];
        if (keel_workload_counted(w, n) && (care < m->q->lo[n] || care > m->q->hi[n]))
            return false;
    }
    return m->min_kept <= 0 || keel_measure_kept(w, nurse_of) >= m->min_kept;
}

static keel_status solve_model(model *m, long time_limit_ms, int *nurse_of, keel_goal_result *res,
                               keel_error *err)
{
    const keel_workload *w = m->w;
    build(m);
    if (keel_lp_nomem(m->lp))
        return keel_error_add(err, KEEL_ERR_NOMEM, NULL, 0, 0, NULL, "out of memory");
    double *start = NULL;
    if (m->q->start && !(start = start_point(m)))
        return keel_error_add(err, KEEL_ERR_NOMEM, NULL, 0, 0, NULL, "out of memory");
    keel_lp_result lr;
    keel_status rc = keel_lp_solve(m->lp, time_limit_ms, start, &lr, err);
    free(start);
    if (rc)
        return rc;
    if (lr.outcome == KEEL_LP_INFEASIBLE) {
        res->answer = KEEL_ANSWER_NO;
        return KEEL_OK;
    }
    if (lr.outcome != KEEL_LP_OPTIMAL && lr.outcome != KEEL_LP_FEASIBLE)
        return KEEL_OK;
    hand_out(m, nurse_of);
    bool valid = true;
    if (keel_measure_validate(w, nurse_of, &valid))
        return keel_error_add(err, KEEL_ERR_NOMEM, NULL, 0, 0, NULL, "out of memory");
    if (!valid || !fits(m, nurse_of))
        return keel_error_add(err, KEEL_ERR_SOLVER, NULL, 0, 0, NULL,
                              "the integer programming solver (GLPK) returned an assignment "
                              "that breaks its own constraints");
    res->answer = KEEL_ANSWER_YES;
    res->proven = lr.outcome == KEEL_LP_OPTIMAL;
    double bound = res->proven ? lr.value : lr.bound;
    /* Objectives are whole numbers: round the proven limit inwards. */
    res->bound = m->goal == KEEL_GOAL_KEEP ? (long long)floor(bound + 1e-6)
                                           : (long long)ceil(bound - 1e-6);
    res->squares_bound = m->squares_zero + bound;
    res->history_bound = m->history_zero + bound;
    if (m->goal == KEEL_GOAL_KEEP)
        res->value = keel_measure_kept(w, nurse_of);
    if (m->goal == KEEL_GOAL_NEAR) {
        keel_measure_spread(w, nurse_of, &res->value, &res->rooms);
        res->bound = res->bound / ((long long)w->npatients + 1); /* it was on (census + 1) Z + R */
    }
    return KEEL_OK;
}

keel_status keel_answer_ilp_goal(const keel_question *q, keel_goal goal, long long min_kept,
                                 long time_limit_ms, int *nurse_of, keel_goal_result *res,
                                 keel_error *err)
{
    const keel_workload *w = q->w;
    size_t np = w->npatients, nn = w->nnurses;
    *res = (keel_goal_result){.answer = KEEL_ANSWER_UNKNOWN};
    if (time_limit_ms <= 0)
        return KEEL_OK;
    model m = {.w = w, .q = q, .goal = goal,
               .min_kept = min_kept > q->min_kept ? min_kept : q->min_kept};
    m.lp = keel_lp_new(goal == KEEL_GOAL_KEEP);
    m.class_of = keel_calloc(np ? np : 1, sizeof *m.class_of);
    m.class_size = keel_calloc(np ? np : 1, sizeof *m.class_size);
    m.class_first = keel_calloc(np ? np : 1, sizeof *m.class_first);
    m.next_twin = keel_calloc(nn ? nn : 1, sizeof *m.next_twin);
    m.col = keel_calloc(np * nn > 0 ? np * nn : 1, sizeof *m.col);
    m.left = keel_calloc(np * nn > 0 ? np * nn : 1, sizeof *m.left);
    m.rcol = keel_calloc(np ? np : 1, sizeof *m.rcol);
    m.rpart = keel_calloc(np ? np : 1, sizeof *m.rpart);
    m.rmost = keel_calloc(np ? np : 1, sizeof *m.rmost);
    m.ocol = keel_calloc(np ? np : 1, sizeof *m.ocol);
    bool squares = goal == KEEL_GOAL_SQUARES;
    if (squares) {
        m.seg_first = keel_calloc(nn ? nn : 1, sizeof *m.seg_first);
        m.seg_count = keel_calloc(nn ? nn : 1, sizeof *m.seg_count);
    }
    keel_status rc;
    if (!m.lp || !m.class_of || !m.class_size || !m.class_first || !m.next_twin || !m.col ||
        !m.left || !m.rcol || !m.rpart || !m.rmost || !m.ocol ||
        (squares && (!m.seg_first || !m.seg_count)))
        rc = keel_error_add(err, KEEL_ERR_NOMEM, NULL, 0, 0, NULL, "out of memory");
    else
        rc = solve_model(&m, time_limit_ms, nurse_of, res, err);
    keel_lp_free(m.lp);
    free(m.class_of);
    free(m.class_size);
    free(m.class_first);
    free(m.next_twin);
    free(m.col);
    free(m.left);
    free(m.rcol);
    free(m.rpart);
    free(m.rmost);
    free(m.ocol);
    free(m.seg_first);
    free(m.seg_count);
    return rc;
}

keel_status keel_answer_ilp(const keel_question *q, long long deadline_ms, int *nurse_of,
                            keel_answer *answer, keel_error *err)
{
    long long left = deadline_ms - keel_budget_now();
    *answer = KEEL_ANSWER_UNKNOWN;
    if (left <= 0)
        return KEEL_OK;
    if (q->calls)
        (*q->calls)++;
    /* The question's start is the incumbent, outside the windows: GLPK gets
     * none. */
    keel_question bare = *q;
    bare.start = NULL;
    keel_goal_result res;
    keel_status rc = keel_answer_ilp_goal(&bare, KEEL_GOAL_FIT, 0,
                                          left > LONG_MAX ? LONG_MAX : (long)left, nurse_of, &res,
                                          err);
    *answer = res.answer;
    return rc;
}
