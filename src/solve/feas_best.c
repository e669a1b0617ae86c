/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * solve_best.c - the best-effort plan (`--best-effort`) for a roster with
 * no valid assignment: every patient still gets a nurse who takes
 * patients, and the rules broken weigh as little as possible.  With
 * solve_ilp.c, one of the only two files that include glpk.h.
 *
 * Each patient goes to one counted nurse, x[p, n] binary, every pair
 * allowed.  Severities (documented in docs/model.md):
 *
 *   skill, lock, avoid         100 per patient given against the rule
 *   law_limit                   80 per patient over a limit set by the table
 *   patient_ratio               60 per patient over a patient's own ratio
 *   patient_limit               50 per patient over any other limit
 *   high_acuity, isolation      40 per patient over / per nurse with both sides
 *   zones                       10 per zone over policy.max_zones
 *   capacity, min_patients      50 per nurse over her care cap / per patient short
 *
 * and, far below any rule, 0.1 times the heaviest utilisation U so that
 * among plans of equal severity the most even is taken:
 *
 *   minimise  sum severity + 0.1 U
 *   sum_n x[p, n] = 1
 *   sum_p x[p, n] - e[n] <= limit(n)
 *   sum_q x[q, n] + (census - r) x[p, n] - f[p, n] <= census   (p of ratio r)
 *   sum_{p high} x[p, n] - h[n] <= max_high_acuity
 *   sum_{p protective} x[p, n] <= census b[n],
 *   sum_{p infectious} x[p, n] + census b[n] - census i[n] <= census
 *   sum_{p in zone k} x[p, n] <= census z[k, n],  sum_k z[k, n] - g[n] <= max_zones
 *   duty(n) + sum_p care(p) x[p, n] <= U capacity(n)
 *   sum_p care(p) x[p, n] - big o[n] <= max_care(n)     (o binary)
 *   sum_p x[p, n] + s[n] >= min(n)
 *
 * With the clock p ranges over parts, a part goes only to a nurse on
 * throughout it, every counting row is stated per moment over the parts
 * that cover it, and a part keeps the nurse of the part before it while
 * she is on (x[q - 1, n] <= x[q, n]); all three are kept, not weighed.
 */
#include <glpk.h>
#include <limits.h>
#include <stdlib.h>
#include <string.h>

#include "alloc.h"
#include "solve_internal.h"
#include "ilp.h"

enum {
    SEVERITY_PAIR = 100,
    SEVERITY_LAW = 80,
    SEVERITY_RATIO = 60,
    SEVERITY_LIMIT = 50,
    SEVERITY_HIGH = 40,
    SEVERITY_ISOLATION = 40,
    SEVERITY_ZONES = 10,
};
#define EVENNESS_WEIGHT 0.1

typedef struct best_model {
    const keel_roster *r;
    const keel_workload *w;
    long time_limit_ms;
    int *nurse_of;
    int *col;          /* [npatients * nnurses]: column of x[p, n], or 0 */
    keel_triplets mat; /* the matrix */
    bool nomem;
    bool found;
    long severity;
    bool proven; /* GLPK proved the severity the least possible */
    glp_prob *lp;
} best_model;

static int row(glp_prob *lp, int type, double lb, double ub)
{
    int i = glp_add_rows(lp, 1);
    glp_set_row_bnds(lp, i, type, lb, ub);
    return i;
}

static int column(glp_prob *lp, int kind, double ub, double cost)
{
    int j = glp_add_cols(lp, 1);
    glp_set_col_kind(lp, j, kind);
    glp_set_col_bnds(lp, j, GLP_DB, 0.0, ub);
    glp_set_obj_coef(lp, j, cost);
    return j;
}

/* The severity of giving patient p to nurse n, apart from limits. */
static int pair_severity(const keel_roster *r, const keel_workload *w, size_t p, size_t n)
{
    if (keel_workload_eligible(w, p, n))
        return 0;
    if (!r)
        return SEVERITY_PAIR;
    const keel_patient *pt = &r->patients[w->patient[p]];
    const keel_nurse *nu = &r->nurses[n];
    bool first = w->first_part[w->patient[p]] == (int)p;
    int severity = 0;
    size_t nextra = r->policy.nisolation_needs[pt->isolation];
    bool lacks = false;
    for (size_t i = 0; i < pt->nneeds && !lacks; i++)
        lacks = !keel_nurse_has_skill(nu, pt->needs[i]);
    for (size_t i = 0; i < nextra && !lacks; i++)
        lacks = !keel_nurse_has_skill(nu, r->policy.isolation_needs[pt->isolation][i]);
    severity += lacks ? SEVERITY_PAIR : 0;
    if (first && pt->lock && pt->nurse && strcmp(pt->nurse, nu->id) != 0)
        severity += SEVERITY_PAIR;
    for (size_t i = 0; i < pt->navoid; i++)
        if (strcmp(pt->avoid[i], nu->id) == 0)
            severity += SEVERITY_PAIR;
    return severity;
}

/* x[p, n] when part p covers moment mo (any moment: -1), else 0. */
static int col_at(const best_model *m, size_t p, size_t n, int mo)
{
    const keel_workload *w = m->w;
    bool covers = mo < 0 || (w->first_moment[p] <= mo && mo < w->last_moment[p]);
    return covers ? m->col[p * w->nnurses + n] : 0;
}

/* The counting rows of nurse n at moment mo (-1: without the clock). */
static void add_nurse_rows(best_model *m, glp_prob *lp, size_t n, int mo)
{
    const keel_workload *w = m->w;
    size_t np = w->npatients;
    double census = (double)np, limit = w->max_patients[n];
    bool law = w->law_limit != KEEL_ABSENT && w->max_patients[n] == w->law_limit;
    int count = row(lp, GLP_UP, 0.0, limit);
    keel_triplets_put(&m->mat, count,
                      column(lp, GLP_IV, census, law ? SEVERITY_LAW : SEVERITY_LIMIT), -1.0);
    for (size_t p = 0; p < np; p++)
        keel_triplets_put(&m->mat, count, col_at(m, p, n, mo), 1.0);
    for (size_t p = 0; p < np; p++) {
        int r = w->ratio_limit[p];
        if (r >= w->max_patients[n] || !col_at(m, p, n, mo))
            continue;
        int ratio = row(lp, GLP_UP, 0.0, census);
        for (size_t q = 0; q < np; q++)
            keel_triplets_put(&m->mat, ratio, col_at(m, q, n, mo), q == p ? 1.0 + census - r : 1.0);
        keel_triplets_put(&m->mat, ratio, column(lp, GLP_IV, census, SEVERITY_RATIO), -1.0);
    }
    if (w->max_high_acuity != KEEL_ABSENT) {
        int high = row(lp, GLP_UP, 0.0, (double)w->max_high_acuity);
        for (size_t p = 0; p < np; p++)
            if (w->high_acuity[p])
                keel_triplets_put(&m->mat, high, col_at(m, p, n, mo), 1.0);
        keel_triplets_put(&m->mat, high, column(lp, GLP_IV, census, SEVERITY_HIGH), -1.0);
    }
    if (w->isolation_rule) {
        int b = column(lp, GLP_BV, 1.0, 0.0), both = column(lp, GLP_BV, 1.0, SEVERITY_ISOLATION);
        int prot = row(lp, GLP_UP, 0.0, 0.0), inf = row(lp, GLP_UP, 0.0, census);
        for (size_t p = 0; p < np; p++) {
            if (w->side[p] == KEEL_SIDE_PROTECTIVE)
                keel_triplets_put(&m->mat, prot, col_at(m, p, n, mo), 1.0);
            if (w->side[p] == KEEL_SIDE_INFECTIOUS)
                keel_triplets_put(&m->mat, inf, col_at(m, p, n, mo), 1.0);
        }
        keel_triplets_put(&m->mat, prot, b, -census);
        keel_triplets_put(&m->mat, inf, b, census);
        keel_triplets_put(&m->mat, inf, both, -census);
    }
    if (w->zones_rule) {
        int zones = row(lp, GLP_UP, 0.0, (double)w->max_zones);
        keel_triplets_put(&m->mat, zones, column(lp, GLP_IV, (double)w->nzones, SEVERITY_ZONES),
                          -1.0);
        for (size_t k = 0; k < w->nzones; k++) {
            int z = column(lp, GLP_BV, 1.0, 0.0), tie = row(lp, GLP_UP, 0.0, 0.0);
            for (size_t p = 0; p < np; p++)
                if (w->zone[p] == (int)k)
                    keel_triplets_put(&m->mat, tie, col_at(m, p, n, mo), 1.0);
            keel_triplets_put(&m->mat, tie, z, -census);
            keel_triplets_put(&m->mat, zones, z, 1.0);
        }
    }
}

/* policy.max_utilisation and min_patients, broken at a cost. */
static void add_bounds_rows(best_model *m, glp_prob *lp, size_t n)
{
    const keel_workload *w = m->w;
    size_t np = w->npatients, nn = w->nnurses;
    if (w->max_care[n] != LLONG_MAX) {
        double big = 0;
        for (size_t p = 0; p < np; p++)
            big += w->care_minutes[p];
        int cap = row(lp, GLP_UP, 0.0, (double)w->max_care[n]);
        for (size_t p = 0; p < np; p++)
            keel_triplets_put(&m->mat, cap, m->col[p * nn + n], (double)w->care_minutes[p]);
        keel_triplets_put(&m->mat, cap, column(lp, GLP_BV, 1.0, SEVERITY_LIMIT), -big);
    }
    if (w->min_patients[n] > 0) {
        int least = row(lp, GLP_LO, (double)w->min_patients[n], 0.0);
        for (size_t p = 0; p < np; p++)
            keel_triplets_put(&m->mat, least, m->col[p * nn + n], 1.0);
        keel_triplets_put(&m->mat, least,
                          column(lp, GLP_IV, (double)w->min_patients[n], SEVERITY_LIMIT), 1.0);
    }
}

/* A part keeps the nurse of the part before it while she is on. */
static void add_keeping(best_model *m, glp_prob *lp)
{
    const keel_workload *w = m->w;
    size_t nn = w->nnurses;
    for (size_t q = 0; q < w->npatients; q++) {
        for (size_t n = 0; n < nn; n++) {
            int before = q > 0 ? m->col[(q - 1) * nn + n] : 0, now = m->col[q * nn + n];
            if (!before || !now || !keel_workload_keeps(w, q, (int)n))
                continue;
            int keep = row(lp, GLP_UP, 0.0, 0.0);
            keel_triplets_put(&m->mat, keep, before, 1.0);
            keel_triplets_put(&m->mat, keep, now, -1.0);
        }
    }
}

/* True when nurse n is on throughout part p. */
static bool on_throughout(const keel_workload *w, size_t p, size_t n)
{
    return w->nurse_start[n] <= w->part_start[p] && w->nurse_end[n] >= w->part_end[p];
}

static int build_and_solve(void *ctx)
{
    best_model *m = ctx;
    const keel_workload *w = m->w;
    size_t np = w->npatients, nn = w->nnurses;
    glp_prob *lp = glp_create_prob();
    m->lp = lp;
    glp_set_obj_dir(lp, GLP_MIN);
    for (size_t p = 0; p < np; p++)
        for (size_t n = 0; n < nn; n++)
            m->col[p * nn + n] = keel_workload_counted(w, n) && on_throughout(w, p, n)
                                     ? column(lp, GLP_BV, 1.0, pair_severity(m->r, w, p, n))
                                     : 0;
    if (w->clocked)
        add_keeping(m, lp);
    int peak = column(lp, GLP_CV, 1e6, EVENNESS_WEIGHT);
    for (size_t p = 0; p < np; p++) {
        int once = row(lp, GLP_FX, 1.0, 1.0);
        for (size_t n = 0; n < nn; n++)
            if (m->col[p * nn + n])
                keel_triplets_put(&m->mat, once, m->col[p * nn + n], 1.0);
    }
    for (size_t n = 0; n < nn; n++) {
        if (!keel_workload_counted(w, n))
            continue;
        for (size_t mo = 0; mo < w->nmoments; mo++)
            add_nurse_rows(m, lp, n, w->clocked ? (int)mo : -1);
        add_bounds_rows(m, lp, n);
        int load = row(lp, GLP_UP, 0.0, -(double)w->duty_minutes[n]);
        for (size_t p = 0; p < np; p++)
            keel_triplets_put(&m->mat, load, m->col[p * nn + n], (double)w->care_minutes[p]);
        keel_triplets_put(&m->mat, load, peak, -(double)w->capacity_minutes[n]);
    }
    m->nomem = m->nomem || m->mat.nomem;
    if (m->nomem)
        return 0;
    glp_load_matrix(lp, (int)m->mat.n, m->mat.ia, m->mat.ja, m->mat.ar);
    long long started = keel_clock_ms();
    glp_smcp lp_parm;
    glp_init_smcp(&lp_parm);
    lp_parm.msg_lev = GLP_MSG_OFF;
    lp_parm.tm_lim = m->time_limit_ms > INT_MAX ? INT_MAX : (int)m->time_limit_ms;
    int ret = glp_simplex(lp, &lp_parm);
    if (ret || glp_get_status(lp) != GLP_OPT)
        return ret == GLP_ETMLIM ? 0 : ret;
    long left = m->time_limit_ms - (long)(keel_clock_ms() - started);
    glp_iocp parm;
    glp_init_iocp(&parm);
    parm.msg_lev = GLP_MSG_OFF;
    parm.tm_lim = left < 1 ? 1 : left > INT_MAX ? INT_MAX : (int)left;
    ret = glp_intopt(lp, &parm);
    int status = glp_mip_status(lp);
    if ((ret == 0 || ret == GLP_ETMLIM) && (status == GLP_OPT || status == GLP_FEAS)) {
        for (size_t p = 0; p < np; p++) {
            m->nurse_of[p] = -1;
            for (size_t n = 0; n < nn; n++)
                if (m->col[p * nn + n] && glp_mip_col_val(lp, m->col[p * nn + n]) > 0.5)
                    m->nurse_of[p] = (int)n;
        }
        m->found = true;
        double rest = glp_mip_obj_val(lp) - EVENNESS_WEIGHT * glp_mip_col_val(lp, peak);
        m->severity = (long)(rest + 0.5);
        m->proven = ret == 0 && status == GLP_OPT;
        return 0;
    }
    return ret == GLP_ETMLIM ? 0 : ret;
}

keel_status keel_best_effort(const keel_roster *r, const keel_workload *w, long long deadline_ms,
                             int *nurse_of, bool *found, long *severity, bool *proven,
                             keel_error *err)
{
    size_t np = w->npatients, nn = w->nnurses;
    best_model m = {.r = r, .w = w, .nurse_of = nurse_of};
    *found = false;
    *proven = false;
    bool any = false;
    for (size_t n = 0; n < nn; n++)
        any = any || keel_workload_counted(w, n);
    long long left = deadline_ms - keel_clock_ms();
    if (!any || np == 0)
        return KEEL_OK;
    m.time_limit_ms = left < 1000 ? 1000 : (long)left; /* a plan is wanted even at the limit */
    if (left < 1 && !r)
        return KEEL_OK; /* a feasibility question out of time stays open */
    m.col = keel_calloc(np * nn, sizeof *m.col);
    if (!m.col)
        return keel_error_add(err, KEEL_ERR_NOMEM, NULL, 0, 0, NULL, "out of memory");
    int ret = 0;
    keel_status rc = keel_glpk_call(build_and_solve, &m, &ret, err);
    if (!rc) {
        glp_delete_prob(m.lp);
        if (m.nomem)
            rc = keel_error_add(err, KEEL_ERR_NOMEM, NULL, 0, 0, NULL, "out of memory");
        else if (ret)
            rc = keel_error_add(err, KEEL_ERR_SOLVER, NULL, 0, 0, NULL,
                                "the integer programming solver (GLPK) stopped with code %d", ret);
        else
            *found = m.found;
        *severity = m.severity;
        *proven = m.found && m.proven;
    }
    free(m.col);
    keel_triplets_fini(&m.mat);
    return rc;
}
