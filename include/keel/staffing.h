/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * keel/staffing.h - the staffing view: how many nurses the census needs
 * against how many take patients, before anyone is assigned.  It sits beside
 * metrics and reads only the roster and its workload:
 *
 *   roster -> workload -> staffing (this module)
 *
 * Three needs, each a number of nurses; the staffing needs the largest:
 *
 *   by care minutes  (care of all patients + duty of counted nurses)
 *                    / mean capacity of counted nurses, rounded up; the
 *                    fraction is metrics' nurses_needed.  With no counted
 *                    nurse, a nurse of the shift's length and break stands
 *                    in for the mean.
 *   by limits        the fewest nurses that can hold the census when no
 *                    nurse has more than N patients, N the per-nurse limit
 *                    of a staff nurse (the smallest of the ratio table's
 *                    per-nurse maximum, policy.max_patients and
 *                    policy.roles.staff.max_patients), the nurse of a
 *                    patient with "ratio 1:r" has at most r patients in all,
 *                    and, under policy.high_acuity, no nurse has more than
 *                    max_per_nurse high-acuity patients.  With no limit at
 *                    all one nurse could hold any census (1; 0 patients: 0).
 *                    N and the ratios together are counted exactly; the
 *                    high-acuity count ceil(high-acuity / max_per_nurse) is
 *                    taken beside them (the larger of the two), so with both
 *                    kinds of rule the figure is a lower bound.
 *   ward minimum     the ratio table's minimum of nurses for the ward's
 *                    census on this shift class (keel_law_ward_minimum()).
 *
 * Nurse hours per patient are the counted nurses' minutes on the unit
 * (nurses[].minutes, else shift.minutes: capacity plus break, so breaks are
 * included), in hours, over the census, for this one shift.
 *
 * A need never says a roster is lawful or unlawful: a table's figure is "as
 * encoded", and a census may exceed what the nurses may hold under it.  A
 * need is a lower bound: it can show that nurses are short, never that
 * they are enough; whether a plan's nurses are enough is the verdict's
 * (keel/verdict.h), judged on the plan itself.
 */
#ifndef KEEL_STAFFING_H
#define KEEL_STAFFING_H

#include "keel/api.h"

#include <stdbool.h>
#include <stddef.h>

#include "keel/error.h"
#include "keel/law.h"
#include "keel/roster.h"
#include "keel/workload.h"

#ifdef __cplusplus
extern "C" {
#endif

/* Which need sets the number of nurses.  Ties go to the earlier of ward
 * minimum, limits, care minutes. */
typedef enum keel_staffing_need {
    KEEL_STAFFING_NEED_NONE,         /* no patients: nothing is needed */
    KEEL_STAFFING_NEED_WARD_MINIMUM, /* the ratio table's ward minimum */
    KEEL_STAFFING_NEED_LIMITS,       /* per-nurse limit, patients' ratios, high acuity */
    KEEL_STAFFING_NEED_MINUTES,      /* care and duty minutes against capacity */
} keel_staffing_need;

/* Whether some number of nurses can hold the census under the limits. */
typedef enum keel_staffing_block {
    KEEL_STAFFING_POSSIBLE,       /* yes */
    KEEL_STAFFING_NO_STAFF_LIMIT, /* a staff nurse may take no patients (N = 0) */
    KEEL_STAFFING_NO_HIGH_ACUITY, /* high-acuity patients, but max_per_nurse is 0 */
} keel_staffing_block;

typedef struct keel_staffing {
    size_t census;   /* patients (with the clock: the most present at one moment) */
    size_t nnurses;  /* nurses on shift */
    size_t ncounted; /* nurses taking patients (workload limit above zero) */

    /* By care minutes. */
    long care_minutes;            /* all patients */
    long duty_minutes;            /* counted nurses */
    long capacity_minutes;        /* counted nurses */
    double mean_capacity_minutes; /* of counted nurses, or the stand-in nurse's */
    double minutes_nurses;        /* (care + duty) / mean capacity, a fraction */
    int by_minutes;               /* minutes_nurses rounded up (exactly, in integers) */

    /* By limits. */
    int staff_limit;     /* N; KEEL_ABSENT when nothing limits a staff nurse */
    int by_census;       /* ceil(census / N): the 1:N rule alone */
    int by_ratios;       /* N and the patients' ratios together; >= by_census */
    int nhigh_acuity;    /* high-acuity patients (0 without policy.high_acuity) */
    int max_high_acuity; /* policy.high_acuity.max_per_nurse, or KEEL_ABSENT */
    int by_high_acuity;  /* ceil(nhigh_acuity / max_high_acuity); 0 without the rule */
    int by_limits;       /* the larger of by_ratios and by_high_acuity; -1 when blocked */
    keel_staffing_block blocked;

    /* The ratio table (policy.ratio_table). */
    const keel_law_table *table;  /* built-in, never freed; NULL without a table */
    keel_shift_class shift_class; /* of this shift under the table; KEEL_SHIFT_ANY */
    int table_nurse_max;          /* the table's per-nurse maximum, or -1 when it sets none */
    int ward_minimum;             /* the table's ward minimum, or -1 when it sets none */
    int table_minimum;            /* the least nurses the table alone asks for: the ward
                                     minimum, else ceil(census / its per-nurse maximum);
                                     -1 when it sets neither */

    /* Hours. */
    long unit_minutes;        /* counted nurses' minutes on the unit, breaks included */
    double hours_per_patient; /* unit_minutes / 60 / census; 0 with no patients */

    /* The verdict. */
    int needed;                 /* the largest need; -1 when blocked */
    keel_staffing_need binding; /* which need that is (LIMITS when blocked) */
    int slack;                  /* ncounted - needed: below 0 short (above 0 is no verdict:
                                   needed is a lower bound, keel/verdict.h judges a plan);
                                   0 when blocked; with the clock at most moment_slack */

    /* With the clock: the moment where the nurses on (who take patients)
     * are fewest against what the limits need then. */
    bool clocked;
    int moment_from, moment_to; /* minutes after the shift's start */
    int moment_on;              /* counted nurses on throughout that moment */
    int moment_need;            /* nurses the limits need then */
    int moment_slack;           /* moment_on - moment_need */
    int shift_start;            /* minutes after midnight, for the words; KEEL_ABSENT */
} keel_staffing;

/* Fills *out with the staffing view of roster r and its workload w (w from
 * keel_workload_compute(r, ...)).  Nothing in *out is owned: out->table
 * points into the built-in tables.  Statuses: KEEL_OK; KEEL_ERR_NOMEM (*out
 * is then zeroed). */
KEEL_API keel_status keel_staffing_compute(const keel_roster *r, const keel_workload *w, keel_staffing *out,
                                  keel_error *err);

/* Writes the staffing view in plain words into buf, e.g. "28 patients need
 * at least 7 nurses under queensland (<the rest of keel_law_cite()>)
 * (afternoon shift); 6 nurses take patients: 1 short." (no count when none
 * are short), then the three needs and the hours per patient, then, with a
 * table, when the census exceeds what the counted nurses may hold under it.
 * buf is always NUL-terminated when size
 * > 0 (buf may be NULL when size is 0).  Returns the length the full text
 * needs, like snprintf. */
KEEL_API int keel_staffing_format(const keel_staffing *s, char *buf, size_t size);

/* Name of a need ("ward minimum", "limits", "care minutes"; "none"). */
KEEL_API const char *keel_staffing_need_name(keel_staffing_need need);

#ifdef __cplusplus
}
#endif
#endif
