/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * solve_ilp.c - the integer programmes of the stages (with solve_best.c, the
 * only files that include glpk.h).
 *
 * One model answers every question the stages ask (keel_ilp_ask): is there
 * an assignment that keeps every hard rule with every counted nurse's care
 * inside a window, and which is best for the goal (none, continuity, or
 * proximity)?  GLPK's fatal errors are turned into KEEL_ERR_SOLVER by the
 * error hook instead of an abort, and its terminal output is off.
 */
#include <glpk.h>
#include <limits.h>
#include <math.h>
#include <setjmp.h>
#include <stdlib.h>
#include <string.h>

#include "alloc.h"
#include "solve_internal.h"
#include "ilp.h"

static void on_glpk_error(void *info)
{
    longjmp(*(jmp_buf *)info, 1);
}

/*
 * The model.  Patients that no rule tells apart (same care minutes, same
 * eligible nurses, same ratio, acuity class, isolation side and zone; for
 * continuity the same previous nurse, for proximity the same room) form one
 * class with an integer count y[c, n] per nurse instead of one binary per
 * patient and nurse.  Per counted nurse n:
 *
 *   sum_c y[c, n]                  <= limit(n)
 *   lo(n) <= sum_c care(c) y[c, n] <= hi(n)
 *   ratio r < limit(n):  sum_{c: ratio r} y[c, n] <= limit(n) a[r, n],
 *                        sum_c y[c, n] + (limit(n) - r) a[r, n] <= limit(n)
 *   high acuity:         sum_{c high} y[c, n] <= max_high_acuity
 *   isolation:           sum_{c protective} y[c, n] <= limit(n) b[n],
 *                        sum_{c infectious} y[c, n] + limit(n) b[n] <= limit(n)
 *   zones:               sum_{c in zone k} y[c, n] <= limit(n) z[k, n],
 *                        sum_k z[k, n] <= max_zones
 *   rooms (proximity):   sum_{c in room m} y[c, n] <= limit(n) g[m, n]
 *
 * with a, b, z, g binary and sum_n y[c, n] = |c|.  With the clock every
 * rule above is stated once per moment over the classes that cover it (a
 * class's parts cover the same moments), a part of a patient cut into
 * several is a class of its own, and a part keeps the nurse of the part
 * before it while she is on: y[q - 1, n] <= y[q, n].  Proximity counts
 * a nurse's zones and rooms over the whole shift.  Continuity maximises
 * the patients with their previous nurse; proximity minimises
 * (census + 1) sum z + sum g, which puts zones before rooms.  Counted nurses
 * that are interchangeable (same capacity, duty, limit, eligibility and
 * window) are asked, in the feasibility question, for loads in
 * non-increasing order, which removes their symmetric copies.
 */
typedef struct model {
    const keel_workload *w;
    const keel_ilp_question *q;
    size_t nclasses;
    size_t *class_of;    /* [npatients] */
    size_t *class_size;  /* [nclasses] */
    size_t *class_first; /* [nclasses]: a member */
    int *col;            /* [nclasses * nnurses]: column of y[c, n], or 0 */
    int *next_twin;      /* [nnurses]: the next interchangeable nurse, or -1 */
    int *left;           /* [nclasses * nnurses]: members still to hand out */
    int ny;              /* columns 1..ny are the y */
    int *link;           /* [ncols + 1]: the row that ties a binary to its y, or 0 */
    size_t nlink;
    keel_triplets mat; /* the matrix */
    bool nomem;
    double bound; /* best bound GLPK reported, when have_bound */
    bool have_bound;
    bool start_given;
    int *seg_first;      /* [nnurses]: SQUARES: first column of n's unit segments, or 0 */
    int *seg_count;      /* [nnurses]: how many */
    double squares_zero; /* SQUARES: sum of duty^2 / capacity, the objective's constant */
} model;

static int new_row(glp_prob *lp, int type, double lb, double ub)
{
    int r = glp_add_rows(lp, 1);
    glp_set_row_bnds(lp, r, type, lb, ub);
    return r;
}

/* A binary column tied to its y by row link. */
static int new_binary(model *m, glp_prob *lp, double cost, int link)
{
    int j = glp_add_cols(lp, 1);
    glp_set_col_kind(lp, j, GLP_BV);
    glp_set_obj_coef(lp, j, cost);
    int *grown = keel_reallocarray(m->link, (size_t)j + 1, sizeof *m->link);
    if (!grown) {
        m->nomem = true;
        return j;
    }
    m->link = grown;
    for (size_t k = m->nlink; k <= (size_t)j; k++)
        m->link[k] = 0;
    m->nlink = (size_t)j + 1;
    m->link[j] = link;
    return j;
}

/* True when part p is its patient's only part. */
static bool alone(const keel_workload *w, size_t p)
{
    int pt = w->patient[p];
    return w->first_part[pt + 1] - w->first_part[pt] == 1;
}

static bool same_patients(const model *m, size_t a, size_t b)
{
    const keel_workload *w = m->w;
    keel_ilp_goal goal = m->q->goal;
    bool zones = w->zones_rule || goal == KEEL_GOAL_NEAR;
    return w->care_minutes[a] == w->care_minutes[b] && w->ratio_limit[a] == w->ratio_limit[b] &&
           w->high_acuity[a] == w->high_acuity[b] &&
           (!w->isolation_rule || w->side[a] == w->side[b]) &&
           (!zones || w->zone[a] == w->zone[b]) &&
           (goal == KEEL_GOAL_FIT || w->previous[a] == w->previous[b]) &&
           (goal != KEEL_GOAL_NEAR || w->room[a] == w->room[b]) &&
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
           keel_workload_same_rules(w, a, b);
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
        if (!keel_workload_counted(w, n) ||
            (m->q->goal != KEEL_GOAL_FIT && m->q->goal != KEEL_GOAL_SQUARES))
            continue;
        for (size_t k = n + 1; k < w->nnurses; k++) {
            if (keel_workload_counted(w, k) && same_nurses(m, n, k)) {
                m->next_twin[n] = (int)k;
                break;
            }
        }
    }
}

/* Which property of class c a side rule groups by. */
typedef enum trait { TRAIT_RATIO, TRAIT_SIDE, TRAIT_ZONE, TRAIT_ROOM } trait;

static int trait_of(const model *m, size_t c, trait t)
{
    size_t p = m->class_first[c];
    switch (t) {
    case TRAIT_RATIO:
        return m->w->ratio_limit[p];
    case TRAIT_SIDE:
        return m->w->side[p];
    case TRAIT_ZONE:
        return m->w->zone[p];
    case TRAIT_ROOM:
        return m->w->room[p];
    }
    return -1;
}

/* True when class c covers moment mo (any moment when mo < 0). */
static bool covers(const model *m, size_t c, int mo)
{
    size_t p = m->class_first[c];
    return mo < 0 || (m->w->first_moment[p] <= mo && mo < m->w->last_moment[p]);
}

/* y[c, n] when class c covers moment mo, else 0. */
static int col_at(const model *m, size_t c, size_t n, int mo)
{
    return covers(m, c, mo) ? m->col[c * m->w->nnurses + n] : 0;
}

/* Row "sum of y[c, n] over classes covering moment mo (any: -1) with trait
 * value v <= big * x" for a new binary x of the given cost; returns x's
 * column, or 0 when no such class of n has the value.  A binary with a
 * cost (proximity) is also tied to each class alone, y[c, n] <= min(|c|,
 * big) x: the same integer points, but a far tighter LP bound (with the
 * sum alone, x = 1/big pays for a whole patient). */
static int tie(model *m, glp_prob *lp, size_t n, int mo, trait t, int v, double big, double cost)
{
    int row = 0;
    for (size_t c = 0; c < m->nclasses; c++) {
        int j = col_at(m, c, n, mo);
        if (!j || trait_of(m, c, t) != v)
            continue;
        if (!row)
            row = new_row(lp, GLP_UP, 0.0, 0.0);
        keel_triplets_put(&m->mat, row, j, 1.0);
    }
    if (!row)
        return 0;
    int x = new_binary(m, lp, cost, row);
    keel_triplets_put(&m->mat, row, x, -big);
    for (size_t c = 0; c < m->nclasses && cost > 0; c++) {
        int j = col_at(m, c, n, mo);
        if (!j || trait_of(m, c, t) != v)
            continue;
        double most = (double)m->class_size[c] < big ? (double)m->class_size[c] : big;
        int alone = new_row(lp, GLP_UP, 0.0, 0.0);
        keel_triplets_put(&m->mat, alone, j, 1.0);
        keel_triplets_put(&m->mat, alone, x, -most);
    }
    return x;
}

/* The rules that count n's patients at moment mo. */
static void add_rules(model *m, glp_prob *lp, size_t n, int mo)
{
    const keel_workload *w = m->w;
    double limit = w->max_patients[n];
    /* The fewest patients count over the shift (no clock: one moment). */
    double least = mo < 0 ? (double)w->min_patients[n] : 0.0;
    int count = least <= 0      ? new_row(lp, GLP_UP, 0.0, limit)
                : least < limit ? new_row(lp, GLP_DB, least, limit)
                                : new_row(lp, GLP_FX, limit, limit);
    for (size_t c = 0; c < m->nclasses; c++)
        if (col_at(m, c, n, mo))
            keel_triplets_put(&m->mat, count, col_at(m, c, n, mo), 1.0);
    /* Patient ratios tighter than the nurse's own limit. */
    for (size_t c = 0; c < m->nclasses; c++) {
        int v = trait_of(m, c, TRAIT_RATIO);
        bool first = col_at(m, c, n, mo) && v < w->max_patients[n];
        for (size_t d = 0; d < c && first; d++)
            first = !(col_at(m, d, n, mo) && trait_of(m, d, TRAIT_RATIO) == v);
        if (!first)
            continue;
        int a = tie(m, lp, n, mo, TRAIT_RATIO, v, limit, 0.0);
        int row = new_row(lp, GLP_UP, 0.0, limit);
        for (size_t d = 0; d < m->nclasses; d++)
            if (col_at(m, d, n, mo))
                keel_triplets_put(&m->mat, row, col_at(m, d, n, mo), 1.0);
        keel_triplets_put(&m->mat, row, a, limit - v);
    }
    if (w->max_high_acuity != KEEL_ABSENT) {
        int row = 0;
        for (size_t c = 0; c < m->nclasses; c++) {
            if (!col_at(m, c, n, mo) || !w->high_acuity[m->class_first[c]])
                continue;
            if (!row)
                row = new_row(lp, GLP_UP, 0.0, (double)w->max_high_acuity);
            keel_triplets_put(&m->mat, row, col_at(m, c, n, mo), 1.0);
        }
    }
    bool sides[3] = {false, false, false};
    for (size_t c = 0; c < m->nclasses; c++)
        if (col_at(m, c, n, mo))
            sides[trait_of(m, c, TRAIT_SIDE)] = true;
    if (sides[KEEL_SIDE_PROTECTIVE] && sides[KEEL_SIDE_INFECTIOUS]) {
        int b = tie(m, lp, n, mo, TRAIT_SIDE, KEEL_SIDE_PROTECTIVE, limit, 0.0);
        int row = new_row(lp, GLP_UP, 0.0, limit);
        for (size_t c = 0; c < m->nclasses; c++)
            if (col_at(m, c, n, mo) && trait_of(m, c, TRAIT_SIDE) == KEEL_SIDE_INFECTIOUS)
                keel_triplets_put(&m->mat, row, col_at(m, c, n, mo), 1.0);
        keel_triplets_put(&m->mat, row, b, limit);
    }
    /* Without the clock the zone binaries of the rule also carry the cost
     * of proximity; with it proximity has its own (add_proximity). */
    bool near = m->q->goal == KEEL_GOAL_NEAR && !w->clocked;
    if (w->zones_rule || near) {
        int row = w->max_zones != KEEL_ABSENT ? new_row(lp, GLP_UP, 0.0, (double)w->max_zones) : 0;
        for (size_t k = 0; k < w->nzones; k++) {
            int z =
                tie(m, lp, n, mo, TRAIT_ZONE, (int)k, limit, near ? (double)w->npatients + 1 : 0.0);
            if (z && row)
                keel_triplets_put(&m->mat, row, z, 1.0);
        }
    }
    for (size_t k = 0; near && k < w->nrooms; k++)
        tie(m, lp, n, mo, TRAIT_ROOM, (int)k, limit, 1.0);
}

/* Proximity with the clock: n's zones and rooms over the whole shift. */
static void add_proximity(model *m, glp_prob *lp, size_t n)
{
    const keel_workload *w = m->w;
    double big = (double)w->npatients;
    for (size_t k = 0; k < w->nzones; k++)
        tie(m, lp, n, -1, TRAIT_ZONE, (int)k, big, (double)w->npatients + 1);
    for (size_t k = 0; k < w->nrooms; k++)
        tie(m, lp, n, -1, TRAIT_ROOM, (int)k, big, 1.0);
}

/* The least squares: care(n) = sum of unit segments s[n, k] in [0, 1], the
 * k-th costing f(k) - f(k - 1) with f(x) = (duty + x)^2 / capacity.  f is
 * convex, so the segments fill in order and the cost is f(care) - f(0),
 * exact at whole minutes. */
static void add_squares(model *m, glp_prob *lp, size_t n)
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
    int row = new_row(lp, GLP_FX, 0.0, 0.0);
    for (size_t c = 0; c < m->nclasses; c++)
        if (m->col[c * nn + n])
            keel_triplets_put(&m->mat, row, m->col[c * nn + n],
                              (double)w->care_minutes[m->class_first[c]]);
    int first = glp_add_cols(lp, (int)most);
    m->seg_first[n] = first;
    m->seg_count[n] = (int)most;
    for (int k = 1; k <= (int)most; k++) {
        int j = first + k - 1;
        glp_set_col_kind(lp, j, GLP_CV);
        glp_set_col_bnds(lp, j, GLP_DB, 0.0, 1.0);
        glp_set_obj_coef(lp, j, (2.0 * (d + k) - 1.0) / cap);
        keel_triplets_put(&m->mat, row, j, -1.0);
    }
}

/* A part keeps the nurse of the part before it while she is on. */
static void add_keeping(model *m, glp_prob *lp)
{
    const keel_workload *w = m->w;
    size_t nn = w->nnurses;
    for (size_t q = 0; q < w->npatients; q++) {
        for (size_t n = 0; n < nn; n++) {
            if (!keel_workload_keeps(w, q, (int)n) || !keel_workload_eligible(w, q - 1, n))
                continue;
            int row = new_row(lp, GLP_UP, 0.0, 0.0);
            keel_triplets_put(&m->mat, row, m->col[m->class_of[q - 1] * nn + n], 1.0);
            keel_triplets_put(&m->mat, row, m->col[m->class_of[q] * nn + n], -1.0);
        }
    }
}

static void build(model *m, glp_prob *lp)
{
    const keel_workload *w = m->w;
    const keel_ilp_question *q = m->q;
    size_t nn = w->nnurses;
    group(m);
    glp_set_obj_dir(lp, q->goal == KEEL_GOAL_KEEP ? GLP_MAX : GLP_MIN);
    /* The y columns first (1..ny), so a start can be given by column. */
    for (size_t c = 0; c < m->nclasses; c++) {
        for (size_t n = 0; n < nn; n++) {
            size_t p = m->class_first[c];
            m->col[c * nn + n] = 0;
            if (!keel_workload_eligible(w, p, n))
                continue;
            int j = glp_add_cols(lp, 1);
            m->col[c * nn + n] = j;
            size_t most = m->class_size[c];
            if ((size_t)w->max_patients[n] < most)
                most = (size_t)w->max_patients[n];
            glp_set_col_kind(lp, j, GLP_IV);
            glp_set_col_bnds(lp, j, most > 0 ? GLP_DB : GLP_FX, 0.0, (double)most);
            if (q->goal == KEEL_GOAL_KEEP && w->previous[p] == (int)n)
                glp_set_obj_coef(lp, j, 1.0);
            m->ny = j;
        }
    }
    for (size_t c = 0; c < m->nclasses; c++) {
        double size = (double)m->class_size[c];
        int row = new_row(lp, GLP_FX, size, size);
        for (size_t n = 0; n < nn; n++)
            if (m->col[c * nn + n])
                keel_triplets_put(&m->mat, row, m->col[c * nn + n], 1.0);
    }
    int *order_row = keel_calloc(nn ? nn : 1, sizeof *order_row);
    if (!order_row) {
        m->nomem = true;
        return;
    }
    for (size_t n = 0; n < nn; n++) {
        if (!keel_workload_counted(w, n))
            continue;
        long long hi = q->hi[n] < w->max_care[n] ? q->hi[n] : w->max_care[n];
        int care = hi < q->lo[n]    ? new_row(lp, GLP_FX, -1.0, -1.0) /* cannot be met */
                   : q->lo[n] == hi ? new_row(lp, GLP_FX, (double)hi, (double)hi)
                                    : new_row(lp, GLP_DB, (double)q->lo[n], (double)hi);
        for (size_t c = 0; c < m->nclasses; c++) {
            int j = m->col[c * nn + n];
            if (j)
                keel_triplets_put(&m->mat, care, j, (double)w->care_minutes[m->class_first[c]]);
        }
        for (size_t mo = 0; mo < w->nmoments; mo++)
            add_rules(m, lp, n, w->clocked ? (int)mo : -1);
        if (w->clocked && q->goal == KEEL_GOAL_NEAR)
            add_proximity(m, lp, n);
    }
    if (w->clocked)
        add_keeping(m, lp);
    for (size_t n = 0; q->goal == KEEL_GOAL_SQUARES && n < nn; n++)
        if (keel_workload_counted(w, n))
            add_squares(m, lp, n);
    /* Load order of interchangeable nurses: load(n) - load(next twin) >= 0. */
    for (size_t n = 0; n < nn; n++) {
        if (m->next_twin[n] < 0)
            continue;
        order_row[n] = new_row(lp, GLP_LO, 0.0, 0.0);
        size_t t = (size_t)m->next_twin[n];
        for (size_t c = 0; c < m->nclasses; c++) {
            double care = (double)w->care_minutes[m->class_first[c]];
            if (m->col[c * nn + n])
                keel_triplets_put(&m->mat, order_row[n], m->col[c * nn + n], care);
            if (m->col[c * nn + t])
                keel_triplets_put(&m->mat, order_row[n], m->col[c * nn + t], -care);
        }
    }
    free(order_row);
    if (q->goal != KEEL_GOAL_FIT && q->min_kept > 0) {
        int row = new_row(lp, GLP_LO, (double)q->min_kept, 0.0);
        for (size_t c = 0; c < m->nclasses; c++) {
            int prev = w->previous[m->class_first[c]];
            if (prev >= 0 && m->col[c * nn + (size_t)prev])
                keel_triplets_put(&m->mat, row, m->col[c * nn + (size_t)prev], 1.0);
        }
    }
}

/* Gives GLPK the start assignment once, and records the best bound. */
static void on_event(glp_tree *tree, void *info)
{
    model *m = info;
    const keel_workload *w = m->w;
    size_t nn = w->nnurses;
    int reason = glp_ios_reason(tree);
    int best = glp_ios_best_node(tree);
    if (best) {
        m->bound = glp_ios_node_bound(tree, best);
        m->have_bound = true;
    }
    if (reason != GLP_IHEUR || !m->q->start || m->start_given)
        return;
    glp_prob *lp = glp_ios_get_prob(tree);
    int ncols = glp_get_num_cols(lp), nrows = glp_get_num_rows(lp);
    double *x = keel_calloc((size_t)ncols + 1, sizeof *x);
    double *act = keel_calloc((size_t)nrows + 1, sizeof *act);
    m->start_given = true;
    if (!x || !act) {
        free(x);
        free(act);
        m->nomem = true;
        glp_ios_terminate(tree);
        return;
    }
    for (size_t p = 0; p < w->npatients; p++) {
        int n = m->q->start[p];
        int j = n >= 0 ? m->col[m->class_of[p] * nn + (size_t)n] : 0;
        if (j)
            x[j] += 1.0;
    }
    for (size_t k = 1; k <= m->mat.n; k++)
        if (m->mat.ja[k] <= m->ny)
            act[m->mat.ia[k]] += m->mat.ar[k] * x[m->mat.ja[k]];
    for (int j = m->ny + 1; j <= ncols && (size_t)j < m->nlink; j++)
        x[j] = m->link[j] && act[m->link[j]] > 0.5 ? 1.0 : 0.0;
    /* Unit segments: the first care(n) of nurse n's are full. */
    for (size_t n = 0; m->seg_first && n < nn; n++) {
        long long care = 0;
        for (size_t p = 0; p < w->npatients; p++)
            care += m->q->start[p] == (int)n ? w->care_minutes[p] : 0;
        for (int k = 0; k < m->seg_count[n]; k++)
            x[m->seg_first[n] + k] = k < care ? 1.0 : 0.0;
    }
    glp_ios_heur_sol(tree, x);
    free(x);
    free(act);
}

/* Hands out each class's members by the counts of the solution. */
static void hand_out(model *m, glp_prob *lp, int *nurse_of)
{
    const keel_workload *w = m->w;
    size_t nn = w->nnurses;
    for (size_t c = 0; c < m->nclasses; c++)
        for (size_t n = 0; n < nn; n++) {
            int j = m->col[c * nn + n];
            m->left[c * nn + n] = j ? (int)(glp_mip_col_val(lp, j) + 0.5) : 0;
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

/* Builds and solves the model.  Returns 0 or GLPK's error code. */
static int build_and_solve(model *m, long time_limit_ms, int *nurse_of, keel_ilp_result *res,
                           glp_prob **lp_out)
{
    glp_prob *lp = glp_create_prob();
    *lp_out = lp;
    build(m, lp);
    m->nomem = m->nomem || m->mat.nomem;
    if (m->nomem)
        return 0;
    glp_load_matrix(lp, (int)m->mat.n, m->mat.ia, m->mat.ja, m->mat.ar);
    bool keep = m->q->goal == KEEL_GOAL_KEEP;

    /* GLPK 5.0's MIP preprocessor (glp_iocp.presolve) returned a point
     * outside a double-bounded row in our tests (see test_solve.c), so the
     * LP relaxation is solved by the simplex method first and the branch
     * and bound runs without it. */
    long long started = keel_clock_ms();
    glp_smcp lp_parm;
    glp_init_smcp(&lp_parm);
    lp_parm.msg_lev = GLP_MSG_OFF;
    lp_parm.tm_lim = time_limit_ms > INT_MAX ? INT_MAX : (int)time_limit_ms;
    int ret = glp_simplex(lp, &lp_parm);
    if (ret == GLP_ETMLIM)
        return 0; /* answer stays unknown */
    if (ret)
        return ret;
    if (glp_get_status(lp) == GLP_NOFEAS) {
        res->answer = KEEL_ILP_INFEASIBLE;
        return 0;
    }
    m->bound = glp_get_obj_val(lp);
    m->have_bound = true;
    long left = time_limit_ms - (long)(keel_clock_ms() - started);
    glp_iocp parm;
    glp_init_iocp(&parm);
    parm.msg_lev = GLP_MSG_OFF;
    parm.tm_lim = left < 1 ? 1 : left > INT_MAX ? INT_MAX : (int)left;
    parm.cb_func = on_event;
    parm.cb_info = m;
    ret = glp_intopt(lp, &parm);
    if (m->nomem)
        return 0;
    int status = glp_mip_status(lp);
    if (ret == 0 && status == GLP_NOFEAS) {
        res->answer = KEEL_ILP_INFEASIBLE;
        return 0;
    }
    if ((ret == 0 || ret == GLP_ETMLIM) && (status == GLP_OPT || status == GLP_FEAS)) {
        hand_out(m, lp, nurse_of);
        res->answer = KEEL_ILP_FEASIBLE;
        double value = glp_mip_obj_val(lp);
        double bound = ret == 0 && status == GLP_OPT ? value : m->bound;
        /* Objectives are whole numbers: round the proven limit inwards. */
        res->bound = keep ? (long long)floor(bound + 1e-6) : (long long)ceil(bound - 1e-6);
        res->squares_bound = m->squares_zero + bound;
        res->proven = ret == 0 && status == GLP_OPT;
        return 0;
    }
    if (ret == GLP_ETMLIM)
        return 0;
    return ret ? ret : -1;
}

/* True when nurse_of keeps the windows of the question (and its kept
 * count); the rules are checked by keel_solve_validate(). */
static bool fits(const keel_workload *w, const keel_ilp_question *q, const int *nurse_of)
{
    for (size_t n = 0; n < w->nnurses; n++) {
        long long care = 0;
        for (size_t p = 0; p < w->npatients; p++)
            if (nurse_of[p] == (int)n)
                care += w->care_minutes[p];
        if (keel_workload_counted(w, n) && (care < q->lo[n] || care > q->hi[n]))
            return false;
    }
    return q->goal == KEEL_GOAL_FIT || keel_solve_kept(w, nurse_of) >= q->min_kept;
}

keel_status keel_ilp_ask(const keel_workload *w, const keel_ilp_question *q, long time_limit_ms,
                         int *nurse_of, keel_ilp_result *res, keel_error *err)
{
    size_t np = w->npatients, nn = w->nnurses;
    *res = (keel_ilp_result){.answer = KEEL_ILP_UNKNOWN};
    if (time_limit_ms <= 0)
        return KEEL_OK;
    model m = {.w = w, .q = q};
    m.class_of = keel_calloc(np ? np : 1, sizeof *m.class_of);
    m.class_size = keel_calloc(np ? np : 1, sizeof *m.class_size);
    m.class_first = keel_calloc(np ? np : 1, sizeof *m.class_first);
    m.next_twin = keel_calloc(nn ? nn : 1, sizeof *m.next_twin);
    m.col = keel_calloc(np * nn > 0 ? np * nn : 1, sizeof *m.col);
    m.left = keel_calloc(np * nn > 0 ? np * nn : 1, sizeof *m.left);
    bool squares = q->goal == KEEL_GOAL_SQUARES;
    if (squares) {
        m.seg_first = keel_calloc(nn ? nn : 1, sizeof *m.seg_first);
        m.seg_count = keel_calloc(nn ? nn : 1, sizeof *m.seg_count);
    }
    keel_status rc = KEEL_OK;
    glp_prob *lp = NULL;
    if (!m.class_of || !m.class_size || !m.class_first || !m.next_twin || !m.col || !m.left ||
        (squares && (!m.seg_first || !m.seg_count))) {
        rc = keel_error_add(err, KEEL_ERR_NOMEM, NULL, 0, 0, NULL, "out of memory");
        goto out;
    }
    jmp_buf env;
    if (setjmp(env)) {
        /* GLPK hit a fatal error: its environment is unusable; free it whole. */
        glp_free_env();
        rc = keel_error_add(err, KEEL_ERR_SOLVER, NULL, 0, 0, NULL,
                            "the integer programming solver (GLPK) failed");
        goto out;
    }
    glp_error_hook(on_glpk_error, &env);
    glp_term_out(GLP_OFF);
    int ret = build_and_solve(&m, time_limit_ms, nurse_of, res, &lp);
    glp_delete_prob(lp);
    glp_error_hook(NULL, NULL);
    if (m.nomem)
        rc = keel_error_add(err, KEEL_ERR_NOMEM, NULL, 0, 0, NULL, "out of memory");
    else if (ret)
        rc = keel_error_add(err, KEEL_ERR_SOLVER, NULL, 0, 0, NULL,
                            "the integer programming solver (GLPK) stopped with code %d", ret);
    bool valid = true;
    if (!rc && res->answer == KEEL_ILP_FEASIBLE && keel_solve_validate(w, nurse_of, &valid))
        rc = keel_error_add(err, KEEL_ERR_NOMEM, NULL, 0, 0, NULL, "out of memory");
    else if (!rc && res->answer == KEEL_ILP_FEASIBLE && (!valid || !fits(w, q, nurse_of)))
        rc = keel_error_add(err, KEEL_ERR_SOLVER, NULL, 0, 0, NULL,
                            "the integer programming solver (GLPK) returned an assignment "
                            "that breaks its own constraints");
    if (!rc && res->answer == KEEL_ILP_FEASIBLE) {
        if (q->goal == KEEL_GOAL_KEEP)
            res->value = keel_solve_kept(w, nurse_of);
        if (q->goal == KEEL_GOAL_NEAR)
            keel_solve_spread(w, nurse_of, &res->value, &res->rooms);
        if (q->goal == KEEL_GOAL_NEAR) /* the bound was on (census + 1) zones + rooms */
            res->bound = res->bound / ((long long)np + 1);
    }
out:
    free(m.class_of);
    free(m.class_size);
    free(m.class_first);
    free(m.next_twin);
    free(m.col);
    free(m.left);
    free(m.seg_first);
    free(m.seg_count);
    free(m.link);
    keel_triplets_fini(&m.mat);
    return rc;
}

keel_status keel_glpk_call(int (*fn)(void *ctx), void *ctx, int *ret, keel_error *err)
{
    jmp_buf env;
    if (setjmp(env)) {
        /* GLPK hit a fatal error: its environment is unusable; free it whole. */
        glp_free_env();
        return keel_error_add(err, KEEL_ERR_SOLVER, NULL, 0, 0, NULL,
                              "the integer programming solver (GLPK) failed");
    }
    glp_error_hook(on_glpk_error, &env);
    glp_term_out(GLP_OFF);
    *ret = fn(ctx);
    glp_error_hook(NULL, NULL);
    return KEEL_OK;
}

keel_status keel_ilp_fit(const keel_workload *w, const long long *lo, const long long *hi,
                         long time_limit_ms, int *nurse_of, keel_ilp_answer *answer,
                         keel_error *err)
{
    keel_ilp_question q = {.lo = lo, .hi = hi, .goal = KEEL_GOAL_FIT};
    keel_ilp_result res;
    keel_status rc = keel_ilp_ask(w, &q, time_limit_ms, nurse_of, &res, err);
    *answer = res.answer;
    return rc;
}
