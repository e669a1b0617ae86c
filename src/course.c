/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * course.c - the course of the shift under an assignment: per-nurse
 * timelines, break cover and the admission order (keel/course.h).  Runs
 * after the solve; reads the roster, the workload and nurse_of, and never
 * changes them.  Every count comes from one table of patients held per
 * nurse and moment, exact because counts change only at moment boundaries.
 */
#include "keel/course.h"

#include <stdlib.h>
#include <string.h>

#include "alloc.h"
#include "workload_internal.h"

/* Patients held per nurse and moment: held[n * nmoments + m].  A patient
 * has one part covering a moment, so parts counted are patients counted. */
static int *count_held(const keel_workload *w, const int *nurse_of)
{
    size_t nm = w->nmoments;
    int *held = keel_calloc((w->nnurses ? w->nnurses : 1) * nm, sizeof *held);
    if (!held)
        return NULL;
    for (size_t q = 0; q < w->npatients; q++) {
        if (nurse_of[q] < 0)
            continue;
        for (int m = w->first_moment[q]; m < w->last_moment[q]; m++)
            held[(size_t)nurse_of[q] * nm + (size_t)m]++;
    }
    return held;
}

/* The moment that starts at minute t (t a moment boundary below the
 * shift's end); the last moment when t is past every start. */
static size_t moment_at(const keel_workload *w, int t)
{
    size_t m = 0;
    while (m + 1 < w->nmoments && w->moment_start[m + 1] <= t)
        m++;
    return m;
}

/* ------------------------------------------------------------------ */
/* Timelines                                                           */
/* ------------------------------------------------------------------ */

static keel_status fill_timeline(const keel_workload *w, const int *held, size_t n,
                                 keel_course_timeline *t)
{
    size_t nm = w->nmoments;
    int start = w->nurse_start[n], end = w->nurse_end[n];
    t->changes = keel_calloc(nm + 1, sizeof *t->changes);
    if (!t->changes)
        return KEEL_ERR_NOMEM;
    for (size_t m = moment_at(w, start); m < nm && w->moment_start[m] < end; m++) {
        int count = held[n * nm + m];
        if (t->nchanges == 0 || t->changes[t->nchanges - 1].patients != count)
            t->changes[t->nchanges++] = (keel_course_change){w->moment_start[m], count};
    }
    if (end < w->shift_minutes)
        t->changes[t->nchanges++] = (keel_course_change){end, KEEL_COURSE_OFF};
    return KEEL_OK;
}

/* ------------------------------------------------------------------ */
/* Break cover                                                         */
/* ------------------------------------------------------------------ */

static bool overlaps(int a, int b, int s, int e)
{
    return a < e && s < b;
}

/* The most patients nurses n and cover (or n alone, cover < 0) hold
 * together at one moment of [a, b). */
static int most_during(const keel_workload *w, const int *held, size_t n, int cover, int a, int b)
{
    size_t nm = w->nmoments;
    int most = 0;
    for (size_t m = 0; m < nm; m++) {
        if (!overlaps(a, b, w->moment_start[m], w->moment_start[m + 1]))
            continue;
        int count = held[n * nm + m] + (cover >= 0 ? held[(size_t)cover * nm + m] : 0);
        if (count > most)
            most = count;
    }
    return most;
}

/* The patients nurse n holds at some moment of [a, b), ascending (parts
 * are in patient order, so a repeat is always the last one added). */
static keel_status handed_over(const keel_workload *w, const int *nurse_of, size_t n, int a, int b,
                               keel_break_cover *bc)
{
    bc->patients = keel_calloc(w->npeople ? w->npeople : 1, sizeof *bc->patients);
    if (!bc->patients)
        return KEEL_ERR_NOMEM;
    for (size_t q = 0; q < w->npatients; q++) {
        if (nurse_of[q] != (int)n || !overlaps(a, b, w->part_start[q], w->part_end[q]))
            continue;
        size_t p = (size_t)w->patient[q];
        if (bc->npatients == 0 || bc->patients[bc->npatients - 1] != p)
            bc->patients[bc->npatients++] = p;
    }
    return KEEL_OK;
}

/* True when no buddy of nurse n can hold her patients within the limit
 * during [a, b): none is free, or the first free one would go over. */
static bool needs_relief(const keel_roster *r, const keel_workload *w, const int *held, size_t n,
                         int a, int b)
{
    for (size_t i = 0; i < r->nnurses; i++) {
        if (i == n || !r->nurses[i].covers || strcmp(r->nurses[i].covers, r->nurses[n].id) != 0 ||
            !keel_workload_cover_free(r, w, i, a, b))
            continue;
        return most_during(w, held, n, (int)i, a, b) >
               keel_workload_cover_limit(w, n, (int)i, false);
    }
    return true;
}

/* One break of the break plan (w->covers[k]) under the assignment. */
static keel_status cover_break(const keel_roster *r, const keel_workload *w, const int *nurse_of,
                               const int *held, size_t k, keel_break_cover *bc)
{
    const keel_cover *cv = &w->covers[k];
    int a = cv->start, b = cv->end;
    *bc = (keel_break_cover){.nurse = cv->nurse, .brk = cv->brk, .at = a, .minutes = b - a,
                             .cover = -1, .limit = cv->limit};
    if (handed_over(w, nurse_of, cv->nurse, a, b, bc))
        return KEEL_ERR_NOMEM;
    bc->most = most_during(w, held, cv->nurse, -1, a, b);
    if (bc->npatients == 0)
        return KEEL_OK; /* she holds nobody during the break: nothing to hand over */
    bc->cover = cv->cover;
    bc->relief = cv->relief;
    bc->most = most_during(w, held, cv->nurse, cv->cover, a, b);
    bc->needs_relief = needs_relief(r, w, held, cv->nurse, a, b);
    if (bc->cover < 0)
        bc->rule = "no_cover";
    else if (bc->most > bc->limit)
        bc->rule = w->law_limit != KEEL_ABSENT ? "law_limit" : "patient_limit";
    return KEEL_OK;
}

/* The most breaks needing a relief nurse at one time: some such break
 * starts at a time of the greatest overlap. */
static int most_needing_relief(const keel_course *c)
{
    int most = 0;
    for (size_t i = 0; i < c->nbreaks; i++) {
        if (!c->breaks[i].needs_relief)
            continue;
        int t = c->breaks[i].at, count = 0;
        for (size_t j = 0; j < c->nbreaks; j++) {
            const keel_break_cover *o = &c->breaks[j];
            count += o->needs_relief && o->at <= t && t < o->at + o->minutes;
        }
        if (count > most)
            most = count;
    }
    return most;
}

static keel_status plan_breaks(const keel_roster *r, const keel_workload *w, const int *nurse_of,
                               const int *held, keel_course *c)
{
    for (size_t n = 0; n < r->nnurses; n++)
        c->relief_on_roster += r->nurses[n].role == KEEL_ROLE_RELIEF;
    c->breaks = keel_calloc(w->ncovers ? w->ncovers : 1, sizeof *c->breaks);
    if (!c->breaks)
        return KEEL_ERR_NOMEM;
    for (size_t k = 0; k < w->ncovers; k++) {
        c->nbreaks++;
        if (cover_break(r, w, nurse_of, held, k, &c->breaks[k]))
            return KEEL_ERR_NOMEM;
    }
    c->relief_needed = most_needing_relief(c);
    return KEEL_OK;
}

/* ------------------------------------------------------------------ */
/* Admission order                                                     */
/* ------------------------------------------------------------------ */

/* The most patients nurse n may hold at her last moment on the unit: her
 * patient limit and the "1:N" of every patient she holds then. */
static int room_limit(const keel_workload *w, const int *nurse_of, size_t n, size_t last)
{
    int limit = w->max_patients[n];
    for (size_t q = 0; q < w->npatients; q++)
        if (nurse_of[q] == (int)n && w->first_moment[q] <= (int)last &&
            (int)last < w->last_moment[q] && w->ratio_limit[q] < limit)
            limit = w->ratio_limit[q];
    return limit;
}

static keel_status order_admissions(const keel_workload *w, const int *nurse_of, const int *held,
                                    size_t nadmissions, keel_course *c)
{
    size_t nn = w->nnurses, nm = w->nmoments;
    long long total = 0;
    for (size_t q = 0; q < w->npatients; q++)
        total += w->care_minutes[q];
    c->admission_minutes =
        w->npeople ? (int)((total + (long long)w->npeople - 1) / (long long)w->npeople) : 0;

    long long *load = keel_calloc(nn ? nn : 1, sizeof *load);
    int *room = keel_calloc(nn ? nn : 1, sizeof *room); /* admissions she may still take */
    c->picks = keel_calloc(nadmissions ? nadmissions : 1, sizeof *c->picks);
    if (!load || !room || !c->picks) {
        free(load);
        free(room);
        return KEEL_ERR_NOMEM;
    }
    for (size_t n = 0; n < nn; n++)
        load[n] = w->duty_minutes[n];
    for (size_t q = 0; q < w->npatients; q++)
        if (nurse_of[q] >= 0)
            load[nurse_of[q]] += w->care_minutes[q];
    for (size_t n = 0; n < nn; n++) {
        if (!keel_workload_counted(w, n) || w->capacity_minutes[n] <= 0)
            continue;
        size_t last = moment_at(w, w->nurse_end[n] - 1);
        room[n] = room_limit(w, nurse_of, n, last) - held[n * nm + last];
    }
    while (c->npicks < nadmissions) {
        int best = -1;
        long long best_load = 0;
        for (size_t n = 0; n < nn; n++) {
            if (room[n] <= 0)
                continue;
            long long after = load[n] + c->admission_minutes;
            /* after / cap(n) < best_load / cap(best), exactly */
            if (best < 0 ||
                after * w->capacity_minutes[best] < best_load * w->capacity_minutes[n]) {
                best = (int)n;
                best_load = after;
            }
        }
        if (best < 0)
            break;
        load[best] = best_load;
        room[best]--;
        c->picks[c->npicks++] = (keel_admission_pick){
            (size_t)best, (int)best_load, (double)best_load / (double)w->capacity_minutes[best],
            best_load > w->capacity_minutes[best]};
    }
    free(load);
    free(room);
    return KEEL_OK;
}

/* ------------------------------------------------------------------ */

keel_status keel_course_compute(const keel_roster *r, const keel_workload *w, const int *nurse_of,
                                size_t nadmissions, keel_course **out, keel_error *err)
{
    keel_status rc = KEEL_ERR_NOMEM;
    int *held = NULL;
    keel_course *c = keel_calloc(1, sizeof *c);
    *out = NULL;
    if (!c)
        goto out;
    held = count_held(w, nurse_of);
    c->nnurses = w->nnurses;
    c->timelines = keel_calloc(w->nnurses ? w->nnurses : 1, sizeof *c->timelines);
    if (!held || !c->timelines)
        goto out;
    for (size_t n = 0; n < w->nnurses; n++)
        if (fill_timeline(w, held, n, &c->timelines[n]))
            goto out;
    if (plan_breaks(r, w, nurse_of, held, c))
        goto out;
    if (order_admissions(w, nurse_of, held, nadmissions, c))
        goto out;
    rc = KEEL_OK;
out:
    free(held);
    if (rc) {
        keel_course_free(c);
        return keel_error_add(err, rc, NULL, 0, 0, NULL, "out of memory");
    }
    *out = c;
    return KEEL_OK;
}

void keel_course_free(keel_course *c)
{
    if (!c)
        return;
    if (c->timelines)
        for (size_t n = 0; n < c->nnurses; n++)
            free(c->timelines[n].changes);
    free(c->timelines);
    if (c->breaks)
        for (size_t i = 0; i < c->nbreaks; i++)
            free(c->breaks[i].patients);
    free(c->breaks);
    free(c->picks);
    free(c);
}
