/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * keel/workload.h - the numbers the solver works on, derived once from a
 * roster: care minutes per patient, capacity, duty minutes and patient
 * limit per nurse, and which patient-nurse pairs are eligible.
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
 * not on p's avoid list, and, when p is locked, n is the nurse p has.
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
 * Rules that join patients (held by every method, checked by the tally of
 * solve_tally.c): the nurse of p has at most ratio_limit(p) patients; at
 * most max_high_acuity high-acuity patients per nurse; with isolation
 * separation, no nurse has a protective patient and an infectious one
 * (contact, droplet, airborne); at most max_zones zones per nurse.  "Counted" nurses are those with
 * limit(n) > 0; every balance figure is taken over them.  All figures are whole minutes.
 */
#ifndef KEEL_WORKLOAD_H
#define KEEL_WORKLOAD_H

#include <stdbool.h>
#include <stddef.h>

#include "keel/error.h"
#include "keel/roster.h"

#ifdef __cplusplus
extern "C" {
#endif

typedef struct keel_workload {
    size_t npatients; /* parts: what the solver assigns (without times, the patients) */
    size_t nnurses;
    int *care_minutes;     /* [npatients] */
    int *capacity_minutes; /* [nnurses], > 0 for counted nurses */
    int *duty_minutes;     /* [nnurses] */
    int *max_patients;     /* [nnurses], the effective limit */
    bool *eligible;        /* [npatients * nnurses], pair (p, n) at p * nnurses + n */
    int law_limit;         /* the table's per-nurse maximum, or KEEL_ABSENT */

    int *ratio_limit;    /* [npatients]: most patients p's nurse may have (census: none) */
    bool *high_acuity;   /* [npatients] */
    int max_high_acuity; /* KEEL_ABSENT: no limit */
    signed char *side;   /* [npatients]: KEEL_SIDE_* under isolation separation, else NONE */
    int *zone;           /* [npatients]: zone index, or -1 */
    size_t nzones;
    int max_zones; /* KEEL_ABSENT: no limit */
    int *room;     /* [npatients]: room index, or -1 */
    size_t nrooms;
    int *previous;        /* [npatients]: index of the previous nurse on this roster, or -1 */
    size_t ncontinuity;   /* patients whose previous nurse is on this roster */
    long long tolerance;  /* balance tolerance in 1/KEEL_TOLERANCE_SCALE */
    bool joined_rules;    /* any rule that joins patients is on */
    bool isolation_rule;  /* separation is on and both sides have patients */
    bool zones_rule;      /* max_zones is below the number of zones */
    int *min_patients;    /* [nnurses]: fewest patients a counted nurse takes (0: none) */
    long long *max_care;  /* [nnurses]: most care minutes under policy.max_utilisation
                             (LLONG_MAX: no cap) */
    bool bounds_rule;     /* some nurse has min_patients or a care cap */
    keel_balance balance; /* what stage 1 balances */

    /* The clock.  Arrays over parts are the ones above ([npatients]). */
    size_t npeople;    /* patients of the roster (expected admissions included) */
    int *patient;      /* [npatients]: the roster patient a part belongs to */
    int *first_part;   /* [npeople + 1]: patient p's parts are first_part[p] .. [p+1]-1, in
                          time order */
    int *part_start;   /* [npatients]: minutes after the shift's start */
    int *part_end;     /* [npatients] */
    int *nurse_start;  /* [nnurses]: when she comes on */
    int *nurse_end;    /* [nnurses]: when she leaves */
    size_t nmoments;   /* elementary intervals of the shift (1 without times) */
    int *moment_start; /* [nmoments + 1]: moment m is [moment_start[m], moment_start[m+1]) */
    int *first_moment; /* [npatients]: part q covers moments first_moment[q] .. last_moment[q]-1 */
    int *last_moment;  /* [npatients] */
    int shift_minutes; /* the shift's length */
    bool clocked;      /* several moments or parts: counts are per moment, parts keep nurses */
} keel_workload;

/* Which side of the isolation separation a patient is on. */
enum {
    KEEL_SIDE_NONE = 0,
    KEEL_SIDE_INFECTIOUS = 1, /* contact, droplet or airborne precautions */
    KEEL_SIDE_PROTECTIVE = 2,
};

/* Derives the workload of a valid roster.  The caller owns *out; free it with
 * keel_workload_free().  Statuses: KEEL_OK, KEEL_ERR_NOMEM, KEEL_ERR_INPUT
 * (a counted nurse without capacity: one problem per nurse). */
keel_status keel_workload_compute(const keel_roster *roster, keel_workload **out, keel_error *err);

/* The eligibility rule itself: true when nurse n may take patient p (limits
 * and competencies of w, the patient's lock and avoid list of r). */
bool keel_workload_may_take(const keel_roster *r, const keel_workload *w, size_t p, size_t n);

/* Minutes nurse n of roster r is on the unit: end - start when she has
 * times, else `minutes`, else the shift's (breaks included). */
int keel_workload_on_unit(const keel_roster *r, size_t n);

/* Care minutes of roster patient p, all its parts together. */
long long keel_workload_patient_care(const keel_workload *w, size_t p);

/* Orders parts for placement: patients heaviest first (ties by index),
 * each patient's parts together in time order.  Without the clock: parts
 * by care, heaviest first, ties by index.  order has npatients entries.
 * Statuses: KEEL_OK, KEEL_ERR_NOMEM. */
keel_status keel_workload_order(const keel_workload *w, size_t *order);

/* Writes the clock time `offset` minutes after the shift's start as
 * "HH:MM" (or "+N min" when the shift has no start) into buf. */
#define KEEL_TIME_SIZE 16
void keel_time_text(const keel_roster *r, int offset, char buf[KEEL_TIME_SIZE]);

/* True when nurse n may take roster patient p at some time: competencies,
 * limit above zero, avoid list and lock, her times aside. */
bool keel_workload_may_take_at_all(const keel_roster *r, const keel_workload *w, size_t p,
                                   size_t n);

/* Allocates w's arrays for w->npatients parts, w->nnurses nurses and
 * w->npeople patients, zeroed (the clock's nurse times and moments aside);
 * false when memory ran out (keel_workload_free() frees what was
 * allocated).  For code that builds a workload of its own. */
bool keel_workload_alloc(keel_workload *w);

/* True when nurses a and b have the same patient limits, fewest patients,
 * care cap and eligible parts (capacity and duty aside). */
bool keel_workload_same_rules(const keel_workload *w, size_t a, size_t b);

/* Frees the workload.  NULL-safe. */
void keel_workload_free(keel_workload *w);

/* True when pair (patient p, nurse n) is eligible. */
static inline bool keel_workload_eligible(const keel_workload *w, size_t p, size_t n)
{
    return w->eligible[p * w->nnurses + n];
}

/* True when part q must keep the nurse n of the part before it: q is not a
 * patient's first part and n is eligible for q (so on throughout it). */
static inline bool keel_workload_keeps(const keel_workload *w, size_t q, int n)
{
    return n >= 0 && w->first_part[w->patient[q]] != (int)q &&
           keel_workload_eligible(w, q, (size_t)n);
}

/* True when nurse n may take patients (limit above zero). */
static inline bool keel_workload_counted(const keel_workload *w, size_t n)
{
    return w->max_patients[n] > 0;
}

#ifdef __cplusplus
}
#endif
#endif
