/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * zone.h - the zone methods (internal; src/solve/, above the stages, below
 * the orchestrator): on pooled units where each nurse works in one zone,
 * a unit splits into zones that the stages solve alone.
 *
 *   zone_solve.c   stages 1 and 2 by zone, when the nurses are alike
 *   zone_polish.c  each zone with the plan's own nurses, then trades of
 *                  nurses between zones
 */
#ifndef KEEL_SOLVE_ZONE_H
#define KEEL_SOLVE_ZONE_H

#include <stdbool.h>

#include "keel/error.h"
#include "keel/solve.h"
#include "measure.h"

/* zone_solve.c: true when w splits by zone: max_zones 1, every patient in
 * a zone, no clock, the nurses who take patients interchangeable. */
bool keel_zone_solve_applies(const keel_workload *w);

/* zone_solve.c: stages 1 and 2 zone by zone (see the file); fills
 * sol->nurse_of and the two stages and sets *found, or leaves *found false
 * when no numbers of nurses per zone add up (the usual search then says
 * why).  Statuses: KEEL_OK, KEEL_ERR_NOMEM, KEEL_ERR_SOLVER. */
keel_status keel_zone_solve(const keel_workload *w, long long deadline_ms, keel_solution *sol,
                            bool *found, keel_error *err);

/* zone_polish.c: with each nurse in one zone (keel_measure_one_zone_each()),
 * improves nurse_of (which keeps every rule) zone by zone, each nurse kept
 * in the zone of her patients: the exact balance stages on each zone alone,
 * then trades of nurses between zones, until deadline_ms.  Does nothing
 * otherwise.  Statuses: KEEL_OK, KEEL_ERR_NOMEM, KEEL_ERR_SOLVER. */
keel_status keel_zone_polish(const keel_workload *w, long long deadline_ms, int *nurse_of,
                             keel_error *err);

#endif
