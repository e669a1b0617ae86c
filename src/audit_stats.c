/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * audit_stats.c - the audit's mathematics, apart from any roster: the exact
 * upper tail of a Poisson-binomial count, Holm's adjustment across nurses,
 * and the weekday of a date.  tests/reference/check_audit.py checks the
 * first two against scipy and an independent implementation.
 */
#include <stdbool.h>
#include <stdlib.h>
#include <string.h>

#include "alloc.h"
#include "audit_internal.h"

/* The distribution of the count is built one Bernoulli at a time:
 * f_i(j) = f_{i-1}(j) (1 - p_i) + f_{i-1}(j - 1) p_i.  Every term is a sum
 * of products of numbers in [0, 1], so no cancellation loses a small tail;
 * the tail is summed from its far end, smallest terms first. */
double keel_audit_stats_tail(const double *p, size_t n, long k)
{
    if (k <= 0)
        return 1.0;
    if ((size_t)k > n)
        return 0.0;
    double *f = keel_calloc(n + 1, sizeof *f);
    if (!f)
        return -1.0;
    f[0] = 1.0;
    for (size_t i = 0; i < n; i++) {
        for (size_t j = i + 1; j > 0; j--)
            f[j] = f[j] * (1.0 - p[i]) + f[j - 1] * p[i];
        f[0] *= 1.0 - p[i];
    }
    double tail = 0.0;
    for (size_t j = n + 1; j > (size_t)k; j--)
        tail += f[j - 1];
    free(f);
    return tail < 1.0 ? tail : 1.0;
}

typedef struct ranked {
    double p;
    size_t i;
} ranked;

/* Ascending p; equal p by position, so the order is total and stable. */
static int by_p(const void *a, const void *b)
{
    const ranked *x = a, *y = b;
    if (x->p != y->p)
        return x->p < y->p ? -1 : 1;
    return x->i < y->i ? -1 : x->i > y->i;
}

bool keel_audit_stats_holm(const double *p, size_t m, double *adj)
{
    if (m == 0)
        return true;
    ranked *r = keel_calloc(m, sizeof *r);
    if (!r)
        return false;
    for (size_t i = 0; i < m; i++)
        r[i] = (ranked){p[i], i};
    qsort(r, m, sizeof *r, by_p);
    double running = 0.0;
    for (size_t j = 0; j < m; j++) {
        double v = (double)(m - j) * r[j].p;
        if (v > 1.0)
            v = 1.0;
        if (v > running)
            running = v;
        adj[r[j].i] = running;
    }
    free(r);
    return true;
}

/* Days from 1970-01-01 to y-m-d (Hinnant's days_from_civil; Source: H.
 * Hinnant, "chrono-Compatible Low-Level Date Algorithms", 2013). */
static long days_from_civil(long y, unsigned m, unsigned d)
{
    y -= m <= 2;
    long era = (y >= 0 ? y : y - 399) / 400;
    unsigned yoe = (unsigned)(y - era * 400);
    unsigned doy = (153 * (m + (m > 2 ? -3 : 9)) + 2) / 5 + d - 1;
    unsigned doe = yoe * 365 + yoe / 4 - yoe / 100 + doy;
    return era * 146097 + (long)doe - 719468;
}

int keel_audit_stats_weekday(const char *date)
{
    static const int mdays[] = {31, 29, 31, 30, 31, 30, 31, 31, 30, 31, 30, 31};
    if (!date || strlen(date) != 10 || date[4] != '-' || date[7] != '-')
        return -1;
    for (int i = 0; i < 10; i++)
        if (i != 4 && i != 7 && (date[i] < '0' || date[i] > '9'))
            return -1;
    long y = strtol(date, NULL, 10);
    unsigned m = (unsigned)((date[5] - '0') * 10 + (date[6] - '0'));
    unsigned d = (unsigned)((date[8] - '0') * 10 + (date[9] - '0'));
    if (m < 1 || m > 12 || d < 1 || d > (unsigned)mdays[m - 1])
        return -1;
    long days = days_from_civil(y, m, d); /* 1970-01-01 was a Thursday (3) */
    return (int)(((days + 3) % 7 + 7) % 7);
}

const char *keel_audit_stats_weekday_name(int weekday)
{
    static const char *const names[] = {"Mon", "Tue", "Wed", "Thu", "Fri", "Sat", "Sun"};
    return weekday >= 0 && weekday < 7 ? names[weekday] : "";
}
