/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * audit_internal.h - what the files of the audit share (keel/audit.h is the
 * public side):
 *
 *   audit_stats.c    the mathematics: Poisson-binomial tail, Holm, weekdays
 *   audit_shift.c    one shift: figures, violations, the best possible
 *   audit.c          many shifts in threads, shards, the period summed up
 *   audit_partial.c  a shard's partial result written and read back exactly
 *   audit_text.c, audit_json.c, audit_csv.c, audit_html.c   the writers
 *   audit_report.c   the writers' table
 */
#ifndef KEEL_AUDIT_INTERNAL_H
#define KEEL_AUDIT_INTERNAL_H

#include <stdio.h>

#include "keel/audit.h"

/* P(X >= k) for X the sum of n independent Bernoulli(p[i]) (a
 * Poisson-binomial variable), computed exactly by convolution of the n
 * distributions in O(n^2); 1 when k <= 0, 0 when k > n.  Returns a negative
 * value when memory runs out. */
double keel_audit_stats_tail(const double *p, size_t n, long k);

/* Holm's step-down adjustment of the m p-values p (Holm 1979): with p in
 * ascending order p(1) <= ... <= p(m), adj(i) = max over j <= i of
 * min(1, (m - j + 1) p(j)); written to adj in p's own order.  Returns false
 * when memory runs out. */
bool keel_audit_stats_holm(const double *p, size_t m, double *adj);

/* The weekday of a "YYYY-MM-DD" date, 0 Monday .. 6 Sunday (proleptic
 * Gregorian calendar), or -1 when date is NULL or not such a date. */
int keel_audit_stats_weekday(const char *date);

/* "Mon" .. "Sun". */
const char *keel_audit_stats_weekday_name(int weekday);

/* One shift, as keel_audit_shifts_compute() computes each. */
keel_status keel_audit_shift_compute(keel_roster *r, size_t index, size_t document,
                                     const keel_audit_options *o, keel_audit_shift *out,
                                     keel_error *err);

/* The writers. */
keel_status keel_audit_text(const keel_audit *a, FILE *out);
/* audit_text.c: qsort order of pointers to shifts: the largest excess over
 * the best possible first (shifts without one last), then input order. */
int keel_audit_text_by_excess(const void *x, const void *y);
keel_status keel_audit_html(const keel_audit *a, FILE *out);
keel_status keel_audit_json(const keel_audit *a, FILE *out);
keel_status keel_audit_csv_shifts(const keel_audit *a, FILE *out);
keel_status keel_audit_csv_nurse_shifts(const keel_audit *a, FILE *out);
keel_status keel_audit_csv_nurses(const keel_audit *a, FILE *out);
keel_status keel_audit_csv_nurse_groups(const keel_audit *a, FILE *out);
keel_status keel_audit_csv_violations(const keel_audit *a, FILE *out);

#endif
