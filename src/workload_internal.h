/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * workload_internal.h - the fields of keel_workload and the functions keel's
 * own modules use on them (internal; the public face is keel/workload.h,
 * whose head comment gives the arithmetic).
 */
#ifndef KEEL_WORKLOAD_INTERNAL_H
#define KEEL_WORKLOAD_INTERNAL_H

#include <stdbool.h>
#include <stddef.h>

#include "keel/error.h"
#include "keel/roster.h"
#include "keel/workload.h"
#include "roster_internal.h"

/* Room for every rule of the table (rule.c checks KEEL_NRULES against it). */
#define KEEL_WORKLOAD_RULES 16
enum { KEEL_WORKLOAD_CLOCK, KEEL_WORKLOAD_SHIFT, KEEL_WORKLOAD_MOMENT };
struct keel_rule;

struct keel_workload {
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
    /* The rules whose tests can bind here, in table order, set with the
     * switches above by keelRuleFlags(): by scope, those with a tally test
     * (KEEL_WORKLOAD_CLOCK, _SHIFT, _MOMENT), and those that tell when two
     * nurses' holdings look alike.  The tally's test and the searches'
     * symmetry walk only these (rule.c). */
    const struct keel_rule *tests[3][KEEL_WORKLOAD_RULES];
    unsigned char ntests[3];
    const struct keel_rule *held[KEEL_WORKLOAD_RULES];
    unsigned char nheld;
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
};

/* Which side of the isolation separation a patient is on. */
enum {
    KEEL_SIDE_NONE = 0,
    KEEL_SIDE_INFECTIOUS = 1, /* contact, droplet or airborne precautions */
    KEEL_SIDE_PROTECTIVE = 2,
};

/* The eligibility rule itself: true when nurse n may take patient p (limits
 * and competencies of w, the patient's lock and avoid list of r). */
bool keel_workload_may_take(const keel_roster *r, const keel_workload *w, size_t p, size_t n);

/* True when nurse i gets no break: she gives none of her own (no breaks,
 * no break_minutes), the shift has one, and she is on the unit for less than
 * half the shift.  A nurse on for at least half the shift takes the shift's
 * whole break (docs/roster-format.md, "break_minutes"). */
bool keel_workload_no_break(const keel_roster *r, size_t i);

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


/* True when nurse n may take roster patient p at some time: competencies,
 * limit above zero, avoid list and lock, her times aside. */
bool keel_workload_may_take_at_all(const keel_roster *r, const keel_workload *w, size_t p,
                                   size_t n);

/* Allocates w's arrays for w->npatients parts, w->nnurses nurses and
 * w->npeople patients, zeroed (the clock's nurse times and moments aside);
 * false when memory ran out (keel_workload_free() frees what was
 * allocated).  For code that builds a workload of its own. */
bool keel_workload_alloc(keel_workload *w);

/* A workload of its own for patients members[0..np) of w and nurses
 * nurses[0..k) of w (or, when nurses is NULL, k copies of nurse n0), to
 * balance that part of a unit without the clock alone (one zone, by the
 * zone methods): every patient's and nurse's data copied, no zones, rooms
 * or previous nurses, the rules' switches set afresh (keelRuleFlags()).
 * The caller owns it; free it with keel_workload_free(); NULL when memory
 * ran out. */
keel_workload *keelWorkloadSubset(const keel_workload *w, const size_t *members, size_t np,
                                  const size_t *nurses, size_t n0, size_t k);

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

#endif
