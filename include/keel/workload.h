/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * keel/workload.h - the numbers the solver works on, derived once from a
 * roster (an opaque value; keel's own modules read its fields): care
 * minutes per patient, capacity, duty minutes and patient limit per nurse,
 * and which patient-nurse pairs are eligible.
 *
 *   care(p)     = care_minutes, or the shift's share of its NAS score, or
 *                 policy.acuity_minutes[acuity]; plus
 *                 policy.extra_minutes[x] for each x in extras
 *   capacity(n) = minutes - break_minutes      (both default to the shift's)
 *   load(n)     = duty_minutes + sum of care(p) over n's patients
 *   limit(n)    = the smallest of policy.max_patients and the nurse's own
 *                 max_patients (no limit given: the census)
 *
 *   duty(n)     = duty_minutes, or policy.roles[role].duty_minutes, or 0
 *   limit(n)    also counts policy.roles[role].max_patients; an orientee's is 0
 *               (the orientee shares the preceptor's assignment)
 *
 *   limit(n)    also counts the per-nurse maximum of policy.ratio_table for
 *               the unit's type (law_limit)
 *   min(n)      = the nurse's min_patients, else policy.min_patients, else 0
 *               (0 for nurses who take no patients)
 *   max_care(n) = floor(max_utilisation * capacity(n)) - duty(n): with
 *               policy.max_utilisation, the most care a counted nurse may
 *               carry (rule `capacity`)
 *
 * A pair (p, n) is eligible when n has every competency p needs (its
 * needs, and policy.isolation_needs of its precaution), limit(n) > 0, n is
 * not on p's avoid list, p's acuity is not above the max_acuity of n's role
 * (policy.roles), and, when p is locked, n is the nurse p has.
 *
 * The clock (docs/model.md, "The clock").  A patient is present over
 * [arrives_at, leaves_at), a nurse on over [start, end), in minutes after
 * the shift's start.  The solver assigns *parts*: a patient's presence cut
 * at every nurse's end time inside it, each part to one nurse who is on
 * throughout it; a part keeps the nurse of the part before it while she is
 * on (a patient changes nurse only when the nurse leaves).  The shift is cut
 * at every arrival, departure, start and end into *moments*; every rule
 * that counts a nurse's patients holds at each moment, over the parts that
 * cover it.  Without times there is one part per patient and one moment.
 *
 *   present(p)  = care(p) without extras, times (leaves - arrives) / shift,
 *                 rounded up; plus the extras, on the first part
 *   part [s, e) of [a, b) carries ceil(present*(e-a)/(b-a))
 *                 - ceil(present*(s-a)/(b-a)) of it
 *   capacity(n) = (end - start) - break minutes
 *
 * Rules that join patients (held by every method; each rule is one entry
 * of keel's rule table): the nurse of p has at most ratio_limit(p)
 * patients; at most max_high_acuity high-acuity patients per nurse; with
 * isolation separation, no nurse has a protective patient and an
 * infectious one (contact, droplet, airborne); at most max_zones zones per
 * nurse.  "Counted" nurses are those with limit(n) > 0; every balance
 * figure is taken over them.  All figures are whole minutes.
 */
#ifndef KEEL_WORKLOAD_H
#define KEEL_WORKLOAD_H

#include "keel/api.h"

#include <stddef.h>

#include "keel/error.h"
#include "keel/roster.h"

#ifdef __cplusplus
extern "C" {
#endif

/* The derived numbers of one roster.  Opaque: pass it to keel_solve(),
 * keel_metrics_compute(), keel_plan_check() and the other functions that
 * take one. */
typedef struct keel_workload keel_workload;

/* Derives the workload of a valid roster.  The caller owns *out; free it with
 * keel_workload_free().  Statuses: KEEL_OK, KEEL_ERR_NOMEM, KEEL_ERR_INPUT
 * (a counted nurse without capacity: one problem per nurse). */
KEEL_API keel_status keel_workload_compute(const keel_roster *roster, keel_workload **out, keel_error *err);

/* The number of parts the solver assigns: the length of every nurse_of
 * array (keel_solution.nurse_of, keel_plan_check()'s plan).  Without times
 * in the roster there is one part per patient, in the roster's order; with
 * them a patient's stay is cut where a nurse leaves (docs/model.md, "The
 * clock"). */
KEEL_API size_t keel_workload_nparts(const keel_workload *w);

/* Frees the workload.  NULL-safe. */
KEEL_API void keel_workload_free(keel_workload *w);

#ifdef __cplusplus
}
#endif
#endif
