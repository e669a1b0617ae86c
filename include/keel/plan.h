/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * keel/plan.h - an assignment written by people (the `nurse:` of each
 * patient in a roster): read it, and list every rule it breaks.
 */
#ifndef KEEL_PLAN_H
#define KEEL_PLAN_H

#include "keel/api.h"

#include <stdbool.h>
#include <stddef.h>

#include "keel/error.h"
#include "keel/finding.h"
#include "keel/roster.h"
#include "keel/workload.h"

#ifdef __cplusplus
extern "C" {
#endif

/* Fills nurse_of[keel_workload_nparts(w)] (one entry per part, see keel/workload.h)
 * from the roster's `nurse:` and `handoffs:` keys: a patient starts with
 * `nurse` and, each time that nurse leaves before the patient does, goes to
 * the next of `handoffs` (-1 where the plan names nobody).  Returns true
 * when every part has a nurse. */
KEEL_API bool keel_plan_from_roster(const keel_roster *roster, const keel_workload *w, int *nurse_of);

/* Appends to *out one finding for each rule the assignment nurse_of (per
 * part) breaks (unassigned parts are skipped): `skill` for a missing
 * competency, `patient_limit` for a nurse over the limit, `lock` for a
 * locked patient moved, `avoid` for a patient given to a nurse on its avoid
 * list, and the rules that join patients.  With the clock the rules are
 * checked at every moment (a count limit broken is `moment_limit`): one
 * finding per nurse, rule and stretch of moments in a row in which she
 * breaks it, the message starting "from HH:MM to HH:MM" over the whole
 * stretch and counting what she holds at its worst; a rule broken again
 * after a break in the stretch is a finding of its own.  `hand_off` names a patient held by a nurse
 * who is not on, or planned hand-offs that do not happen.  Statuses: KEEL_OK,
 * KEEL_ERR_NOMEM.  The caller owns what is appended. */
KEEL_API keel_status keel_plan_check(const keel_roster *roster, const keel_workload *w, const int *nurse_of,
                            keel_findings *out, keel_error *err);

#ifdef __cplusplus
}
#endif
#endif
