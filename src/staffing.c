/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * staffing.c - the staffing view: nurses needed by care minutes, by limits
 * and by the ratio table's ward minimum, against the nurses who take
 * patients.  Reads a roster and its workload, assigns nothing; the minutes
 * figure comes from metrics so that it is computed in one place.  The
 * definitions are in keel/staffing.h.
 */
#include "keel/staffing.h"

#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "alloc.h"
#include "keel/metrics.h"
#include "textbuf.h"
#include "workload_internal.h"

#define MINUTES_PER_HOUR 60.0

static long ceil_div(long long a, long long b)
{
    return (long)((a + b - 1) / b);
}

static int or_default(int value, int fallback)
{
    return value != KEEL_ABSENT ? value : fallback;
}

static int by_int(const void *a, const void *b)
{
    int x = *(const int *)a, y = *(const int *)b;
    return (x > y) - (x < y);
}

/* The fewest groups the patients can form when a group may hold no more
 * patients than the smallest limit[] among its members (each limit >= 1).
 * Sorts limit[] in place.
 *
 * Sort the limits ascending, l1 <= l2 <= ... <= lm, and cut greedily: the
 * first group is the first l1 patients (all of them if fewer), and so on
 * from the first patient not yet placed.  This is optimal.  Proof, by
 * induction on m: take any valid grouping with k groups and let G be the
 * group of patient 1, so |G| <= l1, and let s = min(l1, m).  While G lacks
 * some patient j <= s: if |G| < s, move j into G (G's smallest limit stays
 * l1 because l1 is the smallest of all; j's old group only shrinks, so it
 * stays valid); otherwise G holds some q > s, and we swap q and j (G keeps
 * its size and l1; j's old group gets q in j's place, and l_q >= l_j, so its
 * smallest limit does not fall).  Groups left empty are dropped.  The end
 * is a valid grouping with at most k groups whose first group is the
 * greedy's first group; the other groups hold patients s+1..m, and by
 * induction the greedy needs no more groups for them than they use.  So the
 * greedy count is at most k for every valid grouping. */
static int fewest_groups(int *limit, size_t n)
{
    int groups = 0;
    qsort(limit, n, sizeof *limit, by_int);
    for (size_t i = 0; i < n; i += (size_t)limit[i])
        groups++;
    return groups;
}

/* N: the smallest of the table's per-nurse maximum, policy.max_patients and
 * policy.roles.staff.max_patients; KEEL_ABSENT when none is given. */
static int staff_limit(const keel_roster *r, const keel_workload *w)
{
    int given[] = {w->law_limit, r->policy.max_patients,
                   r->policy.roles[KEEL_ROLE_STAFF].max_patients};
    int limit = KEEL_ABSENT;
    for (size_t i = 0; i < sizeof given / sizeof given[0]; i++)
        if (given[i] != KEEL_ABSENT && (limit == KEEL_ABSENT || given[i] < limit))
            limit = given[i];
    return limit;
}

/* The need by limits at moment m: N, the patients' ratios and the
 * high-acuity rule over the patients present; the largest over the
 * moments is kept (limits hold at every moment). */
static void need_at(const keel_workload *w, size_t m, int *limit, keel_staffing *s)
{
    size_t census = 0;
    int high = 0;
    for (size_t q = 0; q < w->npatients; q++) {
        if (w->first_moment[q] > (int)m || (int)m >= w->last_moment[q])
            continue;
        limit[census++] = w->ratio_limit[q];
        high += s->max_high_acuity != KEEL_ABSENT && w->high_acuity[q];
    }
    if (census > s->census)
        s->census = census;
    if (high > s->nhigh_acuity)
        s->nhigh_acuity = high;
    int on = 0;
    for (size_t n = 0; n < w->nnurses; n++)
        on += keel_workload_counted(w, n) && w->nurse_start[n] <= w->moment_start[m] &&
              w->nurse_end[n] >= w->moment_start[m + 1];
    if (census == 0 || s->staff_limit == 0)
        return;
    int cap = s->staff_limit == KEEL_ABSENT || (size_t)s->staff_limit > census ? (int)census
                                                                               : s->staff_limit;
    for (size_t i = 0; i < census; i++)
        limit[i] = limit[i] < cap ? limit[i] : cap;
    int by_census = (int)ceil_div((long long)census, cap), by_ratios = fewest_groups(limit, census);
    s->by_census = by_census > s->by_census ? by_census : s->by_census;
    s->by_ratios = by_ratios > s->by_ratios ? by_ratios : s->by_ratios;
    int need = by_ratios;
    if (s->max_high_acuity > 0 && (int)ceil_div(high, s->max_high_acuity) > need)
        need = (int)ceil_div(high, s->max_high_acuity);
    if (w->clocked && (s->moment_need == 0 || on - need < s->moment_slack)) {
        s->moment_from = w->moment_start[m];
        s->moment_to = w->moment_start[m + 1];
        s->moment_on = on;
        s->moment_need = need;
        s->moment_slack = on - need;
    }
}

static keel_status need_by_limits(const keel_roster *r, const keel_workload *w, keel_staffing *s,
                                  keel_error *err)
{
    s->staff_limit = staff_limit(r, w);
    s->max_high_acuity = w->max_high_acuity;
    s->census = 0;
    s->clocked = w->clocked;
    s->shift_start = r->shift.start_minute;
    int *limit = keel_calloc(w->npatients ? w->npatients : 1, sizeof *limit);
    if (!limit)
        return keel_error_add(err, KEEL_ERR_NOMEM, NULL, 0, 0, NULL, "out of memory");
    for (size_t m = 0; m < w->nmoments; m++)
        need_at(w, m, limit, s);
    free(limit);
    if (s->census == 0)
        return KEEL_OK;
    if (s->staff_limit == 0)
        s->blocked = KEEL_STAFFING_NO_STAFF_LIMIT;
    if (s->nhigh_acuity > 0) {
        if (s->max_high_acuity == 0 && s->blocked == KEEL_STAFFING_POSSIBLE)
            s->blocked = KEEL_STAFFING_NO_HIGH_ACUITY;
        else if (s->max_high_acuity > 0)
            s->by_high_acuity = (int)ceil_div(s->nhigh_acuity, s->max_high_acuity);
    }
    if (s->blocked != KEEL_STAFFING_POSSIBLE)
        s->by_limits = -1;
    else
        s->by_limits = s->by_ratios > s->by_high_acuity ? s->by_ratios : s->by_high_acuity;
    return KEEL_OK;
}

/* The need by care minutes, from the metrics of an empty assignment. */
static void need_by_minutes(const keel_roster *r, const keel_metrics *m, keel_staffing *s)
{
    long long work = m->care_minutes + m->duty_minutes;
    s->care_minutes = m->care_minutes;
    s->duty_minutes = m->duty_minutes;
    s->capacity_minutes = m->capacity_minutes;
    if (m->ncounted > 0 && m->capacity_minutes > 0) {
        s->mean_capacity_minutes = (double)m->capacity_minutes / (double)m->ncounted;
        s->minutes_nurses = m->nurses_needed;
        /* work / (capacity / k) = work * k / capacity, rounded up exactly */
        s->by_minutes = (int)ceil_div(work * (long long)m->ncounted, m->capacity_minutes);
        return;
    }
    /* Nobody takes patients: a nurse of the shift's length and break. */
    int capacity = r->shift.minutes - or_default(r->shift.break_minutes, 0);
    if (capacity <= 0)
        return;
    s->mean_capacity_minutes = capacity;
    s->minutes_nurses = (double)work / (double)capacity;
    s->by_minutes = (int)ceil_div(work, capacity);
}

/* The ratio table's own figures for this unit, shift and census. */
static void need_by_table(const keel_roster *r, keel_staffing *s)
{
    const keel_law_table *t = r->policy.ratio_table;
    s->table = t;
    s->shift_class = keel_law_shift_class(t, r->shift.start_minute, r->shift.minutes);
    s->table_nurse_max = keel_law_nurse_max(t, r->unit.type);
    s->ward_minimum = keel_law_ward_minimum(t, r->unit.type, s->shift_class, s->census);
    s->table_minimum = s->ward_minimum;
    if (s->table_minimum < 0 && s->table_nurse_max > 0)
        s->table_minimum = (int)ceil_div((long long)s->census, s->table_nurse_max);
}

/* The largest need, ties to the earlier of ward minimum, limits, minutes. */
static void verdict(keel_staffing *s)
{
    if (s->census == 0) {
        s->needed = 0;
        s->binding = KEEL_STAFFING_NEED_NONE;
    } else if (s->blocked != KEEL_STAFFING_POSSIBLE) {
        s->needed = -1;
        s->binding = KEEL_STAFFING_NEED_LIMITS;
        return;
    } else {
        s->needed = s->ward_minimum;
        s->binding = KEEL_STAFFING_NEED_WARD_MINIMUM;
        if (s->by_limits > s->needed) {
            s->needed = s->by_limits;
            s->binding = KEEL_STAFFING_NEED_LIMITS;
        }
        if (s->by_minutes > s->needed) {
            s->needed = s->by_minutes;
            s->binding = KEEL_STAFFING_NEED_MINUTES;
        }
    }
    s->slack = (int)s->ncounted - s->needed;
    if (s->clocked && s->moment_need > 0 && s->moment_slack < s->slack)
        s->slack = s->moment_slack;
}

keel_status keel_staffing_compute(const keel_roster *r, const keel_workload *w, keel_staffing *out,
                                  keel_error *err)
{
    keel_staffing s;
    keel_metrics *m = NULL;
    memset(out, 0, sizeof *out);
    memset(&s, 0, sizeof s);
    keel_status rc = keel_metrics_compute(w, NULL, &m, err);
    if (rc)
        return rc;
    s.nnurses = w->nnurses;
    s.ncounted = m->ncounted;
    need_by_minutes(r, m, &s);
    keel_metrics_free(m);
    rc = need_by_limits(r, w, &s, err);
    if (rc)
        return rc;
    need_by_table(r, &s);
    for (size_t n = 0; n < w->nnurses; n++)
        if (keel_workload_counted(w, n))
            s.unit_minutes += keel_workload_on_unit(r, n);
    if (s.census > 0)
        s.hours_per_patient = (double)s.unit_minutes / MINUTES_PER_HOUR / (double)s.census;
    verdict(&s);
    *out = s;
    return KEEL_OK;
}

const char *keel_staffing_need_name(keel_staffing_need need)
{
    switch (need) {
    case KEEL_STAFFING_NEED_WARD_MINIMUM:
        return "ward minimum";
    case KEEL_STAFFING_NEED_LIMITS:
        return "limits";
    case KEEL_STAFFING_NEED_MINUTES:
        return "care minutes";
    case KEEL_STAFFING_NEED_NONE:
        break;
    }
    return "none";
}

/* ---------------------------------------------------------------------------
 * Plain words
 */

static const char *plural(long n)
{
    return n == 1 ? "" : "s";
}

/* The verb's -s for a subject of n ("1 nurse takes", "6 nurses take"). */
static const char *verb_s(long n)
{
    return n == 1 ? "s" : "";
}

/* The table as keel cites it (keel_law_cite()). */
static const char *cite(const keel_staffing *s, char buf[KEEL_LAW_CITE_SIZE])
{
    keel_law_cite(s->table, buf, KEEL_LAW_CITE_SIZE);
    return buf;
}

/* "under <table cited>", with the shift class if it has one. */
static void put_table(keel_textbuf *k, const keel_staffing *s)
{
    char table[KEEL_LAW_CITE_SIZE];
    keel_textbuf_put(k, "under %s", cite(s, table));
    if (s->shift_class != KEEL_SHIFT_ANY)
        keel_textbuf_put(k, " (%s shift)", keel_shift_class_name(s->shift_class));
}

/* What the binding need is, after "need at least K nurses ". */
static void put_reason(keel_textbuf *k, const keel_staffing *s)
{
    char table[KEEL_LAW_CITE_SIZE];
    switch (s->binding) {
    case KEEL_STAFFING_NEED_WARD_MINIMUM:
        put_table(k, s);
        return;
    case KEEL_STAFFING_NEED_MINUTES:
        keel_textbuf_put(k, "by care minutes (%.1f nurses' worth of care and duty)",
                         s->minutes_nurses);
        return;
    case KEEL_STAFFING_NEED_LIMITS:
        if (s->by_high_acuity > s->by_ratios)
            keel_textbuf_put(k, "with at most %d high-acuity patient%s per nurse",
                             s->max_high_acuity, plural(s->max_high_acuity));
        else if (s->by_ratios > s->by_census)
            keel_textbuf_put(k, "under the patients' own ratios");
        else if (s->staff_limit == KEEL_ABSENT)
            keel_textbuf_put(k, "with no limit on patients per nurse");
        else if (s->table && s->table_nurse_max == s->staff_limit)
            keel_textbuf_put(k, "under %s (at most %d patient%s per nurse)", cite(s, table),
                             s->staff_limit, plural(s->staff_limit));
        else
            keel_textbuf_put(k, "under a limit of %d patient%s per nurse", s->staff_limit,
                             plural(s->staff_limit));
        return;
    case KEEL_STAFFING_NEED_NONE:
        break;
    }
}

static void put_block(keel_textbuf *k, const keel_staffing *s)
{
    const char *these = s->census == 1 ? "this" : "these";
    if (s->blocked == KEEL_STAFFING_NO_STAFF_LIMIT) {
        keel_textbuf_put(k, "No number of staff nurses can hold %s %zu patient%s: ", these,
                         s->census, plural((long)s->census));
        keel_textbuf_put(k, "a staff nurse may take no patients (limit 0)");
        return;
    }
    keel_textbuf_put(k, "No number of nurses can hold %s %zu patient%s: ", these, s->census,
                     plural((long)s->census));
    keel_textbuf_put(k,
                     "%d patient%s %s high-acuity and a nurse may have none "
                     "(policy.high_acuity.max_per_nurse 0)",
                     s->nhigh_acuity, plural(s->nhigh_acuity), s->nhigh_acuity == 1 ? "is" : "are");
}

/* The three needs and the hours per patient. */
static void put_needs(keel_textbuf *k, const keel_staffing *s)
{
    keel_textbuf_put(k, " By care minutes %.1f nurses (%d), ", s->minutes_nurses, s->by_minutes);
    if (s->by_limits < 0)
        keel_textbuf_put(k, "by limits none possible");
    else
        keel_textbuf_put(k, "by limits %d", s->by_limits);
    if (s->ward_minimum >= 0)
        keel_textbuf_put(k, ", by the ward minimum %d", s->ward_minimum);
    keel_textbuf_put(k, "; %.1f nurse hours per patient this shift.", s->hours_per_patient);
    if (!s->clocked || s->moment_need == 0 || s->moment_slack >= 0)
        return;
    int from = s->shift_start == KEEL_ABSENT ? s->moment_from : s->shift_start + s->moment_from;
    int to = s->shift_start == KEEL_ABSENT ? s->moment_to : s->shift_start + s->moment_to;
    keel_textbuf_put(k,
                     " From %02d:%02d to %02d:%02d only %d nurse%s who take%s patients %s on; "
                     "the limits need %d then.",
                     from / 60 % 24, from % 60, to / 60 % 24, to % 60, s->moment_on,
                     plural(s->moment_on), verb_s(s->moment_on), s->moment_on == 1 ? "is" : "are",
                     s->moment_need);
}

/* Whether the census exceeds what the counted nurses may hold under the
 * table; never whether the roster is lawful. */
static void put_table_verdict(keel_textbuf *k, const keel_staffing *s)
{
    long counted = (long)s->ncounted;
    if (!s->table || s->table_minimum < 0)
        return;
    if (s->ncounted < (size_t)s->table_minimum) {
        keel_textbuf_put(k, " %zu patient%s exceed%s what %ld nurse%s may hold ", s->census,
                         plural((long)s->census), verb_s((long)s->census), counted,
                         plural(counted));
        put_table(k, s);
        keel_textbuf_put(k, ".");
    }
}

int keel_staffing_format(const keel_staffing *s, char *buf, size_t size)
{
    keel_textbuf k = {buf, size, 0};
    long counted = (long)s->ncounted;
    if (buf && size > 0)
        buf[0] = '\0';
    if (s->census == 0) {
        keel_textbuf_put(&k, "No patients; %ld nurse%s take%s patients.", counted, plural(counted),
                         verb_s(counted));
        return (int)k.len;
    }
    if (s->blocked != KEEL_STAFFING_POSSIBLE) {
        put_block(&k, s);
        keel_textbuf_put(&k, "; %ld nurse%s take%s patients.", counted, plural(counted),
                         verb_s(counted));
    } else {
        keel_textbuf_put(&k, "%zu patient%s need%s at least %d nurse%s ", s->census,
                         plural((long)s->census), verb_s((long)s->census), s->needed,
                         plural(s->needed));
        put_reason(&k, s);
        keel_textbuf_put(&k, "; %ld nurse%s take%s patients", counted, plural(counted),
                         verb_s(counted));
        if (s->slack < 0)
            keel_textbuf_put(&k, ": %d short.", -s->slack);
        else
            keel_textbuf_put(&k, ".");
    }
    put_needs(&k, s);
    put_table_verdict(&k, s);
    return (int)k.len;
}
