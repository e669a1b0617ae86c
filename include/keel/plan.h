/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * keel/plan.h - an assignment written by people (the `nurse:` of each
 * patient in a roster): read it, and list every rule it breaks.
 */
#ifndef KEEL_PLAN_H
#define KEEL_PLAN_H

#include <stdbool.h>
#include <stddef.h>

#include "keel/error.h"
#include "keel/finding.h"
#include "keel/roster.h"
#include "keel/workload.h"

#ifdef __cplusplus
extern "C" {
#endif

/* Fills nurse_of[npatients] from the roster's `nurse:` keys (-1 where a
 * patient has none).  Returns true when every patient has a nurse. */
bool keel_plan_from_roster(const keel_roster *roster, int *nurse_of);

/* Appends to *out one finding for each rule the assignment nurse_of breaks
 * (unassigned patients are skipped): `skill` for a missing competency,
 * `patient_limit` for a nurse over the limit, `lock` for a locked patient
 * moved, `avoid` for a patient given to a nurse on its avoid list.  Statuses: KEEL_OK,
 * KEEL_ERR_NOMEM.  The caller owns what is appended. */
keel_status keel_plan_check(const keel_roster *roster, const keel_workload *w, const int *nurse_of,
                            keel_findings *out, keel_error *err);

#ifdef __cplusplus
}
#endif
#endif
