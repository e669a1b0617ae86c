/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * keel/metrics.h - every number a report shows about an assignment,
 * computed once here; writers only format them.
 *
 * Utilisation u(n) = load(n) / capacity(n).  The imbalance indices are taken
 * over the counted nurses (patient limit above zero), k of them, with mean
 * m = sum(u) / k:
 *   spread       = max u - min u
 *   peak_to_mean = max u / m
 *   cv           = sigma / m, sigma the population standard deviation
 *   jain         = (sum u)^2 / (k * sum u^2)        (Jain, Chiu, Hawe 1984)
 *   gini         = sum_i sum_j |u_i - u_j| / (2 k^2 m)
 * When the mean is 0 (nobody has work) cv, gini are 0 and jain is 1.
 */
#ifndef KEEL_METRICS_H
#define KEEL_METRICS_H

#include "keel/api.h"

#include <stdbool.h>
#include <stddef.h>

#include "keel/error.h"
#include "keel/workload.h"

#ifdef __cplusplus
extern "C" {
#endif

typedef struct keel_nurse_metrics {
    int npatients;
    int care_minutes; /* sum of care of the nurse's patients */
    int load_minutes; /* duty + care */
    int capacity_minutes;
    double utilisation; /* load / capacity; 0 when capacity is 0 */
    bool counted;
} keel_nurse_metrics;

typedef struct keel_metrics {
    size_t nnurses;
    keel_nurse_metrics *nurses; /* [nnurses] */
    size_t ncounted;
    size_t nunassigned; /* patients without a nurse */

    double max_utilisation;
    double min_utilisation;
    double mean_utilisation;
    double spread;
    double peak_to_mean;
    double cv;
    double jain;
    double gini;

    long care_minutes;       /* all patients */
    long duty_minutes;       /* counted nurses */
    long capacity_minutes;   /* counted nurses */
    double unit_utilisation; /* (care + duty) / capacity, the census against the staff */
    double nurses_needed;    /* (care + duty) / mean capacity of counted nurses */
} keel_metrics;

/* Computes the metrics of the assignment nurse_of ([keel_workload_nparts(w)],
 * a nurse index or -1) under workload w.  The caller owns *out; free it with
 * keel_metrics_free().  Statuses: KEEL_OK, KEEL_ERR_NOMEM. */
KEEL_API keel_status keel_metrics_compute(const keel_workload *w, const int *nurse_of, keel_metrics **out,
                                 keel_error *err);

/* Frees the metrics.  NULL-safe. */
KEEL_API void keel_metrics_free(keel_metrics *m);

#ifdef __cplusplus
}
#endif
#endif
