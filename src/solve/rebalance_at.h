/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * rebalance_at.h - the rest of a shift from the time of a rebalance
 * (internal to src/solve/rebalance*.c; see rebalance_at.c).
 */
#ifndef KEEL_SOLVE_REBALANCE_AT_H
#define KEEL_SOLVE_REBALANCE_AT_H

#include <stddef.h>

#include "keel/error.h"
#include "keel/roster.h"
#include "keel/workload.h"

/* The roster of the rest of r's shift from t minutes after its start
 * (0 < t < shift.minutes, not before the end of any record), w being r's
 * workload: *out is new (free it with keel_roster_free()), without
 * records; *discharged counts the patients who left before t and are not
 * in it; index[i] (room for r's patients) is r's patient i's index in
 * *out, or -1 for one who left.  Statuses: KEEL_OK, KEEL_ERR_NOMEM. */
keel_status keel_rebalance_at(const keel_roster *r, const keel_workload *w, int t,
                              keel_roster **out, size_t *discharged, int *index, keel_error *err);

/* The roster r without its records, for a rebalance without a time: *out
 * is new (free it with keel_roster_free()); a patient whose record covers
 * her whole stay has left and is not in it (counted in *discharged);
 * index as for keel_rebalance_at().  Statuses: KEEL_OK, KEEL_ERR_NOMEM. */
keel_status keel_rebalance_at_unrecorded(const keel_roster *r, keel_roster **out,
                                         size_t *discharged, int *index, keel_error *err);

#endif
