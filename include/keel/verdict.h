/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * keel/verdict.h - the one verdict on a plan's staffing, the sentence a
 * charge nurse acts on ("enough", "short"), computed once from the plan
 * itself so that no report can say "enough" beside a plan that breaks a
 * limit.
 *
 * The verdict checks the plan it is given, whatever the caller checked
 * before: the rules of keel_plan_check() at every moment of the shift,
 * the break plan of keel_course_compute() (every timed break covered
 * within the limit that holds during breaks), and each counted nurse's
 * load against her time (over 100 % is an overload).  Then:
 *
 *   enough        the plan keeps every rule, every break has cover within
 *                 the limit, and no nurse is over 100 % of her time;
 *   short         the plan goes over a limit on the patients a nurse holds
 *                 (patient_limit, law_limit, patient_ratio, moment_limit,
 *                 high_acuity, capacity), leaves a break without cover
 *                 within the limit, or has a nurse over 100 %; or fewer
 *                 nurses take patients than the ratio table's ward
 *                 minimum for this census (keel/staffing.h);
 *   rules_broken  it keeps every limit but breaks other rules (a
 *                 competency, a lock, an avoid list, isolation, zones,
 *                 fewest patients, hand-offs): not a staffing shortfall,
 *                 but not "enough" either;
 *   no_plan       no valid assignment exists (the solve's status), even
 *                 when a best-effort plan is shown;
 *   not_judged    no complete plan to judge (keel check of a roster whose
 *                 patients do not all have a nurse).
 *
 * Every report (text, yaml, json) carries the same verdict and the same
 * counts (keel_report_write() computes it when the caller gave none).
 */
#ifndef KEEL_VERDICT_H
#define KEEL_VERDICT_H

#include "keel/api.h"

#include <stddef.h>

#include "keel/error.h"
#include "keel/roster.h"
#include "keel/solve.h"
#include "keel/workload.h"

#ifdef __cplusplus
extern "C" {
#endif

typedef enum keel_verdict_kind {
    KEEL_VERDICT_ENOUGH,
    KEEL_VERDICT_SHORT,
    KEEL_VERDICT_RULES_BROKEN,
    KEEL_VERDICT_NO_PLAN,
    KEEL_VERDICT_NOT_JUDGED,
} keel_verdict_kind;

typedef struct keel_verdict {
    keel_verdict_kind kind;
    size_t limits_broken;    /* findings of the plan under a limit rule (see above) */
    size_t rules_broken;     /* findings under the other rules */
    size_t breaks;           /* timed breaks during which the nurse holds patients */
    size_t breaks_uncovered; /* of those, the breaks without cover within the limit */
    size_t overloaded;       /* counted nurses whose load is over their time */
    int ward_minimum;        /* the ratio table's ward minimum for this census, or -1 */
    int ward_short;          /* nurses short of it (0: none short, or no minimum) */
    int most_over;                /* the overloaded nurse furthest over, or -1 */
    double most_over_utilisation; /* her utilisation */
    char *text;                   /* the verdict in plain words */
} keel_verdict;

/* Judges the plan nurse_of ([keel_workload_nparts(w)]; NULL: no complete
 * plan) of roster r under workload w; s is the solve (NULL: none), whose
 * INFEASIBLE status makes the verdict no_plan.  The caller owns *out; free
 * it with keel_verdict_free().  Statuses: KEEL_OK, KEEL_ERR_NOMEM. */
KEEL_API keel_status keel_verdict_compute(const keel_roster *r, const keel_workload *w,
                                          const keel_solution *s, const int *nurse_of,
                                          keel_verdict **out, keel_error *err);

/* Frees the verdict.  NULL-safe. */
KEEL_API void keel_verdict_free(keel_verdict *v);

/* "enough", "short", "rules_broken", "no_plan" or "not_judged". */
KEEL_API const char *keel_verdict_kind_name(keel_verdict_kind kind);

#ifdef __cplusplus
}
#endif
#endif
