/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * feas.h - why no valid assignment exists (internal; src/solve/, above the
 * chain of answerers).
 *
 *   feas_hall.c      eligibility and patient limits: Hall's condition
 *   feas_conflict.c  the rules that join patients: which of them conflict
 */
#ifndef KEEL_SOLVE_FEAS_H
#define KEEL_SOLVE_FEAS_H

#include <stdbool.h>

#include "keel/error.h"
#include "keel/finding.h"
#include "keel/roster.h"
#include "workload_internal.h"

/* feas_hall.c: looks for any valid assignment under eligibility and patient
 * limits alone, ignoring balance, by augmenting paths (patients to eligible
 * nurses under their limits).  Sets *feasible.  When one exists, nurse_of
 * holds it; when not, one finding per shortage is appended to out, naming
 * patients, nurses and what is short.  Statuses: KEEL_OK, KEEL_ERR_NOMEM. */
keel_status keel_feas_hall(const keel_roster *r, const keel_workload *w, int *nurse_of,
                           bool *feasible, keel_findings *out);

/* feas_conflict.c: when eligibility and limits allow an assignment but the
 * rules that join patients do not (proven), finds a smallest set of those
 * rules that conflict (relaxing any one makes an assignment possible) and
 * appends one finding per rule to out; a rule the time limit left
 * undecided stays in the set and its finding says so.  Statuses: KEEL_OK,
 * KEEL_ERR_NOMEM, KEEL_ERR_SOLVER. */
keel_status keel_feas_conflict(const keel_roster *r, const keel_workload *w, long long deadline_ms,
                               keel_findings *out, keel_error *err);

#endif
