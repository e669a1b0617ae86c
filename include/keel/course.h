/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * keel/course.h - the course of the shift under an assignment: how many
 * patients each nurse holds from hour to hour, who holds whose patients
 * during each timed break, and which nurses should take the next unplanned
 * admissions.  Computed after the solve, from the roster, the workload and
 * the assignment; the report writers only format it.
 *
 * The assignment is nurse_of[keel_workload_nparts(w)] over the workload's parts (a
 * nurse index or -1).  A patient counts once at a moment while one of its
 * parts held by the nurse covers that moment; counts change only at moment
 * boundaries (w->moment_start), so every figure below is exact.
 *
 * Timeline.  For each nurse, her count at her start, then a change at every
 * moment boundary inside her time on the unit where the count differs, then,
 * when she leaves before the shift's end, a last change at her end time
 * with patients = KEEL_COURSE_OFF.  A nurse on to the shift's end has no
 * "off" entry.
 *
 * Break cover.  Every timed break (nurses[].breaks) has a cover from the
 * break plan, chosen from the roster before the solve (docs/model.md,
 * "Break cover"): in time order (ties by nurse, then break), first the
 * breaks of nurses with no free buddy get the first relief nurse (role
 * relief) who is on throughout, not on a break of her own and not covering
 * an overlapping break, else nobody; then the other breaks get such a
 * relief nurse when one is left, else the first free buddy (a nurse whose
 * `covers` names the nurse on break).  A break during which the nurse holds
 * no patients needs no cover (cover -1, not flagged).  The cover holds her
 * own patients plus the breaking nurse's; `most` is the largest number she
 * holds at one moment of the break.  The limit that applies at all times
 * is the ratio table's per-nurse maximum when the table sets one for the
 * unit (flag "law_limit"), otherwise the cover's patient limit (flag
 * "patient_limit"); a relief nurse stands in for the breaking nurse, so
 * without a table her limit is the larger of her own and the breaking
 * nurse's.  Source: California Code of Regulations, Title 22, section
 * 70217(a) (CDPH AFL 08-07, 2008): the ratios hold at all times, breaks
 * included (that breaks are included is from a secondary summary of the
 * text).  A break without a cover is flagged "no_cover".  When the roster
 * names a buddy or a relief nurse, keel's own assignments keep every cover
 * within the limit (rule break_cover), so only a plan typed in or a
 * best-effort plan is flagged.
 *
 * Relief needed.  A break needs a relief nurse when it needs cover and no
 * buddy could cover it within the limit under this plan (no buddy is free,
 * or the first free buddy would go over).  relief_needed is the most such
 * breaks at one time; relief_on_roster the nurses with role relief.
 *
 * Admission order.  A typical admission carries admission_minutes =
 * ceil(sum of care over all parts / number of roster patients), expected
 * admissions included.  It is taken to arrive at the end of the nurse's
 * time on the unit: a nurse has room when her count at her last moment on
 * the unit (the moment that ends at her end time), plus the admissions
 * already picked for her, plus one, is at most her patient limit
 * (w->max_patients) and at most the "1:N" of every patient she holds at
 * that moment.  Each pick is the counted nurse with room whose utilisation
 * (duty + care held + the admissions picked for her, each
 * admission_minutes, over her capacity) after one more admission is
 * lowest, ties to the lower nurse index; she takes it before the next pick,
 * so a nurse may be picked more than once.  Fewer picks than asked means
 * nobody else has room (none: the unit is full); a pick that takes a nurse
 * over her time is marked `over`, never left out, since she may still be
 * the best there is.
 */
#ifndef KEEL_COURSE_H
#define KEEL_COURSE_H

#include "keel/api.h"

#include <stdbool.h>
#include <stddef.h>

#include "keel/error.h"
#include "keel/roster.h"
#include "keel/workload.h"

#ifdef __cplusplus
extern "C" {
#endif

/* The patients of a timeline entry when the nurse has left the unit. */
#define KEEL_COURSE_OFF (-1)

/* From minute `at` (after the shift's start) the nurse holds `patients`
 * patients, or has left (KEEL_COURSE_OFF). */
typedef struct keel_course_change {
    int at;
    int patients;
} keel_course_change;

/* One nurse's count over the shift, changes in time order; the first is at
 * her start time. */
typedef struct keel_course_timeline {
    size_t nchanges;
    keel_course_change *changes;
} keel_course_timeline;

/* Who holds a nurse's patients during one timed break. */
typedef struct keel_break_cover {
    size_t nurse;      /* the nurse on break */
    size_t brk;        /* index into nurses[nurse].breaks */
    int at;            /* minutes after the shift's start */
    int minutes;       /* the break's length */
    int cover;         /* the covering nurse, or -1 (none, or none needed) */
    bool relief;       /* the cover is a relief nurse, not a buddy */
    int most;          /* most patients the cover holds at one moment of the break; without
                          a cover, the breaking nurse's own most */
    int limit;         /* the limit `most` is checked against (law or patient limit) */
    size_t npatients;  /* patients handed over (held by the nurse during the break) */
    size_t *patients;  /* roster patient indices, ascending */
    const char *rule;  /* static: "law_limit", "patient_limit", "no_cover", or NULL */
    bool needs_relief; /* needs cover and no buddy can give it within the limit */
} keel_break_cover;

/* One admission of the admission order. */
typedef struct keel_admission_pick {
    size_t nurse;
    int load_minutes;   /* her load after taking this admission */
    double utilisation; /* load_minutes / capacity */
    bool over;          /* load_minutes is over her capacity: taking it overloads her */
} keel_admission_pick;

typedef struct keel_course {
    size_t nnurses;
    keel_course_timeline *timelines; /* [nnurses] */

    size_t nbreaks;
    keel_break_cover *breaks; /* by nurse, then break, in roster order */
    int relief_needed;        /* most breaks at one time that need a relief nurse */
    int relief_on_roster;     /* nurses with role relief */

    int admission_minutes; /* care of one typical admission */
    size_t npicks;         /* at most the number asked for */
    keel_admission_pick *picks;
} keel_course;

/* Computes the course of the shift for the assignment nurse_of
 * ([keel_workload_nparts(w)], a nurse index or -1) of roster r under workload w, with
 * an admission order of up to nadmissions picks.  The caller owns *out; free
 * it with keel_course_free().  Statuses: KEEL_OK, KEEL_ERR_NOMEM. */
KEEL_API keel_status keel_course_compute(const keel_roster *r, const keel_workload *w, const int *nurse_of,
                                size_t nadmissions, keel_course **out, keel_error *err);

/* Frees the course.  NULL-safe. */
KEEL_API void keel_course_free(keel_course *c);

#ifdef __cplusplus
}
#endif
#endif
