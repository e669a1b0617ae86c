/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * keel/explain.h - why each patient went to the nurse it went to, in a few
 * words (`--explain`).  The first of these that holds is the reason:
 *
 *   locked       the patient is locked to that nurse
 *   only_nurse   no other nurse may take the patient (competencies, avoid
 *                list, limits)
 *   kept         the nurse had the patient on the previous shift
 *   same_zone    the nurse's other patients are in the patient's zone
 *   balance      the nurse had room: the split that balances the loads
 */
#ifndef KEEL_EXPLAIN_H
#define KEEL_EXPLAIN_H

#include "keel/api.h"

#include <stddef.h>

#include "keel/error.h"
#include "keel/roster.h"
#include "keel/workload.h"

#ifdef __cplusplus
extern "C" {
#endif

typedef enum keel_reason {
    KEEL_REASON_LOCKED,
    KEEL_REASON_ONLY_NURSE,
    KEEL_REASON_KEPT,
    KEEL_REASON_SAME_ZONE,
    KEEL_REASON_BALANCE,
} keel_reason;

/* Name of a reason as in json ("locked", "only_nurse", ...). */
KEEL_API const char *keel_reason_name(keel_reason reason);

typedef struct keel_explanation {
    size_t npatients;
    keel_reason *reason; /* [npatients] */
    char **text;         /* [npatients]: plain words */
} keel_explanation;

/* Explains the assignment nurse_of (every patient placed) of roster r with
 * workload w.  The caller owns *out; free it with keel_explanation_free().
 * Statuses: KEEL_OK, KEEL_ERR_NOMEM. */
KEEL_API keel_status keel_explain(const keel_roster *r, const keel_workload *w, const int *nurse_of,
                         keel_explanation **out, keel_error *err);

/* NULL-safe. */
KEEL_API void keel_explanation_free(keel_explanation *e);

#ifdef __cplusplus
}
#endif
#endif
