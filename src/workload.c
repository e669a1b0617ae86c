/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * workload.c - derives care minutes, capacity, duty, patient limits and
 * eligible pairs from a validated roster (second stage of the pipeline).
 * Defaults are applied here and nowhere else; see keel/workload.h for the
 * arithmetic.
 */
#include "keel/workload.h"

#include <limits.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "alloc.h"
#include "keel/nas.h"
#include "rule.h"
#include "sort.h"
#include "workload_internal.h"

static int or_default(int value, int fallback)
{
    return value != KEEL_ABSENT ? value : fallback;
}

/* The patient's care for the whole shift, extras aside. */
static int base_care(const keel_roster *r, const keel_patient *p)
{
    int care = p->care_minutes != KEEL_ABSENT ? p->care_minutes
               : p->nnas > 0
                   ? keel_nas_shift_minutes(keel_nas_score(p->nas, p->nnas), r->shift.minutes)
                   : keel_roster_acuity_minutes(r, p->acuity);
    return care == KEEL_ABSENT ? 0 : care; /* absent: unreachable for a validated roster */
}

static int extra_care(const keel_roster *r, const keel_patient *p)
{
    int care = 0;
    for (size_t i = 0; i < p->nextras; i++) {
        int extra = keel_roster_extra_minutes(r, p->extras[i]);
        if (extra != KEEL_ABSENT)
            care += extra;
    }
    return care;
}

/* ceil(a * b / c) for a, b >= 0 and c > 0. */
static long long ceil_share(long long a, long long b, long long c)
{
    return (a * b + c - 1) / c;
}

/* The smallest of the unit's limit, the role's and the nurse's own.  An
 * orientee shares the preceptor's assignment, so takes none of her own. */
static int nurse_limit(const keel_roster *r, const keel_nurse *n, int law)
{
    int limit = (int)r->npatients;
    int given[] = {law, r->policy.max_patients, r->policy.roles[n->role].max_patients,
                   n->max_patients};
    if (n->role == KEEL_ROLE_ORIENTEE)
        return 0;
    /* A relief nurse covers breaks; patients of her own only when told. */
    if (n->role == KEEL_ROLE_RELIEF && n->max_patients == KEEL_ABSENT &&
        r->policy.roles[n->role].max_patients == KEEL_ABSENT)
        return 0;
    for (size_t i = 0; i < sizeof given / sizeof given[0]; i++)
        if (given[i] != KEEL_ABSENT && given[i] < limit)
            limit = given[i];
    return limit;
}

static bool has_every_need(const keel_roster *r, const keel_nurse *n, const keel_patient *p)
{
    size_t nextra = r->policy.nisolation_needs[p->isolation];
    char **extra = r->policy.isolation_needs[p->isolation];
    for (size_t i = 0; i < p->nneeds; i++)
        if (!keel_nurse_has_skill(n, p->needs[i]))
            return false;
    for (size_t i = 0; i < nextra; i++)
        if (!keel_nurse_has_skill(n, extra[i]))
            return false;
    return true;
}

/* Index of name in names[0..*count), added when new; -1 for NULL. */
static int intern(const char **names, size_t *count, const char *name)
{
    if (!name)
        return -1;
    for (size_t i = 0; i < *count; i++)
        if (strcmp(names[i], name) == 0)
            return (int)i;
    names[*count] = name;
    return (int)(*count)++;
}

static signed char side_of(const keel_roster *r, const keel_patient *p)
{
    if (!r->policy.isolation_separation || p->isolation == KEEL_ISOLATION_NONE)
        return KEEL_SIDE_NONE;
    return p->isolation == KEEL_ISOLATION_PROTECTIVE ? KEEL_SIDE_PROTECTIVE : KEEL_SIDE_INFECTIOUS;
}

/* The patients' data the rules read (ratio, high acuity, isolation side,
 * zone), and rooms and previous nurses for the stages that follow the
 * balance. */
static keel_status join_rules(const keel_roster *r, keel_workload *w)
{
    size_t np = w->npatients;
    const char **names = keel_calloc(np ? np : 1, sizeof *names);
    if (!names)
        return KEEL_ERR_NOMEM;
    w->max_high_acuity = r->policy.high_acuity.max_per_nurse;
    w->max_zones = r->policy.max_zones;
    w->tolerance = or_default(r->policy.balance_tolerance, KEEL_TOLERANCE_SCALE / 20);
    for (size_t p = 0; p < np; p++) {
        const keel_patient *pt = &r->patients[w->patient[p]];
        bool first = w->first_part[w->patient[p]] == (int)p;
        w->ratio_limit[p] = pt->ratio != KEEL_ABSENT && pt->ratio < (int)np ? pt->ratio : (int)np;
        w->high_acuity[p] = w->max_high_acuity != KEEL_ABSENT && pt->acuity != KEEL_ABSENT &&
                            pt->acuity >= r->policy.high_acuity.level;
        w->side[p] = side_of(r, pt);
        w->zone[p] = intern(names, &w->nzones, pt->zone);
        w->previous[p] =
            first && pt->previous_nurse ? keel_roster_find_nurse(r, pt->previous_nurse) : -1;
        if (w->previous[p] >= 0)
            w->ncontinuity++;
    }
    for (size_t p = 0; p < np; p++)
        w->room[p] = intern(names, &w->nrooms, r->patients[w->patient[p]].room);
    free(names);
    return KEEL_OK;
}

/* The patient's own restrictions: a locked patient stays with the nurse
 * who has it; a patient never goes to a nurse on its avoid list. */
static bool patient_allows(const keel_patient *p, const keel_nurse *n, bool first)
{
    if (first && p->lock && p->nurse && strcmp(p->nurse, n->id) != 0)
        return false;
    for (size_t i = 0; i < p->navoid; i++)
        if (strcmp(p->avoid[i], n->id) == 0)
            return false;
    return true;
}

/* Limit, competencies, the role's acuity cap and the patient's own
 * restrictions (a lock binds the first part only). */
static bool allowed(const keel_roster *r, const keel_workload *w, size_t p, size_t n, bool first)
{
    const keel_patient *pt = &r->patients[p];
    return w->max_patients[n] > 0 && has_every_need(r, &r->nurses[n], pt) &&
           !keel_rule_pair_over_role_acuity(r, pt, &r->nurses[n]) &&
           patient_allows(pt, &r->nurses[n], first);
}

bool keel_workload_may_take_at_all(const keel_roster *r, const keel_workload *w, size_t p, size_t n)
{
    return allowed(r, w, p, n, true);
}

bool keel_workload_may_take(const keel_roster *r, const keel_workload *w, size_t q, size_t n)
{
    size_t p = (size_t)w->patient[q];
    return allowed(r, w, p, n, keel_workload_first_open(r, w, p) == (int)q) &&
           w->nurse_start[n] <= w->part_start[q] && w->nurse_end[n] >= w->part_end[q];
}

size_t keel_workload_nparts(const keel_workload *w)
{
    return w->npatients;
}

void keel_workload_free(keel_workload *w)
{
    if (!w)
        return;
    free(w->care_minutes);
    free(w->capacity_minutes);
    free(w->duty_minutes);
    free(w->max_patients);
    free(w->eligible);
    free(w->column_kind);
    free(w->ratio_limit);
    free(w->high_acuity);
    free(w->side);
    free(w->zone);
    free(w->room);
    free(w->previous);
    free(w->min_patients);
    free(w->max_care);
    free(w->patient);
    free(w->first_part);
    free(w->part_start);
    free(w->part_end);
    free(w->nurse_start);
    free(w->nurse_end);
    free(w->moment_start);
    free(w->first_moment);
    free(w->last_moment);
    free(w->covers);
    free(w->covered);
    free(w);
}

static int cmp_int(const void *a, const void *b)
{
    int x = *(const int *)a, y = *(const int *)b;
    return (x > y) - (x < y);
}

/* Sorts v[0..n) and drops repeats; returns the count left. */
static size_t sort_unique(int *v, size_t n)
{
    size_t k = 0;
    qsort(v, n, sizeof *v, cmp_int);
    for (size_t i = 0; i < n; i++)
        if (k == 0 || v[k - 1] != v[i])
            v[k++] = v[i];
    return k;
}

/* Index of t in the sorted v[0..n) (t is in it). */
static int find_time(const int *v, size_t n, int t)
{
    const int *at = bsearch(&t, v, n, sizeof *v, cmp_int);
    return at ? (int)(at - v) : 0;
}

static int arrives(const keel_patient *p)
{
    return or_default(p->arrives_at, 0);
}

static int leaves(const keel_roster *r, const keel_patient *p)
{
    return or_default(p->leaves_at, r->shift.minutes);
}

/* The times inside the patient's stay (a, b) at which her stay is cut into
 * parts, sorted into cuts[] (room for nends + her stretches): the nurses'
 * end times ends[0..nends) (sorted) and the ends of her record's
 * stretches.  Returns how many. */
static size_t patient_cuts(const keel_roster *r, const keel_patient *p, const int *ends,
                           size_t nends, int *cuts)
{
    int a = arrives(p), b = leaves(r, p);
    size_t n = 0;
    for (size_t i = 0; i < nends; i++)
        if (ends[i] > a && ends[i] < b)
            cuts[n++] = ends[i];
    for (size_t k = 0; k < p->nrecord; k++)
        if (p->record[k].to > a && p->record[k].to < b)
            cuts[n++] = p->record[k].to;
    return sort_unique(cuts, n);
}

/* Nurses' times, the times the moments of the shift start at and how many
 * parts there are: the first stage of the clock (see keel/workload.h).
 * The times are left unsorted in *bounds_out (room for every break's too);
 * set_moments() makes the moments of them. */
static keel_status plan_clock(const keel_roster *r, keel_workload *w, int **ends_out,
                              size_t *nends_out, int **bounds_out, size_t *nbounds_out)
{
    size_t nn = r->nnurses, np = r->npatients, nparts = 0, nbreaks = 0, nstretches = 0, most = 0;
    for (size_t n = 0; n < nn; n++)
        nbreaks += r->nurses[n].nbreaks;
    for (size_t p = 0; p < np; p++) {
        nstretches += r->patients[p].nrecord;
        most = r->patients[p].nrecord > most ? r->patients[p].nrecord : most;
    }
    int *ends = keel_calloc(nn + 1, sizeof *ends);
    int *bounds = keel_calloc(2 * nn + 2 * np + 2 * nbreaks + nstretches + 2, sizeof *bounds);
    int *cuts = keel_calloc(nn + most + 1, sizeof *cuts);
    w->nurse_start = keel_calloc(nn + 1, sizeof *w->nurse_start);
    w->nurse_end = keel_calloc(nn + 1, sizeof *w->nurse_end);
    if (!ends || !bounds || !cuts || !w->nurse_start || !w->nurse_end) {
        free(ends);
        free(bounds);
        free(cuts);
        return KEEL_ERR_NOMEM;
    }
    size_t nb = 0;
    bounds[nb++] = 0;
    bounds[nb++] = r->shift.minutes;
    for (size_t n = 0; n < nn; n++) {
        w->nurse_start[n] = or_default(r->nurses[n].start, 0);
        w->nurse_end[n] = or_default(r->nurses[n].end, r->shift.minutes);
        ends[n] = w->nurse_end[n];
        bounds[nb++] = w->nurse_start[n];
        bounds[nb++] = w->nurse_end[n];
    }
    size_t nends = sort_unique(ends, nn);
    for (size_t p = 0; p < np; p++) {
        const keel_patient *pt = &r->patients[p];
        bounds[nb++] = arrives(pt);
        bounds[nb++] = leaves(r, pt);
        for (size_t k = 0; k < pt->nrecord; k++)
            bounds[nb++] = pt->record[k].to;
        nparts += 1 + patient_cuts(r, pt, ends, nends, cuts);
    }
    free(cuts);
    w->npatients = nparts;
    *ends_out = ends;
    *nends_out = nends;
    *bounds_out = bounds;
    *nbounds_out = nb;
    return KEEL_OK;
}

/* The moments of the shift: the times of plan_clock() and the kept
 * covers' starts and ends, sorted (w takes bounds). */
static void set_moments(keel_workload *w, int *bounds, size_t nb)
{
    keel_workload_cover_times(w, bounds, &nb);
    nb = sort_unique(bounds, nb);
    w->moment_start = bounds;
    w->nmoments = nb - 1;
    w->clocked = w->nmoments > 1 || w->npatients > w->npeople;
    keel_workload_cover_moments(w);
}

/* Cuts each patient's stay into parts at the nurses' end times and at her
 * record's stretch ends, and shares its care among them (see
 * keel/workload.h).  False when memory ran out. */
static bool cut_parts(const keel_roster *r, keel_workload *w, const int *ends, size_t nends)
{
    size_t q = 0, most = 0;
    for (size_t p = 0; p < r->npatients; p++)
        most = r->patients[p].nrecord > most ? r->patients[p].nrecord : most;
    int *cuts = keel_calloc(nends + most + 1, sizeof *cuts);
    if (!cuts)
        return false;
    long long shift = r->shift.minutes;
    for (size_t p = 0; p < r->npatients; p++) {
        const keel_patient *pt = &r->patients[p];
        long long a = arrives(pt), b = leaves(r, pt);
        long long present = ceil_share(base_care(r, pt), b - a, shift);
        size_t ncuts = patient_cuts(r, pt, ends, nends, cuts);
        w->first_part[p] = (int)q;
        long long s = a;
        for (size_t i = 0; i <= ncuts; i++) {
            long long e = i < ncuts ? cuts[i] : b;
            w->patient[q] = (int)p;
            w->part_start[q] = (int)s;
            w->part_end[q] = (int)e;
            w->care_minutes[q] =
                (int)(ceil_share(present, e - a, b - a) - ceil_share(present, s - a, b - a));
            if (s == a)
                w->care_minutes[q] += extra_care(r, pt);
            w->first_moment[q] = find_time(w->moment_start, w->nmoments + 1, (int)s);
            w->last_moment[q] = find_time(w->moment_start, w->nmoments + 1, (int)e);
            q++;
            s = e;
        }
    }
    w->first_part[r->npatients] = (int)q;
    free(cuts);
    return true;
}

int keel_workload_on_unit(const keel_roster *r, size_t i)
{
    const keel_nurse *n = &r->nurses[i];
    if (n->start != KEEL_ABSENT || n->end != KEEL_ABSENT)
        return or_default(n->end, r->shift.minutes) - or_default(n->start, 0);
    return or_default(n->minutes, r->shift.minutes);
}

bool keel_workload_no_break(const keel_roster *r, size_t i)
{
    const keel_nurse *n = &r->nurses[i];
    return n->nbreaks == 0 && n->break_minutes == KEEL_ABSENT &&
           or_default(r->shift.break_minutes, 0) > 0 &&
           2 * (long)keel_workload_on_unit(r, i) < (long)r->shift.minutes;
}

/* A nurse's own breaks, else her break_minutes, else the shift's break when
 * she is on for at least half the shift (keel_workload_no_break()). */
static int break_total(const keel_roster *r, size_t i)
{
    const keel_nurse *n = &r->nurses[i];
    if (n->nbreaks > 0) {
        int total = 0;
        for (size_t b = 0; b < n->nbreaks; b++)
            total += n->breaks[b].minutes;
        return total;
    }
    if (keel_workload_no_break(r, i))
        return 0;
    return or_default(n->break_minutes, or_default(r->shift.break_minutes, 0));
}

/* Nurse n's fewest patients and most care (policy.min_patients and
 * max_utilisation); reports a nurse whose fewest is above her limit, and
 * min_patients with times (not supported).  Returns true on a problem. */
static bool bounds_of(const keel_roster *r, keel_workload *w, size_t n, keel_error *err)
{
    const keel_nurse *nurse = &r->nurses[n];
    bool counted = w->max_patients[n] > 0;
    int least = or_default(nurse->min_patients, or_default(r->policy.min_patients, 0));
    w->min_patients[n] = counted ? least : 0;
    w->max_care[n] = LLONG_MAX;
    if (counted && r->policy.max_utilisation != KEEL_ABSENT)
        w->max_care[n] =
            (long long)r->policy.max_utilisation * w->capacity_minutes[n] / KEEL_TOLERANCE_SCALE -
            w->duty_minutes[n];
    if (w->min_patients[n] > w->max_patients[n]) {
        keel_error_add(err, KEEL_ERR_INPUT, r->path, nurse->mark.line, nurse->mark.column, "nurses",
                       "nurse %s must take at least %d patients but may take at most %d; "
                       "expected min_patients at most the patient limit",
                       nurse->id, w->min_patients[n], w->max_patients[n]);
        return true;
    }
    if (w->min_patients[n] > 0 && w->clocked) {
        keel_error_add(err, KEEL_ERR_INPUT, r->path, nurse->mark.line, nurse->mark.column, "nurses",
                       "min_patients does not work with times on the roster yet (nurse %s); "
                       "expected a roster without start, end, arrives_at, leaves_at or "
                       "expected admissions",
                       nurse->id);
        return true;
    }
    return false;
}

bool keel_workload_alloc(keel_workload *w)
{
    size_t np = w->npatients ? w->npatients : 1, nn = w->nnurses ? w->nnurses : 1;
    w->patient = keel_calloc(np, sizeof *w->patient);
    w->first_part = keel_calloc(w->npeople + 1, sizeof *w->first_part);
    w->part_start = keel_calloc(np, sizeof *w->part_start);
    w->part_end = keel_calloc(np, sizeof *w->part_end);
    w->first_moment = keel_calloc(np, sizeof *w->first_moment);
    w->last_moment = keel_calloc(np, sizeof *w->last_moment);
    w->care_minutes = keel_calloc(np, sizeof *w->care_minutes);
    w->capacity_minutes = keel_calloc(nn, sizeof *w->capacity_minutes);
    w->duty_minutes = keel_calloc(nn, sizeof *w->duty_minutes);
    w->max_patients = keel_calloc(nn, sizeof *w->max_patients);
    w->eligible = keel_calloc(np * nn, sizeof *w->eligible);
    w->ratio_limit = keel_calloc(np, sizeof *w->ratio_limit);
    w->high_acuity = keel_calloc(np, sizeof *w->high_acuity);
    w->side = keel_calloc(np, sizeof *w->side);
    w->zone = keel_calloc(np, sizeof *w->zone);
    w->room = keel_calloc(np, sizeof *w->room);
    w->previous = keel_calloc(np, sizeof *w->previous);
    w->min_patients = keel_calloc(nn, sizeof *w->min_patients);
    w->max_care = keel_calloc(nn, sizeof *w->max_care);
    return w->min_patients && w->max_care && w->patient && w->first_part && w->part_start &&
           w->part_end && w->first_moment && w->last_moment && w->care_minutes &&
           w->capacity_minutes && w->duty_minutes && w->max_patients && w->eligible &&
           w->ratio_limit && w->high_acuity && w->side && w->zone && w->room && w->previous;
}

/* For keel_workload_kinds(): nurses by the hash of their column, then by
 * index. */
static int by_hash(const void *ctx, size_t a, size_t b)
{
    const unsigned long long *h = ctx;
    if (h[a] != h[b])
        return h[a] < h[b] ? -1 : 1;
    return (a > b) - (a < b);
}

bool keel_workload_kinds(keel_workload *w)
{
    size_t nn = w->nnurses, np = w->npatients;
    free(w->column_kind);
    w->column_kind = keel_malloc((nn ? nn : 1) * sizeof *w->column_kind);
    unsigned long long *h = keel_calloc(nn ? nn : 1, sizeof *h);
    size_t *order = keel_malloc((nn ? nn : 1) * sizeof *order);
    if (!w->column_kind || !h || !order) {
        free(w->column_kind);
        w->column_kind = NULL;
        free(h);
        free(order);
        return false;
    }
    /* Row by row, as eligible is stored: a hash of each column (FNV-1a),
     * nurses of one hash sorted together, each given the first of them,
     * then every column checked against that first one's. */
    for (size_t n = 0; n < nn; n++) {
        h[n] = 14695981039346656037ULL;
        order[n] = n;
    }
    for (size_t p = 0; p < np; p++)
        for (size_t n = 0; n < nn; n++)
            h[n] = (h[n] ^ (unsigned long long)w->eligible[p * nn + n]) * 1099511628211ULL;
    bool sorted = keelSortIndices(order, nn, by_hash, h);
    for (size_t k = 0; k < nn && sorted; k++) {
        size_t n = order[k];
        bool same = k > 0 && h[order[k - 1]] == h[n];
        w->column_kind[n] = same ? w->column_kind[order[k - 1]] : (int)n;
    }
    for (size_t p = 0; p < np && sorted; p++) {
        const bool *row = &w->eligible[p * nn];
        for (size_t n = 0; n < nn; n++)
            if (row[n] != row[w->column_kind[n]])
                w->column_kind[n] = (int)n; /* the hashes met by chance: a kind of her own */
    }
    free(h);
    free(order);
    if (!sorted) {
        free(w->column_kind);
        w->column_kind = NULL;
    }
    return sorted;
}

keel_status keel_workload_compute(const keel_roster *r, keel_workload **out, keel_error *err)
{
    keel_status rc = KEEL_OK;
    size_t nn = r->nnurses, npeople = r->npatients, nends = 0, nbounds = 0;
    int *ends = NULL, *bounds = NULL;
    keel_workload *w = keel_calloc(1, sizeof *w);
    *out = NULL;
    if (!w)
        return keel_error_add(err, KEEL_ERR_NOMEM, NULL, 0, 0, NULL, "out of memory");
    w->nnurses = nn;
    w->npeople = npeople;
    w->shift_minutes = r->shift.minutes;
    if (plan_clock(r, w, &ends, &nends, &bounds, &nbounds)) {
        rc = keel_error_add(err, KEEL_ERR_NOMEM, NULL, 0, 0, NULL, "out of memory");
        goto out;
    }
    size_t np = w->npatients;
    if (!keel_workload_alloc(w)) {
        rc = keel_error_add(err, KEEL_ERR_NOMEM, NULL, 0, 0, NULL, "out of memory");
        goto out;
    }
    w->law_limit = keel_law_nurse_max(r->policy.ratio_table, r->unit.type);
    if (w->law_limit < 0)
        w->law_limit = KEEL_ABSENT;
    for (size_t n = 0; n < nn; n++)
        w->max_patients[n] = nurse_limit(r, &r->nurses[n], w->law_limit);
    /* The break plan cuts moments at the kept covers' edges. */
    if (keel_workload_cover_plan(r, w)) {
        rc = keel_error_add(err, KEEL_ERR_NOMEM, NULL, 0, 0, NULL, "out of memory");
        goto out;
    }
    set_moments(w, bounds, nbounds);
    bounds = NULL;
    if (!cut_parts(r, w, ends, nends) || join_rules(r, w)) {
        rc = keel_error_add(err, KEEL_ERR_NOMEM, NULL, 0, 0, NULL, "out of memory");
        goto out;
    }

    for (size_t n = 0; n < nn; n++) {
        const keel_nurse *nurse = &r->nurses[n];
        int minutes = keel_workload_on_unit(r, n);
        int breaks = break_total(r, n);
        w->capacity_minutes[n] = minutes - breaks;
        w->duty_minutes[n] = or_default(nurse->duty_minutes,
                                        or_default(r->policy.roles[nurse->role].duty_minutes, 0));
        rc = bounds_of(r, w, n, err) ? KEEL_ERR_INPUT : rc;
        if (w->max_patients[n] > 0 && w->capacity_minutes[n] <= 0)
            rc = keel_error_add(err, KEEL_ERR_INPUT, r->path, nurse->mark.line, nurse->mark.column,
                                "nurses",
                                "nurse %s has %d minutes and %d "
                                "break minutes, so no time for patients; expected breaks "
                                "shorter than the time on the unit",
                                nurse->id, minutes, breaks);
    }
    if (rc)
        goto out;
    w->balance = r->policy.balance;

    for (size_t q = 0; q < np; q++)
        for (size_t n = 0; n < nn; n++)
            w->eligible[q * nn + n] = keel_workload_may_take(r, w, q, n);
    if (!keel_workload_kinds(w)) {
        rc = keel_error_add(err, KEEL_ERR_NOMEM, NULL, 0, 0, NULL, "out of memory");
        goto out;
    }
    keelRuleFlags(w);
out:
    free(ends);
    free(bounds);
    if (rc)
        keel_workload_free(w);
    else
        *out = w;
    return rc;
}

long long keel_workload_patient_care(const keel_workload *w, size_t p)
{
    long long care = 0;
    for (int q = w->first_part[p]; q < w->first_part[p + 1]; q++)
        care += w->care_minutes[q];
    return care;
}

/* Parts of different patients by patient care, heaviest first, ties by
 * patient; a patient's parts in time order. */
typedef struct order_ctx {
    const keel_workload *w;
    const long long *care; /* [npatients]: care of each part's patient (or the part's) */
} order_ctx;

static int placed_before(const void *ctx, size_t i, size_t j)
{
    const order_ctx *o = ctx;
    const keel_workload *w = o->w;
    if (w->patient[i] != w->patient[j]) {
        if (o->care[i] != o->care[j])
            return o->care[i] > o->care[j] ? -1 : 1;
        return w->patient[i] < w->patient[j] ? -1 : 1;
    }
    return (i > j) - (i < j);
}

keel_status keel_workload_order(const keel_workload *w, size_t *order)
{
    long long *care = keel_malloc((w->npatients ? w->npatients : 1) * sizeof *care);
    if (!care)
        return KEEL_ERR_NOMEM;
    for (size_t q = 0; q < w->npatients; q++)
        order[q] = q;
    for (size_t q = 0; q < w->npatients; q++)
        care[q] =
            w->clocked ? keel_workload_patient_care(w, (size_t)w->patient[q]) : w->care_minutes[q];
    order_ctx o = {w, care};
    bool sorted = keelSortIndices(order, w->npatients, placed_before, &o);
    free(care);
    return sorted ? KEEL_OK : KEEL_ERR_NOMEM;
}

keel_workload *keelWorkloadSubset(const keel_workload *w, const size_t *members, size_t np,
                                  const size_t *nurses, size_t n0, size_t k)
{
    keel_workload *z = keel_calloc(1, sizeof *z);
    if (!z)
        return NULL;
    z->npatients = z->npeople = np;
    z->nnurses = k;
    bool ok = keel_workload_alloc(z);
    z->nurse_start = keel_calloc(k ? k : 1, sizeof *z->nurse_start);
    z->nurse_end = keel_calloc(k ? k : 1, sizeof *z->nurse_end);
    z->moment_start = keel_calloc(2, sizeof *z->moment_start);
    if (!ok || !z->nurse_start || !z->nurse_end || !z->moment_start) {
        keel_workload_free(z);
        return NULL;
    }
    z->law_limit = w->law_limit;
    z->max_high_acuity = w->max_high_acuity;
    z->max_zones = KEEL_ABSENT;
    z->tolerance = w->tolerance;
    z->balance = w->balance;
    z->shift_minutes = w->shift_minutes;
    z->nmoments = 1;
    z->moment_start[1] = w->shift_minutes;
    for (size_t i = 0; i < np; i++) {
        size_t p = members[i];
        z->care_minutes[i] = w->care_minutes[p];
        z->ratio_limit[i] = w->ratio_limit[p] < (int)np ? w->ratio_limit[p] : (int)np;
        z->high_acuity[i] = w->high_acuity[p];
        z->side[i] = w->side[p];
        z->zone[i] = -1;
        z->room[i] = -1;
        z->previous[i] = -1;
        z->patient[i] = (int)i;
        z->first_part[i + 1] = (int)i + 1;
        z->part_end[i] = w->shift_minutes;
        z->last_moment[i] = 1;
        for (size_t n = 0; n < k; n++)
            z->eligible[i * k + n] = keel_workload_eligible(w, p, nurses ? nurses[n] : n0);
    }
    for (size_t n = 0; n < k; n++) {
        size_t m = nurses ? nurses[n] : n0;
        z->capacity_minutes[n] = w->capacity_minutes[m];
        z->duty_minutes[n] = w->duty_minutes[m];
        z->max_patients[n] = w->max_patients[m];
        z->min_patients[n] = w->min_patients[m];
        z->max_care[n] = w->max_care[m];
        z->nurse_end[n] = w->shift_minutes;
    }
    if (!keel_workload_kinds(z)) {
        keel_workload_free(z);
        return NULL;
    }
    keelRuleFlags(z);
    return z;
}
