/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * answer.c - the one chain of answerers (see answer.h): a question goes to
 * each answerer of its chain in turn, each until its share of the
 * question's time (budget.c), until one says yes or no.  Also the two
 * answerers too small for a file of their own: the sums and the greedy
 * placement.
 *
 * The window chain: the sums refute what no packing can hold; the dedicated
 * search takes a quick look (most questions end there); the local search
 * from the incumbent finds tight packings; the dedicated search again, until
 * half of the time, finds and refutes what GLPK's relaxation cannot; GLPK
 * answers the questions its relaxation decides.  The valid chain: the
 * greedy placement, the dedicated search, GLPK on the bare question (it
 * proves most rosters without an assignment quickly), then the least
 * severity, whose objective leads GLPK to assignments faster.
 */
#include "answer.h"

#include <limits.h>
#include <stdlib.h>
#include <string.h>

#include "alloc.h"
#include "budget.h"
#include "heur.h"
#include "measure.h"

/* The sums: the counted nurses' windows cannot hold the unit's care, or the
 * patients whose eligible nurses all lie within the eligible nurses of some
 * patient need more care than those nurses' windows hold (a competency
 * group that cannot fit).  Answers NO or UNKNOWN. */
static keel_status answer_sums(const keel_question *q, long long deadline_ms, int *nurse_of,
                               keel_answer *answer, keel_error *err)
{
    (void)deadline_ms;
    (void)nurse_of;
    const keel_workload *w = q->w;
    size_t np = w->npatients, nn = w->nnurses;
    long long low = 0, high = 0, total = 0;
    *answer = KEEL_ANSWER_NO;
    for (size_t n = 0; n < nn; n++) {
        if (!keel_workload_counted(w, n))
            continue;
        if (q->lo[n] < 0 || q->hi[n] < 0 || q->lo[n] > q->hi[n])
            return KEEL_OK;
        low += q->lo[n];
        high += q->hi[n];
    }
    for (size_t p = 0; p < np; p++)
        total += w->care_minutes[p];
    if (total < low || total > high)
        return KEEL_OK;
    /* The groups: patients alike by eligibility form one class each. */
    keel_classes cl;
    if (!keel_measure_classes(w, &cl)) {
        keel_measure_classes_free(&cl);
        return keel_error_add(err, KEEL_ERR_NOMEM, NULL, 0, 0, NULL, "out of memory");
    }
    bool fits = true;
    for (size_t g = 0; g < cl.k && fits; g++) {
        const bool *set = &w->eligible[cl.first[g] * nn];
        long long room = 0, need = 0;
        for (size_t n = 0; n < nn; n++)
            if (set[n])
                room += q->hi[n];
        for (size_t a = 0; a < cl.k; a++)
            if (cl.within[a * cl.k + g])
                need += cl.care[a];
        fits = need <= room;
    }
    keel_measure_classes_free(&cl);
    if (fits)
        *answer = KEEL_ANSWER_UNKNOWN;
    return KEEL_OK;
}

/* True when nurse_of keeps the windows of q. */
static bool fits(const keel_question *q, const int *nurse_of)
{
    const keel_workload *w = q->w;
    for (size_t n = 0; n < w->nnurses; n++) {
        if (!keel_workload_counted(w, n))
            continue;
        long long care = 0;
        for (size_t p = 0; p < w->npatients; p++)
            care += nurse_of[p] == (int)n ? w->care_minutes[p] : 0;
        if (care < q->lo[n] || care > q->hi[n])
            return false;
    }
    return true;
}

/* The greedy placement: YES when it places everyone, keeps every rule and
 * the windows; else UNKNOWN. */
static keel_status answer_greedy(const keel_question *q, long long deadline_ms, int *nurse_of,
                                 keel_answer *answer, keel_error *err)
{
    (void)deadline_ms;
    bool placed_all = false, valid = false;
    *answer = KEEL_ANSWER_UNKNOWN;
    keel_status rc = keel_heur_greedy_place(q->w, nurse_of, &placed_all);
    if (!rc && placed_all)
        rc = keel_measure_validate(q->w, nurse_of, &valid);
    if (rc)
        return keel_error_add(err, rc, NULL, 0, 0, NULL, "out of memory");
    if (valid && fits(q, nurse_of))
        *answer = KEEL_ANSWER_YES;
    return KEEL_OK;
}

/* One link of a chain: an answerer, until its share of the question's time
 * (KEEL_NSHARES: until the question's deadline), with a node budget for the
 * dedicated search. */
typedef struct link {
    const char *name;
    keel_answerer ask;
    keel_share_id share;
    long nodes;
} link;

static const link window_chain[] = {
    {"sums", answer_sums, KEEL_NSHARES, 0},
    {"fit.quick", keel_answer_fit, KEEL_NSHARES, KEEL_NODES_QUICK},
    {"local", keel_answer_local, KEEL_SHARE_CHAIN_LOCAL, 0},
    {"fit", keel_answer_fit, KEEL_SHARE_CHAIN_FIT, LONG_MAX},
    {"ilp", keel_answer_ilp, KEEL_NSHARES, 0},
};

static const link valid_chain[] = {
    {"greedy", answer_greedy, KEEL_NSHARES, 0},
    {"fit", keel_answer_fit, KEEL_NSHARES, KEEL_NODES_VALID},
    {"ilp", keel_answer_ilp, KEEL_SHARE_VALID_ILP, 0},
    {"severity", keel_answer_severity, KEEL_NSHARES, 0},
};

keel_status keel_answer_ask(keel_chain chain, const keel_question *q, long long deadline_ms,
                            int *nurse_of, keel_answer *answer, keel_error *err)
{
    const link *links = chain == KEEL_CHAIN_WINDOW ? window_chain : valid_chain;
    size_t nlinks = chain == KEEL_CHAIN_WINDOW ? sizeof window_chain / sizeof *window_chain
                                               : sizeof valid_chain / sizeof *valid_chain;
    long long started = keel_budget_now();
    *answer = KEEL_ANSWER_UNKNOWN;
    for (size_t i = 0; i < nlinks && *answer == KEEL_ANSWER_UNKNOWN; i++) {
        long long until = links[i].share == KEEL_NSHARES
                              ? deadline_ms
                              : keel_budget_until(links[i].share, started, deadline_ms, 0);
        keel_question asked = *q;
        asked.nodes = links[i].nodes;
        keel_status rc = links[i].ask(&asked, until, nurse_of, answer, err);
        if (rc)
            return rc;
        /* A yes that spends more hand-offs than the budget answers nothing. */
        if (*answer == KEEL_ANSWER_YES && keel_measure_kept(q->w, nurse_of) < q->min_kept)
            *answer = KEEL_ANSWER_UNKNOWN;
    }
    return KEEL_OK;
}

keel_status keel_answer_valid(const keel_workload *w, long long deadline_ms, int *nurse_of,
                              keel_answer *answer, keel_error *err)
{
    size_t nn = w->nnurses;
    long long *lo = keel_calloc(nn ? nn : 1, sizeof *lo);
    long long *hi = keel_calloc(nn ? nn : 1, sizeof *hi);
    *answer = KEEL_ANSWER_UNKNOWN;
    if (!lo || !hi) {
        free(lo);
        free(hi);
        return keel_error_add(err, KEEL_ERR_NOMEM, NULL, 0, 0, NULL, "out of memory");
    }
    long long total = 0;
    for (size_t p = 0; p < w->npatients; p++)
        total += w->care_minutes[p];
    for (size_t n = 0; n < nn; n++)
        hi[n] = total;
    keel_question q = {.w = w, .lo = lo, .hi = hi};
    keel_status rc = keel_answer_ask(KEEL_CHAIN_VALID, &q, deadline_ms, nurse_of, answer, err);
    free(lo);
    free(hi);
    return rc;
}
