/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * rebalance_shift.c - the whole shift after a rebalance (keel/rebalance.h,
 * keel_rebalance_shift()): the input roster, each present patient with the
 * chosen option's nurse from the time of the rebalance on, and with that
 * time each patient's record of who held her before it, so that the
 * roster written feeds keel check, keel audit and the next rebalance.
 * After the solve: it reads the input's plan as keel check does
 * (keel_plan_from_roster()).
 *
 * Invariant: a record written here covers the patient's stay from her
 * arrival up to the time of the rebalance (or her departure) without gaps,
 * as the loader asks.
 */
#include "keel/rebalance.h"

#include <stdlib.h>
#include <string.h>

#include "alloc.h"
#include "keel/plan.h"
#include "roster_internal.h"
#include "workload_internal.h"

static void free_names(char **names, size_t count)
{
    for (size_t i = 0; names && i < count; i++)
        free(names[i]);
    free(names);
}

/* Sets p's nurse and planned hand-offs to those of the option's plan for
 * the frontier's patient j (parts of w); false when memory ran out. */
static bool follow_plan(const keel_roster *r, const keel_workload *w, const int *nurse_of, size_t j,
                        keel_patient *p)
{
    int first = w->first_part[j], end = w->first_part[j + 1];
    free(p->nurse);
    free_names(p->handoffs, p->nhandoffs);
    p->nurse = NULL;
    p->handoffs = NULL;
    p->nhandoffs = 0;
    if (first == end || nurse_of[first] < 0)
        return true;
    if (!(p->nurse = keel_strdup(r->nurses[nurse_of[first]].id)))
        return false;
    if (!(p->handoffs = keel_calloc((size_t)(end - first), sizeof *p->handoffs)))
        return false;
    for (int q = first + 1; q < end; q++) {
        if (nurse_of[q] < 0 || nurse_of[q] == nurse_of[q - 1])
            continue;
        if (!(p->handoffs[p->nhandoffs++] = keel_strdup(r->nurses[nurse_of[q]].id)))
            return false;
    }
    return true;
}

/* Sets p's record to who held roster patient i up to t as the input plan
 * plan (parts of w) has her: a part with nobody goes on with the nurse
 * before it, and adjacent stretches of one nurse are joined.  False when
 * memory ran out. */
static bool record_until(const keel_roster *r, const keel_workload *w, const int *plan, size_t i,
                         int t, keel_patient *p)
{
    int first = w->first_part[i], end = w->first_part[i + 1];
    for (size_t k = 0; k < p->nrecord; k++)
        free(p->record[k].nurse);
    free(p->record);
    p->nrecord = 0;
    if (!(p->record = keel_calloc((size_t)(end - first) + 1, sizeof *p->record)))
        return false;
    for (int q = first; q < end && w->part_start[q] < t; q++) {
        keel_stretch *last = p->nrecord ? &p->record[p->nrecord - 1] : NULL;
        int to = w->part_end[q] < t ? w->part_end[q] : t;
        const char *nurse = plan[q] >= 0 ? r->nurses[plan[q]].id : last ? last->nurse : NULL;
        if (!nurse)
            continue; /* nobody has her yet: a new patient */
        if (last && last->to == w->part_start[q] && strcmp(last->nurse, nurse) == 0) {
            last->to = to;
            continue;
        }
        keel_stretch *next = &p->record[p->nrecord];
        *next = (keel_stretch){.from = w->part_start[q], .to = to};
        if (!(next->nurse = keel_strdup(nurse)))
            return false;
        p->nrecord++;
    }
    return true;
}

/* Patient i of the whole shift at t: her record up to t; her nurse and
 * hand-offs from t on, from the option's plan, or (when she has left) the
 * record's last nurse and none. */
static bool patient_shift(const keel_rebalance *rb, const int *plan, const keel_workload *win,
                          const int *nurse_of, size_t i, int t, keel_patient *p)
{
    const keel_roster *in = rb->shift;
    int j = rb->index[i];
    int arrives = p->arrives_at == KEEL_ABSENT ? 0 : p->arrives_at;
    if (!record_until(in, win, plan, i, t, p))
        return false;
    if (j >= 0 && !follow_plan(rb->roster, rb->workload, nurse_of, (size_t)j, p))
        return false;
    if (j < 0) {
        free_names(p->handoffs, p->nhandoffs);
        p->handoffs = NULL;
        p->nhandoffs = 0;
        if (p->nrecord) {
            free(p->nurse);
            if (!(p->nurse = keel_strdup(p->record[p->nrecord - 1].nurse)))
                return false;
        }
    }
    if (arrives < t) {
        p->expected = false; /* she has arrived */
        if (p->nrecord == 0)
            p->arrives_at = t; /* new, typed in: here from the rebalance on */
    }
    return true;
}

keel_status keel_rebalance_shift(const keel_rebalance *rb, size_t k, keel_roster **out,
                                 keel_error *err)
{
    const keel_roster *in = rb->shift;
    keel_workload *win = NULL;
    int *plan = NULL;
    *out = NULL;
    if (k >= rb->noptions || !rb->options[k].found)
        return keel_error_add(err, KEEL_ERR_USAGE, NULL, 0, 0, NULL,
                              "the chosen option has no plan to write");
    const int *nurse_of = rb->options[k].solution->nurse_of;
    keel_roster *c = keel_roster_copy(in);
    keel_status rc = c ? KEEL_OK : KEEL_ERR_NOMEM;
    if (!rc && rb->at_offset >= 0) {
        rc = keel_workload_compute(in, &win, err);
        if (!rc && !(plan = keel_calloc(win->npatients ? win->npatients : 1, sizeof *plan)))
            rc = KEEL_ERR_NOMEM;
        if (!rc)
            keel_plan_from_roster(in, win, plan);
    }
    for (size_t i = 0; !rc && i < in->npatients; i++) {
        bool ok = rb->at_offset >= 0
                      ? patient_shift(rb, plan, win, nurse_of, i, rb->at_offset, &c->patients[i])
                  : rb->index[i] >= 0 ? follow_plan(rb->roster, rb->workload, nurse_of,
                                                    (size_t)rb->index[i], &c->patients[i])
                                      : true;
        rc = ok ? KEEL_OK : KEEL_ERR_NOMEM;
    }
    free(plan);
    keel_workload_free(win);
    if (rc == KEEL_ERR_NOMEM)
        keel_error_add(err, rc, NULL, 0, 0, NULL, "out of memory");
    if (rc) {
        keel_roster_free(c);
        return rc;
    }
    *out = c;
    return KEEL_OK;
}
