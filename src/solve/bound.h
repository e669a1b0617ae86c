/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * bound.h - proven limits and their words (internal; src/solve/, beside
 * the answerers and the heuristics).
 *
 *   bound_simple.c the simple limits: a lower limit on the heaviest
 *                 utilisation, an upper limit on the lightest
 *   bound_split.c  the zone-split floor of pooled units (one zone a nurse)
 *   bound_words.c  what sets the proven bound, in plain words
 */
#ifndef KEEL_SOLVE_BOUND_H
#define KEEL_SOLVE_BOUND_H

#include <stdbool.h>

#include "keel/error.h"
#include "keel/roster.h"
#include "keel/solve.h"
#include "measure.h"

/* bound_simple.c: a lower limit on the heaviest utilisation of any valid
 * assignment (each counted nurse's duty, each patient on the nurse that
 * suits it best, the unit's total over the total capacity), and an upper
 * limit on the lightest (the unit's total over the total capacity). */
keel_ratio keel_bound_simple_peak(const keel_workload *w);
keel_ratio keel_bound_simple_lift(const keel_workload *w);

/* bound_split.c: *possible is false when it is proven that no valid
 * assignment has every counted nurse at or under utilisation t, because no
 * split of the nurses among the zones gives each zone the care, places and
 * high-acuity places it needs; true otherwise (also when the floor does not
 * apply or its table would be too large).  Statuses: KEEL_OK,
 * KEEL_ERR_NOMEM. */
keel_status keel_bound_split_possible(const keel_workload *w, keel_ratio t, bool *possible);

/* bound_words.c: fills sol->bound_reason: which simple floor (a nurse's
 * duty, one patient, the unit's average, a group of patients with few
 * nurses) reaches bound, stage 1's proven limit, or, when none does, that
 * whole patients set it.  Statuses: KEEL_OK, KEEL_ERR_NOMEM. */
keel_status keel_bound_words(const keel_roster *r, const keel_workload *w, double bound,
                             keel_solution *sol);

#endif
