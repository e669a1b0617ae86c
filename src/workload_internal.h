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

/* Who holds a nurse's patients during one of her timed breaks, chosen from
 * the roster alone before the solve (workload_cover.c, the order it
 * follows): the break plan the assignment keeps (rule_cover.c) and the
 * course of the shift reports (course.c). */
typedef struct keel_cover {
    size_t nurse;     /* the nurse on break */
    size_t brk;       /* index into her breaks */
    int start, end;   /* minutes after the shift's start */
    int cover;        /* the covering nurse, or -1: nobody is free to */
    bool relief;      /* the cover is a relief nurse, not a buddy */
    int limit;        /* most patients the cover may hold with the nurse's (the table's
                         per-nurse maximum, else the cover's patient limit; a relief
                         nurse's at least the breaking nurse's) */
    bool kept;        /* the assignment keeps it: the roster plans cover (names a buddy
                         or a relief nurse) and the limit can bind */
    int first_moment; /* the break's moments: first_moment .. last_moment-1 */
    int last_moment;
} keel_cover;

struct keel_workload {
    size_t npatients; /* parts: what the solver assigns (without times, the patients) */
    size_t nnurses;
    int *care_minutes;     /* [npatients] */
    int *capacity_minutes; /* [nnurses], > 0 for counted nurses */
    int *duty_minutes;     /* [nnurses] */
    int *max_patients;     /* [nnurses], the effective limit */
    bool *eligible;        /* [npatients * nnurses], pair (p, n) at p * nnurses + n */
    int *column_kind;      /* [nnurses]: the first nurse with the same column of eligible
                              (keel_workload_kinds()), or NULL: compare the columns */
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

    /* The break plan: every timed break, by nurse then break. */
    size_t ncovers;
    keel_cover *covers;
    size_t nkept;   /* covers the assignment keeps (0: the break_cover rule is off) */
    bool *covered;  /* [nnurses]: the nurse is on break or covers in a kept cover */
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

/* The break plan of roster r (workload_cover.c): w->covers, w->nkept and
 * w->covered, from the nurses' times and limits (w->nurse_start,
 * nurse_end, max_patients, law_limit); the moments are set later by
 * keel_workload_cover_moments().  Statuses: KEEL_OK, KEEL_ERR_NOMEM. */
keel_status keel_workload_cover_plan(const keel_roster *r, keel_workload *w);

/* True when nurse i is free to cover during [a, b): on throughout it and
 * on no break of her own that overlaps it. */
bool keel_workload_cover_free(const keel_roster *r, const keel_workload *w, size_t i, int a, int b);

/* The limit during a break of nurse `nurse` covered by `cover` (-1:
 * nobody; relief: a relief nurse): the table's per-nurse maximum, else the
 * cover's patient limit, a relief nurse's at least the nurse's own. */
int keel_workload_cover_limit(const keel_workload *w, size_t nurse, int cover, bool relief);

/* Adds the start and end of every kept cover to times[*n..] (room for
 * 2 * w->ncovers), for the moments of the clock. */
void keel_workload_cover_times(const keel_workload *w, int *times, size_t *n);

/* Sets each cover's moments from w->moment_start. */
void keel_workload_cover_moments(keel_workload *w);

/* Allocates w's arrays for w->npatients parts, w->nnurses nurses and
 * w->npeople patients, zeroed (the clock's nurse times and moments aside);
 * false when memory ran out (keel_workload_free() frees what was
 * allocated).  For code that builds a workload of its own. */
bool keel_workload_alloc(keel_workload *w);

/* Sets w->column_kind from w->eligible (call it again after eligible
 * changes, or set column_kind to NULL).  A workload of 20 000 patients and
 * 4 000 nurses is compared nurse with nurse thousands of times by the
 * searches' symmetry tests; a walk down two columns of eligible each time
 * took half of the run.  False when memory ran out. */
bool keel_workload_kinds(keel_workload *w);

/* A workload of its own for patients members[0..np) of w and nurses
 * nurses[0..k) of w (or, when nurses is NULL, k copies of nurse n0), to
 * balance that part of a unit without the clock alone (one zone, by the
 * zone methods): every patient's and nurse's data copied, no zones, rooms
 * or previous nurses, the rules' switches set afresh (keelRuleFlags()).
 * The caller owns it; free it with keel_workload_free(); NULL when memory
 * ran out. */
keel_workload *keelWorkloadSubset(const keel_workload *w, const size_t *members, size_t np,
                                  const size_t *nurses, size_t n0, size_t k);

/* Index of roster patient p's first part after her record
 * (patients[].record): her first part without one, first_part[p + 1] when
 * the record covers her whole stay.  The parts before it are history:
 * `nurse`, `handoffs` and `lock` bind from it on. */
static inline int keel_workload_first_open(const keel_roster *r, const keel_workload *w, size_t p)
{
    const keel_patient *pt = &r->patients[p];
    int q = w->first_part[p];
    while (pt->nrecord && q < w->first_part[p + 1] &&
           w->part_start[q] < pt->record[pt->nrecord - 1].to)
        q++;
    return q;
}

/* True when pair (patient p, nurse n) is eligible. */
static inline bool keel_workload_eligible(const keel_workload *w, size_t p, size_t n)
{
    return w->eligible[p * w->nnurses + n];
}

/* True when nurses a and b may take the same parts (their columns of
 * eligible are equal): one look with column_kind, else a walk down both
 * columns. */
static inline bool keel_workload_same_column(const keel_workload *w, size_t a, size_t b)
{
    if (w->column_kind)
        return w->column_kind[a] == w->column_kind[b];
    for (size_t p = 0; p < w->npatients; p++)
        if (keel_workload_eligible(w, p, a) != keel_workload_eligible(w, p, b))
            return false;
    return true;
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
