/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * rebalance_at.c - keel rebalance --at: the roster of the rest of the
 * shift, from t minutes after its start on (docs/model.md, "The time of
 * the rebalance", has the arithmetic and a worked example).  L is the
 * shift's length, L' = L - t the rest of it; all figures whole minutes.
 *
 *   shift     starts at the time of the rebalance and lasts L'; its untimed
 *             break is ceil(break * L' / L)
 *   nurse     times move back by t; a nurse who left at or before t takes
 *             no patients; timed breaks that ended by t are taken, one
 *             under way is cut at t; an untimed break counts in proportion
 *             to her time left, rounded up, and so does her `minutes`
 *             (rounded down) when she has no times; her duty minutes count
 *             in proportion to her time left, rounded up; a nurse left
 *             without time for patients takes none
 *   patient   present over [a, b): one who left at or before t was
 *             discharged and is left out; with present = her care without
 *             extras over [a, b) (the clock's own figure), the care left is
 *             present - ceil(present * (max(a, t) - a) / (b - a)), given as
 *             care_minutes c' = floor(left care * L' / d) over her d minutes
 *             in the rest of the shift, so that the clock's share,
 *             ceil(c' * d / L'), is exactly the care left; a patient who has
 *             a nurse and came before t has had her extras (dropped), a new
 *             one keeps them in full; planned hand-offs before t have
 *             happened (the nurse then is the current one)
 */
#include "rebalance_at.h"

#include <stdlib.h>
#include <string.h>

#include "alloc.h"
#include "roster_internal.h"
#include "workload_internal.h"

static int or_default(int value, int fallback)
{
    return value == KEEL_ABSENT ? fallback : value;
}

static long long ceil_div(long long a, long long b)
{
    return (a + b - 1) / b;
}

/* The end of nurse i's time on the unit, in minutes after the start. */
static int nurse_end(const keel_roster *r, int i)
{
    return i < 0 ? r->shift.minutes : or_default(r->nurses[i].end, r->shift.minutes);
}

/* Nurse i's untimed break over her whole time (keel/workload.h). */
static int untimed_break(const keel_roster *r, size_t i)
{
    const keel_nurse *n = &r->nurses[i];
    if (keel_workload_no_break(r, i))
        return 0;
    return or_default(n->break_minutes, or_default(r->shift.break_minutes, 0));
}

/* Nurse i of the copy, from the original o, for the rest from t on. */
static void nurse_at(const keel_roster *r, size_t i, int t, keel_nurse *n)
{
    const keel_nurse *o = &r->nurses[i];
    int L = r->shift.minutes, rest = L - t;
    long long on, left;
    if (o->start != KEEL_ABSENT || o->end != KEEL_ABSENT) {
        int s = or_default(o->start, 0), e = or_default(o->end, L);
        if (e <= t) { /* she has gone */
            n->max_patients = 0;
            n->start = n->end = KEEL_ABSENT;
            n->nbreaks = 0;
            n->break_minutes = 0;
            return;
        }
        n->start = s > t ? s - t : KEEL_ABSENT;
        n->end = e < L ? e - t : KEEL_ABSENT;
        on = e - s;
        left = e - (s > t ? s : t);
    } else {
        on = or_default(o->minutes, L);
        left = on * rest / L;
        n->minutes = left == rest ? KEEL_ABSENT : (int)left;
    }
    long long breaks = 0;
    if (o->nbreaks > 0) {
        size_t k = 0;
        for (size_t b = 0; b < o->nbreaks; b++) {
            int from = o->breaks[b].at, to = from + o->breaks[b].minutes;
            if (to <= t)
                continue; /* taken */
            n->breaks[k] = o->breaks[b];
            n->breaks[k].at = (from > t ? from : t) - t;
            n->breaks[k].minutes = to - (from > t ? from : t);
            breaks += n->breaks[k].minutes;
            k++;
        }
        n->nbreaks = k;
        if (k == 0)
            n->break_minutes = 0;
    } else {
        int whole = untimed_break(r, i);
        breaks = whole > 0 && on > 0 ? ceil_div((long long)whole * left, on) : 0;
        n->break_minutes = (int)breaks;
    }
    int duty = or_default(o->duty_minutes, or_default(r->policy.roles[o->role].duty_minutes, 0));
    if (duty > 0)
        n->duty_minutes = on > 0 ? (int)ceil_div((long long)duty * left, on) : 0;
    if (left - breaks <= 0)
        n->max_patients = 0; /* no time left for patients */
}

static void free_names(char **names, size_t count)
{
    for (size_t i = 0; names && i < count; i++)
        free(names[i]);
    free(names);
}

/* The nurse patient p has at t: its `nurse`, or the planned hand-offs'
 * nurse by then; the hand-offs still to come stay.  False when memory ran
 * out. */
static bool current_at(const keel_roster *r, keel_patient *p, int t)
{
    size_t done = 0;
    int now = p->nurse ? keel_roster_find_nurse(r, p->nurse) : -1;
    while (p->nurse && done < p->nhandoffs && nurse_end(r, now) <= t)
        now = keel_roster_find_nurse(r, p->handoffs[done++]);
    if (done == 0)
        return true;
    char *nurse = keel_strdup(p->handoffs[done - 1]);
    if (!nurse)
        return false;
    free(p->nurse);
    p->nurse = nurse;
    for (size_t i = 0; i < done; i++)
        free(p->handoffs[i]);
    memmove(p->handoffs, p->handoffs + done, (p->nhandoffs - done) * sizeof *p->handoffs);
    p->nhandoffs -= done;
    return true;
}

/* The record is history: the rest of the shift starts after it. */
static void drop_record(keel_patient *p)
{
    for (size_t k = 0; k < p->nrecord; k++)
        free(p->record[k].nurse);
    free(p->record);
    p->record = NULL;
    p->nrecord = 0;
}

/* Patient i of the copy, from the original, for the rest from t on. */
static bool patient_at(const keel_roster *r, const keel_workload *w, size_t i, int t,
                       keel_patient *p)
{
    const keel_patient *o = &r->patients[i];
    int L = r->shift.minutes, rest = L - t;
    int a = or_default(o->arrives_at, 0), b = or_default(o->leaves_at, L);
    long long extras = 0;
    for (size_t x = 0; x < o->nextras; x++)
        extras += or_default(keel_roster_extra_minutes(r, o->extras[x]), 0);
    long long present = keel_workload_patient_care(w, i) - extras;
    long long left = a < t ? present - ceil_div(present * (t - a), b - a) : present;
    if (!current_at(r, p, t))
        return false;
    if (p->nurse && !o->expected && a < t) { /* with her nurse: the extras are done */
        free_names(p->extras, p->nextras);
        p->extras = NULL;
        p->nextras = 0;
    }
    if (a < t)
        p->expected = false; /* arrived: a patient now */
    p->arrives_at = a > t ? a - t : KEEL_ABSENT;
    p->leaves_at = b < L ? b - t : KEEL_ABSENT;
    long long d = (b < L ? b : L) - (a > t ? a : t);
    p->care_minutes = (int)(left * rest / d);
    free_names(p->nas, p->nnas);
    p->nas = NULL;
    p->nnas = 0;
    drop_record(p);
    return true;
}

/* True when some nurse or patient of r has a time of its own. */
static bool clocked(const keel_roster *r)
{
    for (size_t n = 0; n < r->nnurses; n++)
        if (r->nurses[n].start != KEEL_ABSENT || r->nurses[n].end != KEEL_ABSENT ||
            r->nurses[n].nbreaks > 0)
            return true;
    for (size_t p = 0; p < r->npatients; p++)
        if (r->patients[p].arrives_at != KEEL_ABSENT || r->patients[p].leaves_at != KEEL_ABSENT)
            return true;
    return false;
}

/* Keeps the patients of c for whom gone() is false, in order, each passed
 * to keep() (false when memory ran out); index as for keel_rebalance_at(). */
static bool keep_patients(const keel_roster *r, keel_roster *c, size_t *discharged, int *index,
                          bool (*gone)(const keel_roster *r, size_t p, const void *ctx),
                          bool (*keep)(size_t p, keel_patient *mine, const void *ctx),
                          const void *ctx)
{
    size_t k = 0;
    bool ok = true;
    *discharged = 0;
    for (size_t p = 0; p < r->npatients; p++) {
        keel_patient mine = c->patients[p];
        index[p] = -1;
        if (gone(r, p, ctx)) {
            keel_roster_data_patient_fini(&mine);
            (*discharged)++;
            continue;
        }
        /* Whatever happens, the patient is kept (the roster frees it). */
        ok = keep(p, &mine, ctx) && ok;
        index[p] = (int)k;
        c->patients[k++] = mine;
    }
    c->npatients = k;
    return ok;
}

/* The context of keel_rebalance_at()'s walk of the patients. */
typedef struct at_ctx {
    const keel_roster *r;
    const keel_workload *w;
    int t;
} at_ctx;

static bool left_before(const keel_roster *r, size_t p, const void *ctx)
{
    const at_ctx *a = ctx;
    return or_default(r->patients[p].leaves_at, r->shift.minutes) <= a->t;
}

static bool keep_at(size_t p, keel_patient *mine, const void *ctx)
{
    const at_ctx *a = ctx;
    return patient_at(a->r, a->w, p, a->t, mine);
}

keel_status keel_rebalance_at(const keel_roster *r, const keel_workload *w, int t,
                              keel_roster **out, size_t *discharged, int *index, keel_error *err)
{
    int L = r->shift.minutes;
    *out = NULL;
    *discharged = 0;
    keel_roster *c = keel_roster_copy(r);
    if (!c)
        return keel_error_add(err, KEEL_ERR_NOMEM, NULL, 0, 0, NULL, "out of memory");
    c->shift.start_minute = (r->shift.start_minute + t) % (24 * 60);
    c->shift.minutes = L - t;
    if (r->shift.break_minutes != KEEL_ABSENT)
        c->shift.break_minutes = (int)ceil_div((long long)r->shift.break_minutes * (L - t), L);
    for (size_t n = 0; n < r->nnurses; n++)
        nurse_at(r, n, t, &c->nurses[n]);
    at_ctx ctx = {r, w, t};
    bool ok = keep_patients(r, c, discharged, index, left_before, keep_at, &ctx);
    c->clock = clocked(c);
    if (!ok) {
        keel_roster_free(c);
        return keel_error_add(err, KEEL_ERR_NOMEM, NULL, 0, 0, NULL, "out of memory");
    }
    *out = c;
    return KEEL_OK;
}

/* True when patient p's record covers her whole stay: she has left. */
static bool recorded_out(const keel_roster *r, size_t p, const void *ctx)
{
    const keel_patient *pt = &r->patients[p];
    (void)ctx;
    return pt->nrecord > 0 &&
           pt->record[pt->nrecord - 1].to >= or_default(pt->leaves_at, r->shift.minutes);
}

static bool keep_unrecorded(size_t p, keel_patient *mine, const void *ctx)
{
    (void)p;
    (void)ctx;
    drop_record(mine);
    return true;
}

keel_status keel_rebalance_at_unrecorded(const keel_roster *r, keel_roster **out,
                                         size_t *discharged, int *index, keel_error *err)
{
    *out = keel_roster_copy(r);
    if (!*out)
        return keel_error_add(err, KEEL_ERR_NOMEM, NULL, 0, 0, NULL, "out of memory");
    keep_patients(r, *out, discharged, index, recorded_out, keep_unrecorded, NULL);
    return KEEL_OK;
}
