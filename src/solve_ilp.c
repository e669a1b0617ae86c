/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * solve_ilp.c - the integer programme, the only file that includes glpk.h.
 *
 * It answers one question for the exact method (solve_exact.c): is there an
 * assignment (every patient one eligible nurse, patient limits kept) in
 * which every counted nurse n carries between lo[n] and hi[n] minutes of
 * care?  GLPK's fatal errors are turned into KEEL_ERR_SOLVER by the error
 * hook instead of an abort, and its terminal output is off.
 */
#include <glpk.h>
#include <limits.h>
#include <setjmp.h>
#include <stdlib.h>
#include <string.h>

#include "alloc.h"
#include "solve_internal.h"

static void on_glpk_error(void *info)
{
    longjmp(*(jmp_buf *)info, 1);
}

/*
 * The feasibility model.  Patients with the same care minutes and the same
 * eligible nurses are interchangeable, so they form one class with an
 * integer count per nurse instead of one binary per patient and nurse.
 * Counted nurses with the same capacity, duty, limit, eligibility and window
 * are interchangeable too; within such a group the model asks for loads in
 * non-increasing order, which removes their symmetric copies from the search.
 */
typedef struct fit_model {
    size_t nclasses;
    size_t *class_of;    /* [npatients] */
    size_t *class_size;  /* [nclasses] */
    int *class_care;     /* [nclasses] */
    size_t *class_first; /* [nclasses]: a member, for eligibility */
    int *next_twin;      /* [nnurses]: the next nurse of the same group, or -1 */
    int *count_row;      /* [nnurses] */
    int *order_row;      /* [nnurses]: row "load(n) >= load(next twin)", or 0 */
    int *col;            /* [nclasses * nnurses]: column of y[c, n], or 0 */
    int *left;           /* [nclasses * nnurses]: members still to hand out */
} fit_model;

static bool same_patients(const keel_workload *w, size_t a, size_t b)
{
    return w->care_minutes[a] == w->care_minutes[b] &&
           memcmp(&w->eligible[a * w->nnurses], &w->eligible[b * w->nnurses],
                  w->nnurses * sizeof *w->eligible) == 0;
}

static bool same_nurses(const keel_workload *w, const long long *lo, const long long *hi, size_t a,
                        size_t b)
{
    if (w->capacity_minutes[a] != w->capacity_minutes[b] ||
        w->duty_minutes[a] != w->duty_minutes[b] || w->max_patients[a] != w->max_patients[b] ||
        lo[a] != lo[b] || hi[a] != hi[b])
        return false;
    for (size_t p = 0; p < w->npatients; p++)
        if (keel_workload_eligible(w, p, a) != keel_workload_eligible(w, p, b))
            return false;
    return true;
}

static void group(const keel_workload *w, const long long *lo, const long long *hi, fit_model *m)
{
    m->nclasses = 0;
    for (size_t p = 0; p < w->npatients; p++) {
        size_t c;
        for (c = 0; c < m->nclasses; c++)
            if (same_patients(w, m->class_first[c], p))
                break;
        if (c == m->nclasses) {
            m->class_first[c] = p;
            m->class_care[c] = w->care_minutes[p];
            m->class_size[c] = 0;
            m->nclasses++;
        }
        m->class_of[p] = c;
        m->class_size[c]++;
    }
    for (size_t n = 0; n < w->nnurses; n++) {
        m->next_twin[n] = -1;
        if (!keel_workload_counted(w, n))
            continue;
        for (size_t k = n + 1; k < w->nnurses; k++) {
            if (keel_workload_counted(w, k) && same_nurses(w, lo, hi, n, k)) {
                m->next_twin[n] = (int)k;
                break;
            }
        }
    }
}

/* Builds and solves the model; see keel_ilp_fit(). */
static int build_and_solve(const keel_workload *w, const long long *lo, const long long *hi,
                           long time_limit_ms, int *nurse_of, keel_ilp_answer *answer,
                           glp_prob **lp_out, fit_model *m)
{
    size_t nn = w->nnurses;
    group(w, lo, hi, m);
    glp_prob *lp = glp_create_prob();
    *lp_out = lp;
    glp_set_obj_dir(lp, GLP_MIN);
    /* Rows: one per class (its size), then per counted nurse: patient count,
     * care minutes and, for a nurse with a twin after it, the load order. */
    int crow = m->nclasses > 0 ? glp_add_rows(lp, (int)m->nclasses) : 1;
    for (size_t c = 0; c < m->nclasses; c++)
        glp_set_row_bnds(lp, crow + (int)c, GLP_FX, (double)m->class_size[c],
                         (double)m->class_size[c]);
    for (size_t n = 0; n < nn; n++) {
        m->count_row[n] = 0;
        m->order_row[n] = 0;
        if (!keel_workload_counted(w, n))
            continue;
        int r = glp_add_rows(lp, 2);
        m->count_row[n] = r;
        glp_set_row_bnds(lp, r, GLP_UP, 0.0, (double)w->max_patients[n]);
        if (lo[n] == hi[n])
            glp_set_row_bnds(lp, r + 1, GLP_FX, (double)lo[n], (double)hi[n]);
        else
            glp_set_row_bnds(lp, r + 1, GLP_DB, (double)lo[n], (double)hi[n]);
        if (m->next_twin[n] >= 0) {
            m->order_row[n] = glp_add_rows(lp, 1);
            glp_set_row_bnds(lp, m->order_row[n], GLP_LO, 0.0, 0.0);
        }
    }
    /* Columns: y[c, n], how many patients of class c nurse n takes. */
    int j = 0;
    for (size_t c = 0; c < m->nclasses; c++) {
        for (size_t n = 0; n < nn; n++) {
            m->col[c * nn + n] = 0;
            if (!keel_workload_eligible(w, m->class_first[c], n))
                continue;
            j = glp_add_cols(lp, 1);
            m->col[c * nn + n] = j;
            size_t most = m->class_size[c];
            if ((size_t)w->max_patients[n] < most)
                most = (size_t)w->max_patients[n];
            glp_set_col_kind(lp, j, GLP_IV);
            glp_set_col_bnds(lp, j, most > 0 ? GLP_DB : GLP_FX, 0.0, (double)most);
            int ind[6];
            double val[6];
            int k = 0;
            ind[++k] = crow + (int)c;
            val[k] = 1.0;
            ind[++k] = m->count_row[n];
            val[k] = 1.0;
            ind[++k] = m->count_row[n] + 1;
            val[k] = (double)m->class_care[c];
            if (m->order_row[n]) {
                ind[++k] = m->order_row[n];
                val[k] = (double)m->class_care[c];
            }
            for (size_t a = 0; a < n; a++) {
                if (m->next_twin[a] == (int)n) {
                    ind[++k] = m->order_row[a];
                    val[k] = -(double)m->class_care[c];
                }
            }
            glp_set_mat_col(lp, j, k, ind, val);
        }
    }

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
    if (ret == GLP_ETMLIM) {
        *answer = KEEL_ILP_UNKNOWN;
        return 0;
    }
    if (ret)
        return ret;
    if (glp_get_status(lp) == GLP_NOFEAS) {
        *answer = KEEL_ILP_INFEASIBLE;
        return 0;
    }
    long left = time_limit_ms - (long)(keel_clock_ms() - started);
    glp_iocp parm;
    glp_init_iocp(&parm);
    parm.msg_lev = GLP_MSG_OFF;
    parm.tm_lim = left < 1 ? 1 : left > INT_MAX ? INT_MAX : (int)left;
    ret = glp_intopt(lp, &parm);
    int status = glp_mip_status(lp);
    if (ret == 0 && status == GLP_NOFEAS) {
        *answer = KEEL_ILP_INFEASIBLE;
        return 0;
    }
    if ((ret == 0 || ret == GLP_ETMLIM) && (status == GLP_OPT || status == GLP_FEAS)) {
        /* Hand out each class's members by the counts. */
        for (size_t c = 0; c < m->nclasses; c++)
            for (size_t n = 0; n < nn; n++) {
                int cj = m->col[c * nn + n];
                m->left[c * nn + n] = cj ? (int)(glp_mip_col_val(lp, cj) + 0.5) : 0;
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
        *answer = KEEL_ILP_FEASIBLE;
        return 0;
    }
    if (ret == GLP_ETMLIM) {
        *answer = KEEL_ILP_UNKNOWN;
        return 0;
    }
    return ret ? ret : -1;
}

/* Checks an answer before anyone relies on it: every patient one eligible
 * nurse, limits kept, each counted nurse's care inside its window. */
static bool fits(const keel_workload *w, const long long *lo, const long long *hi,
                 const int *nurse_of)
{
    for (size_t p = 0; p < w->npatients; p++)
        if (nurse_of[p] < 0 || !keel_workload_eligible(w, p, (size_t)nurse_of[p]))
            return false;
    for (size_t n = 0; n < w->nnurses; n++) {
        long long care = 0;
        int count = 0;
        for (size_t p = 0; p < w->npatients; p++) {
            if (nurse_of[p] == (int)n) {
                care += w->care_minutes[p];
                count++;
            }
        }
        if (count > w->max_patients[n] ||
            (keel_workload_counted(w, n) && (care < lo[n] || care > hi[n])))
            return false;
    }
    return true;
}

keel_status keel_ilp_fit(const keel_workload *w, const long long *lo, const long long *hi,
                         long time_limit_ms, int *nurse_of, keel_ilp_answer *answer,
                         keel_error *err)
{
    size_t np = w->npatients, nn = w->nnurses;
    *answer = KEEL_ILP_UNKNOWN;
    if (time_limit_ms <= 0)
        return KEEL_OK;
    fit_model m = {0};
    m.class_of = keel_calloc(np, sizeof *m.class_of);
    m.class_size = keel_calloc(np, sizeof *m.class_size);
    m.class_care = keel_calloc(np, sizeof *m.class_care);
    m.class_first = keel_calloc(np, sizeof *m.class_first);
    m.next_twin = keel_calloc(nn, sizeof *m.next_twin);
    m.count_row = keel_calloc(nn, sizeof *m.count_row);
    m.order_row = keel_calloc(nn, sizeof *m.order_row);
    m.col = keel_calloc(np * nn, sizeof *m.col);
    m.left = keel_calloc(np * nn, sizeof *m.left);
    keel_status rc = KEEL_OK;
    if (!m.class_of || !m.class_size || !m.class_care || !m.class_first || !m.next_twin ||
        !m.count_row || !m.order_row || !m.col || !m.left) {
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
    glp_prob *lp = NULL;
    int ret = build_and_solve(w, lo, hi, time_limit_ms, nurse_of, answer, &lp, &m);
    glp_delete_prob(lp);
    glp_error_hook(NULL, NULL);
    if (ret)
        rc = keel_error_add(err, KEEL_ERR_SOLVER, NULL, 0, 0, NULL,
                            "the integer programming solver (GLPK) stopped with code %d", ret);
    else if (*answer == KEEL_ILP_FEASIBLE && !fits(w, lo, hi, nurse_of))
        rc = keel_error_add(err, KEEL_ERR_SOLVER, NULL, 0, 0, NULL,
                            "the integer programming solver (GLPK) returned an assignment "
                            "that breaks its own constraints");
out:
    free(m.class_of);
    free(m.class_size);
    free(m.class_care);
    free(m.class_first);
    free(m.next_twin);
    free(m.count_row);
    free(m.order_row);
    free(m.col);
    free(m.left);
    return rc;
}
