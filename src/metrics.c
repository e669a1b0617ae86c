/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * metrics.c - loads, utilisations and imbalance indices of one assignment,
 * computed once for every writer.  Formulas and sources in keel/metrics.h
 * and docs/output.md.
 */
#include "keel/metrics.h"

#include <math.h>
#include <stdlib.h>

#include "alloc.h"
#include "workload_internal.h"

void keel_metrics_free(keel_metrics *m)
{
    if (!m)
        return;
    free(m->nurses);
    free(m);
}

static void imbalance(keel_metrics *m)
{
    double sum = 0, sumsq = 0, max = 0, min = 0;
    size_t k = 0;
    for (size_t n = 0; n < m->nnurses; n++) {
        if (!m->nurses[n].counted)
            continue;
        double u = m->nurses[n].utilisation;
        max = k == 0 || u > max ? u : max;
        min = k == 0 || u < min ? u : min;
        sum += u;
        sumsq += u * u;
        k++;
    }
    m->ncounted = k;
    m->jain = 1.0;
    if (k == 0)
        return;
    double mean = sum / (double)k;
    m->max_utilisation = max;
    m->min_utilisation = min;
    m->mean_utilisation = mean;
    m->spread = max - min;
    if (mean <= 0)
        return;
    double var = sumsq / (double)k - mean * mean;
    m->peak_to_mean = max / mean;
    m->cv = sqrt(var > 0 ? var : 0) / mean;
    m->jain = sum * sum / ((double)k * sumsq);
    double diffs = 0;
    for (size_t i = 0; i < m->nnurses; i++) {
        if (!m->nurses[i].counted)
            continue;
        for (size_t j = 0; j < m->nnurses; j++)
            if (m->nurses[j].counted)
                diffs += fabs(m->nurses[i].utilisation - m->nurses[j].utilisation);
    }
    m->gini = diffs / (2.0 * (double)k * (double)k * mean);
}

keel_status keel_metrics_compute(const keel_workload *w, const int *nurse_of, keel_metrics **out,
                                 keel_error *err)
{
    keel_metrics *m = keel_calloc(1, sizeof *m);
    *out = NULL;
    if (m)
        m->nurses = keel_calloc(w->nnurses, sizeof *m->nurses);
    if (!m || !m->nurses) {
        keel_metrics_free(m);
        return keel_error_add(err, KEEL_ERR_NOMEM, NULL, 0, 0, NULL, "out of memory");
    }
    m->nnurses = w->nnurses;
    for (size_t n = 0; n < w->nnurses; n++) {
        keel_nurse_metrics *nm = &m->nurses[n];
        nm->capacity_minutes = w->capacity_minutes[n];
        nm->load_minutes = w->duty_minutes[n];
        nm->counted = keel_workload_counted(w, n);
    }
    for (size_t p = 0; p < w->npatients; p++) {
        m->care_minutes += w->care_minutes[p];
        int n = nurse_of ? nurse_of[p] : -1;
        if (n < 0) {
            m->nunassigned++;
            continue;
        }
        /* Patients, not parts: a patient kept across a cut counts once. */
        int first = w->first_part[w->patient[p]];
        m->nurses[n].npatients += (int)p == first || nurse_of[p - 1] != n;
        m->nurses[n].care_minutes += w->care_minutes[p];
        m->nurses[n].load_minutes += w->care_minutes[p];
    }
    for (size_t n = 0; n < w->nnurses; n++) {
        keel_nurse_metrics *nm = &m->nurses[n];
        if (nm->capacity_minutes > 0)
            nm->utilisation = (double)nm->load_minutes / (double)nm->capacity_minutes;
        if (nm->counted) {
            m->duty_minutes += w->duty_minutes[n];
            m->capacity_minutes += nm->capacity_minutes;
        }
    }
    imbalance(m);
    if (m->capacity_minutes > 0) {
        double work = (double)(m->care_minutes + m->duty_minutes);
        m->unit_utilisation = work / (double)m->capacity_minutes;
        m->nurses_needed = work / ((double)m->capacity_minutes / (double)m->ncounted);
    }
    *out = m;
    return KEEL_OK;
}
