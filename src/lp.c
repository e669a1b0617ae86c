/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * lp.c - the typed front on GLPK (see lp.h); the only file of keel that
 * includes glpk.h.
 *
 * A keel_lp holds a model in keel's memory.  keel_lp_solve() copies it into
 * a GLPK problem on a thread of keel's own and solves it there: GLPK keeps
 * its environment per thread, so everything GLPK allocates for the solve
 * (the problem, its search tree, its buffers) lives in that thread's
 * environment, which is freed when the solve ends, after a fatal GLPK error
 * too (longjmp out of GLPK's error hook, then glp_free_env()).  The calling
 * thread's GLPK environment, if the program has one, is never touched.
 */
#include "lp.h"

#include <glpk.h>
#include <limits.h>
#include <pthread.h>
#include <setjmp.h>
#include <stdlib.h>
#include <string.h>
#include <time.h>

#include "alloc.h"

/* GLPK's own memory per solve, in megabytes, unless the solve asks for
 * another figure (keel_lp_set_memory()): far above what a unit's model
 * needs (a 200-patient floor's largest model uses a few MB), low enough
 * that a runaway search ends as a solver failure instead of exhausting the
 * machine. */
#define LP_MEM_LIMIT_MB 2048

/* The limit for the solves this thread starts; 0: LP_MEM_LIMIT_MB. */
static _Thread_local int memory_mb;

void keel_lp_set_memory(int mb)
{
    memory_mb = mb > 0 ? mb : 0;
}

struct keel_lp {
    bool maximise;
    bool nomem;
    int nrows, ncols;
    size_t rows_cap, cols_cap;
    unsigned char *row_type; /* [1..nrows]: keel_lp_bound */
    double *row_lb, *row_ub;
    unsigned char *col_kind; /* [1..ncols]: keel_lp_kind */
    double *col_lb, *col_ub, *col_cost;
    int *link; /* [1..ncols]: an indicator's row, else 0 */
    int *ia, *ja; /* the matrix, 1-based triplets [1..n] as glp_load_matrix wants them */
    double *ar;
    size_t n, cap;
    double *x; /* [1..ncols]: the last solution */
};

keel_lp *keel_lp_new(bool maximise)
{
    keel_lp *lp = keel_calloc(1, sizeof *lp);
    if (lp)
        lp->maximise = maximise;
    return lp;
}

void keel_lp_free(keel_lp *lp)
{
    if (!lp)
        return;
    free(lp->row_type);
    free(lp->row_lb);
    free(lp->row_ub);
    free(lp->col_kind);
    free(lp->col_lb);
    free(lp->col_ub);
    free(lp->col_cost);
    free(lp->link);
    free(lp->ia);
    free(lp->ja);
    free(lp->ar);
    free(lp->x);
    free(lp);
}

/* Grows *array (of size bytes per entry) to cap entries; false on failure
 * (the array is kept). */
static bool grow(void **array, size_t cap, size_t size)
{
    void *bigger = keel_reallocarray(*array, cap, size);
    if (!bigger)
        return false;
    *array = bigger;
    return true;
}

int keel_lp_row(keel_lp *lp, keel_lp_bound type, double lb, double ub)
{
    int i = ++lp->nrows;
    if ((size_t)i >= lp->rows_cap) {
        size_t cap = lp->rows_cap ? 2 * lp->rows_cap : 256;
        bool ok = grow((void **)&lp->row_type, cap, sizeof *lp->row_type) &&
                  grow((void **)&lp->row_lb, cap, sizeof *lp->row_lb) &&
                  grow((void **)&lp->row_ub, cap, sizeof *lp->row_ub);
        if (!ok) {
            lp->nomem = true;
            lp->nrows--;
            return i;
        }
        lp->rows_cap = cap;
    }
    lp->row_type[i] = (unsigned char)type;
    lp->row_lb[i] = lb;
    lp->row_ub[i] = ub;
    return i;
}

int keel_lp_col(keel_lp *lp, keel_lp_kind kind, double lb, double ub, double cost)
{
    int j = ++lp->ncols;
    if ((size_t)j >= lp->cols_cap) {
        size_t cap = lp->cols_cap ? 2 * lp->cols_cap : 256;
        bool ok = grow((void **)&lp->col_kind, cap, sizeof *lp->col_kind) &&
                  grow((void **)&lp->col_lb, cap, sizeof *lp->col_lb) &&
                  grow((void **)&lp->col_ub, cap, sizeof *lp->col_ub) &&
                  grow((void **)&lp->col_cost, cap, sizeof *lp->col_cost) &&
                  grow((void **)&lp->link, cap, sizeof *lp->link);
        if (!ok) {
            lp->nomem = true;
            lp->ncols--;
            return j;
        }
        lp->cols_cap = cap;
    }
    lp->col_kind[j] = (unsigned char)kind;
    lp->col_lb[j] = kind == KEEL_LP_BINARY ? 0.0 : lb;
    lp->col_ub[j] = kind == KEEL_LP_BINARY ? 1.0 : ub;
    lp->col_cost[j] = cost;
    lp->link[j] = 0;
    return j;
}

int keel_lp_indicator(keel_lp *lp, int row, double big, double cost)
{
    int x = keel_lp_col(lp, KEEL_LP_BINARY, 0.0, 1.0, cost);
    if (!lp->nomem)
        lp->link[x] = row;
    keel_lp_put(lp, row, x, -big);
    return x;
}

void keel_lp_cost(keel_lp *lp, int col, double cost)
{
    if (col >= 1 && col <= lp->ncols)
        lp->col_cost[col] = cost;
}

void keel_lp_put(keel_lp *lp, int row, int col, double value)
{
    if (col == 0)
        return; /* no such variable: the pair is not allowed */
    if (lp->n + 2 > lp->cap) {
        size_t cap = lp->cap ? 2 * lp->cap : 256;
        bool ok = grow((void **)&lp->ia, cap, sizeof *lp->ia) &&
                  grow((void **)&lp->ja, cap, sizeof *lp->ja) &&
                  grow((void **)&lp->ar, cap, sizeof *lp->ar);
        if (!ok) {
            lp->nomem = true;
            return;
        }
        lp->cap = cap;
    }
    lp->n++;
    lp->ia[lp->n] = row;
    lp->ja[lp->n] = col;
    lp->ar[lp->n] = value;
}

int keel_lp_nrows(const keel_lp *lp)
{
    return lp->nrows;
}

int keel_lp_ncols(const keel_lp *lp)
{
    return lp->ncols;
}

bool keel_lp_nomem(const keel_lp *lp)
{
    return lp->nomem;
}

bool keel_lp_fill_indicators(const keel_lp *lp, double *x)
{
    double *act = keel_calloc((size_t)lp->nrows + 1, sizeof *act);
    if (!act)
        return false;
    for (size_t k = 1; k <= lp->n; k++)
        if (!lp->link[lp->ja[k]])
            act[lp->ia[k]] += lp->ar[k] * x[lp->ja[k]];
    for (int j = 1; j <= lp->ncols; j++)
        if (lp->link[j])
            x[j] = act[lp->link[j]] > 0.5 ? 1.0 : 0.0;
    free(act);
    return true;
}

double keel_lp_value(const keel_lp *lp, int col)
{
    return lp->x && col >= 1 && col <= lp->ncols ? lp->x[col] : 0.0;
}

const char *keel_lp_version(void)
{
    return glp_version();
}

/* ---- The solve, on GLPK's side ----------------------------------------- */

static long long now_ms(void)
{
    struct timespec ts;
    clock_gettime(CLOCK_MONOTONIC, &ts);
    return (long long)ts.tv_sec * 1000 + ts.tv_nsec / 1000000;
}

/* One solve: what the GLPK thread reads and writes. */
typedef struct job {
    keel_lp *lp;
    long time_limit_ms;
    const double *start;
    keel_lp_result res;
    bool start_given;
    int ret;     /* GLPK's return code when it failed, else 0 */
    bool faulty; /* GLPK hit a fatal error */
    int mem_mb;  /* GLPK's memory limit for this solve */
    char said[160]; /* the last line GLPK printed (its words on a fatal error) */
    bool memory;    /* GLPK said it reached its memory limit */
    bool cover;     /* it holds cover_cuts (below) */
    jmp_buf env;
} job;

/* GLPK 5.0's cover cuts solve small knapsacks with a routine that keeps its
 * working values in static storage: two solves on two threads race there
 * (Helgrind, tests/test_threads.c), thread-local environments or not.
 * Solves with cover cuts take turns; the time waited counts against the
 * waiting solve's limit. */
static pthread_mutex_t cover_cuts = PTHREAD_MUTEX_INITIALIZER;

static void on_glpk_error(void *info)
{
    longjmp(((job *)info)->env, 1);
}

/* GLPK prints on a fatal error even with its terminal output off: nothing
 * of it reaches keel's caller's terminal; the last line is kept for keel's
 * own message. */
static int swallow(void *info, const char *text)
{
    job *J = info;
    /* "glp_alloc: memory allocation limit exceeded" (GLPK 5.0) */
    if (J && text && strstr(text, "memory") && strstr(text, "limit"))
        J->memory = true;
    if (J && text) {
        size_t len = strcspn(text, "\n");
        if (len > 0) {
            if (len >= sizeof J->said)
                len = sizeof J->said - 1;
            memcpy(J->said, text, len);
            J->said[len] = '\0';
        }
    }
    return 1;
}

/* Hands GLPK the start point once, and records the best bound. */
static void on_event(glp_tree *tree, void *info)
{
    job *J = info;
    int best = glp_ios_best_node(tree);
    if (best) {
        J->res.bound = glp_ios_node_bound(tree, best);
        J->res.have_bound = true;
    }
    if (glp_ios_reason(tree) != GLP_IHEUR || !J->start || J->start_given)
        return;
    J->start_given = true;
    glp_ios_heur_sol(tree, J->start);
}

static const int glp_row_type[] = {[KEEL_LP_UP] = GLP_UP,
                                   [KEEL_LP_LO] = GLP_LO,
                                   [KEEL_LP_DB] = GLP_DB,
                                   [KEEL_LP_FX] = GLP_FX};

/* Copies the model into a new GLPK problem. */
static glp_prob *load(const keel_lp *lp)
{
    glp_prob *P = glp_create_prob();
    glp_set_obj_dir(P, lp->maximise ? GLP_MAX : GLP_MIN);
    if (lp->nrows > 0)
        glp_add_rows(P, lp->nrows);
    if (lp->ncols > 0)
        glp_add_cols(P, lp->ncols);
    for (int i = 1; i <= lp->nrows; i++)
        glp_set_row_bnds(P, i, glp_row_type[lp->row_type[i]], lp->row_lb[i], lp->row_ub[i]);
    for (int j = 1; j <= lp->ncols; j++) {
        switch ((keel_lp_kind)lp->col_kind[j]) {
        case KEEL_LP_BINARY:
            glp_set_col_kind(P, j, GLP_BV);
            break;
        case KEEL_LP_INTEGER:
            glp_set_col_kind(P, j, GLP_IV);
            break;
        case KEEL_LP_CONTINUOUS:
            glp_set_col_kind(P, j, GLP_CV);
            break;
        }
        if (lp->col_kind[j] != KEEL_LP_BINARY) {
            double lb = lp->col_lb[j], ub = lp->col_ub[j];
            glp_set_col_bnds(P, j, lb == ub ? GLP_FX : GLP_DB, lb, ub);
        }
        glp_set_obj_coef(P, j, lp->col_cost[j]);
    }
    if (lp->n > 0)
        glp_load_matrix(P, (int)lp->n, lp->ia, lp->ja, lp->ar);
    return P;
}

/* The simplex method on the relaxation, then branch and bound. */
static void solve_loaded(job *J, glp_prob *P)
{
    keel_lp *lp = J->lp;
    long long started = now_ms();
    glp_smcp lp_parm;
    glp_init_smcp(&lp_parm);
    lp_parm.msg_lev = GLP_MSG_OFF;
    lp_parm.tm_lim = J->time_limit_ms > INT_MAX ? INT_MAX : (int)J->time_limit_ms;
    int ret = glp_simplex(P, &lp_parm);
    /* GLP_EFAIL: the simplex method failed on this problem (numerically;
     * met on a 12 000-row question of a 20 000-patient house): this
     * question goes unanswered, like one out of time, and the solve goes
     * on with what it has. */
    if (ret == GLP_ETMLIM || ret == GLP_EFAIL)
        return; /* outcome stays unknown */
    if (ret) {
        J->ret = ret;
        return;
    }
    int status = glp_get_status(P);
    if (status == GLP_NOFEAS) {
        J->res.outcome = KEEL_LP_INFEASIBLE;
        return;
    }
    if (status != GLP_OPT)
        return; /* no optimal basis to branch from: unknown */
    J->res.bound = glp_get_obj_val(P);
    J->res.have_bound = true;
    long left = J->time_limit_ms - (long)(now_ms() - started);
    glp_iocp parm;
    glp_init_iocp(&parm);
    parm.msg_lev = GLP_MSG_OFF;
    parm.tm_lim = left < 1 ? 1 : left > INT_MAX ? INT_MAX : (int)left;
    /* GLPK's mixed-integer rounding, cover and clique cuts: on 21 unit-size
     * rosters (docs/performance.md, "GLPK's cuts") they prove stage 3 on
     * all 21 instead of 18 and take medsurg-day from 1.8 s to 0.7 s; its
     * Gomory cuts were slower there and stay off.  GLPK 5.0 sets up its
     * cover cuts with glp_add_cols(n), a fatal error when the problem has
     * no column. */
    parm.mir_cuts = GLP_ON;
    parm.cov_cuts = lp->ncols > 0 ? GLP_ON : GLP_OFF;
    parm.clq_cuts = GLP_ON;
    if (parm.cov_cuts == GLP_ON) {
        pthread_mutex_lock(&cover_cuts);
        J->cover = true;
        left = J->time_limit_ms - (long)(now_ms() - started);
        if (left < 1) {
            J->cover = false;
            pthread_mutex_unlock(&cover_cuts);
            return; /* the turn came too late: outcome unknown */
        }
        parm.tm_lim = left > INT_MAX ? INT_MAX : (int)left;
    }
    parm.cb_func = on_event;
    parm.cb_info = J;
    ret = glp_intopt(P, &parm);
    if (J->cover) {
        J->cover = false;
        pthread_mutex_unlock(&cover_cuts);
    }
    status = glp_mip_status(P);
    if (ret == 0 && status == GLP_NOFEAS) {
        J->res.outcome = KEEL_LP_INFEASIBLE;
        return;
    }
    if ((ret == 0 || ret == GLP_ETMLIM) && (status == GLP_OPT || status == GLP_FEAS)) {
        bool proven = ret == 0 && status == GLP_OPT;
        J->res.outcome = proven ? KEEL_LP_OPTIMAL : KEEL_LP_FEASIBLE;
        J->res.value = glp_mip_obj_val(P);
        if (proven) {
            J->res.bound = J->res.value;
            J->res.have_bound = true;
        }
        for (int j = 1; j <= lp->ncols; j++)
            lp->x[j] = glp_mip_col_val(P, j);
        return;
    }
    if (ret != GLP_ETMLIM && ret != GLP_EFAIL)
        J->ret = ret ? ret : -1;
}

/* The whole GLPK side of one solve, in one GLPK environment: on a thread
 * of keel's own, the environment is that thread's and is freed here. */
static void run(job *J, bool own_env)
{
    if (setjmp(J->env)) {
        /* GLPK hit a fatal error: its environment is unusable; free it whole.
         * (Without a thread of keel's own this is the caller's too.) */
        J->faulty = true;
        if (J->cover) {
            J->cover = false;
            pthread_mutex_unlock(&cover_cuts);
        }
        glp_free_env();
        return;
    }
    glp_term_hook(swallow, J);
    glp_term_out(GLP_OFF);
    glp_error_hook(on_glpk_error, J);
    if (own_env)
        glp_mem_limit(J->mem_mb);
    glp_prob *P = load(J->lp);
    solve_loaded(J, P);
    glp_delete_prob(P);
    glp_error_hook(NULL, NULL);
    if (own_env)
        glp_free_env();
    else
        glp_term_hook(NULL, NULL);
}

static void *run_thread(void *arg)
{
    run(arg, true);
    return NULL;
}

/* Without thread-local environments in GLPK, solves share one environment:
 * they run one at a time on the caller's thread. */
static pthread_mutex_t shared_env = PTHREAD_MUTEX_INITIALIZER;

keel_status keel_lp_solve(keel_lp *lp, long time_limit_ms, const double *start,
                          keel_lp_result *res, keel_error *err)
{
    *res = (keel_lp_result){.outcome = KEEL_LP_UNKNOWN};
    if (lp->nomem)
        return keel_error_add(err, KEEL_ERR_NOMEM, NULL, 0, 0, NULL, "out of memory");
    if (time_limit_ms <= 0)
        return KEEL_OK;
    free(lp->x);
    lp->x = keel_calloc((size_t)lp->ncols + 1, sizeof *lp->x);
    if (!lp->x)
        return keel_error_add(err, KEEL_ERR_NOMEM, NULL, 0, 0, NULL, "out of memory");
    job J = {.lp = lp,
             .time_limit_ms = time_limit_ms,
             .start = start,
             .mem_mb = memory_mb ? memory_mb : LP_MEM_LIMIT_MB};
    J.res.outcome = KEEL_LP_UNKNOWN;
    if (glp_config("TLS")) {
        pthread_t thread;
        if (pthread_create(&thread, NULL, run_thread, &J) != 0)
            return keel_error_add(err, KEEL_ERR_SOLVER, NULL, 0, 0, NULL,
                                  "could not start a thread for the integer programming "
                                  "solver (GLPK)");
        pthread_join(thread, NULL);
    } else {
        pthread_mutex_lock(&shared_env);
        int was = glp_term_out(GLP_OFF);
        run(&J, false);
        if (!J.faulty)
            glp_term_out(was);
        pthread_mutex_unlock(&shared_env);
    }
    if (J.faulty && J.memory)
        return keel_error_add(err, KEEL_ERR_SOLVER, NULL, 0, 0, NULL,
                              "the integer programming solver (GLPK) reached its memory limit "
                              "of %d MiB; the roster is too large for one solve at this limit",
                              J.mem_mb);
    if (J.faulty)
        return keel_error_add(err, KEEL_ERR_SOLVER, NULL, 0, 0, NULL,
                              "the integer programming solver (GLPK) failed%s%s",
                              J.said[0] ? ": " : "", J.said);
    if (J.ret)
        return keel_error_add(err, KEEL_ERR_SOLVER, NULL, 0, 0, NULL,
                              "the integer programming solver (GLPK) stopped with code %d", J.ret);
    *res = J.res;
    return KEEL_OK;
}
