/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * keel/preview.h - the incoming patient preview: for each expected
 * admission without a nurse, which nurses could take it with no hand-off,
 * the rest of a plan unchanged.
 *
 * For each counted nurse n, the plan with the admission (every part of it)
 * given to n and every other patient where the plan has it is checked
 * against every rule (keel_plan_check()).  When it breaks none about the
 * admission, n could take it: the utilisation she would reach, flagged as an
 * overload above 1.  Otherwise the rule that rules her out (a finding that
 * names her, else the first one).  The nurses who could take it come
 * first, lightest first (ties by roster order), then the others in roster
 * order.  Computed after the solve, like the metrics; keel rebalance shows
 * it for the chosen option.
 */
#ifndef KEEL_PREVIEW_H
#define KEEL_PREVIEW_H

#include "keel/api.h"

#include <stdbool.h>
#include <stddef.h>

#include "keel/error.h"
#include "keel/roster.h"
#include "keel/workload.h"

#ifdef __cplusplus
extern "C" {
#endif

typedef struct keel_preview_nurse {
    int nurse;          /* index into the roster's nurses */
    bool allowed;       /* she could take it with no other change */
    double utilisation; /* hers with it (allowed only) */
    bool overload;      /* utilisation above 1 (allowed only) */
    const char *rule;   /* not allowed: the rule that rules her out (static name) */
} keel_preview_nurse;

typedef struct keel_preview_admission {
    size_t patient; /* index into the roster's patients (an expected admission) */
    size_t nnurses;
    keel_preview_nurse *nurses; /* the counted nurses: those allowed first, lightest first */
} keel_preview_admission;

typedef struct keel_preview {
    size_t nadmissions;
    keel_preview_admission *admissions;
} keel_preview;

/* The preview of every expected admission of roster r that has no `nurse`
 * in the roster, against nurse_of (per part, every part assigned).  The
 * caller owns *out; free it with keel_preview_free().  Statuses: KEEL_OK,
 * KEEL_ERR_NOMEM. */
KEEL_API keel_status keel_preview_compute(const keel_roster *r, const keel_workload *w,
                                          const int *nurse_of, keel_preview **out,
                                          keel_error *err);

/* Frees the preview.  NULL-safe. */
KEEL_API void keel_preview_free(keel_preview *preview);

#ifdef __cplusplus
}
#endif
#endif
